#!/usr/bin/env bash
# Golden runs (common practice for end-to-end regression): every run listed in
# tests/golden/runs.txt must reproduce its reviewed JSON and per-layer CSV byte
# for byte. On a difference, prints the first differing keys; regenerate with
# scripts/update-goldens and explain the moved numbers in the commit message.
set -uo pipefail
BIN=$1
SRC=$2
OUT=$(mktemp -d)
trap 'rm -rf "$OUT"' EXIT
cd "$SRC"
failed=0
count=0
while read -r name args; do
  case "$name" in '' | '#'*) continue ;; esac
  count=$((count + 1))
  # shellcheck disable=SC2086  # the argument list is split on purpose
  if ! "$BIN" run $args -q --json "$OUT/$name.json" --csv "$OUT/$name.csv"; then
    echo "FAIL $name: run exited non-zero"
    failed=1
    continue
  fi
  for ext in json csv; do
    if ! python3 scripts/golden-diff "tests/golden/$name.$ext" "$OUT/$name.$ext"; then
      echo "FAIL $name.$ext differs from tests/golden/$name.$ext (first differences above)"
      failed=1
    fi
  done
done <tests/golden/runs.txt
[ "$count" -ge 6 ] || { echo "FAIL only $count golden runs listed"; failed=1; }
[ "$failed" -eq 0 ] && echo "all $count golden runs identical"
exit "$failed"
