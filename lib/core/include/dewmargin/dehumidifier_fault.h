#pragma once
// Rule: a dehumidifier (a dedicated outdoor-air unit) is in fault while its `fault` switch is
// active, or once its measured supply-air dew point has stayed more than fault_k above what
// it was asked for during fault_after_s (the coil cannot deliver). Its fault raises one alarm
// of its own and suppresses by design (ANSI/ISA-18.2) the `tight` and `alarm` annunciation of
// its zones: one root-cause alarm instead of a flood. `condensing` and `unknown` always
// annunciate. The fault clears as soon as neither condition holds.
#include <optional>
#include <string>

#include "dewmargin/timestamp.h"

namespace dewmargin {

struct unit_fault_inputs {
  bool switch_active = false;
  std::optional<double> supply_dew_point_c{};  // measured, fresh
  std::optional<double> request_c{};           // what the unit was last asked for
};

class dehumidifier_fault {
 public:
  dehumidifier_fault(double fault_k, double fault_after_s) : fault_k_(fault_k), fault_after_s_(fault_after_s) {}

  // Judges the unit at `now`; true when the fault condition or its reason changed.
  bool update(const unit_fault_inputs& in, timestamp now);

  [[nodiscard]] bool fault() const { return !reason_.empty(); }
  [[nodiscard]] const std::string& reason() const { return reason_; }  // empty: no fault
  void carry_over(const dehumidifier_fault& previous) {
    high_since_ = previous.high_since_;
    reason_ = previous.reason_;
  }

 private:
  double fault_k_;
  double fault_after_s_;
  std::optional<timestamp> high_since_;  // measured dew point above request + fault_k since
  std::string reason_;
};

}  // namespace dewmargin
