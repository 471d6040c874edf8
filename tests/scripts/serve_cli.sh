#!/usr/bin/env bash
# tritsim serve end to end (docs/serving.md), on wren-0.7b cut to 4 blocks so
# that every engine run is quick:
#  1. at a vanishing rate and one request at a time, TTFT equals the prefill
#     time and TPOT the decode step time that `run` gives for the same lengths
#     (definitions of TTFT and TPOT; common practice), within 2%;
#  2. with the DRAM capacity cut so that the KV cache binds, the run never
#     holds more KV cache than the capacity (it reports its peak) and a
#     request that can never fit is refused with a message naming both sizes;
#  3. the same command gives the same JSON byte for byte (seeded arrivals);
#  4. bad input is one line and a non-zero exit, with no output written.
set -uo pipefail
BIN=$1
SRC=$2
OUT=$(mktemp -d)
trap 'rm -rf "$OUT"' EXIT
cd "$SRC"
failed=0
fail() { echo "FAIL: $*"; failed=1; }
M=(--model models/wren-0.7b.yaml --set model.layers=4 --arch configs/heron-edge-ddr4.yaml)

# 1. Vanishing rate.
"$BIN" serve "${M[@]}" --rate 0.001 --count 3 --prompt-tokens 64 --output-tokens 8 --max-batch 1 \
  --validate-steps 2 --json "$OUT/idle.json" >/dev/null 2>&1 || fail "serve at a vanishing rate"
"$BIN" run "${M[@]}" --prefill 64 --decode 7 -q --json "$OUT/run.json" || fail "run"
/usr/bin/python3 - "$OUT" <<'PY' || failed=1
import json, sys
out = sys.argv[1]
s, r = json.load(open(f"{out}/idle.json")), json.load(open(f"{out}/run.json"))
phase = {p["name"]: p for p in r["phases"]}
checks = [("TTFT", s["latency"]["ttft_seconds"]["p50"], phase["prefill"]["seconds"]),
          ("TPOT", s["latency"]["tpot_seconds"]["p50"], phase["decode"]["seconds"] / 7)]
ok = True
for name, got, want in checks:
    if abs(got / want - 1) > 0.02:
        print(f"FAIL {name} at a vanishing rate: serve {got:.6g} s, run {want:.6g} s")
        ok = False
if s["latency"]["queue_seconds"]["p99"] != 0:
    print("FAIL: a request waited at a vanishing rate")
    ok = False
sys.exit(0 if ok else 1)
PY

# The JSON Schema of the serve output (docs/schemas/serve.schema.json),
# checked with Debian's python3-jsonschema; a corrupted copy is rejected.
V="$SRC/tests/scripts/lib/validate_json.py"
/usr/bin/python3 "$V" docs/schemas/serve.schema.json "$OUT/idle.json" || fail "serve JSON schema"
/usr/bin/python3 - "$OUT/idle.json" "$OUT/corrupt.json" <<'PY'
import json, sys
j = json.load(open(sys.argv[1]))
j["latency"]["ttft_seconds"].pop("p99")
json.dump(j, open(sys.argv[2], "w"))
PY
/usr/bin/python3 "$V" --invalid docs/schemas/serve.schema.json "$OUT/corrupt.json" >/dev/null ||
  fail "the serve schema accepts a JSON without latency.ttft_seconds.p99"

# 2. KV capacity binds: 0.12 GiB of DRAM leaves room for about 4500 KV tokens
# beside wren's weights cut to 4 blocks (4 KiB of KV cache per token), so of
# 24 requests of 300 + 100 tokens about 11 run at once, not 24; a request of
# 200000 tokens can never fit.
printf 'arrival_seconds,prompt_tokens,output_tokens\n' >"$OUT/req.csv"
for i in $(seq 10 33); do printf '0.%02d,300,100\n' "$i" >>"$OUT/req.csv"; done
printf '0.5,200000,10\n' >>"$OUT/req.csv"
"$BIN" serve "${M[@]}" --set arch.dram.capacity_gib=0.12 --requests "$OUT/req.csv" --max-batch 32 \
  --prefill-tokens 512 --validate-steps 0 --json "$OUT/kv.json" >/dev/null 2>"$OUT/kv.err" ||
  fail "serve, KV-bound: $(cat "$OUT/kv.err")"
grep -q "refused 1 request(s) that can never fit, e.g. request 24" "$OUT/kv.err" ||
  fail "no refusal message: $(cat "$OUT/kv.err")"
/usr/bin/python3 - "$OUT/kv.json" <<'PY' || failed=1
import json, sys
j = json.load(open(sys.argv[1]))
c = j["capacity"]
ok = c["kv_reserved_peak_bytes"] <= c["kv_capacity_bytes"] and c["kv_peak_bytes"] <= c["kv_reserved_peak_bytes"]
ok = ok and j["serve"]["refused"] == 1 and j["serve"]["requests"] == 24
held = 400 * c["kv_bytes_per_token"]
if not ok or c["kv_capacity_bytes"] >= 24 * held or j["latency"]["queue_seconds"]["p99"] <= 0:
    print(f"FAIL KV capacity: {c}, serve {j['serve']}, queue {j['latency']['queue_seconds']}")
    sys.exit(1)
PY

# 3. Deterministic (skipped under a sanitized binary: two more full serves).
grep -qa __asan_init "$BIN" && sanitized=1 || sanitized=0
for n in a b; do
  [ "$sanitized" -eq 1 ] && break
  "$BIN" serve "${M[@]}" --rate 20 --count 30 --prompt-tokens uniform:16:96 \
    --output-tokens uniform:4:24 --schedule chunked --chunk-tokens 64 --validate-steps 2 \
    --json "$OUT/det-$n.json" >/dev/null 2>&1 || fail "serve chunked $n"
done
same=0
[ "$sanitized" -eq 1 ] || /usr/bin/python3 - "$OUT/det-a.json" "$OUT/det-b.json" <<'PY' || same=1
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:3])
for j in (a, b):
    j["provenance"].pop("command")  # names the two --json paths
sys.exit(0 if a == b else 1)
PY
[ "$same" -eq 0 ] || fail "two identical serve runs differ"

# 4. Bad input.
expect_bad() {  # code text args...
  local code=$1 text=$2
  shift 2
  "$BIN" serve "$@" --json "$OUT/bad.json" >/dev/null 2>"$OUT/bad.err"
  local got=$?
  [ "$got" -eq "$code" ] || fail "serve $*: exit $got, expected $code"
  grep -q -- "$text" "$OUT/bad.err" || fail "serve $*: no '$text' in: $(cat "$OUT/bad.err")"
  [ "$(wc -l <"$OUT/bad.err")" -eq 1 ] || fail "serve $*: more than one line"
  [ ! -e "$OUT/bad.json" ] || fail "serve $*: wrote output"
}
expect_bad 2 "give either --requests FILE or --rate R" "${M[@]}"
expect_bad 2 "--rate: expected a positive number, got '0'" "${M[@]}" --rate 0
expect_bad 2 "--schedule: 'fifo' is not allowed, allowed prefill-first | chunked" "${M[@]}" --rate 1 --schedule fifo
expect_bad 2 "--prompt-tokens 'uniform:9:3' is not a length" "${M[@]}" --rate 1 --prompt-tokens uniform:9:3
expect_bad 2 "--find-max-rate needs a target" "${M[@]}" --rate 1 --find-max-rate
printf 'arrival_seconds,prompt_tokens,output_tokens\n0.5,12,x\n' >"$OUT/badreq.csv"
expect_bad 3 "badreq.csv:2: output_tokens: 'x' is not a whole number >= 1" "${M[@]}" --requests "$OUT/badreq.csv"

[ "$failed" -eq 0 ] && echo "serve: idle latencies match run, KV capacity holds, deterministic, bad input refused"
exit "$failed"
