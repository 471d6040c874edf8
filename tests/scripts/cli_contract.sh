#!/usr/bin/env bash
# The command-line contract that studies and scripts rely on: subcommands,
# --help and --version, exit codes, and the JSON keys issues name.
# Usage: cli_contract.sh TRITSIM_BINARY SOURCE_DIR
set -u
bin="$1"
src="$2"
# shellcheck source=lib/cli_checks.sh
source "$src/tests/scripts/lib/cli_checks.sh"

json_has() {  # file key.path...
  local file="$1"
  shift
  /usr/bin/python3 - "$file" "$@" <<'PY' || fail "JSON keys missing in $file"
import json, sys
doc = json.load(open(sys.argv[1]))
missing = []
for path in sys.argv[2:]:
    node = doc
    for part in path.split("."):
        if isinstance(node, list):
            node = node[0] if node else None
        if not isinstance(node, dict) or part not in node:
            missing.append(path)
            break
        node = node[part]
if missing:
    print("missing:", ", ".join(missing))
    sys.exit(1)
PY
}

# --version, --help of every subcommand.
expect_exit 0 "--version" "$bin" --version
grep -q "tritsim" "$tmp/out" || fail "--version prints no version"
for cmd in inspect trace run sweep; do
  expect_exit 0 "$cmd --help" "$bin" "$cmd" --help
  grep -q -- "--" "$tmp/out" || fail "$cmd --help lists no options"
done

# inspect with no files at all uses the embedded defaults (issue: foundation).
expect_exit 0 "inspect defaults" "$bin" inspect --json "$tmp/inspect.json"
json_has "$tmp/inspect.json" schema model.parameters model.weight_bytes model.kv_bytes_per_token \
  model.parameters_by_class.attention model.parameters_by_class.ffn \
  model.parameters_by_class.embedding model.parameters_by_class.head model.parameters_by_class.norm \
  model.weight_bytes_by_class.attention model.weight_bytes_by_class.head \
  arch.peak_ops_per_second arch.dram_peak_bytes_per_second arch.ridge_ops_per_byte

# Tied embeddings: the head class is 0 (wren-0.7b ties them).
"$bin" inspect --model "$src/models/wren-0.7b.yaml" --json "$tmp/wren.json" >/dev/null 2>&1
/usr/bin/python3 -c "
import json,sys; j=json.load(open('$tmp/wren.json'))
sys.exit(0 if j['model']['parameters_by_class']['head']==0 else 1)" || fail "tied head is not 0"

# run writes JSON with the keys the engine and energy issues name, and a CSV.
expect_exit 0 "run" "$bin" run --decode 2 --context 64 --set model.layers=2 -q \
  --json "$tmp/run.json" --csv "$tmp/run.csv" --vcd "$tmp/run.vcd"
json_has "$tmp/run.json" schema totals.cycles totals.seconds totals.tokens totals.tokens_per_second \
  totals.ops totals.energy_joules totals.joules_per_token totals.picojoules_per_op \
  phases.name phases.cycles phases.seconds phases.tokens \
  stalls.busy stalls.dram_wait stalls.sram_conflict stalls.vector_wait stalls.idle \
  dram.bytes_read dram.bytes_written dram.row_hit_rate dram.bandwidth_bytes_per_second \
  dram.refresh_fraction energy.arithmetic energy.sram energy.dram energy.decoder energy.leakage \
  layers.name layers.kind layers.cycles layers.ops layers.dram_bytes \
  layers.intensity_ops_per_byte layers.bound_cycles layers.regime
/usr/bin/python3 - "$tmp/run.json" <<'PY' || fail "run JSON sums"
import json, sys
j = json.load(open(sys.argv[1]))
s = j["stalls"]
assert sum(s.values()) == j["totals"]["cycles"], "stalls do not sum to totals.cycles"
e = j["energy"]
assert abs(sum(e.values()) - j["totals"]["energy_joules"]) <= 1e-12 * j["totals"]["energy_joules"]
assert all(l["regime"] in ("memory", "compute") for l in j["layers"])
PY
rows=$(($(wc -l <"$tmp/run.csv") - 1))
layers=$(/usr/bin/python3 -c "import json; print(len(json.load(open('$tmp/run.json'))['layers']))")
[ "$rows" -eq "$layers" ] || fail "CSV has $rows rows, JSON $layers layers"
head -1 "$tmp/run.vcd" | grep -q '^\$comment' || fail "VCD has no header"
grep -q '^\$enddefinitions' "$tmp/run.vcd" || fail "VCD has no definitions section"

# Exit codes: 2 command line, 3 bad input file, 4 simulation cannot complete.
expect_exit 2 "unknown command" "$bin" frobnicate
one_line_error "unknown command"
expect_exit 2 "unknown flag" "$bin" run --frobnicate
one_line_error "unknown flag"
expect_exit 2 "bad batch" "$bin" run --batch 0 --json "$tmp/no1.json"
one_line_error "bad batch"
[ ! -e "$tmp/no1.json" ] || fail "bad batch left an output file"
expect_exit 3 "missing model file" "$bin" run --model "$tmp/nope.yaml" --json "$tmp/no2.json"
one_line_error "missing model file"
grep -q "nope.yaml" "$tmp/err" || fail "missing file not named"
[ ! -e "$tmp/no2.json" ] || fail "missing model left an output file"
expect_exit 3 "unknown arch key" "$bin" run --set arch.array.fan_inn=64 --json "$tmp/no3.json"
grep -q "fan_in" "$tmp/err" || fail "unknown key gets no suggestion: $(cat "$tmp/err")"
expect_exit 4 "tile does not fit" "$bin" run --set arch.sram.capacity_kib=16 \
  --set arch.array.trees=512 --set arch.array.fan_in=512 --json "$tmp/no4.json"
one_line_error "tile does not fit"
grep -q "KiB" "$tmp/err" || fail "tile error names no size: $(cat "$tmp/err")"
[ ! -e "$tmp/no4.json" ] || fail "failed run left an output file"
expect_exit 2 "--trace with --model" "$bin" run --trace "$src/traces/wren-0.7b-decode4.trace" \
  --model "$src/models/wren-0.7b.yaml"

echo "cli_contract: $failures failures"
[ "$failures" -eq 0 ]
