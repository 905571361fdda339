// `dewmargin replay`: recorded or invented readings through the decision core on
// simulated time, no broker. Prints the objects the service would publish, one per line.
#include <fstream>
#include <ostream>
#include <sstream>

#include "commands.h"
#include "dewmargin/config_loader.h"
#include "dewmargin/engine.h"
#include "dewmargin/replay_csv.h"
#include "dewmargin/tick_driver.h"

namespace dewmargin::cli {
namespace {

void print(engine_output& out, bool states, std::ostream& os) {
  for (const auto& m : out.messages) {
    const bool is_event = m.cls == message_class::event || m.cls == message_class::alarm_event;
    if (is_event || (states && m.cls == message_class::state)) os << m.payload << '\n';
  }
  out.clear();
}

}  // namespace

int run_replay(const replay_options& o, std::ostream& out, std::ostream& err) {
  const auto loaded = load_config_file(o.config_file);
  if (!loaded.ok()) {
    for (const auto& d : loaded.errors) err << d.to_string() << '\n';
    return k_exit_usage;
  }
  std::ifstream in(o.readings_file, std::ios::binary);
  if (!in) {
    err << o.readings_file << ": cannot read the readings file\n";
    return k_exit_usage;
  }
  std::ostringstream text;
  text << in.rdbuf();
  const auto start = parse_iso8601(o.start);
  if (!start) {
    err << "dewmargin replay: --start: " << start.err().message << '\n';
    return k_exit_usage;
  }
  const auto rows = parse_replay_csv(text.str(), start.value());
  if (!rows) {
    err << o.readings_file << ":" << rows.err().message << '\n';
    return k_exit_usage;
  }

  engine core(*loaded.config);
  engine_output batch;
  const timestamp t0 = rows.value().empty() ? start.value() : rows.value().front().ts;
  core.begin(t0, restored_state{}, batch);
  print(batch, o.states, out);

  // The periodic tick follows the readings' time, as the service's does in event-time mode.
  tick_driver ticks(t0);
  const auto tick = [&](timestamp at) {
    core.tick(at, batch);
    print(batch, o.states, out);
  };
  for (const auto& row : rows.value()) {
    ticks.advance_to(row.ts, tick);
    core.on_message(row.topic, row.payload, row.ts, batch);
    print(batch, o.states, out);
  }
  const timestamp last = rows.value().empty() ? t0 : std::max(rows.value().back().ts, t0);
  ticks.advance_to(last + std::chrono::milliseconds(static_cast<std::int64_t>(o.tail_s * 1000.0)), tick);
  out.flush();
  if (!out) {
    err << "dewmargin replay: cannot write the output\n";
    return k_exit_runtime;
  }
  return k_exit_ok;
}

}  // namespace dewmargin::cli
