#!/usr/bin/env bash
# tritsim sweep on the command line: dry-run listing, one-line errors with
# exit codes (3 bad sweep file, 2 bad command line), Pareto extraction from a
# hand-made CSV, plots as well-formed SVG, Slurm script generation.
# $1 = tritsim binary, $2 = source dir.
set -euo pipefail
TRITSIM=$1
SRC=$2
W=$(mktemp -d /tmp/tritsim-sweepcli-XXXXXX)
trap 'rm -rf "$W"' EXIT
fail() { echo "FAIL: $*" >&2; exit 1; }

# expect CODE PATTERN CMD...: CMD exits CODE and its stderr is one line matching PATTERN.
expect() {
  local code=$1 pattern=$2; shift 2
  local rc=0
  "$@" >"$W/out" 2>"$W/err" || rc=$?
  [ "$rc" -eq "$code" ] || fail "$* exited $rc, expected $code: $(cat "$W/err")"
  [ "$(wc -l < "$W/err")" -eq 1 ] || fail "$*: stderr is not one line: $(cat "$W/err")"
  grep -qF -- "$pattern" "$W/err" || fail "$*: stderr lacks '$pattern': $(cat "$W/err")"
}

# (5) dry-run: one line per point, nothing run, no output files.
n=$("$TRITSIM" sweep "$SRC/configs/sweeps/wren-trees-by-batch.yaml" --dry-run -q | wc -l)
[ "$n" -eq 12 ] || fail "dry-run of the small sweep listed $n points, expected 12"
n=$("$TRITSIM" sweep "$SRC/configs/sweeps/wren-trees-by-batch.yaml" --dry-run --shard 1/5 -q | wc -l)
[ "$n" -eq 3 ] || fail "shard 1/5 of 12 points listed $n, expected 3 (indices 1, 6, 11)"
n=$("$TRITSIM" sweep "$SRC/configs/sweeps/heron-packing-by-sram.yaml" --dry-run -q | wc -l)
[ "$n" -eq 18 ] || fail "packing sweep: $n points after the area constraint, expected 18"

# (4) unknown axis key: exit 3 naming file, line and the nearest key.
cat > "$W/typo.yaml" <<YAML
name: typo
axes:
  workload.batch: [1, 4]
  arch.array.tres: [32, 64]
YAML
expect 3 "typo.yaml:4: axes.arch.array.tres:" "$TRITSIM" sweep "$W/typo.yaml" --out "$W/t.csv"
grep -qF "did you mean 'arch.array.trees'?" "$W/err" || fail "no suggestion: $(cat "$W/err")"
[ ! -e "$W/t.csv" ] || fail "a bad sweep file left an output CSV"

# Command-line mistakes: exit 2.
S="$SRC/configs/sweeps/wren-trees-by-batch.yaml"
expect 2 "--shard 2/2: expected I/N" "$TRITSIM" sweep "$S" --shard 2/2 --dry-run
expect 2 "--out CSV is required" "$TRITSIM" sweep "$S"
expect 2 "unrecognised option" "$TRITSIM" sweep "$S" --jbos 2
printf 'id,x,status\n' > "$W/exists.csv"
expect 2 "exists; pass --resume" "$TRITSIM" sweep "$S" --out "$W/exists.csv"

# (3, CLI) Pareto of a hand-made CSV: max tps, min jpt. Front by hand: p0, p2, p4.
{
  echo "id,arch.array.trees,status,error,tokens_per_second,joules_per_token"
  echo "p0,1,ok,,100,5"
  echo "p1,2,ok,,60,4"
  echo "p2,3,ok,,80,3"
  echo "p3,4,failed,\"exit 4: tile does not fit, SRAM\",,"
  echo "p4,5,ok,,40,1"
  echo "p5,6,ok,,30,1"
} > "$W/hand.csv"
"$TRITSIM" sweep --pareto max:tokens_per_second,min:joules_per_token "$W/hand.csv" \
  --plots "$W/plots" -q > "$W/front.txt"
front=$(tail -n +2 "$W/hand.csv.pareto.csv" | cut -d, -f1 | tr '\n' ' ')
[ "$front" = "p0 p2 p4 " ] || fail "Pareto front is '$front', expected 'p0 p2 p4 '"
[ "$(tail -n +2 "$W/front.txt" | wc -l)" -eq 3 ] || fail "printed front: $(cat "$W/front.txt")"
expect 2 "no column 'tokens_per_secnd'" \
  "$TRITSIM" sweep --pareto max:tokens_per_secnd,min:joules_per_token "$W/hand.csv" --out "$W/no.csv"
[ ! -e "$W/no.csv" ] || fail "a failed --pareto left its output"

# Plots: well-formed SVG beside their data and script.
"$TRITSIM" sweep "$W/hand.csv" --plots "$W/plots" --metric joules_per_token -q
for f in front joules_per_token-by-arch.array.trees; do
  for ext in dat gp svg; do [ -s "$W/plots/$f.$ext" ] || fail "missing $f.$ext"; done
  if command -v xmllint >/dev/null; then
    xmllint --noout "$W/plots/$f.svg" || fail "$f.svg is not well-formed XML"
  fi
done
ls "$W/plots" | grep -q tmp && fail "temporary plot files left behind"
# Plots that explain: each front point labelled with its id, a table of the
# front with axis values in words and both objectives (joules shown in mJ:
# 3 J = 3000 mJ), axis titles in words with units, not column names.
grep -q '>p2<' "$W/plots/front.svg" || fail "front point p2 is not labelled"
grep -q '>p2  3 trees: 80; 3000<' "$W/plots/front.svg" || fail "front table lacks p2's row"
grep -q '>energy per token (mJ), lower is better<' "$W/plots/front.svg" || fail "front y label"
grep -q '>adder trees<' "$W/plots/joules_per_token-by-arch.array.trees.svg" || fail "axis x label"
grep -q '>energy per token (mJ)<' "$W/plots/joules_per_token-by-arch.array.trees.svg" ||
  fail "axis y label"
# Powers of two spanning 4x or more: a log-2 axis with a tic at each value.
# hand.csv with trees 1, 2, 4, 8 (p3, failed), 16, 32:
awk -F, -v OFS=, 'NR > 1 { $2 = 2 ^ (NR - 2) } { print }' "$W/hand.csv" > "$W/pow2.csv"
"$TRITSIM" sweep "$W/pow2.csv" --plots "$W/pow2" --metric joules_per_token -q
grep -q '^set logscale x 2$' "$W/pow2/joules_per_token-by-arch.array.trees.gp" ||
  fail "trees 1..32 not on a log-2 axis"
grep -q '^set xtics ("1" 1, "2" 2, "4" 4, "16" 16, "32" 32)' \
  "$W/pow2/joules_per_token-by-arch.array.trees.gp" || fail "log-2 axis lacks a tic per value"

# Slurm scripts: readable files with the shard command and the dependency.
"$TRITSIM" sweep "$S" --slurm "$W/slurm" --tasks 3 --partition debug --time-limit 00:10:00 \
  --mem-per-task 1G > /dev/null
grep -qF -- '--array=0-2' "$W/slurm/sweep.sbatch" || fail "no --array=0-2"
grep -qF -- '#SBATCH --partition=debug' "$W/slurm/sweep.sbatch" || fail "no partition"
grep -qF -- '#SBATCH --time=00:10:00' "$W/slurm/sweep.sbatch" || fail "no time limit"
grep -qF -- '#SBATCH --mem=1G' "$W/slurm/sweep.sbatch" || fail "no memory"
grep -qF -- '--shard "$SLURM_ARRAY_TASK_ID/$TASKS"' "$W/slurm/sweep.sbatch" || fail "no shard"
grep -qF -- '--dependency=afterok:' "$W/slurm/submit.sh" || fail "no dependency"
grep -qF -- 'shard-2.csv' "$W/slurm/merge.sbatch" || fail "merge misses shard 2"
[ -x "$W/slurm/submit.sh" ] || fail "submit.sh is not executable"
bash -n "$W/slurm/sweep.sbatch" && bash -n "$W/slurm/merge.sbatch" && bash -n "$W/slurm/submit.sh"
expect 2 "--tasks 13: must be in [1, 12]" "$TRITSIM" sweep "$S" --slurm "$W/s2" --tasks 13
echo "ok: sweep command line"
