#include "dewmargin/report/event_facts.h"

#include <nlohmann/json.hpp>

namespace dewmargin::report {
namespace {

using json = nlohmann::json;

// The report reads hundreds of thousands of events: a SAX pass over the JSON picks the few
// fields it needs without building a document (the DOM parse was a third of the event pass).
// The fields are those of the top-level object (a later duplicate key wins, as in a document),
// and "active" / "acknowledged" of its "alarm" object.
class facts_sax {
 public:
  explicit facts_sax(event_facts& f) : f_(f) {}

  bool null() { return top_value(value_kind::null, nullptr, std::nullopt); }
  bool boolean(bool v) {
    if (in_alarm_ && depth_ == 2) {
      if (alarm_key_ == "active") f_.alarm_active = v;
      if (alarm_key_ == "acknowledged") f_.alarm_acknowledged = v;
      return true;
    }
    return top_value(value_kind::other, nullptr, std::nullopt);
  }
  bool number_integer(json::number_integer_t v) { return number(static_cast<double>(v)); }
  bool number_unsigned(json::number_unsigned_t v) { return number(static_cast<double>(v)); }
  bool number_float(json::number_float_t v, const json::string_t& /*text*/) { return number(v); }
  bool string(json::string_t& v) { return top_value(value_kind::text, &v, std::nullopt); }
  bool binary(json::binary_t& /*v*/) { return top_value(value_kind::other, nullptr, std::nullopt); }
  bool start_object(std::size_t /*size*/) {
    if (depth_ == 0) {
      top_is_object_ = true;
    } else {
      top_value(value_kind::other, nullptr, std::nullopt);
      if (depth_ == 1 && key_ == "alarm") {
        in_alarm_ = true;
        f_.alarm_active.reset();
        f_.alarm_acknowledged.reset();
      }
    }
    ++depth_;
    return true;
  }
  bool end_object() {
    --depth_;
    if (depth_ == 1) in_alarm_ = false;
    return true;
  }
  bool start_array(std::size_t /*size*/) {
    top_value(value_kind::other, nullptr, std::nullopt);
    ++depth_;
    return true;
  }
  bool end_array() {
    --depth_;
    return true;
  }
  bool key(json::string_t& k) {
    if (depth_ == 1) key_ = k;
    if (depth_ == 2 && in_alarm_) alarm_key_ = k;
    return true;
  }
  bool parse_error(std::size_t /*position*/, const std::string& /*token*/, const nlohmann::detail::exception& /*e*/) {
    return false;
  }
  [[nodiscard]] bool top_is_object() const { return top_is_object_; }
  [[nodiscard]] const std::string& until_text() const { return until_; }

 private:
  enum class value_kind { text, number, null, other };

  bool number(double v) { return top_value(value_kind::number, nullptr, v); }

  // "active" or "acknowledged" of the alarm object that is not a boolean: unknown.
  void alarm_value_not_boolean() {
    if (alarm_key_ == "active") f_.alarm_active.reset();
    if (alarm_key_ == "acknowledged") f_.alarm_acknowledged.reset();
  }

  // A value of the top-level object under key_: the text and number fields take it when it has
  // their type and are cleared otherwise (the last duplicate decides, as in a document).
  bool top_value(value_kind kind, const std::string* text, std::optional<double> number) {
    if (in_alarm_ && depth_ == 2) alarm_value_not_boolean();
    if (depth_ != 1) return true;
    const auto text_field = [&](std::string& out) { out = kind == value_kind::text ? *text : std::string(); };
    const auto number_field = [&](std::optional<double>& out) {
      out = kind == value_kind::number ? number : std::nullopt;
    };
    if (key_ == "site") {
      text_field(f_.site);
    } else if (key_ == "from") {
      text_field(f_.from);
      number_field(f_.from_value);
    } else if (key_ == "to") {
      text_field(f_.to);
      number_field(f_.to_value);
    } else if (key_ == "reason") {
      text_field(f_.reason);
    } else if (key_ == "limited") {
      text_field(f_.limited);
    } else if (key_ == "topic") {
      text_field(f_.topic);
    } else if (key_ == "suppressed_by") {
      f_.suppressed = kind != value_kind::null;
    } else if (key_ == "until") {
      until_.clear();
      if (kind == value_kind::text) until_ = *text;
    } else if (key_ == "alarm") {
      // Not an object (objects start in start_object): no alarm facts.
      f_.alarm_active.reset();
      f_.alarm_acknowledged.reset();
    }
    return true;
  }

  event_facts& f_;
  int depth_ = 0;
  bool top_is_object_ = false;
  bool in_alarm_ = false;
  std::string key_;
  std::string until_;
  std::string alarm_key_;
};

}  // namespace

event_facts facts_of(const stored_event& event) {
  event_facts parsed;
  facts_sax sax(parsed);
  const bool ok = json::sax_parse(event.record.json, &sax, json::input_format_t::json, /*strict=*/true);

  event_facts f;
  if (ok && sax.top_is_object()) {
    f = std::move(parsed);
    if (!sax.until_text().empty()) {
      const auto t = parse_iso8601(sax.until_text());
      if (t) f.until = t.value();
    }
  } else {
    f.valid = false;
  }
  const event_record& r = event.record;
  f.ts = r.ts;
  f.subject = r.subject;
  f.subject_id = r.subject_id;
  f.kind = r.kind;
  return f;
}

}  // namespace dewmargin::report
