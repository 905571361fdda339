#pragma once
// The one way a JSON document becomes text in dewmargin. nlohmann-json's plain dump()
// throws (type_error 316) on a string that is not valid UTF-8; a byte from a payload,
// a config file or a command must never stop the service that way. Here ill-formed
// UTF-8 becomes U+FFFD, valid UTF-8 is written as is, and the text is compact.
// For .cpp files that already use nlohmann-json; keep it out of other headers.
#include <nlohmann/json_fwd.hpp>
#include <string>

namespace dewmargin {

[[nodiscard]] std::string json_dump(const nlohmann::json& document);
[[nodiscard]] std::string json_dump(const nlohmann::ordered_json& document);

}  // namespace dewmargin
