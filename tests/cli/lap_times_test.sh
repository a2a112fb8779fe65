#!/usr/bin/env bash
# Regression check (issue 15): the lap time of every bundled car x config x track with both
# models (tools/lap-times) against tests/data/lap_times.csv: the answers of the current method,
# written anew once when the exponential step became the sweeps' default (a change of method:
# 8e-6 median, 3.5e-5 largest relative to RK4's; README, "Performance", its convergence table).
# Tolerance 1e-6 relative: a faster solve of the same method moves a lap time by its root
# finders' tolerances (steady speeds to 2^-36, the axle model's accelerations to 1e-9 m/s^2),
# orders of magnitude below that; a change of method that moves more writes the file anew and
# says so in README, "Performance".
#   lap_times_test.sh LAPWING_BINARY SOURCE_DIR
set -euo pipefail
bin=$(realpath "$1")
cd "$2"
now=$(mktemp)
trap 'rm -f "$now"' EXIT
tools/lap-times "$bin" >"$now"
python3 - tests/data/lap_times.csv "$now" <<'PY'
import csv, sys
def read(path):
    with open(path, newline="") as f:
        return {tuple(r[:4]): float(r[4]) for r in list(csv.reader(f))[1:]}
ref, now = read(sys.argv[1]), read(sys.argv[2])
fail = 0
if ref.keys() != now.keys():
    print("FAIL: cases differ:", sorted(ref.keys() ^ now.keys()))
    sys.exit(1)
worst = 0.0
for k in sorted(ref.keys() & now.keys()):
    rel = abs(now[k] - ref[k]) / abs(ref[k])
    worst = max(worst, rel)
    if rel > 1e-6:
        print(f"FAIL: {k}: {now[k]!r} s, was {ref[k]!r} s ({rel:.2e} relative)")
        fail += 1
print(f"{len(ref) - fail} passed, {fail} failed (largest change {worst:.2e} relative)")
sys.exit(1 if fail else 0)
PY
