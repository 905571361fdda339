#!/usr/bin/env bash
# `dewmargin replay`: a scenario file gives exactly the expected event stream; states on
# request; malformed CSV is an error with its line number.
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

site=$data/replay/site.yaml
readings=$data/replay/humid_afternoon.csv

# 1. The whole event stream, compared with the reviewed expectation.
run replay --config "$site" --readings "$readings" --start 2026-07-14T13:00:00Z
expect_rc 0 "humid_afternoon"
if ! diff -u "$data/replay/humid_afternoon.expected.jsonl" "$work/out" >"$work/diff"; then
  fail "humid_afternoon: event stream differs from the expected file: $(head -c 2000 "$work/diff")"
fi

# 2. --states adds zone and loop states, and every line is one JSON object.
run replay --config "$site" --readings "$readings" --start 2026-07-14T13:00:00Z --states
expect_rc 0 "humid_afternoon --states"
expect_line "$work/out" '^\{"site":"replay-test","zone":"room-a","ts":"2026-07-14T13:04:10Z","band":"condensing"' \
  "zone state at condensing"
expect_line "$work/out" '^\{"site":"replay-test","loop":"loop-1",' "loop state"
python3 -c 'import json,sys; [json.loads(l) for l in open(sys.argv[1])]' "$work/out" ||
  fail "--states output is not one JSON object per line"

# 3. A malformed line: exit 2 and its line number.
printf 'ts,topic,payload\n0,r/a/temp,24\n5,r/a/rh\n' >"$work/bad.csv"
run replay --config "$site" --readings "$work/bad.csv"
expect_rc 2 "malformed CSV"
expect_line "$work/err" "^$work/bad.csv:3: expected 3 fields ts,topic,payload, found 2$" "malformed CSV line"
printf '0,r/a/temp,24\nsoon,r/a/rh,50\n' >"$work/bad_ts.csv"
run replay --config "$site" --readings "$work/bad_ts.csv"
expect_rc 2 "bad ts"
expect_line "$work/err" "bad_ts.csv:2: ts: 'soon' is not an ISO 8601 time" "bad ts line"

# 4. A missing readings file and a bad config are usage errors.
run replay --config "$site" --readings "$work/none.csv"
expect_rc 2 "missing readings"
expect_line "$work/err" "none.csv: cannot read the readings file" "missing readings message"
run replay --config "$data/config/bad/three_mistakes.yaml" --readings "$readings"
expect_rc 2 "bad config"

finish
