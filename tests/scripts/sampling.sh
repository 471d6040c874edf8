#!/usr/bin/env bash
# Sampled simulation (tritsim run --sample, docs/performance.md): on the small
# validation workloads (wren-0.7b cut to 8 layers, on DDR4, LPDDR5 and HBM2E,
# prefill and decode, batch 1-8), every sampled total is within 1 % of the exact
# run, every phase within 2 %, the stated 99.7 % bound contains the exact value
# for at least 90 % of the (workload, figure) pairs, and the identities of an
# exact run hold (scripts/validate-sampling --check); with nothing left out the
# estimate equals the exact run figure for figure. Also: the JSON of a sampled
# run carries the sampling keys of the report contract and validates against
# docs/schemas/run.schema.json; the console prints the bound beside the figures;
# a sweep file with `sampling: true` runs its points sampled; --sample is refused
# with --trace, --vcd and --dram-log; an exact run has no sampling key.
# $1 = tritsim binary, $2 = source dir.
set -uo pipefail
BIN=$1
SRC=$2
PY=/usr/bin/python3
W=$(mktemp -d /tmp/tritsim-sampling-XXXXXX)
trap 'rm -rf "$W"' EXIT
failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }
export SYSTEMC_DISABLE_COPYRIGHT_MESSAGE=1

# 1. Sampled against exact (the comparison and the identities live in the script).
"$PY" "$SRC/scripts/validate-sampling" --bin "$BIN" --set small --check ||
  fail "validate-sampling --set small --check"

# 2. The JSON contract, the schema and the console.
for d in models configs traces; do ln -s "$SRC/$d" "$W/$d"; done
cd "$W" || exit 1
args=(run --model models/wren-0.7b.yaml --arch configs/heron-edge-ddr4.yaml --set model.layers=6
  --decode 12 --context 64)
"$BIN" "${args[@]}" --sample --json s.json >console.txt || fail "sampled run exited non-zero"
"$BIN" "${args[@]}" --json e.json -q || fail "exact run exited non-zero"
"$PY" - <<'PY' || fail "sampling keys of the JSON"
import json
s = json.load(open("s.json"))["sampling"]
assert s["detailed_steps"] == 6 and s["total_steps"] == 12, s  # 6 decode steps kept by default
b = s["relative_error_bound"]
assert 0 < b["cycles"] < 0.01 and 0 < b["energy_joules"] < 0.01, b
assert s["total_layers"] == 12 * 6 and s["detailed_layers"] == 6 * 4, s  # first, last + 2 sampled
assert "sampling" not in json.load(open("e.json"))
PY
"$PY" "$SRC/tests/scripts/lib/validate_json.py" "$SRC/docs/schemas/run.schema.json" s.json ||
  fail "a sampled run JSON does not validate against run.schema.json"
"$PY" - <<'PY' || fail "a sampled JSON without relative_error_bound is accepted"
import json
d = json.load(open("s.json"))
del d["sampling"]["relative_error_bound"]
json.dump(d, open("broken.json", "w"))
PY
"$PY" "$SRC/tests/scripts/lib/validate_json.py" --invalid "$SRC/docs/schemas/run.schema.json" \
  broken.json || fail "run.schema.json accepts a sampling section without its bound"
grep -Eq '^  time +[0-9]+ cycles \(\+-[0-9.]+%\)' console.txt ||
  fail "the console does not print the cycle bound: $(grep 'time ' console.txt)"
grep -Eq 'mJ total \(\+-[0-9.]+%\)' console.txt || fail "the console does not print the energy bound"
grep -q '^  sampled ' console.txt || fail "the console does not say the run was sampled"

# 2b. With nothing left out (6 steps <= 8 kept, 4 layers <= 2 + 2), the units partition
# the whole run, so the estimate is the exact run: every total, stall, event, DRAM count,
# energy and phase figure equal, and a zero bound.
small=(run --model models/wren-0.7b.yaml --set model.layers=4 --prefill 16 --decode 6)
"$BIN" "${small[@]}" --sample --json all-s.json -q || fail "sampled run (all kept) exited non-zero"
"$BIN" "${small[@]}" --json all-e.json -q || fail "exact run (all kept) exited non-zero"
"$PY" - <<'PY' || fail "a sampled run with nothing left out differs from the exact run"
import json
s, e = json.load(open("all-s.json")), json.load(open("all-e.json"))
for k in ["totals", "stalls", "events", "dram", "energy", "phases"]:
    assert s[k] == e[k], (k, s[k], e[k])
assert s["sampling"]["relative_error_bound"] == {"cycles": 0.0, "energy_joules": 0.0}
PY

# 3. A sweep with sampling: true.
cp "$SRC/models/wren-0.7b.yaml" model.yaml
cp "$SRC/configs/heron-edge-ddr4.yaml" arch.yaml
cat >sampled.yaml <<'YAML'
name: sampled
base:
  arch: arch.yaml
  model: model.yaml
  workload: {prefill: 0, decode: 6, context: 0, batch: 1}
axes:
  model.layers: [5]
  arch.array.trees: [32, 64]
sampling: true
YAML
"$BIN" sweep sampled.yaml --out sweep.csv -q || fail "sampled sweep exited non-zero"
for p in sweep.csv.points/*.json; do
  "$PY" -c 'import json,sys; assert json.load(open(sys.argv[1]))["sampling"]["total_steps"] == 6' \
    "$p" || fail "sweep point $p was not sampled"
done
sed 's/^sampling: true/sampling: yes/' sampled.yaml >bad.yaml
out=$("$BIN" sweep bad.yaml --out bad.csv -q 2>&1)
code=$?
[ "$code" -eq 3 ] && grep -q 'sampling' <<<"$out" && [ ! -e bad.csv ] ||
  fail "sampling: yes not refused with exit 3 naming the key (exit $code: $out)"

# 4. Refused combinations: one line, usage exit code (2), nothing written.
for extra in "--vcd a.vcd" "--dram-log a.log" ; do
  # shellcheck disable=SC2086
  out=$("$BIN" "${args[@]}" --sample $extra --json refused.json 2>&1)
  code=$?
  [ "$code" -eq 2 ] && [ ! -e refused.json ] && [ "$(wc -l <<<"$out")" -eq 1 ] ||
    fail "--sample $extra: exit $code, output: $out"
done
"$BIN" trace --model models/wren-0.7b.yaml --set model.layers=2 --decode 2 --out t.trace 2>/dev/null
out=$("$BIN" run --trace t.trace --sample --json refused.json 2>&1)
code=$?
[ "$code" -eq 2 ] && [ ! -e refused.json ] || fail "--sample --trace: exit $code, output: $out"

[ "$failures" -eq 0 ] && echo "sampling: all checks passed"
exit $((failures > 0))
