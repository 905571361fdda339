#include "dewmargin/secret_file.h"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>

namespace dewmargin {

result<std::string> read_secret_file(const std::filesystem::path& file) {
  std::error_code ec;
  if (std::filesystem::is_directory(file, ec)) {
    return make_error(error_code::invalid_argument, file.string() + ": is a directory, not a secret file");
  }
  const std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(file.c_str(), "rb"), &std::fclose);
  if (!f) {
    return make_error(error_code::invalid_argument, file.string() + ": cannot read: " + std::strerror(errno));
  }
  std::string secret;
  char buffer[512];
  std::size_t n = 0;
  while ((n = std::fread(buffer, 1, sizeof buffer, f.get())) > 0) {
    secret.append(buffer, n);
  }
  if (std::ferror(f.get()) != 0) {
    return make_error(error_code::invalid_argument, file.string() + ": read error: " + std::strerror(errno));
  }
  while (!secret.empty() && (secret.back() == '\n' || secret.back() == '\r')) {
    secret.pop_back();
  }
  if (secret.empty()) {
    return make_error(error_code::invalid_argument, file.string() + ": is empty");
  }
  return secret;
}

}  // namespace dewmargin
