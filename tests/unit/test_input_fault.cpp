// Fault kinds read from the real decoder's errors: a change of the decoder's wording shows
// up here, not as a merged or split flood of `input` events.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/input_decoder.h"
#include "dewmargin/input_fault.h"

namespace dewmargin {
namespace {

input_config numeric(const std::string& field = "") {
  input_config c;
  c.topic = "t";
  c.field = field;
  c.unit = input_unit::celsius;
  return c;
}

struct fault_case {
  const char* payload;
  std::string field;
  input_fault fault;
};

TEST(InputFault, ClassifiesEveryNumericDecodingError) {
  const std::vector<fault_case> cases = {
      {"", "", input_fault::empty},
      {"   ", "", input_fault::empty},
      {"warm", "", input_fault::not_a_number},
      {"0x15", "", input_fault::not_a_number},
      {"1e999", "", input_fault::not_finite},
      {"nan", "", input_fault::not_finite},
      {"{[", "/t", input_fault::not_json},
      {"24", "/t", input_fault::missing_field},
      {R"({"x": 24})", "/t", input_fault::missing_field},
      {R"({"t": "warm"})", "/t", input_fault::not_a_number},
      {R"({"t": ""})", "/t", input_fault::empty},
      {R"({"t": [1]})", "/t", input_fault::not_a_number},
      {R"({"t": null})", "/t", input_fault::not_a_number},
  };
  for (const auto& c : cases) {
    const auto r = decode_number(c.payload, numeric(c.field), input_kind::air_temp);
    ASSERT_FALSE(r.ok()) << c.payload;
    EXPECT_EQ(input_fault_name(classify_decode_error(r.err())), std::string(input_fault_name(c.fault)))
        << c.payload << " -> " << r.err().message;
  }
}

TEST(InputFault, ClassifiesSwitchDecodingErrors) {
  input_config c;
  c.topic = "t";
  c.field = "/state";
  c.active = {"wet"};
  const auto wrong = decode_switch(R"({"state": {"a": 1}})", c);
  ASSERT_FALSE(wrong.ok());
  EXPECT_EQ(classify_decode_error(wrong.err()), input_fault::wrong_type);
  const auto not_json = decode_switch("wet", c);
  ASSERT_FALSE(not_json.ok());
  EXPECT_EQ(classify_decode_error(not_json.err()), input_fault::not_json);
}

TEST(InputFault, RangeErrorsAreOutOfRange) {
  const auto r = check_plausible(500.0, input_kind::surface, plausibility_config{});
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(classify_decode_error(r.err()), input_fault::out_of_range);
}

TEST(InputFault, NamesAreStable) {
  EXPECT_STREQ(input_fault_name(input_fault::not_json), "not_json");
  EXPECT_STREQ(input_fault_name(input_fault::out_of_order), "out_of_order");
  EXPECT_STREQ(input_fault_name(input_fault::unknown_word), "unknown_word");
}

}  // namespace
}  // namespace dewmargin
