#pragma once
// Subcommands of `dewmargin`. Each returns the process exit code:
// 0 success, 1 runtime failure, 2 bad usage or bad config/input.
#include <iosfwd>
#include <optional>
#include <string>
#include <vector>

namespace dewmargin::cli {

inline constexpr int k_exit_ok = 0;
inline constexpr int k_exit_runtime = 1;
inline constexpr int k_exit_usage = 2;

struct dewpoint_options {
  std::string temp_text;      // kept as text so "abc" can be reported exactly
  std::string rh_text;
  std::string unit = "C";     // C or F, applies to --temp and the output
  bool json = false;
  std::string formula = "sonntag";  // sonntag | alduchov
};
int run_dewpoint(const dewpoint_options& options, std::ostream& out, std::ostream& err);

// Validates a config file and prints a summary of zones, loops and inputs.
int run_check(const std::string& file, std::ostream& out, std::ostream& err);

struct replay_options {
  std::string config_file;
  std::string readings_file;
  bool states = false;
  std::string start = "1970-01-01T00:00:00Z";  // origin of `ts` given as seconds
  double tail_s = 0.0;                          // simulated seconds to run past the last reading
};
// Runs readings through the decision core on simulated time; prints events (and states).
int run_replay(const replay_options& options, std::ostream& out, std::ostream& err);
// `dewmargin history`: the event log of a history database. Options are kept as text (empty:
// not given) so that each bad value is reported exactly; run_history validates them.
struct history_options {
  std::string db;
  std::string zone;
  std::string since_text;
  std::string until_text;
  std::vector<std::string> kinds;  // --kind, repeated or comma-separated; empty: every kind
  std::string format = "table";  // table | csv | json
};
int run_history(const history_options& options, std::ostream& out, std::ostream& err);

// `dewmargin report`: a self-contained HTML review of a history database.
struct report_options {
  std::string db;
  std::string out;
  std::string config_file;  // optional: thresholds, loops, site name
  std::string since_text;
  std::string until_text;
  std::vector<std::string> zones;
};
int run_report(const report_options& options, std::ostream& out, std::ostream& err);

}  // namespace dewmargin::cli
