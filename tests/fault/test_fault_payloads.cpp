// A table of malformed payloads and commands, each with its expected outcome: the service
// stays up, no zone changes state, and an event names the topic and the reason. Then a
// flood of commands (1,000 a second) and of distinct bad values, and the service's
// resident memory before and after.
#include <gtest/gtest.h>

#include <map>
#include <thread>

#include "fault_support.h"
#include "dewmargin/safe_text.h"
#include "message_containment.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;
using steady = std::chrono::steady_clock;

enum class outcome { input_event, rejected_event };

struct bad_message {
  std::string label;
  std::string topic;
  std::string payload;
  outcome expect;
};

std::string nested(const std::string& open, const std::string& close, int depth, const std::string& inner) {
  std::string s;
  for (int i = 0; i < depth; ++i) s += open;
  s += inner;
  for (int i = 0; i < depth; ++i) s += close;
  return s;
}

std::vector<bad_message> bad_messages() {
  const std::string mib(1 << 20, 'a');
  const std::string mib_digits(1 << 20, '9');
  const std::string cut_multibyte = std::string(39, 'x') + "\xc3\xa9\xc3\xa9";  // the quote limit cuts at byte 40
  const auto in = outcome::input_event;
  const auto rej = outcome::rejected_event;
  std::vector<bad_message> rows{
      // A bare-number sensor.
      {"empty", "r/a/temp", "", in},
      {"text", "r/a/temp", "warm", in},
      {"invalid UTF-8 byte", "r/a/temp", "\x80", in},
      {"invalid UTF-8 pair", "r/a/temp", "\xff\xfe", in},
      {"number then invalid byte", "r/a/temp", "2\x80", in},
      {"number then NUL", "r/a/temp", std::string("24.0\0", 5), in},
      {"NUL byte only", "r/a/temp", std::string(1, '\0'), in},
      {"NUL bytes", "r/a/temp", std::string(16, '\0'), in},
      {"huge exponent", "r/a/temp", "1e999", in},
      {"huge negative", "r/a/temp", "-1e308", in},
      {"20 digits", "r/a/temp", "99999999999999999999", in},
      {"NaN", "r/a/temp", "NaN", in},
      {"infinity", "r/a/temp", "inf", in},
      {"[[[[", "r/a/temp", "[[[[", in},
      {"open brace", "r/a/temp", "{", in},
      {"broken JSON", "r/a/temp", "{\"t\": }", in},
      {"empty array", "r/a/temp", "[]", in},
      {"empty object", "r/a/temp", "{}", in},
      {"true", "r/a/temp", "true", in},
      {"null", "r/a/temp", "null", in},
      {"number and junk", "r/a/temp", "24.0 junk", in},
      {"hex", "r/a/temp", "0x18", in},
      {"decimal comma", "r/a/temp", "24,5", in},
      {"implausible high", "r/a/temp", "150", in},
      {"implausible low", "r/a/temp", "-100", in},
      {"multi-byte char cut at byte 40", "r/a/temp", cut_multibyte, in},
      {"terminal escape", "r/a/temp", "\x1b[2J\x1b[31mred", in},
      {"line break", "r/a/temp", "24\n25", in},
      {"1 MiB of text", "r/a/temp", mib, in},
      {"1 MiB of digits", "r/a/temp", mib_digits, in},
      {"array nested 10,000 deep", "r/a/temp", nested("[", "]", 10000, "1"), in},
      {"humidity 200 %", "r/a/rh", "200", in},
      {"humidity invalid UTF-8", "r/a/rh", "5\xc0\xaf", in},
      {"surface NaN", "r/a/surface", "nan", in},
      // A JSON sensor (fields /t and /rh).
      {"JSON t is a string", "r/b/env", R"({"t": "hot", "rh": 45})", in},
      {"JSON t is an array", "r/b/env", R"({"t": [1], "rh": 45})", in},
      {"JSON t is an object", "r/b/env", R"({"t": {"x": 1}, "rh": 45})", in},
      {"JSON t is null", "r/b/env", R"({"t": null, "rh": 45})", in},
      {"JSON t is true", "r/b/env", R"({"t": true, "rh": 45})", in},
      {"JSON t missing", "r/b/env", R"({"rh": 45})", in},
      {"JSON array, not object", "r/b/env", "[23.5, 45]", in},
      {"JSON invalid UTF-8 in a string", "r/b/env", "{\"t\": 23.5, \"rh\": \"\x80\"}", in},
      {"JSON invalid UTF-8 in a key", "r/b/env", "{\"t\x80\": 23.5, \"rh\": 45}", in},
      {"JSON number 1e400", "r/b/env", R"({"t": 1e400, "rh": 45})", in},
      {"JSON object nested 10,000 deep", "r/b/env", nested("{\"a\":", "}", 10000, "1"), in},
      {"JSON 1 MiB string value", "r/b/env", "{\"t\": \"" + mib + "\", \"rh\": 45}", in},
      {"JSON [[[[", "r/b/env", "[[[[", in},
      {"JSON with NUL", "r/b/env", std::string("{\"t\": 23.5,\0 \"rh\": 45}", 23), in},
      // The loop's supply temperature.
      {"supply invalid UTF-8", "plant/l1/supply", "\x80", in},
      {"supply text", "plant/l1/supply", "hot", in},
      {"supply 1e309", "plant/l1/supply", "1e309", in},
      // A window contact.
      {"window invalid UTF-8", "r/a/window", "\x80", in},
      {"window unknown word", "r/a/window", "ajar", in},
      // Commands.
      {"ack empty", "dm/cmd/ack", "", rej},
      {"ack not JSON", "dm/cmd/ack", "please", rej},
      {"ack [[[[", "dm/cmd/ack", "[[[[", rej},
      {"ack NUL bytes", "dm/cmd/ack", std::string(4, '\0'), rej},
      {"ack without by", "dm/cmd/ack", R"({"zone":"room-a"})", rej},
      {"ack with empty by", "dm/cmd/ack", R"({"zone":"room-a","by":""})", rej},
      {"ack by is a number", "dm/cmd/ack", R"({"zone":"room-a","by":7})", rej},
      {"ack unknown zone", "dm/cmd/ack", R"({"zone":"nowhere","by":"tj"})", rej},
      {"ack zone is a number", "dm/cmd/ack", R"({"zone":123,"by":"tj"})", rej},
      {"ack invalid UTF-8 in by", "dm/cmd/ack", "{\"zone\":\"room-a\",\"by\":\"\x80\"}", rej},
      {"ack invalid UTF-8 in zone", "dm/cmd/ack", "{\"zone\":\"\x80\",\"by\":\"tj\"}", rej},
      {"ack with nothing to acknowledge", "dm/cmd/ack", R"({"zone":"room-a","by":"tj"})", rej},
      {"ack oversized (1 MiB note)", "dm/cmd/ack", "{\"zone\":\"room-a\",\"by\":\"tj\",\"note\":\"" + mib + "\"}", rej},
      {"ack nested 10,000 deep", "dm/cmd/ack", nested("{\"a\":", "}", 10000, "1"), rej},
      {"shelve 5000 minutes", "dm/cmd/shelve", R"({"zone":"room-a","by":"tj","minutes":5000})", rej},
      {"shelve -1 minutes", "dm/cmd/shelve", R"({"zone":"room-a","by":"tj","minutes":-1})", rej},
      {"shelve minutes as text", "dm/cmd/shelve", R"({"zone":"room-a","by":"tj","minutes":"ten"})", rej},
      {"shelve 1e300 minutes", "dm/cmd/shelve", R"({"zone":"room-a","by":"tj","minutes":1e300})", rej},
      {"unshelve when not shelved", "dm/cmd/unshelve", R"({"zone":"room-a","by":"tj"})", rej},
      {"unknown command", "dm/cmd/reboot", R"({"zone":"room-a","by":"tj"})", rej},
      {"command topic one level deeper", "dm/cmd/ack/now", R"({"zone":"room-a","by":"tj"})", rej},
      {"command with empty verb", "dm/cmd/", R"({"zone":"room-a","by":"tj"})", rej},
  };
  return rows;
}

const std::map<std::string, std::string>& good_values() {
  static const std::map<std::string, std::string> v{
      {"r/a/temp", "24.0"},        {"r/a/rh", "50.0"},
      {"r/a/surface", "17.5"},     {"r/b/env", R"({"t": 23.5, "rh": 45})"},
      {"plant/l1/supply", "16.0"}, {"r/a/window", "closed"},
  };
  return v;
}

bool is_event(const received_message& m, const std::string& kind, const std::string& topic,
              const std::string& to = "") {
  const auto j = as_json(m);
  return j.is_object() && j.value("kind", "") == kind && j.value("topic", "") == topic &&
         !j.value("reason", "").empty() && (to.empty() || j.value("to", "") == to);
}

// Band and valve changes since `from` (the state must not change).
std::string state_changes(fault_site& site, std::size_t from) {
  std::string out;
  const auto all = site.watcher->messages();
  for (std::size_t i = from; i < all.size(); ++i) {
    if (all[i].topic == "r/a/valve") out += "valve " + all[i].payload + "; ";
    if (all[i].topic != "dm/events") continue;
    const auto j = as_json(all[i]);
    if (j.value("kind", "") == "band") out += "band " + j.value("zone", "") + " -> " + j.value("to", "") + "; ";
  }
  return out;
}

std::string short_text(const std::string& s) { return s.size() > 70 ? s.substr(0, 67) + "..." : s; }

TEST(FaultPayloads, MalformedPayloadsAndCommandsChangeNothingAndAreNamed) {
  fault_site site({}, {}, "fault-payloads");
  ASSERT_TRUE(site.start_service());
  site.feed(17.5);
  ASSERT_TRUE(site.wait_zone(
      "room-a", [](const nlohmann::json& j) { return j["band"] == "safe"; }, 10s));
  ASSERT_TRUE(site.watcher->wait_for_payload("r/a/valve", "open", 10s));
  // Let the first minute's samples and states settle before the baseline.
  std::this_thread::sleep_for(500ms);
  const pid_t pid = site.service->pid();
  const std::uint64_t rss_before = resident_kib(pid);

  for (const auto& bad : bad_messages()) {
    fault_row row;
    row.name = "payload " + bad.topic + ": " + bad.label;
    row.injected = 1;
    row.expected = bad.expect == outcome::input_event ? "input event naming the topic, state unchanged"
                                                      : "rejected event naming the topic, state unchanged";
    const std::size_t from = site.watcher->size();
    site.watcher->publish(bad.topic, bad.payload);
    const auto event = site.watcher->wait_for(
        "dm/events",
        [&](const received_message& m) {
          return bad.expect == outcome::input_event ? is_event(m, "input", bad.topic, "bad")
                                                    : is_event(m, "rejected", bad.topic);
        },
        2s, from);
    const std::string changes = state_changes(site, from);
    const bool up = site.service->running();
    row.survived = up ? 1 : 0;
    row.crashes = up ? 0 : 1;
    row.figures =
        event ? "reason: " + short_text(printable_text(as_json(*event).value("reason", ""))) : "no event";
    if (!changes.empty()) row.figures += "; CHANGED: " + changes;
    row.passed = up && event && changes.empty();
    if (!row.passed) row.why = up ? "seen: " + row.figures : "the service exited";
    record(row);
    if (!up) return;
    // Back to a good value, so that the next bad one is a change again.
    const auto good = good_values().find(bad.topic);
    if (good != good_values().end()) {
      const std::size_t reset_from = site.watcher->size();
      site.watcher->publish(bad.topic, good->second);
      (void)site.watcher->wait_for(
          "dm/events", [&](const received_message& m) { return is_event(m, "input", bad.topic, "ok"); }, 2s,
          reset_from);
    }
  }

  // A wet condensation switch, then junk on it: the zone stays condensing.
  for (const std::string& junk : {std::string("maybe"), std::string("[[[["), std::string("\x80"), std::string(""),
                                  std::string("2"), std::string(3, '\0')}) {
    fault_row row;
    row.name = "payload r/a/wet after a wet 1: " + short_text(printable_text(junk));
    row.injected = 1;
    row.expected = "input event naming the topic, zone stays condensing";
    std::size_t from = site.watcher->size();
    site.watcher->publish("r/a/wet", "1");
    const auto wet = wait_event(*site.watcher, "band", "room-a", 3s, from);
    (void)site.watcher->wait_for_payload("r/a/valve", "closed", 3s, from);
    from = site.watcher->size();
    site.watcher->publish("r/a/wet", junk);
    const auto event = site.watcher->wait_for(
        "dm/events", [&](const received_message& m) { return is_event(m, "input", "r/a/wet", "bad"); }, 2s, from);
    const std::string changes = state_changes(site, from);
    const bool up = site.service->running();
    row.survived = up ? 1 : 0;
    row.crashes = up ? 0 : 1;
    row.figures =
        std::string(wet && (*wet)["to"] == "condensing" ? "condensing on 1" : "NOT condensing on 1") + "; " +
        (event ? "reason: " + short_text(printable_text(as_json(*event).value("reason", ""))) : "no event");
    if (!changes.empty()) row.figures += "; CHANGED: " + changes;
    row.passed = up && wet && (*wet)["to"] == "condensing" && event && changes.empty();
    if (!row.passed) row.why = up ? "seen: " + row.figures : "the service exited";
    record(row);
    if (!up) return;
    const std::size_t reset_from = site.watcher->size();
    site.watcher->publish("r/a/wet", "0");
    (void)site.wait_zone(
        "room-a", [](const nlohmann::json& j) { return j["band"] == "safe"; }, 3s, reset_from);
    // The valve reopens after reopen_after_s; wait for it, so that the next row starts settled.
    (void)site.watcher->wait_for_payload("r/a/valve", "open", 5s, reset_from);
  }

  // 1,000 commands in one second.
  {
    const std::string log_before = site.service->log_text();
    const std::size_t from = site.watcher->size();
    const std::vector<std::string> acks(1000, R"({"zone":"room-a","by":"flood"})");
    const double took_s =
        std::chrono::duration<double>(site.watcher->publish_paced("dm/cmd/ack", acks, std::chrono::microseconds(1000)))
            .count();
    std::this_thread::sleep_for(1s);  // whatever the flood causes has come out
    const std::size_t events = payloads_on(*site.watcher, "dm/events", from).size();
    const std::string log_after = site.service->log_text();
    const std::size_t lines = count_lines(log_after.substr(std::min(log_before.size(), log_after.size())), "rejected");
    const std::string changes = state_changes(site, from);
    fault_row row;
    row.name = "command flood 1,000/s: log lines";
    row.injected = 1000;
    row.survived = site.service->running() ? 1000 : 0;
    row.crashes = site.service->running() ? 0 : 1;
    char fig[160];
    std::snprintf(fig, sizeof fig, "sent in %.2f s; %zu rejected log lines; %zu events published", took_s, lines,
                  events);
    row.figures = fig;
    if (!changes.empty()) row.figures += "; CHANGED: " + changes;
    row.expected = "service up, state unchanged, at most 5 rejected log lines a minute";
    row.passed = row.crashes == 0 && lines <= 5 && changes.empty();
    if (!row.passed) row.why = "seen: " + row.figures;
    record(row);

    fault_row ev;
    ev.name = "command flood 1,000/s: events";
    ev.injected = 1000;
    ev.survived = row.survived;
    ev.crashes = row.crashes;
    ev.figures = std::to_string(events) + " events published";
    ev.expected = "commands rate-limited: far fewer than 1,000 events (at most 100)";
    ev.passed = events <= 100;
    if (!ev.passed) ev.why = "seen: " + ev.figures;
    record(ev);
  }

  // 5,000 distinct implausible values on one input.
  {
    const std::string log_before = site.service->log_text();
    const std::size_t from = site.watcher->size();
    std::vector<std::string> values;
    for (int i = 0; i < 5000; ++i) values.push_back(std::to_string(150.0 + i * 0.01));
    (void)site.watcher->publish_paced("r/a/temp", values, std::chrono::microseconds(200));
    std::this_thread::sleep_for(1s);  // whatever the flood causes has come out
    const std::string log_after = site.service->log_text();
    const std::size_t lines =
        count_lines(log_after.substr(std::min(log_before.size(), log_after.size())), "input zone room-a");
    std::size_t events = 0;
    for (const auto& p : payloads_on(*site.watcher, "dm/events", from)) {
      const auto j = nlohmann::json::parse(p, nullptr, false);
      if (j.is_object() && j.value("kind", "") == "input") ++events;
    }
    const bool up = site.service->running();
    fault_row row;
    row.name = "5,000 distinct implausible values: log lines";
    row.injected = 5000;
    row.survived = up ? 5000 : 0;
    row.crashes = up ? 0 : 1;
    row.figures = std::to_string(lines) + " input log lines";
    row.expected = "at most 5 input log lines a minute, then the summary";
    row.passed = up && lines <= 5;
    if (!row.passed) row.why = "seen: " + row.figures;
    record(row);
    fault_row ev = row;
    ev.name = "5,000 distinct implausible values: events";
    ev.figures = std::to_string(events) + " input events";
    ev.expected = "one event per change of the input's state or kind of fault (at most 5)";
    ev.passed = up && events <= 5;
    ev.why = ev.passed ? "" : "seen: " + ev.figures;
    record(ev);
    site.watcher->publish("r/a/temp", "24.0");
  }

  // Resident memory, and the state at the end.
  const std::uint64_t rss_after = resident_kib(pid);
  const auto end_state = site.wait_zone(
      "room-a", [](const nlohmann::json&) { return true; }, 1s);
  fault_row row;
  row.name = "resident memory over the table and floods";
  row.injected = 1;
  row.survived = site.service->running() ? 1 : 0;
  row.crashes = 1 - row.survived;
  row.figures = "VmRSS " + std::to_string(rss_before / 1024) + " MiB -> " + std::to_string(rss_after / 1024) + " MiB";
  row.expected = "service up, VmRSS grows by at most 64 MiB";
  row.passed = row.survived == 1 && rss_before > 0 && rss_after <= rss_before + 64 * 1024;
  if (!row.passed) row.why = "seen: " + row.figures;
  record(row);
  (void)end_state;
}

}  // namespace
}  // namespace dewmargin::test_support
