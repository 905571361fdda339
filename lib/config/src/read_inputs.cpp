// Inputs (subscribed values), valves and output topics.
#include <algorithm>

#include "config_reading.h"
#include "dewmargin/input_decoder.h"

namespace dewmargin::config_detail {
namespace {

struct unit_choice {
  const char* text;
  input_unit unit;
};

const char* kind_name(input_kind kind) {
  switch (kind) {
    case input_kind::temperature:
      return "temperature";
    case input_kind::humidity:
      return "humidity";
    case input_kind::flow:
      return "flow";
    case input_kind::binary:
      break;
  }
  return "switch";
}

// The units each kind accepts; the first is the default (design.md: °C and % RH;
// flow in L/s, the unit the core computes with).
std::vector<unit_choice> units_for(input_kind kind) {
  switch (kind) {
    case input_kind::temperature:
      return {{"C", input_unit::celsius}, {"F", input_unit::fahrenheit}};
    case input_kind::humidity:
      return {{"%", input_unit::percent}, {"fraction", input_unit::fraction}};
    case input_kind::flow:
      return {{"L/s", input_unit::litres_per_second},
              {"m3/h", input_unit::cubic_metres_per_hour},
              {"gpm", input_unit::us_gallons_per_minute}};
    case input_kind::binary:
      break;
  }
  return {};
}

std::string unit_list(const std::vector<unit_choice>& choices) {
  std::string out;
  for (std::size_t i = 0; i < choices.size(); ++i) {
    if (i > 0) out += i + 1 == choices.size() ? " or " : ", ";
    out += std::string("'") + choices[i].text + "'";
  }
  return out;
}

// `active:` (required) or `inactive:` (optional; the decoder's defaults otherwise): a
// non-empty list of payload words.
bool read_word_list(const map_reader& m, const char* key, const char* example, std::vector<std::string>& words) {
  const std::string name = key;
  if (!m.has(key)) return name != "active" || m.require(key);
  const yaml_node& node = *m.value(key);
  const source_mark at = m.value_mark(key);
  if (!node.is_sequence() || node.size() == 0) {
    m.diag().error(
        at, "'" + name + "' must be a non-empty list of payloads, e.g. [" + example + "], got " + describe(node));
    return false;
  }
  bool ok = true;
  for (const auto& item : node.items()) {
    const source_mark item_at = mark_of(item);
    // YAML reads 1 and true as numbers and booleans; a payload is text, so keep the text.
    auto text = scalar_text(item, "an '" + name + "' payload", item_at, m.diag());
    if (text && text->empty()) {
      m.diag().error(item_at, "an '" + name + "' payload must not be empty");
      text.reset();
    }
    if (text) {
      words.push_back(std::move(*text));
    } else {
      ok = false;
    }
  }
  return ok;
}

// A word may not mean both: reported at the inactive one.
bool check_words_disjoint(const map_reader& m, const input_config& in) {
  if (in.inactive.empty()) return true;
  const yaml_node& node = *m.value("inactive");
  bool ok = true;
  std::size_t i = 0;
  for (const auto& item : node.items()) {
    const std::string& word = in.inactive[i++];
    if (matches_switch_word(word, in.active)) {
      m.diag().error(mark_of(item), m.context() + ": payload '" + word + "' is listed as both active and inactive");
      ok = false;
    }
  }
  return ok;
}

}  // namespace

// RFC 6901: "" or "/" followed by reference tokens, where '~' is only "~0" or "~1".
// The empty pointer (whole document) is refused: that is what a bare payload is for.
bool check_json_pointer(const located<std::string>& field, diagnostics& diag) {
  const std::string& f = field.value;
  if (f.empty() || f.front() != '/') {
    diag.error(field.at, "'field' must be a JSON pointer starting with '/', got '" + f + "'");
    return false;
  }
  for (std::size_t i = 0; i < f.size(); ++i) {
    if (f[i] == '~' && (i + 1 == f.size() || (f[i + 1] != '0' && f[i + 1] != '1'))) {
      diag.error(field.at, "'field' '" + f + "' is not a valid JSON pointer: '~' must be followed by 0 or 1");
      return false;
    }
  }
  return true;
}

bool check_topic(const located<std::string>& topic, bool is_input, diagnostics& diag) {
  const std::string& t = topic.value;
  if (t.empty()) {
    diag.error(topic.at, "'topic' must not be empty");
    return false;
  }
  if (t.find_first_of("+#") != std::string::npos) {
    diag.error(topic.at, "topic '" + t + "' must not contain the MQTT wildcards '+' or '#' (" +
                             (is_input ? "inputs are exact topics" : "the service publishes to exact topics") + ")");
    return false;
  }
  if (t.find('\0') != std::string::npos) {
    diag.error(topic.at, "topic must not contain a NUL character");  // MQTT forbids U+0000
    return false;
  }
  return true;
}

bool check_id(const located<std::string>& id, const char* what, diagnostics& diag) {
  if (id.value.empty()) {
    diag.error(id.at, std::string(what) + " id must not be empty");
    return false;
  }
  if (id.value.find_first_of("/+#") != std::string::npos) {
    diag.error(id.at, std::string(what) + " id '" + id.value +
                          "' must not contain '/', '+' or '#' (it becomes part of a topic)");
    return false;
  }
  return true;
}

std::optional<input_config> read_input(const yaml_node& node, source_mark at, const std::string& name,
                                       const std::string& owner, input_kind kind, reading& r) {
  if (!expect_map(node, name, " like { topic: ... }", at, r.diag)) return std::nullopt;
  std::vector<std::string> keys{"topic", "field", "stale_after_s"};
  if (kind == input_kind::binary) {
    keys.insert(keys.end(), {"active", "inactive"});
  } else {
    keys.emplace_back("unit");
  }
  const map_reader m(node, owner, keys, r.diag);

  input_config in;
  bool ok = true;
  auto topic = m.text("topic", presence::required);
  if (topic && check_topic(*topic, true, r.diag)) {
    in.topic = topic->value;
  } else {
    ok = false;
  }
  bool field_ok = true;
  if (auto field = m.text("field")) {
    field_ok = check_json_pointer(*field, r.diag);
    if (field_ok) in.field = field->value;
  } else if (m.has("field")) {
    field_ok = false;
  }
  ok = ok && field_ok;

  const auto choices = units_for(kind);
  if (!choices.empty()) in.unit = choices.front().unit;
  if (auto unit = m.text("unit")) {
    const auto match =
        std::find_if(choices.begin(), choices.end(), [&](const unit_choice& c) { return unit->value == c.text; });
    if (match != choices.end()) {
      in.unit = match->unit;
    } else {
      r.diag.error(unit->at, "unit '" + unit->value + "' is not valid for a " + kind_name(kind) + " input; use " +
                                 unit_list(choices));
      ok = false;
    }
  } else if (m.has("unit")) {
    ok = false;
  }

  if (auto stale = m.number("stale_after_s", number_rule::non_negative)) {
    in.stale_after_s = stale->value;
  } else if (m.has("stale_after_s")) {
    ok = false;
  }
  if (kind == input_kind::binary) {
    const bool active_ok = read_word_list(m, "active", "\"open\"", in.active);
    const bool inactive_ok = read_word_list(m, "inactive", "\"closed\"", in.inactive);
    if (!active_ok || !inactive_ok || !check_words_disjoint(m, in)) ok = false;
  }

  // Recorded only when topic and field are known, so the topic checks see no half input.
  if (!in.topic.empty() && field_ok) r.index.inputs.push_back({in.topic, in.field, owner, topic->at});
  if (!ok) return std::nullopt;
  return in;
}

std::optional<std::string> read_output_topic(const map_reader& m, const std::string& owner, reading& r) {
  auto topic = m.text("topic", presence::required);
  if (!topic || !check_topic(*topic, false, r.diag)) return std::nullopt;
  r.index.outputs.push_back({topic->value, owner, topic->at});
  return topic->value;
}

std::optional<valve_config> read_valve(const yaml_node& node, source_mark at, const std::string& owner, reading& r) {
  if (!expect_map(node, "valve", " like { topic: ... }", at, r.diag)) return std::nullopt;
  const map_reader m(node, owner, {"topic", "open", "closed", "reopen_after_s", "close_ahead_min", "open_margin_k"},
                     r.diag);
  valve_config v;
  bool ok = true;
  if (auto topic = read_output_topic(m, owner, r)) {
    v.topic = *topic;
  } else {
    ok = false;
  }
  for (const char* key : {"open", "closed"}) {
    auto payload = m.text(key);
    if (!payload) {
      if (m.has(key)) ok = false;
      continue;
    }
    if (payload->value.empty()) {
      r.diag.error(payload->at, std::string("'") + key + "' payload must not be empty");
      ok = false;
      continue;
    }
    (std::string(key) == "open" ? v.open_payload : v.closed_payload) = payload->value;
  }
  if (ok && v.open_payload == v.closed_payload) {
    r.diag.error(m.has("closed") ? m.value_mark("closed") : m.value_mark("open"),
                 owner + ": 'open' and 'closed' payloads must differ, both are '" + v.open_payload + "'");
    ok = false;
  }
  if (!m.number_into("reopen_after_s", number_rule::non_negative, v.reopen_after_s)) ok = false;
  if (!m.number_into("close_ahead_min", number_rule::non_negative, v.close_ahead_min)) ok = false;
  if (m.has("open_margin_k")) {
    double open_margin_k = 0.0;
    if (m.number_into("open_margin_k", number_rule::non_negative, open_margin_k)) {
      v.open_margin_k = open_margin_k;
    } else {
      ok = false;
    }
  }
  if (!ok) return std::nullopt;
  return v;
}

}  // namespace dewmargin::config_detail
