#!/usr/bin/env bash
# The systemd unit: its exposure score from `systemd-analyze security --offline=true`
# (works without a running systemd) must be 2.0 or lower, and the settings the service
# relies on must be there.
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

unit=$src/systemd/dewmargind.service
command -v systemd-analyze >/dev/null || { fail "systemd-analyze not installed (Debian package systemd)"; finish; }

set +e
systemd-analyze security --offline=true --no-pager "$unit" >"$work/out" 2>"$work/err"
rc=$?
set -e
[[ $rc -eq 0 ]] || fail "systemd-analyze exited $rc: $(head -c 400 "$work/err")"
score=$(sed -n 's/.*Overall exposure level for dewmargind.service: \([0-9.]*\).*/\1/p' "$work/out")
[[ -n $score ]] || fail "no exposure score in: $(tail -n 3 "$work/out")"
if [[ -n $score ]]; then
  awk -v s="$score" 'BEGIN { exit !(s <= 2.0) }' || fail "exposure score $score is above 2.0"
  echo "exposure score: $score"
fi

for setting in 'Type=notify' 'WatchdogSec=' 'Restart=on-failure' 'ExecReload=/bin/kill -HUP $MAINPID' \
  'StateDirectory=dewmargin' 'ConfigurationDirectory=dewmargin' 'DynamicUser=yes' 'ProtectSystem=strict' \
  'NoNewPrivileges=yes' 'RestrictAddressFamilies=AF_UNIX AF_INET AF_INET6' 'SystemCallFilter=@system-service'; do
  grep -qF -- "$setting" "$unit" || fail "unit lacks $setting"
done

finish
