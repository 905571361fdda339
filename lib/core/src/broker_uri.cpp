#include "dewmargin/broker_uri.h"

namespace dewmargin {

std::optional<broker_transport> broker_transport_of(const std::string& uri) {
  const auto starts = [&](const char* prefix) { return uri.rfind(prefix, 0) == 0; };
  if (starts("tcp://") || starts("mqtt://")) return broker_transport::plain;
  if (starts("ssl://") || starts("mqtts://")) return broker_transport::tls;
  return std::nullopt;
}

const char* accepted_broker_schemes() { return "tcp://, ssl://, mqtt:// or mqtts://"; }

}  // namespace dewmargin
