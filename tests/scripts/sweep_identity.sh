#!/usr/bin/env bash
# Stale results are never resumed or merged: a sweep CSV is written, then
# (1) a base file is edited, (2) the base workload changes, (3) another sweep
# is pointed at the CSV, (4) an axis value changes, (5) merge is asked to take
# it for the edited sweep. Each must be refused with exit 3, one line naming
# what differs and how to start afresh, and the CSV byte-identical (sha256)
# with no point JSON added. Finally an unchanged sweep resumes it (exit 0).
# $1 = tritsim binary, $2 = source dir.
set -euo pipefail
TRITSIM=$1
SRC=$2
W=$(mktemp -d /tmp/tritsim-identity-XXXXXX)
trap 'rm -rf "$W"' EXIT
fail() { echo "FAIL: $*" >&2; exit 1; }

cp "$SRC/models/wren-0.7b.yaml" "$W/model.yaml"
cp "$SRC/configs/heron-edge-ddr4.yaml" "$W/arch.yaml"
sweep() {  # NAME CONTEXT TREES: writes $W/NAME.yaml
  cat > "$W/$1.yaml" <<YAML
name: $1
base:
  arch: arch.yaml
  model: model.yaml
  workload: {prefill: 0, decode: 1, context: $2, batch: 1}
axes:
  arch.array.trees: [$3]
  workload.batch: [1, 4]
YAML
}
sweep study 0 "32, 64"
"$TRITSIM" sweep "$W/study.yaml" --out "$W/out.csv" --jobs 2 -q
before=$(sha256sum < "$W/out.csv")
points_before=$(ls "$W/out.csv.points" | wc -l)

# expect_refusal WHAT TEXT COMMAND...: exit 3, TEXT on the one stderr line,
# CSV and points folder unchanged.
expect_refusal() {
  local what=$1 text=$2
  shift 2
  local rc=0
  "$TRITSIM" "$@" 2> "$W/err" > /dev/null || rc=$?
  [ "$rc" -eq 3 ] || fail "$what: exit $rc, expected 3: $(cat "$W/err")"
  [ "$(wc -l < "$W/err")" -eq 1 ] || fail "$what: stderr is not one line: $(cat "$W/err")"
  grep -qF -- "$text" "$W/err" || fail "$what: stderr lacks '$text': $(cat "$W/err")"
  [ "$(sha256sum < "$W/out.csv")" = "$before" ] || fail "$what: the CSV changed"
  [ "$(ls "$W/out.csv.points" | wc -l)" -eq "$points_before" ] || fail "$what: points were run"
  echo "ok: $what refused: $(cat "$W/err")"
}

# (1) A base file edited since the CSV was written (a torn final line too:
# it must survive the refusal, so the file stays byte-identical).
printf 'p0003-torn,64,4,o' >> "$W/out.csv"
before=$(sha256sum < "$W/out.csv")
sed -i 's/^layers: .*/layers: 2/' "$W/model.yaml"
grep -q '^layers: 2' "$W/model.yaml" || fail "could not edit the model file"
expect_refusal "edited base model" "base.model ($W/model.yaml) changed" \
  sweep "$W/study.yaml" --out "$W/out.csv" --resume
grep -qF "to start afresh, move $W/out.csv" "$W/err" || fail "no advice on starting afresh"
cp "$SRC/models/wren-0.7b.yaml" "$W/model.yaml"

# (2) The base workload changed (context 0 -> 2048).
sweep study 2048 "32, 64"
expect_refusal "changed context" "(base.workload changed): 'prefill=0 decode=1 context=0 batch=" \
  sweep "$W/study.yaml" --out "$W/out.csv" --resume
grep -qF "context=2048 batch=" "$W/err" || fail "changed context: the new workload is not named"
sweep study 0 "32, 64"

# (3) Another sweep resumed onto this CSV.
sweep other 0 "32, 64"
expect_refusal "another sweep" "sweep name: 'study' in the CSV, 'other' now" \
  sweep "$W/other.yaml" --out "$W/out.csv" --resume

# (4) An axis value changed.
sweep study 0 "32, 128"
expect_refusal "changed axis" "axis arch.array.trees of point p000" \
  sweep "$W/study.yaml" --out "$W/out.csv" --resume

# (5) merge refuses the same CSV for the changed sweep and writes nothing.
expect_refusal "merge of a stale shard" "axis arch.array.trees" \
  sweep merge "$W/study.yaml" --out "$W/merged.csv" "$W/out.csv"
[ ! -e "$W/merged.csv" ] || fail "merge wrote its output"

# The unchanged sweep resumes: the torn line is cut, nothing is run again.
sweep study 0 "32, 64"
"$TRITSIM" sweep "$W/study.yaml" --out "$W/out.csv" --resume -q
rows=$(( $(wc -l < "$W/out.csv") - 1 ))
[ "$rows" -eq 4 ] || fail "resume of the unchanged sweep left $rows rows, expected 4"
echo "ok: the unchanged sweep resumes"
