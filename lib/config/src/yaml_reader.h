#pragma once
// Reading the config's YAML nodes (yaml_document.h) with located errors. Private to the
// config adapter: yaml-cpp never appears in a public header.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "diagnostics.h"
#include "yaml_document.h"

namespace dewmargin::config_detail {

// 1-based place of a node; {0, 0} for a node that has none.
[[nodiscard]] source_mark mark_of(const yaml_node& node);

// "a map", "a list", "nothing" or the scalar in quotes: for "got ..." in messages.
[[nodiscard]] std::string describe(const yaml_node& node);

// Shortest text of a number for messages: 2, 0.3, 15.5.
[[nodiscard]] std::string format_number(double value);

enum class presence { optional, required };
enum class number_rule { any, non_negative, positive };

// A value read from the file together with where it stands.
template <typename T>
struct located {
  T value;
  source_mark at;
};

// One YAML map checked against the keys it may hold. Unknown keys (with the nearest
// known key suggested) and repeated keys are reported when the reader is made; typed
// reads report wrong types and values at the value itself.
class map_reader {
 public:
  // `context` names the map in messages ("defaults", "zone 'level2-east'"); empty
  // means the top level. `node` must already be known to be a map.
  map_reader(const yaml_node& node, std::string context, const std::vector<std::string>& keys, diagnostics& diag);

  [[nodiscard]] const std::string& context() const { return context_; }
  [[nodiscard]] source_mark mark() const { return mark_; }
  [[nodiscard]] diagnostics& diag() const { return diag_; }

  [[nodiscard]] bool has(std::string_view key) const { return find(key) != nullptr; }
  // The value of `key` (first occurrence), or nullptr.
  [[nodiscard]] const yaml_node* value(std::string_view key) const;
  [[nodiscard]] source_mark key_mark(std::string_view key) const;
  // Where the value stands; the key's place when the value is empty (yaml-cpp
  // places an empty value at the start of the next line).
  [[nodiscard]] source_mark value_mark(std::string_view key) const;

  // Reports "CONTEXT: missing required key 'K'" when absent, unless a misspelt key
  // already pointed at it. Returns whether the key is there.
  bool require(std::string_view key) const;

  // Typed reads. An absent key gives nullopt (reported if required); a present key
  // of the wrong type or out of the rule's range is reported and gives nullopt.
  [[nodiscard]] std::optional<located<std::string>> text(std::string_view key, presence p = presence::optional) const;
  [[nodiscard]] std::optional<located<double>> number(std::string_view key, number_rule rule,
                                                      presence p = presence::optional) const;
  // Reads a number into `target` when present and valid; returns false on a reported error.
  bool number_into(std::string_view key, number_rule rule, double& target) const;

 private:
  struct entry {
    std::string key;
    yaml_node key_node;
    yaml_node value;
  };
  [[nodiscard]] const entry* find(std::string_view key) const;
  [[nodiscard]] std::string missing_prefix() const;

  std::string context_;
  source_mark mark_;
  diagnostics& diag_;
  std::vector<entry> entries_;          // known keys, first occurrence each
  std::vector<std::string> suggested_;  // known keys a misspelt key was taken for
};

// Scalar reads outside a map (list items). `what` names the value in messages.
[[nodiscard]] std::optional<std::string> scalar_text(const yaml_node& node, std::string_view what, source_mark at,
                                                     diagnostics& diag);

// Is this node a map? If not, reports "'NAME' must be a map ..., got X" at `at`.
bool expect_map(const yaml_node& node, std::string_view name, std::string_view shape_hint, source_mark at,
                diagnostics& diag);

}  // namespace dewmargin::config_detail
