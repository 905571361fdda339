#pragma once
// Checks of the link's options done before anything touches the network. Each returns
// a one-line reason naming the field (and the path, for files), or an empty string.
#include <string>

#include "dewmargin/mqtt_link.h"

namespace dewmargin::detail {

std::string check_link_options(const mqtt_link_options& options);

// Why a topic cannot be published to (empty, wildcard, NUL), or empty.
std::string invalid_publish_topic(const std::string& topic);

}  // namespace dewmargin::detail
