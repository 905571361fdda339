// The screen of `dewmargin watch` (tools/dewmargin/watch/watch_screen.h).
#include <gtest/gtest.h>

#include <algorithm>

#include "watch_screen.h"

namespace dewmargin::watch {
namespace {

const timestamp k_now = from_unix_ms(1'784'034'000'000);  // 2026-07-14T13:00:00Z

std::vector<column_id> ids(const std::vector<column>& cols) {
  std::vector<column_id> out;
  for (const auto& c : cols) out.push_back(c.id);
  return out;
}

int width_of(const std::vector<column>& cols) {
  int w = static_cast<int>(cols.size()) - 1;
  for (const auto& c : cols) w += c.width;
  return w;
}

TEST(WatchScreen, EightyColumnsHoldEveryColumnButWhy) {
  const auto cols = choose_columns(80, 19);
  EXPECT_EQ(ids(cols), (std::vector<column_id>{column_id::marker, column_id::zone, column_id::band, column_id::margin,
                                               column_id::dew_point, column_id::surface, column_id::supply,
                                               column_id::to_wet, column_id::valve, column_id::alarm, column_id::age}));
  EXPECT_LE(width_of(cols), 80);
}

TEST(WatchScreen, ColumnsDropInTheDocumentedOrderAsTheTerminalNarrows) {
  const std::vector<column_id> drop_order = {column_id::age,     column_id::supply, column_id::dew_point,
                                             column_id::surface, column_id::to_wet, column_id::valve,
                                             column_id::alarm};
  std::size_t dropped = 0;
  for (int width = 80; width >= 26; --width) {  // 26: marker, zone, band and margin
    const auto cols = choose_columns(width, 12);
    EXPECT_LE(width_of(cols), width) << width;
    const auto present = ids(cols);
    // Whatever is missing is a prefix of the drop order: nothing later goes before it.
    std::size_t missing = 0;
    for (column_id id : drop_order) {
      if (std::find(present.begin(), present.end(), id) == present.end()) ++missing;
    }
    for (std::size_t i = 0; i < missing; ++i) {
      EXPECT_EQ(std::find(present.begin(), present.end(), drop_order[i]), present.end()) << width;
    }
    EXPECT_GE(missing, dropped) << "a column came back at " << width;
    dropped = missing;
    for (column_id kept : {column_id::zone, column_id::band, column_id::margin}) {
      EXPECT_NE(std::find(present.begin(), present.end(), kept), present.end()) << width;
    }
  }
  EXPECT_EQ(dropped, drop_order.size());
}

TEST(WatchScreen, WideTerminalsGrowTheZoneThenShowWhyTheValveIsHeld) {
  const auto cols = choose_columns(140, 19);
  EXPECT_EQ(cols[1].id, column_id::zone);
  EXPECT_EQ(cols[1].width, 19);
  EXPECT_EQ(cols.back().id, column_id::why);
  EXPECT_LE(width_of(cols), 140);
}

live::live_book sample_book() {
  live::live_book b({"dm"});
  (void)b.ingest("dm/status", R"({"state":"online","site":"s","version":"0.1.0","ts":"2026-07-14T12:00:00Z"})");
  (void)b.ingest("dm/zone/room-a/state",
                 R"({"zone":"room-a","ts":"2026-07-14T12:59:30Z","band":"safe","margin_k":4.25,"dew_point_c":12.0,)"
                 R"("surface_min_c":16.25,"supply_c":16.0,"valve":"open","minutes_to_condensation":null,)"
                 R"("alarm":{"active":false,"acknowledged":true,"shelved_until":null}})");
  (void)b.ingest("dm/zone/first-south-meeting/state",
                 R"({"zone":"first-south-meeting","ts":"2026-07-14T12:58:00Z","band":"condensing","margin_k":-0.11,)"
                 R"("dew_point_c":17.21,"surface_min_c":17.1,"supply_c":16.2,"valve":"closed",)"
                 R"("valve_hold":"dew point above supply - 1.0 K","minutes_to_condensation":0.0,)"
                 R"("alarm":{"active":true,"acknowledged":false,"shelved_until":null}})");
  return b;
}

TEST(WatchScreen, OnceWithoutColourPrintsHeaderCountsAndRowsWorstFirst) {
  const auto book = sample_book();
  screen_input in;
  in.book = &book;
  in.now = k_now;
  in.width = 80;
  in.broker = "tcp://127.0.0.1:1883";
  in.connection = "connected";
  const auto lines = compose_screen(in);
  ASSERT_EQ(lines.size(), 5u);
  EXPECT_EQ(lines[0], "dewmargin watch | tcp://127.0.0.1:1883 | connected | 13:00:00Z");
  EXPECT_EQ(lines[1], "unknown 0  condensing 1  alarm 0  tight 0  safe 1 | service online | K, °C");
  EXPECT_EQ(lines[2], "  zone          band       margin   dew  surf water to wet valve   alarm     age");
  EXPECT_EQ(lines[3], "# first-south-… condensing  -0.11  17.2  17.1  16.2   0.0m closed* ACTIVE     1m");
  EXPECT_EQ(lines[4], "  room-a        safe         4.25  12.0  16.2  16.0      - open    -          0s");
  for (const auto& l : lines) {
    EXPECT_LE(display_width(l), 80) << l;
    EXPECT_EQ(l.find('\x1b'), std::string::npos) << "colour without a terminal";
  }
}

TEST(WatchScreen, ColourMarksBandsAndIsResetOnEveryCell) {
  const auto book = sample_book();
  screen_input in;
  in.book = &book;
  in.now = k_now;
  in.colour = true;
  const auto lines = compose_screen(in);
  EXPECT_NE(lines[3].find("\x1b[1;97;41mcondensing\x1b[0m"), std::string::npos) << lines[3];
  EXPECT_NE(lines[4].find("\x1b[32msafe      \x1b[0m"), std::string::npos) << lines[4];
}

TEST(WatchScreen, InteractiveScreenFillsTheHeightAndKeepsTheWorstWhenRowsRunOut) {
  live::live_book b({"dm"});
  for (int i = 0; i < 30; ++i) {
    const std::string id = "z" + std::to_string(100 + i);
    (void)b.ingest("dm/zone/" + id + "/state",
                   R"({"zone":")" + id + R"(","band":"tight","margin_k":)" + std::to_string(1.0 + i * 0.01) + "}");
  }
  screen_input in;
  in.book = &b;
  in.now = k_now;
  in.height = 12;
  in.message = "done: ack z100";
  in.prompt = "> s z10_";
  const auto lines = compose_screen(in);
  ASSERT_EQ(lines.size(), 12u);
  EXPECT_EQ(lines[3].substr(0, 6), "~ z100");  // lowest margin first
  EXPECT_EQ(lines[9], "... 24 more rows below (better zones); enlarge the window");
  EXPECT_EQ(lines[10], "done: ack z100");
  EXPECT_EQ(lines[11], "> s z10_");
}

TEST(WatchScreen, SeveralSitesAreGroupedUnderTheirHeadings) {
  live::live_book b({"bldg-a/dm", "bldg-b/dm"});
  (void)b.ingest("bldg-b/dm/zone/b1/state", R"({"zone":"b1","band":"alarm","margin_k":0.5})");
  (void)b.ingest("bldg-a/dm/zone/a1/state", R"({"zone":"a1","band":"safe","margin_k":3})");
  screen_input in;
  in.book = &b;
  in.now = k_now;
  const auto lines = compose_screen(in);
  ASSERT_EQ(lines.size(), 7u);
  EXPECT_EQ(lines[3].rfind("-- bldg-a/dm: no status | unknown 0  condensing 0  alarm 0  tight 0  safe 1 ---", 0), 0u)
      << lines[3];
  EXPECT_EQ(lines[4].substr(0, 4), "  a1");
  EXPECT_EQ(lines[5].rfind("-- bldg-b/dm", 0), 0u);
  EXPECT_EQ(lines[6].substr(0, 4), "! b1");
}

TEST(WatchScreen, FormatsAgesAndMinutesCompactly) {
  const struct {
    double s;
    const char* text;
  } ages[] = {{0, "0s"},    {59.9, "59s"}, {60, "1m"}, {3599, "59m"},
              {7200, "2h"}, {90000, "1d"}, {-2, "0s"}, {-60, "ahead"}};
  for (const auto& a : ages) EXPECT_EQ(format_age(a.s), a.text) << a.s;
  EXPECT_EQ(format_minutes(std::nullopt), "-");
  EXPECT_EQ(format_minutes(3.24), "3.2m");
  EXPECT_EQ(format_minutes(45.4), "45m");
  EXPECT_EQ(format_minutes(180), "3h");
}

}  // namespace
}  // namespace dewmargin::watch
