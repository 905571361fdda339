#pragma once
// One zone's events over the report period, replayed in time order: time in each band, alarms
// raised and the time to acknowledge them, condensing episodes with the warning each had, stale-
// input time, and the markers drawn on the zone's timeline. Pure: events in, figures out.
//
// Rules (docs: README "Report"):
// - A band lasts from its band event to the next; before the first one known, and while the
//   service is stopped (a site `service` event to "stopped"), the zone counts as "no data".
//   After a start it is `unknown` until its first band event.
// - An alarm is raised when the zone's alarm becomes active (a new activation, also while an
//   earlier one is still latched unacknowledged) or an acknowledged alarm is re-armed: the
//   activations ISA-18.2 counts for alarm rates. The time to acknowledge runs from the first
//   raise not yet acknowledged to the `ack` event. Raises before the period are not counted.
// - A condensing episode runs from entering `condensing` to leaving it (or a stop, or the end).
//   Its warning time is how long before it the zone's alarm came: the time since the zone last
//   entered `alarm` or `condensing` from `safe`/`tight` (0: no warning, straight to condensing).
// - Stale-input time: time with at least one of the zone's inputs stale, missing or bad.
#include <array>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "dewmargin/band.h"
#include "dewmargin/report/event_facts.h"
#include "dewmargin/zone_period.h"

namespace dewmargin::report {

struct condensing_episode {
  timestamp start;
  double duration_s = 0.0;
  bool ended = true;       // false: still condensing at the end of the period (or at a stop)
  double warning_s = 0.0;  // 0: the zone went straight to condensing
};

enum class marker_kind { ack, shelve, valve_closed, valve_opened };

struct timeline_marker {
  marker_kind kind;
  timestamp at;
  timestamp end;  // shelving: until (the unshelve, the expiry or the period's end); else = at
};

// A stretch of one band, from the events (no data: band unset).
struct band_span {
  timestamp from;
  timestamp to;
  std::optional<band> b;
};

struct zone_review {
  std::string zone;
  std::vector<band_span> spans;               // the whole period, in order, for the timeline's shading
  std::array<double, k_band_count> band_s{};  // seconds in each band (band's order)
  double no_data_s = 0.0;
  std::vector<timestamp> raises;       // alarms raised in the period
  std::vector<double> ack_delays_s;    // raise → ack, for the raises acknowledged in the period
  int unacknowledged_at_end = 0;       // raised in the period, not acknowledged by its end
  std::vector<double> alarm_active_s;  // each period of an active alarm (for stale alarms)
  std::vector<condensing_episode> condensing;
  double stale_input_s = 0.0;
  int shelves = 0;
  int suppressed = 0;  // events marked suppressed_by (suppression by design)
  std::vector<timeline_marker> markers;

  [[nodiscard]] std::optional<double> median_ack_s() const;
  [[nodiscard]] std::optional<double> longest_ack_s() const;
  [[nodiscard]] const condensing_episode* longest_condensing() const;
};

class zone_review_builder {
 public:
  zone_review_builder(std::string zone, timestamp since, timestamp until);

  // The zone's state at `since`: its last band event before it (its band and alarm), unless a
  // later service stop came between (then "no data").
  void start_from(const event_facts& last_band_before);

  // An event of this zone, or a site `service` event; in time order, within [since, until).
  void add(const event_facts& e);

  [[nodiscard]] zone_review finish();

 private:
  void advance(timestamp t);
  void set_band(std::optional<band> b, timestamp t);
  void update_alarm(const event_facts& e);

  zone_review r_;
  timestamp since_;
  timestamp until_;
  timestamp cursor_;
  std::optional<band> band_;
  std::optional<timestamp> alarm_since_;  // entered alarm/condensing from safe/tight
  std::optional<timestamp> raised_at_;    // a raise in the period waiting for its ack
  bool alarm_active_ = false;
  bool alarm_unacked_ = false;
  std::optional<timestamp> active_since_;
  std::set<std::string> bad_inputs_;
  std::optional<std::size_t> open_shelve_;
};

}  // namespace dewmargin::report
