#!/usr/bin/env bash
# Determinism: two identical runs write byte-identical JSON and CSV, and a
# run replaying a saved trace (tritsim trace, then run --trace) writes the
# same JSON and CSV as the run that generates the trace from --model
# (docs/trace-format.md: the simulator replays either source the same way),
# apart from the provenance and resolved sections.
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

# Each run writes out.json and out.csv in its own folder, so the recorded
# command line (provenance.command) is the same, then they are moved to TAG.*.
run_to() {
  local tag="$1"
  shift
  mkdir -p "$WORK/$tag.d"
  (cd "$WORK/$tag.d" && "$BIN" run "$@" --quiet --json out.json --csv out.csv) \
    2>"$WORK/$tag.err" || fail "$tag: exit $?: $(head -n1 "$WORK/$tag.err")"
  mv "$WORK/$tag.d/out.json" "$WORK/$tag.json" 2>/dev/null
  mv "$WORK/$tag.d/out.csv" "$WORK/$tag.csv" 2>/dev/null
}

# The figures of two run JSONs, without provenance and resolved (a replay
# records its trace instead of the model, and its own command line).
same_figures() {
  /usr/bin/python3 - "$WORK/$1" "$WORK/$2" <<'PY2' || fail "$1 and $2 differ in their figures"
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:3])
for doc in (a, b):
    doc.pop("provenance", None)
    doc.pop("resolved", None)
sys.exit(0 if a == b else 1)
PY2
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
same_figures first.json replay.json
same first.csv replay.csv

[ -s "$WORK/first.json" ] || fail "first.json is empty"
echo "determinism: $failures failures"
[ "$failures" -eq 0 ]
