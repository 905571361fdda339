#pragma once
// A real mosquitto broker for integration tests: its own temporary directory and config,
// a free loopback port, started by fork/exec and stopped by its PID. Restartable on the
// same port (stop(), start()), so tests can take the broker away and bring it back.
//
// Optionally a second listener with TLS and a password file: a CA and a server
// certificate are made with openssl at set-up, and the password file with mosquitto_passwd.
// mosquitto started as root drops to user `mosquitto`, so every file it reads is made
// world-readable (test material only) and the persistence directory world-writable.
#include <chrono>
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "child_process.h"

namespace dewmargin::test_support {

// A directory under /tmp removed with everything in it when this goes.
class temp_dir {
 public:
  explicit temp_dir(const std::string& prefix = "dewmargin-test");
  temp_dir(const temp_dir&) = delete;
  temp_dir& operator=(const temp_dir&) = delete;
  ~temp_dir();
  [[nodiscard]] const std::filesystem::path& path() const { return path_; }

 private:
  std::filesystem::path path_;
};

struct broker_tls_options {
  std::string subject_alt_name = "IP:127.0.0.1,DNS:localhost";  // of the server certificate
  std::string username = "gateway";
  std::string password = "dew-test-password";
};

struct broker_options {
  bool persistence = false;               // keep sessions and retained messages over a restart
                                          // (saved on stop() and every second, so also over kill())
  std::optional<broker_tls_options> tls;  // adds the TLS listener (password required there)
  std::vector<std::string> extra_config;  // lines appended to the config
};

struct tls_material {
  std::filesystem::path ca_cert;  // trust this to verify the broker
  std::filesystem::path server_cert;
  std::filesystem::path server_key;
  std::filesystem::path password_file;  // the broker's (mosquitto_passwd format)
};

// Makes a CA and a server certificate signed by it (RSA 2048, 1 day) in dir.
tls_material make_test_pki(const std::filesystem::path& dir, const std::string& subject_alt_name);

class mosquitto_broker {
 public:
  explicit mosquitto_broker(broker_options options = {});  // prepares; does not start
  mosquitto_broker(const mosquitto_broker&) = delete;
  mosquitto_broker& operator=(const mosquitto_broker&) = delete;
  ~mosquitto_broker();

  // Starts the broker and waits (at most 10 s) until every listener accepts.
  // Throws std::runtime_error with the broker's log when it does not come up.
  void start();
  void stop();  // SIGTERM, SIGKILL after 5 s; a persistent broker saves its state
  void kill();  // SIGKILL: a crash
  // SIGSTOP / SIGCONT: the broker hangs with its connections open (a network that
  // silently stops answering): clients' messages go out but no acknowledgement comes.
  void freeze();
  void thaw();
  [[nodiscard]] bool running();

  [[nodiscard]] int port() const { return port_; }
  [[nodiscard]] std::string uri() const;  // tcp://127.0.0.1:PORT
  [[nodiscard]] int tls_port() const { return tls_port_; }
  [[nodiscard]] std::string tls_uri(const std::string& host = "127.0.0.1") const;  // ssl://HOST:TLS_PORT
  [[nodiscard]] const tls_material& tls() const;
  [[nodiscard]] const std::filesystem::path& dir() const { return dir_.path(); }
  [[nodiscard]] std::string log_text() const;

 private:
  void write_config() const;

  broker_options options_;
  temp_dir dir_;
  std::filesystem::path config_file_;
  std::filesystem::path log_file_;
  std::optional<tls_material> tls_;
  int port_ = 0;
  int tls_port_ = 0;
  bool ever_started_ = false;
  child_process process_;
};

// A loopback TCP port nobody listens on right now.
int free_loopback_port();

// True when something accepts TCP connections on 127.0.0.1:port.
bool port_accepts(int port);

}  // namespace dewmargin::test_support
