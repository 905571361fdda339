// Event and state JSON building with fuzzed strings (site, ids, kind, texts, and the
// byte pattern of numbers): whatever the bytes, the document is valid UTF-8 JSON whose
// fixed keys read back.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <optional>

#include "dewmargin/message_json.h"
#include "fuzz_checks.h"

namespace {

std::optional<double> number_of(const std::string& bytes) {
  if (bytes.size() < sizeof(double)) return std::nullopt;
  double v = 0.0;
  std::memcpy(&v, bytes.data(), sizeof v);
  return v;  // NaN and infinities included: they must come out as null or a number
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace dewmargin;
  using namespace dewmargin::fuzz;
  const pieces<6> in(std::string_view(reinterpret_cast<const char*>(data), size));
  const timestamp ts = from_unix_ms(static_cast<std::int64_t>(size) * 1'000'003);

  event_json e(in.part[0], ts, subject_type::zone, in.part[1], in.part[2]);
  e.text("from", in.part[3]).text_or_null("to", in.part[4]).text("reason", in.part[5]);
  e.number("margin_k", number_of(in.part[5])).integer("count", static_cast<long long>(size));
  e.alarm(alarm_status{size % 2 == 0, size % 3 == 0, std::nullopt});
  const std::string event = e.dump();
  require_json(event, "event");
  const auto j = nlohmann::json::parse(event);
  require(j.at("kind").is_string() && j.at("site").is_string(), "event keys", event);

  zone_state_view z;
  z.site = in.part[0];
  z.zone = in.part[1];
  z.ts = ts;
  z.band = "safe";
  z.dew_point_c = number_of(in.part[2]);
  z.margin_k = number_of(in.part[3]);
  z.margin_source = nullptr;
  z.valve = nullptr;
  require_json(format_zone_state(z), "zone state");

  loop_state_view l;
  l.site = in.part[0];
  l.loop = in.part[2];
  l.ts = ts;
  const auto setpoint = number_of(in.part[4]);
  l.setpoint_c = setpoint.value_or(18.0);
  l.reason = in.part[5];
  l.limited = "none";
  require_json(format_loop_state(l), "loop state");
  if (setpoint && std::isfinite(*setpoint) && std::fabs(*setpoint) < 1e15) {
    require(!format_bare_number(*setpoint).empty(), "bare number");
  }
  return 0;
}
