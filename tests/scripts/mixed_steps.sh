#!/usr/bin/env bash
# Mixed steps (trace format version 2, docs/trace-format.md):
#  1. a mixed step whose sequences are all alike simulates exactly like the
#     uniform step of the same batch (same totals, cycles and energy);
#  2. attention streams each sequence's own cache once per step: the K bytes
#     that attn.scores reads in one layer are the sum over sequences of
#     keys x kv_heads x head_dim x kv_bits / 8 (arithmetic on the model);
#  3. a version-1 trace still replays byte-identically (the golden runs
#     check that; here the uniform trace's run equals the generated run).
set -uo pipefail
BIN=$1
SRC=$2
OUT=$(mktemp -d)
trap 'rm -rf "$OUT"' EXIT
cd "$SRC"
failed=0
fail() { echo "FAIL: $*"; failed=1; }
M=(--model models/wren-0.7b.yaml --set model.layers=2)
A=(--arch configs/heron-edge-ddr4.yaml)

"$BIN" trace "${M[@]}" --decode 1 --context 300 --batch 3 --out "$OUT/uniform.trace" 2>/dev/null ||
  fail "trace uniform"
"$BIN" trace "${M[@]}" --mix 1@300,1@300,1@300 --out "$OUT/alike.trace" 2>/dev/null ||
  fail "trace alike"
"$BIN" run --trace "$OUT/uniform.trace" "${A[@]}" -q --json "$OUT/uniform.json" || fail "run uniform"
"$BIN" run --trace "$OUT/alike.trace" "${A[@]}" -q --json "$OUT/alike.json" || fail "run alike"
"$BIN" run "${M[@]}" "${A[@]}" --decode 1 --context 300 --batch 3 -q --json "$OUT/generated.json" ||
  fail "run generated"
"$BIN" trace "${M[@]}" --mix 1@100,1@300 --out "$OUT/mixed.trace" 2>/dev/null || fail "trace mixed"
"$BIN" run --trace "$OUT/mixed.trace" "${A[@]}" -q --json "$OUT/mixed.json" --csv "$OUT/mixed.csv" ||
  fail "run mixed"

/usr/bin/python3 - "$OUT" <<'PY' || failed=1
import csv, json, sys
out = sys.argv[1]
load = lambda name: json.load(open(f"{out}/{name}.json"))
uniform, alike, generated = load("uniform"), load("alike"), load("generated")
ok = True
for key in ("cycles", "energy_joules", "ops"):
    if not (uniform["totals"][key] == alike["totals"][key] == generated["totals"][key]):
        print(f"FAIL totals.{key}: uniform {uniform['totals'][key]}, mixed alike "
              f"{alike['totals'][key]}, generated {generated['totals'][key]}")
        ok = False
if uniform["dram"] != alike["dram"]:
    print("FAIL dram section differs between the uniform and the alike mixed step")
    ok = False
# wren-0.7b: kv_heads 4, head_dim 128, kv_bits 8 (models/wren-0.7b.yaml).
expected = (101 + 301) * 4 * 128
rows = [r for r in csv.DictReader(open(f"{out}/mixed.csv"))
        if r["name"] == "attn.scores" and r["layer"] == "0"]
got = sum(int(r["dram_bytes"]) for r in rows)
if got != expected:
    print(f"FAIL attn.scores of layer 0 read {got} bytes, expected (101 + 301) x 4 x 128 = {expected}")
    ok = False
mixed = load("mixed")
if mixed["phases"][0]["tokens"] != 2 or mixed["phases"][0]["name"] != "decode":
    print(f"FAIL the mixed decode step: {mixed['phases'][0]}")
    ok = False
sys.exit(0 if ok else 1)
PY
[ "$failed" -eq 0 ] && echo "mixed steps: alike = uniform, per-sequence KV streams as computed"
exit "$failed"
