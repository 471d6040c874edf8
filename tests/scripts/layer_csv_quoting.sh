#!/usr/bin/env bash
# The per-layer CSV (tritsim run --csv) is RFC 4180: an op name holding a
# comma, a double quote and 700 characters in all reads back unchanged, in
# one row of as many fields as the header, with Python's csv module
# (/usr/bin/python3, the reference reader). The trace is written by hand
# (docs/trace-format.md); op names may not hold spaces, '=' or '#'.
#
# usage: layer_csv_quoting.sh TRITSIM_BINARY SOURCE_DIR
set -uo pipefail
BIN="$1"
WORK="$(mktemp -d "${TMPDIR:-/tmp}/tritsim-csv-quoting.XXXXXX")"
trap 'rm -rf "$WORK"' EXIT
NAME_LENGTH=700
name="embed,x\"q\"$(head -c $((NAME_LENGTH - 10)) /dev/zero | tr '\0' 'n')"
[ "${#name}" -eq "$NAME_LENGTH" ] || { echo "FAIL: test name has ${#name} characters"; exit 1; }
cat >"$WORK/odd.trace" <<TRACE
tritsim-trace 1
model odd-names
workload prefill=0 decode=1 context=0 batch=1
step phase=decode index=0 tokens=1 batch=1 context=0
op layer=-1 name=$name kind=embed tensor=embedding weights=int8 m=1 n=64 k=0 heads=0 kv_heads=0 head_dim=0 context=0 causal=false act_bits=8 kv_bits=8 zero_fraction=0
op layer=-1 name=plain kind=embed tensor=embedding weights=int8 m=1 n=64 k=0 heads=0 kv_heads=0 head_dim=0 context=0 causal=false act_bits=8 kv_bits=8 zero_fraction=0
end
TRACE
if ! "$BIN" run --trace "$WORK/odd.trace" -q --csv "$WORK/odd.csv" 2>"$WORK/err"; then
  echo "FAIL: run exited non-zero: $(head -n1 "$WORK/err")"
  exit 1
fi
/usr/bin/python3 - "$WORK/odd.csv" "$name" <<'PY'
import csv, sys
with open(sys.argv[1], newline="", encoding="utf-8") as f:
    rows = list(csv.reader(f))
header, body = rows[0], rows[1:]
bad = [r for r in body if len(r) != len(header)]
names = [r[header.index("name")] for r in body]
if bad or names != [sys.argv[2], "plain"]:
    print(f"FAIL: {len(bad)} rows with a wrong field count; names read back: {[n[:20] for n in names]}")
    sys.exit(1)
print("layer_csv_quoting: op name with comma, quote and 700 characters read back intact")
PY
