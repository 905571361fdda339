#include "scenario_file/yaml_fields.h"

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <tuple>

#include "model/scenario.h"

namespace dewmargin::sim::scenario_detail {
namespace {

// A plain decimal number: [-+]digits[.digits][e[-+]digits]; no hex, inf or nan.
std::optional<double> parse_decimal(const std::string& s) {
  std::size_t i = 0;
  if (i < s.size() && (s[i] == '-' || s[i] == '+')) ++i;
  std::size_t digits = 0;
  while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i, ++digits;
  if (i < s.size() && s[i] == '.') {
    ++i;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i, ++digits;
  }
  if (digits == 0) return std::nullopt;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    ++i;
    if (i < s.size() && (s[i] == '-' || s[i] == '+')) ++i;
    std::size_t exponent_digits = 0;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i, ++exponent_digits;
    if (exponent_digits == 0) return std::nullopt;
  }
  if (i != s.size()) return std::nullopt;
  errno = 0;
  const double v = std::strtod(s.c_str(), nullptr);
  if (errno == ERANGE || !std::isfinite(v)) return std::nullopt;
  return v;
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t above = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diagonal = above;
    }
  }
  return row[b.size()];
}

std::string range_text(number_range r) {
  if (r.high >= 1e299) return r.low_open ? "greater than " + number_text(r.low) : "at least " + number_text(r.low);
  return "between " + number_text(r.low) + " and " + number_text(r.high);
}

}  // namespace

place place_of(const YAML::Node& node) {
  const YAML::Mark m = node.Mark();
  if (m.is_null()) return {};
  return {m.line + 1, m.column + 1};
}

std::string describe(const YAML::Node& node) {
  switch (node.Type()) {
    case YAML::NodeType::Map:
      return node.size() == 0 ? "an empty map" : "a map";
    case YAML::NodeType::Sequence:
      return node.size() == 0 ? "an empty list" : "a list";
    case YAML::NodeType::Scalar:
      return "'" + node.Scalar() + "'";
    case YAML::NodeType::Null:
    case YAML::NodeType::Undefined:
      break;
  }
  return "nothing";
}

std::string number_text(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

std::optional<std::string> nearest_word(std::string_view word, const std::vector<std::string>& choices) {
  std::optional<std::string> best;
  std::size_t best_distance = 0;
  for (const auto& c : choices) {
    const std::size_t d = edit_distance(word, c);
    if (!best || d < best_distance) {
      best = c;
      best_distance = d;
    }
  }
  // Close enough to be a slip: at most a third of the word, and at least one letter.
  if (best && best_distance <= std::max<std::size_t>(1, word.size() / 3)) return best;
  return std::nullopt;
}

std::string one_of(const std::vector<std::string>& words) {
  std::string out;
  for (std::size_t i = 0; i < words.size(); ++i) {
    if (i > 0) out += i + 1 == words.size() ? " or " : ", ";
    out += words[i];
  }
  return out;
}

void error_list::add(const std::string& file, place at, std::string message) {
  if (std::find(files_.begin(), files_.end(), file) == files_.end()) files_.push_back(file);
  errors_.push_back({file, at.line, at.column, std::move(message)});
}

std::vector<config_diagnostic> error_list::take() {
  const auto file_rank = [&](const std::string& f) {
    return std::find(files_.begin(), files_.end(), f) - files_.begin();
  };
  std::stable_sort(errors_.begin(), errors_.end(), [&](const config_diagnostic& a, const config_diagnostic& b) {
    return std::make_tuple(file_rank(a.file), a.line, a.column) < std::make_tuple(file_rank(b.file), b.line, b.column);
  });
  std::vector<config_diagnostic> out;
  for (auto& e : errors_) {
    const bool repeat = !out.empty() && out.back().file == e.file && out.back().line == e.line &&
                        out.back().column == e.column && out.back().message == e.message;
    if (!repeat) out.push_back(std::move(e));
  }
  errors_.clear();
  return out;
}

std::optional<double> read_number(const YAML::Node& node, const std::string& name, number_range r, const source& src) {
  const place at = place_of(node);
  if (!node.IsScalar()) {
    src.error(at, name + " must be a number, got " + describe(node));
    return std::nullopt;
  }
  const auto v = parse_decimal(node.Scalar());
  if (!v) {
    src.error(at, name + " must be a number, got '" + node.Scalar() + "'");
    return std::nullopt;
  }
  const bool below = r.low_open ? *v <= r.low : *v < r.low;
  if (below || *v > r.high) {
    src.error(at, name + " must be " + range_text(r) + ", got " + node.Scalar());
    return std::nullopt;
  }
  return v;
}

fields::fields(const YAML::Node& map, std::string context, std::vector<std::string> keys, const source& src)
    : context_(std::move(context)), place_(place_of(map)), src_(src) {
  const std::string where = context_.empty() ? "at the top level" : "in " + context_;
  for (const auto& kv : map) {
    const YAML::Node& k = kv.first;
    const place at = place_of(k);
    if (!k.IsScalar()) {
      src_.error(at, "keys must be plain words, got " + describe(k) + " " + where);
      continue;
    }
    const std::string& key = k.Scalar();
    if (const entry* first = find(key)) {
      src_.error(at, "duplicate key '" + key + "' " + where + " (first at line " +
                         std::to_string(place_of(first->key_node).line) + ")");
      continue;
    }
    if (std::find(keys.begin(), keys.end(), key) == keys.end()) {
      std::string message = "unknown key '" + key + "' " + where;
      if (auto near = nearest_word(key, keys)) {
        message += "; did you mean '" + *near + "'?";
        suggested_.push_back(*near);
      } else {
        message += " (expected " + one_of(keys) + ")";
      }
      src_.error(at, std::move(message));
      continue;
    }
    entries_.push_back({key, k, kv.second});
  }
}

const fields::entry* fields::find(std::string_view key) const {
  for (const auto& e : entries_) {
    if (e.key == key) return &e;
  }
  return nullptr;
}

const YAML::Node* fields::node(std::string_view key) const {
  const entry* e = find(key);
  return e ? &e->value : nullptr;
}

place fields::key_place(std::string_view key) const {
  const entry* e = find(key);
  return e ? place_of(e->key_node) : place_;
}

place fields::value_place(std::string_view key) const {
  const entry* e = find(key);
  if (!e) return place_;
  if (e->value.IsNull()) return place_of(e->key_node);  // yaml-cpp places an empty value on the next line
  const place at = place_of(e->value);
  return at.line == 0 ? place_of(e->key_node) : at;
}

bool fields::require(std::string_view key) const {
  if (has(key)) return true;
  if (std::find(suggested_.begin(), suggested_.end(), key) == suggested_.end()) {
    src_.error(place_, (context_.empty() ? "" : context_ + ": ") + "missing required key '" + std::string(key) + "'");
  }
  return false;
}

void fields::error_at_value(std::string_view key, const std::string& message) const {
  src_.error(value_place(key), message);
}

std::optional<double> fields::number(std::string_view key, number_range r) const {
  const YAML::Node* n = node(key);
  if (!n) return std::nullopt;
  if (n->IsNull()) {
    src_.error(value_place(key), name(key) + " must be a number, got nothing");
    return std::nullopt;
  }
  return read_number(*n, name(key), r, src_);
}

void fields::number_into(std::string_view key, number_range r, double& target) const {
  if (auto v = number(key, r)) target = *v;
}

std::optional<std::string> fields::text(std::string_view key) const {
  const YAML::Node* n = node(key);
  if (!n) return std::nullopt;
  if (!n->IsScalar() || n->Scalar().empty()) {
    src_.error(value_place(key), name(key) + " must be text, got " + describe(*n));
    return std::nullopt;
  }
  return n->Scalar();
}

std::optional<double> fields::time_of_day(std::string_view key) const {
  const auto t = text(key);
  if (!t) return std::nullopt;
  const auto s = parse_clock_text(*t);
  if (!s)
    src_.error(value_place(key), name(key) + " must be a time of day HH:MM from 00:00 to 24:00, got '" + *t + "'");
  return s;
}

std::optional<std::string> fields::word(std::string_view key, const std::vector<std::string>& words) const {
  const auto t = text(key);
  if (!t) return std::nullopt;
  if (std::find(words.begin(), words.end(), *t) != words.end()) return t;
  std::string message = name(key) + " must be " + one_of(words) + ", got '" + *t + "'";
  if (auto near = nearest_word(*t, words)) message += "; did you mean '" + *near + "'?";
  src_.error(value_place(key), message);
  return std::nullopt;
}

std::optional<time_series> fields::series(std::string_view key, number_range r) const {
  const YAML::Node* n = node(key);
  if (!n) return std::nullopt;
  if (n->IsNull()) {
    src_.error(value_place(key), name(key) + " must be a number or a map of times HH:MM to numbers, got nothing");
    return std::nullopt;
  }
  return read_series(*n, name(key), r, src_);
}

std::vector<fields::id_entry> fields::entries(std::string_view key) const {
  std::vector<id_entry> out;
  const YAML::Node* n = node(key);
  if (!n) return out;
  if (!n->IsMap()) {
    src_.error(value_place(key), name(key) + " must be a map of ids, got " + describe(*n));
    return out;
  }
  for (const auto& kv : *n) {
    const YAML::Node& k = kv.first;
    if (!k.IsScalar() || k.Scalar().empty()) {
      src_.error(place_of(k), name(key) + ": ids must be plain words, got " + describe(k));
      continue;
    }
    const auto first = std::find_if(out.begin(), out.end(), [&](const id_entry& e) { return e.id == k.Scalar(); });
    if (first != out.end()) {
      src_.error(place_of(k), "duplicate id '" + k.Scalar() + "' in " + name(key) + " (first at line " +
                                  std::to_string(first->at.line) + ")");
      continue;
    }
    out.push_back({k.Scalar(), place_of(k), kv.second});
  }
  return out;
}

std::optional<time_series> read_series(const YAML::Node& node, const std::string& name, number_range r,
                                       const source& src) {
  if (node.IsScalar()) {
    const auto v = read_number(node, name, r, src);
    if (!v) return std::nullopt;
    return time_series::constant(*v);
  }
  if (!node.IsMap() || node.size() == 0) {
    src.error(place_of(node), name + " must be a number or a map of times HH:MM to numbers, got " + describe(node));
    return std::nullopt;
  }
  std::vector<std::pair<double, double>> points;
  bool ok = true;
  for (const auto& kv : node) {
    const YAML::Node& k = kv.first;
    const auto t = k.IsScalar() ? parse_clock_text(k.Scalar()) : std::nullopt;
    if (!t) {
      src.error(place_of(k), name + ": times must be HH:MM from 00:00 to 24:00, got " + describe(k));
      ok = false;
      continue;
    }
    if (!points.empty() && *t <= points.back().first) {
      src.error(place_of(k),
                name + ": times must increase, got " + k.Scalar() + " after " + clock_text(points.back().first));
      ok = false;
      continue;
    }
    const auto v = read_number(kv.second, name + " at " + k.Scalar(), r, src);
    if (!v) {
      ok = false;
      continue;
    }
    points.emplace_back(*t, *v);
  }
  if (!ok) return std::nullopt;
  return time_series(std::move(points));
}

}  // namespace dewmargin::sim::scenario_detail
