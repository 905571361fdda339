#include "yaml_reader.h"

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>

#include "dewmargin/safe_text.h"
#include "nearest_word.h"
#include "text_check.h"

namespace dewmargin::config_detail {
namespace {

// A plain decimal number: [-+]digits[.digits][e[-+]digits]. Stricter than strtod,
// which would also take hex, "inf" and "nan".
bool looks_decimal(const std::string& s) {
  std::size_t i = 0;
  if (i < s.size() && (s[i] == '-' || s[i] == '+')) ++i;
  std::size_t digits = 0;
  while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i, ++digits;
  if (i < s.size() && s[i] == '.') {
    ++i;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i, ++digits;
  }
  if (digits == 0) return false;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    ++i;
    if (i < s.size() && (s[i] == '-' || s[i] == '+')) ++i;
    std::size_t exponent_digits = 0;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i, ++exponent_digits;
    if (exponent_digits == 0) return false;
  }
  return i == s.size();
}

std::optional<double> parse_decimal(const std::string& s) {
  if (!looks_decimal(s)) return std::nullopt;
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(s.c_str(), &end);
  if (errno == ERANGE || !std::isfinite(v)) return std::nullopt;
  return v;
}

std::string join(const std::vector<std::string>& words) {
  std::string out;
  for (const auto& w : words) {
    if (!out.empty()) out += ", ";
    out += w;
  }
  return out;
}

}  // namespace

source_mark mark_of(const yaml_node& node) { return node.mark(); }

std::string describe(const yaml_node& node) {
  switch (node.kind()) {
    case yaml_kind::map:
      return node.size() == 0 ? "an empty map" : "a map";
    case yaml_kind::sequence:
      return node.size() == 0 ? "an empty list" : "a list";
    case yaml_kind::scalar:
      return "'" + text_excerpt(node.scalar(), 60) + "'";
    case yaml_kind::null:
      break;
  }
  return "nothing";
}

std::string format_number(double value) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", value);
  return buf;
}

map_reader::map_reader(const yaml_node& node, std::string context, const std::vector<std::string>& keys,
                       diagnostics& diag)
    : context_(std::move(context)), mark_(mark_of(node)), diag_(diag) {
  const std::string where = context_.empty() ? "at the top level" : "in " + context_;
  for (const auto& kv : node.pairs()) {
    const yaml_node& k = kv.key;
    const source_mark at = mark_of(k);
    if (!k.is_scalar()) {
      diag_.error(at, "keys must be plain words, got " + describe(k) + " " + where);
      continue;
    }
    const std::string& name = k.scalar();
    if (const entry* first = find(name)) {
      diag_.error(at, "duplicate key '" + name + "' " + where + " (first at line " +
                          std::to_string(mark_of(first->key_node).line) + ")");
      continue;
    }
    if (std::find(keys.begin(), keys.end(), name) == keys.end()) {
      if (name == "password" && std::find(keys.begin(), keys.end(), "password_file") != keys.end()) {
        // Secrets stay out of a file that is copied around and checked in.
        diag_.error(at,
                    "'password' must not be written in the config; put it in a file and name that file with "
                    "'password_file'");
        continue;
      }
      if (name == "<<") {
        diag_.error(at, "YAML merge keys ('<<') are not supported " + where + "; write the keys out");
        continue;
      }
      std::string message = "unknown key '" + name + "' " + where;
      if (auto near = nearest_word(name, keys)) {
        message += "; did you mean '" + *near + "'?";
        suggested_.push_back(*near);
      } else {
        message += " (expected one of: " + join(keys) + ")";
      }
      diag_.error(at, std::move(message));
      continue;
    }
    entries_.push_back({name, k, kv.value});
  }
}

const map_reader::entry* map_reader::find(std::string_view key) const {
  for (const auto& e : entries_)
    if (e.key == key) return &e;
  return nullptr;
}

const yaml_node* map_reader::value(std::string_view key) const {
  const entry* e = find(key);
  return e ? &e->value : nullptr;
}

source_mark map_reader::key_mark(std::string_view key) const {
  const entry* e = find(key);
  return e ? mark_of(e->key_node) : mark_;
}

source_mark map_reader::value_mark(std::string_view key) const {
  const entry* e = find(key);
  if (!e) return mark_;
  if (e->value.is_null()) return mark_of(e->key_node);
  const source_mark at = mark_of(e->value);
  return at.line == 0 ? mark_of(e->key_node) : at;
}

std::string map_reader::missing_prefix() const { return context_.empty() ? "" : context_ + ": "; }

bool map_reader::require(std::string_view key) const {
  if (has(key)) return true;
  const bool misspelt = std::find(suggested_.begin(), suggested_.end(), key) != suggested_.end();
  if (!misspelt) diag_.error(mark_, missing_prefix() + "missing required key '" + std::string(key) + "'");
  return false;
}

std::optional<located<std::string>> map_reader::text(std::string_view key, presence p) const {
  if (!has(key)) {
    if (p == presence::required) require(key);
    return std::nullopt;
  }
  const source_mark at = value_mark(key);
  auto s = scalar_text(*value(key), "'" + std::string(key) + "'", at, diag_);
  if (!s) return std::nullopt;
  return located<std::string>{std::move(*s), at};
}

std::optional<located<double>> map_reader::number(std::string_view key, number_rule rule, presence p) const {
  if (!has(key)) {
    if (p == presence::required) require(key);
    return std::nullopt;
  }
  const yaml_node& v = *value(key);
  const source_mark at = value_mark(key);
  const std::string name = "'" + std::string(key) + "'";
  if (!v.is_scalar()) {
    diag_.error(at, name + " must be a number, got " + describe(v));
    return std::nullopt;
  }
  const auto parsed = parse_decimal(v.scalar());
  if (!parsed) {
    diag_.error(at, name + " must be a number, got '" + text_excerpt(v.scalar(), 60) + "'");
    return std::nullopt;
  }
  if (rule == number_rule::non_negative && *parsed < 0.0) {
    diag_.error(at, name + " must not be negative, got " + v.scalar());
    return std::nullopt;
  }
  if (rule == number_rule::positive && *parsed <= 0.0) {
    diag_.error(at, name + " must be greater than 0, got " + v.scalar());
    return std::nullopt;
  }
  return located<double>{*parsed, at};
}

bool map_reader::number_into(std::string_view key, number_rule rule, double& target) const {
  if (!has(key)) return true;
  const auto n = number(key, rule);
  if (!n) return false;
  target = n->value;
  return true;
}

std::optional<std::string> scalar_text(const yaml_node& node, std::string_view what, source_mark at,
                                       diagnostics& diag) {
  if (node.is_null()) {
    diag.error(at, std::string(what) + " must not be empty");
    return std::nullopt;
  }
  if (!node.is_scalar()) {
    diag.error(at, std::string(what) + " must be text, got " + describe(node));
    return std::nullopt;
  }
  if (const std::string problem = text_value_problem(node.scalar()); !problem.empty()) {
    diag.error(at, std::string(what) + " " + problem);
    return std::nullopt;
  }
  return node.scalar();
}

bool expect_map(const yaml_node& node, std::string_view name, std::string_view shape_hint, source_mark at,
                diagnostics& diag) {
  if (node.is_map()) return true;
  diag.error(at, "'" + std::string(name) + "' must be a map" + std::string(shape_hint) + ", got " + describe(node));
  return false;
}

}  // namespace dewmargin::config_detail
