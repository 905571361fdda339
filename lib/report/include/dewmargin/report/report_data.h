#pragma once
// Everything `dewmargin report` shows, computed from a history database, and the page.
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/history_reader.h"
#include "dewmargin/report/alarm_figures.h"
#include "dewmargin/report/series.h"
#include "dewmargin/report/zone_review.h"

namespace dewmargin::report {

// What the report knows from the site's config (`--config`); without one it has no thresholds
// and no zone-to-loop map, and says so on the page.
struct site_settings {
  std::string site;
  std::map<std::string, band_thresholds> thresholds;  // by zone
  std::map<std::string, std::string> loop_of_zone;
  std::map<std::string, setpoint_config> setpoints;  // by loop
};

struct report_options {
  std::optional<timestamp> since;  // default: the first stored row
  std::optional<timestamp> until;  // default: the end of the last stored row
  std::vector<std::string> zones;  // empty: every zone
  std::optional<site_settings> settings;
  std::string config_label;  // the config file's name, for the header
  std::string db_label;
  timestamp generated_at;
  std::size_t chart_buckets = 480;
};

struct setpoint_step {
  timestamp at;
  double setpoint_c = 0.0;
  std::string limited;
  std::string reason;
};

struct loop_review {
  std::string loop;
  std::vector<setpoint_step> steps;                       // from setpoint events, in order
  std::optional<double> setpoint_at_start_c;              // the last setpoint before the period
  std::vector<minute_mean> supply_c;                      // per bucket, mean of its zones (needs --config)
  std::map<std::string, double> limited_s;                // time at each limit: none, min, max, rate
  std::vector<std::pair<std::string, double>> reasons_s;  // reason (numbers dropped) → time, most first
};

struct zone_report {
  zone_review review;
  zone_series series;
  std::optional<band_thresholds> thresholds;
};

struct report_data {
  std::string site;
  timestamp since;
  timestamp until;
  timestamp generated_at;
  std::string db_label;
  std::string config_label;
  series_layout layout;
  std::vector<zone_report> zones;                    // ordered by id
  std::vector<loop_review> loops;                    // ordered by id
  std::map<std::string, setpoint_config> setpoints;  // by loop, from --config
  alarm_figures alarms;
  std::size_t events_read = 0;
  std::size_t periods_read = 0;
  int schema_version = 0;
  bool has_settings = false;
};

// Reads the history (streamed: one pass over the events, one over the samples) and computes
// every figure. Errors are the store's (file, what, SQLite's message).
[[nodiscard]] store_result<report_data> build_report(const history_reader& reader, const report_options& options);

// The whole page: one self-contained HTML document (inline CSS and SVG, no script, no outside
// resource), well-formed as XML so a strict parser reads it.
[[nodiscard]] std::string render_html(const report_data& data);

// A one-paragraph verdict, as on the page.
[[nodiscard]] std::string verdict_text(const report_data& data);

}  // namespace dewmargin::report
