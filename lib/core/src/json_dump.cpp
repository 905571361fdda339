#include "dewmargin/json_dump.h"

#include <nlohmann/json.hpp>

namespace dewmargin {

std::string json_dump(const nlohmann::json& document) {
  return document.dump(-1, ' ', false, nlohmann::json::error_handler_t::replace);
}

std::string json_dump(const nlohmann::ordered_json& document) {
  return document.dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
}

}  // namespace dewmargin
