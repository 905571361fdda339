#pragma once
// The config file's first YAML document as a compact tree, built from yaml-cpp's parser
// events. YAML::Load builds a graph of shared nodes: for a site of 10,000 zones that was
// 110 MB and two thirds of the load time, against a tenth of both for the events alone.
// Here each node is one record in a vector, and the readers hold plain handles.
// Private to the config adapter; the tree must outlive every handle into it.
#include <yaml-cpp/mark.h>

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "diagnostics.h"

namespace dewmargin::config_detail {

enum class yaml_kind : std::uint8_t { null, scalar, sequence, map };

// A parser's place (an error's, a document's start), 1-based; the start of the file when the
// parser gives none.
[[nodiscard]] source_mark mark_or_start(const YAML::Mark& m);

class yaml_document;
struct yaml_pair;

class yaml_node {
 public:
  yaml_node(const yaml_document& doc, std::uint32_t index) : doc_(&doc), index_(index) {}

  [[nodiscard]] yaml_kind kind() const;
  [[nodiscard]] bool is_null() const { return kind() == yaml_kind::null; }
  [[nodiscard]] bool is_scalar() const { return kind() == yaml_kind::scalar; }
  [[nodiscard]] bool is_sequence() const { return kind() == yaml_kind::sequence; }
  [[nodiscard]] bool is_map() const { return kind() == yaml_kind::map; }
  // The scalar's text; "" for any other node.
  [[nodiscard]] const std::string& scalar() const;
  // Items of a list, pairs of a map; 0 for anything else.
  [[nodiscard]] std::size_t size() const;
  // 1-based place; {0, 0} for the null of an empty file.
  [[nodiscard]] source_mark mark() const;

  // A list's items (none unless a list) and a map's pairs in file order, repeated keys
  // included (none unless a map).
  [[nodiscard]] std::vector<yaml_node> items() const;
  [[nodiscard]] std::vector<yaml_pair> pairs() const;

 private:
  const yaml_document* doc_;
  std::uint32_t index_;
};

struct yaml_pair {
  yaml_node key;
  yaml_node value;
};

class yaml_document {
 public:
  // Parses the first document of `text` (yaml-cpp's grammar and errors: YAML::ParserException
  // is thrown as by YAML::Load). With `look_for_second`, also reads on until the next document's
  // first node and keeps its place in second_start().
  static yaml_document parse(const std::string& text, bool look_for_second);

  [[nodiscard]] yaml_node root() const { return {*this, root_}; }
  [[nodiscard]] const std::optional<source_mark>& second_start() const { return second_start_; }

 private:
  friend class yaml_node;
  friend class yaml_builder;

  struct record {
    yaml_kind kind = yaml_kind::null;
    std::int32_t line = -1;  // 0-based as yaml-cpp counts; -1: no place
    std::int32_t column = -1;
    std::uint32_t first = 0;  // scalar: index into scalars_; list or map: into children_
    std::uint32_t count = 0;  // list: items; map: pairs (key, value adjacent in children_)
  };

  yaml_document();

  std::vector<record> records_;
  std::vector<std::uint32_t> children_;
  std::vector<std::string> scalars_;
  std::uint32_t root_ = 0;
  std::optional<source_mark> second_start_;
};

}  // namespace dewmargin::config_detail
