# Helpers for script tests, sourced (not run: CMake registers only
# tests/scripts/*.sh). Sets $tmp (removed on exit) and $failures; a script
# ends with: [ "$failures" -eq 0 ].
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }

# Runs a command with stdout in $tmp/out and stderr in $tmp/err; fails
# unless it exits with the expected code.
expect_exit() {  # expected_code description command...
  local want="$1" what="$2"
  shift 2
  "$@" >"$tmp/out" 2>"$tmp/err"
  local got=$?
  [ "$got" -eq "$want" ] || fail "$what: exit $got, want $want ($(head -c 300 "$tmp/err"))"
}

# Fails unless the last expect_exit wrote exactly one line to stderr.
one_line_error() {  # description
  local lines
  lines=$(wc -l <"$tmp/err")
  [ "$lines" -eq 1 ] || fail "$1: stderr has $lines lines, want 1: $(cat "$tmp/err")"
}
