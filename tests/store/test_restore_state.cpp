// What a restarted service gets back: the latest snapshot of every zone and loop.
#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::error_sink;
using store_test::k_t0_ms;
using store_test::k_wait;
using store_test::raw_db;
using store_test::temp_dir;

zone_snapshot zone_state(const std::string& zone, bool active, bool acknowledged,
                         std::optional<std::int64_t> shelved_ms, const std::string& valve, std::int64_t ts_ms) {
  return zone_snapshot{zone,
                       active ? "alarm" : "safe",
                       active,
                       acknowledged,
                       shelved_ms ? std::optional<timestamp>(from_unix_ms(*shelved_ms)) : std::nullopt,
                       valve,
                       from_unix_ms(ts_ms)};
}

TEST(RestoreState, LatestSnapshotOfEachZoneAndLoopSurvivesARestart) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  error_sink errors;
  {
    auto writer = store_test::open_writer(store_test::test_options(file, errors));
    engine_output first;
    first.zone_snapshots.push_back(zone_state("level2-east", true, false, std::nullopt, "closed", k_t0_ms));
    first.loop_snapshots.push_back(loop_snapshot{"loop-a", 17.5, from_unix_ms(k_t0_ms)});
    writer.enqueue(first);
    ASSERT_TRUE(writer.flush(k_wait));  // a separate commit: the second one must update, not add
    engine_output second;
    second.zone_snapshots.push_back(
        zone_state("level2-east", true, true, k_t0_ms + 30 * 60'000, "closed", k_t0_ms + 60'000));
    second.zone_snapshots.push_back(zone_state("level3-west", false, true, std::nullopt, "", k_t0_ms + 60'000));
    second.loop_snapshots.push_back(loop_snapshot{"loop-a", 18.25, from_unix_ms(k_t0_ms + 60'000)});
    writer.enqueue(second);
    writer.stop();
  }
  raw_db db(file);
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_state"), 2);
  EXPECT_EQ(db.integer("SELECT count(*) FROM loop_state"), 1);

  auto writer = store_test::open_writer(store_test::test_options(file, errors));
  auto restored = writer.load_restored_state();
  ASSERT_TRUE(restored.ok()) << restored.err().message;
  const auto& zones = restored.value().zones;
  ASSERT_EQ(zones.size(), 2u);
  EXPECT_EQ(zones[0].zone, "level2-east");
  EXPECT_EQ(zones[0].band, "alarm");
  EXPECT_TRUE(zones[0].alarm_active);
  EXPECT_TRUE(zones[0].acknowledged);
  ASSERT_TRUE(zones[0].shelved_until.has_value());
  EXPECT_EQ(to_unix_ms(*zones[0].shelved_until), k_t0_ms + 30 * 60'000);
  EXPECT_EQ(zones[0].valve, "closed");
  EXPECT_EQ(to_unix_ms(zones[0].ts), k_t0_ms + 60'000);
  EXPECT_EQ(zones[1].zone, "level3-west");
  EXPECT_FALSE(zones[1].alarm_active);
  EXPECT_FALSE(zones[1].shelved_until.has_value());
  EXPECT_EQ(zones[1].valve, "");
  ASSERT_EQ(restored.value().loops.size(), 1u);
  EXPECT_EQ(restored.value().loops[0].loop, "loop-a");
  EXPECT_DOUBLE_EQ(restored.value().loops[0].setpoint_c, 18.25);
  EXPECT_EQ(to_unix_ms(restored.value().loops[0].ts), k_t0_ms + 60'000);
}

TEST(RestoreState, ANewDatabaseRestoresNothing) {
  temp_dir dir;
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(dir.file("h.db"), errors));
  auto restored = writer.load_restored_state();
  ASSERT_TRUE(restored.ok()) << restored.err().message;
  EXPECT_TRUE(restored.value().zones.empty());
  EXPECT_TRUE(restored.value().loops.empty());
}

TEST(RestoreState, SnapshotsOfOneBatchCoalesceToTheLast) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(file, errors));
  for (int i = 0; i < 5; ++i) {
    engine_output out;
    out.zone_snapshots.push_back(zone_state("z1", i % 2 == 0, i == 4, std::nullopt, "open", k_t0_ms + i));
    writer.enqueue(out);
  }
  EXPECT_EQ(writer.counters().pending_rows, 1u) << "only the latest snapshot is kept in memory";
  ASSERT_TRUE(writer.flush(k_wait));
  auto restored = writer.load_restored_state();
  ASSERT_TRUE(restored.ok()) << restored.err().message;
  ASSERT_EQ(restored.value().zones.size(), 1u);
  EXPECT_EQ(to_unix_ms(restored.value().zones[0].ts), k_t0_ms + 4);
  EXPECT_TRUE(restored.value().zones[0].acknowledged);
}

}  // namespace
}  // namespace dewmargin
