#!/usr/bin/env bash
# `tritsim run --from-report` re-runs exactly the point of a run JSON from its
# resolved section (docs/report-format.md): for every golden run
# (tests/golden/runs.txt), re-running its golden JSON gives the same totals,
# key for key and value for value, and the same resolved section.
#
# usage: from_report.sh TRITSIM_BINARY SOURCE_DIR
set -uo pipefail
BIN="$1"
SRC="$2"
WORK="$(mktemp -d "${TMPDIR:-/tmp}/tritsim-from-report.XXXXXX")"
trap 'rm -rf "$WORK"' EXIT
cd "$SRC"
failures=0
count=0
while read -r name _; do
  case "$name" in '' | '#'*) continue ;; esac
  count=$((count + 1))
  if ! "$BIN" run --from-report "tests/golden/$name.json" -q --json "$WORK/$name.json" \
    2>"$WORK/err"; then
    echo "FAIL $name: --from-report exited non-zero: $(head -n1 "$WORK/err")"
    failures=$((failures + 1))
    continue
  fi
  /usr/bin/python3 - "tests/golden/$name.json" "$WORK/$name.json" <<'PY' || failures=$((failures + 1))
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:3])
for section in ("totals", "resolved"):
    if a[section] != b[section]:
        print(f"FAIL {sys.argv[1]}: {section} differ after --from-report")
        sys.exit(1)
PY
done <tests/golden/runs.txt
echo "from_report: $count golden runs, $failures failures"
[ "$count" -ge 6 ] && [ "$failures" -eq 0 ]
