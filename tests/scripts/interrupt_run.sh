#!/usr/bin/env bash
# No lost or torn output when a run is stopped (README "Exit codes";
# sim/common/interrupt.h; sim/common/atomic_file.h):
#  - SIGINT mid-run: exit 130, one line "tritsim: interrupted ...", and the
#    --json / --csv targets keep their old content (nothing half-written);
#  - SIGKILL mid-run: the old files are still there, byte for byte;
#  - a run that completes replaces the old files with a complete JSON
#    document (parsed by python3) and a CSV with one row per JSON layer.
# "Mid-run" is a 13B-class model decoding 64 tokens, which simulates for
# far longer than the two seconds the test waits before signalling; the
# test checks the process was still running when signalled.
#
# usage: interrupt_run.sh TRITSIM_BINARY SOURCE_DIR
set -uo pipefail
BIN="$1"
SRC="$2"
WORK="$(mktemp -d "${TMPDIR:-/tmp}/tritsim-interrupt.XXXXXX")"
PID=""
cleanup() {
  if [ -n "$PID" ]; then kill -KILL "$PID" 2>/dev/null; fi
  rm -rf "$WORK"
}
trap cleanup EXIT
export SYSTEMC_DISABLE_COPYRIGHT_MESSAGE=1
PY=/usr/bin/python3
[ -x "$PY" ] || PY=python3
LONG_RUN=(run --model "$SRC/models/condor-13b.yaml" --decode 64 --context 256 --quiet)
WAIT_BEFORE_SIGNAL_S=2
failures=0
fail() {
  echo "FAIL: $*"
  failures=$((failures + 1))
}

# Old outputs a user might already have: a valid JSON document and a CSV.
make_old_outputs() {
  printf '{"old_report": true}\n' >"$WORK/run.json"
  printf 'old,csv\n1,2\n' >"$WORK/layers.csv"
  cp "$WORK/run.json" "$WORK/run.json.orig"
  cp "$WORK/layers.csv" "$WORK/layers.csv.orig"
}

outputs_unchanged() {
  cmp -s "$WORK/run.json" "$WORK/run.json.orig" || fail "$1: run.json changed"
  cmp -s "$WORK/layers.csv" "$WORK/layers.csv.orig" || fail "$1: layers.csv changed"
  local temps
  temps=$(find "$WORK" -name '*.tmp.*')
  [ -z "$temps" ] || fail "$1: temporary output files left behind: $temps"
}

# Starts the long run in the background and signals it after a pause.
# Sets RC to its exit status.
run_and_signal() {
  local signal="$1"
  "$BIN" "${LONG_RUN[@]}" --json "$WORK/run.json" --csv "$WORK/layers.csv" \
    >"$WORK/stdout" 2>"$WORK/stderr" &
  PID=$!
  sleep "$WAIT_BEFORE_SIGNAL_S"
  if ! kill -0 "$PID" 2>/dev/null; then
    fail "$signal: the run ended before the signal; the test needs a longer run"
  fi
  kill -s "$signal" "$PID" 2>/dev/null
  wait "$PID"
  RC=$?
  PID=""
}

# SIGINT: a clean stop with exit 130 and one line.
make_old_outputs
run_and_signal INT
[ "$RC" -eq 130 ] || fail "SIGINT: exit $RC, expected 130"
[ "$(wc -l <"$WORK/stderr")" -eq 1 ] || fail "SIGINT: stderr is not one line: $(head -c 300 "$WORK/stderr")"
grep -q '^tritsim: interrupted (SIGINT) ' "$WORK/stderr" ||
  fail "SIGINT: stderr lacks 'tritsim: interrupted (SIGINT)': $(head -n1 "$WORK/stderr")"
outputs_unchanged SIGINT

# SIGTERM: the default action ends the run at once; the old files survive.
make_old_outputs
run_and_signal TERM
[ "$RC" -eq 143 ] || fail "SIGTERM: exit $RC, expected 143 (terminated)"
outputs_unchanged SIGTERM

# SIGKILL: no handler runs; the old files must survive untouched.
make_old_outputs
run_and_signal KILL
[ "$RC" -eq 137 ] || fail "SIGKILL: exit $RC, expected 137 (killed)"
outputs_unchanged SIGKILL

# A run that completes replaces both files with complete new ones.
make_old_outputs
"$BIN" run --model "$SRC/models/wren-0.7b.yaml" --decode 1 --quiet \
  --json "$WORK/run.json" --csv "$WORK/layers.csv" 2>"$WORK/stderr"
RC=$?
[ "$RC" -eq 0 ] || fail "complete run: exit $RC: $(head -n1 "$WORK/stderr")"
"$PY" - "$WORK/run.json" "$WORK/layers.csv" <<'PYEOF' || fail "complete run: outputs not complete"
import csv, json, sys
report = json.load(open(sys.argv[1]))
rows = list(csv.DictReader(open(sys.argv[2])))
assert "old_report" not in report, "old JSON still in place"
assert len(rows) == len(report["layers"]) > 0, (len(rows), len(report["layers"]))
PYEOF

echo "interrupt_run: $failures failures"
[ "$failures" -eq 0 ]
