#!/usr/bin/env bash
# tools/plain-script-lap.py (the plain script of issue 15's speed ratio) solves the same lap as
# `lapwing run --model point-mass`: the Caldra GT with a non-integer ellipse exponent (2.2) and
# the Pellion FR-2 (exponent 2, another powertrain and aspiration) on Brannock Park at 0.5 m.
# The check is against lapwing's own answer (the script is the method written out again, not an
# outside reference); not a timing test (speed is measured by tools/bench only).
# Tolerance 1e-9 relative: the two find the steady speeds with different root finders (TOMS 748
# and bisection), each to 2^-36 (1.5e-11) relative, and raise to a non-integer power differently
# (2^(y log2 x) and x ** y, 1e-14 apart); measured 1e-12 to 2e-12. A difference of method (a
# step, a limit, a gear or a shift cut handled otherwise) moves a lap by 1e-6 or more.
#   plain_script_test.sh LAPWING_BINARY SOURCE_DIR
set -euo pipefail
bin=$(realpath "$1")
cd "$2"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
fail=0
check() {  # CAR CONFIG
  local out=$work/$2
  "$bin" run --car "$1" --track tracks/brannock-park.yaml --model point-mass --config "$2" \
    --out "$out" >/dev/null
  "$bin" check --car "$1" --track tracks/brannock-park.yaml --json "$work/check-$2.json" >/dev/null
  local line
  line=$(python3 tools/plain-script-lap.py "$1" "$out" --check-json "$work/check-$2.json" \
    --repeats 1 | grep '^lap time:')
  echo "$1 $2: $line"
  if ! awk -v d="${line##* }" 'BEGIN {exit !(d + 0 == d && (d < 0 ? -d : d) <= 1e-9)}'; then
    echo "FAIL: $1 $2: the script's lap differs from lapwing's by more than 1e-9 relative"
    fail=1
  fi
}
check tests/data/caldra-gt-exponent-2.2.yaml low_drag
check cars/pellion-fr2.yaml medium
exit "$fail"
