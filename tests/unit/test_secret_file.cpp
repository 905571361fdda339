#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "dewmargin/secret_file.h"
#include "dewmargin/secret_file_rule.h"

namespace dewmargin {
namespace {

namespace fs = std::filesystem;

class SecretFile : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("dewmargin-secret-" + std::to_string(getpid()));
    fs::create_directories(dir_);
  }
  void TearDown() override { fs::remove_all(dir_); }
  // A password file as the README asks for it: the owner's alone.
  fs::path write(const std::string& name, const std::string& text,
                 fs::perms mode = fs::perms::owner_read | fs::perms::owner_write) {
    const fs::path p = dir_ / name;
    std::ofstream(p, std::ios::binary) << text;
    fs::permissions(p, mode);
    return p;
  }
  fs::path dir_;
};

struct strip_case {
  const char* text;
  const char* secret;
};

TEST_F(SecretFile, StripsTrailingLineBreaksOnly) {
  for (const strip_case c : {strip_case{"s3cret", "s3cret"}, strip_case{"s3cret\n", "s3cret"},
                             strip_case{"s3cret\r\n", "s3cret"}, strip_case{"s3cret\n\n", "s3cret"},
                             strip_case{" with spaces \n", " with spaces "}, strip_case{"a\nb\n", "a\nb"}}) {
    const auto r = read_secret_file(write("pw", c.text));
    ASSERT_TRUE(r.ok()) << r.err().message;
    EXPECT_EQ(r.value(), c.secret);
  }
}

TEST_F(SecretFile, MissingFileNamesPathAndReason) {
  const fs::path p = dir_ / "absent";
  const auto r = read_secret_file(p);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().code, error_code::invalid_argument);
  EXPECT_EQ(r.err().message, p.string() + ": cannot read: No such file or directory");
}

TEST_F(SecretFile, EmptyFileIsAnError) {
  const fs::path p = write("empty", "\n");
  const auto r = read_secret_file(p);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().message, p.string() + ": is empty");
}

TEST_F(SecretFile, DirectoryIsAnError) {
  const auto r = read_secret_file(dir_);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().message, dir_.string() + ": is a directory, not a secret file");
}

// README: the password file is root-only (or the service user's only). A file that group or
// others may read or change used to be accepted silently.
TEST_F(SecretFile, RefusesAFileOpenToGroupOrOthersNamingItsMode) {
  struct mode_case {
    unsigned mode;
    const char* text;
  };
  for (const mode_case c : {mode_case{0644, "0644"}, mode_case{0640, "0640"}, mode_case{0604, "0604"},
                            mode_case{0660, "0660"}, mode_case{0620, "0620"}, mode_case{0602, "0602"},
                            mode_case{0610, "0610"}, mode_case{0601, "0601"}, mode_case{0777, "0777"}}) {
    const fs::path p = write("pw", "s3cret\n", static_cast<fs::perms>(c.mode));
    const auto r = read_secret_file(p);
    ASSERT_FALSE(r.ok()) << c.text;
    EXPECT_EQ(r.err().code, error_code::invalid_argument);
    EXPECT_EQ(r.err().message,
              p.string() + ": mode " + c.text + " gives group or others access; allow the owner only (chmod 600)");
    EXPECT_EQ(r.err().message.find("s3cret"), std::string::npos) << "the secret never appears in an error";
  }
}

TEST_F(SecretFile, AcceptsTheOwnersAloneModes) {
  for (const unsigned mode : {0600u, 0400u, 0700u}) {
    const auto r = read_secret_file(write("pw", "s3cret\n", static_cast<fs::perms>(mode)));
    ASSERT_TRUE(r.ok()) << std::oct << mode << ": " << r.err().message;
    EXPECT_EQ(r.value(), "s3cret");
  }
}

TEST_F(SecretFile, RefusesAFileOfAnotherUser) {
  if (::geteuid() != 0) GTEST_SKIP() << "needs root to give the file to another user";
  const fs::path p = write("pw", "s3cret\n");
  ASSERT_EQ(::chown(p.c_str(), 4242, 4242), 0);
  const auto r = read_secret_file(p);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().message, p.string() + ": owned by uid 4242, neither the service's user (uid 0) nor root");
}

TEST(SecretFileRule, AllowsTheOwnerOnly) {
  struct rule_case {
    unsigned mode;
    std::string problem;
  };
  const std::vector<rule_case> cases = {
      {S_IFREG | 0600, ""},
      {S_IFREG | 0400, ""},
      {S_IFREG | 0200, ""},
      {S_IFREG | 0640, "mode 0640 gives group or others access; allow the owner only (chmod 600)"},
      {S_IFREG | 0604, "mode 0604 gives group or others access; allow the owner only (chmod 600)"},
      {S_IFREG | 0020, "mode 0020 gives group or others access; allow the owner only (chmod 600)"},
      {S_IFREG | 04644, "mode 4644 gives group or others access; allow the owner only (chmod 600)"},
  };
  for (const auto& c : cases) EXPECT_EQ(secret_file_mode_problem(c.mode), c.problem) << std::oct << c.mode;
  EXPECT_EQ(secret_file_owner_problem(997, 997), "");
  EXPECT_EQ(secret_file_owner_problem(0, 997), "") << "root placed it (systemd LoadCredential=)";
  EXPECT_EQ(secret_file_owner_problem(1000, 997), "owned by uid 1000, neither the service's user (uid 997) nor root");
}

}  // namespace
}  // namespace dewmargin
