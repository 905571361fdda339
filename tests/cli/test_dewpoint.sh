#!/usr/bin/env bash
# `dewmargin dewpoint`: the value against the WMO-No. 8 formula, units, and one-line errors.
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

# 1. 24 °C, 50 %: WMO-No. 8 (2018) Annex 4.B, Magnus with 6.112 hPa, 17.62, 243.12 °C,
#    evaluated independently here with awk: within 0.05 K.
run dewpoint --temp 24 --rh 50 --json
expect_rc 0 "24/50 json"
want=$(awk 'BEGIN { t = 24; rh = 50; g = log(rh / 100) + 17.62 * t / (243.12 + t); printf "%.4f", 243.12 * g / (17.62 - g) }')
got=$(python3 -c 'import json,sys; print(json.load(open(sys.argv[1]))["dew_point_c"])' "$work/out")
awk -v a="$got" -v b="$want" 'BEGIN { d = a - b; if (d < 0) d = -d; exit !(d <= 0.05) }' ||
  fail "dew_point_c $got is not within 0.05 K of the WMO formula value $want"
expect_line "$work/out" '"formula":"magnus-sonntag-1990"' "formula named"

# 2. °F in and out.
run dewpoint --temp 75.2 --rh 50 --unit F --json
expect_rc 0 "°F"
expect_line "$work/out" '"dew_point_f":55\.2' "dew_point_f"

# 3. Bad input: exit 2, one line that names the problem.
for args in "--rh 150" "--rh 0" "--rh -5" "--rh nan"; do
  # shellcheck disable=SC2086
  run dewpoint --temp 24 $args
  expect_rc 2 "dewpoint $args"
  [[ $(wc -l <"$work/err") -eq 1 ]] || fail "dewpoint $args: expected one line on stderr, got: $(cat "$work/err")"
done
expect_line "$work/err" "not a number" "nan is not a number"
run dewpoint --temp 24 --rh 150
expect_line "$work/err" "^dewmargin dewpoint: relative humidity 150 % is outside \(0, 100\]" "rh 150 message"
run dewpoint --temp abc --rh 50
expect_rc 2 "temp abc"
expect_line "$work/err" "^dewmargin dewpoint: --temp 'abc' is not a number$" "temp abc message"
run dewpoint --temp 75 --rh 50
expect_rc 2 "temp 75 °C"
expect_line "$work/err" "outside the valid range -45 to 60 °C" "temperature range message"
run dewpoint --temp 24
expect_rc 2 "missing --rh"

# 4. --help shows usage, an example and the caution.
run dewpoint --help
expect_rc 0 "help"
expect_line "$work/out" "Example:" "help example"
expect_line "$work/out" "not a safety device" "help caution"

finish
