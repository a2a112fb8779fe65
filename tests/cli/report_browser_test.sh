#!/usr/bin/env bash
# The reports in a real browser (issue 17): Debian's chromium driven by playwright-core
# (tests/browser/report_test.mjs; tools/test installs it with npm ci from the committed
# package-lock.json). Pages: the demo's compare (tools/demo: the formula car over its three
# circuits) and trade, a compare of seven configs with long names over a track whose name is 40
# characters long (tests/data/report/, invented), and a run. Screenshots go to SHOTS_DIR.
#   report_browser_test.sh LAPWING_BINARY SOURCE_DIR SHOTS_DIR
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
shots=$3
fail() {
  echo "FAIL: $1"
  echo "browser report: 0 passed, 1 failed"
  exit 1
}
command -v node > /dev/null || fail "node is not installed"
[ -x /usr/bin/chromium ] || fail "/usr/bin/chromium is not installed (tools/test installs it)"
[ -d tests/browser/node_modules/playwright-core ] ||
  fail "playwright-core is not installed: run tools/test (it runs npm ci in tests/browser)"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
export HOME="${HOME:-$tmp}"
circuits=(--track tracks/brannock-park.yaml --track tracks/saltmere-flats.yaml --track tracks/cairnholt.yaml)
"$bin" compare --car cars/pellion-fr2.yaml "${circuits[@]}" --out "$tmp/demo" > /dev/null ||
  fail "the demo's compare"
"$bin" trade --car cars/pellion-fr2.yaml "${circuits[@]}" --config medium --out "$tmp/trade" \
  > /dev/null || fail "the demo's trade"
"$bin" compare --car tests/data/report/seven-configs-car.yaml \
  --track tests/data/report/kestrel-moor-reservoir-long-loop.yaml \
  --track tracks/brannock-park.yaml --out "$tmp/seven" > /dev/null || fail "the seven-config compare"
"$bin" run --car cars/caldra-gt.yaml --track tracks/cairnholt.yaml --out "$tmp/run" > /dev/null ||
  fail "run"
rm -rf "$shots"
timeout 600 node tests/browser/report_test.mjs "$shots" "$tmp/demo/report.html:$tmp/demo" \
  "$tmp/seven/report.html:$tmp/seven" "$tmp/trade/report.html" "$tmp/run/report.html:$tmp/run"
