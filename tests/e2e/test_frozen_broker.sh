#!/usr/bin/env bash
# The simulator waits for a broker that stops taking messages (label `stress`, not in the
# default run): the short morning as fast as the service keeps up (--speed 0), the broker frozen
# (SIGSTOP) for 8 s of wall time in the middle. The simulator must hold its clock instead of
# failing with "No more messages can be buffered", finish, report the waits, and the service
# must still keep the building near dry.
# Arguments: $1 dewmargind, $2 dewmargin-sim, $3 source directory.
set -euo pipefail
daemon=$1
sim=$2
src=$3
# shellcheck source=scripts/lib/test-broker.sh
source "$src/scripts/lib/test-broker.sh"
work=$(mktemp -d /tmp/dewmargin-frozen-XXXXXX)
daemon_pid=
sim_pid=
cleanup() {
  if [[ -n $test_broker_pid ]]; then kill -CONT "$test_broker_pid" 2>/dev/null || true; fi
  local pid
  for pid in "$sim_pid" "$daemon_pid"; do
    [[ -n $pid ]] || continue
    kill "$pid" 2>/dev/null || true
    wait "$pid" 2>/dev/null || true
  done
  test_broker_stop
  rm -rf "$work"
}
trap cleanup EXIT
trap 'exit 130' INT TERM
fail() {
  echo "FAIL: $*" >&2
  tail -n 20 "$work"/*.log >&2 || true
  exit 1
}

test_broker_start "$work" "$work/mosquitto.log" || fail "mosquitto did not start"
test_broker_point_config "$src/config/demo.yaml" "$work/demo.yaml" "$work/history.db" || fail "cannot adapt the config"
"$daemon" --config "$work/demo.yaml" >"$work/dewmargind.log" 2>&1 &
daemon_pid=$!
"$sim" --config "$work/demo.yaml" --scenario "$src/config/scenarios/short.yaml" --speed 0 --status-every-min 0 \
  --quiet --json "$work/run.json" --wait-service-s 30 >"$work/sim.log" 2>&1 &
sim_pid=$!
# The fault itself lasts a while: these sleeps are its duration, not a wait for something.
sleep 4
kill -STOP "$test_broker_pid"
echo "broker frozen"
sleep 8
kill -CONT "$test_broker_pid"
echo "broker thawed"
sim_rc=0
wait "$sim_pid" || sim_rc=$?
sim_pid=
cat "$work/sim.log"
((sim_rc == 0)) || fail "dewmargin-sim exited with $sim_rc"
python3 - "$work/run.json" <<'PY'
import json, sys
j = json.load(open(sys.argv[1]))
p = j["pace"]
print(f"wet {j['condensation_zone_min']} zone-min; waited {p['broker_wait_s']} s for the broker in "
      f"{p['broker_stalls']} stalls, {p['service_wait_s']} s for the service; achieved {p['achieved_speed']:.0f}x")
problems = []
if p["broker_stalls"] < 1: problems.append("the simulator never waited for the frozen broker")
if j["condensation_zone_min"] > 10: problems.append(f"{j['condensation_zone_min']} wet zone-minutes > 10")
if j["commands"]["bad_commands"]: problems.append("unreadable plant commands")
for x in problems: print("FAIL:", x, file=sys.stderr)
sys.exit(1 if problems else 0)
PY
