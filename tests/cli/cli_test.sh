#!/usr/bin/env bash
# End-to-end tests of the real binary (STYLE habit 9): every bundled car x track through check
# and run; every file in tests/data/bad/ exits 2 with its expected message and writes nothing;
# outputs are deterministic; usage errors exit 2; a car that cannot move exits 3.
#   cli_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

# 1. Bundled cars x tracks: check and run succeed, files appear with the contracted columns.
for car in cars/*.yaml; do
  "$bin" check --car "$car" --track tracks/*.yaml --json "$tmp/check.json" > "$tmp/check.txt" 2>&1 &&
    grep -q '"corner_count"' "$tmp/check.json" && ok || bad "check $car"
  for track in tracks/*.yaml; do
    out="$tmp/run-$(basename "$car" .yaml)-$(basename "$track" .yaml)"
    if "$bin" run --car "$car" --track "$track" --out "$out" > "$out.txt" 2>&1; then
      ok
    else
      bad "run $car $track: $(cat "$out.txt")"
      continue
    fi
    trace=$(ls "$out"/trace-*.csv)
    [ "$(head -n 1 "$trace")" = "distance_m,time_s,x_m,y_m,curvature_1pm,speed_kph,long_accel_g,lat_accel_g,gear,rpm,phase,drag_N,downforce_N,front_load_N,rear_load_N,front_share,aero_balance_eff,front_usage,rear_usage,balance_index" ] &&
      ok || bad "trace header $trace"
    ! grep -qiE 'nan|inf' "$trace" "$out/summary.json" "$out/corners.csv" && ok || bad "non-finite number in $out"
    # corners.csv names every field its rows have (issue 10, item 1; csv_files_test reads them all).
    [ "$(head -n 1 "$out/corners.csv")" = "track,config,id,start_m,apex_m,end_m,entry_kph,apex_kph,exit_kph,time_s,limit,entry_axle,apex_axle,exit_axle,entry_balance_index,apex_balance_index,exit_balance_index" ] &&
      ok || bad "corners header $out"
    # run --out writes the single-lap page: speed, map, front share, g-g, corners, balance.
    id=$(basename "$track" .yaml)
    for want in "speed-$id" "map-$id" "front-share-$id" "gg-$id" "corners-$id" "balance-$id"; do
      grep -q "id=\"$want\"" "$out/report.html" 2>/dev/null || { bad "run report lacks $want ($out)"; break; }
    done
    ok
    for key in lapwing car results track config lap_time_s length_m air_density_kg_m3 top_speed_kph \
      min_speed_kph full_throttle_fraction braking_fraction sectors_s corners; do
      grep -q "\"$key\":" "$out/summary.json" || bad "summary.json lacks $key ($out)"
    done
    ok
    ls "$out" | grep -q '\.tmp\.' && bad "temporary file left in $out" || ok
  done
done

# 2. Bad inputs: exit 2, FILE:LINE:COL: error: ..., the expected text, nothing written.
for f in tests/data/bad/*.yaml; do
  expect=$(sed -n '1s/^# expect: //p' "$f")
  case $(basename "$f") in
    car-*) args=(--car "$f" --track tracks/brannock-park.yaml) ;;
    *) args=(--car cars/pellion-fr2.yaml --track "$f") ;;
  esac
  out="$tmp/bad-out"
  rm -rf "$out"
  "$bin" run "${args[@]}" --out "$out" > "$tmp/stdout" 2> "$tmp/stderr"
  code=$?
  msg=$(cat "$tmp/stderr")
  if [ "$code" -ne 2 ]; then bad "$f: exit $code, expected 2 ($msg)"; continue; fi
  [[ "$msg" =~ ^$f:[0-9]+:[0-9]+:\ error:\  ]] || [[ "$msg" =~ ^$f:\ error:\  ]] ||
    { bad "$f: message not FILE:LINE:COL: error: ... ($msg)"; continue; }
  [[ "$msg" == *"$expect"* ]] || { bad "$f: expected '$expect', got '$msg'"; continue; }
  [ "$(wc -l < "$tmp/stderr")" -eq 1 ] || { bad "$f: more than one line on stderr"; continue; }
  [ -e "$out" ] && { bad "$f: wrote $out"; rm -rf "$out"; continue; }
  [ -s "$tmp/stdout" ] && { bad "$f: printed results"; continue; }
  ok
done

# 3. A failed run changes nothing already there.
mkdir -p "$tmp/keep" && echo before > "$tmp/keep/summary.json"
"$bin" run --car tests/data/bad/car-negative-mass.yaml --track tracks/skidpad.yaml --out "$tmp/keep" 2>/dev/null
[ $? -eq 2 ] && [ "$(cat "$tmp/keep/summary.json")" = before ] && ok || bad "failed run changed an existing file"

# 4. Deterministic bytes for the same inputs.
"$bin" run --car cars/caldra-gt.yaml --track tracks/cairnholt.yaml --config high_downforce --out "$tmp/d1" > /dev/null
"$bin" run --car cars/caldra-gt.yaml --track tracks/cairnholt.yaml --config high_downforce --out "$tmp/d2" > /dev/null
diff -r "$tmp/d1" "$tmp/d2" > /dev/null && ok || bad "outputs differ between identical runs"

# 5. Usage errors exit 2; help has an example; version prints.
"$bin" run --car cars/caldra-gt.yaml > /dev/null 2>&1; [ $? -eq 2 ] && ok || bad "missing --track not exit 2"
"$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --bogus > /dev/null 2>&1
[ $? -eq 2 ] && ok || bad "unknown option not exit 2"
"$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config nope --out "$tmp/nope" 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "no config named 'nope'" "$tmp/stderr" && [ ! -e "$tmp/nope" ] && ok || bad "unknown config"
"$bin" > /dev/null 2>&1; [ $? -eq 2 ] && ok || bad "no command not exit 2"
for cmd in check run; do
  "$bin" $cmd --help | grep -q "Example:" && ok || bad "$cmd --help lacks an example"
done
"$bin" --version | grep -qE '^[0-9]+\.[0-9]+\.[0-9]+$' && ok || bad "--version"

# 6. A car that cannot move: exit 3, a clear message, nothing written.
"$bin" run --car tests/data/cannot-move/weak-car.yaml --track tracks/acceleration.yaml --out "$tmp/weak" 2> "$tmp/stderr"
[ $? -eq 3 ] && grep -q "cannot complete the track" "$tmp/stderr" && [ ! -e "$tmp/weak" ] && ok ||
  bad "cannot-move car: $(cat "$tmp/stderr")"

# 7. Air options replace the track's air on every command; bad values are usage errors.
density() { sed -n 's/.*"air_density_kg_m3": \([0-9.e+-]*\).*/\1/p' "$1" | head -n 1; }
"$bin" run --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml --out "$tmp/air0" > /dev/null
"$bin" run --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml --temperature "38 C" \
  --out "$tmp/air1" > /dev/null
awk -v a="$(density "$tmp/air0/summary.json")" -v b="$(density "$tmp/air1/summary.json")" \
  'BEGIN { exit !(b < a) }' && ok || bad "--temperature 38 C did not thin the air"
# ISO 2533 at 2000 m: 1.0066 kg/m3 (REFERENCES.md table, from memory).
"$bin" check --car cars/pellion-fr2.yaml --track tracks/skidpad.yaml --altitude "2000 m" |
  grep -q "1.0066 kg/m3 (ISO 2533 at 2000 m)" && ok || bad "--altitude 2000 m"
# A config's own values beside the car's (high_trim's 642 kg, 2 kg of actuator over the car's
# 640) are shown under it, as its laps use them; a config of none shows no such line.
"$bin" check --car cars/pellion-fr2.yaml > "$tmp/own.txt"
grep -A1 "^config high_trim " "$tmp/own.txt" | grep -q "the car's values this config overrides: mass 642.0 kg" &&
  ! grep -A1 "^config medium " "$tmp/own.txt" | grep -q "overrides" && ok ||
  bad "check's config overrides: $(cat "$tmp/own.txt")"
"$bin" run --car cars/pellion-fr2.yaml --track tracks/skidpad.yaml --temperature hot --out "$tmp/hot" 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "^lapwing: error: --temperature: 'hot' is not a temperature" "$tmp/stderr" &&
  [ ! -e "$tmp/hot" ] && ok || bad "bad --temperature: $(cat "$tmp/stderr")"
"$bin" check --car cars/pellion-fr2.yaml --humidity "150 %" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "out of range" "$tmp/stderr" && ok || bad "--humidity 150 %"

# 8. compare and trade: identical bytes whatever the thread count; their bad input exits 2 and
#    writes nothing.
for t in 1 2; do
  "$bin" compare --car cars/caldra-gt.yaml --track tracks/brannock-park.yaml --track tracks/skidpad.yaml \
    --threads $t --out "$tmp/cmp$t" > "$tmp/cmp$t.txt" || bad "compare --threads $t"
  "$bin" trade --car cars/caldra-gt.yaml --track tracks/brannock-park.yaml --config low_drag --grid 3 \
    --threads $t --out "$tmp/trd$t" > "$tmp/trd$t.txt" || bad "trade --threads $t"
done
diff -r "$tmp/cmp1" "$tmp/cmp2" > /dev/null && cmp -s "$tmp/cmp1.txt" "$tmp/cmp2.txt" && ok || bad "compare differs with threads"
diff -r "$tmp/trd1" "$tmp/trd2" > /dev/null && cmp -s "$tmp/trd1.txt" "$tmp/trd2.txt" && ok || bad "trade differs with threads"
for f in compare.json summary.json corners.csv delta-brannock-park-low_drag-high_downforce.csv \
  trace-skidpad-high_downforce.csv; do
  [ -s "$tmp/cmp1/$f" ] && ok || bad "compare --out lacks $f"
done
for f in trade.json trade-grid-brannock-park.csv; do [ -s "$tmp/trd1/$f" ] && ok || bad "trade --out lacks $f"; done
# compare's delta is the difference of two run lap times.
"$bin" run --car cars/caldra-gt.yaml --track tracks/brannock-park.yaml --config low_drag --out "$tmp/r1" > /dev/null
"$bin" run --car cars/caldra-gt.yaml --track tracks/brannock-park.yaml --config high_downforce --out "$tmp/r2" > /dev/null
lap() { sed -n 's/.*"lap_time_s": \([0-9.e+-]*\).*/\1/p' "$1" | head -n 1; }
awk -v a="$(lap "$tmp/r1/summary.json")" -v b="$(lap "$tmp/r2/summary.json")" \
  -v d="$(tail -n 1 "$tmp/cmp1/delta-brannock-park-low_drag-high_downforce.csv" | cut -d, -f2)" \
  'BEGIN { x = (b - a) - d; exit !(x < 1e-9 && x > -1e-9) }' && ok || bad "compare delta != run difference"
expect_usage() {  # expected text, then the command
  local want=$1; shift
  rm -rf "$tmp/u"
  "$bin" "$@" --out "$tmp/u" > /dev/null 2> "$tmp/stderr"
  [ $? -eq 2 ] && grep -q -- "$want" "$tmp/stderr" && [ ! -e "$tmp/u" ] && ok || bad "$* -> $(cat "$tmp/stderr")"
}
expect_usage "no config named 'mid'" compare --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config mid
expect_usage "no config named 'mid'" trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config mid
expect_usage "--step: 60 % is out of range" trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --step "60 %"
expect_usage "--step: 0 % is out of range" trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --step "0 %"
# A step so small that x (1 + step) == x once gave sensitivities of exactly 0 (issue 19, finding 12).
expect_usage "--step: 1e-300 is out of range" trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --step 1e-300
expect_usage "is given twice" compare --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --track ./tracks/skidpad.yaml
expect_usage "is given twice" trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --track tracks/skidpad.yaml
expect_usage "--model: 'bicycle' is not one of point-mass | axle" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --model bicycle
"$bin" run --car cars/caldra-gt.yaml --track tracks/brannock-park.yaml --model axle | grep -q "axle model" && ok || bad "--model axle"
for cmd in compare trade; do "$bin" $cmd --help | grep -q "Example:" && ok || bad "$cmd --help lacks an example"; done
# Every file a help example names is a bundled file.
for cmd in check run compare trade; do
  for f in $("$bin" $cmd --help | grep -oE '(cars|tracks)/[A-Za-z0-9_.-]+\.yaml'); do
    [ -f "$f" ] && ok || bad "$cmd --help names $f, which does not exist"
  done
done

# 9. track from-log: a logged lap becomes a track that runs; its usage errors exit 2.
"$bin" run --car cars/pellion-fr2.yaml --track tracks/cairnholt.yaml --out "$tmp/log" > /dev/null
awk -F, 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; print "t_s,v_kph,ay_g"; next }
  NR % 4 == 2 { print $c["time_s"] "," $c["speed_kph"] "," $c["lat_accel_g"] }' \
  "$tmp"/log/trace-cairnholt-low.csv > "$tmp/lap.csv"
"$bin" track from-log --log "$tmp/lap.csv" --speed v_kph --lat-accel ay_g --time t_s --closed \
  --out "$tmp/logged/lap.yaml" > "$tmp/fromlog.txt" && [ -s "$tmp/logged/lap.yaml" ] &&
  [ -s "$tmp/logged/lap.csv" ] && ok || bad "track from-log: $(cat "$tmp/fromlog.txt")"
"$bin" run --car cars/pellion-fr2.yaml --track "$tmp/logged/lap.yaml" --out "$tmp/logrun" > /dev/null &&
  ok || bad "run on a track from a log"
# Without the grades the log does not hold, the rebuilt lap is within a few percent.
awk -v a="$(lap "$tmp/log/summary.json")" -v b="$(lap "$tmp/logrun/summary.json")" \
  'BEGIN { d = (b - a) / a; exit !(d < 0.05 && d > -0.05) }' && ok || bad "logged lap far from its source"
"$bin" track from-log --log "$tmp/lap.csv" --speed v_kph --lat-accel ay_g --out "$tmp/x.yaml" 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "give one of --distance COL and --time COL" "$tmp/stderr" && [ ! -e "$tmp/x.yaml" ] && ok ||
  bad "from-log without distance or time"
"$bin" track from-log --log "$tmp/lap.csv" --speed speed --lat-accel ay_g --time t_s --out "$tmp/x.yaml" 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "no column 'speed'" "$tmp/stderr" && [ ! -e "$tmp/x.yaml" ] && ok || bad "from-log unknown column"
"$bin" check --car cars/caldra-gt.yaml --track tracks/brannock-park-survey.yaml | grep -q "lap time with the centerline smoothed" &&
  ok || bad "check on a centerline track lacks the smoothing sensitivity"
"$bin" track from-log --help | grep -q "Example:" && ok || bad "track from-log --help lacks an example"
# The example runs as written on the bundled log (its --out moved into the test's folder): it
# once named a lap.csv with a lat_g column that is not bundled, and --closed on a log that is no
# closed lap.
read -ra example <<< "$("$bin" track from-log --help | sed -n '/^Example:/{n;p;}')"
for ((i = 0; i < ${#example[@]}; i++)); do
  [ "${example[i]}" = --out ] && example[i + 1]="$tmp/example/$(basename "${example[i + 1]}")"
done
[ "${example[0]}" = lapwing ] && [ -f "${example[4]}" ] &&
  "$bin" "${example[@]:1}" > "$tmp/example.txt" 2>&1 && [ -s "$tmp/example/brannock-logged.yaml" ] &&
  ok || bad "track from-log --help's example: ${example[*]}: $(cat "$tmp/example.txt")"
# A log read in the wrong acceleration unit (g read as m/s2: curvature 9.81 times too small) is
# refused with the option that fixes it, and nothing is written.
"$bin" track from-log --log "$tmp/lap.csv" --speed v_kph --lat-accel ay_g --accel-unit m/s2 --time t_s \
  --closed --out "$tmp/wrong/lap.yaml" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "does not close.*give --accel-unit g" "$tmp/stderr" && [ ! -e "$tmp/wrong" ] &&
  ok || bad "from-log in the wrong unit: $(cat "$tmp/stderr")"
# An open log keeps its first speed and the air options go into the track it writes.
"$bin" track from-log --log "$tmp/lap.csv" --speed v_kph --lat-accel ay_g --time t_s --altitude "1200 m" \
  --out "$tmp/open/lap.yaml" > /dev/null && grep -q "^start_speed: [0-9.]* m/s" "$tmp/open/lap.yaml" &&
  grep -q "^altitude: 1200 m" "$tmp/open/lap.yaml" &&
  "$bin" check --car cars/pellion-fr2.yaml --track "$tmp/open/lap.yaml" | grep -q "ISO 2533 at 1200 m" &&
  ok || bad "from-log open lap: start_speed or altitude missing"
# A data column lapwing does not read is named in a note by check and run.
mkdir -p "$tmp/extra" && sed 's/^x_m,y_m,width_left_m,width_right_m$/&,width_m/; /^-\{0,1\}[0-9]/s/$/,12/' \
  tracks/brannock-park-survey.csv > "$tmp/extra/survey.csv" &&
  sed 's/brannock-park-survey.csv/survey.csv/' tracks/brannock-park-survey.yaml > "$tmp/extra/survey.yaml"
for cmd in check run; do
  "$bin" $cmd --car cars/caldra-gt.yaml --track "$tmp/extra/survey.yaml" |
    grep -q "note.*column 'width_m' not used" && ok || bad "$cmd does not name an unused column"
done

# 10. An output folder that cannot be made is the user's error, not an internal one.
"$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --out /proc/lapwing-nope > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "^lapwing: error: cannot create /proc/lapwing-nope" "$tmp/stderr" && ok ||
  bad "unwritable --out: $(cat "$tmp/stderr")"

# 11. Labels that say what they mean (issue 10, item 11).
# The limiting axle is front, rear or both (within +-0.02 of usage), with the front - rear usage
# beside it: every label must agree with the value printed next to it.
# (The Pellion FR-2 on Brannock Park: two of its apexes fall inside the band.)
"$bin" run --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml --model axle > "$tmp/axles.txt"
grep -q "front-rear usage entry/apex/exit" "$tmp/axles.txt" && grep -q "both within +-0.02" "$tmp/axles.txt" &&
  ok || bad "run's corners table lacks the usage difference or the band"
awk '/^corner  turn/ { on = 1; next } on && /^-/ { next } on && NF != 12 { on = 0 }
  on { n = split($(NF - 1), a, "/"); split($NF, d, "/"); rows++
       for (k = 1; k <= 3; k++) {
         want = d[k] > 0.02 ? "front" : (d[k] < -0.02 ? "rear" : "both")
         if (a[k] != want) { print "corner " $1 ": " a[k] " beside " d[k]; bad_rows++ }
         if (a[k] == "both") both++ } }
  END { exit !(rows > 0 && both > 0 && bad_rows == 0) }' "$tmp/axles.txt" &&
  ok || bad "axle labels disagree with their usage difference: $(cat "$tmp/axles.txt")"
# compare's where-the-time-goes columns say they are deltas.
"$bin" compare --car cars/caldra-gt.yaml --track tracks/skidpad.yaml > "$tmp/cmp.txt"
grep -q "delta in corners s  delta under braking s  delta on straights s" "$tmp/cmp.txt" && ok ||
  bad "compare's split columns do not say delta: $(grep '^config' "$tmp/cmp.txt")"
# compare starts with a verdict per track (issue 17): winner and margin as the "best" line says,
# the margin split into corners, braking and straights that add up to it (to the 0.001 s of
# rounding per part: 0.002 s), and the balance window's verdict for a car that has one.
"$bin" compare --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml \
  --track tracks/saltmere-flats.yaml --config low --config high --out "$tmp/verdict" > "$tmp/verdict.txt"
[ "$(sed -n 3p "$tmp/verdict.txt")" = "verdict (+: time the winner gains there)" ] && ok ||
  bad "compare does not start with the verdict: $(head -4 "$tmp/verdict.txt")"
for track in "Brannock Park" "Saltmere Flats"; do
  line=$(grep "^$track: " "$tmp/verdict.txt" | head -1)
  best=$(awk -v t="$track" '$0 ~ "^track   " t " \\(" { on = 1 } on && /^best / { print $2, $4; exit }' "$tmp/verdict.txt")
  awk -v line="$line" -v best="$best" 'BEGIN {
    n = split(line, w, " "); split(best, b, " ")
    for (i = 1; i <= n; i++) {
      if (w[i] == "wins" && w[i + 1] == "by") { winner = w[i - 1]; margin = w[i + 2] }
      if (w[i] == "in" && w[i + 1] == "corners,") c = w[i - 2]
      if (w[i] == "under" && w[i + 1] == "braking,") k = w[i - 2]
      if (w[i] == "on" && w[i + 1] == "straights.") s = w[i - 2] }
    d = c + k + s - margin
    exit !(winner == b[1] && margin == b[2] && d < 0.002 && d > -0.002) }' && ok ||
    bad "verdict on $track disagrees with the best line ($best): $line"
done
grep -q "^  balance window 33.5-57.5 % front above 150 km/h, > 0.5 g lateral: " "$tmp/verdict.txt" && ok ||
  bad "compare lacks the balance window's verdict"
python3 -c '
import json, sys
r = json.load(open(sys.argv[1]))["results"]
w = [x["balance"]["window"] for x in r]
ok = len(w) == 4 and all(abs(x["front_share_min"] - 0.335) < 1e-12 and x["above_kph"] == 150
                         and x["result"] in ("pass", "fail", "not reached") for x in w)
sys.exit(0 if ok else 1)' "$tmp/verdict/summary.json" && ok || bad "summary.json lacks the balance window"
# check prints no closure gap for an open track (nothing to close), and JSON null.
"$bin" check --car cars/caldra-gt.yaml --track tracks/acceleration.yaml --json "$tmp/open.json" > "$tmp/open.txt"
! grep -q "closure gap" "$tmp/open.txt" && grep -q '"closure_gap_m": null' "$tmp/open.json" && ok ||
  bad "check prints a closure gap for an open track: $(grep 'open (sprint)' "$tmp/open.txt")"
"$bin" check --car cars/caldra-gt.yaml --track tracks/skidpad.yaml | grep -q "closure gap 0.000 m" && ok ||
  bad "check lost the closure gap of a closed track"
# A config with drag and no downforce: its front share of the aero load is undefined ('-', null),
# and the drag moment takes D z_D / L off the front axle (REFERENCES, load transfer; moments about
# the rear contact patch). At 200 km/h in ISO 2533 sea-level air (rho 1.2250 kg/m3, REFERENCES):
# D = 0.5 rho CdA v^2, front aero load = -D 0.5 m / 2.6 m; to 1e-6 relative (the atmosphere's
# formulas give 1.225000018 against the table's 1.2250: 1.5e-8).
"$bin" check --car tests/data/drag-only-car.yaml --json "$tmp/drag.json" > "$tmp/drag.txt"
grep -q '"front_share_with_drag_moment": null' "$tmp/drag.json" &&
  ! grep -q '"front_share_with_drag_moment": 0' "$tmp/drag.json" &&
  grep -qE '^200 +0 +1701 +- +- +-327$' "$tmp/drag.txt" && ok ||
  bad "drag-only car's balance: $(cat "$tmp/drag.txt")"
awk '/"speed_kph": 200/ { on = 1 } on && /"front_aero_load_n"/ { gsub(/[",]/, ""); got = $2; on = 0 }
  END { v = 200 / 3.6; want = -0.5 * 1.225 * 0.9 * v * v * 0.5 / 2.6
        d = (got - want) / want; exit !(d < 1e-6 && d > -1e-6) }' "$tmp/drag.json" && ok ||
  bad "drag-only front aero load is not -D z_D / L"
"$bin" run --car tests/data/drag-only-car.yaml --track tracks/skidpad.yaml --out "$tmp/dragrun" |
  grep -q "no downforce at 150 and 250 km/h: no aero balance" && ok || bad "run's balance with no downforce"
grep -q '"aero_balance_with_drag_150_kph": null' "$tmp/dragrun/summary.json" && ok ||
  bad "summary.json balance with the drag moment and no downforce is not null"
# The share alone is null too (README, "Output files"; it read the config's 0.45 once).
grep -q '"aero_balance_150_kph": null' "$tmp/dragrun/summary.json" &&
  grep -q '"aero_balance_250_kph": null' "$tmp/dragrun/summary.json" && ok ||
  bad "summary.json aero balance without downforce is not null"

# 12. Messages in lapwing's own words (issue 10, item 12).
expect_error() {  # expected text, then the command; exit 2, one line on stderr
  local want=$1; shift
  "$bin" "$@" > "$tmp/stdout" 2> "$tmp/stderr"
  local code=$?
  [ "$code" -eq 2 ] && grep -qF -- "$want" "$tmp/stderr" && [ "$(wc -l < "$tmp/stderr")" -eq 1 ] &&
    ok || bad "$* -> exit $code: $(cat "$tmp/stderr")"
}
expect_error "lapwing: error: unknown command 'runn'; did you mean 'run'? (commands: check, run, compare, trade, track, correlate, fit, sweep)" \
  runn --car cars/caldra-gt.yaml --track tracks/skidpad.yaml
expect_error "unknown command 'track from-lgo'; did you mean 'track from-log'? (commands of track: from-log, line)" \
  track from-lgo --log x.csv
expect_error "unknown command 'simulate' (commands: check, run, compare, trade, track, correlate, fit, sweep)" simulate
expect_error "lapwing: error: give a command (commands: check, run, compare, trade, track, correlate, fit, sweep)"
expect_error "no config named 'hgh_downforce'; did you mean 'high_downforce'? (the car has low_drag, high_downforce)" \
  run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config hgh_downforce
expect_error "no config named 'high'; did you mean 'high_downforce'?" \
  compare --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config high
expect_error "no config named 'wet' (the car has low_drag, high_downforce)" \
  trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config wet
expect_error "lapwing: error: --track is given 2 times; run laps one track (compare and trade take several)" \
  run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --track tracks/brannock-park.yaml
! grep -q "At Most" "$tmp/stderr" && ok || bad "the parser library's words for --track twice"
expect_error "lapwing: error: --car is given 2 times; check takes one" \
  check --car cars/caldra-gt.yaml --car=cars/pellion-fr2.yaml
# An empty value (a script's unset variable) is not "not given": the output would silently not
# be written.
expect_error "lapwing: error: --out is given an empty value" \
  run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --out ""
expect_error "lapwing: error: --json is given an empty value" check --car cars/caldra-gt.yaml --json=
# A line over a track too short for its file to be read back (a centerline of 10 points at
# least) is refused, and nothing is written.
printf 'format: 1\nname: "short"\nclosed: false\nwidth: 10 m\nsegments:\n  - straight: 5 m\n' \
  > "$tmp/short5.yaml"
expect_error "track line: the line over 5.0 m of track has 6 points, and a centerline track needs at least 10" \
  track line --track "$tmp/short5.yaml" --out "$tmp/short-line/line.yaml"
[ ! -e "$tmp/short-line" ] && ok || bad "a line too short was written"
# Air that cannot be (water vapour above the air's own pressure) from the options: named as theirs.
expect_error "--humidity give (the track's own values for the rest): the water vapour at 100 % humidity and 70.0 C (314 hPa) is not below the air's pressure (300 hPa): no such air" \
  run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --temperature "70 C" --pressure "300 hPa" --humidity "100 %"
expect_error "lapwing: error: --step: 2 is out of range ([0.1, 50] %); did you mean 2 %?" \
  trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --step 2
expect_error "--humidity: 60 is out of range ([0, 100] %); did you mean 60 %?" \
  run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --humidity 60
expect_error "--pressure: 985 is out of range ([30000, 110000] Pa); did you mean 985 hPa or 985 mbar?" \
  check --car cars/caldra-gt.yaml --pressure 985
expect_error "--temperature: 300 is out of range ([-50, 70] C); did you mean 300 K?" \
  check --car cars/caldra-gt.yaml --temperature 300
# A value given with its unit and still out of range gets no guess.
expect_error "--step: 60 % is out of range ([0.1, 50] %)" \
  trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --step "60 %"
! grep -q "did you mean" "$tmp/stderr" && ok || bad "a guess for a value given with its unit"

# 13. check's smoothing study: a variant that cannot be solved is a note naming it, not a failure
# (issue 10, item 7b). Fitted at half its smoothing strength (13.4 m for the given 15 m) the test
# sprint's wiggle is too tight for its 180 km/h start; run takes the track as given.
"$bin" run --car cars/caldra-gt.yaml --track tests/data/sprint-wiggle.yaml > /dev/null 2>&1 && ok ||
  bad "run refuses the wiggle sprint"
"$bin" check --car cars/caldra-gt.yaml --track tests/data/sprint-wiggle.yaml --json "$tmp/wig.json" \
  > "$tmp/wig.txt" 2> "$tmp/stderr" && ok || bad "check fails on the wiggle sprint: $(cat "$tmp/stderr")"
grep -q "note: the centerline at half strength (13.4 m) cannot be solved with config low_drag: start_speed 180.0 km/h is more than the car can hold" "$tmp/wig.txt" &&
  grep -qE '^low_drag +- +[0-9.]+ +[0-9.]+ +-$' "$tmp/wig.txt" && grep -q '"half_s": null' "$tmp/wig.json" &&
  grep -q '"smoothing_sensitivity_notes"' "$tmp/wig.json" && ok || bad "check's note on the half variant: $(cat "$tmp/wig.txt")"
# 14. Limits said, not hidden. A gearless car with no drag has no finite top speed: check names
#     the tables' ceiling as the limit (it once said "rev limit" of a car without gears).
"$bin" check --car tests/data/no-aero-car.yaml --json "$tmp/noaero.json" > "$tmp/noaero.txt"
grep -q "top speed 900.0 km/h (table ceiling)" "$tmp/noaero.txt" &&
  grep -q '"top_speed_limit": "table ceiling"' "$tmp/noaero.json" && ok || bad "check: ceiling not named"
# With CdA 0 the lift-to-drag ratio is undefined: the text's "-", null in JSON (it read 0, the
# worst of all, so a script ranking configs by it put a drag-free wing last).
grep -q '"lift_to_drag": null' "$tmp/noaero.json" && ! grep -q '"lift_to_drag": 0' "$tmp/noaero.json" &&
  ok || bad "check --json: lift_to_drag of a config without drag"
# A speed table typed without units is in m/s (100 m/s = 360 km/h): every speed of the lap lies
# below its first row, and run (and compare's summary.json) says so at once, with the share.
# (A row above 250 m/s, the top of a lap's tables, is an error at its key: the 300 of the same
# table typed in km/h without units.)
sed 's/speed: *\[100 km\/h, 150 km\/h, 200 km\/h, 250 km\/h, 300 km\/h\]/speed: [100, 150, 200, 250, 300]/' \
  cars/pellion-fr2.yaml > "$tmp/mps-300.yaml"
grep -q "speed: \[100, 150, 200, 250, 300\]" "$tmp/mps-300.yaml" || bad "mps-300 car not made"
"$bin" check --car "$tmp/mps-300.yaml" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "^$tmp/mps-300.yaml:[0-9]*:[0-9]*: error: value 300 is out of range: must be \[0, 250\] in SI units (aero.configs.medium_table.speed_table.speed\[4\])$" "$tmp/stderr" &&
  ok || bad "a speed table's row above 250 m/s not refused at its key"
sed 's/speed: *\[100 km\/h, 150 km\/h, 200 km\/h, 250 km\/h, 300 km\/h\]/speed: [100, 150, 200, 220, 240]/' \
  cars/pellion-fr2.yaml > "$tmp/mps-table.yaml"
grep -q "speed: \[100, 150, 200, 220, 240\]" "$tmp/mps-table.yaml" || bad "mps-table car not made"
want="below the speed table's first row (360.0 km/h) its values are held: 100.0 % of the lap distance"
"$bin" run --car "$tmp/mps-table.yaml" --track tracks/brannock-park.yaml --config medium_table \
  --out "$tmp/mps" > "$tmp/mps.txt" && grep -qF "warning: $want" "$tmp/mps.txt" &&
  grep -qF "\"$want\"" "$tmp/mps/summary.json" && ok || bad "run: speed table in m/s not warned of"
"$bin" compare --car "$tmp/mps-table.yaml" --track tracks/brannock-park.yaml --config medium \
  --config medium_table --out "$tmp/mpsc" > /dev/null && grep -qF "\"$want\"" "$tmp/mpsc/summary.json" &&
  ok || bad "compare: speed table in m/s not in summary.json"

# 15. Output names unique by construction and folders as transactions (issue 19, finding 2 and
#     deliver 2). Two tracks of one file stem, or configs whose names joined by '-' read alike
#     ("x" + "y-z" and "x-y" + "z"), are a usage error naming both, before anything is written.
mkdir -p "$tmp/stem/a" "$tmp/stem/b" && cp tracks/skidpad.yaml "$tmp/stem/a/t.yaml" &&
  cp tracks/skidpad.yaml "$tmp/stem/b/t.yaml"
"$bin" compare --car cars/caldra-gt.yaml --track "$tmp/stem/a/t.yaml" --track "$tmp/stem/b/t.yaml" \
  --out "$tmp/stem/out" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "^lapwing: error: two outputs would be named trace-t-" "$tmp/stderr" &&
  grep -qF "$tmp/stem/a/t.yaml" "$tmp/stderr" && grep -qF "$tmp/stem/b/t.yaml" "$tmp/stderr" &&
  [ "$(ls -A "$tmp/stem" | tr '\n' ' ')" = "a b " ] && ok || bad "tracks of one stem: $(cat "$tmp/stderr")"
"$bin" trade --car cars/caldra-gt.yaml --track "$tmp/stem/a/t.yaml" --track "$tmp/stem/b/t.yaml" \
  --out "$tmp/stem/out" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "two outputs would be named trade-grid-t.csv" "$tmp/stderr" &&
  [ ! -e "$tmp/stem/out" ] && ok || bad "trade, tracks of one stem: $(cat "$tmp/stderr")"
# Stems that differ only in case: one file where case is not told apart (a copy of the folder
# to such a file system would keep one of the two).
cp tracks/skidpad.yaml "$tmp/stem/b/T.yaml"
"$bin" compare --car cars/caldra-gt.yaml --track "$tmp/stem/a/t.yaml" --track "$tmp/stem/b/T.yaml" \
  --out "$tmp/stem/out" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "two outputs would be named trace-t-[a-z_]*.csv and trace-T-[a-z_]*.csv (one name where case is not told apart)" "$tmp/stderr" &&
  [ ! -e "$tmp/stem/out" ] && ok || bad "tracks of one stem but for case: $(cat "$tmp/stderr")"
sed 's/^    low:/    x:/; s/^    medium:/    y-z:/; s/^    high:/    x-y:/; s/^    medium_table:/    z:/' \
  cars/pellion-fr2.yaml > "$tmp/dash-car.yaml"
"$bin" compare --car "$tmp/dash-car.yaml" --track tracks/skidpad.yaml --config x --config y-z \
  --config x-y --config z --out "$tmp/dash" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -qF "two outputs would be named delta-skidpad-x-y-z.csv: --track tracks/skidpad.yaml with configs x and y-z, and --track tracks/skidpad.yaml with configs x-y and z" "$tmp/stderr" &&
  [ ! -e "$tmp/dash" ] && ok || bad "configs joined alike: $(cat "$tmp/stderr")"
# A second run replaces the folder whole: a config of the first run leaves no file behind.
"$bin" compare --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --out "$tmp/again" > /dev/null &&
  "$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --config low_drag --out "$tmp/again" \
    > /dev/null && [ "$(ls "$tmp/again" | tr '\n' ' ')" = "corners.csv report.html summary.json trace-skidpad-low_drag.csv " ] &&
  [ -z "$(ls -A "$tmp" | grep lapwing-stage)" ] && ok || bad "second run left a mix: $(ls -A "$tmp/again")"
# A folder holding the user's own files is not replaced.
mkdir -p "$tmp/mine" && echo keep > "$tmp/mine/notes.txt"
"$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --out "$tmp/mine" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "will not replace $tmp/mine: it holds notes.txt" "$tmp/stderr" &&
  [ "$(ls -A "$tmp/mine")" = notes.txt ] && ok || bad "user's folder: $(cat "$tmp/stderr")"
# Symlinks and devices are written through (finding 4): --json /dev/stdout reaches the pipe and
# /dev/stdout stays the link it was; a linked --out folder keeps its link.
"$bin" check --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --json /dev/stdout |
  grep -q '"corner_count"' && [ -L /dev/stdout ] && ok || bad "check --json /dev/stdout"
mkdir -p "$tmp/real-out" && ln -s real-out "$tmp/link-out"
"$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --out "$tmp/link-out" > /dev/null &&
  [ -L "$tmp/link-out" ] && [ -s "$tmp/real-out/summary.json" ] && ok || bad "linked --out replaced"
# "cannot write" says why (finding 12).
"$bin" check --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --json "$tmp/mine/notes.txt/x.json" \
  > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "^lapwing: error: cannot write $tmp/mine/notes.txt/x.json: Not a directory$" "$tmp/stderr" &&
  ok || bad "cannot write without a reason: $(cat "$tmp/stderr")"

# 16. Bounded memory (issue 19, finding 11; deliver 3): a study estimated to need more than
#     --memory-limit is refused at once, exit 2, naming the mesh, the estimate and the limit, and
#     writes nothing; under the limit it runs.
"$bin" compare --car cars/caldra-gt.yaml --track tracks/brannock-park.yaml --threads 1 \
  --memory-limit 10MB --out "$tmp/mem" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -qE "^lapwing: error: needs about [0-9.]+ MB of memory, more than --memory-limit 10.0 MB: the mesh of tracks/brannock-park.yaml has [0-9]+ points \([0-9.]+ m at a step of 0.5 m\), with 2 laps kept per track, 1 lap solved at once" "$tmp/stderr" &&
  [ ! -e "$tmp/mem" ] && ok || bad "compare over --memory-limit: $(cat "$tmp/stderr")"
"$bin" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --memory-limit "1 GiB" > /dev/null &&
  ok || bad "run under --memory-limit 1 GiB"
"$bin" trade --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --memory-limit 1MB > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "more than --memory-limit 1.00 MB: the mesh of tracks/skidpad.yaml has" "$tmp/stderr" &&
  ok || bad "trade over --memory-limit: $(cat "$tmp/stderr")"
expect_usage "--memory-limit: '12 parsecs' is not a size" run --car cars/caldra-gt.yaml --track tracks/skidpad.yaml --memory-limit "12 parsecs"

# 17. The racing line (issue 13). track line writes OUT.yaml and OUT.csv (the line with the widths
#     measured from it), prints the length, the largest offset and, with --car, both laps; lapping
#     OUT.yaml laps the line (within 0.1 %: the file's points are refitted); laid again over its
#     own output the line barely moves (within 0.25 % of the lap: the widths are measured along
#     the first centerline's normals, not the line's). Measured 0.14 % with the axle model, the
#     default since issue 12 (0.06 % with the point mass, which the 0.1 % bound was set for): the
#     axle model drives out of corners on the rear axle's grip, where a small change of the
#     line's curvature costs more drive.
"$bin" track line --track tracks/brannock-park.yaml --out "$tmp/line/bp-line.yaml" \
  --car cars/caldra-gt.yaml > "$tmp/line.txt" 2> "$tmp/stderr" &&
  [ -s "$tmp/line/bp-line.yaml" ] &&
  [ "$(sed -n 1p "$tmp/line/bp-line.csv")" = "x_m,y_m,width_left_m,width_right_m" ] &&
  grep -q "^line    min-curvature, vehicle 2.00 m wide, margin 0.50 m: [0-9.]* m long" "$tmp/line.txt" &&
  grep -q "largest offset [0-9.]* m" "$tmp/line.txt" &&
  grep -q "^lap     Caldra GT, config low_drag: centerline [0-9.]* s, line [0-9.]* s" "$tmp/line.txt" &&
  ok || bad "track line: $(cat "$tmp/line.txt" "$tmp/stderr")"
line_lap=$(sed -n 's/.*, line \([0-9.]*\) s.*/\1/p' "$tmp/line.txt")
file_lap=$("$bin" run --car cars/caldra-gt.yaml --track "$tmp/line/bp-line.yaml" |
  sed -n 's/^lap time \([0-9.]*\) s.*/\1/p')
awk -v a="$line_lap" -v b="$file_lap" 'BEGIN { exit !(a > 0 && (a - b) ^ 2 <= (0.001 * a) ^ 2) }' &&
  ok || bad "track line: the line laps $line_lap s, its file $file_lap s"
"$bin" track line --track "$tmp/line/bp-line.yaml" --out "$tmp/line/again.yaml" \
  --car cars/caldra-gt.yaml > "$tmp/again.txt" &&
  again_lap=$(sed -n 's/.*, line \([0-9.]*\) s.*/\1/p' "$tmp/again.txt") &&
  awk -v a="$line_lap" -v b="$again_lap" 'BEGIN { exit !(a > 0 && (a - b) ^ 2 <= (0.0025 * a) ^ 2) }' &&
  ok || bad "track line on its own output: $line_lap s, then $(cat "$tmp/again.txt")"
# The written track carries the source's wind (as given), trim zones (moved to where the line
# passes them, as a mesh over the line reads them) and bank (a bank_deg column read where the line
# passes): its lap is the line's that track line prints. Before, all three were dropped: measured
# 0.53 % (wind), 0.34 % (trim zones), 1.2 % (bank). The bound for wind and trim zones is 0.1 %:
# on the plain bundled tracks the gap is at most 0.04 % (tools/line-gap; the line's own curvature
# is the 3-point one at 1 m, the written track's the fit's). A bank changes in a step at a
# segment's end, which rows 1 m apart carry as a ramp the fit smooths over 2 m: the hairpin's
# entry and exit gain a little bank; measured 0.28 %, bound 0.5 % (the loss without it is 1.2 %).
line_vs_file() {  # bound (fraction), car, track, then track line's other options
  local bound=$1 car=$2 track=$3; shift 3
  local out="$tmp/line/$(basename "$track" .yaml)-written.yaml" line_lap file_lap
  line_lap=$("$bin" track line --track "$track" --car "$car" --out "$out" "$@" |
    sed -n 's/.*, line \([0-9.]*\) s.*/\1/p')
  file_lap=$("$bin" run --car "$car" --track "$out" "$@" | sed -n 's/^lap time \([0-9.]*\) s.*/\1/p')
  awk -v a="$line_lap" -v b="$file_lap" -v f="$bound" 'BEGIN { exit !(a > 0 && (a - b) ^ 2 <= (f * a) ^ 2) }' &&
    ok || bad "track line $track: the line laps $line_lap s, the track it wrote $file_lap s"
}
{ cat tracks/saltmere-flats.yaml; echo "wind: {speed: 8 m/s, from: 90 deg}"; } > "$tmp/line-windy.yaml"
line_vs_file 0.001 cars/caldra-gt.yaml "$tmp/line-windy.yaml"
grep -q "^wind: {speed: 8 m/s, from: 90 deg}$" "$tmp/line/line-windy-written.yaml" &&
  ok || bad "track line dropped the wind: $(cat "$tmp/line/line-windy-written.yaml")"
{ cat tracks/brannock-park.yaml; echo "trim_zones: [[0 m, 200 m]]"; } > "$tmp/line-trim.yaml"
line_vs_file 0.001 cars/pellion-fr2.yaml "$tmp/line-trim.yaml" --config high_trim
sed 's/^\(  - arc: {radius: 15 m, angle: 124.1634 deg, turn: right\)}/\1, bank: 20 deg}/' \
  tracks/brannock-park.yaml > "$tmp/line-bank.yaml"
grep -q "bank: 20 deg" "$tmp/line-bank.yaml" && ok || bad "the banked test track has no bank"
line_vs_file 0.005 cars/pellion-fr2.yaml "$tmp/line-bank.yaml"
[ "$(sed -n 1p "$tmp/line/line-bank-written.csv")" = "x_m,y_m,width_left_m,width_right_m,bank_deg" ] &&
  ok || bad "track line wrote no bank_deg: $(sed -n 1p "$tmp/line/line-bank-written.csv")"
# It writes beside the other files of its folder (no folder transaction: the first line is still
# there), and never over the track it reads or that track's data (issue 19's output rules).
[ -s "$tmp/line/bp-line.yaml" ] && [ -s "$tmp/line/bp-line.csv" ] && [ -s "$tmp/line/again.csv" ] &&
  ok || bad "track line removed other files of its folder: $(ls -A "$tmp/line")"
cp "$tmp/line/bp-line.csv" "$tmp/line/keep.csv"
expect_error "would replace $tmp/line/bp-line.yaml, which this command reads" \
  track line --track "$tmp/line/bp-line.yaml" --out "$tmp/line/bp-line.yaml"
cmp -s "$tmp/line/bp-line.csv" "$tmp/line/keep.csv" && ok || bad "track line replaced its own input"
# min-time: both laps, the min-time one no slower.
"$bin" track line --track tracks/brannock-park.yaml --out "$tmp/line/bp-mt.yaml" --method min-time \
  --car cars/pellion-fr2.yaml > "$tmp/mt.txt" &&
  grep -q "min-curvature line [0-9.]* s.*, min-time line [0-9.]* s" "$tmp/mt.txt" &&
  awk '{ for (i = 1; i <= NF; i++) { if ($i == "min-curvature") mc = $(i + 2); if ($i == "min-time") mt = $(i + 2) } }
    END { exit !(mt + 0 > 0 && mt + 0 <= mc + 0) }' "$tmp/mt.txt" &&
  ok || bad "track line --method min-time: $(cat "$tmp/mt.txt")"
expect_error "lapwing: error: --method min-time needs --car" \
  track line --track tracks/brannock-park.yaml --out "$tmp/line/x.yaml" --method min-time
expect_error "a racing line needs the track's widths" \
  track line --track tracks/acceleration.yaml --out "$tmp/line/x.yaml"
# Too wide a vehicle or margin given as options: their usage error, naming the track's narrowest
# point (it was reported at the track file's first key as if the file were wrong).
expect_error "lapwing: error: --vehicle-width: a vehicle 2.50 m wide with a margin of 0.50 m each side needs 3.50 m, and tracks/skidpad.yaml is 3.00 m wide at 0.0 m, its narrowest" \
  track line --track tracks/skidpad.yaml --out "$tmp/line/x.yaml" --vehicle-width 2.5
expect_error "lapwing: error: --margin: a vehicle 2.00 m wide with a margin of 4.50 m each side needs 11.00 m, and tracks/brannock-park.yaml is 10.00 m wide at 0.0 m, its narrowest" \
  track line --track tracks/brannock-park.yaml --out "$tmp/line/x.yaml" --margin 4.5
# The track's own line: key too wide: the track's error at that key.
{ cat tracks/brannock-park.yaml; echo "line: {vehicle_width: 5 m, margin: 3 m}"; } > "$tmp/too-wide.yaml"
expect_error "too-wide.yaml:$(($(wc -l < tracks/brannock-park.yaml) + 1)):7: error: the track is 10.00 m wide at 0.0 m, its narrowest, less than the vehicle's 5.00 m and a margin of 3.00 m each side (line)" \
  track line --track "$tmp/too-wide.yaml" --out "$tmp/line/x.yaml"
[ -e "$tmp/line/x.yaml" ] && bad "track line wrote after an error" || ok
# The line: key: every command laps the line; check says so.
{ cat tracks/cairnholt.yaml; echo "line: {method: min-curvature, vehicle_width: 1.9 m}"; } > "$tmp/cairnholt-line.yaml"
"$bin" check --car cars/caldra-gt.yaml --track "$tmp/cairnholt-line.yaml" |
  grep -q "line: min-curvature, vehicle 1.90 m wide" && ok || bad "check does not describe the line"
# The report's map draws both edges (grey polylines); summary.json has the data's verdict.
"$bin" run --car cars/caldra-gt.yaml --track "$tmp/cairnholt-line.yaml" --out "$tmp/lined" > /dev/null &&
  [ "$(grep -o 'polyline fill="none" stroke="#8a8a8a"' "$tmp/lined/report.html" | wc -l)" -eq 2 ] &&
  grep -q 'id="quality-cairnholt-line"' "$tmp/lined/report.html" &&
  grep -q '"verdict": "good"' "$tmp/lined/summary.json" && ok || bad "run on a line: report or summary.json"
# 18. Data-quality verdicts: the survey is good; its points taken 26 m apart are poor, a warning in
#     run, in summary.json and in the report.
"$bin" run --car cars/caldra-gt.yaml --track tracks/brannock-park-survey.yaml > "$tmp/survey.txt" &&
  grep -q "^track data: centerline, points 2.0 m apart, noise [0-9]* mm rms (GCV estimate), lap [0-9.]* % apart between half and double smoothing: good" "$tmp/survey.txt" &&
  grep -q "^smoothing [0-9.]* m (auto: " "$tmp/survey.txt" && ok || bad "survey verdict: $(cat "$tmp/survey.txt")"
mkdir -p "$tmp/sparse" &&
  awk '/^#/ || /^x_m/ || (n++ % 13 == 0)' tracks/brannock-park-survey.csv > "$tmp/sparse/sparse.csv" &&
  sed 's/brannock-park-survey.csv/sparse.csv/' tracks/brannock-park-survey.yaml > "$tmp/sparse/sparse.yaml"
"$bin" run --car cars/caldra-gt.yaml --track "$tmp/sparse/sparse.yaml" --out "$tmp/sparse/out" > "$tmp/sparse.txt" &&
  grep -q "^warning: track data poor: centerline, points 26.0 m apart" "$tmp/sparse.txt" &&
  grep -q '"verdict": "poor"' "$tmp/sparse/out/summary.json" &&
  grep -q "\"track data poor: centerline, points 26.0 m apart" "$tmp/sparse/out/summary.json" &&
  grep -q "<strong>warning:</strong> track data: centerline, points 26.0 m apart" "$tmp/sparse/out/report.html" &&
  ok || bad "a poor track is not warned of: $(cat "$tmp/sparse.txt")"

# 19. Doubts about a track that are no error, warned of in every lap (a tester's findings).
#     Cairnholt with one grade's sign flipped (the 250 m straight at -6 % typed 6 %) ends 29.98 m
#     above its start (closed form: its own -0.02 m plus 2 x 6 % x 250 m; check printed it, and
#     nothing else did): run, compare and trade warn, in the text, summary.json, trade.json and
#     the report; the lap itself is laid as given (exit 0).
grep -q "grade: -6 %" tracks/cairnholt.yaml || bad "cairnholt has no -6 % grade to flip"
sed '0,/grade: -6 %/s//grade: 6 %/' tracks/cairnholt.yaml > "$tmp/cairnholt-typo.yaml"
gap_warning="the closed lap ends 29.98 m above its start (tolerance max(1 m, 0.1 % of the length) = 3.80 m)"
"$bin" run --car cars/pellion-fr2.yaml --track "$tmp/cairnholt-typo.yaml" --out "$tmp/typo-run" > "$tmp/typo.txt" &&
  grep -qF "warning: $gap_warning" "$tmp/typo.txt" &&
  grep -qF "\"$gap_warning" "$tmp/typo-run/summary.json" &&
  grep -qF "$gap_warning" "$tmp/typo-run/report.html" && ok || bad "elevation gap not warned of in run: $(cat "$tmp/typo.txt")"
"$bin" compare --car cars/pellion-fr2.yaml --track "$tmp/cairnholt-typo.yaml" --config low --config high \
  --out "$tmp/typo-compare" > "$tmp/typo.txt" &&
  grep -qF "warning: $gap_warning" "$tmp/typo.txt" &&
  [ "$(grep -cF "\"$gap_warning" "$tmp/typo-compare/summary.json")" -eq 2 ] && ok ||
  bad "elevation gap not warned of in compare: $(cat "$tmp/typo.txt")"
"$bin" trade --car cars/pellion-fr2.yaml --track "$tmp/cairnholt-typo.yaml" --config low --grid 3 \
  --out "$tmp/typo-trade" > "$tmp/typo.txt" &&
  grep -qF "warning: cairnholt-typo: $gap_warning" "$tmp/typo.txt" &&
  grep -qF "\"$gap_warning" "$tmp/typo-trade/trade.json" &&
  grep -qF "$gap_warning" "$tmp/typo-trade/report.html" && ok || bad "elevation gap not warned of in trade: $(cat "$tmp/typo.txt")"
"$bin" run --car cars/pellion-fr2.yaml --track tracks/cairnholt.yaml > "$tmp/typo.txt" &&
  ! grep -q "^warning: the closed lap" "$tmp/typo.txt" && ok || bad "cairnholt as bundled warned of a gap"
# The bundled survey with rows 162-181 left out (a 30.2 m hole at the first hairpin, 15 times the
# 2 m median): a dropout warning naming the lines either side, as track from-log names a log's.
mkdir -p "$tmp/drop" && cp tracks/brannock-park-survey.yaml "$tmp/drop/" &&
  sed '162,181d' tracks/brannock-park-survey.csv > "$tmp/drop/brannock-park-survey.csv"
"$bin" run --car cars/caldra-gt.yaml --track "$tmp/drop/brannock-park-survey.yaml" > "$tmp/drop.txt" &&
  grep -qF "warning: $tmp/drop/brannock-park-survey.csv: points 30.2 m apart from line 161 to line 162 (the median is 2.00 m): a dropout" "$tmp/drop.txt" &&
  ok || bad "a centerline dropout is not named: $(cat "$tmp/drop.txt")"
# track line over that survey prints the source's verdict (poor) and carries it into the track it
# writes, which then reads poor too (it read good: its own points are 1 m apart and clean).
"$bin" track line --track "$tmp/drop/brannock-park-survey.yaml" --car cars/caldra-gt.yaml \
  --out "$tmp/drop/line.yaml" > "$tmp/drop.txt" &&
  grep -q "^source  track data: centerline, points 2.0 m apart, .*: poor (" "$tmp/drop.txt" &&
  grep -q "^warning: track data poor: " "$tmp/drop.txt" &&
  grep -q "^centerline: {file: \"line.csv\", source_verdict: poor}$" "$tmp/drop/line.yaml" &&
  "$bin" run --car cars/caldra-gt.yaml --track "$tmp/drop/line.yaml" > "$tmp/drop-line.txt" &&
  grep -q "^track data: centerline, points 1.0 m apart, .*made from data whose verdict is poor .*: poor" "$tmp/drop-line.txt" &&
  grep -q "^warning: track data poor: " "$tmp/drop-line.txt" &&
  ok || bad "track line launders a poor source: $(cat "$tmp/drop.txt" "$tmp/drop-line.txt")"
"$bin" track line --track tracks/brannock-park-survey.yaml --out "$tmp/drop/clean.yaml" > "$tmp/drop.txt" &&
  grep -q "^source  track data: centerline, points 2.0 m apart, .*: good" "$tmp/drop.txt" &&
  grep -q "^note    no --car: the source's verdict is by its spacing alone" "$tmp/drop.txt" &&
  grep -q "source_verdict: good}$" "$tmp/drop/clean.yaml" && ok || bad "track line on a good survey: $(cat "$tmp/drop.txt")"
# A 12 m wide ring of radius 50 m, a point mass without drag or rolling resistance (mu_lat 1.4):
# the lines run out to R 54.5 m, and a flat circle at the grip limit laps in 2 pi sqrt(R / mu g)
# (closed form): 12.519 s against the centerline's 11.991 s. track line notes that the line laps
# slower than the centerline (it said nothing); on Brannock Park (faster) it notes nothing.
{ sed 's/^format: 1$/format: 1\nmodel: point-mass/; s/rolling_radius: 0.3}/rolling_radius: 0.3, rolling_resistance: 0}/' \
    tests/data/no-aero-car.yaml; } > "$tmp/pm-car.yaml"
printf 'format: 1\nname: "Ring"\nclosed: true\nmesh: 0.25 m\nwidth: 12 m\nsegments:\n  - arc: {radius: 50 m, angle: 360 deg, turn: left}\n' > "$tmp/ring.yaml"
for method in min-curvature min-time; do
  "$bin" track line --track "$tmp/ring.yaml" --car "$tmp/pm-car.yaml" --method $method \
    --out "$tmp/line/ring-$method.yaml" > "$tmp/ring.txt" &&
    grep -q "^lap     no-aero test car, config bare: centerline 11.991 s, .*12.519 s (+4.41 %)" "$tmp/ring.txt" &&
    grep -q "^note    the $method line laps 0.528 s slower than the centerline: " "$tmp/ring.txt" &&
    ok || bad "track line $method on a ring: no note that it laps slower: $(cat "$tmp/ring.txt")"
done
! grep -q "slower than the centerline" "$tmp/mt.txt" && ok || bad "track line notes a faster line as slower"

echo "cli: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
