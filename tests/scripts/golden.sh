#!/usr/bin/env bash
# Golden runs (common practice for end-to-end regression): every run listed in
# tests/golden/runs.txt must reproduce its reviewed JSON and per-layer CSV byte
# for byte. On a difference, prints the first differing keys; regenerate with
# scripts/update-goldens and explain the moved numbers in the commit message.
# Runs happen in a scratch folder that links models/, configs/ and traces/ and
# name their outputs NAME.json and NAME.csv, as scripts/update-goldens does,
# so provenance.command is the same; provenance.commit is not compared
# (scripts/golden-diff: it changes with every commit).
set -uo pipefail
BIN=$1
SRC=$2
OUT=$(mktemp -d)
trap 'rm -rf "$OUT"' EXIT
for d in models configs traces; do ln -s "$SRC/$d" "$OUT/$d"; done
cd "$OUT"
failed=0
count=0
while read -r name args; do
  case "$name" in '' | '#'*) continue ;; esac
  count=$((count + 1))
  # shellcheck disable=SC2086  # the argument list is split on purpose
  if ! "$BIN" run $args -q --json "$name.json" --csv "$name.csv"; then
    echo "FAIL $name: run exited non-zero"
    failed=1
    continue
  fi
  for ext in json csv; do
    if ! python3 "$SRC/scripts/golden-diff" "$SRC/tests/golden/$name.$ext" "$name.$ext"; then
      echo "FAIL $name.$ext differs from tests/golden/$name.$ext (first differences above)"
      failed=1
    fi
  done
done <"$SRC/tests/golden/runs.txt"
[ "$count" -ge 6 ] || { echo "FAIL only $count golden runs listed"; failed=1; }
[ "$failed" -eq 0 ] && echo "all $count golden runs identical"
exit "$failed"
