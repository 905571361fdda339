#pragma once
// Pacing of the simulated day against the wall clock, with back-pressure. The simulator
// plays `speed` simulated seconds per wall second while the broker and the service keep up;
// when it has to wait for either (a full in-flight window, a service lagging behind the
// readings) or the machine is too busy to keep the pace, the schedule is moved back instead
// of sprinting to catch up, so simulated time slows down and nothing floods. Pure: wall times
// are seconds since the start of play, handed in by the shell.
namespace dewmargin::sim {

struct pace_report {
  double asked_speed = 0.0;     // simulated s per wall s; 0: as fast as possible
  double achieved_speed = 0.0;  // over the whole play
  double sim_s = 0.0;           // simulated time played
  double wall_s = 0.0;          // wall time it took
  double slowed_s = 0.0;        // how far the schedule was moved back, in all
  double broker_wait_s = 0.0;   // of which waiting for the broker to take messages
  double service_wait_s = 0.0;  // of which waiting for the service to catch up
  int broker_stalls = 0;
  int service_stalls = 0;
  double worst_service_lag_s = 0.0;  // simulated seconds the service's clock trailed the readings
};

class pacer {
 public:
  // Lateness tolerated before the schedule moves back (wall seconds).
  static constexpr double k_max_behind_s = 0.1;

  pacer(double speed, double sim_start_s) : speed_(speed), sim_start_s_(sim_start_s) {}

  // Wall time at which the step reaching sim_s is due (0 when there is no pace).
  [[nodiscard]] double due_wall_s(double sim_s) const;
  // The loop is ready for the step reaching sim_s at wall_s: more than k_max_behind_s late
  // moves the schedule back to now.
  void arrived(double sim_s, double wall_s);

  void waited_for_broker(double wall_s);
  void waited_for_service(double wall_s);
  void service_lag(double sim_lag_s);

  [[nodiscard]] pace_report report(double sim_now_s, double wall_s) const;

 private:
  double speed_;
  double sim_start_s_;
  double shift_s_ = 0.0;
  pace_report totals_;
};

}  // namespace dewmargin::sim
