#!/usr/bin/env bash
# examples/python/wing_choice.py runs with the built module and draws its PNG: a lap time and a
# best config per circuit printed, and a picture that is neither blank nor one colour
# (png_stats).
#   wing_choice_test.sh PYTHON SOURCE_DIR PNG_STATS
set -u
python=$1
cd "$2" || exit 1
png_stats=$3
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
"$python" examples/python/wing_choice.py --out "$tmp/wing.png" > "$tmp/out.txt" || {
  cat "$tmp/out.txt"
  echo "FAIL: the example failed"
  exit 1
}
cat "$tmp/out.txt"
fail=0
for circuit in "Brannock Park" "Saltmere Flats" "Cairnholt Hill Circuit"; do
  grep -qE "^$circuit: low [0-9.]+ s, medium [0-9.]+ s, high [0-9.]+ s; best (low|medium|high)$" \
    "$tmp/out.txt" || { echo "FAIL: no result line for $circuit"; fail=1; }
done
"$png_stats" "$tmp/wing.png" || { echo "FAIL: the PNG is blank or one colour"; fail=1; }
exit $fail
