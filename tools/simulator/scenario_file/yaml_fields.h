#pragma once
// Reading the scenario's YAML with located errors, the way the service config is read
// (lib/config): every problem is collected with its FILE:LINE:COL, and reading goes on, so
// one pass reports every mistake. Private to the scenario reader; yaml-cpp stays out of every
// other header.
#include <yaml-cpp/yaml.h>

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config_loader.h"
#include "model/time_series.h"

namespace dewmargin::sim::scenario_detail {

// 1-based; {0, 0}: the file as a whole.
struct place {
  int line = 0;
  int column = 0;
};
[[nodiscard]] place place_of(const YAML::Node& node);

// "a map", "a list", "nothing" or the scalar in quotes: for "got ..." in messages.
[[nodiscard]] std::string describe(const YAML::Node& node);
// Shortest text of a number: 2, 0.3, 15.5.
[[nodiscard]] std::string number_text(double v);
// The closest of `choices` to a misspelt `word`, if one is close enough.
[[nodiscard]] std::optional<std::string> nearest_word(std::string_view word, const std::vector<std::string>& choices);
// "a, b or c"
[[nodiscard]] std::string one_of(const std::vector<std::string>& words);

// Every error of a reading, from one or more files.
class error_list {
 public:
  void add(const std::string& file, place at, std::string message);
  [[nodiscard]] bool empty() const { return errors_.empty(); }
  // Grouped by file (in the order files were first mentioned), then by place; repeats dropped.
  [[nodiscard]] std::vector<config_diagnostic> take();

 private:
  std::vector<std::string> files_;
  std::vector<config_diagnostic> errors_;
};

// One file being read.
struct source {
  std::string file;  // as named in messages
  error_list* errors;
  void error(place at, std::string message) const { errors->add(file, at, std::move(message)); }
};

// The permitted range of a number.
struct number_range {
  double low;
  double high;
  bool low_open;  // low itself not allowed
  static number_range positive() { return {0.0, 1e300, true}; }
  static number_range non_negative() { return {0.0, 1e300, false}; }
  static number_range between(double low, double high) { return {low, high, false}; }
};

// A number checked against a range; reports at the node and gives nullopt when it is not.
std::optional<double> read_number(const YAML::Node& node, const std::string& name, number_range r, const source& src);

// A YAML map checked against the keys it may hold: unknown keys (with the nearest known one
// suggested) and repeated keys are reported when the reader is made.
class fields {
 public:
  // `context` names the map in messages ("zone 'g-lobby'"); empty: the top level.
  fields(const YAML::Node& map, std::string context, std::vector<std::string> keys, const source& src);

  [[nodiscard]] const std::string& context() const { return context_; }
  [[nodiscard]] const source& src() const { return src_; }
  [[nodiscard]] place where() const { return place_; }
  [[nodiscard]] bool has(std::string_view key) const { return find(key) != nullptr; }
  [[nodiscard]] const YAML::Node* node(std::string_view key) const;
  [[nodiscard]] place key_place(std::string_view key) const;
  [[nodiscard]] place value_place(std::string_view key) const;
  // Reports "CONTEXT: missing required key 'K'" unless a misspelt key already pointed at it.
  bool require(std::string_view key) const;
  void error_at_value(std::string_view key, const std::string& message) const;

  [[nodiscard]] std::optional<double> number(std::string_view key, number_range r) const;
  // Reads into `target` when present and valid.
  void number_into(std::string_view key, number_range r, double& target) const;
  [[nodiscard]] std::optional<std::string> text(std::string_view key) const;
  [[nodiscard]] std::optional<double> time_of_day(std::string_view key) const;
  // One of `words`; reported with the nearest when it is not.
  [[nodiscard]] std::optional<std::string> word(std::string_view key, const std::vector<std::string>& words) const;
  // A number (the same all day) or a map "HH:MM": number in increasing time, each in range.
  [[nodiscard]] std::optional<time_series> series(std::string_view key, number_range r) const;
  // A map whose keys are ids (zones, loops, schedules): the entries in file order.
  struct id_entry {
    std::string id;
    place at;  // of the id
    YAML::Node value;
  };
  [[nodiscard]] std::vector<id_entry> entries(std::string_view key) const;

 private:
  struct entry {
    std::string key;
    YAML::Node key_node;
    YAML::Node value;
  };
  [[nodiscard]] const entry* find(std::string_view key) const;
  [[nodiscard]] std::string name(std::string_view key) const { return "'" + std::string(key) + "'"; }

  std::string context_;
  place place_;
  source src_;
  std::vector<entry> entries_;
  std::vector<std::string> suggested_;
};

// A series read from any node (used by `fields::series` and for schedules).
std::optional<time_series> read_series(const YAML::Node& node, const std::string& name, number_range r,
                                       const source& src);

}  // namespace dewmargin::sim::scenario_detail
