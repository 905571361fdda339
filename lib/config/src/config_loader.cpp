// Entry points: read the file, parse the YAML, hand the document to the section readers.
#include "dewmargin/config_loader.h"

#include <yaml-cpp/exceptions.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>
#include <optional>

#include "config_reading.h"
#include "text_check.h"

namespace dewmargin {
namespace {

using config_detail::diagnostics;
using config_detail::mark_or_start;

// A second document needs a marker line ("---" or "...") after the first document's content;
// without one the parser does not read on past the first document.
bool may_hold_a_second_document(std::string_view text) {
  bool content_seen = false;
  std::size_t start = 0;
  while (start < text.size()) {
    const std::size_t end = std::min(text.find('\n', start), text.size());
    const std::string_view line = text.substr(start, end - start);
    const bool marker = line.substr(0, 3) == "---" || line.substr(0, 3) == "...";
    if (marker && (content_seen || line.substr(0, 3) == "...")) return true;
    const auto first = line.find_first_not_of(" \t\r");
    if (first != std::string_view::npos && line[first] != '#') content_seen = true;
    start = end + 1;
  }
  return false;
}

}  // namespace

config_load_result load_config_text(std::string_view yaml_text, const std::string& file_label) {
  diagnostics diag(file_label);
  site_config config;
  config_detail::config_index index;
  try {
    if (!config_detail::check_config_text(yaml_text, diag)) {
      // Not text: the YAML reader would only add noise about bytes already reported.
      config_load_result result;
      result.errors = diag.take_in_file_order();
      return result;
    }
    const std::string text(yaml_text);
    const auto document = config_detail::yaml_document::parse(text, may_hold_a_second_document(text));
    if (document.root().is_null()) {
      diag.error({1, 1}, "the file holds no config (expected site, broker, storage, loops and zones)");
    } else {
      if (const auto& second = document.second_start()) {
        diag.error(*second, "only one YAML document is expected; a second one starts here");
      }
      config_detail::reading r{config, index, diag};
      config_detail::read_site(document.root(), r);
    }
  } catch (const YAML::ParserException& e) {
    diag.error(mark_or_start(e.mark), "YAML syntax error: " + e.msg);
  } catch (const YAML::Exception& e) {
    diag.error(mark_or_start(e.mark), "YAML error: " + e.msg);
  } catch (const std::exception& e) {
    diag.error({}, std::string("cannot load: ") + e.what());
  }

  config_load_result result;
  result.errors = diag.take_in_file_order();
  if (result.errors.empty()) result.config = std::move(config);
  return result;
}

config_load_result load_config_file(const std::filesystem::path& file) {
  const std::string label = file.string();
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(label.c_str(), "rb"), &std::fclose);
  std::string text;
  int read_errno = 0;
  if (!f) {
    read_errno = errno;
  } else {
    char buf[8192];
    std::size_t n = 0;
    while ((n = std::fread(buf, 1, sizeof buf, f.get())) > 0) text.append(buf, n);
    // A directory opens fine and fails on the first read (EISDIR).
    if (std::ferror(f.get())) read_errno = errno != 0 ? errno : EIO;
  }
  if (read_errno != 0) {
    config_load_result result;
    result.errors.push_back({label, 0, 0, std::string("cannot read: ") + std::strerror(read_errno)});
    return result;
  }
  return load_config_text(text, label);
}

}  // namespace dewmargin
