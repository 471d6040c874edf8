#!/usr/bin/env bash
# The report formats have JSON Schemas (docs/schemas/, docs/report-format.md),
# checked with a general-purpose validator (Debian's python3-jsonschema):
# every golden run JSON and the point JSONs of a tiny sweep validate against
# run.schema.json; inspect JSONs (prefill and decode, decode only, and a
# workload that cannot run: bounds.unavailable) against inspect.schema.json;
# a sweep CSV header against sweep-columns.json. Corrupted documents must be
# rejected, and a key added by a future tritsim must not be.
# $1 = tritsim binary, $2 = source dir.
set -uo pipefail
BIN=$1
SRC=$2
PY=/usr/bin/python3
S="$SRC/docs/schemas"
V="$SRC/tests/scripts/lib/validate_json.py"
W=$(mktemp -d /tmp/tritsim-schemas-XXXXXX)
trap 'rm -rf "$W"' EXIT
failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }

[ -x "$PY" ] || { echo "FAIL: $PY not found (Debian's python3; scripts/setup installs it)"; exit 1; }
if ! "$PY" -c 'from jsonschema import Draft202012Validator' 2>/dev/null; then
  echo "FAIL: python3-jsonschema (>= 4.0, Draft 2020-12) is not importable by $PY;" \
    "install it with scripts/setup (apt-get install python3-jsonschema)"
  exit 1
fi

valid() { "$PY" "$V" "$@" || fail "expected valid: ${*: -1}"; }
invalid() { "$PY" "$V" --invalid "$@" || fail "expected rejected: ${*: -1}"; }
# corrupt IN OUT PYTHON: OUT is IN (a JSON document d) after the statement.
corrupt() {
  "$PY" - "$@" <<'PY' || fail "cannot write $2"
import json, sys
d = json.load(open(sys.argv[1]))
exec(sys.argv[3])
json.dump(d, open(sys.argv[2], "w"))
PY
}

# 1. Golden run JSONs.
goldens=("$SRC"/tests/golden/*.json)
[ "${#goldens[@]}" -ge 6 ] || fail "only ${#goldens[@]} golden JSONs found"
"$PY" "$V" "$S/run.schema.json" "${goldens[@]}" || fail "a golden run JSON does not validate"

# 2. Inspect JSONs; the runs happen in a scratch folder that links the inputs.
for d in models configs traces; do ln -s "$SRC/$d" "$W/$d"; done
cd "$W" || exit 1
export SYSTEMC_DISABLE_COPYRIGHT_MESSAGE=1
insp=(inspect --model models/meadowlark-3b.yaml --arch configs/osprey-card-hbm2e.yaml
  --set model.layers=2)
"$BIN" "${insp[@]}" --prefill 64 --decode 4 --json both.json >/dev/null || fail "inspect (prefill) exited non-zero"
"$BIN" "${insp[@]}" --decode 4 --json decode.json >/dev/null || fail "inspect (decode) exited non-zero"
"$BIN" "${insp[@]}" --prefill 64 --decode 4 --set arch.sram.capacity_kib=16 --json na.json >/dev/null ||
  fail "inspect (unavailable) exited non-zero"
"$PY" - <<'PY' || fail "inspect JSONs do not cover the three cases"
import json
b = json.load(open("both.json"))["bounds"]
assert "prefill_bound_by" in b and "decode_bound_by" in b, b
b = json.load(open("decode.json"))["bounds"]
assert "decode_bound_by" in b and "prefill_bound_by" not in b, b
assert "unavailable" in json.load(open("na.json"))["bounds"]
PY
valid "$S/inspect.schema.json" both.json decode.json na.json

# 3. A tiny sweep: its CSV header and its point JSONs.
cp "$SRC/models/wren-0.7b.yaml" model.yaml
cp "$SRC/configs/heron-edge-ddr4.yaml" arch.yaml
cat >tiny.yaml <<'YAML'
name: tiny
base:
  arch: arch.yaml
  model: model.yaml
  workload: {prefill: 0, decode: 1, context: 0, batch: 1}
axes:
  model.layers: [2]
  arch.array.trees: [32, 64]
YAML
"$BIN" sweep tiny.yaml --out sweep.csv -q || fail "tiny sweep exited non-zero"
valid --csv-header "$S/sweep-columns.json" sweep.csv
points=(sweep.csv.points/*.json)
[ -e "${points[0]}" ] || fail "the tiny sweep wrote no point JSON"
[ -e "${points[0]}" ] && valid "$S/run.schema.json" "${points[@]}"

# 4. Corrupted documents are rejected.
G="$SRC/tests/golden/ddr4-wren-prefill-decode.json"
corrupt "$G" cycles-string.json 'd["totals"]["cycles"] = str(d["totals"]["cycles"])'
corrupt "$G" no-phases.json 'del d["phases"]'
corrupt "$G" bound-by-gpu.json 'd["phases"][0]["bound_by"] = "gpu"'
corrupt "$G" phase-name.json 'd["phases"][0]["name"] = "warmup"'
corrupt "$G" no-totals-key.json 'del d["totals"]["joules_per_token"]'
corrupt "$G" layer-regime.json 'd["layers"][0]["regime"] = "io"'
corrupt "$G" layer-regime-mismatch.json \
  'l = d["layers"][0]; l["bound_by"] = "vector_unit"; l["regime"] = "memory"'
corrupt "$G" layer-no-bound-by.json 'del d["layers"][-1]["bound_by"]'
corrupt "$G" schema-string.json 'd["schema"] = "tritsim.run/2"'
for f in cycles-string no-phases bound-by-gpu phase-name no-totals-key layer-regime \
  layer-regime-mismatch layer-no-bound-by schema-string; do
  invalid "$S/run.schema.json" "$f.json"
done
corrupt both.json i-null-bound-by.json 'd["bounds"]["decode_bound_by"] = None'
corrupt both.json i-bound-gpu.json 'd["bounds"]["prefill_bound_by"] = "gpu"'
corrupt both.json i-string-rate.json 'd["bounds"]["decode_tokens_per_second"]["tree_array"] = "fast"'
corrupt both.json i-no-resource.json 'del d["bounds"]["decode_tokens_per_second"]["sram_ports"]'
corrupt both.json i-no-capacity-key.json 'del d["capacity"]["max_kv_tokens"]'
corrupt both.json i-empty-bounds.json 'd["bounds"] = {}'
corrupt na.json i-unavailable-and-bounds.json \
  'd["bounds"]["decode_bound_by"] = "tree_array"'
for f in i-null-bound-by i-bound-gpu i-string-rate i-no-resource i-no-capacity-key \
  i-empty-bounds i-unavailable-and-bounds; do
  invalid "$S/inspect.schema.json" "$f.json"
done
sed '1s/,status,/,/' sweep.csv >no-status.csv
sed '1s/^id,/ident,/' sweep.csv >no-id.csv
invalid --csv-header "$S/sweep-columns.json" no-status.csv
invalid --csv-header "$S/sweep-columns.json" no-id.csv

# 5. Keys a future tritsim adds do not break the schemas.
corrupt "$G" extra-keys.json \
  'd["future"] = {"x": 1}; d["totals"]["future_figure"] = 1.5; d["layers"][0]["future"] = "y"'
valid "$S/run.schema.json" extra-keys.json
corrupt both.json i-extra-keys.json 'd["future"] = 1; d["capacity"]["future_bytes"] = 2.0'
valid "$S/inspect.schema.json" i-extra-keys.json
sed '1s/$/,future_column/' sweep.csv >extra-column.csv
valid --csv-header "$S/sweep-columns.json" extra-column.csv

[ "$failures" -eq 0 ] && echo "ok: run, inspect and sweep outputs match docs/schemas/"
[ "$failures" -eq 0 ]
