// Checks that need more than one section: references between ids, duplicate ids,
// and topics that collide or would feed the service's own output back to it.
#include <algorithm>
#include <tuple>
#include <unordered_map>
#include <unordered_set>

#include "config_reading.h"
#include "nearest_word.h"

namespace dewmargin::config_detail {
namespace {

bool before(source_mark a, source_mark b) { return std::tie(a.line, a.column) < std::tie(b.line, b.column); }

std::string line_of(source_mark at) { return "line " + std::to_string(at.line); }

// Every check here is linear in the size of the config (hash maps, not pairwise scans): a
// campus of 10,000 zones was taking seconds to load.
void check_unique_ids(const std::vector<id_record>& ids, const char* what, diagnostics& diag) {
  std::unordered_map<std::string, std::size_t> first;  // id -> index of its first definition
  first.reserve(ids.size());
  for (std::size_t i = 0; i < ids.size(); ++i) {
    const auto [it, inserted] = first.emplace(ids[i].id, i);
    if (!inserted) {
      diag.error(ids[i].at, std::string("duplicate ") + what + " id '" + ids[i].id + "' (first defined at " +
                                line_of(ids[it->second].at) + ")");
    }
  }
}

void check_references(const std::vector<reference_record>& refs, const std::vector<id_record>& ids, const char* what,
                      diagnostics& diag) {
  std::vector<std::string> known;
  for (const auto& id : ids) known.push_back(id.id);
  const std::unordered_set<std::string> known_set(known.begin(), known.end());
  for (const auto& ref : refs) {
    if (known_set.count(ref.target) != 0) continue;
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
  std::unordered_map<std::string, std::size_t> first_output;  // topic -> first output publishing it
  for (std::size_t o = 0; o < outputs.size(); ++o) first_output.emplace(outputs[o].topic, o);
  std::unordered_map<std::string, std::vector<std::size_t>> earlier_readers;  // topic -> inputs so far
  for (std::size_t i = 0; i < inputs.size(); ++i) {
    const input_record& in = inputs[i];
    std::vector<std::size_t>& readers = earlier_readers[in.topic];
    const std::vector<std::size_t> earlier = readers;  // the inputs before this one on its topic
    readers.push_back(i);
    if (const auto out = first_output.find(in.topic); out != first_output.end()) {
      const output_record& o = outputs[out->second];
      diag.error(in.topic_at, "topic '" + in.topic + "' is published by the service (" + o.owner + ", " +
                                  line_of(o.topic_at) + "); reading it back would feed back");
      continue;
    }
    if (prefix && under_prefix(in.topic, *prefix)) {
      diag.error(in.topic_at, "topic '" + in.topic + "' is under the publish prefix '" + *prefix +
                                  "/' where the service publishes; reading it would feed back");
      continue;
    }
    for (const std::size_t j : earlier) {
      const input_record& before_this = inputs[j];
      if (before_this.field == in.field) {
        const std::string what =
            in.field.empty() ? "topic '" + in.topic + "'" : "topic '" + in.topic + "' field '" + in.field + "'";
        diag.error(in.topic_at,
                   what + " is already read by " + before_this.owner + " (" + line_of(before_this.topic_at) + ")");
        break;
      }
      if (before_this.field.empty() != in.field.empty()) {
        diag.error(in.topic_at,
                   "topic '" + in.topic + "' is read as " + (before_this.field.empty() ? "a bare value" : "JSON") +
                       " by " + before_this.owner + " (" + line_of(before_this.topic_at) + ") and as " +
                       (in.field.empty() ? "a bare value" : "JSON") + " here; one topic carries one kind of payload");
        break;
      }
    }
  }
}

void check_outputs(std::vector<output_record> outputs, const std::optional<std::string>& prefix, diagnostics& diag) {
  std::stable_sort(outputs.begin(), outputs.end(),
                   [](const output_record& a, const output_record& b) { return before(a.topic_at, b.topic_at); });
  std::unordered_map<std::string, std::size_t> first;  // topic -> first output (in file order)
  for (std::size_t i = 0; i < outputs.size(); ++i) {
    const output_record& out = outputs[i];
    const auto [earlier, inserted] = first.emplace(out.topic, i);
    if (prefix && reserved_by_service(out.topic, *prefix)) {
      diag.error(out.topic_at,
                 "topic '" + out.topic + "' is reserved for the service's own messages under '" + *prefix + "/'");
      continue;
    }
    if (!inserted) {
      const output_record& o = outputs[earlier->second];
      diag.error(out.topic_at,
                 "topic '" + out.topic + "' is already published by " + o.owner + " (" + line_of(o.topic_at) + ")");
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
