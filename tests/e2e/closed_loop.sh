#!/usr/bin/env bash
# The service matters, end to end: a scenario is played twice on the same seed by
# `dewmargin-sim --compare`:
#   1. baseline: the simulator alone, the plant on its design settings;
#   2. closed loop: dewmargin-sim <-> a private mosquitto <-> the real dewmargind (event time).
# The simulator's ground truth (minutes a chilled surface was colder than its room's dew point)
# must be substantial without the service and near zero with it; the service must have raised an
# alarm, taken an acknowledgement, closed a valve and raised a setpoint, and must stop cleanly
# with its history written. A change that weakens the protection fails here.
#
# Usage: closed_loop.sh DEWMARGIND DEWMARGIN_SIM CONFIG SCENARIO SPEED MAX_WET_ZONE_MIN MIN_BASELINE_ZONE_MIN
# (the tests are registered in tests/e2e/CMakeLists.txt; DEWMARGIN_E2E_SPEED overrides SPEED)
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
# shellcheck source=scripts/lib/test-broker.sh
source "$here/../../scripts/lib/test-broker.sh"
daemon=$1
sim=$2
config=$3
scenario=$4
speed=${DEWMARGIN_E2E_SPEED:-$5}
max_wet=$6
min_baseline=$7
expect_alarms=${8:-1} # 0: the service is expected to prevent every alarm of this day

fail() {
  echo "FAIL: $*" >&2
  exit 1
}

work=$(mktemp -d /tmp/dewmargin-e2e-XXXXXX)
daemon_pid=
# Stops what this script started, by PID, the service before its broker.
cleanup() {
  if [[ -n $daemon_pid ]]; then
    kill "$daemon_pid" 2>/dev/null || true
    wait "$daemon_pid" 2>/dev/null || true
  fi
  test_broker_stop
  rm -rf "$work"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

show_logs() {
  for f in "$work"/*.log; do
    echo "---- $f (last 30 lines)" >&2
    tail -n 30 "$f" >&2 || true
  done
}

# 1. The broker and the service on a copy of the config: this broker, a history in the temp dir.
test_broker_start "$work" "$work/mosquitto.log" || {
  show_logs
  fail "mosquitto did not start"
}
test_broker_point_config "$config" "$work/site.yaml" "$work/history.db" || fail "cannot adapt $config"
"$daemon" --config "$work/site.yaml" >"$work/dewmargind.log" 2>&1 &
daemon_pid=$!

# 2. Baseline and closed loop.
start=$(date +%s)
sim_rc=0
"$sim" --config "$work/site.yaml" --scenario "$scenario" --compare --max-wet-zone-min "$max_wet" --speed "$speed" \
  --status-every-min 30 --json "$work/compare.json" --wait-service-s 30 >"$work/sim.log" 2>&1 || sim_rc=$?
wall=$(($(date +%s) - start))
cat "$work/sim.log"
if [[ ! -s $work/compare.json ]]; then
  show_logs
  fail "the simulator stopped with exit code $sim_rc and no result"
fi

# 3. The service stops cleanly and kept its history.
kill -TERM "$daemon_pid"
daemon_rc=0
wait "$daemon_pid" || daemon_rc=$?
daemon_pid=
[[ $daemon_rc -eq 0 ]] || {
  show_logs
  fail "dewmargind exited with $daemon_rc after SIGTERM"
}
[[ -s "$work/history.db" ]] || fail "no history database at $work/history.db"

# 4. The verdict.
python3 - "$work/compare.json" "$wall" "$min_baseline" "$sim_rc" "$expect_alarms" <<'PY'
import json, sys
c = json.load(open(sys.argv[1]))
wall, min_baseline, sim_rc = sys.argv[2], float(sys.argv[3]), int(sys.argv[4])
expect_alarms = sys.argv[5] == "1"
b = c["baseline"]["condensation_zone_min"]
s = c["service"]["condensation_zone_min"]
svc, cmd, pace = c["service"]["service"], c["service"]["commands"], c["service"]["pace"]
print(f"condensation: baseline {b:.1f} zone-min, with dewmargind {s:.1f} zone-min; wall {wall} s")
print(f"service: alarms {svc['alarms_raised']}, acknowledged {svc['acknowledged']}, "
      f"valves closed {svc['valves_closed']}, setpoint events {svc['setpoint_events']}, "
      f"dehumidifier request moves {svc['dehumidify_events']}")
print(f"pace: asked {pace['asked_speed']:g}x, achieved {pace['achieved_speed']:.0f}x, slowed {pace['slowed_s']:.1f} s "
      f"(broker {pace['broker_wait_s']:.1f} s, service {pace['service_wait_s']:.1f} s), "
      f"service lag at most {pace['worst_service_lag_s']:.0f} simulated s")
problems = []
if sim_rc != 0: problems.append(f"dewmargin-sim --compare exited with {sim_rc} (verdict {c['verdict']})")
if c["verdict"] != "pass": problems.append(f"verdict {c['verdict']}: {s} zone-min > {c['max_wet_zone_min']}")
if b < min_baseline:
    problems.append(f"baseline condensation {b} zone-min < {min_baseline}: the scenario no longer challenges the service")
if s > 0.05 * b: problems.append(f"supervised condensation {s} zone-min > 5 % of the baseline {b}")
if expect_alarms and svc["alarms_raised"] < 1: problems.append("the service raised no alarm")
if svc["valves_closed"] < 1: problems.append("the service closed no valve")
if expect_alarms and svc["acknowledged"] < 1: problems.append("no acknowledgement reached the service")
if not any(r["max_c"] > r["min_c"] for r in cmd["dew_point_request_c"].values()):
    problems.append("no dehumidifier request moved")
if cmd["bad_commands"] != 0: problems.append(f"{cmd['bad_commands']} plant commands the simulator could not read")
if not any(r["max_c"] > r["min_c"] for r in cmd["setpoint_c"].values()): problems.append("no supply setpoint moved")
for p in problems: print("FAIL:", p, file=sys.stderr)
sys.exit(1 if problems else 0)
PY
