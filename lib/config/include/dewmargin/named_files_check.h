#pragma once
// Checks of the files a valid config names, for `dewmargin check` and `dewmargind
// --check`: a password file that exists must not be open to group or others
// (secret_file_rule.h). A missing one is not reported here: with systemd's
// LoadCredential= it exists only while the service runs, and the service itself stops
// with exit 1 when it cannot read it. Ownership is judged by the service alone, which
// knows the user it runs as.
#include <string>
#include <vector>

#include "dewmargin/config.h"

namespace dewmargin {

// One line per problem: "broker.password_file PATH: mode 0644 gives group or others ...".
[[nodiscard]] std::vector<std::string> check_named_files(const site_config& config);

}  // namespace dewmargin
