#include <algorithm>
#include <cctype>
#include <future>
#include <set>
#include <unordered_map>

#include "dewmargin/report/report_data.h"

namespace dewmargin::report {
namespace {

const std::vector<std::string> k_report_kinds = {"band",  "ack",      "shelve", "unshelve",
                                                 "valve", "setpoint", "input",  "service"};

// "l2 dew point 15.20 °C + 2.00 K, held at max" → "l2 dew point # °C + # K, held at max".
std::string reason_pattern(const std::string& reason) {
  std::string out;
  bool in_number = false;
  for (std::size_t i = 0; i < reason.size(); ++i) {
    const char c = reason[i];
    const bool digit = std::isdigit(static_cast<unsigned char>(c)) != 0;
    // A number starts after a space or at the start ("15.32", "-0.5"); digits inside a word
    // (a zone id such as "l2-north") stay.
    const bool starts_number =
        (i == 0 || reason[i - 1] == ' ' || reason[i - 1] == '(') &&
        (digit || (c == '-' && i + 1 < reason.size() && std::isdigit(static_cast<unsigned char>(reason[i + 1])) != 0));
    const bool part_of_number =
        starts_number || (in_number && (digit || (c == '.' && i + 1 < reason.size() &&
                                                  std::isdigit(static_cast<unsigned char>(reason[i + 1])) != 0)));
    if (part_of_number) {
      if (!in_number) out += '#';
      in_number = true;
    } else {
      in_number = false;
      out += c;
    }
  }
  return out;
}

std::int64_t floor_hour_ms(std::int64_t ms) {
  constexpr std::int64_t k_hour_ms = 3'600'000;
  return ms - (((ms % k_hour_ms) + k_hour_ms) % k_hour_ms);
}

struct sample_pass {
  std::vector<zone_series> series;  // in the order first seen
  std::size_t rows = 0;
  std::optional<store_error> error;
};

// One pass over samples and roll-ups, ordered by time then zone: the zones of one minute come
// in the same order every minute, so a cursor finds most of them without a lookup.
sample_pass read_samples(const std::filesystem::path& path, const sample_filter& filter, const series_layout& layout,
                         const std::set<std::string>& wanted) {
  sample_pass out;
  auto reader = history_reader::open(path);
  if (!reader.ok()) {
    out.error = reader.err();
    return out;
  }
  std::unordered_map<std::string, std::size_t> index_of;
  std::size_t cursor = 0;
  auto rows = reader.value().for_each_period(filter, [&](const zone_period& p) {
    std::size_t index;
    if (cursor < out.series.size() && out.series[cursor].zone() == p.zone) {
      index = cursor;
    } else {
      const auto it = index_of.find(p.zone);
      if (it != index_of.end()) {
        index = it->second;
      } else {
        if (!wanted.empty() && wanted.count(p.zone) == 0) return;
        index = out.series.size();
        out.series.emplace_back(p.zone, layout);
        index_of.emplace(p.zone, index);
      }
    }
    out.series[index].add(p);
    cursor = index + 1;
  });
  if (!rows.ok()) {
    out.error = rows.err();
  } else {
    out.rows = rows.value();
  }
  return out;
}

class loop_builder {
 public:
  loop_builder(std::string id, timestamp since, timestamp until) : since_(since), until_(until) {
    r_.loop = std::move(id);
  }
  void start_from(const event_facts& last) {
    if (!last.to_value) return;
    r_.setpoint_at_start_c = last.to_value;
    current_limited_ = last.limited;
    current_reason_ = reason_pattern(last.reason);
  }
  void add(const event_facts& e) {
    if (!e.to_value) return;
    advance(e.ts);
    r_.steps.push_back({e.ts, *e.to_value, e.limited, e.reason});
    current_limited_ = e.limited;
    current_reason_ = reason_pattern(e.reason);
  }
  loop_review finish() {
    advance(until_);
    for (const auto& [reason, s] : reasons_) r_.reasons_s.emplace_back(reason, s);
    std::sort(r_.reasons_s.begin(), r_.reasons_s.end(),
              [](const auto& a, const auto& b) { return a.second > b.second; });
    return std::move(r_);
  }
  loop_review& review() { return r_; }

 private:
  void advance(timestamp t) {
    t = std::clamp(t, since_, until_);
    if (t > cursor_ && !current_limited_.empty()) {
      const double dt = seconds_between(cursor_, t);
      r_.limited_s[current_limited_] += dt;
      reasons_[current_reason_] += dt;
    }
    cursor_ = std::max(cursor_, t);
  }
  loop_review r_;
  timestamp since_;
  timestamp until_;
  timestamp cursor_ = since_;
  std::string current_limited_;
  std::string current_reason_;
  std::map<std::string, double> reasons_;
};

}  // namespace

store_result<report_data> build_report(const history_reader& reader, const report_options& o) {
  report_data d;
  d.generated_at = o.generated_at;
  d.db_label = o.db_label;
  d.config_label = o.config_label;
  d.schema_version = reader.schema_version();
  d.has_settings = o.settings.has_value();
  if (o.settings) {
    d.site = o.settings->site;
    d.setpoints = o.settings->setpoints;
  }

  // The period: as asked, else what the file holds.
  auto span = reader.stored_span();
  if (!span.ok()) return span.err();
  const timestamp fallback = o.since.value_or(o.until.value_or(o.generated_at));
  d.since = o.since ? *o.since : (span.value() ? span.value()->first : fallback);
  d.until = o.until ? *o.until : (span.value() ? span.value()->last : d.since + std::chrono::hours{24});
  if (d.until <= d.since) d.until = d.since + std::chrono::minutes{1};
  d.layout = layout_for(d.since, d.until, o.chart_buckets);

  const std::set<std::string> wanted(o.zones.begin(), o.zones.end());
  const auto zone_wanted = [&](const std::string& z) { return wanted.empty() || wanted.count(z) > 0; };

  // Samples and roll-ups: read on their own connections and threads while this thread reads
  // the events; the period is cut at an hour into two halves read side by side (two cores).
  const timestamp mid = from_unix_ms(floor_hour_ms(to_unix_ms(d.since + (d.until - d.since) / 2)));
  std::vector<std::pair<timestamp, timestamp>> halves;
  if (mid > d.since && mid < d.until) {
    halves = {{d.since, mid}, {mid, d.until}};
  } else {
    halves = {{d.since, d.until}};
  }
  std::vector<std::future<sample_pass>> sample_tasks;
  for (const auto& [from, to] : halves) {
    sample_filter sf;
    sf.since = from;
    sf.until = to;
    if (wanted.size() == 1) sf.zone = *wanted.begin();
    // Buckets of whole hours (periods over about 10 days) are drawn from the hourly summaries:
    // 60 times fewer rows, the same minimum, band minutes and mould runs.
    sf.whole_hours = d.layout.whole_hours();
    sample_tasks.push_back(std::async(std::launch::async, [path = reader.path(), sf, layout = d.layout, wanted] {
      return read_samples(path, sf, layout, wanted);
    }));
  }

  // Events: one pass in time order. Site service events are kept (there are few) so that a
  // zone first seen later still gets the stops and starts before it.
  std::map<std::string, zone_review_builder> zone_builders;
  std::map<std::string, loop_builder> loop_builders;
  std::vector<event_facts> service_events;
  std::optional<event_facts> last_service_before;
  if (o.since) {
    event_filter f;
    f.until = d.since;
    f.kinds = {"service"};
    auto last = reader.last_event(f);
    if (!last.ok()) return last.err();
    if (last.value()) last_service_before = facts_of(*last.value());
  }
  std::optional<store_error> nested_error;
  const auto start_state = [&](const std::string& subject, const char* kind) -> std::optional<event_facts> {
    if (!o.since) return std::nullopt;
    event_filter f;
    f.subject_id = subject;
    f.until = d.since;
    f.kinds = {kind};
    auto last = reader.last_event(f);
    if (!last.ok()) {
      nested_error = last.err();
      return std::nullopt;
    }
    if (!last.value()) return std::nullopt;
    return facts_of(*last.value());
  };
  const auto zone_builder = [&](const std::string& zone) -> zone_review_builder& {
    auto it = zone_builders.find(zone);
    if (it != zone_builders.end()) return it->second;
    it = zone_builders.emplace(zone, zone_review_builder(zone, d.since, d.until)).first;
    auto band_before = start_state(zone, "band");
    if (last_service_before && (!band_before || last_service_before->ts > band_before->ts)) {
      band_before = last_service_before;
    }
    if (band_before) it->second.start_from(*band_before);
    return it->second;
  };
  event_filter ef;
  ef.since = d.since;
  ef.until = d.until;
  ef.kinds = k_report_kinds;
  auto read = reader.for_each_event(ef, [&](const stored_event& stored) {
    event_facts e = facts_of(stored);
    if (d.site.empty() && !e.site.empty()) d.site = e.site;
    if (e.subject == subject_type::site) {
      if (e.kind != "service") return;
      for (auto& [zone, b] : zone_builders) b.add(e);
      service_events.push_back(std::move(e));
      return;
    }
    if (e.subject == subject_type::zone && zone_wanted(e.subject_id)) {
      const bool fresh = zone_builders.count(e.subject_id) == 0;
      auto& b = zone_builder(e.subject_id);
      if (fresh) {
        for (const auto& s : service_events) b.add(s);
      }
      b.add(e);
    } else if (e.subject == subject_type::loop && e.kind == "setpoint") {
      auto it = loop_builders.find(e.subject_id);
      if (it == loop_builders.end()) {
        it = loop_builders.emplace(e.subject_id, loop_builder(e.subject_id, d.since, d.until)).first;
        if (auto before = start_state(e.subject_id, "setpoint")) it->second.start_from(*before);
      }
      it->second.add(e);
    }
  });
  if (!read.ok()) return read.err();
  if (nested_error) return *nested_error;
  d.events_read = read.value();

  // The sample passes (started before the event pass, running beside it) end here.
  std::vector<zone_series> series;
  std::unordered_map<std::string, std::size_t> series_index;
  for (auto& task : sample_tasks) {
    sample_pass part = task.get();
    if (part.error) return *part.error;
    d.periods_read += part.rows;
    for (auto& zs : part.series) {
      const auto it = series_index.find(zs.zone());
      if (it == series_index.end()) {
        series_index.emplace(zs.zone(), series.size());
        series.push_back(std::move(zs));
      } else {
        series[it->second].absorb(zs);
      }
    }
  }
  for (auto& zs : series) zs.finish();

  // Zones: every zone with events or samples.
  std::set<std::string> zone_ids;
  for (const auto& [zone, b] : zone_builders) zone_ids.insert(zone);
  for (const auto& s : series) zone_ids.insert(s.total().zone);
  for (const auto& zone : zone_ids) {
    // A zone with samples but no events still goes through the service's stops and starts.
    const bool fresh = zone_builders.count(zone) == 0;
    auto& b = zone_builder(zone);
    if (nested_error) return *nested_error;
    if (fresh) {
      for (const auto& s : service_events) b.add(s);
    }
  }
  std::vector<zone_review> reviews;
  for (auto& [zone, b] : zone_builders) reviews.push_back(b.finish());
  for (auto& r : reviews) {
    const std::string zone = r.zone;
    const auto it = series_index.find(zone);
    zone_report z{std::move(r), it != series_index.end() ? std::move(series[it->second]) : zone_series(zone, d.layout),
                  std::nullopt};
    if (o.settings) {
      const auto t = o.settings->thresholds.find(z.review.zone);
      if (t != o.settings->thresholds.end()) z.thresholds = t->second;
    }
    d.zones.push_back(std::move(z));
  }
  // Worst first: the longest time condensing, then the lowest margin, then the id.
  std::stable_sort(d.zones.begin(), d.zones.end(), [](const zone_report& a, const zone_report& b) {
    const double ca = a.review.band_s[static_cast<std::size_t>(band_severity(band::condensing))];
    const double cb = b.review.band_s[static_cast<std::size_t>(band_severity(band::condensing))];
    if (ca != cb) return ca > cb;
    const double ma = a.series.total().min_margin_k.value_or(1e9);
    const double mb = b.series.total().min_margin_k.value_or(1e9);
    return ma < mb;
  });
  std::vector<zone_review> for_figures;
  for_figures.reserve(d.zones.size());
  for (const auto& z : d.zones) for_figures.push_back(z.review);
  d.alarms = compute_alarm_figures(for_figures, d.since, d.until);

  // Loops: setpoints from events; supply from the samples of their zones (needs the map).
  if (o.settings) {
    for (const auto& [loop, sp] : o.settings->setpoints) {
      (void)sp;
      if (loop_builders.count(loop) == 0) {
        auto it = loop_builders.emplace(loop, loop_builder(loop, d.since, d.until)).first;
        if (auto before = start_state(loop, "setpoint")) it->second.start_from(*before);
      }
    }
  }
  if (nested_error) return *nested_error;
  for (auto& [loop, b] : loop_builders) {
    loop_review l = b.finish();
    if (o.settings) {
      l.supply_c.assign(d.layout.count, minute_mean{});
      for (const auto& z : d.zones) {
        const auto it = o.settings->loop_of_zone.find(z.review.zone);
        if (it == o.settings->loop_of_zone.end() || it->second != loop) continue;
        for (std::size_t i = 0; i < d.layout.count; ++i) l.supply_c[i].add(z.series.buckets()[i].mean_supply_c);
      }
    }
    d.loops.push_back(std::move(l));
  }
  if (d.site.empty()) d.site = "(site not named: give --config)";
  return d;
}

}  // namespace dewmargin::report
