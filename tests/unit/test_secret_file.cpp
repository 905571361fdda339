#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>

#include "dewmargin/secret_file.h"

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
  fs::path write(const std::string& name, const std::string& text) {
    const fs::path p = dir_ / name;
    std::ofstream(p, std::ios::binary) << text;
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

}  // namespace
}  // namespace dewmargin
