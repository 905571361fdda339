#include "mosquitto_fixture.h"

#include <random>

#include <arpa/inet.h>
#include <netinet/in.h>
#include <sys/socket.h>
#include <unistd.h>

#include <csignal>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <stdexcept>
#include <thread>

namespace dewmargin::test_support {
namespace fs = std::filesystem;
namespace {

constexpr const char* k_mosquitto = "/usr/sbin/mosquitto";
constexpr const char* k_mosquitto_passwd = "/usr/bin/mosquitto_passwd";
constexpr const char* k_openssl = "/usr/bin/openssl";
constexpr std::chrono::seconds k_start_timeout{10};
constexpr std::chrono::seconds k_stop_grace{5};
constexpr std::chrono::seconds k_tool_timeout{30};
constexpr int k_start_attempts = 3;  // a port taken between choosing and binding: pick again

void make_world_readable(const fs::path& p) {
  fs::permissions(p, fs::perms::owner_read | fs::perms::owner_write | fs::perms::group_read | fs::perms::others_read,
                  fs::perm_options::replace);
}

void write_file(const fs::path& p, const std::string& text) {
  std::ofstream out(p);
  out << text;
  if (!out) throw std::runtime_error("cannot write " + p.string());
  out.close();
  make_world_readable(p);
}

sockaddr_in loopback(int port) {
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_port = htons(static_cast<std::uint16_t>(port));
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  return addr;
}

}  // namespace

temp_dir::temp_dir(const std::string& prefix) {
  std::string pattern = (fs::temp_directory_path() / (prefix + "-XXXXXX")).string();
  if (mkdtemp(pattern.data()) == nullptr) {
    throw std::runtime_error("mkdtemp " + pattern + ": " + std::strerror(errno));
  }
  path_ = pattern;
  // Readable for the broker once it has dropped root.
  fs::permissions(path_,
                  fs::perms::owner_all | fs::perms::group_read | fs::perms::group_exec | fs::perms::others_read |
                      fs::perms::others_exec,
                  fs::perm_options::replace);
}

temp_dir::~temp_dir() {
  std::error_code ec;
  fs::remove_all(path_, ec);
}

namespace {

bool can_bind(int port) {
  const int fd = socket(AF_INET, SOCK_STREAM, 0);
  if (fd < 0) return false;
  const sockaddr_in addr = loopback(port);
  const bool ok = bind(fd, reinterpret_cast<const sockaddr*>(&addr), sizeof addr) == 0;
  close(fd);
  return ok;
}

}  // namespace

// A random port below the kernel's ephemeral range (32768-60999 on Linux). Ports from
// bind(0) come from that range, where the kernel soon hands the same port to another
// test (or to a client's outgoing connection) while a broker is stopped for a restart:
// a restarted broker must find its port still free.
int free_loopback_port() {
  std::random_device seed;
  std::mt19937 pick(seed() ^ static_cast<unsigned>(getpid()));
  std::uniform_int_distribution<int> port_in(20000, 32000);
  for (int attempt = 0; attempt < 200; ++attempt) {
    const int port = port_in(pick);
    if (can_bind(port)) return port;
  }
  throw std::runtime_error("no free loopback port between 20000 and 32000");
}

bool port_accepts(int port) {
  const int fd = socket(AF_INET, SOCK_STREAM, 0);
  if (fd < 0) return false;
  const sockaddr_in addr = loopback(port);
  const bool ok = connect(fd, reinterpret_cast<const sockaddr*>(&addr), sizeof addr) == 0;
  close(fd);
  return ok;
}

tls_material make_test_pki(const fs::path& dir, const std::string& subject_alt_name) {
  const fs::path log = dir / "openssl.log";
  tls_material m;
  m.ca_cert = dir / "ca.crt";
  const fs::path ca_key = dir / "ca.key";
  m.server_key = dir / "server.key";
  m.server_cert = dir / "server.crt";
  const fs::path csr = dir / "server.csr";
  const fs::path ext = dir / "server.ext";
  write_file(ext, "subjectAltName=" + subject_alt_name +
                      "\nbasicConstraints=CA:FALSE\n"
                      "keyUsage=digitalSignature,keyEncipherment\nextendedKeyUsage=serverAuth\n");
  run_checked({k_openssl, "req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "1", "-subj",
               "/CN=dewmargin test CA", "-keyout", ca_key.string(), "-out", m.ca_cert.string()},
              k_tool_timeout, log);
  run_checked({k_openssl, "req", "-newkey", "rsa:2048", "-nodes", "-subj", "/CN=dewmargin test broker", "-keyout",
               m.server_key.string(), "-out", csr.string()},
              k_tool_timeout, log);
  run_checked({k_openssl, "x509", "-req", "-in", csr.string(), "-CA", m.ca_cert.string(), "-CAkey", ca_key.string(),
               "-CAcreateserial", "-days", "1", "-extfile", ext.string(), "-out", m.server_cert.string()},
              k_tool_timeout, log);
  for (const fs::path& p : {m.ca_cert, m.server_cert, m.server_key}) make_world_readable(p);
  return m;
}

mosquitto_broker::mosquitto_broker(broker_options options)
    : options_(std::move(options)),
      dir_("dewmargin-broker"),
      config_file_(dir_.path() / "mosquitto.conf"),
      log_file_(dir_.path() / "mosquitto.log") {
  port_ = free_loopback_port();
  if (options_.tls) {
    tls_port_ = free_loopback_port();
    tls_ = make_test_pki(dir_.path(), options_.tls->subject_alt_name);
    tls_->password_file = dir_.path() / "passwords";
    run_checked(
        {k_mosquitto_passwd, "-c", "-b", tls_->password_file.string(), options_.tls->username, options_.tls->password},
        k_tool_timeout, dir_.path() / "mosquitto_passwd.log");
    make_world_readable(tls_->password_file);
  }
  if (options_.persistence) {
    const fs::path data = dir_.path() / "data";
    fs::create_directory(data);
    fs::permissions(data, fs::perms::all, fs::perm_options::replace);  // the broker writes here as `mosquitto`
  }
}

mosquitto_broker::~mosquitto_broker() { stop(); }

void mosquitto_broker::write_config() const {
  std::string c;
  c += "per_listener_settings true\n";
  c += "log_dest stderr\n";
  c += "log_type error\nlog_type warning\nlog_type notice\nlog_type information\n";
  c += "connection_messages true\n";
  c += "max_queued_messages 0\n";  // the default 1000 drops QoS 1 messages under load
  if (options_.persistence) {
    c += "persistence true\nautosave_interval 1\npersistence_location " + (dir_.path() / "data").string() + "/\n";
  } else {
    c += "persistence false\n";
  }
  c += "\nlistener " + std::to_string(port_) + " 127.0.0.1\nallow_anonymous true\n";
  if (tls_) {
    c += "\nlistener " + std::to_string(tls_port_) + " 127.0.0.1\n";
    c += "cafile " + tls_->ca_cert.string() + "\n";
    c += "certfile " + tls_->server_cert.string() + "\n";
    c += "keyfile " + tls_->server_key.string() + "\n";
    c += "allow_anonymous false\n";
    c += "password_file " + tls_->password_file.string() + "\n";
  }
  for (const auto& line : options_.extra_config) c += line + "\n";
  write_file(config_file_, c);
}

void mosquitto_broker::start() {
  if (running()) return;
  for (int attempt = 1;; ++attempt) {
    write_config();
    process_ = child_process::spawn({k_mosquitto, "-c", config_file_.string()}, log_file_);
    const auto deadline = std::chrono::steady_clock::now() + k_start_timeout;
    bool up = false;
    while (process_.running() && std::chrono::steady_clock::now() < deadline) {
      if (port_accepts(port_) && (!tls_ || port_accepts(tls_port_))) {
        up = true;
        break;
      }
      std::this_thread::sleep_for(std::chrono::milliseconds(20));
    }
    if (up) {
      ever_started_ = true;
      return;
    }
    const bool exited = !process_.running();
    (void)process_.kill_now();
    const std::string log = log_text();
    if (exited && !ever_started_ && attempt < k_start_attempts &&
        log.find("Address already in use") != std::string::npos) {
      port_ = free_loopback_port();  // someone took the port meanwhile; a restart must keep it
      if (tls_) tls_port_ = free_loopback_port();
      continue;
    }
    throw std::runtime_error(std::string("mosquitto did not come up") + (exited ? " (it exited)" : " within 10 s") +
                             "; config " + config_file_.string() + "; log:\n" + log);
  }
}

void mosquitto_broker::stop() {
  if (!process_.running()) return;
  (void)process_.send_signal(SIGCONT);  // a frozen broker would hold SIGTERM until the grace ran out
  (void)process_.terminate(k_stop_grace);
}

void mosquitto_broker::kill() {
  if (process_.running()) (void)process_.kill_now();
}

void mosquitto_broker::freeze() { (void)process_.send_signal(SIGSTOP); }

void mosquitto_broker::thaw() { (void)process_.send_signal(SIGCONT); }

bool mosquitto_broker::running() { return process_.running(); }

std::string mosquitto_broker::uri() const { return "tcp://127.0.0.1:" + std::to_string(port_); }

std::string mosquitto_broker::tls_uri(const std::string& host) const {
  return "ssl://" + host + ":" + std::to_string(tls_port_);
}

const tls_material& mosquitto_broker::tls() const {
  if (!tls_) throw std::logic_error("mosquitto_broker: TLS listener not configured");
  return *tls_;
}

std::string mosquitto_broker::log_text() const { return read_text_file(log_file_); }

}  // namespace dewmargin::test_support
