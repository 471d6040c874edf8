#!/usr/bin/env bash
# `tritsim report` (docs/report-page.md) in a real browser: Debian's headless
# Chromium renders the page of a golden run and of a small sweep to a PNG and
# dumps the DOM after the page's script ran; tests/scripts/lib/
# report_page_check.py checks the PNG, that no script or console error
# happened, that the headline values (computed again from the JSON and CSV in
# Python) are on the page, that every Pareto front point is labelled, and
# that the points table sorts. A page with a deliberate script error must be
# caught by the same checks. Also: the page is byte-deterministic and
# self-contained, and bad input gives one line, a non-zero exit and no output.
# Three Chromium start-ups in all (a few seconds each).
# $1 = tritsim binary, $2 = source dir.
set -uo pipefail
BIN=$1
SRC=$2
PY=/usr/bin/python3
source "$SRC/tests/scripts/lib/cli_checks.sh"
CHECK="$SRC/tests/scripts/lib/report_page_check.py"
export SYSTEMC_DISABLE_COPYRIGHT_MESSAGE=1

CHROMIUM=$(command -v chromium || true)
if [ -z "$CHROMIUM" ]; then
  if [ "${CI:-}" = true ]; then
    echo "FAIL: chromium is not installed; scripts/setup installs it (apt-get install chromium)"
    exit 1
  fi
  echo "SKIP: chromium is not installed (scripts/setup installs it): report pages not rendered"
  exit 0
fi

# render PAGE NAME [FRAGMENT]: PNG, DOM and log in $tmp/NAME.{png,dom,log}.
render() {
  local page=$1 name=$2 fragment=${3:-}
  local profile
  profile=$(mktemp -d "$tmp/profile-XXXXXX")
  # Its own HOME too: CI may run without one, and nothing leaks between runs.
  mkdir -p "$tmp/home"
  HOME="$tmp/home" timeout 120 "$CHROMIUM" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --host-resolver-rules="MAP * ~NOTFOUND" --hide-scrollbars \
    --user-data-dir="$profile" --enable-logging=stderr --v=0 \
    --window-size=1280,2400 --screenshot="$tmp/$name.png" --dump-dom \
    "file://$page$fragment" >"$tmp/$name.dom" 2>"$tmp/$name.log" ||
    fail "chromium exited non-zero on $name: $(grep -m3 -i 'error' "$tmp/$name.log")"
  [ -s "$tmp/$name.png" ] || fail "chromium wrote no screenshot of $name"
}

GOLDEN="$SRC/tests/golden/ddr4-wren-prefill-decode.json"

# 1. Run page: written, deterministic, rendered, checked.
expect_exit 0 "report of a golden run" "$BIN" report "$GOLDEN" --out "$tmp/run"
[ -s "$tmp/run/index.html" ] || fail "no run/index.html"
expect_exit 0 "report of a golden run, again" "$BIN" report "$GOLDEN" --out "$tmp/run2"
cmp -s "$tmp/run/index.html" "$tmp/run2/index.html" || fail "two run pages of the same JSON differ"
render "$tmp/run/index.html" run
"$PY" "$CHECK" run "$GOLDEN" "$tmp/run/index.html" "$tmp/run.dom" "$tmp/run.png" "$tmp/run.log" ||
  fail "run page checks (above)"

# 2. Sweep page: a 6-point sweep (3 tree counts x 2 batches, one decode step of a
# 2-layer demo model), sorted on load by #sort=-tokens_per_second.
mkdir -p "$tmp/sw" && cd "$tmp/sw" || exit 1
cp "$SRC/models/wren-0.7b.yaml" model.yaml
cp "$SRC/configs/heron-edge-ddr4.yaml" arch.yaml
cat >tiny.yaml <<'YAML'
name: report-page-test
base:
  arch: arch.yaml
  model: model.yaml
  workload: {prefill: 0, decode: 1, context: 0, batch: 1}
axes:
  model.layers: [2]
  arch.array.trees: [32, 64, 128]
  workload.batch: [1, 8]
YAML
"$BIN" sweep tiny.yaml --out sweep.csv -q --jobs 2 || fail "tiny sweep exited non-zero"
expect_exit 0 "report of a sweep CSV" "$BIN" report sweep.csv --out "$tmp/sweep"
expect_exit 0 "report of a sweep CSV, again" "$BIN" report sweep.csv --out "$tmp/sweep2"
cmp -s "$tmp/sweep/index.html" "$tmp/sweep2/index.html" || fail "two sweep pages of the same CSV differ"
render "$tmp/sweep/index.html" sweep "#sort=-tokens_per_second"
"$PY" "$CHECK" sweep sweep.csv "$tmp/sweep/index.html" "$tmp/sweep.dom" "$tmp/sweep.png" \
  "$tmp/sweep.log" || fail "sweep page checks (above)"

# 3. The checks catch a page whose script fails (they are not blind).
sed 's|</body>|<script>no_such_function();</script></body>|' "$tmp/run/index.html" >"$tmp/broken.html"
render "$tmp/broken.html" broken
if "$PY" "$CHECK" run "$GOLDEN" "$tmp/broken.html" "$tmp/broken.dom" "$tmp/broken.png" \
  "$tmp/broken.log" >"$tmp/broken.out"; then
  fail "a page with a script error passed the checks"
fi
grep -q "script or console errors" "$tmp/broken.out" || fail "the error hook missed the error: $(cat "$tmp/broken.out")"
grep -q "console messages" "$tmp/broken.out" || fail "the console log missed the error"

# 4. Bad input: one line, non-zero exit, nothing written.
cd "$tmp" || exit 1
expect_exit 3 "missing input" "$BIN" report no-such.json --out out1
one_line_error "missing input"
grep -q "no-such.json" "$tmp/err" || fail "missing input: message does not name the file"
[ ! -e out1 ] || fail "missing input: --out folder was created"
printf 'hello,world\n1,2\n' >plain.csv
expect_exit 3 "a CSV that is not a sweep" "$BIN" report plain.csv --out out2
one_line_error "a CSV that is not a sweep"
grep -q "plain.csv.*not a run JSON.*nor a sweep CSV" "$tmp/err" || fail "not a sweep: $(cat "$tmp/err")"
[ ! -e out2 ] || fail "not a sweep: --out folder was created"
echo '{"schema": "tritsim.inspect/1"}' >inspect.json
expect_exit 3 "an inspect JSON" "$BIN" report inspect.json --out out3
one_line_error "an inspect JSON"
grep -q "tritsim.run/1" "$tmp/err" || fail "an inspect JSON: $(cat "$tmp/err")"
"$PY" -c 'import json,sys; d=json.load(open(sys.argv[1])); del d["phases"]; json.dump(d,open("nophases.json","w"))' \
  "$GOLDEN"
expect_exit 3 "a run JSON without phases" "$BIN" report nophases.json --out out4
one_line_error "a run JSON without phases"
grep -q "nophases.json: phases" "$tmp/err" || fail "a run JSON without phases: $(cat "$tmp/err")"
expect_exit 3 "a folder as input" "$BIN" report "$tmp/sw" --out out5
one_line_error "a folder as input"
grep -q "is a folder" "$tmp/err" || fail "a folder as input: $(cat "$tmp/err")"
expect_exit 3 "--out under a missing folder" "$BIN" report "$GOLDEN" --out no/such/dir
one_line_error "--out under a missing folder"
mkdir keep && echo old >keep/index.html
expect_exit 3 "bad input over an existing page" "$BIN" report plain.csv --out keep
[ "$(cat keep/index.html)" = old ] || fail "bad input replaced an existing index.html"
expect_exit 2 "no --out" "$BIN" report "$GOLDEN"
one_line_error "no --out"

[ "$failures" -eq 0 ] && echo "ok: report pages render in Chromium without errors and show the headline"
[ "$failures" -eq 0 ]
