#!/usr/bin/env bash
# `dewmargin-sim --scenario FILE` with bad files: exit 2, every mistake located as
# FILE:LINE:COL on stderr, nothing else done. (The unit tests, test_sim_scenario_file.cpp,
# check every fixture's messages; this checks what a user sees.)
# Arguments: $1 dewmargin-sim, $2 tests/data directory, $3 source directory.
set -euo pipefail
# shellcheck source=tests/cli/cli_lib.sh
source "$(dirname "$0")/../cli/cli_lib.sh"
config=$src/config/demo.yaml

# 1. Three mistakes on three lines: exit 2, all three located, nothing on stdout.
bad=$data/scenarios/bad/three_mistakes.yaml
run --config "$config" --scenario "$bad" --no-service
expect_rc 2 "three_mistakes.yaml"
expect_line "$work/err" "^$bad:3:6: 'end' must be a time of day HH:MM from 00:00 to 24:00, got '26:00'$" "end"
expect_line "$work/err" "^$bad:6:38: dehumidifier 'doas-rooof' is not in the config $config; did you mean 'doas-roof'\\?$" \
  "dehumidifier"
expect_line "$work/err" "^$bad:7:66: 'value' must be between 0 and 100, got 140$" "stuck value"
lines=$(wc -l <"$work/err")
[[ $lines -eq 3 ]] || fail "three_mistakes.yaml: $lines lines on stderr, expected 3"
[[ -s $work/out ]] && fail "three_mistakes.yaml: unexpected stdout: $(cat "$work/out")"

# 2. The same with --compare: the scenario is checked before any broker is tried.
run --config "$config" --scenario "$bad" --compare --broker tcp://127.0.0.1:1 --wait-service-s 1
expect_rc 2 "three_mistakes.yaml --compare"

# 3. A building file that is not there is named, at the place that names it.
run --config "$config" --scenario "$data/scenarios/bad/missing_building_file.yaml" --no-service
expect_rc 2 "missing building file"
expect_line "$work/err" \
  "^$data/scenarios/bad/missing_building_file.yaml:1:11: building file $data/scenarios/bad/no-such-building.yaml: cannot read: No such file or directory$" \
  "missing building file"

# 4. A scenario that is not there: one line naming it.
run --config "$config" --scenario "$work/none.yaml" --no-service
expect_rc 2 "missing scenario"
expect_line "$work/err" "^$work/none.yaml: cannot read: No such file or directory$" "missing scenario"

# 5. A good file runs: the baseline of the minimal scenario (every default), its verdict as JSON.
run --config "$config" --scenario "$data/scenarios/good/minimal.yaml" --no-service --quiet --json "$work/minimal.json"
expect_rc 0 "minimal.yaml"
python3 - "$work/minimal.json" <<'PY' || fail "minimal.yaml: unexpected JSON"
import json, sys
j = json.load(open(sys.argv[1]))
assert j["mode"] == "baseline" and j["scenario"] == "minimal", j
assert set(j["zones"]) == {"g-lobby", "g-meeting", "l1-north-open", "l1-north-pantry", "l1-south-open",
                           "l2-north-offices", "l2-south-meeting", "l2-south-open", "l3-north-open", "l3-south-open"}
z = j["zones"]["g-lobby"]
assert {"condensation_min", "lowest_margin_k", "lowest_margin_at", "first_wet_at"} <= set(z), z
PY

# 6. Usage: --max-wet-zone-min needs --compare; --compare and --no-service exclude each other.
run --config "$config" --scenario "$data/scenarios/good/minimal.yaml" --max-wet-zone-min 5
expect_rc 2 "--max-wet-zone-min alone"
expect_line "$work/err" "requires --compare" "--max-wet-zone-min alone"
run --config "$config" --scenario "$data/scenarios/good/minimal.yaml" --compare --no-service
expect_rc 2 "--compare --no-service"

finish
