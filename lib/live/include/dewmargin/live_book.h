#pragma once
// The latest published state of one or more sites, as the live views show it. Each site is
// a topic prefix (`dewmargin`, or `bldg-a/dewmargin` on a broker that bridges several
// buildings). Fed with (topic, payload) pairs in arrival order; an empty payload clears a
// retained topic and removes its subject. Pure.
#include <array>
#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/live_state.h"

namespace dewmargin::live {

enum class topic_kind { zone, loop, dehumidifier, status, events, other };

struct zone_entry {
  std::size_t site = 0;  // index into live_book::sites()
  zone_view view;
  std::string payload;  // as published
};

struct loop_entry {
  std::size_t site = 0;
  loop_view view;
  std::string payload;
};

struct dehumidifier_entry {
  std::size_t site = 0;
  dehumidifier_view view;
  std::string payload;
};

struct site_entry {
  std::string prefix;
  std::optional<status_view> status;
};

using band_counts = std::array<int, k_band_count>;  // indexed by band_severity

struct ingest_outcome {
  topic_kind kind = topic_kind::other;
  std::size_t site = 0;
  bool changed = false;                // the book differs afterwards
  std::string error;                   // a payload that is not what its topic promises
  std::optional<event_summary> event;  // for topic_kind::events
};

class live_book {
 public:
  // Prefixes without wildcards or a trailing '/'; a topic matches the longest prefix.
  explicit live_book(std::vector<std::string> prefixes);

  // The MQTT topic filters that bring every state (and, with events, <p>/events).
  [[nodiscard]] std::vector<std::string> subscriptions(bool with_events) const;

  ingest_outcome ingest(std::string_view topic, std::string_view payload);

  [[nodiscard]] const std::vector<site_entry>& sites() const { return sites_; }
  // Zones grouped by site (in prefix order), worst first within a site: band severity,
  // then margin (lowest first, unknown margin last), then zone id.
  [[nodiscard]] std::vector<const zone_entry*> zones_worst_first() const;
  [[nodiscard]] std::vector<const loop_entry*> loops() const;
  [[nodiscard]] std::vector<const dehumidifier_entry*> dehumidifiers() const;
  [[nodiscard]] band_counts counts(std::optional<std::size_t> site = std::nullopt) const;
  [[nodiscard]] std::size_t zone_count() const { return zones_.size(); }

  // Finds a zone by id, or by "PREFIX/ID" when several sites have the zone. The error
  // says what is wrong (no such zone, or which sites share the id).
  [[nodiscard]] result<const zone_entry*> find_zone(std::string_view name) const;

  // The newest state time seen for a site (event time follows the service's clock).
  [[nodiscard]] std::optional<timestamp> newest_ts(std::size_t site) const;

 private:
  struct match {
    std::size_t site;
    topic_kind kind;
    std::string id;
  };
  [[nodiscard]] std::optional<match> classify(std::string_view topic) const;

  std::vector<site_entry> sites_;
  std::map<std::pair<std::size_t, std::string>, zone_entry> zones_;
  std::map<std::pair<std::size_t, std::string>, loop_entry> loops_;
  std::map<std::pair<std::size_t, std::string>, dehumidifier_entry> dehumidifiers_;
  std::vector<std::optional<timestamp>> newest_ts_;
};

// Lower is worse: for sorting zones worst first.
bool worse_first(const zone_view& a, const zone_view& b);

}  // namespace dewmargin::live
