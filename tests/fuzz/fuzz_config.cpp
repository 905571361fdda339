// Config loading from text: never throws, never hangs; every error is located and
// printable; a config that loads has UTF-8 strings without control characters and
// needs no restart compared with itself.
#include <cstddef>
#include <cstdint>

#include "dewmargin/config_loader.h"
#include "dewmargin/restart_needed.h"
#include "fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace dewmargin;
  using namespace dewmargin::fuzz;
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  const config_load_result r = load_config_text(text, "fuzz.yaml");
  require(r.ok() == r.errors.empty(), "ok means no errors");
  for (const auto& e : r.errors) {
    const std::string line = e.to_string();
    require_printable(line, "config error");
    require(e.line > 0 && e.column > 0, "config error located", line);
  }
  if (r.ok()) {
    const site_config& c = *r.config;
    require(!c.zones.empty(), "a valid config has zones");
    require_printable(c.site, "site");
    for (const auto& topic : input_topics(c)) require_printable(topic, "input topic");
    require(restart_needed(c, c).empty(), "no restart against itself");
  }
  return 0;
}
