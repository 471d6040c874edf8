#!/usr/bin/env bash
# `tritsim datapath` end to end: a default run is bit-exact, --json has the
# documented keys, a narrow accumulator reports wrap-around, and bad options
# are one-line errors with a non-zero exit and no output file.
# Usage: datapath_cli.sh TRITSIM_BINARY SOURCE_DIR
set -u
bin="$1"
src="$2"
# shellcheck source=lib/cli_checks.sh
source "$src/tests/scripts/lib/cli_checks.sh"

# Default run on the embedded design: bit-exact, JSON with every documented key.
expect_exit 0 "default run" "$bin" datapath --json "$tmp/dp.json"
grep -q "bit-exact" "$tmp/out" || fail "default run is not bit-exact: $(cat "$tmp/out")"
/usr/bin/python3 - "$tmp/dp.json" <<'PY' || fail "datapath JSON"
import json, sys
j = json.load(open(sys.argv[1]))
keys = {
    "": ["schema", "shape", "seed", "design", "weights", "accumulator", "result"],
    "shape": ["m", "k", "n"],
    "design": ["name", "fan_in", "adder_levels", "accumulator_bits", "packing"],
    "weights": ["trits", "zero_fraction", "gamma", "packed_bytes", "bits_per_trit"],
    "accumulator": ["max_magnitude", "bits_for_max_magnitude", "bits_needed_worst_case",
                    "overflow_events", "outputs_with_overflow"],
    "result": ["outputs", "bit_exact", "matches_reference_modulo_2_pow_a", "first_mismatch"],
}
for section, names in keys.items():
    node = j[section] if section else j
    missing = [n for n in names if n not in node]
    assert not missing, f"{section or 'top'}: missing {missing}"
assert j["schema"] == "tritsim.datapath/1"
assert j["result"]["bit_exact"] is True and j["result"]["first_mismatch"] is None
assert j["accumulator"]["overflow_events"] == 0
# 2048 x 256 trits at 5 per byte (arithmetic): 104858 bytes, 1.6 bits per trit.
assert j["weights"]["packed_bytes"] == (2048 * 256 + 4) // 5
assert abs(j["weights"]["bits_per_trit"] - 1.6) < 1e-4
# ceil(log2(128 * 2048 + 1)) + 1 = 20 (arithmetic).
assert j["accumulator"]["bits_needed_worst_case"] == 20
PY

# Same seed, same report (determinism).
"$bin" datapath --json "$tmp/dp2.json" >/dev/null 2>&1
cmp -s "$tmp/dp.json" "$tmp/dp2.json" || fail "two runs with the same seed differ"

# two_bit packing: 2 bits per trit.
expect_exit 0 "two_bit" "$bin" datapath --set arch.packing.format=two_bit --k 100 --json "$tmp/tb.json"
/usr/bin/python3 -c "
import json,sys; j=json.load(open('$tmp/tb.json'))
sys.exit(0 if j['weights']['bits_per_trit']==2.0 and j['design']['packing']=='two_bit' else 1)" ||
  fail "two_bit is not 2 bits per trit"

# A 12-bit accumulator on K = 4096 (needs 21 bits) wraps: reported, exit 0
# because every output still equals the reference modulo 2^12.
expect_exit 0 "narrow accumulator" "$bin" datapath --set arch.array.accumulator_bits=12 \
  --m 2 --k 4096 --n 8 --json "$tmp/narrow.json"
/usr/bin/python3 -c "
import json,sys; r=json.load(open('$tmp/narrow.json'))
ok = (r['result']['bit_exact'] is False and r['result']['matches_reference_modulo_2_pow_a']
      and r['accumulator']['overflow_events'] > 0 and r['result']['first_mismatch'] is not None)
sys.exit(0 if ok else 1)" || fail "narrow accumulator: overflow not reported"

# run and inspect warn, on one stderr line, when the accumulator is too narrow.
expect_exit 0 "inspect narrow" "$bin" inspect --set arch.array.accumulator_bits=16
grep -q "^tritsim: warning: array.accumulator_bits = 16" "$tmp/err" || fail "inspect: no warning"
one_line_error "inspect warning"
expect_exit 0 "inspect default" "$bin" inspect
[ ! -s "$tmp/err" ] || fail "inspect on the default design warns: $(cat "$tmp/err")"

# Bad options: one line, exit 2, no output file.
for bad in "--k 0" "--k 5000" "--m -1" "--k abc" "--m 4096 --k 4096 --n 4096" "--seed -3" \
  "--set model.layers=2"; do
  # shellcheck disable=SC2086
  expect_exit 2 "datapath $bad" "$bin" datapath $bad --json "$tmp/bad.json"
  one_line_error "datapath $bad"
  [ ! -e "$tmp/bad.json" ] || fail "datapath $bad left an output file"
done
expect_exit 2 "--k 0 names the option" "$bin" datapath --k 0
grep -q -- "--k: .*got 0" "$tmp/err" || fail "--k 0: error does not name the option: $(cat "$tmp/err")"
expect_exit 3 "bad arch key" "$bin" datapath --set arch.array.accumulator_bits=7
one_line_error "bad arch key"
expect_exit 0 "--help" "$bin" datapath --help
grep -q -- "--seed" "$tmp/out" || fail "datapath --help lists no --seed"

echo "datapath_cli: $failures failures"
[ "$failures" -eq 0 ]
