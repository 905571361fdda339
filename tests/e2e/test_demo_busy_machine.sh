#!/usr/bin/env bash
# The demo survives a busy machine (label `stress`, not in the default run): scripts/demo, with
# this build's programs, while CPU hogs keep both cores busy. It must finish and pass its own
# verdict; the simulator waits for the broker and the service instead of failing, and says how
# much it had to slow down.
# Arguments: $1 build directory (with daemon/, tools/), $2 source directory.
# Hogs: stress-ng (Debian package stress-ng) when installed, else two busy shell loops.
set -euo pipefail
build=$1
src=$2
work=$(mktemp -d /tmp/dewmargin-stress-XXXXXX)
hogs=()
cleanup() {
  local pid
  for pid in "${hogs[@]}"; do
    kill "$pid" 2>/dev/null || true
    wait "$pid" 2>/dev/null || true
  done
  rm -rf "$work"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

cores=$(nproc)
if command -v stress-ng >/dev/null; then
  stress-ng --cpu "$cores" --timeout 1800s --quiet &
  hogs+=($!)
  echo "stress: stress-ng --cpu $cores (pid ${hogs[0]})"
else
  for _ in $(seq "$cores"); do
    bash -c 'while :; do :; done' &
    hogs+=($!)
  done
  echo "stress: $cores busy loops (pids ${hogs[*]}); install stress-ng for a steadier load"
fi

start=$(date +%s)
DEWMARGIN_DEMO_BINARIES=$build DEWMARGIN_DEMO_OUT=$work/demo "$src/scripts/demo"
echo "stress: the demo passed in $(($(date +%s) - start)) s of wall time beside the CPU hogs"
python3 - "$work/demo/compare.json" <<'PY'
import json, sys
pace = json.load(open(sys.argv[1]))["service"]["pace"]
print(f"stress: asked {pace['asked_speed']:g}x, achieved {pace['achieved_speed']:.0f}x; slowed {pace['slowed_s']:.1f} s "
      f"(waited {pace['broker_wait_s']:.1f} s for the broker in {pace['broker_stalls']} stalls, "
      f"{pace['service_wait_s']:.1f} s for the service in {pace['service_stalls']}); "
      f"the service trailed the readings by at most {pace['worst_service_lag_s']:.0f} simulated s")
PY
