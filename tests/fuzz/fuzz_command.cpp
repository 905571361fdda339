// Operator command decoding: the verb (last topic level) and the payload are both fuzzed
// (split at the first 0xFF byte). The rejection reason and every text field that an
// event echoes must build a JSON event that reads back.
#include <cstddef>
#include <cstdint>

#include "dewmargin/message_json.h"
#include "dewmargin/operator_command.h"
#include "fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace dewmargin;
  using namespace dewmargin::fuzz;
  const pieces<2> in(std::string_view(reinterpret_cast<const char*>(data), size));
  for (const std::string& verb : {in.part[0], std::string("ack"), std::string("shelve"), std::string("unshelve")}) {
    std::string zone;
    const auto cmd = parse_operator_command(verb, in.part[1], zone);
    event_json e("fuzz", from_unix_ms(0), subject_type::zone, zone, cmd ? "ack" : "rejected");
    if (cmd) {
      const operator_command& c = cmd.value();
      if (c.verb == command_verb::shelve) require(c.minutes >= 1 && c.minutes <= 1440, "shelve minutes", in.part[1]);
      e.text("by", c.by).text_or_null("note", c.note).text_or_null("reason", c.reason).integer("minutes", c.minutes);
    } else {
      e.text("reason", cmd.err().message);
    }
    require_json(e.dump(), "command event");
  }
  return 0;
}
