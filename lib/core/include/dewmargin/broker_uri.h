#pragma once
// The broker URI schemes the product accepts, read in one place: the config reader, the
// MQTT link's option check, its TLS options and `dewmargin watch` all ask here, so that a
// URI one part accepts is never refused (or left unencrypted) by another.
#include <optional>
#include <string>

namespace dewmargin {

enum class broker_transport { plain, tls };

// tcp:// and mqtt:// are plain; ssl:// and mqtts:// are TLS; anything else is not ours.
std::optional<broker_transport> broker_transport_of(const std::string& uri);

// For error lines: "tcp://, ssl://, mqtt:// or mqtts://".
const char* accepted_broker_schemes();

}  // namespace dewmargin
