#pragma once
// The TLS options of a connection to the broker, one rule for the service's link and for
// `dewmargin watch`: the broker's certificate chain must verify (against `ca_file`, or the
// system's store when it is empty) and its name must match the host in the URI; a client
// certificate and key are presented when given.
#include <mqtt/ssl_options.h>

#include "dewmargin/config.h"

namespace dewmargin {

[[nodiscard]] ::mqtt::ssl_options broker_ssl_options(const tls_config& files);

}  // namespace dewmargin
