#!/usr/bin/env bash
# Every CSV file lapwing writes matches its header: the demo's own commands (tools/demo, run in a
# scratch copy of the repo so that it writes there) plus `track from-log`, each file read by
# Python's csv module (tests/cli/csv_fields.py), which knows nothing of lapwing's writer.
#   csv_files_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
src=$(realpath "$2")
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail=0
# A scratch repo: the demo script, the bundled data, the built binary, and no set-up step (the
# binary is built already).
mkdir -p "$tmp/repo/tools" "$tmp/repo/build"
cp -r "$src/cars" "$src/tracks" "$src/logs" "$tmp/repo/"
cp "$src/tools/demo" "$tmp/repo/tools/demo"
printf '#!/usr/bin/env bash\n' > "$tmp/repo/tools/setup"
chmod +x "$tmp/repo/tools/setup"
ln -s "$bin" "$tmp/repo/build/lapwing"
"$tmp/repo/tools/demo" > "$tmp/demo.txt" 2>&1 || { echo "FAIL: tools/demo: $(tail -5 "$tmp/demo.txt")"; fail=1; }

# track from-log writes a CSV too: make one from a lap of the demo's.
log_out=$tmp/repo/out/from-log
mkdir -p "$log_out"
awk -F, 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; print "t_s,v_kph,ay_g"; next }
  NR % 4 == 2 { print $c["time_s"] "," $c["speed_kph"] "," $c["lat_accel_g"] }' \
  "$tmp"/repo/out/demo/pellion-fr2/cairnholt-low/trace-cairnholt-low.csv > "$tmp/lap.csv"
"$bin" track from-log --log "$tmp/lap.csv" --speed v_kph --lat-accel ay_g --time t_s --closed \
  --out "$log_out/lap.yaml" > /dev/null || { echo "FAIL: track from-log"; fail=1; }

mapfile -t files < <(find "$tmp/repo/out" -name '*.csv' | sort)
# Each kind of file the demo and from-log write must be among them (else the check proves little).
for kind in '/trace-[^/]*\.csv$' '/corners\.csv$' '/delta-[^/]*\.csv$' '/trade-grid-[^/]*\.csv$' \
  '/from-log/lap\.csv$' '/correlate-[^/]*\.csv$'; do
  printf '%s\n' "${files[@]}" | grep -qE "$kind" || { echo "FAIL: no file matching $kind"; fail=1; }
done
python3 "$src/tests/cli/csv_fields.py" "${files[@]}" || fail=1
# The check can fail: a row wider than its header is refused; a quoted comma is one field.
printf 'a,b\n1,2,3\n' > "$tmp/wide.csv"
printf 'track,b\n"Park, North",2\n' > "$tmp/quoted.csv"
python3 "$src/tests/cli/csv_fields.py" "$tmp/wide.csv" > /dev/null && { echo "FAIL: a wide row passed"; fail=1; }
python3 "$src/tests/cli/csv_fields.py" "$tmp/quoted.csv" > /dev/null || { echo "FAIL: a quoted comma split"; fail=1; }
[ "$fail" -eq 0 ] && echo "csv files: all ${#files[@]} match their headers"
exit "$fail"
