#pragma once
// The report fixture (tests/data/history/report_fixture.sql) in a database made by the service's
// writer (schema of this program), for the report tests.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "dewmargin/store.h"
#include "store_test_support.h"

namespace dewmargin::report {

inline std::filesystem::path report_fixture_db(const store_test::temp_dir& dir) {
  const auto file = dir.file("history.db");
  store_test::error_sink errors;
  auto w = store_writer::open(store_test::test_options(file, errors));
  EXPECT_TRUE(w.ok()) << w.err().message;
  w.value().stop();
  store_test::raw_db db(file);
  std::ifstream in(std::string(DEWMARGIN_TEST_DATA_DIR) + "/history/report_fixture.sql");
  std::ostringstream sql;
  sql << in.rdbuf();
  EXPECT_FALSE(sql.str().empty());
  EXPECT_EQ(db.exec(sql.str()), SQLITE_OK);
  return file;
}

}  // namespace dewmargin::report
