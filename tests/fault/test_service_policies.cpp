// The service's own fault policies, without the process: containment of one message's
// exception, the event log budget, and the key under which repeated problems are counted.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <stdexcept>
#include <vector>

#include "dewmargin/safe_text.h"
#include "event_log_budget.h"
#include "logging.h"
#include "message_containment.h"

namespace dewmargin::daemon {
namespace {

using clock = std::chrono::steady_clock;
using namespace std::chrono_literals;

struct recording {
  std::vector<containment_report> reports;
  message_containment make(std::chrono::seconds interval = 60s) {
    return message_containment(interval, [this](const containment_report& r) { reports.push_back(r); });
  }
};

TEST(MessageContainment, AHandlerThatReturnsIsNotCounted) {
  recording rec;
  auto c = rec.make();
  int calls = 0;
  EXPECT_TRUE(c.run("r/a/temp", [&] { ++calls; }));
  EXPECT_EQ(calls, 1);
  EXPECT_EQ(c.dropped_total(), 0u);
  EXPECT_TRUE(rec.reports.empty());
}

TEST(MessageContainment, ARuntimeErrorDropsTheMessageAndIsReportedWithTopicAndError) {
  recording rec;
  auto c = rec.make();
  EXPECT_FALSE(c.run("r/a/temp", [] { throw std::runtime_error("bad payload"); }));
  EXPECT_EQ(c.dropped_total(), 1u);
  ASSERT_EQ(rec.reports.size(), 1u);
  EXPECT_EQ(rec.reports[0].topic, "r/a/temp");
  EXPECT_EQ(rec.reports[0].error, "bad payload");
  EXPECT_EQ(rec.reports[0].dropped_since_last, 0u);
}

TEST(MessageContainment, TheJsonLibraryRefusingInvalidUtf8IsContained) {
  recording rec;
  auto c = rec.make();
  EXPECT_FALSE(c.run("r/a/temp", [] { (void)nlohmann::json(std::string("\x80")).dump(); }));
  ASSERT_EQ(rec.reports.size(), 1u);
  EXPECT_NE(rec.reports[0].error.find("invalid UTF-8 byte"), std::string::npos) << rec.reports[0].error;
}

TEST(MessageContainment, RepeatsWithinTheIntervalAreCountedAndSummedIntoTheNextReport) {
  recording rec;
  auto c = rec.make(60s);
  const auto t0 = clock::time_point{} + 1h;
  const auto fail = [] { throw std::runtime_error("x"); };
  for (int i = 0; i < 100; ++i) EXPECT_FALSE(c.run("t", fail, t0 + std::chrono::milliseconds(i * 100)));
  EXPECT_EQ(rec.reports.size(), 1u);
  EXPECT_FALSE(c.run("t", fail, t0 + 61s));
  ASSERT_EQ(rec.reports.size(), 2u);
  EXPECT_EQ(rec.reports[1].dropped_since_last, 99u);
  EXPECT_EQ(c.dropped_total(), 101u);
}

TEST(MessageContainment, InternalFaultsAreRethrown) {
  recording rec;
  auto c = rec.make();
  EXPECT_THROW(c.run("t", [] { throw std::bad_alloc(); }), std::bad_alloc);
  EXPECT_THROW(c.run("t", [] { throw std::logic_error("invariant broken"); }), std::logic_error);
  EXPECT_THROW(c.run("t", [] { throw std::out_of_range("index"); }), std::out_of_range);
  EXPECT_THROW(c.run("t", [] { throw 42; }), int);
  EXPECT_EQ(c.dropped_total(), 0u);
  EXPECT_TRUE(rec.reports.empty());
}

TEST(MessageContainment, AThrowingReporterIsNotContained) {
  message_containment c(60s, [](const containment_report&) { throw std::runtime_error("log sink broken"); });
  EXPECT_THROW(c.run("t", [] { throw std::runtime_error("x"); }), std::runtime_error);
}

TEST(MessageContainment, ReportsQuoteTopicAndErrorAsSafeText) {
  std::vector<containment_report> reports;
  message_containment c(60s, [&](const containment_report& r) { reports.push_back(r); });
  const std::string topic = std::string("r/a/\x80\n", 6) + std::string(500, 't');
  c.run(topic, [] { throw std::runtime_error(std::string("bad \xc3 byte\r", 12)); });
  ASSERT_EQ(reports.size(), 1u);
  EXPECT_EQ(reports[0].topic, text_excerpt(topic, k_report_bytes));
  EXPECT_TRUE(is_valid_utf8(reports[0].topic));
  EXPECT_EQ(reports[0].topic.find('\n'), std::string::npos);
  EXPECT_EQ(reports[0].error, "bad \xEF\xBF\xBD byte\\r");
}

TEST(EventLogBudget, AlarmRelatedEventsAreAlwaysWritten) {
  event_log_budget b({60s, 5}, clock::time_point{});
  for (const char* kind : {"band", "ack", "shelve", "unshelve", "valve", "service"}) {
    EXPECT_FALSE(event_log_budget::quiet_kind(kind)) << kind << " is written at info";
    for (int i = 0; i < 100; ++i) EXPECT_TRUE(b.admit(kind)) << kind;
  }
  EXPECT_FALSE(b.summary_due(clock::time_point{} + 61s)) << "nothing held back, nothing counted";
}

TEST(EventLogBudget, SetpointDehumidifyAndInputGoToDebugWithAnInfoSummary) {
  const auto t0 = clock::time_point{} + 1h;
  event_log_budget b({60s, 5}, t0);
  for (const char* kind : {"setpoint", "dehumidify", "input"}) {
    EXPECT_TRUE(event_log_budget::quiet_kind(kind)) << kind;
  }
  for (int i = 0; i < 40; ++i) EXPECT_TRUE(b.admit("setpoint")) << "written, at debug";
  for (int i = 0; i < 3; ++i) EXPECT_TRUE(b.admit("dehumidify"));
  const auto summary = b.summary_due(t0 + 60s);
  ASSERT_TRUE(summary);
  EXPECT_EQ(*summary,
            "in the last 60 s: 3 dehumidify events (3 logged at debug), 40 setpoint events (40 logged at debug)");
  EXPECT_FALSE(b.summary_due(t0 + 121s)) << "a quiet minute says nothing";
}

TEST(EventLogBudget, InputAndRejectedGetFiveLinesAMinuteAndASummaryWithTheCounts) {
  const auto t0 = clock::time_point{} + 1h;
  event_log_budget b({60s, 5}, t0);
  int input_lines = 0;
  int rejected_lines = 0;
  for (int i = 0; i < 5000; ++i) input_lines += b.admit("input") ? 1 : 0;
  for (int i = 0; i < 1000; ++i) rejected_lines += b.admit("rejected") ? 1 : 0;
  b.count("inbound messages dropped (queue full)", 7);
  b.count("outbound messages dropped (outbox full)", 0);  // zero: not mentioned
  EXPECT_EQ(input_lines, 5);
  EXPECT_EQ(rejected_lines, 5);
  EXPECT_FALSE(b.summary_due(t0 + 59s));
  const auto summary = b.summary_due(t0 + 60s);
  ASSERT_TRUE(summary);
  EXPECT_EQ(*summary,
            "in the last 60 s: 5000 input events (5 logged at debug), 1000 rejected events (5 logged), "
            "7 inbound messages dropped (queue full)");
  // A new window: the budget is there again, and a quiet minute says nothing.
  EXPECT_TRUE(b.admit("input"));
  EXPECT_EQ(b.summary_due(t0 + 121s), "in the last 61 s: 1 input events (1 logged at debug)");
  EXPECT_FALSE(b.summary_due(t0 + 182s));
}

TEST(ProblemReporter, CountersInAMessageDoNotMakeItANewProblem) {
  EXPECT_EQ(problem_reporter::problem_key("/var/lib/h.db: commit of 12 rows (3 events) failed; retry in 0.25 s"),
            problem_reporter::problem_key("/var/lib/h.db: commit of 7 rows (10 events) failed; retry in 30 s"));
  EXPECT_NE(problem_reporter::problem_key("/var/lib/h.db: commit failed: disk full"),
            problem_reporter::problem_key("/var/lib/h.db: commit failed: database is locked"));
  EXPECT_LE(problem_reporter::problem_key(std::string(5000, 'x')).size(), 200u);
}

}  // namespace
}  // namespace dewmargin::daemon
