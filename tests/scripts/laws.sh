#!/usr/bin/env bash
# Laws as tests (metamorphic, seeded, bounded in time): tests/scripts/laws.py
# draws seeded random design points and small workloads and checks, on every
# run's JSON, that no op or phase beats its binding ceiling (Williams et al.
# 2009 roofline; Little 1961), that stall cycles and energy components add up
# to the totals, and that more channels, trees, decoder rate, scratchpad or
# clock never make a run slower by more than 0.5% (common practice).
#
# Budget: 200 points x 6 runs (1200 runs) do not fit in two minutes: a run
# takes about 0.45 s, so 200 points get the base run (laws 1-3) and the first
# 40 of them (a seeded subset) also the five variants (law 4): 391 runs, about
# 95 s on two cores shared with a build. Under a sanitized binary (scripts/sanitize-test), where a
# run takes about 11 s, 6 points and 1 with variants (about 2 minutes),
# and `inspect` screens out draws that would throw inside a SystemC thread
# (false ASan reports, google/sanitizers#189). Override with LAWS_POINTS,
# LAWS_MONO, LAWS_SEED, LAWS_JOBS.
set -uo pipefail
BIN=$1
SRC=$2
POINTS=${LAWS_POINTS:-200}
POINTS_MONO=${LAWS_MONO:-40}
extra=()
if grep -qa __asan_init "$BIN"; then
  POINTS=${LAWS_POINTS:-6}
  POINTS_MONO=${LAWS_MONO:-1}
  extra+=(--prefilter)
  echo "laws: sanitized binary: $POINTS points, $POINTS_MONO with variants"
fi
exec /usr/bin/python3 "$SRC/tests/scripts/laws.py" "$BIN" "$SRC" \
  --points "$POINTS" --mono "$POINTS_MONO" --seed "${LAWS_SEED:-20240611}" \
  --jobs "${LAWS_JOBS:-2}" "${extra[@]}"
