#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "dewmargin/named_files_check.h"

namespace dewmargin {
namespace {

namespace fs = std::filesystem;

class NamedFilesCheck : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("dewmargin-named-files-" + std::to_string(getpid()));
    fs::create_directories(dir_);
  }
  void TearDown() override { fs::remove_all(dir_); }
  site_config with_password_file(const fs::path& p) const {
    site_config c;
    c.broker.username = "gateway";
    c.broker.password_file = p.string();
    return c;
  }
  fs::path secret(fs::perms mode) const {
    const fs::path p = dir_ / "broker.secret";
    std::ofstream(p) << "s3cret\n";
    fs::permissions(p, mode);
    return p;
  }
  fs::path dir_;
};

TEST_F(NamedFilesCheck, RefusesAPasswordFileOpenToGroupOrOthers) {
  const fs::path p = secret(fs::perms::owner_read | fs::perms::owner_write | fs::perms::group_read);
  EXPECT_EQ(check_named_files(with_password_file(p)),
            (std::vector<std::string>{"broker.password_file " + p.string() +
                                      ": mode 0640 gives group or others access; allow the owner only (chmod 600)"}));
}

TEST_F(NamedFilesCheck, AcceptsTheOwnersAloneAndNoPasswordFile) {
  EXPECT_TRUE(check_named_files(with_password_file(secret(fs::perms::owner_read))).empty());
  EXPECT_TRUE(check_named_files(with_password_file(secret(fs::perms::owner_read | fs::perms::owner_write))).empty());
  EXPECT_TRUE(check_named_files(site_config{}).empty());
}

TEST_F(NamedFilesCheck, LeavesAMissingFileToTheService) {
  // systemd's LoadCredential= puts it in place only while the service runs.
  EXPECT_TRUE(check_named_files(with_password_file(dir_ / "absent")).empty());
}

TEST_F(NamedFilesCheck, RefusesADirectory) {
  EXPECT_EQ(
      check_named_files(with_password_file(dir_)),
      (std::vector<std::string>{"broker.password_file " + dir_.string() + ": is a directory, not a secret file"}));
}

}  // namespace
}  // namespace dewmargin
