#!/usr/bin/env bash
# The service matters: the short simulated morning (06:00-08:30: a humid start-up, the DOAS
# coil tripped, a packed meeting room, the lobby door propped open, a silent humidity sensor,
# a wet condensation switch) is played twice on the same seed:
#   1. closed loop: dewmargin-sim <-> mosquitto <-> the real dewmargind (event-time mode);
#   2. baseline: the simulator alone, plant on its design settings (--no-service).
# The simulator's ground truth (minutes a chilled surface was colder than its room's dew point)
# must be substantial in the baseline and near zero with the service:
#   baseline   >= 200 zone-minutes      (measured: ~445)
#   supervised <= 10 zone-minutes and <= 5 % of the baseline   (measured: ~1.5)
# A change that weakens the protection (no reset, valves left open, late reaction) fails here.
# Usage: test_supervised_morning.sh DEWMARGIND DEWMARGIN_SIM DEMO_CONFIG
set -euo pipefail
daemon=$1
sim=$2
config=$3
speed=${DEWMARGIN_E2E_SPEED:-300}

fail() {
  echo "FAIL: $*" >&2
  exit 1
}

work=$(mktemp -d /tmp/dewmargin-e2e-XXXXXX)
chmod 755 "$work"   # mosquitto drops to its own user when started as root
broker_pid=
daemon_pid=
# Stops what this script started, by PID, the service before its broker.
cleanup() {
  local pid
  for pid in "$daemon_pid" "$broker_pid"; do
    [[ -n $pid ]] || continue
    kill "$pid" 2>/dev/null || true
    wait "$pid" 2>/dev/null || true
  done
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

free_port() {
  python3 -c 'import socket; s = socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])'
}

listening() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# 1. The broker, on a free loopback port (a port taken in between: pick another).
port=
for _ in 1 2 3; do
  candidate=$(free_port)
  printf 'listener %s 127.0.0.1\nallow_anonymous true\npersistence false\nlog_dest stderr\nmax_queued_messages 0\n' \
    "$candidate" >"$work/mosquitto.conf"
  chmod 644 "$work/mosquitto.conf"
  mosquitto -c "$work/mosquitto.conf" 2>"$work/mosquitto.log" &
  broker_pid=$!
  for _ in $(seq 100); do
    listening "$candidate" && break
    kill -0 "$broker_pid" 2>/dev/null || break
    sleep 0.1
  done
  if listening "$candidate"; then
    port=$candidate
    break
  fi
  kill "$broker_pid" 2>/dev/null || true
  wait "$broker_pid" 2>/dev/null || true
  broker_pid=
done
[[ -n $port ]] || { show_logs; fail "mosquitto did not start"; }

# 2. The service on a copy of the demo config: this broker, a history database in the temp dir.
sed -e "s#tcp://127.0.0.1:1883#tcp://127.0.0.1:$port#" -e "s#/tmp/dewmargin-demo/history.db#$work/history.db#" \
  "$config" >"$work/demo.yaml"
grep -q "tcp://127.0.0.1:$port" "$work/demo.yaml" || fail "broker uri not replaced in the config copy"
grep -q "$work/history.db" "$work/demo.yaml" || fail "storage path not replaced in the config copy"
"$daemon" --config "$work/demo.yaml" >"$work/dewmargind.log" 2>&1 &
daemon_pid=$!

# 3. The closed loop, then the baseline.
start=$(date +%s)
if ! "$sim" --config "$work/demo.yaml" --scenario short --speed "$speed" --status-every-min 30 \
  --json "$work/supervised.json" --wait-service-s 30 >"$work/sim.log" 2>&1; then
  show_logs
  fail "the simulator did not finish the supervised run"
fi
wall=$(($(date +%s) - start))
cat "$work/sim.log"
"$sim" --config "$work/demo.yaml" --scenario short --no-service --quiet --json "$work/baseline.json" ||
  fail "the simulator did not finish the baseline run"

# 4. The service stops cleanly and kept its history.
kill -TERM "$daemon_pid"
daemon_rc=0
wait "$daemon_pid" || daemon_rc=$?
daemon_pid=
[[ $daemon_rc -eq 0 ]] || { show_logs; fail "dewmargind exited with $daemon_rc after SIGTERM"; }
[[ -s "$work/history.db" ]] || fail "no history database at $work/history.db"

# 5. The verdict.
python3 - "$work/baseline.json" "$work/supervised.json" "$wall" <<'PY'
import json, sys
baseline = json.load(open(sys.argv[1]))
supervised = json.load(open(sys.argv[2]))
wall = sys.argv[3]
b = baseline["condensation_zone_min"]
s = supervised["condensation_zone_min"]
svc = supervised["service"]
cmd = supervised["commands"]
print(f"condensation: baseline {b:.1f} zone-min, with dewmargind {s:.1f} zone-min; wall {wall} s")
print(f"service: alarms {svc['alarms_raised']}, acknowledged {svc['acknowledged']}, "
      f"valves closed {svc['valves_closed']}, setpoint events {svc['setpoint_events']}")
problems = []
if b < 200: problems.append(f"baseline condensation {b} zone-min < 200: the scenario no longer challenges the service")
if s > 10: problems.append(f"supervised condensation {s} zone-min > 10")
if s > 0.05 * b: problems.append(f"supervised condensation {s} zone-min > 5 % of the baseline {b}")
if svc["alarms_raised"] < 1: problems.append("the service raised no alarm")
if svc["valves_closed"] < 1: problems.append("the service closed no valve")
if svc["acknowledged"] < 1: problems.append("no acknowledgement reached the service")
if cmd["bad_commands"] != 0: problems.append(f"{cmd['bad_commands']} plant commands the simulator could not read")
if max(v["max_c"] for v in cmd["setpoint_c"].values()) <= 16.0: problems.append("no supply setpoint was raised")
for p in problems: print("FAIL:", p, file=sys.stderr)
sys.exit(1 if problems else 0)
PY
