// The fault suite's entry: runs every case, then prints the table of figures (also to
// the file named by DEWMARGIN_FAULT_TABLE) and the wall time. Exit code: GoogleTest's.
#include <gtest/gtest.h>

#include <chrono>
#include <cstdlib>
#include <fstream>
#include <iostream>

#include "fault_support.h"

int main(int argc, char** argv) {
  ::testing::InitGoogleTest(&argc, argv);
  const auto t0 = std::chrono::steady_clock::now();
  const int rc = RUN_ALL_TESTS();
  const auto& table = dewmargin::test_support::fault_table::instance();
  const std::string text = table.render() + "wall time " +
                           dewmargin::test_support::seconds_text(std::chrono::steady_clock::now() - t0) + "\n";
  std::cout << "\n==== fault suite: figures\n" << text << std::flush;
  if (const char* file = std::getenv("DEWMARGIN_FAULT_TABLE")) std::ofstream(file) << text;
  return rc;
}
