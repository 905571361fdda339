// The latest state per subject and site, ordered for the live views.
#include "dewmargin/live_book.h"

#include <algorithm>
#include <tuple>

namespace dewmargin::live {
namespace {

bool starts_with(std::string_view s, std::string_view prefix) { return s.substr(0, prefix.size()) == prefix; }

// "zone/<id>/state" → id; empty when the rest is not of that shape.
std::string id_between(std::string_view rest, std::string_view head, std::string_view tail) {
  if (!starts_with(rest, head) || rest.size() <= head.size() + tail.size()) return {};
  if (rest.substr(rest.size() - tail.size()) != tail) return {};
  const std::string_view id = rest.substr(head.size(), rest.size() - head.size() - tail.size());
  if (id.find('/') != std::string_view::npos) return {};
  return std::string(id);
}

template <typename Entry, typename View>
bool store(std::map<std::pair<std::size_t, std::string>, Entry>& into, std::pair<std::size_t, std::string> key,
           View view, std::string_view payload) {
  auto it = into.find(key);
  if (it != into.end() && it->second.payload == payload) return false;
  Entry e;
  e.site = key.first;
  e.view = std::move(view);
  e.payload = std::string(payload);
  into[std::move(key)] = std::move(e);
  return true;
}

}  // namespace

bool worse_first(const zone_view& a, const zone_view& b) {
  const int sa = band_severity(a.band);
  const int sb = band_severity(b.band);
  if (sa != sb) return sa > sb;
  if (a.margin_k.has_value() != b.margin_k.has_value()) return a.margin_k.has_value();
  if (a.margin_k && *a.margin_k != *b.margin_k) return *a.margin_k < *b.margin_k;
  return a.zone < b.zone;
}

live_book::live_book(std::vector<std::string> prefixes) {
  for (auto& p : prefixes) sites_.push_back(site_entry{std::move(p), std::nullopt});
  newest_ts_.resize(sites_.size());
}

std::vector<std::string> live_book::subscriptions(bool with_events) const {
  std::vector<std::string> out;
  for (const auto& s : sites_) {
    out.push_back(s.prefix + "/status");
    out.push_back(s.prefix + "/zone/+/state");
    out.push_back(s.prefix + "/loop/+/state");
    out.push_back(s.prefix + "/dehumidifier/+/state");
    if (with_events) out.push_back(s.prefix + "/events");
  }
  return out;
}

std::optional<live_book::match> live_book::classify(std::string_view topic) const {
  std::optional<std::size_t> best;
  for (std::size_t i = 0; i < sites_.size(); ++i) {
    const std::string& p = sites_[i].prefix;
    if (topic.size() > p.size() && starts_with(topic, p) && topic[p.size()] == '/' &&
        (!best || p.size() > sites_[*best].prefix.size())) {
      best = i;
    }
  }
  if (!best) return std::nullopt;
  const std::string_view rest = topic.substr(sites_[*best].prefix.size() + 1);
  if (rest == "status") return match{*best, topic_kind::status, {}};
  if (rest == "events") return match{*best, topic_kind::events, {}};
  if (auto id = id_between(rest, "zone/", "/state"); !id.empty()) return match{*best, topic_kind::zone, id};
  if (auto id = id_between(rest, "loop/", "/state"); !id.empty()) return match{*best, topic_kind::loop, id};
  if (auto id = id_between(rest, "dehumidifier/", "/state"); !id.empty()) {
    return match{*best, topic_kind::dehumidifier, id};
  }
  return match{*best, topic_kind::other, {}};
}

ingest_outcome live_book::ingest(std::string_view topic, std::string_view payload) {
  ingest_outcome out;
  const auto m = classify(topic);
  if (!m) return out;
  out.kind = m->kind;
  out.site = m->site;
  auto key = std::make_pair(m->site, m->id);
  const auto note_ts = [&](const std::optional<timestamp>& ts) {
    auto& newest = newest_ts_[m->site];
    if (ts && (!newest || *ts > *newest)) newest = *ts;
  };
  const auto located = [&](const error& e) { return std::string(topic) + ": " + e.message; };
  switch (m->kind) {
    case topic_kind::zone: {
      if (payload.empty()) {
        out.changed = zones_.erase(key) > 0;
        return out;
      }
      auto v = parse_zone_state(payload);
      if (!v) {
        out.error = located(v.err());
        return out;
      }
      if (v.value().zone != m->id) {
        out.error = std::string(topic) + ": zone state names zone '" + v.value().zone + "'";
        return out;
      }
      note_ts(v.value().ts);
      out.changed = store(zones_, std::move(key), std::move(v).value(), payload);
      return out;
    }
    case topic_kind::loop: {
      if (payload.empty()) {
        out.changed = loops_.erase(key) > 0;
        return out;
      }
      auto v = parse_loop_state(payload);
      if (!v) {
        out.error = located(v.err());
        return out;
      }
      note_ts(v.value().ts);
      out.changed = store(loops_, std::move(key), std::move(v).value(), payload);
      return out;
    }
    case topic_kind::dehumidifier: {
      if (payload.empty()) {
        out.changed = dehumidifiers_.erase(key) > 0;
        return out;
      }
      auto v = parse_dehumidifier_state(payload);
      if (!v) {
        out.error = located(v.err());
        return out;
      }
      note_ts(v.value().ts);
      out.changed = store(dehumidifiers_, std::move(key), std::move(v).value(), payload);
      return out;
    }
    case topic_kind::status: {
      auto& status = sites_[m->site].status;
      if (payload.empty()) {
        out.changed = status.has_value();
        status.reset();
        return out;
      }
      auto v = parse_status(payload);
      if (!v) {
        out.error = located(v.err());
        return out;
      }
      status = std::move(v).value();
      out.changed = true;
      return out;
    }
    case topic_kind::events:
      out.event = summarize_event(payload);
      return out;
    case topic_kind::other:
      return out;
  }
  return out;
}

std::vector<const zone_entry*> live_book::zones_worst_first() const {
  std::vector<const zone_entry*> out;
  out.reserve(zones_.size());
  for (const auto& [key, e] : zones_) out.push_back(&e);
  std::sort(out.begin(), out.end(), [](const zone_entry* a, const zone_entry* b) {
    if (a->site != b->site) return a->site < b->site;
    return worse_first(a->view, b->view);
  });
  return out;
}

std::vector<const loop_entry*> live_book::loops() const {
  std::vector<const loop_entry*> out;
  for (const auto& [key, e] : loops_) out.push_back(&e);
  return out;
}

std::vector<const dehumidifier_entry*> live_book::dehumidifiers() const {
  std::vector<const dehumidifier_entry*> out;
  for (const auto& [key, e] : dehumidifiers_) out.push_back(&e);
  return out;
}

band_counts live_book::counts(std::optional<std::size_t> site) const {
  band_counts c{};
  for (const auto& [key, e] : zones_) {
    if (!site || e.site == *site) ++c[static_cast<std::size_t>(band_severity(e.view.band))];
  }
  return c;
}

result<const zone_entry*> live_book::find_zone(std::string_view name) const {
  std::vector<const zone_entry*> found;
  for (const auto& [key, e] : zones_) {
    const std::string qualified = sites_[e.site].prefix + "/" + e.view.zone;
    if (e.view.zone == name || qualified == name) found.push_back(&e);
  }
  if (found.size() == 1) return found.front();
  if (found.empty()) return make_error(error_code::invalid_argument, "no zone '" + std::string(name) + "'");
  std::string sites;
  for (const auto* e : found) sites += (sites.empty() ? "" : ", ") + sites_[e->site].prefix + "/" + e->view.zone;
  return make_error(error_code::invalid_argument,
                    "zone '" + std::string(name) + "' is in several sites; name one of " + sites);
}

std::optional<timestamp> live_book::newest_ts(std::size_t site) const {
  if (site >= newest_ts_.size()) return std::nullopt;
  return newest_ts_[site];
}

}  // namespace dewmargin::live
