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
printf 'ts,topic,payload\n0,r/a/temp,24\nsoon,r/a/rh,50\n' >"$work/bad_ts.csv"
run replay --config "$site" --readings "$work/bad_ts.csv"
expect_rc 2 "bad ts"
expect_line "$work/err" "bad_ts.csv:3: ts: 'soon' is not an ISO 8601 time" "bad ts line"

# 3b. Times out of range, a missing header, NUL bytes: exit 2 with the line; a byte-order
#     mark before the header is skipped.
for ts in 1e300 99999999999999999999 1969-12-31T00:00:00Z; do
  printf 'ts,topic,payload\n0,r/a/temp,24\n%s,r/a/rh,50\n' "$ts" >"$work/range.csv"
  run replay --config "$site" --readings "$work/range.csv"
  expect_rc 2 "ts $ts"
  expect_line "$work/err" "^$work/range.csv:3: ts '$ts' is out of range: a time must lie from 1970-01-01 to 9999-12-31$" \
    "ts $ts"
  [[ -s $work/out ]] && fail "ts $ts: output before the error: $(head -c 300 "$work/out")"
done
printf '0,r/a/temp,24\n5,r/a/rh,50\n' >"$work/no_header.csv"
run replay --config "$site" --readings "$work/no_header.csv"
expect_rc 2 "no header"
expect_line "$work/err" "^$work/no_header.csv:1: the first record must be the header ts,topic,payload, found '0,r/a/temp,24'$" \
  "no header"
printf 'ts,topic,payload\n0,r/a/te\0mp,24\n' >"$work/nul_topic.csv"
run replay --config "$site" --readings "$work/nul_topic.csv"
expect_rc 2 "NUL in topic"
expect_line "$work/err" "^$work/nul_topic.csv:2: NUL byte in the topic at byte 7$" "NUL in topic"
printf 'ts,topic,payload\n0,r/a/temp,2\0004\n' >"$work/nul_payload.csv"
run replay --config "$site" --readings "$work/nul_payload.csv"
expect_rc 2 "NUL in payload"
expect_line "$work/err" "^$work/nul_payload.csv:2: NUL byte in the payload at byte 2$" "NUL in payload"
printf '\xef\xbb\xbfts,topic,payload\n0,r/a/temp,24\n' >"$work/bom.csv"
run replay --config "$site" --readings "$work/bom.csv" --start 2026-07-14T13:00:00Z
expect_rc 0 "byte-order mark"
[[ -s $work/err ]] && fail "byte-order mark: unexpected stderr: $(cat "$work/err")"
run replay --help
expect_line "$work/out" "first line must be the header ts,topic,payload" "--help names the header"

# 4. A missing readings file and a bad config are usage errors.
run replay --config "$site" --readings "$work/none.csv"
expect_rc 2 "missing readings"
expect_line "$work/err" "none.csv: cannot read the readings file" "missing readings message"
run replay --config "$data/config/bad/three_mistakes.yaml" --readings "$readings"
expect_rc 2 "bad config"

finish
