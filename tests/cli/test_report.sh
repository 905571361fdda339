#!/usr/bin/env bash
# `dewmargin report` end to end: $1 = dewmargin binary, $2 = tests/data, $3 = source dir.
# The database: the schema of tests/data/history/fixture.sql (kept equal to the migrations by a
# store test) with the report fixture's rows (tests/data/history/report_fixture.sql; its numbers
# are checked by tests/report/test_report_fixture.cpp). Here: the command, the file it writes
# (strict XML well-formedness, one margin chart per zone, nothing from outside), and a real
# browser rendering it (headless Chromium; skipped with a message where it is not installed).
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

db=$work/history.db
sqlite3 "$db" <"$data/history/fixture.sql" >/dev/null
sqlite3 "$db" "DELETE FROM events; DELETE FROM zone_samples; DELETE FROM zone_state; DELETE FROM loop_state;"
sqlite3 "$db" <"$data/history/report_fixture.sql"

run report --db "$db" --since 2026-07-14T08:00:00Z --until 2026-07-14T12:00:00Z --out "$work/review.html"
expect_rc 0 "report of the fixture"
expect_line "$work/out" "^report written: .*review.html \(2 zones, [0-9]+ events, 480 sample rows\)" "summary line"
[[ -s $work/review.html ]] || fail "no report file"
[[ ! -e $work/review.html.tmp ]] || fail "temporary file left behind"

python3 - "$work/review.html" <<'PY' || fail "the page is not what it should be"
import re, sys
import xml.dom.minidom
text = open(sys.argv[1], encoding="utf-8").read()
# Strict: an XML parser must read it whole (every element closed, attributes quoted).
doc = xml.dom.minidom.parseString(text.encode("utf-8"))
svgs = doc.getElementsByTagName("svg")
margin = [s for s in svgs if s.getAttribute("aria-label").startswith("margin of zone ")]
assert sorted(s.getAttribute("aria-label") for s in margin) == ["margin of zone a", "margin of zone b"], margin
assert not doc.getElementsByTagName("script"), "a script"
assert not doc.getElementsByTagName("img") and not doc.getElementsByTagName("link"), "an outside asset"
for bad in ("http:", "https:", "src=", "//", "@import"):
    assert bad not in text, bad
assert set(re.findall(r"url\((.)", text)) <= {"#"}, "url() to elsewhere"
assert "Dew-margin review: fixture-site" in text
assert "1 of 2 zones reached the dew point" in text
assert "8.33 %" in text, "flood percentage"
assert "Caution: dewmargin supervises" in text
PY

# Rendered by a real browser to PNG (A4 width at 150 dpi).
chromium_bin=$(command -v chromium || command -v chromium-browser || true)
if [[ -z $chromium_bin ]]; then
  echo "test_report: SKIPPED the rendering check: chromium is not installed (Debian package chromium)"
else
  timeout 90 "$chromium_bin" --headless --no-sandbox --disable-gpu --disable-background-networking \
    --disable-component-update --disable-sync --no-first-run --hide-scrollbars --user-data-dir="$work/chromium" \
    --screenshot="$work/review.png" --window-size=1240,1754 "file://$work/review.html" \
    >"$work/chromium.log" 2>&1 || fail "chromium failed: $(tail -5 "$work/chromium.log")"
  python3 - "$work/review.png" <<'PY' || fail "chromium's screenshot is not a page"
import struct, sys
data = open(sys.argv[1], "rb").read()
assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
width, height = struct.unpack(">II", data[16:24])
assert (width, height) == (1240, 1754), (width, height)
assert len(data) > 20000, "an almost empty picture: %d bytes" % len(data)
PY
fi

# Whole database (no --since/--until), one zone, a comma list.
run report --db "$db" --zone a --out "$work/a.html"
expect_rc 0 "one zone"
[[ $(grep -o 'aria-label="margin of zone [a-z]*"' "$work/a.html" | sort -u) == 'aria-label="margin of zone a"' ]] ||
  fail "--zone a shows other zones"
run report --db "$db" --zone a,b --out "$work/ab.html"
expect_rc 0 "a comma list of zones"

# With a config: its thresholds table (zones not in it are said to be so).
run report --db "$db" --config "$data/replay/site.yaml" --out "$work/cfg.html"
expect_rc 0 "with --config"
grep -q "Thresholds in force" "$work/cfg.html" || fail "no thresholds section"
grep -q "not in the config" "$work/cfg.html" || fail "zones missing from the config are not named"

# Exit 1: missing or foreign database, nothing in the period, a file that cannot be written.
run report --db "$work/missing.db" --out "$work/x.html"
expect_rc 1 "missing database"
expect_line "$work/err" "^dewmargin report: .*missing.db: no such file" "missing database message"
run report --db "$db" --zone nowhere --out "$work/x.html"
expect_rc 1 "a zone without data"
expect_line "$work/err" "no zone has samples or events in the period" "empty report message"
[[ ! -e $work/x.html ]] || fail "a report was written for nothing"
run report --db "$db" --out "$work/no-such-dir/x.html"
expect_rc 1 "unwritable output"
expect_line "$work/err" "cannot write the report" "unwritable output message"

# Exit 2: bad usage.
run report --db "$db" --since yesterday --out "$work/x.html"
expect_rc 2 "bad --since"
expect_line "$work/err" "--since: 'yesterday' is not an ISO 8601 time" "bad --since message"
run report --db "$db" --since 2026-07-15 --until 2026-07-14T00:00:00Z --out "$work/x.html"
expect_rc 2 "since after until"
run report --db "$db"
expect_rc 2 "no --out"
run report --db "$db" --config "$data/replay/site.yaml" --zone nowhere --out "$work/x.html"
expect_rc 2 "a zone not in the config"
expect_line "$work/err" "--zone 'nowhere' is not a zone of" "zone not in config message"
run report --db "$db" --config "$work/missing.yaml" --out "$work/x.html"
expect_rc 2 "missing config"
run report --help
expect_rc 0 "--help"
expect_line "$work/out" "Caution: dewmargin supervises" "--help keeps the caution"

finish
