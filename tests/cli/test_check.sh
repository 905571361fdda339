#!/usr/bin/env bash
# `dewmargin check`: exit codes, summary on stdout, located errors on stderr.
# Arguments: $1 dewmargin binary, $2 tests/data directory, $3 source directory.
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

# 1. The example config is valid and summarised.
example=$src/config/example.yaml
run check "$example"
expect_rc 0 "example.yaml"
expect_line "$work/out" "^$example: ok$" "example.yaml"
expect_line "$work/out" '^site +harbour-lane-office$' "example.yaml site"
expect_line "$work/out" '^broker +tcp://127\.0\.0\.1:1883, client id dewmargin-hlo-gw1' "example.yaml broker"
expect_line "$work/out" '^storage +/var/lib/dewmargin/history\.db' "example.yaml storage"
expect_line "$work/out" '^publish +prefix dewmargin/' "example.yaml publish"
expect_line "$work/out" '^loops \(3\)$' "example.yaml loops"
expect_line "$work/out" '^ +setpoint +plant/hlo/ceiling-north/supply-sp/set, 15 to 20 °C' "example.yaml setpoint range"
expect_line "$work/out" '^zones \(6\)$' "example.yaml zones"
expect_line "$work/out" '^  ground-cafe \(loop slab-ground\)$' "example.yaml zone with loop"
expect_line "$work/out" '^ +air_temp +bldg/hlo/ground/cafe/multisensor\[/temperature\]' "example.yaml topic[field]"
expect_line "$work/out" '^ +valve +bldg/hlo/first/north/ceiling-valve/set' "example.yaml valve"
expect_line "$work/out" '^ +thresholds +warn 2\.5 K, alarm 1\.5 K' "example.yaml zone thresholds"
expect_line "$work/out" '^dehumidifiers \(1\)$' "example.yaml dehumidifiers"
expect_line "$work/out" '^totals: 6 zones, 3 loops, 1 dehumidifier, 30 inputs subscribed' "example.yaml totals"
[[ -s $work/err ]] && fail "example.yaml: unexpected stderr: $(cat "$work/err")"

# 2. Three mistakes on three lines: exit 2, all three located on stderr, nothing on stdout.
bad=$data/config/bad/three_mistakes.yaml
run check "$bad"
expect_rc 2 "three_mistakes.yaml"
expect_line "$work/err" "^$bad:7:16: 'keepalive_s' must be greater than 0" "three_mistakes.yaml keepalive"
expect_line "$work/err" "^$bad:16:17: 'hysteresis_k' must not be negative" "three_mistakes.yaml hysteresis"
expect_line "$work/err" "^$bad:22:5: unknown key 'surface' in zone 'room-1'; did you mean 'surfaces'\\?" \
  "three_mistakes.yaml unknown key"
lines=$(wc -l <"$work/err")
[[ $lines -eq 3 ]] || fail "three_mistakes.yaml: $lines lines on stderr, expected 3"
[[ -s $work/out ]] && fail "three_mistakes.yaml: unexpected stdout: $(cat "$work/out")"

# 3. A missing file: exit 2, one line naming the file.
missing=$work/no-such-config.yaml
run check "$missing"
expect_rc 2 "missing file"
expect_line "$work/err" "^$missing: cannot read: No such file or directory$" "missing file"
lines=$(wc -l <"$work/err")
[[ $lines -eq 1 ]] || fail "missing file: $lines lines on stderr, expected 1"

# 4. A file given with a relative path is named as given.
(cd "$data/config/good" && "$bin" check minimal.yaml >"$work/out" 2>"$work/err") || fail "relative path: exit $?"
expect_line "$work/out" '^minimal\.yaml: ok$' "relative path"

# 5. A config that is not UTF-8 text: exit 2, each place located, the bytes not echoed raw.
bad=$data/config/bad/not_utf8.yaml
run check "$bad"
expect_rc 2 "not_utf8.yaml"
expect_line "$work/err" "^$bad:4:10: byte 0xE9 is not UTF-8 text; a config file must be saved as UTF-8$" "not_utf8.yaml site"
expect_line "$work/err" "^$bad:16:35: byte 0xE2 is not UTF-8 text" "not_utf8.yaml topic"
LC_ALL=C grep -q $'[\x80-\xff]' "$work/err" && fail "not_utf8.yaml: raw bytes on stderr: $(cat -v "$work/err")"

# 6. Junk: a file of random bytes, and a lone comma (yaml-cpp's LoadAll never returned on it).
head -c 3000 /dev/urandom >"$work/junk.yaml"
run check "$work/junk.yaml"
expect_rc 2 "random bytes"
expect_line "$work/err" "^$work/junk.yaml:[0-9]+:[0-9]+: " "random bytes located"
iconv -f UTF-8 -t UTF-8 "$work/err" >/dev/null 2>&1 || fail "random bytes: stderr is not UTF-8: $(cat -v "$work/err" | head -c 400)"
printf ',\n' >"$work/comma.yaml"
set +e
timeout 20 "$bin" check "$work/comma.yaml" >"$work/out" 2>"$work/err"
rc=$?
set -e
expect_rc 2 "lone comma"
expect_line "$work/err" "comma.yaml:1:1: the file holds no config" "lone comma"

# 7. A password file open to group or others: exit 2, one line naming the file and its mode.
secret=$work/broker.secret
printf 's3cret\n' >"$secret"
chmod 644 "$secret"
sed -e "s|client_id: dewmargin-test|client_id: dewmargin-test\n  username: gateway\n  password_file: $secret|" \
  "$data/config/good/minimal.yaml" >"$work/with_secret.yaml"
run check "$work/with_secret.yaml"
expect_rc 2 "password file 0644"
expect_line "$work/err" "^$work/with_secret.yaml: broker.password_file $secret: mode 0644 gives group or others access; allow the owner only \(chmod 600\)$" \
  "password file 0644"
lines=$(wc -l <"$work/err")
[[ $lines -eq 1 ]] || fail "password file 0644: $lines lines on stderr, expected 1"
grep -q s3cret "$work/err" "$work/out" && fail "password file 0644: the secret was printed"
chmod 600 "$secret"
run check "$work/with_secret.yaml"
expect_rc 0 "password file 0600"
expect_line "$work/out" "password from $secret" "password file 0600"

finish
