// dewmargind's command line without a broker: --check, bad usage, --help.
#include <gtest/gtest.h>

#include <fstream>

#include "service_fixture.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;

struct daemon_run {
  int exit_code;
  std::string output;
};

daemon_run run_daemon(const std::vector<std::string>& args, const std::filesystem::path& dir) {
  const auto out = dir / "dewmargind.out";
  std::filesystem::remove(out);
  std::vector<std::string> argv{DEWMARGIND_BIN};
  argv.insert(argv.end(), args.begin(), args.end());
  auto p = child_process::spawn(argv, out);
  const auto code = p.wait_for(20s);
  if (!code) throw std::runtime_error("dewmargind did not finish within 20 s");
  return {*code, read_text_file(out)};
}

TEST(DaemonCommandLine, CheckAcceptsAValidConfig) {
  temp_dir dir("dewmargind-cli");
  const auto config = dir.path() / "site.yaml";
  {
    std::ofstream(config) << service_test_config("tcp://127.0.0.1:1", dir.path() / "h.db");
  }
  const auto r = run_daemon({"--config", config.string(), "--check"}, dir.path());
  EXPECT_EQ(r.exit_code, 0) << r.output;
  EXPECT_NE(r.output.find("valid (2 zones, 1 loops)"), std::string::npos) << r.output;
  EXPECT_FALSE(std::filesystem::exists(dir.path() / "h.db")) << "--check must not open the history";
}

TEST(DaemonCommandLine, CheckRejectsABadConfigWithLocatedErrors) {
  temp_dir dir("dewmargind-cli");
  const auto config = dir.path() / "bad.yaml";
  {
    std::ofstream(config) << "site: s\nbroker: {uri: tcp://h:1883, client_id: c}\nstorage: {path: p.db}\nzones: 3\n";
  }
  const auto r = run_daemon({"--config", config.string(), "--check"}, dir.path());
  EXPECT_EQ(r.exit_code, 2) << r.output;
  EXPECT_NE(r.output.find(config.string() + ":4:"), std::string::npos) << r.output;
}

TEST(DaemonCommandLine, ServiceWithABadConfigExitsTwo) {
  temp_dir dir("dewmargind-cli");
  const auto config = dir.path() / "bad.yaml";
  {
    std::ofstream(config) << "site: s\n";
  }
  const auto r = run_daemon({"--config", config.string()}, dir.path());
  EXPECT_EQ(r.exit_code, 2) << r.output;
  EXPECT_NE(r.output.find("missing required key"), std::string::npos) << r.output;
}

TEST(DaemonCommandLine, MissingPasswordFileIsARuntimeFailureNamingThePath) {
  temp_dir dir("dewmargind-cli");
  const auto config = dir.path() / "site.yaml";
  {
    std::string text = service_test_config("tcp://127.0.0.1:1", dir.path() / "h.db");
    text.replace(text.find("client_id: dewmargin-service-test"), std::string("client_id: dewmargin-service-test").size(),
                 "client_id: c, username: u, password_file: " + (dir.path() / "nope.secret").string());
    std::ofstream(config) << text;
  }
  const auto r = run_daemon({"--config", config.string()}, dir.path());
  EXPECT_EQ(r.exit_code, 1) << r.output;
  EXPECT_NE(r.output.find("nope.secret"), std::string::npos) << r.output;
  EXPECT_FALSE(std::filesystem::exists(dir.path() / "h.db")) << "the broker settings are checked before the disk";
}

// README: the broker password file is the owner's alone. One open to group or others is
// refused by --check (exit 2) and by the service (exit 1, like a missing file).
TEST(DaemonCommandLine, PasswordFileOpenToOthersIsRefusedNamingItsMode) {
  temp_dir dir("dewmargind-cli");
  const auto config = dir.path() / "site.yaml";
  const auto secret = dir.path() / "broker.secret";
  std::ofstream(secret) << "s3cret\n";
  std::filesystem::permissions(secret, std::filesystem::perms::owner_read | std::filesystem::perms::owner_write |
                                           std::filesystem::perms::group_read | std::filesystem::perms::others_read);
  {
    std::string text = service_test_config("tcp://127.0.0.1:1", dir.path() / "h.db");
    text.replace(text.find("client_id: dewmargin-service-test"), std::string("client_id: dewmargin-service-test").size(),
                 "client_id: c, username: u, password_file: " + secret.string());
    std::ofstream(config) << text;
  }
  const std::string why = secret.string() + ": mode 0644 gives group or others access";
  const auto check = run_daemon({"--config", config.string(), "--check"}, dir.path());
  EXPECT_EQ(check.exit_code, 2) << check.output;
  EXPECT_NE(check.output.find(why), std::string::npos) << check.output;
  const auto run = run_daemon({"--config", config.string()}, dir.path());
  EXPECT_EQ(run.exit_code, 1) << run.output;
  EXPECT_NE(run.output.find(why), std::string::npos) << run.output;
  EXPECT_EQ(run.output.find("s3cret"), std::string::npos) << run.output;

  std::filesystem::permissions(secret, std::filesystem::perms::owner_read | std::filesystem::perms::owner_write);
  const auto fixed = run_daemon({"--config", config.string(), "--check"}, dir.path());
  EXPECT_EQ(fixed.exit_code, 0) << fixed.output;
}

TEST(DaemonCommandLine, UsageErrorsExitTwoAndHelpShowsTheCaution) {
  temp_dir dir("dewmargind-cli");
  EXPECT_EQ(run_daemon({}, dir.path()).exit_code, 2);
  EXPECT_EQ(run_daemon({"--config", "x.yaml", "--frobnicate"}, dir.path()).exit_code, 2);
  const auto help = run_daemon({"--help"}, dir.path());
  EXPECT_EQ(help.exit_code, 0);
  EXPECT_NE(help.output.find("not a safety device"), std::string::npos) << help.output;
  EXPECT_NE(help.output.find("Example:"), std::string::npos) << help.output;
}

}  // namespace
}  // namespace dewmargin::test_support
