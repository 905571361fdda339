#include "dewmargin/broker_tls.h"

namespace dewmargin {

::mqtt::ssl_options broker_ssl_options(const tls_config& files) {
  ::mqtt::ssl_options ssl;
  if (!files.ca_file.empty()) ssl.set_trust_store(files.ca_file);
  if (!files.cert_file.empty()) ssl.set_key_store(files.cert_file);
  if (!files.key_file.empty()) ssl.set_private_key(files.key_file);
  ssl.set_enable_server_cert_auth(true);  // the broker's chain must verify...
  ssl.set_verify(true);                   // ...and its name must match the host in the URI
  // No ssl.set_error_handler(): connect() copies the options and the C library keeps a
  // pointer into that copy, which is gone when the handler runs (found by ASan).
  return ssl;
}

}  // namespace dewmargin
