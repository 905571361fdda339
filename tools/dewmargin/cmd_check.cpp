// `dewmargin check`: validate a config file and summarise it.
#include <ostream>

#include "commands.h"
#include "dewmargin/config_loader.h"

namespace dewmargin::cli {

int run_check(const std::string& file, std::ostream& out, std::ostream& err) {
  const auto loaded = load_config_file(file);
  if (!loaded.ok()) {
    for (const auto& d : loaded.errors) err << d.to_string() << '\n';
    return k_exit_usage;
  }
  out << file << ": ok\n";
  return k_exit_ok;
}

}  // namespace dewmargin::cli
