#!/usr/bin/env bash
# correlate and fit end to end on the real binary: the bundled invented log of the surveyed
# circuit correlates and fits, their files appear with their keys and columns and are the same
# bytes for any thread count; bad logs (too short, distance not increasing, a missing column, a
# speed unit that gives absurd speeds) and bad options exit 2 with FILE:LINE:COL or the option,
# and write nothing.
#   correlate_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }
car=cars/pellion-fr2.yaml
track=tracks/brannock-park-survey.yaml
log=logs/brannock-park-survey-lap.csv
common=(--car "$car" --track "$track" --config medium --speed speed_kph)

# 1. correlate: the files and their keys and columns.
if "$bin" correlate "${common[@]}" --log "$log" --time time_s --out "$tmp/c" > "$tmp/c.txt" 2>&1; then
  ok
else
  bad "correlate: $(cat "$tmp/c.txt")"
fi
for key in lap_time_sim_s lap_time_log_s rms_speed_error_kph offset_m scale sectors corners \
  braking_error_m; do
  grep -q "\"$key\"" "$tmp/c/correlate.json" && ok || bad "correlate.json lacks $key"
done
[ "$(head -n 1 "$tmp/c/correlate-brannock-park-survey.csv")" = \
  "distance_m,sim_speed_kph,log_speed_kph,speed_error_kph,time_delta_s" ] && ok ||
  bad "correlate CSV header"
grep -q 'id="correlation"' "$tmp/c/report.html" && grep -q 'id="correlate-speed"' "$tmp/c/report.html" &&
  grep -q 'id="correlate-delta"' "$tmp/c/report.html" && ok || bad "report.html lacks the correlation"
grep -q '^largest speed errors' "$tmp/c.txt" && ok || bad "correlate prints no largest errors"
! grep -qiE 'nan|inf' "$tmp/c/correlate.json" "$tmp/c/correlate-brannock-park-survey.csv" && ok ||
  bad "non-finite number in correlate's files"

# The alignment's coarse search takes its scales in two halves, the second on a thread of its
# own where the process may run on two processors or more (correlate.cpp, coarse_search); held
# to one processor (taskset, the first of those it may use) it takes them all on one thread, and
# the folder is the same bytes.
first_cpu=$(sed -n 's/^Cpus_allowed_list:[[:space:]]*\([0-9]*\).*/\1/p' /proc/self/status)
if command -v taskset > /dev/null && [ "$(nproc)" -ge 2 ] && [ -n "$first_cpu" ]; then
  if taskset -c "$first_cpu" "$bin" correlate "${common[@]}" --log "$log" --time time_s \
    --out "$tmp/c1" > "$tmp/c1.txt" 2>&1 && diff -r "$tmp/c" "$tmp/c1" > /dev/null &&
    cmp -s "$tmp/c.txt" "$tmp/c1.txt"; then
    ok
  else
    bad "correlate on one processor differs from two: $(diff -r "$tmp/c" "$tmp/c1" | head -c 300)"
  fi
else
  echo "note: taskset or a second processor missing: correlate on one processor not compared"
fi

# A gap in the log (its rows from 30.0 s to 30.8 s removed: a dropout of 0.8 s, more than the
# 0.5 s of the rule in README, "Correlating with your data"; about 1.5 % of the lap): warned of,
# and the report's three traces (simulated, logged, their time difference) each break there
# instead of drawing across it.
awk -F, '/^#/ { print; next } !h { h = 1; for (i = 1; i <= NF; i++) if ($i == "time_s") t = i
  print; next } $t < 30.0 || $t > 30.8' "$log" > "$tmp/gap.csv"
"$bin" correlate "${common[@]}" --log "$tmp/gap.csv" --time time_s --out "$tmp/gap" > "$tmp/gap.txt" 2>&1
full_lines=$(grep -o '<polyline' "$tmp/c/report.html" | wc -l)
gap_lines=$(grep -o '<polyline' "$tmp/gap/report.html" | wc -l)
grep -q "^warning: the log has gaps" "$tmp/gap.txt" && [ "$gap_lines" -eq $((full_lines + 3)) ] &&
  ok || bad "a gap: $full_lines and $gap_lines lines, $(head -c 300 "$tmp/gap.txt")"

# The same log at 2 Hz (every tenth row: rows about 20 m apart, over the 10 m the data-quality
# verdict reads as poor, README, "Tracks from data"): correlate and fit still print their figures
# but warn, in the text and the JSON's warnings, saying what to log; the 20 Hz log is not warned
# of.
awk -F, '/^#/ { print; next } !h { h = 1; print; next } (n++ % 10) == 0' "$log" > "$tmp/2hz.csv"
"$bin" correlate "${common[@]}" --log "$tmp/2hz.csv" --time time_s --out "$tmp/2hz" > "$tmp/2hz.txt" 2>&1
rc=$?
sparse="the log.s rows are [0-9.]* m apart along the track .median.*poor.*log at [0-9]* Hz or more"
[ $rc -eq 0 ] && grep -q "^warning: $sparse" "$tmp/2hz.txt" && python3 -c "import json, re, sys
w = json.load(open(sys.argv[1]))['warnings']
sys.exit(not any(re.match(sys.argv[2], x) for x in w))" "$tmp/2hz/correlate.json" "$sparse" &&
  ! grep -q "rows are .* m apart" "$tmp/c.txt" && ok || bad "2 Hz log: exit $rc, $(head -c 600 "$tmp/2hz.txt")"
"$bin" fit "${common[@]}" --log "$tmp/2hz.csv" --time time_s --free power --out "$tmp/2hzf" > "$tmp/2hzf.txt" 2>&1
rc=$?
[ $rc -eq 0 ] && grep -q "^warning: $tmp/2hz.csv: $sparse" "$tmp/2hzf.txt" && python3 -c "import json, re, sys
w = json.load(open(sys.argv[1]))['warnings']
sys.exit(not any(re.search(sys.argv[2], x) for x in w))" "$tmp/2hzf/fit.json" "$sparse" && ok ||
  bad "fit, 2 Hz log: exit $rc, $(head -c 600 "$tmp/2hzf.txt")"

# 2. fit: the files, the fitted car loads, and the same bytes with one thread and two.
for n in 1 2; do
  "$bin" fit "${common[@]}" --log "$log" --time time_s --free grip,power,cda --threads $n \
    --out "$tmp/f$n" > "$tmp/f$n.txt" 2>&1 && ok || bad "fit --threads $n: $(cat "$tmp/f$n.txt")"
done
cmp -s "$tmp/f1/fit.json" "$tmp/f2/fit.json" && cmp -s "$tmp/f1/car.yaml" "$tmp/f2/car.yaml" && ok ||
  bad "fit's files differ between 1 and 2 threads"
for key in parameters scale std_error rms_before_kph rms_after_kph correlation speed_correlation \
  warnings rounds settled iterations iteration_limit termination; do
  grep -q "\"$key\"" "$tmp/f1/fit.json" && ok || bad "fit.json lacks $key"
done
head -n 1 "$tmp/f1/car.yaml" | grep -q "^# Fitted by 'lapwing fit'" && ok || bad "car.yaml header"
"$bin" check --car "$tmp/f1/car.yaml" > "$tmp/check.txt" 2>&1 && ok || bad "the fitted car does not load"
grep -q "not separable" "$tmp/f1.txt" && ok || bad "fit gives no separability warning for power and cda"

# fit in air the options give records it (the fitted factors hold in that air) as run states
# it: in the text, car.yaml's header and fit.json. 35 C at 600 m: ISO 2533's pressure there,
# 101325 Pa (1 - 2.25577e-5 x 600)^5.25588 = 943.2 hPa, and the ideal gas law for dry air,
# 94322 / (287.058 x 308.15) = 1.0663 kg/m3.
"$bin" fit "${common[@]}" --log "$log" --time time_s --free power --altitude 600m \
  --temperature "35 C" --out "$tmp/fair" > "$tmp/fair.txt" 2>&1
rc=$?
air_words="1.0663 kg/m3 (35.0 C, 943.2 hPa, 0 % humidity at 600 m)"
run_air=$("$bin" run --car "$car" --track "$track" --config medium --altitude 600m \
  --temperature "35 C" | grep '^air ')
[ $rc -eq 0 ] && [ "$run_air" = "air     $air_words" ] && grep -qF "$run_air" "$tmp/fair.txt" &&
  head -n 1 "$tmp/fair/car.yaml" | grep -qF "on Brannock Park (surveyed centerline) in air of $air_words." &&
  python3 -c "import json, sys
l = json.load(open(sys.argv[1]))['logs'][0]
sys.exit(not (abs(l['air_density_kg_m3'] - 1.0663) < 1e-4 and l['air'] == sys.argv[2]))" \
    "$tmp/fair/fit.json" "$air_words" && ok ||
  bad "fit in other air: exit $rc, run: $run_air, $(head -c 400 "$tmp/fair/car.yaml")"

# A fit whose covariance cannot be found (the balance does nothing to a point mass) says so in
# lapwing's words on stdout; Ceres's own log lines (glog: "WARNING: Logging before
# InitGoogleLogging()", "covariance_impl.cc:...] Error: ...") do not reach stderr.
"$bin" fit "${common[@]}" --log "$log" --time time_s --model point-mass --free power,balance \
  > "$tmp/pm.txt" 2> "$tmp/pm.err"
rc=$?
[ $rc -eq 0 ] && [ ! -s "$tmp/pm.err" ] && grep -q "^warning: the covariance could not be found" \
  "$tmp/pm.txt" && ok || bad "fit, rank-deficient: exit $rc, stderr: $(head -c 300 "$tmp/pm.err")"

# 3. Bad logs: exit 2, FILE:LINE:COL, the words, nothing written.
printf 'distance_m,speed_kph\n' > "$tmp/short.csv"
for i in 0 1 2 3 4; do echo "$((i * 2)),100" >> "$tmp/short.csv"; done
{ echo "distance_m,speed_kph"; for i in $(seq 0 20); do echo "$((i * 2)),100"; done; echo "30,100"; } > "$tmp/backwards.csv"
{ echo "distance_m,v"; for i in $(seq 0 20); do echo "$((i * 2)),100"; done; } > "$tmp/nocolumn.csv"
# The bundled log's speed in km/h read as m/s: beyond 900 km/h.
expect() {  # FILE COLUMN-OPTION UNIT TEXT
  rm -rf "$tmp/bad"
  "$bin" correlate "${common[@]}" --log "$1" $2 --speed-unit "$3" --out "$tmp/bad" > /dev/null 2> "$tmp/err.txt"
  local rc=$?
  [ $rc -eq 2 ] && ok || bad "$1: exit $rc, not 2"
  grep -qE "^$1:[0-9]+:[0-9]+: error: " "$tmp/err.txt" && ok || bad "$1: not FILE:LINE:COL: $(cat "$tmp/err.txt")"
  grep -q "$4" "$tmp/err.txt" && ok || bad "$1: no '$4' in $(cat "$tmp/err.txt")"
  [ ! -e "$tmp/bad" ] && ok || bad "$1: wrote output"
}
expect "$tmp/short.csv" "--distance distance_m" km/h "rows"
expect "$tmp/backwards.csv" "--distance distance_m" km/h "increas"
expect "$tmp/nocolumn.csv" "--distance distance_m" km/h "speed_kph"
expect "$log" "--time time_s" m/s "900 km/h"
# The speed in km/h, the log in mph read as km/h is 1.6 times too slow: the median check.
awk -F, 'NR <= 3 { print; next } { printf "%s,%s,%.2f,%s\n", $1, $2, $3 / 1.609344, $4 }' "$log" > "$tmp/mph.csv"
expect "$tmp/mph.csv" "--time time_s" km/h "speed-unit"
# Half a lap: too short for the track.
head -n 700 "$log" > "$tmp/half.csv"
expect "$tmp/half.csv" "--time time_s" km/h "covers"
# fit aligns its logs the same way: its error names no other command (it said "correlate
# needs 98 %").
rm -rf "$tmp/bad"
"$bin" fit "${common[@]}" --log "$tmp/half.csv" --time time_s --free grip --out "$tmp/bad" \
  > /dev/null 2> "$tmp/err.txt"
rc=$?
[ $rc -eq 2 ] && grep -qE "^$tmp/half.csv:[0-9]+:[0-9]+: error: .*covers .* a log must cover 98 %" "$tmp/err.txt" &&
  ! grep -q correlate "$tmp/err.txt" && [ ! -e "$tmp/bad" ] && ok || bad "fit, half a lap: exit $rc, $(cat "$tmp/err.txt")"

# A log of constant speed aligns at r = 0: warned of in the text, correlate.json and the report
# (first: a flat log's scale and laps may be warned of too). Two laps long, so that a lap line to
# line is in it wherever its meaningless alignment puts the line.
{ echo "distance_m,speed_kph"; for i in $(seq 0 2800); do echo "$((i * 2)),150"; done; } > "$tmp/flat.csv"
"$bin" correlate "${common[@]}" --log "$tmp/flat.csv" --distance distance_m --out "$tmp/flat" \
  > "$tmp/flat.txt" 2>&1 && grep -q "^warning: the log's speed correlates" "$tmp/flat.txt" &&
  python3 -c "import json, sys; w = json.load(open(sys.argv[1]))['warnings']; sys.exit(not (
    len(w) >= 1 and w[0].startswith(\"the log's speed correlates\")))" "$tmp/flat/correlate.json" &&
  grep -q "<strong>warning:</strong> the log's speed correlates" "$tmp/flat/report.html" && ok || bad "constant log: no warning ($(head -c 300 "$tmp/flat.txt"))"

# 4. Usage errors: exit 2, one line.
usage() {  # TEXT ARGS...
  local want=$1
  shift
  "$bin" "$@" > /dev/null 2> "$tmp/err.txt"
  local rc=$?
  [ $rc -eq 2 ] && grep -q "$want" "$tmp/err.txt" && ok || bad "$* -> exit $rc: $(cat "$tmp/err.txt")"
}
usage "did you mean 'grip'" fit "${common[@]}" --log "$log" --time time_s --free gripp
usage "one --log per --track" fit "${common[@]}" --track "$track" --log "$log" --time time_s --free grip
usage "one of --distance COL and --time COL" correlate "${common[@]}" --log "$log"
# One lap given twice would count its points twice (the standard errors 1.4 times too small),
# also by another path to the same file.
usage "is given twice (pairs 1 and 2)" fit "${common[@]}" --track "$track" --log "$log" \
  --log "./$log" --time time_s --free grip
# A hard link is the same file too (it was taken as a second lap: a campaign's finding).
cp "$log" "$tmp/lap.csv" && ln "$tmp/lap.csv" "$tmp/hard-link.csv" || bad "hard link not made"
usage "is given twice (pairs 1 and 2)" fit "${common[@]}" --track "$track" --log "$tmp/lap.csv" \
  --log "$tmp/hard-link.csv" --time time_s --free grip
# An option's rule is the option's error, not the log file's (nor "fit: error").
usage "lapwing: error: --speed-unit: unknown speed unit 'knots'" correlate "${common[@]}" \
  --log "$log" --time time_s --speed-unit knots
usage "lapwing: error: --free: grip is given twice" fit "${common[@]}" --log "$log" --time time_s \
  --free grip,grip
# A freed value with no place in the car file to be written (a wing family's config) is found
# before the fit runs, at the car file's nearest key, and nothing is written.
"$bin" fit --car "$car" --track "$track" --config front_flap --speed speed_kph --log "$log" \
  --time time_s --free cla --out "$tmp/nowhere" > /dev/null 2> "$tmp/err.txt"
rc=$?
[ $rc -eq 2 ] && grep -qE "^$car:[0-9]+:[0-9]+: error: the file holds no value at this key path" \
  "$tmp/err.txt" && [ ! -e "$tmp/nowhere" ] && ok || bad "fit of a family's cla: rc $rc, $(cat "$tmp/err.txt")"

# 5. fit's module (src/cli/fit_module.hpp): a binary without liblapwing_fit.so beside it (and no
# install's lib/lapwing above it) says so, exit 1, and writes nothing; so does one beside a
# shared object that is not the module. The other commands do not need it.
mkdir -p "$tmp/alone/bin"
cp "$bin" "$tmp/alone/bin/lapwing"
"$tmp/alone/bin/lapwing" fit "${common[@]}" --log "$log" --time time_s --free power \
  --out "$tmp/alone/f" > "$tmp/alone.txt" 2>&1
rc=$?
[ $rc -eq 1 ] && grep -q "^lapwing: error: fit needs its module, liblapwing_fit.so" "$tmp/alone.txt" &&
  grep -q "liblapwing_fit.so: not found" "$tmp/alone.txt" && [ ! -e "$tmp/alone/f" ] && ok ||
  bad "fit without its module: exit $rc, $(cat "$tmp/alone.txt")"
sqlite_lib=$(ldd "$bin" | awk '/libsqlite3/ { print $3 }')
cp "$sqlite_lib" "$tmp/alone/bin/liblapwing_fit.so"
"$tmp/alone/bin/lapwing" fit "${common[@]}" --log "$log" --time time_s --free power \
  --out "$tmp/alone/f" > "$tmp/alone.txt" 2>&1
rc=$?
[ $rc -eq 1 ] && grep -q "has no lapwing_fit_module (not lapwing's fit module)" "$tmp/alone.txt" &&
  [ ! -e "$tmp/alone/f" ] && ok || bad "fit with another library as its module: exit $rc, $(cat "$tmp/alone.txt")"
"$tmp/alone/bin/lapwing" correlate "${common[@]}" --log "$log" --time time_s > "$tmp/alone.txt" 2>&1 &&
  ok || bad "correlate without the fit module: $(cat "$tmp/alone.txt")"
# The binary loads none of Ceres's libraries at its start (ldd: its DT_NEEDED, and theirs), and the
# module exports its entry alone (nm -D: the dynamic symbols it defines; the layers' and the
# templates its own source instantiates kept local, so that nothing of it can be bound to another
# object's copy or the binary's).
! ldd "$bin" | grep -qiE 'ceres|glog|gflags|cholmod|lapack|blas' && ok ||
  bad "the binary needs Ceres's libraries: $(ldd "$bin" | grep -iE 'ceres|glog')"
exports=$(nm -D --defined-only "$(dirname "$bin")/liblapwing_fit.so" | awk '{ print $3 }')
[ "$exports" = "lapwing_fit_module" ] && ok || bad "the fit module exports more than its entry: $exports"

echo "correlate_test: $pass passed, $fail failed"
[ $fail -eq 0 ]
