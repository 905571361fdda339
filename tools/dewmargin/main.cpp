// dewmargin: the operator command line. Parsing only; each subcommand lives in its own file.
#include <CLI/CLI.hpp>
#include <iostream>
#include <string>

#include "commands.h"
#include "dewmargin/caution.h"
#include "dewmargin/event_kind.h"
#include "dewmargin/version.h"
#include "watch/watch_command.h"

namespace {

using namespace dewmargin::cli;  // NOLINT(google-build-using-namespace): file-local, in a .cpp
using dewmargin::k_caution;

int parse_failure(const CLI::Error& e, CLI::App& app) {
  if (e.get_exit_code() == 0) return app.exit(e);  // --help, --version
  std::cerr << "dewmargin: " << e.what() << " (see --help)\n";
  return k_exit_usage;
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"dewmargin: dew-point supervision of chilled radiant surfaces (operator command line)"};
  app.footer(std::string("\nExamples:\n"
                         "  dewmargin dewpoint --temp 24 --rh 50\n"
                         "  dewmargin check /etc/dewmargin/dewmargin.yaml\n"
                         "  dewmargin replay --config site.yaml --readings readings.csv\n"
                         "  dewmargin history --db /var/lib/dewmargin/history.db --zone level2-east --since 2026-07-14\n"
                         "  dewmargin report --db /var/lib/dewmargin/history.db --config site.yaml --out review.html\n\n") +
             k_caution);
  app.require_subcommand(1);
  app.set_version_flag("--version", std::string("dewmargin ") + dewmargin::k_version);

  int exit_code = k_exit_ok;

  dewpoint_options dp;
  auto* dewpoint = app.add_subcommand("dewpoint", "Dew point and humidity ratio of one air state");
  dewpoint->add_option("--temp", dp.temp_text, "Air temperature (in --unit)")->required();
  dewpoint->add_option("--rh", dp.rh_text, "Relative humidity, % (0 < RH <= 100; up to 103 is clamped)")->required();
  dewpoint->add_option("--unit", dp.unit, "Temperature unit of --temp and the output: C or F")
      ->check(CLI::IsMember({"C", "F", "c", "f"}));
  dewpoint->add_option("--formula", dp.formula,
                       "Magnus coefficients: sonntag (WMO-No. 8, default) or alduchov (Alduchov & Eskridge 1996)")
      ->check(CLI::IsMember({"sonntag", "alduchov"}));
  dewpoint->add_flag("--json", dp.json, "Print one JSON object");
  dewpoint->footer(std::string("\nExample:\n  dewmargin dewpoint --temp 24 --rh 50 --json\n\n") + k_caution);
  dewpoint->callback([&] { exit_code = run_dewpoint(dp, std::cout, std::cerr); });

  std::string check_file;
  auto* check = app.add_subcommand("check", "Validate a config file and summarise zones, loops and inputs");
  check->add_option("FILE", check_file, "Config file (YAML)")->required();
  check->footer(std::string("\nExample:\n  dewmargin check config/example.yaml\n\n") + k_caution);
  check->callback([&] { exit_code = run_check(check_file, std::cout, std::cerr); });

  replay_options rp;
  auto* replay = app.add_subcommand(
      "replay", "Run recorded readings through the rules on simulated time and print what would be published");
  replay->add_option("--config", rp.config_file, "Config file (YAML)")->required();
  replay->add_option("--readings", rp.readings_file, "CSV file with columns ts,topic,payload")->required();
  replay->add_flag("--states", rp.states, "Also print every zone and loop state");
  replay->add_option("--start", rp.start, "Origin of ts given as seconds (ISO 8601; default 1970-01-01T00:00:00Z)");
  replay->add_option("--tail-s", rp.tail_s, "Simulated seconds to keep ticking after the last reading")
      ->check(CLI::Range(0.0, 86400.0 * 31));
  replay->footer(std::string("\nExample:\n  dewmargin replay --config config/example.yaml --readings day.csv --states\n\n"
                             "The first line must be the header ts,topic,payload (a UTF-8 byte-order mark is\n"
                             "skipped). ts is ISO 8601 or seconds from --start, from 1970 to 9999; payload is\n"
                             "quoted per RFC 4180 when it holds commas or quotes. Lines starting with # are\n"
                             "comments.\n\n") +
                 k_caution);
  replay->callback([&] { exit_code = run_replay(rp, std::cout, std::cerr); });

  history_options hist;
  auto* history = app.add_subcommand("history", "Print the event log of a history database");
  history->add_option("--db", hist.db, "History database (SQLite); opened read-only")->required()->type_name("FILE");
  history->add_option("--zone", hist.zone, "Only events of this zone (matches any subject id: also a loop or dehumidifier)")
      ->type_name("ID");
  history->add_option("--since", hist.since_text, "Only events at or after TIME")->type_name("TIME");
  history->add_option("--until", hist.until_text, "Only events before TIME; a bare date means up to the end of that day")
      ->type_name("TIME");
  history->add_option("--kind", hist.kinds,
                      "Only events of these kinds (repeat it, or a comma list): " + dewmargin::event_kind_list())
      ->delimiter(',')
      ->type_name("KIND");
  history->add_option("--format", hist.format, "table (default), csv or json")->type_name("FORMAT");
  history->footer(std::string(
                      "\nTIME is ISO 8601: 2026-07-14T13:00:00Z, 2026-07-14T15:00:00+02:00, or a date (2026-07-14).\n"
                      "A time without a zone is taken as UTC; times are printed in UTC. --since is inclusive and\n"
                      "--until exclusive, but a bare date for --until includes that whole day, so\n"
                      "--since 2026-07-14 --until 2026-07-14 is the 14th from 00:00Z to 24:00Z.\n\n"
                      "Formats:\n"
                      "  table  aligned columns: time, subject, kind, from → to, details (key=value)\n"
                      "  csv    RFC 4180 with CRLF line ends; header ts,subject_type,subject,kind,from,to,details;\n"
                      "         details is a JSON object of the event's other fields\n"
                      "  json   one stored event object (as published) per line (JSON Lines)\n"
                      "Events are ordered by time, then by the order they were stored, and streamed: a year of\n"
                      "events is never held in memory.\n\n"
                      "Exit codes: 0 ok, also when nothing matches (table: \"no events\", csv: the header only,\n"
                      "json: nothing); 1 the database is missing, unreadable, corrupt, not a dewmargin history\n"
                      "database, or of a newer schema; 2 bad usage (bad TIME, unknown kind or format).\n\n"
                      "Example:\n"
                      "  dewmargin history --db /var/lib/dewmargin/history.db --kind band --since 2026-07-01 --format csv\n\n") +
                  k_caution);
  history->callback([&] { exit_code = run_history(hist, std::cout, std::cerr); });

  report_options rep;
  auto* report = app.add_subcommand("report", "Write a self-contained HTML review of a history database");
  report->add_option("--db", rep.db, "History database (SQLite); opened read-only")->required()->type_name("FILE");
  report->add_option("--out", rep.out, "The HTML file to write (replaced whole)")->required()->type_name("FILE.html");
  report->add_option("--config", rep.config_file,
                     "Site config: thresholds, loops and site name for the page (optional)")
      ->type_name("FILE");
  report->add_option("--since", rep.since_text, "Start of the period (default: the first stored row)")
      ->type_name("TIME");
  report->add_option("--until", rep.until_text,
                     "End of the period, exclusive; a bare date includes that day (default: the last stored row)")
      ->type_name("TIME");
  report->add_option("--zone", rep.zones, "Only these zones (repeat it, or a comma list)")
      ->delimiter(',')
      ->type_name("ID");
  report->footer(std::string("\n"
                             "The page holds: a verdict; thresholds in force (with --config); alarm-system figures\n"
                             "beside the ISA-18.2 / EEMUA 191 targets; mould risk (surface RH >= 80 %); per loop the\n"
                             "setpoint, supply and what limited it; per zone the margin timeline with bands, acks,\n"
                             "shelving and valve actions, dew point and coldest surface, and a table of band times,\n"
                             "worst margin, alarms, time to acknowledge, condensing episodes with their warning time\n"
                             "and stale-input time. Inline CSS and SVG only: it opens and prints anywhere (A4).\n"
                             "\n"
                             "Exit codes: 0 written; 1 the database is missing, unreadable or holds nothing for the\n"
                             "period, or the file cannot be written; 2 bad usage or a bad config.\n"
                             "\n"
                             "Example:\n"
                             "  dewmargin report --db /var/lib/dewmargin/history.db --config /etc/dewmargin/dewmargin.yaml \\\n"
                             "      --since 2026-07-01 --until 2026-07-31 --out july.html\n"
                             "\n") +
                 k_caution);
  report->callback([&] { exit_code = run_report(rep, std::cout, std::cerr); });

  // watch: live margins from the retained state topics (tools/dewmargin/watch/).
  watch_options watch_opts;
  auto* watch =
      app.add_subcommand("watch", "Live margins of every zone, worst first, from the broker's retained states");
  watch->add_option("--config", watch_opts.config_file, "Config file (YAML): broker, TLS, password file and prefix")
      ->type_name("FILE");
  watch->add_option("--broker", watch_opts.broker, "Broker URI (tcp://, ssl://); overrides the config's")
      ->type_name("URI");
  watch
      ->add_option("--prefix", watch_opts.prefixes,
                   "Topic prefix of a site; repeat for several sites on one broker (grouped by site)")
      ->type_name("P");
  watch->add_option("--username", watch_opts.username, "Broker user name (without --config)")->type_name("NAME");
  watch->add_option("--password-file", watch_opts.password_file, "File holding the broker password (first line)")
      ->type_name("FILE");
  watch->add_option("--ca-file", watch_opts.ca_file, "CA certificate of the broker (ssl://)")->type_name("FILE");
  watch->add_option("--by", watch_opts.by, "Your initials, sent with acknowledge and shelve (asked once otherwise)")
      ->type_name("INITIALS");
  watch->add_flag("--once", watch_opts.once,
                  "Print one snapshot once the retained states have arrived (no new one for 0.3 s, at most 5 s "
                  "after subscribing), then exit");
  watch->add_option("--width", watch_opts.width, "With --once: columns (default: the terminal's, or 80)")
      ->check(CLI::Range(26, 1000));
  watch->add_option("--wait-s", watch_opts.wait_s, "With --once: longest wait for the broker, seconds (default 10)")
      ->check(CLI::Range(0.1, 600.0));
  watch->footer(
      std::string(
          "\nColumns: zone, band, margin (K), dew point, coldest surface, supply water (degC), minutes to\n"
          "condensation, valve ('*': held, see the last column), alarm (ACTIVE, acked, latched, shelved,\n"
          "suppr), age of the state. Worst zone first: unknown, condensing, alarm, tight, safe, then the\n"
          "lowest margin. Narrower than 80 columns, columns drop in this order: why held, age, water,\n"
          "dew point, surface, to wet, valve, alarm.\n\n"
          "Keys: q or Ctrl-C quits. Type a command and Enter: a ZONE [NOTE] acknowledges, s ZONE MIN\n"
          "[REASON] shelves for MIN minutes, u ZONE unshelves; the service's answer is shown. Colour only\n"
          "on a terminal and when NO_COLOR is unset.\n\n"
          "Examples:\n"
          "  dewmargin watch --config /etc/dewmargin/dewmargin.yaml --by JK\n"
          "  dewmargin watch --config /etc/dewmargin/dewmargin.yaml --once\n"
          "  dewmargin watch --broker tcp://central:1883 --prefix bldg-a/dewmargin --prefix bldg-b/dewmargin\n\n") +
      k_caution);
  watch->callback([&] { exit_code = run_watch(watch_opts, std::cout, std::cerr); });

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    return parse_failure(e, app);
  }
  return exit_code;
}
