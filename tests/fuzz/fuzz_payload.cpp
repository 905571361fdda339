// Payload decoding: one MQTT payload through decode_number, decode_switch and the
// plausibility check under several input configs, then through a whole engine on a
// temperature, a JSON, a switch and a command topic. Nothing may throw or crash; every
// message and every published document stays printable, valid UTF-8 and JSON.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <vector>

#include "dewmargin/engine.h"
#include "dewmargin/input_decoder.h"
#include "fuzz_checks.h"

namespace dewmargin::fuzz {
namespace {

input_config input(const char* topic, const char* field, input_unit unit) {
  input_config c;
  c.topic = topic;
  c.field = field;
  c.unit = unit;
  return c;
}

std::vector<input_config> number_configs() {
  return {input("t", "", input_unit::celsius), input("t", "", input_unit::fahrenheit),
          input("t", "/t", input_unit::celsius), input("t", "/a/0/b", input_unit::fraction),
          input("t", "/flow", input_unit::us_gallons_per_minute)};
}

std::vector<input_config> switch_configs() {
  input_config bare = input("w", "", input_unit::none);
  bare.active = {"1", "wet"};
  input_config json = input("w", "/s", input_unit::none);
  json.active = {"true", "1.0"};
  json.inactive = {"false", "0", "dry"};
  return {bare, json};
}

site_config small_site() {
  site_config s;
  s.site = "fuzz";
  s.broker.client_id = "fuzz";
  s.publish.prefix = "dm";
  loop_config l;
  l.id = "loop-a";
  l.supply_temp = input("plant/a/supply", "", input_unit::celsius);
  l.setpoint.topic = "plant/a/sp";
  s.loops.push_back(l);
  zone_config z;
  z.id = "z1";
  z.loop = "loop-a";
  z.air_temp = input("b/z1/temp", "", input_unit::celsius);
  z.humidity.push_back(input("b/z1/multi", "/rh", input_unit::percent));
  z.surfaces.push_back(input("b/z1/multi", "/surface", input_unit::celsius));
  z.condensation_switch = input("b/z1/wet", "", input_unit::none);
  z.condensation_switch->active = {"1", "wet"};
  z.window_contact = input("b/z1/window", "/state", input_unit::none);
  z.window_contact->active = {"open"};
  z.valve = valve_config{"b/z1/valve", "open", "closed", 600.0};
  s.zones.push_back(z);
  return s;
}

void check_output(engine_output& out) {
  for (const auto& m : out.messages) {
    require(is_valid_utf8(m.topic), "published topic", m.topic);
    if (m.cls != message_class::command) require_json(m.payload, "published JSON");
  }
  for (const auto& e : out.events) require_json(e.json, "stored event");
  out.clear();
}

}  // namespace
}  // namespace dewmargin::fuzz

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace dewmargin;
  using namespace dewmargin::fuzz;
  const std::string_view payload(reinterpret_cast<const char*>(data), size);
  const plausibility_config plausible{};
  for (const auto& cfg : number_configs()) {
    const auto v = decode_number(payload, cfg, input_kind::air_temp);
    if (v) {
      require(std::isfinite(v.value()), "decoded number is finite");
      const auto p = check_plausible(v.value(), input_kind::humidity, plausible);
      if (!p) require_printable(p.err().message, "plausibility message");
    } else {
      require_printable(v.err().message, "number decode message");
    }
  }
  for (const auto& cfg : switch_configs()) {
    const auto v = decode_switch(payload, cfg);
    if (!v) require_printable(v.err().message, "switch decode message");
  }

  static const site_config site = small_site();
  engine core(site);
  engine_output out;
  timestamp now = from_unix_ms(1'800'000'000'000);
  core.begin(now, restored_state{}, out);
  check_output(out);
  for (const char* topic : {"b/z1/temp", "b/z1/multi", "b/z1/wet", "b/z1/window", "dm/cmd/ack", "dm/cmd/shelve"}) {
    core.on_message(topic, payload, now, out);
    check_output(out);
    now += std::chrono::seconds(1);
    core.tick(now, out);
    check_output(out);
  }
  return 0;
}
