# Shared by tests/cli/test_*.sh: run the binary, record what it printed, check it.
# Arguments of every script: $1 dewmargin binary, $2 tests/data directory, $3 source directory.
# Sourcing sets: bin (absolute), data, src, work (temporary, removed at exit), failures.
bin=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
data=$2
src=$3
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
failures=0

fail() {
  echo "FAIL: $*" >&2
  failures=$((failures + 1))
}

# Runs the binary with the given arguments; records stdout, stderr and the exit code
# without letting `set -e` stop the script on the expected non-zero exits.
run() {
  set +e
  "$bin" "$@" >"$work/out" 2>"$work/err"
  rc=$?
  set -e
}

expect_rc() {
  [[ $rc -eq $1 ]] || fail "$2: exit code $rc, expected $1 (stderr: $(head -c 400 "$work/err"))"
}

expect_line() {  # file, extended regex, description
  grep -Eq -- "$2" "$1" || fail "$3: no line matching '$2' in $(basename "$1"): $(head -c 600 "$1")"
}

# Ends the script: non-zero when an expectation was broken.
finish() {
  if ((failures)); then
    echo "$(basename "$0"): $failures expectation(s) broken" >&2
    exit 1
  fi
  echo "$(basename "$0"): all expectations met"
}
