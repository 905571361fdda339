#include "dewmargin/named_files_check.h"

#include <sys/stat.h>

#include <cerrno>
#include <cstring>

#include "dewmargin/safe_text.h"
#include "dewmargin/secret_file_rule.h"

namespace dewmargin {

std::vector<std::string> check_named_files(const site_config& config) {
  std::vector<std::string> problems;
  const std::string& path = config.broker.password_file;
  if (path.empty()) return problems;
  const std::string where = "broker.password_file " + printable_text(path) + ": ";
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) {
    if (errno != ENOENT) problems.push_back(where + "cannot stat: " + std::strerror(errno));
    return problems;
  }
  if (S_ISDIR(st.st_mode)) {
    problems.push_back(where + "is a directory, not a secret file");
  } else if (std::string why = secret_file_mode_problem(st.st_mode); !why.empty()) {
    problems.push_back(where + why);
  }
  return problems;
}

}  // namespace dewmargin
