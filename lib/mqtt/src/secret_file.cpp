#include "dewmargin/secret_file.h"

#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>

#include "dewmargin/safe_text.h"
#include "dewmargin/secret_file_rule.h"

namespace dewmargin {

result<std::string> read_secret_file(const std::filesystem::path& file) {
  const std::string name = printable_text(file.string());
  std::error_code ec;
  if (std::filesystem::is_directory(file, ec)) {
    return make_error(error_code::invalid_argument, name + ": is a directory, not a secret file");
  }
  const std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(file.c_str(), "rb"), &std::fclose);
  if (!f) {
    return make_error(error_code::invalid_argument, name + ": cannot read: " + std::strerror(errno));
  }
  // Checked on the open file, so that what is checked is what is read.
  struct stat st {};
  if (::fstat(::fileno(f.get()), &st) != 0) {
    return make_error(error_code::invalid_argument, name + ": cannot stat: " + std::strerror(errno));
  }
  if (std::string why = secret_file_mode_problem(st.st_mode); !why.empty()) {
    return make_error(error_code::invalid_argument, name + ": " + why);
  }
  if (std::string why = secret_file_owner_problem(st.st_uid, ::geteuid()); !why.empty()) {
    return make_error(error_code::invalid_argument, name + ": " + why);
  }
  std::string secret;
  char buffer[512];
  std::size_t n = 0;
  while ((n = std::fread(buffer, 1, sizeof buffer, f.get())) > 0) {
    secret.append(buffer, n);
  }
  if (std::ferror(f.get()) != 0) {
    return make_error(error_code::invalid_argument, name + ": read error: " + std::strerror(errno));
  }
  while (!secret.empty() && (secret.back() == '\n' || secret.back() == '\r')) {
    secret.pop_back();
  }
  if (secret.empty()) {
    return make_error(error_code::invalid_argument, name + ": is empty");
  }
  return secret;
}

}  // namespace dewmargin
