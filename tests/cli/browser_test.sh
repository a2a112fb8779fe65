#!/usr/bin/env bash
# Real-browser test of report.html: headless Chromium renders a compare report and a run report
# to PNGs with networking features off; each picture must be neither blank nor one colour.
#   browser_test.sh LAPWING_BINARY PNG_STATS_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
stats=$(realpath "$2")
cd "$3" || exit 1
browser=$(command -v chromium || command -v chromium-browser || true)
if [ -z "$browser" ]; then
  echo "FAIL: chromium is not installed (tools/test installs it)"
  echo "browser: 0 passed, 1 failed"
  exit 1
fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
export HOME="${HOME:-$tmp}"  # the browser wants a home; CI may not set one
pass=0
fail=0
"$bin" compare --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml \
  --config low --config high --out "$tmp/report" > /dev/null || { echo "FAIL: compare"; exit 1; }
# run's single-lap page too.
"$bin" run --car cars/caldra-gt.yaml --track tracks/cairnholt.yaml --out "$tmp/run" > /dev/null ||
  { echo "FAIL: run"; exit 1; }
for page in "$tmp/report/report.html" "$tmp/run/report.html"; do
  timeout 120 "$browser" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --disable-extensions --disable-default-apps --user-data-dir="$tmp/profile" \
    --window-size=1200,2400 --screenshot="$tmp/shot.png" "file://$page" > "$tmp/browser.log" 2>&1
  if [ -s "$tmp/shot.png" ] && "$stats" "$tmp/shot.png"; then
    pass=$((pass + 1))
  else
    fail=$((fail + 1))
    echo "FAIL: $page did not render to a picture with content"
    tail -5 "$tmp/browser.log"
  fi
done
# The check can fail: an empty page renders to one colour and must be refused.
printf '<!DOCTYPE html><html><body></body></html>\n' > "$tmp/empty.html"
timeout 120 "$browser" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
  --disable-background-networking --disable-component-update --disable-sync --disable-extensions \
  --user-data-dir="$tmp/profile" --window-size=400,300 --screenshot="$tmp/empty.png" \
  "file://$tmp/empty.html" > /dev/null 2>&1
if [ -s "$tmp/empty.png" ] && ! "$stats" "$tmp/empty.png" > /dev/null; then
  pass=$((pass + 1))
else
  fail=$((fail + 1))
  echo "FAIL: an empty page passed the picture check"
fi
echo "browser: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
