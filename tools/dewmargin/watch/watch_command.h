#pragma once
// `dewmargin watch`: the live margins of one site (--config) or of several (--broker and
// --prefix, for a central broker that bridges several buildings).
#include <iosfwd>
#include <string>
#include <vector>

namespace dewmargin::cli {

struct watch_options {
  std::string config_file;            // broker settings and prefix from the service's config
  std::string broker;                 // overrides the config's broker uri
  std::vector<std::string> prefixes;  // overrides the config's prefix; several: grouped by site
  std::string username;               // without --config (or to override it)
  std::string password_file;
  std::string ca_file;
  std::string by;        // operator initials for commands
  bool once = false;     // one snapshot on stdout, then exit
  int width = 0;         // --once: columns (0: the terminal's, or 80)
  double wait_s = 10.0;  // --once: longest wait for the broker
};

int run_watch(const watch_options& options, std::ostream& out, std::ostream& err);

}  // namespace dewmargin::cli
