#include "dewmargin/report/zone_review.h"

#include <algorithm>

namespace dewmargin::report {
namespace {

bool alarm_or_worse(std::optional<band> b) { return b && (*b == band::alarm || *b == band::condensing); }
bool fine(std::optional<band> b) { return b && (*b == band::safe || *b == band::tight); }

}  // namespace

std::optional<double> zone_review::median_ack_s() const {
  if (ack_delays_s.empty()) return std::nullopt;
  std::vector<double> v = ack_delays_s;
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 == 1 ? v[n / 2] : (v[n / 2 - 1] + v[n / 2]) / 2.0;
}

std::optional<double> zone_review::longest_ack_s() const {
  if (ack_delays_s.empty()) return std::nullopt;
  return *std::max_element(ack_delays_s.begin(), ack_delays_s.end());
}

const condensing_episode* zone_review::longest_condensing() const {
  const condensing_episode* best = nullptr;
  for (const auto& c : condensing) {
    if (best == nullptr || c.duration_s > best->duration_s) best = &c;
  }
  return best;
}

zone_review_builder::zone_review_builder(std::string zone, timestamp since, timestamp until)
    : since_(since), until_(until), cursor_(since) {
  r_.zone = std::move(zone);
}

void zone_review_builder::start_from(const event_facts& last) {
  if (last.kind == "service") {
    band_ = last.to == "stopped" ? std::nullopt : std::optional<band>(band::unknown);
    return;
  }
  band_ = band_from_name(last.to).value_or(band::unknown);
  if (alarm_or_worse(band_)) alarm_since_ = since_;  // the alarm came before the period: at least this long
  alarm_active_ = last.alarm_active.value_or(false);
  alarm_unacked_ = alarm_active_ && !last.alarm_acknowledged.value_or(true);
  if (alarm_active_) active_since_ = since_;
  if (band_ == band::condensing) r_.condensing.push_back({since_, 0.0, true, 0.0});
}

void zone_review_builder::advance(timestamp t) {
  t = std::clamp(t, since_, until_);
  if (t <= cursor_) return;
  const double dt = seconds_between(cursor_, t);
  if (!r_.spans.empty() && r_.spans.back().b == band_ && r_.spans.back().to == cursor_) {
    r_.spans.back().to = t;
  } else {
    r_.spans.push_back({cursor_, t, band_});
  }
  if (band_) {
    r_.band_s[static_cast<std::size_t>(band_severity(*band_))] += dt;
  } else {
    r_.no_data_s += dt;
  }
  if (!bad_inputs_.empty()) r_.stale_input_s += dt;
  cursor_ = t;
}

void zone_review_builder::set_band(std::optional<band> b, timestamp t) {
  const bool was_condensing = band_ == band::condensing;
  const bool is_condensing = b == band::condensing;
  if (was_condensing && !is_condensing && !r_.condensing.empty()) {
    auto& c = r_.condensing.back();
    c.duration_s = seconds_between(c.start, t);
  }
  if (alarm_or_worse(b) && !alarm_or_worse(band_)) {
    if (!alarm_since_ || fine(band_) || !band_) alarm_since_ = t;
  }
  if (fine(b)) alarm_since_.reset();
  if (is_condensing && !was_condensing) {
    const double warning = alarm_since_ ? seconds_between(*alarm_since_, t) : 0.0;
    r_.condensing.push_back({t, 0.0, true, warning});
  }
  band_ = b;
}

void zone_review_builder::update_alarm(const event_facts& e) {
  if (!e.alarm_active) return;
  const bool active = *e.alarm_active;
  const bool unacked = !e.alarm_acknowledged.value_or(true);
  // A new activation, or a re-arm of an acknowledged alarm, is an alarm raised (ISA-18.2 counts
  // activations for alarm rates). The time to acknowledge runs from the first raise not yet acked.
  if (active && unacked && (!alarm_active_ || !alarm_unacked_)) {
    r_.raises.push_back(e.ts);
    if (!raised_at_) raised_at_ = e.ts;
  }
  if (active && !alarm_active_) active_since_ = e.ts;
  if (!active && alarm_active_ && active_since_) {
    r_.alarm_active_s.push_back(seconds_between(*active_since_, e.ts));
    active_since_.reset();
  }
  alarm_active_ = active;
  alarm_unacked_ = unacked;
}

void zone_review_builder::add(const event_facts& e) {
  if (e.suppressed) ++r_.suppressed;
  advance(e.ts);
  const timestamp t = std::clamp(e.ts, since_, until_);
  if (e.kind == "service") {
    if (e.to == "stopped") {
      const bool was_condensing = band_ == band::condensing;
      set_band(std::nullopt, t);
      if (was_condensing) r_.condensing.back().ended = false;  // cut by the stop: its end is not known
      bad_inputs_.clear();
    } else if (e.from == "stopped") {
      set_band(band::unknown, t);
    }
    return;
  }
  if (e.kind == "band") {
    set_band(band_from_name(e.to).value_or(band::unknown), t);
    update_alarm(e);
  } else if (e.kind == "ack") {
    if (raised_at_) {
      r_.ack_delays_s.push_back(seconds_between(*raised_at_, e.ts));
      raised_at_.reset();
    }
    update_alarm(e);
    alarm_unacked_ = false;
    r_.markers.push_back({marker_kind::ack, e.ts, e.ts});
  } else if (e.kind == "shelve") {
    ++r_.shelves;
    if (open_shelve_) r_.markers[*open_shelve_].end = e.ts;  // shelved again: a new end
    open_shelve_ = r_.markers.size();
    r_.markers.push_back({marker_kind::shelve, e.ts, std::min(e.until.value_or(until_), until_)});
    update_alarm(e);
  } else if (e.kind == "unshelve") {
    if (open_shelve_) r_.markers[*open_shelve_].end = e.ts;
    open_shelve_.reset();
    update_alarm(e);
  } else if (e.kind == "valve") {
    if (e.to == "closed") r_.markers.push_back({marker_kind::valve_closed, e.ts, e.ts});
    if (e.to == "open") r_.markers.push_back({marker_kind::valve_opened, e.ts, e.ts});
  } else if (e.kind == "input") {
    if (e.to == "stale" || e.to == "missing" || e.to == "bad") {
      bad_inputs_.insert(e.topic);
    } else {
      bad_inputs_.erase(e.topic);
    }
  }
}

zone_review zone_review_builder::finish() {
  advance(until_);
  if (band_ == band::condensing && !r_.condensing.empty()) {
    auto& c = r_.condensing.back();
    c.duration_s = seconds_between(c.start, until_);
    c.ended = false;
  }
  if (alarm_active_ && active_since_) r_.alarm_active_s.push_back(seconds_between(*active_since_, until_));
  if (raised_at_) ++r_.unacknowledged_at_end;
  return std::move(r_);
}

}  // namespace dewmargin::report
