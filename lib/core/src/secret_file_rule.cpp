#include "dewmargin/secret_file_rule.h"

#include <cstdio>

namespace dewmargin {

std::string secret_file_mode_problem(unsigned mode) {
  constexpr unsigned k_group_and_others = 077;
  if ((mode & k_group_and_others) == 0) return {};
  char buf[128];
  std::snprintf(buf, sizeof buf, "mode %04o gives group or others access; allow the owner only (chmod 600)",
                mode & 07777);
  return buf;
}

std::string secret_file_owner_problem(unsigned owner_uid, unsigned process_uid) {
  if (owner_uid == process_uid || owner_uid == 0) return {};
  return "owned by uid " + std::to_string(owner_uid) + ", neither the service's user (uid " +
         std::to_string(process_uid) + ") nor root";
}

}  // namespace dewmargin
