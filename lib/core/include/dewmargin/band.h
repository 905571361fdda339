#pragma once
// Zone bands and the state machine that moves a zone between them:
// `condensing` and `unknown` at once, `tight`/`alarm` only after holding for confirm_s,
// and back to a better band only once the margin clears the band's threshold + hysteresis.
#include <optional>

#include "dewmargin/config.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

// Worst last, as in design.md.
enum class band { safe, tight, alarm, condensing, unknown };

const char* band_name(band b);
constexpr int band_severity(band b) { return static_cast<int>(b); }
// Bands that make the zone's alarm active (ISA-18.2 "alarm condition").
constexpr bool is_alarm_band(band b) { return b == band::alarm || b == band::condensing || b == band::unknown; }

// Band by thresholds alone, no timers and no hysteresis.
band classify_margin(double margin_k, const band_thresholds& t);

struct band_inputs {
  std::optional<double> margin_k;  // empty when a needed input is missing or stale
  bool switch_active = false;      // condensation switch reports water
};

class band_tracker {
 public:
  explicit band_tracker(const band_thresholds& thresholds) : thresholds_(thresholds) {}

  // Evaluates at `now` and returns the (possibly new) band.
  band update(const band_inputs& in, timestamp now);
  [[nodiscard]] band current() const { return current_; }
  void force(band b) { current_ = b; }

 private:
  band improved_band(double margin_k) const;
  band confirmed_band(timestamp now) const;

  band_thresholds thresholds_;
  band current_ = band::unknown;
  std::optional<timestamp> below_warn_since_;   // margin continuously below margin_warn_k since
  std::optional<timestamp> below_alarm_since_;  // margin continuously below margin_alarm_k since
};

}  // namespace dewmargin
