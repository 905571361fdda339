#include "dewmargin/band.h"

namespace dewmargin {

const char* band_name(band b) {
  switch (b) {
    case band::safe: return "safe";
    case band::tight: return "tight";
    case band::alarm: return "alarm";
    case band::condensing: return "condensing";
    case band::unknown: return "unknown";
  }
  return "unknown";
}

band classify_margin(double margin_k, const band_thresholds& t) {
  if (margin_k <= 0.0) return band::condensing;
  if (margin_k < t.margin_alarm_k) return band::alarm;
  if (margin_k < t.margin_warn_k) return band::tight;
  return band::safe;
}

// The best band the margin has cleared by threshold + hysteresis.
band band_tracker::improved_band(double margin_k) const {
  const double h = thresholds_.hysteresis_k;
  if (margin_k >= thresholds_.margin_warn_k + h) return band::safe;
  if (margin_k >= thresholds_.margin_alarm_k + h) return band::tight;
  if (margin_k >= h) return band::alarm;
  return band::condensing;
}

band band_tracker::confirmed_band(timestamp now) const {
  const double confirm_s = thresholds_.confirm_s;
  if (below_alarm_since_ && seconds_between(*below_alarm_since_, now) >= confirm_s) return band::alarm;
  if (below_warn_since_ && seconds_between(*below_warn_since_, now) >= confirm_s) return band::tight;
  return band::safe;
}

band band_tracker::update(const band_inputs& in, timestamp now) {
  // Timers run whenever the margin is known, also while condensing, so that a zone
  // recovering from condensing into tight does not have to confirm tight again.
  if (in.margin_k) {
    const double m = *in.margin_k;
    if (m < thresholds_.margin_warn_k) {
      if (!below_warn_since_) below_warn_since_ = now;
    } else {
      below_warn_since_.reset();
    }
    if (m < thresholds_.margin_alarm_k) {
      if (!below_alarm_since_) below_alarm_since_ = now;
    } else {
      below_alarm_since_.reset();
    }
  } else {
    below_warn_since_.reset();
    below_alarm_since_.reset();
  }

  // A wet switch is a certainty: it wins over missing inputs and over a healthy margin.
  if (in.switch_active) {
    current_ = band::condensing;
    return current_;
  }
  if (!in.margin_k) {
    current_ = band::unknown;
    return current_;
  }
  const double m = *in.margin_k;
  const band raw = classify_margin(m, thresholds_);

  if (current_ == band::unknown) {
    // Nothing known to be better than: take the margin's band as it is.
    current_ = raw;
  } else if (band_severity(raw) > band_severity(current_)) {
    if (raw == band::condensing) {
      current_ = band::condensing;
    } else {
      const band confirmed = confirmed_band(now);
      if (band_severity(confirmed) > band_severity(current_)) current_ = confirmed;
    }
  } else if (band_severity(raw) < band_severity(current_)) {
    const band improved = improved_band(m);
    if (band_severity(improved) < band_severity(current_)) current_ = improved;
  }
  return current_;
}

}  // namespace dewmargin
