#!/usr/bin/env bash
# `dewmargin replay` ticks by the service's rule (lib/core tick_driver.h): every second of
# the readings' time, but a jump of more than an hour ticks once.
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

site=$data/replay/site.yaml

# A recording with a 31-year hole: one tick at the far side, not a billion of them. The
# inputs went silent across the hole, so that one tick finds them stale.
printf 'ts,topic,payload\n0,plant/l1/supply,16\n0,r/a/temp,24\n1000000000,r/a/temp,24\n' >"$work/gap.csv"
started=$SECONDS
run replay --config "$site" --readings "$work/gap.csv"
expect_rc 0 "replay across a long gap"
((SECONDS - started < 20)) || fail "replay across a long gap took $((SECONDS - started)) s"
expect_line "$work/out" '^\{"ts":"2001-09-09T01:46:40Z","site":"replay-test","loop":"loop-1","kind":"input","from":"ok","to":"stale","topic":"plant/l1/supply"' \
  "stale supply at the one tick after the gap"
if grep -q '"ts":"1970-01-01T0[1-9]' "$work/out"; then
  fail "ticks went on second by second more than an hour into the gap"
fi

# Gaps up to an hour are ticked second by second: the inputs go stale at 120 s.
printf 'ts,topic,payload\n0,plant/l1/supply,16\n3000,r/a/temp,24\n' >"$work/hour.csv"
run replay --config "$site" --readings "$work/hour.csv"
expect_rc 0 "replay across a short gap"
expect_line "$work/out" '^\{"ts":"1970-01-01T00:02:00Z","site":"replay-test","loop":"loop-1","kind":"input","from":"ok","to":"stale"' \
  "stale supply 120 s into a short gap"

finish
