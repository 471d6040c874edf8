#!/usr/bin/env bash
# `tritsim compare`: a tiny study (two 2-layer variants of the 3B-class demo
# model, ternary and FP16) writes its table, the reference's ratios are 1,
# a second run runs 0 variants (resume), and bad study files give one-line
# errors with no output folder.
# $1 = tritsim binary, $2 = source dir.
set -uo pipefail
TRITSIM=$1
SRC=$2
# shellcheck source=lib/cli_checks.sh
source "$(dirname "$0")/lib/cli_checks.sh"

cat > "$tmp/tiny.yaml" <<YAML
name: tiny
reference: ternary
workload: {prefill: 4, decode: 2}
variants:
  - name: ternary
    model: $SRC/models/meadowlark-3b.yaml
    arch: $SRC/configs/heron-edge-ddr4.yaml
    set: {model.layers: 2, model.vocab: 512}
  - name: fp16
    model: $SRC/models/meadowlark-3b-fp16.yaml
    arch: $SRC/configs/heron-edge-ddr4.yaml
    set: {model.layers: 2, model.vocab: 512, arch.array.kind: fp16_mac}
YAML

expect_exit 0 "tiny study" "$TRITSIM" compare "$tmp/tiny.yaml" --out "$tmp/study" --jobs 2
cp "$tmp/out" "$tmp/table.txt"
grep -q "ran 2 variants (2 ok, 0 failed)" "$tmp/err" || fail "first run: $(cat "$tmp/err")"
for f in table.csv table.json runs.csv plots/ratios.svg plots/memory.svg; do
  [ -s "$tmp/study/$f" ] || fail "missing $f"
done
grep -q "decode_tokens_per_second" "$tmp/table.txt" || fail "console table lacks decode tok/s"

/usr/bin/python3 - "$tmp/study/table.csv" <<'PY' || fail "table.csv checks"
import csv, sys
rows = list(csv.DictReader(open(sys.argv[1])))
assert [r["variant"] for r in rows] == ["ternary", "fp16"], rows
ref = rows[0]
assert ref["reference"] == "yes"
ratios = [k for k in ref if k.startswith("ratio_")]
assert len(ratios) == 11, ratios
for k in ratios:  # the reference against itself: 1 (or empty when not applicable)
    assert ref[k] in ("", "1"), (k, ref[k])
fp16 = rows[1]
# Arithmetic: 16-bit KV entries over 8-bit ones, same context.
assert float(fp16["ratio_kv_bytes"]) == 2.0, fp16["ratio_kv_bytes"]
# Arithmetic: (16 bits / 1.6 bits per base-3 trit) = 10x for the projections;
# with embeddings, head (16 vs 8 bits) and norms the whole ratio is lower.
assert 2.0 < float(fp16["ratio_weight_bytes"]) < 10.0, fp16["ratio_weight_bytes"]
for r in rows:
    assert float(r["decode_tokens_per_second"]) > 0 and float(r["area_mm2"]) > 0, r
    assert r["decode_bound_by"] != "", r
PY

# Resume: everything is in runs.csv, so nothing runs again.
expect_exit 0 "rerun" "$TRITSIM" compare "$tmp/tiny.yaml" --out "$tmp/study" -q
expect_exit 0 "rerun" "$TRITSIM" compare "$tmp/tiny.yaml" --out "$tmp/study"
grep -q "ran 0 variants" "$tmp/err" || fail "second run ran variants: $(cat "$tmp/err")"
grep -q "2 already in" "$tmp/err" || fail "second run: $(cat "$tmp/err")"

# A changed variant runs again; the unchanged one does not.
sed 's/model.vocab: 512, arch/model.vocab: 256, arch/' "$tmp/tiny.yaml" > "$tmp/tiny-edit.yaml"
expect_exit 0 "one variant changed" "$TRITSIM" compare "$tmp/tiny-edit.yaml" --out "$tmp/study"
grep -q "ran 1 variants" "$tmp/err" || fail "changed variant: $(cat "$tmp/err")"

# Bad study files: one line, exit 3, no output folder.
bad() {  # name description sed-expression
  sed "$3" "$tmp/tiny.yaml" > "$tmp/$1.yaml"
  expect_exit 3 "$2" "$TRITSIM" compare "$tmp/$1.yaml" --out "$tmp/bad-$1"
  one_line_error "$2"
  [ ! -e "$tmp/bad-$1" ] || fail "$2: wrote $tmp/bad-$1"
}
bad typo "misspelt top key" 's/^variants:/varients:/'
grep -q "did you mean 'variants'" "$tmp/err" || fail "no suggestion: $(cat "$tmp/err")"
bad ref "unknown reference" 's/^reference: ternary/reference: ternery/'
grep -q "did you mean 'ternary'" "$tmp/err" || fail "no reference suggestion: $(cat "$tmp/err")"
bad vkey "misspelt variant key" 's/^    arch: /    arc: /'
grep -q "did you mean 'arch'" "$tmp/err" || fail "no variant-key suggestion: $(cat "$tmp/err")"
bad value "bad override value" 's/model.layers: 2, model.vocab: 512}/model.layers: 0}/'
grep -q "variants\[0\]" "$tmp/err" || fail "bad value not located: $(cat "$tmp/err")"
bad dup "duplicate variant" 's/name: fp16/name: ternary/'
expect_exit 2 "no study file" "$TRITSIM" compare
one_line_error "no study file"

[ "$failures" -eq 0 ]
