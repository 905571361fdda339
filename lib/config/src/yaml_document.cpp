#include "yaml_document.h"

#include <yaml-cpp/eventhandler.h>
#include <yaml-cpp/parser.h>

#include <sstream>
#include <unordered_map>

namespace dewmargin::config_detail {

source_mark mark_or_start(const YAML::Mark& m) {
  if (m.is_null()) return {1, 1};
  return {m.line + 1, m.column + 1};
}

// Record 0 is the null root of an empty file, with no place.
yaml_document::yaml_document() { records_.emplace_back(); }

yaml_kind yaml_node::kind() const { return doc_->records_[index_].kind; }

const std::string& yaml_node::scalar() const {
  static const std::string empty;
  const auto& r = doc_->records_[index_];
  return r.kind == yaml_kind::scalar ? doc_->scalars_[r.first] : empty;
}

std::size_t yaml_node::size() const {
  const auto& r = doc_->records_[index_];
  return r.kind == yaml_kind::sequence || r.kind == yaml_kind::map ? r.count : 0;
}

source_mark yaml_node::mark() const {
  const auto& r = doc_->records_[index_];
  if (r.line < 0 || r.column < 0) return {};
  return {r.line + 1, r.column + 1};
}

std::vector<yaml_node> yaml_node::items() const {
  std::vector<yaml_node> out;
  const auto& r = doc_->records_[index_];
  if (r.kind != yaml_kind::sequence) return out;
  out.reserve(r.count);
  for (std::uint32_t i = 0; i < r.count; ++i) out.emplace_back(*doc_, doc_->children_[r.first + i]);
  return out;
}

std::vector<yaml_pair> yaml_node::pairs() const {
  std::vector<yaml_pair> out;
  const auto& r = doc_->records_[index_];
  if (r.kind != yaml_kind::map) return out;
  out.reserve(r.count);
  for (std::uint32_t i = 0; i < r.count; ++i) {
    out.push_back(
        {yaml_node(*doc_, doc_->children_[r.first + 2 * i]), yaml_node(*doc_, doc_->children_[r.first + 2 * i + 1])});
  }
  return out;
}

// Turns one document's events into records. An open list or map collects its children's
// indices on one shared stack; when it ends they move to children_ in one piece.
class yaml_builder : public YAML::EventHandler {
 public:
  explicit yaml_builder(yaml_document& doc) : doc_(doc) {}

  void OnDocumentStart(const YAML::Mark&) override {}
  void OnDocumentEnd() override {}
  void OnNull(const YAML::Mark& mark, YAML::anchor_t anchor) override { place(add(yaml_kind::null, mark, anchor)); }
  void OnAlias(const YAML::Mark& mark, YAML::anchor_t anchor) override {
    // The parser refuses an alias to an anchor it has not seen; a null is a safe answer anyway.
    const auto it = anchors_.find(anchor);
    place(it != anchors_.end() ? it->second : add(yaml_kind::null, mark, YAML::NullAnchor));
  }
  void OnScalar(const YAML::Mark& mark, const std::string&, YAML::anchor_t anchor, const std::string& value) override {
    const std::uint32_t index = add(yaml_kind::scalar, mark, anchor);
    doc_.records_[index].first = static_cast<std::uint32_t>(doc_.scalars_.size());
    doc_.scalars_.push_back(value);
    place(index);
  }
  void OnSequenceStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t anchor,
                       YAML::EmitterStyle::value) override {
    open(add(yaml_kind::sequence, mark, anchor));
  }
  void OnSequenceEnd() override { close(1); }
  void OnMapStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t anchor,
                  YAML::EmitterStyle::value) override {
    open(add(yaml_kind::map, mark, anchor));
  }
  void OnMapEnd() override { close(2); }

 private:
  struct open_collection {
    std::uint32_t index;
    std::size_t first_pending;
  };

  std::uint32_t add(yaml_kind kind, const YAML::Mark& mark, YAML::anchor_t anchor) {
    const auto index = static_cast<std::uint32_t>(doc_.records_.size());
    yaml_document::record r;
    r.kind = kind;
    r.line = mark.line;
    r.column = mark.column;
    doc_.records_.push_back(r);
    if (anchor != YAML::NullAnchor) anchors_[anchor] = index;
    return index;
  }
  void place(std::uint32_t index) {
    if (open_.empty()) {
      if (!root_placed_) doc_.root_ = index;
      root_placed_ = true;
      return;
    }
    pending_.push_back(index);
  }
  void open(std::uint32_t index) { open_.push_back({index, pending_.size()}); }
  // `per_entry`: children per entry (1 for a list item, 2 for a map pair).
  void close(std::uint32_t per_entry) {
    if (open_.empty()) return;
    const open_collection c = open_.back();
    open_.pop_back();
    yaml_document::record& r = doc_.records_[c.index];
    r.first = static_cast<std::uint32_t>(doc_.children_.size());
    r.count = static_cast<std::uint32_t>((pending_.size() - c.first_pending) / per_entry);
    doc_.children_.insert(doc_.children_.end(), pending_.begin() + static_cast<std::ptrdiff_t>(c.first_pending),
                          pending_.end());
    pending_.resize(c.first_pending);
    place(c.index);
  }

  yaml_document& doc_;
  std::unordered_map<YAML::anchor_t, std::uint32_t> anchors_;
  std::vector<open_collection> open_;
  std::vector<std::uint32_t> pending_;
  bool root_placed_ = false;
};

namespace {

// Notes where the next document's first node stands, and nothing else.
class first_node_place : public YAML::EventHandler {
 public:
  std::optional<source_mark> at;
  void OnDocumentStart(const YAML::Mark&) override {}
  void OnDocumentEnd() override {}
  void OnNull(const YAML::Mark& mark, YAML::anchor_t) override { node(mark); }
  void OnAlias(const YAML::Mark& mark, YAML::anchor_t) override { node(mark); }
  void OnScalar(const YAML::Mark& mark, const std::string&, YAML::anchor_t, const std::string&) override { node(mark); }
  void OnSequenceStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t, YAML::EmitterStyle::value) override {
    node(mark);
  }
  void OnSequenceEnd() override {}
  void OnMapStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t, YAML::EmitterStyle::value) override {
    node(mark);
  }
  void OnMapEnd() override {}

 private:
  void node(const YAML::Mark& mark) {
    if (!at) at = mark_or_start(mark);
  }
};

}  // namespace

yaml_document yaml_document::parse(const std::string& text, bool look_for_second) {
  yaml_document doc;
  // About one node per 12 bytes in a large site's file: the vectors grow without copying.
  doc.records_.reserve(text.size() / 12 + 1);
  doc.children_.reserve(text.size() / 12 + 1);
  doc.scalars_.reserve(text.size() / 16 + 1);
  std::istringstream in(text);
  YAML::Parser parser(in);
  yaml_builder builder(doc);
  if (!parser.HandleNextDocument(builder)) return doc;
  // Only the next document is asked for, never "all": on some junk (a lone ",") yaml-cpp 0.7.0
  // reports one empty document after another without end.
  if (look_for_second && doc.root().kind() != yaml_kind::null) {
    first_node_place second;
    if (parser.HandleNextDocument(second)) doc.second_start_ = second.at;
  }
  return doc;
}

}  // namespace dewmargin::config_detail
