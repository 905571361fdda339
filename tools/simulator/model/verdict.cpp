#include "model/verdict.h"

#include <algorithm>
#include <cstdio>
#include <sstream>

namespace dewmargin::sim {
namespace {

std::string time_or_dash(const std::optional<double>& t_s) { return t_s ? clock_text(*t_s) : "-"; }

std::string margin_at(double margin_k, double at_s) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%+6.2f K %s", margin_k, clock_text(at_s).c_str());
  return buf;
}

std::string warning_text(const zone_verdict& z) {
  if (!z.first_wet_s) return "dry";
  if (!z.warning_min) return "none";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f min", *z.warning_min);
  return buf;
}

std::size_t zone_width(const std::vector<zone_verdict>& zones) {
  std::size_t w = 5;
  for (const auto& z : zones) w = std::max(w, z.zone.size());
  return w;
}

}  // namespace

run_verdict verdict_of(const simulation& sim) {
  run_verdict v;
  v.with_service = sim.options().with_service;
  v.wet_zone_min = sim.truth().total_condensing_min();
  const auto& watched = sim.watch().zones();
  for (const zone_truth& t : sim.truth().zones()) {
    zone_verdict z;
    z.zone = t.zone;
    z.wet_min = t.condensing_s / 60.0;
    z.lowest_margin_k = t.min_margin_k;
    z.lowest_margin_at_s = t.min_margin_at_s;
    z.first_wet_s = t.first_wet_s;
    if (v.with_service) {
      const auto w =
          std::find_if(watched.begin(), watched.end(), [&](const watched_zone& x) { return x.id == t.zone; });
      if (w != watched.end() && !w->alarm_onsets_s.empty()) {
        z.alarms = static_cast<int>(w->alarm_onsets_s.size());
        z.first_alarm_s = w->alarm_onsets_s.front();
        if (t.first_wet_s) {
          std::optional<double> last_before;
          for (double onset : w->alarm_onsets_s) {
            if (onset <= *t.first_wet_s) last_before = onset;
          }
          if (last_before) z.warning_min = (*t.first_wet_s - *last_before) / 60.0;
        }
      }
    }
    v.zones.push_back(std::move(z));
  }
  return v;
}

std::string verdict_table(const run_verdict& v) {
  const int w = static_cast<int>(zone_width(v.zones));
  std::ostringstream os;
  char line[256];
  os << "verdict per zone (" << (v.with_service ? "with the service" : "without the service")
     << "; wet: surface below the room's dew point, ground truth)\n";
  if (v.with_service) {
    std::snprintf(line, sizeof line, "  %-*s %8s  %-17s %-9s %6s %-11s %s\n", w, "zone", "wet min", "lowest margin",
                  "first wet", "alarms", "first alarm", "warning");
  } else {
    std::snprintf(line, sizeof line, "  %-*s %8s  %-17s %s\n", w, "zone", "wet min", "lowest margin", "first wet");
  }
  os << line;
  for (const auto& z : v.zones) {
    const std::string m = margin_at(z.lowest_margin_k, z.lowest_margin_at_s);
    if (v.with_service) {
      std::snprintf(line, sizeof line, "  %-*s %8.1f  %-17s %-9s %6d %-11s %s\n", w, z.zone.c_str(), z.wet_min,
                    m.c_str(), time_or_dash(z.first_wet_s).c_str(), z.alarms, time_or_dash(z.first_alarm_s).c_str(),
                    warning_text(z).c_str());
    } else {
      std::snprintf(line, sizeof line, "  %-*s %8.1f  %-17s %s\n", w, z.zone.c_str(), z.wet_min, m.c_str(),
                    time_or_dash(z.first_wet_s).c_str());
    }
    os << line;
  }
  std::snprintf(line, sizeof line, "  %-*s %8.1f zone-min\n", w, "total", v.wet_zone_min);
  os << line;
  return os.str();
}

std::string compare_table(const run_verdict& baseline, const run_verdict& supervised) {
  const int w = static_cast<int>(zone_width(supervised.zones));
  std::ostringstream os;
  char line[320];
  os << "verdict per zone: the same day without and with the service (wet: surface below the room's dew "
        "point, ground truth)\n";
  std::snprintf(line, sizeof line, "  %-*s | %-37s | %s\n", w, "", "without the service", "with the service");
  os << line;
  std::snprintf(line, sizeof line, "  %-*s | %8s  %-17s %-9s | %8s  %-17s %6s %-11s %s\n", w, "zone", "wet min",
                "lowest margin", "first wet", "wet min", "lowest margin", "alarms", "first alarm", "warning");
  os << line;
  for (std::size_t i = 0; i < supervised.zones.size() && i < baseline.zones.size(); ++i) {
    const zone_verdict& b = baseline.zones[i];
    const zone_verdict& s = supervised.zones[i];
    std::snprintf(line, sizeof line, "  %-*s | %8.1f  %-17s %-9s | %8.1f  %-17s %6d %-11s %s\n", w, s.zone.c_str(),
                  b.wet_min, margin_at(b.lowest_margin_k, b.lowest_margin_at_s).c_str(),
                  time_or_dash(b.first_wet_s).c_str(), s.wet_min,
                  margin_at(s.lowest_margin_k, s.lowest_margin_at_s).c_str(), s.alarms,
                  time_or_dash(s.first_alarm_s).c_str(), warning_text(s).c_str());
    os << line;
  }
  std::snprintf(line, sizeof line, "  %-*s | %8.1f  %-27s | %8.1f zone-min\n", w, "total", baseline.wet_zone_min, "",
                supervised.wet_zone_min);
  os << line;
  os << "  warning: minutes from the zone's last alarm to its first wet moment; \"dry\": never wet; \"none\": "
        "wet with no alarm before\n";
  return os.str();
}

compare_outcome judge(const run_verdict& baseline, const run_verdict& supervised, double max_wet_zone_min) {
  char line[256];
  const bool pass = supervised.wet_zone_min <= max_wet_zone_min;
  std::snprintf(line, sizeof line, "verdict: %s: %.1f wet zone-minutes with the service (bound %.1f), %.1f without",
                pass ? "pass" : "FAIL", supervised.wet_zone_min, max_wet_zone_min, baseline.wet_zone_min);
  return {pass, line};
}

}  // namespace dewmargin::sim
