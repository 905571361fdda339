// Checks that need more than one section: references between ids, duplicate ids,
// and topics that collide or would feed the service's own output back to it.
#include <algorithm>
#include <tuple>

#include "config_reading.h"
#include "nearest_word.h"

namespace dewmargin::config_detail {
namespace {

bool before(source_mark a, source_mark b) { return std::tie(a.line, a.column) < std::tie(b.line, b.column); }

std::string line_of(source_mark at) { return "line " + std::to_string(at.line); }

void check_unique_ids(const std::vector<id_record>& ids, const char* what, diagnostics& diag) {
  for (std::size_t i = 0; i < ids.size(); ++i) {
    for (std::size_t j = 0; j < i; ++j) {
      if (ids[j].id == ids[i].id) {
        diag.error(ids[i].at, std::string("duplicate ") + what + " id '" + ids[i].id + "' (first defined at " +
                                  line_of(ids[j].at) + ")");
        break;
      }
    }
  }
}

void check_references(const std::vector<reference_record>& refs, const std::vector<id_record>& ids, const char* what,
                      diagnostics& diag) {
  std::vector<std::string> known;
  for (const auto& id : ids) known.push_back(id.id);
  for (const auto& ref : refs) {
    if (std::find(known.begin(), known.end(), ref.target) != known.end()) continue;
    std::string message = ref.owner + ": unknown " + what + " '" + ref.target + "'";
    if (auto near = nearest_word(ref.target, known)) {
      message += "; did you mean '" + *near + "'?";
    } else if (known.empty()) {
      message += std::string(" (no ") + what + "s are defined)";
    } else {
      std::string list;
      for (const auto& k : known) list += (list.empty() ? "" : ", ") + k;
      message += std::string(" (known ") + what + "s: " + list + ")";
    }
    diag.error(ref.at, message);
  }
}

bool under_prefix(const std::string& topic, const std::string& prefix) { return topic.rfind(prefix + "/", 0) == 0; }

// The topics under the prefix that the service itself publishes or subscribes to
// (design.md "Topics it publishes", "Commands it accepts"); `dehumidifier/` is kept
// free for its state topics.
bool reserved_by_service(const std::string& topic, const std::string& prefix) {
  if (topic == prefix + "/status" || topic == prefix + "/events") return true;
  for (const char* level : {"/zone/", "/loop/", "/dehumidifier/", "/cmd/"}) {
    if (topic.rfind(prefix + level, 0) == 0) return true;
  }
  return false;
}

void check_inputs(std::vector<input_record> inputs, const std::vector<output_record>& outputs,
                  const std::optional<std::string>& prefix, diagnostics& diag) {
  std::stable_sort(inputs.begin(), inputs.end(),
                   [](const input_record& a, const input_record& b) { return before(a.topic_at, b.topic_at); });
  for (std::size_t i = 0; i < inputs.size(); ++i) {
    const input_record& in = inputs[i];
    const auto out =
        std::find_if(outputs.begin(), outputs.end(), [&](const output_record& o) { return o.topic == in.topic; });
    if (out != outputs.end()) {
      diag.error(in.topic_at, "topic '" + in.topic + "' is published by the service (" + out->owner + ", " +
                                  line_of(out->topic_at) + "); reading it back would feed back");
      continue;
    }
    if (prefix && under_prefix(in.topic, *prefix)) {
      diag.error(in.topic_at, "topic '" + in.topic + "' is under the publish prefix '" + *prefix +
                                  "/' where the service publishes; reading it would feed back");
      continue;
    }
    for (std::size_t j = 0; j < i; ++j) {
      const input_record& earlier = inputs[j];
      if (earlier.topic != in.topic) continue;
      if (earlier.field == in.field) {
        const std::string what =
            in.field.empty() ? "topic '" + in.topic + "'" : "topic '" + in.topic + "' field '" + in.field + "'";
        diag.error(in.topic_at, what + " is already read by " + earlier.owner + " (" + line_of(earlier.topic_at) + ")");
        break;
      }
      if (earlier.field.empty() != in.field.empty()) {
        diag.error(in.topic_at,
                   "topic '" + in.topic + "' is read as " + (earlier.field.empty() ? "a bare value" : "JSON") + " by " +
                       earlier.owner + " (" + line_of(earlier.topic_at) + ") and as " +
                       (in.field.empty() ? "a bare value" : "JSON") + " here; one topic carries one kind of payload");
        break;
      }
    }
  }
}

void check_outputs(std::vector<output_record> outputs, const std::optional<std::string>& prefix, diagnostics& diag) {
  std::stable_sort(outputs.begin(), outputs.end(),
                   [](const output_record& a, const output_record& b) { return before(a.topic_at, b.topic_at); });
  for (std::size_t i = 0; i < outputs.size(); ++i) {
    const output_record& out = outputs[i];
    if (prefix && reserved_by_service(out.topic, *prefix)) {
      diag.error(out.topic_at,
                 "topic '" + out.topic + "' is reserved for the service's own messages under '" + *prefix + "/'");
      continue;
    }
    for (std::size_t j = 0; j < i; ++j) {
      if (outputs[j].topic == out.topic) {
        diag.error(out.topic_at, "topic '" + out.topic + "' is already published by " + outputs[j].owner + " (" +
                                     line_of(outputs[j].topic_at) + ")");
        break;
      }
    }
  }
}

}  // namespace

void check_across_sections(reading& r) {
  check_unique_ids(r.index.loop_ids, "loop", r.diag);
  check_unique_ids(r.index.zone_ids, "zone", r.diag);
  check_unique_ids(r.index.dehumidifier_ids, "dehumidifier", r.diag);
  check_references(r.index.zone_loops, r.index.loop_ids, "loop", r.diag);
  check_references(r.index.dehumidifier_zones, r.index.zone_ids, "zone", r.diag);
  check_inputs(r.index.inputs, r.index.outputs, r.index.prefix, r.diag);
  check_outputs(r.index.outputs, r.index.prefix, r.diag);
}

}  // namespace dewmargin::config_detail
