#!/usr/bin/env bash
# `dewmargin history` end to end: $1 = dewmargin binary, $2 = tests/data, $3 = source dir.
# Builds a history database from tests/data/history/fixture.sql with the sqlite3 shell (the
# fixture's schema is checked against the migrations by StoreSchema.FixtureOfTheCliTestMatchesTheMigrations).
set -euo pipefail
bin=$1
data=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

fail() {
  echo "test_history: FAIL: $*" >&2
  exit 1
}
# expect_exit CODE CMD...: runs CMD, keeps stdout/stderr in $work/out and $work/err.
expect_exit() {
  local want=$1
  shift
  local got=0
  "$@" >"$work/out" 2>"$work/err" || got=$?
  [[ $got == "$want" ]] || fail "exit $got (want $want): $* -- stderr: $(cat "$work/err")"
}
# The CSV body with CR removed, after checking that every line ends with CRLF.
csv_lines() {
  local lines crlf
  lines=$(wc -l <"$work/out")
  crlf=$(grep -c $'\r$' "$work/out" || true)
  [[ $lines == "$crlf" ]] || fail "CSV lines without CRLF: $lines lines, $crlf with CRLF"
  tr -d '\r' <"$work/out"
}

db=$work/history.db
sqlite3 "$db" <"$data/history/fixture.sql" >/dev/null

# All events as CSV: header, RFC 4180 quoting of commas and quotes in details, CRLF.
expect_exit 0 "$bin" history --db "$db" --format csv
expected=$(cat <<'CSV'
ts,subject_type,subject,kind,from,to,details
2026-07-13T23:59:59Z,site,,service,,,"{""action"":""start"",""version"":""0.1.0""}"
2026-07-14T13:00:00Z,zone,level2-east,band,safe,tight,"{""margin_k"":1.84,""dew_point_c"":16.21}"
2026-07-14T13:01:00Z,zone,level2-east,ack,,,"{""by"":""AB"",""note"":""drip tray checked, \""dry\""\nwill recheck""}"
2026-07-14T13:01:00Z,loop,loop-a,setpoint,17.5,18.25,"{""reason"":""dew point rose""}"
2026-07-14T13:02:00Z,zone,level3-west,valve,open,closed,"{""reason"":""window open""}"
2026-07-15T00:00:00Z,zone,level2-east,band,tight,safe,"{""margin_k"":2.5,""dew_point_c"":15.1}"
CSV
)
[[ "$(csv_lines)" == "$expected" ]] || fail "csv output differs:
$(csv_lines)"

# --zone matches the subject id.
expect_exit 0 "$bin" history --db "$db" --zone level2-east --format csv
[[ $(csv_lines | cut -d, -f3 | tail -n +2 | sort -u) == level2-east ]] || fail "--zone let other subjects through"
[[ $(csv_lines | wc -l) == 4 ]] || fail "--zone level2-east: want 3 rows and the header"

# --kind.
expect_exit 0 "$bin" history --db "$db" --kind band --format csv
[[ $(csv_lines | tail -n +2 | cut -d, -f4 | sort -u) == band ]] || fail "--kind band let other kinds through"
[[ $(csv_lines | wc -l) == 3 ]] || fail "--kind band: want 2 rows"
# Several kinds: repeated or as a comma list (each validated).
expect_exit 0 "$bin" history --db "$db" --kind band --kind valve --format csv
[[ $(csv_lines | tail -n +2 | cut -d, -f4 | tr '\n' ' ') == "band valve band " ]] || fail "--kind band --kind valve: $(csv_lines)"
expect_exit 0 "$bin" history --db "$db" --kind band,ack --format csv
[[ $(csv_lines | tail -n +2 | cut -d, -f4 | tr '\n' ' ') == "band ack band " ]] || fail "--kind band,ack: $(csv_lines)"
expect_exit 2 "$bin" history --db "$db" --kind band,alarms
grep -q -- "--kind 'alarms' is not an event kind" "$work/err" || fail "bad kind in a list: $(cat "$work/err")"

# CSV round-trips through a CSV parser (python3's csv module): same rows as the JSON lines.
expect_exit 0 "$bin" history --db "$db" --format csv
cp "$work/out" "$work/all.csv"
expect_exit 0 "$bin" history --db "$db" --format json
python3 - "$work/all.csv" "$work/out" <<'PY' || fail "CSV does not round-trip"
import csv, json, sys
with open(sys.argv[1], newline="") as f:
    rows = list(csv.reader(f, strict=True))
objects = [json.loads(line) for line in open(sys.argv[2])]
assert rows[0] == ["ts", "subject_type", "subject", "kind", "from", "to", "details"], rows[0]
assert len(rows) == 1 + len(objects), (len(rows), len(objects))
for row, obj in zip(rows[1:], objects):
    assert row[0] == obj["ts"] and row[3] == obj["kind"], (row, obj)
    details = json.loads(row[6]) if row[6] else {}
    for key, value in details.items():
        assert obj[key] == value, (key, row, obj)
ack = [r for r in rows if r[3] == "ack"][0]
assert json.loads(ack[6])["note"] == 'drip tray checked, "dry"\nwill recheck', ack
PY

# --since inclusive, --until exclusive; a bare date for --until covers that whole day.
expect_exit 0 "$bin" history --db "$db" --since 2026-07-14 --until 2026-07-14 --format csv
[[ $(csv_lines | tail -n +2 | cut -d, -f1 | tr '\n' ' ') == \
  "2026-07-14T13:00:00Z 2026-07-14T13:01:00Z 2026-07-14T13:01:00Z 2026-07-14T13:02:00Z " ]] ||
  fail "a day by dates: $(csv_lines)"
expect_exit 0 "$bin" history --db "$db" --since 2026-07-14T13:01:00Z --until 2026-07-14T13:02:00Z --format csv
[[ $(csv_lines | wc -l) == 3 ]] || fail "--since/--until times: want the two events at 13:01 only"
expect_exit 0 "$bin" history --db "$db" --since 2026-07-14T15:01:00+02:00 --kind setpoint --format csv
[[ $(csv_lines | tail -n +2 | cut -d, -f3) == loop-a ]] || fail "--since with an offset"

# No match: csv prints the header only, json nothing, table a line saying so; exit 0.
expect_exit 0 "$bin" history --db "$db" --zone nowhere --format csv
[[ $(csv_lines) == "ts,subject_type,subject,kind,from,to,details" ]] || fail "empty csv: $(cat "$work/out")"
expect_exit 0 "$bin" history --db "$db" --zone nowhere --format json
[[ ! -s "$work/out" ]] || fail "empty json: $(cat "$work/out")"
expect_exit 0 "$bin" history --db "$db" --zone nowhere
grep -q "no events" "$work/out" || fail "empty table: $(cat "$work/out")"

# json: one stored object per line (JSON Lines), in order.
expect_exit 0 "$bin" history --db "$db" --format json
python3 - "$work/out" <<'PY' || fail "json output: $(cat "$work/out")"
import json, sys
rows = [json.loads(line) for line in open(sys.argv[1])]
assert [r["kind"] for r in rows] == ["service", "band", "ack", "setpoint", "valve", "band"], rows
assert rows[2]["note"] == 'drip tray checked, "dry"\nwill recheck', rows[2]
PY

# table (default): a header and aligned columns with from → to.
expect_exit 0 "$bin" history --db "$db" --zone level2-east
head -1 "$work/out" | grep -q "TIME (UTC)" || fail "table header: $(head -1 "$work/out")"
grep -q "zone level2-east  band  safe → tight" "$work/out" || fail "table row: $(cat "$work/out")"

# Works while another connection holds the write lock (WAL; read-only open): the reader sees
# the last committed state at once, and the new row after the writer commits.
mkfifo "$work/sql_in" "$work/sql_out"
sqlite3 "$db" <"$work/sql_in" >"$work/sql_out" &
writer_pid=$!
exec 3>"$work/sql_in" 4<"$work/sql_out"
printf '%s\n' "BEGIN IMMEDIATE;" \
  "INSERT INTO events (ts_ms, subject_type, subject_id, kind, json) VALUES (1784034180000, 'zone', 'level2-east', 'ack', '{\"kind\":\"ack\"}');" \
  ".print locked" >&3
read -r -t 30 marker <&4 || fail "the concurrent sqlite3 writer did not start"
[[ $marker == locked ]] || fail "unexpected output of the concurrent writer: $marker"
expect_exit 0 timeout 30 "$bin" history --db "$db" --kind ack --format csv
[[ $(csv_lines | wc -l) == 2 ]] || fail "read during a write transaction: want the committed ack only"
printf '%s\n' "COMMIT;" >&3
exec 3>&- 4<&-
wait "$writer_pid" || fail "the concurrent sqlite3 writer failed"
expect_exit 0 "$bin" history --db "$db" --kind ack --format csv
[[ $(csv_lines | wc -l) == 3 ]] || fail "after the concurrent commit: want both acks"

# Exit 1: missing file, foreign SQLite file, not SQLite at all, newer schema.
expect_exit 1 "$bin" history --db "$work/missing.db"
grep -Eq "^dewmargin history: .*missing.db: no such file" "$work/err" || fail "missing: $(cat "$work/err")"
sqlite3 "$work/foreign.db" "CREATE TABLE t (x); PRAGMA application_id = 12345;"
expect_exit 1 "$bin" history --db "$work/foreign.db"
grep -q "foreign.db: not a dewmargin history database (application_id 0x00003039" "$work/err" ||
  fail "foreign: $(cat "$work/err")"
sqlite3 "$work/plain.db" "CREATE TABLE t (x);"
expect_exit 1 "$bin" history --db "$work/plain.db"
grep -q "not a dewmargin history database" "$work/err" || fail "plain sqlite: $(cat "$work/err")"
echo "ts,topic,payload" >"$work/text.csv"
expect_exit 1 "$bin" history --db "$work/text.csv"
grep -q "text.csv: not a dewmargin history database (not an SQLite file)" "$work/err" ||
  fail "text file: $(cat "$work/err")"
cp "$db" "$work/newer.db"
sqlite3 "$work/newer.db" "PRAGMA user_version = 99;"
expect_exit 1 "$bin" history --db "$work/newer.db"
grep -q "schema version 99 is newer" "$work/err" || fail "newer: $(cat "$work/err")"

# A stored event that is not valid JSON: every row is still printed, then exit 1 naming it.
cp "$db" "$work/bad-row.db"
sqlite3 "$work/bad-row.db" "INSERT INTO events (id, ts_ms, subject_type, subject_id, kind, json) VALUES
  (99, 1784034300000, 'zone', 'level2-east', 'band', '{\"ts\":\"2026-07-14T13:05:00Z\",');"
expect_exit 1 "$bin" history --db "$work/bad-row.db" --format json
grep -q "bad-row.db: 1 stored event(s) are not valid JSON objects (first id 99)" "$work/err" ||
  fail "invalid row: $(cat "$work/err")"
python3 - "$work/out" <<'PY' || fail "json output with an invalid row: $(cat "$work/out")"
import json, sys
rows = [json.loads(line) for line in open(sys.argv[1])]
assert len(rows) == 8, rows
bad = [r for r in rows if "invalid_stored_json" in r]
assert bad == [{"ts": "2026-07-14T13:05:00Z", "zone": "level2-east", "kind": "band",
                "invalid_stored_json": '{"ts":"2026-07-14T13:05:00Z",'}], bad
PY

# Exit 2: bad usage, checked before the database is opened.
expect_exit 2 "$bin" history --db "$db" --since yesterday
grep -q -- "--since: 'yesterday' is not an ISO 8601 time" "$work/err" || fail "bad since: $(cat "$work/err")"
expect_exit 2 "$bin" history --db "$work/missing.db" --since 2026-13-01
expect_exit 2 "$bin" history --db "$db" --until 2026-07-14T25:00Z
expect_exit 2 "$bin" history --db "$db" --kind alarm
grep -q -- "--kind 'alarm' is not an event kind (band, ack" "$work/err" || fail "bad kind: $(cat "$work/err")"
expect_exit 2 "$bin" history --db "$db" --format xml
grep -q -- "--format 'xml'" "$work/err" || fail "bad format: $(cat "$work/err")"
expect_exit 2 "$bin" history --db "$db" --since 2026-07-15 --until 2026-07-14T00:00:00Z
expect_exit 2 "$bin" history
expect_exit 0 "$bin" history --help
grep -q "a bare date for --until includes that whole day" "$work/out" || fail "--help documents --until"

echo "test_history: all passed"
