#!/usr/bin/env bash
# Determinism: two identical runs write byte-identical JSON and CSV, and a
# run replaying a saved trace (tritsim trace, then run --trace) writes the
# same JSON and CSV as the run that generates the trace from --model
# (docs/trace-format.md: the simulator replays either source the same way).
#
# usage: determinism.sh TRITSIM_BINARY SOURCE_DIR
set -uo pipefail
BIN="$1"
SRC="$2"
WORK="$(mktemp -d "${TMPDIR:-/tmp}/tritsim-determinism.XXXXXX")"
trap 'rm -rf "$WORK"' EXIT
export SYSTEMC_DISABLE_COPYRIGHT_MESSAGE=1
MODEL="$SRC/models/wren-0.7b.yaml"
WORKLOAD=(--prefill 8 --decode 2 --context 16 --batch 2)
failures=0
fail() {
  echo "FAIL: $*"
  failures=$((failures + 1))
}

run_to() {
  local tag="$1"
  shift
  "$BIN" run "$@" --quiet --json "$WORK/$tag.json" --csv "$WORK/$tag.csv" 2>"$WORK/$tag.err" ||
    fail "$tag: exit $?: $(head -n1 "$WORK/$tag.err")"
}

same() {
  cmp -s "$WORK/$1" "$WORK/$2" ||
    fail "$1 and $2 differ: $(diff "$WORK/$1" "$WORK/$2" | head -n 6 | tr '\n' ' ')"
}

run_to first --model "$MODEL" "${WORKLOAD[@]}"
run_to second --model "$MODEL" "${WORKLOAD[@]}"
same first.json second.json
same first.csv second.csv

"$BIN" trace --model "$MODEL" "${WORKLOAD[@]}" --out "$WORK/w.trace" 2>"$WORK/trace.err" ||
  fail "trace: exit $?: $(head -n1 "$WORK/trace.err")"
run_to replay --trace "$WORK/w.trace"
same first.json replay.json
same first.csv replay.csv

[ -s "$WORK/first.json" ] || fail "first.json is empty"
echo "determinism: $failures failures"
[ "$failures" -eq 0 ]
