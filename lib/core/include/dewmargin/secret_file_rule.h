#pragma once
// A file holding a secret (the broker password) must be its owner's alone: no permission
// at all for group or others (mode 0600 or 0400). The service also wants it owned by the
// user it runs as, or by root (systemd's LoadCredential= hands it over that way). Pure:
// the caller passes what stat() said; each function returns why the file may not be
// used, or "" when it may.
#include <string>

namespace dewmargin {

[[nodiscard]] std::string secret_file_mode_problem(unsigned mode);
[[nodiscard]] std::string secret_file_owner_problem(unsigned owner_uid, unsigned process_uid);

}  // namespace dewmargin
