#pragma once
// A checker of the Prometheus text exposition format, version 0.0.4, for the tests: it
// applies the rules of the format's documentation ("Exposition formats", text-based
// format) and returns every broken rule, and the samples for checking values.
//   - lines end in \n; `# HELP name text` and `# TYPE name type` at most once per family,
//     before its samples; type counter, gauge, histogram, summary or untyped
//   - sample: name{label="value",...} value; names [a-zA-Z_:][a-zA-Z0-9_:]*, label names
//     [a-zA-Z_][a-zA-Z0-9_]* not starting with __; label values escape only \\ \" \n
//   - a family's lines form one group; no series appears twice
//   - counters end in _total (naming practice of the same documentation)
#include <cctype>
#include <cstdlib>
#include <limits>
#include <map>
#include <optional>
#include <set>
#include <string>
#include <vector>

namespace dewmargin::test_support {

struct exposition {
  std::vector<std::string> problems;
  std::map<std::string, double> samples;  // "name{a=\"x\",b=\"y\"}" (labels as written) -> value
  std::map<std::string, std::string> types;

  [[nodiscard]] std::optional<double> value(const std::string& series) const {
    const auto it = samples.find(series);
    if (it == samples.end()) return std::nullopt;
    return it->second;
  }
};

inline bool valid_metric_name(const std::string& n) {
  if (n.empty() || !(std::isalpha(static_cast<unsigned char>(n[0])) || n[0] == '_' || n[0] == ':')) return false;
  for (char c : n) {
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == ':')) return false;
  }
  return true;
}

inline bool valid_label_name(const std::string& n) {
  if (n.empty() || !(std::isalpha(static_cast<unsigned char>(n[0])) || n[0] == '_')) return false;
  if (n.rfind("__", 0) == 0) return false;
  for (char c : n) {
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '_')) return false;
  }
  return true;
}

// The family a sample name belongs to, given the declared types.
inline std::string family_of(const std::string& name, const std::map<std::string, std::string>& types) {
  for (const char* suffix : {"_sum", "_count", "_bucket"}) {
    const std::string s = suffix;
    if (name.size() > s.size() && name.compare(name.size() - s.size(), s.size(), s) == 0) {
      const std::string base = name.substr(0, name.size() - s.size());
      const auto it = types.find(base);
      if (it != types.end() && (it->second == "summary" || it->second == "histogram")) return base;
    }
  }
  return name;
}

inline exposition check_exposition(const std::string& text) {
  exposition out;
  auto problem = [&](std::size_t line_no, const std::string& what) {
    out.problems.push_back("line " + std::to_string(line_no) + ": " + what);
  };
  if (!text.empty() && text.back() != '\n') out.problems.push_back("the last line does not end in \\n");
  std::set<std::string> helped, finished, series_seen;
  std::string current;  // the family whose lines are being read
  std::size_t line_no = 0;
  std::size_t start = 0;
  while (start < text.size()) {
    const std::size_t end = text.find('\n', start);
    const std::string line = text.substr(start, (end == std::string::npos ? text.size() : end) - start);
    start = end == std::string::npos ? text.size() : end + 1;
    ++line_no;
    if (line.empty()) continue;
    const auto enter_family = [&](const std::string& family) {
      if (family == current) return;
      if (finished.count(family) != 0) problem(line_no, "family " + family + " is split into several groups");
      if (!current.empty()) finished.insert(current);
      current = family;
    };
    if (line[0] == '#') {
      if (line.rfind("# HELP ", 0) == 0 || line.rfind("# TYPE ", 0) == 0) {
        const bool is_help = line[2] == 'H';
        const std::string rest = line.substr(7);
        const std::size_t sp = rest.find(' ');
        const std::string name = rest.substr(0, sp);
        const std::string arg = sp == std::string::npos ? std::string() : rest.substr(sp + 1);
        if (!valid_metric_name(name)) problem(line_no, "bad metric name '" + name + "'");
        enter_family(name);
        if (is_help) {
          if (!helped.insert(name).second) problem(line_no, "second HELP for " + name);
          for (std::size_t i = 0; i < arg.size(); ++i) {
            if (arg[i] == '\\' && (i + 1 >= arg.size() || (arg[i + 1] != '\\' && arg[i + 1] != 'n'))) {
              problem(line_no, "bad escape in HELP of " + name);
            }
            if (arg[i] == '\\') ++i;
          }
        } else {
          if (out.types.count(name) != 0) problem(line_no, "second TYPE for " + name);
          if (series_seen.count(name) != 0 || series_seen.count(name + "_sum") != 0) {
            problem(line_no, "TYPE of " + name + " after its samples");
          }
          if (arg != "counter" && arg != "gauge" && arg != "histogram" && arg != "summary" && arg != "untyped") {
            problem(line_no, "unknown type '" + arg + "'");
          }
          if (arg == "counter" && (name.size() < 6 || name.compare(name.size() - 6, 6, "_total") != 0)) {
            problem(line_no, "counter " + name + " does not end in _total");
          }
          out.types[name] = arg;
        }
      }
      continue;
    }
    // A sample.
    std::size_t i = 0;
    while (i < line.size() && line[i] != '{' && line[i] != ' ') ++i;
    const std::string name = line.substr(0, i);
    if (!valid_metric_name(name)) {
      problem(line_no, "bad metric name '" + name + "'");
      continue;
    }
    const std::string family = family_of(name, out.types);
    enter_family(family);
    if (out.types.count(family) == 0) problem(line_no, "sample of " + family + " before (or without) its TYPE");
    std::string labels;
    if (i < line.size() && line[i] == '{') {
      const std::size_t open = i++;
      std::set<std::string> names;
      while (i < line.size() && line[i] != '}') {
        const std::size_t eq = line.find('=', i);
        if (eq == std::string::npos) {
          problem(line_no, "label without '='");
          break;
        }
        const std::string lname = line.substr(i, eq - i);
        if (!valid_label_name(lname)) problem(line_no, "bad label name '" + lname + "'");
        if (!names.insert(lname).second) problem(line_no, "label " + lname + " twice");
        i = eq + 1;
        if (i >= line.size() || line[i] != '"') {
          problem(line_no, "label value not quoted");
          break;
        }
        ++i;
        while (i < line.size() && line[i] != '"') {
          if (line[i] == '\\') {
            if (i + 1 >= line.size() || (line[i + 1] != '\\' && line[i + 1] != '"' && line[i + 1] != 'n')) {
              problem(line_no, "bad escape in a label value");
            }
            ++i;
          } else if (line[i] == '\n') {
            problem(line_no, "raw line feed in a label value");
          }
          ++i;
        }
        ++i;  // the closing quote
        if (i < line.size() && line[i] == ',') ++i;
      }
      if (i >= line.size()) {
        problem(line_no, "labels not closed");
        continue;
      }
      labels = line.substr(open, i - open + 1);
      ++i;  // '}'
    }
    if (i >= line.size() || line[i] != ' ') {
      problem(line_no, "no blank before the value");
      continue;
    }
    std::string value_text = line.substr(i + 1);
    const std::size_t sp = value_text.find(' ');
    if (sp != std::string::npos) value_text = value_text.substr(0, sp);  // an optional timestamp follows
    double value = 0;
    if (value_text == "NaN") {
      value = std::numeric_limits<double>::quiet_NaN();
    } else if (value_text == "+Inf" || value_text == "-Inf") {
      value = value_text[0] == '+' ? std::numeric_limits<double>::infinity() : -std::numeric_limits<double>::infinity();
    } else {
      char* stop = nullptr;
      value = std::strtod(value_text.c_str(), &stop);
      if (value_text.empty() || *stop != '\0') problem(line_no, "bad value '" + value_text + "'");
    }
    const std::string key = name + labels;
    if (!series_seen.insert(name).second && out.samples.count(key) != 0) problem(line_no, "series twice: " + key);
    out.samples[key] = value;
  }
  return out;
}

}  // namespace dewmargin::test_support
