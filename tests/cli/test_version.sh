#!/usr/bin/env bash
# The version is written once, in the top-level CMakeLists.txt; every program prints that one.
set -euo pipefail
source "$(dirname "$0")/cli_lib.sh"

want=$(sed -nE 's/^project\(dewmargin VERSION ([0-9.]+).*/\1/p' "$src/CMakeLists.txt")
[[ -n $want ]] || fail "no project(... VERSION ...) in CMakeLists.txt"

run --version
expect_rc 0 "dewmargin --version"
[[ $(cat "$work/out") == "dewmargin $want" ]] || fail "dewmargin --version printed '$(cat "$work/out")', expected 'dewmargin $want'"

daemon=$(dirname "$bin")/../daemon/dewmargind
if [[ -x $daemon ]]; then
  out=$("$daemon" --version)
  [[ $out == "dewmargind $want" ]] || fail "dewmargind --version printed '$out', expected 'dewmargind $want'"
else
  fail "dewmargind not found beside the build tree at $daemon"
fi
# No literal version number is left in the sources of the programs.
if grep -rnE '"[0-9]+\.[0-9]+\.[0-9]+"' "$src/daemon" "$src/tools" --include=*.cpp --include=*.h >"$work/lit"; then
  fail "a literal version in the sources: $(head -3 "$work/lit")"
fi
finish
