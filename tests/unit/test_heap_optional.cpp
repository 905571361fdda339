// heap_optional: std::optional's behaviour for the config's optional inputs, kept on the heap.
#include <gtest/gtest.h>

#include <optional>
#include <string>

#include "dewmargin/config.h"
#include "dewmargin/heap_optional.h"

namespace dewmargin {
namespace {

TEST(HeapOptional, BehavesAsAnOptionalAndCopiesItsValue) {
  heap_optional<input_config> none;
  EXPECT_FALSE(none);
  EXPECT_FALSE(none.has_value());
  EXPECT_THROW((void)none.value(), std::bad_optional_access);

  input_config wet;
  wet.topic = "b/z1/wet";
  wet.active = {"1", "wet"};
  heap_optional<input_config> a = wet;
  ASSERT_TRUE(a);
  EXPECT_EQ(a->topic, "b/z1/wet");

  heap_optional<input_config> b = a;  // a deep copy: changing one leaves the other
  b->topic = "b/z2/wet";
  EXPECT_EQ(a->topic, "b/z1/wet");
  EXPECT_EQ((*b).topic, "b/z2/wet");
  a = b;
  EXPECT_EQ(a->topic, "b/z2/wet");
  a = a;  // self-assignment keeps the value
  EXPECT_EQ(a->topic, "b/z2/wet");

  const std::optional<input_config> from_reader = wet;  // what the config reader returns
  heap_optional<input_config> c;
  c = from_reader;
  ASSERT_TRUE(c);
  EXPECT_EQ(c->active, (std::vector<std::string>{"1", "wet"}));
  c = std::optional<input_config>{};
  EXPECT_FALSE(c);
  c.emplace(wet);
  EXPECT_TRUE(c);
  c = std::nullopt;
  EXPECT_FALSE(c);

  heap_optional<input_config> moved = std::move(b);
  EXPECT_EQ(moved->topic, "b/z2/wet");
}

TEST(HeapOptional, AnEmptyOneTakesAPointerWhereStdOptionalTakesTheWholeValue) {
  EXPECT_EQ(sizeof(heap_optional<input_config>), sizeof(void*));
  EXPECT_GT(sizeof(std::optional<input_config>), 100u);
}

}  // namespace
}  // namespace dewmargin
