#!/usr/bin/env bash
# track from-log and the log reader end to end on the real binary, with logs made here from the
# bundled car's own laps (so their truth is known): the data-quality verdict judges the log's row
# spacing, one of --lat-accel and --yaw-rate, standing starts, errors at the row that causes
# them and naming the cause, a distance channel that reads long, a log that runs past the line,
# quoted column names and unread columns with empty fields; and a sweep resumed with another
# shard split.
#   fromlog_test.sh LAPWING_BINARY SOURCE_DIR
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
lap() { sed -n 's/.*"lap_time_s": \([0-9.]*\).*/\1/p' "$1" | head -1; }

# The bundled car's lap of Brannock Park (config medium), and a log of it at HZ rows a second:
# time, distance (times DSCALE), speed and lateral acceleration, linear between the trace's rows;
# PAST seconds past the line (a second lap's start), else a last row exactly at the line.
"$bin" run --car "$car" --track tracks/brannock-park.yaml --config medium --out "$tmp/bp" > /dev/null
trace="$tmp/bp/trace-brannock-park-medium.csv"
mklog() { # HZ PAST DSCALE OUT
  awk -F, -v hz="$1" -v past="$2" -v dscale="$3" '
    NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
    { n++; t[n] = $c["time_s"]; d[n] = $c["distance_m"]; v[n] = $c["speed_kph"]; g[n] = $c["lat_accel_g"] }
    function row(tt,   u, off, lo, hi, m, w) {
      u = tt; off = 0
      if (u > t[n]) { u -= t[n]; off = d[n] }
      lo = 1; hi = n
      while (hi - lo > 1) { m = int((lo + hi) / 2); if (t[m] <= u) lo = m; else hi = m }
      w = (u - t[lo]) / (t[hi] - t[lo])
      printf "%.6f,%.6f,%.6f,%.6f\n", tt, dscale * (off + d[lo] + w * (d[hi] - d[lo])),
        v[lo] + w * (v[hi] - v[lo]), g[lo] + w * (g[hi] - g[lo])
    }
    END {
      print "time_s,distance_m,speed_kph,lat_accel_g"
      for (k = 0; k / hz <= t[n] + past + 1e-9; k++) row(k / hz)
      if (past == 0 && (k - 1) / hz < t[n] - 1e-9) row(t[n])
    }' "$trace" > "$4"
}
fromlog=(track from-log --speed speed_kph --lat-accel lat_accel_g --closed --altitude 85m)
true_lap=$(lap "$tmp/bp/summary.json")

# 1. The verdict judges the log's rows, not the 0.5 m the track is resampled to (README, "Tracks
# from data": points more than 10 m apart are poor, they cannot draw a hairpin; the rule is the
# project's own). At 2 Hz the rows are about 20 m apart (the lap, 2741 m in 67.5 s, is 40 m/s on
# average): poor; at 20 Hz about 2 m: good.
mklog 2 0 1 "$tmp/hz2.csv"
mklog 20 0 1 "$tmp/hz20.csv"
"$bin" "${fromlog[@]}" --log "$tmp/hz2.csv" --time time_s --out "$tmp/t/hz2.yaml" > "$tmp/hz2.txt" 2>&1 &&
  grep -q "^rows    [0-9.]* m apart (median): data-quality verdict poor" "$tmp/hz2.txt" &&
  grep -q "^warning: the log's rows are more than 10 m apart" "$tmp/hz2.txt" &&
  grep -q "source_spacing: [0-9.]* m}" "$tmp/t/hz2.yaml" &&
  ok || bad "from-log at 2 Hz: $(cat "$tmp/hz2.txt")"
"$bin" run --car "$car" --track "$tmp/t/hz2.yaml" --config medium > "$tmp/run2.txt" 2>&1
grep -q "^track data: curvature profile, from data rows [0-9.]* m apart.*: poor" "$tmp/run2.txt" &&
  ok || bad "run on a 2 Hz log's track: $(grep "track data" "$tmp/run2.txt")"
"$bin" "${fromlog[@]}" --log "$tmp/hz20.csv" --time time_s --out "$tmp/t/hz20.yaml" > "$tmp/hz20.txt" 2>&1 &&
  "$bin" run --car "$car" --track "$tmp/t/hz20.yaml" --config medium --out "$tmp/r20" > "$tmp/run20.txt" 2>&1 &&
  grep -q "^track data: curvature profile, from data rows [0-9.]* m apart.*: good" "$tmp/run20.txt" &&
  ! grep -q "^warning" "$tmp/hz20.txt" && ok || bad "from-log at 20 Hz: $(cat "$tmp/hz20.txt" "$tmp/run20.txt")"

# 2. One of --lat-accel and --yaw-rate: both given is a usage error, nothing written.
awk -F, 'BEGIN { OFS = "," } NR == 1 { print $0, "yaw_dps"; next } { print $0, 0 }' "$tmp/hz20.csv" > "$tmp/yaw0.csv"
"$bin" "${fromlog[@]}" --log "$tmp/yaw0.csv" --yaw-rate yaw_dps --time time_s --out "$tmp/both/x.yaml" \
  > /dev/null 2> "$tmp/err.txt"
[ $? -eq 2 ] && grep -q "give one of --lat-accel COL and --yaw-rate COL" "$tmp/err.txt" && [ ! -e "$tmp/both" ] &&
  ok || bad "--lat-accel with --yaw-rate: $(cat "$tmp/err.txt")"

# 3. A launch log (the bundled 75 m acceleration run, the car waiting 0.5 s at rest first and
# 0.5 s after the finish line): the rows at rest before the first and after the last are left
# out with a note, by time and by distance, in from-log and correlate.
"$bin" run --car "$car" --track tracks/acceleration.yaml --out "$tmp/acc" > /dev/null
awk -F, 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; print "time_s,distance_m,speed_kph,lat_accel_g"
           print "0,0,0,0"; print "0.25,0,0,0"; next }
  { t = $c["time_s"] + 0.5; d = $c["distance_m"]; r = t "," d "," $c["speed_kph"] ",0"; done = 0 }
  NR % 10 == 2 { print r; done = 1 }
  END { if (!done) print r; print t + 0.25 "," d ",0,0"; print t + 0.5 "," d ",0,0" }' \
  "$tmp"/acc/trace-acceleration-*.csv > "$tmp/launch.csv"
for channel in time_s distance_m; do
  opt=--time; [ "$channel" = distance_m ] && opt=--distance
  "$bin" correlate --car "$car" --track tracks/acceleration.yaml --log "$tmp/launch.csv" $opt "$channel" \
    --speed speed_kph > "$tmp/launch.txt" 2>&1 &&
    grep -q "^note    the car stands still before it moves: lines 2 to 3 left out" "$tmp/launch.txt" &&
    grep -q "^note    the car stands still after it stops: lines\{0,1\} [0-9 to]* left out" "$tmp/launch.txt" &&
    ok || bad "correlate on a launch log ($opt): $(cat "$tmp/launch.txt")"
  "$bin" track from-log --log "$tmp/launch.csv" --speed speed_kph --lat-accel lat_accel_g $opt "$channel" \
    --out "$tmp/launch/$channel.yaml" > "$tmp/launch.txt" 2>&1 &&
    grep -q "^start_speed: 0 m/s" "$tmp/launch/$channel.yaml" &&
    grep -q "^note    the car stands still before it moves" "$tmp/launch.txt" &&
    ok || bad "from-log on a launch log ($opt): $(cat "$tmp/launch.txt")"
done

# 4. Errors at the row that causes them, naming the cause. A speed of 0 over three rows while the
# distance moves on (a dropout) is refused at its second row, line 401 (row 400 of the data),
# at its speed field (the third: its first byte counted with awk from the line itself).
awk -F, 'BEGIN { OFS = "," } NR >= 400 && NR <= 402 { $3 = 0 } { print }' "$tmp/hz20.csv" > "$tmp/dropout.csv"
"$bin" correlate --car "$car" --track tracks/brannock-park.yaml --config medium --log "$tmp/dropout.csv" \
  --distance distance_m --speed speed_kph > /dev/null 2> "$tmp/err.txt"
rc=$?
speed_col=$(awk -F, 'NR == 401 { print length($1) + length($2) + 3 }' "$tmp/dropout.csv")
[ $rc -eq 2 ] && grep -q "dropout.csv:401:$speed_col: error: the logged speed is 0 at this row and the one before" "$tmp/err.txt" &&
  ok || bad "zero-speed dropout: $(cat "$tmp/err.txt")"
# A 60 m gap of rows in a closed lap: named at the row after the gap, not blamed on units.
awk -F, 'NR == 1 || $2 < 1000 || $2 > 1060' "$tmp/hz20.csv" > "$tmp/gap.csv"
gap_line=$(awk -F, 'NR > 1 && $2 > 1060 { print NR; exit }' "$tmp/gap.csv")
"$bin" "${fromlog[@]}" --log "$tmp/gap.csv" --distance distance_m --out "$tmp/gap/x.yaml" > /dev/null 2> "$tmp/err.txt"
[ $? -eq 2 ] && grep -q "gap.csv:$gap_line:1: error: .*the log has a gap here: rows 6[0-9.]* m apart" "$tmp/err.txt" &&
  ! grep -q "accel-unit" "$tmp/err.txt" && [ ! -e "$tmp/gap" ] && ok || bad "a gap in a closed log: $(cat "$tmp/err.txt")"
# At 1 Hz (rows about 40 m apart) the lap cannot close: the sampling is named, not the units.
mklog 1 0 1 "$tmp/hz1.csv"
"$bin" "${fromlog[@]}" --log "$tmp/hz1.csv" --time time_s --out "$tmp/hz1/x.yaml" > /dev/null 2> "$tmp/err.txt"
[ $? -eq 2 ] && grep -q "too sparse to draw the corners.*log at 10 Hz or more" "$tmp/err.txt" &&
  ! grep -q "accel-unit" "$tmp/err.txt" && ok || bad "a 1 Hz log: $(cat "$tmp/err.txt")"

# 5. A distance channel reading 0.6 % long: a warning with the implied scale (the turns a closed
# lap's curvature adds up to are 1.006: a lap turns a whole number of times).
mklog 20 0 1.006 "$tmp/d1006.csv"
"$bin" "${fromlog[@]}" --log "$tmp/d1006.csv" --distance distance_m --out "$tmp/t/d.yaml" > "$tmp/d.txt" 2>&1 &&
  grep -q "^warning: the lap's curvature adds up to -\{0,1\}1.00[56][0-9] turns.*the distance reads 0.[56][0-9] % long" "$tmp/d.txt" &&
  ok || bad "a distance reading long: $(cat "$tmp/d.txt")"
# And the clean log draws no such warning (by time and by distance).
"$bin" "${fromlog[@]}" --log "$tmp/hz20.csv" --distance distance_m --out "$tmp/t/d1.yaml" > "$tmp/d1.txt" 2>&1 &&
  ! grep -q "^warning" "$tmp/d1.txt" && ok || bad "a clean log warned: $(cat "$tmp/d1.txt")"
# A closed log that runs 0.5 s (about 27 m) past the line: cut where it crosses the line again,
# so the track is the lap's length (2741.2 m: the trace's) within 3 m, not 27 m long, and laps
# within 0.2 % of the true lap (the 20 Hz log without overrun: 0.03 %).
mklog 20 0.5 1 "$tmp/past.csv"
"$bin" "${fromlog[@]}" --log "$tmp/past.csv" --time time_s --out "$tmp/t/past.yaml" > "$tmp/past.txt" 2>&1 &&
  grep -q "^note    the log runs 2[0-9.]* m past the line" "$tmp/past.txt" &&
  awk -v l="$(sed -n 's/^length  \([0-9.]*\) m.*/\1/p' "$tmp/past.txt")" \
    -v t="$(tail -1 "$trace" | cut -d, -f1)" 'BEGIN { exit !(l - t < 3 && t - l < 3) }' &&
  "$bin" run --car "$car" --track "$tmp/t/past.yaml" --config medium --out "$tmp/rpast" > /dev/null &&
  awk -v a="$(lap "$tmp/rpast/summary.json")" -v b="$true_lap" 'BEGIN { d = (a - b) / b; exit !(d < 0.002 && d > -0.002) }' &&
  ok || bad "a log past the line: $(cat "$tmp/past.txt") $(lap "$tmp/rpast/summary.json") against $true_lap"
# The same 20 Hz lap without overrun, its lateral acceleration read 1 % low: its path closes
# short and crosses the line 7 to 8 m before the log's end. Under 0.5 % of the lap that cannot be
# told from a run past the line, so nothing is cut (it was: a track 8 m short, said to run past
# the line) and a warning says so; the lap's length stays the trace's within 1 m.
awk -F, 'BEGIN { OFS = "," } NR == 1 { print; next } { $4 = 0.99 * $4; print }' "$tmp/hz20.csv" > "$tmp/lat099.csv"
"$bin" "${fromlog[@]}" --log "$tmp/lat099.csv" --distance distance_m --out "$tmp/t/lat099.yaml" > "$tmp/lat099.txt" 2>&1 &&
  ! grep -q "past the line through its start (where" "$tmp/lat099.txt" &&
  grep -q "^warning: the log's path crosses the line through its start [0-9.]* m before its end" "$tmp/lat099.txt" &&
  awk -v l="$(sed -n 's/^length  \([0-9.]*\) m.*/\1/p' "$tmp/lat099.txt")" \
    -v t="$(tail -1 "$trace" | cut -d, -f1)" 'BEGIN { exit !(l - t < 1 && t - l < 1) }' &&
  ok || bad "a turning channel 1 % low cut as a run past the line: $(cat "$tmp/lat099.txt")"
# Over time with the lateral acceleration, a speed that reads f times its true value makes the
# distance f times and the curvature a / v^2 1/f^2 times its own: the turns are 1/f of a lap's
# (closed form). A speed 5 % high gives 1/1.05 = 0.952 turns and is named 5 % high (it read
# "4.76 % high", 1 - turns); a log in km/h read as mph (f = 1.609) is named as a unit.
# On a circle (R 50 m at 72 km/h: a_y = v^2 / R = 8 m/s^2, once round in 2 pi R / v = 15.708 s,
# 20 Hz) the heading closed along the lap leaves a circle again, so the lap closes at any f.
awk -v f=1.05 'BEGIN { print "time_s,speed_kph,lat_accel_g"
  for (i = 0; i <= 314; i++) printf "%.2f,%.6f,%.6f\n", i * 0.05, f * 72, 8 / 9.80665 }' > "$tmp/c105.csv"
"$bin" "${fromlog[@]}" --log "$tmp/c105.csv" --time time_s --out "$tmp/t/c105.yaml" > "$tmp/c105.txt" 2>&1 &&
  grep -q "^warning: the lap's curvature adds up to 0.95[0-9]* turns.*the speed reads 5.[01][0-9] % high (a wheel speed's rolling radius)$" "$tmp/c105.txt" &&
  ok || bad "a speed 5 % high, by time: $(cat "$tmp/c105.txt")"
awk 'BEGIN { print "time_s,speed_kph,lat_accel_g"
  for (i = 0; i <= 314; i++) printf "%.2f,%.6f,%.6f\n", i * 0.05, 72, 8 / 9.80665 }' > "$tmp/c100.csv"
"$bin" "${fromlog[@]}" --log "$tmp/c100.csv" --time time_s --speed-unit mph --out "$tmp/t/cmph.yaml" > "$tmp/cmph.txt" 2>&1 &&
  grep -q "the speed reads 6[01].[0-9]* % high (a wheel speed's rolling radius, or a log in km/h read as mph: check --speed-unit)" "$tmp/cmph.txt" &&
  ok || bad "a km/h log read as mph, by time: $(cat "$tmp/cmph.txt")"
# With the yaw rate and the time, the turns are the yaw rate's integral over time, whatever the
# speed: a yaw rate read 1 % high is named (the warning blamed the speed, which cannot cause it).
awk -F, 'BEGIN { OFS = "," } NR == 1 { print "time_s", "speed_kph", "yaw_degps"; next }
  { v = $3 / 3.6; print $1, $3, (v > 0 ? 1.01 * $4 * 9.80665 / v * 180 / 3.141592653589793 : 0) }' \
  "$tmp/hz20.csv" > "$tmp/yaw101.csv"
"$bin" track from-log --speed speed_kph --yaw-rate yaw_degps --closed --altitude 85m \
  --log "$tmp/yaw101.csv" --time time_s --out "$tmp/t/yaw101.yaml" > "$tmp/yaw101.txt" 2>&1 &&
  grep -q "^warning: the lap's curvature adds up to.*the yaw rate reads 1.0[0-9] % high" "$tmp/yaw101.txt" &&
  ! grep -q "the speed reads" "$tmp/yaw101.txt" &&
  ok || bad "yaw rate 1 % high with --time: $(cat "$tmp/yaw101.txt")"

# 6. CSV: a quoted column name is its text (RFC 4180, section 2), and a column lapwing does not
# read may hold empty fields.
awk -F, 'BEGIN { OFS = "," } NR == 1 { print "time_s", "distance_m", "\"Speed [km/h]\"", "lat_accel_g", "\"marker, lap\""; next }
  { print $0, (NR % 50 ? "" : "\"pit \"\"in\"\"\"") }' "$tmp/hz20.csv" > "$tmp/quoted.csv"
"$bin" correlate --car "$car" --track tracks/brannock-park.yaml --config medium --log "$tmp/quoted.csv" \
  --time time_s --speed "Speed [km/h]" > "$tmp/q.txt" 2>&1 && ok || bad "quoted header, empty fields: $(cat "$tmp/q.txt")"
# The column read still must hold numbers: an empty field there is refused where it stands.
awk -F, 'BEGIN { OFS = "," } NR == 7 { $3 = "" } { print }' "$tmp/quoted.csv" > "$tmp/q2.csv"
"$bin" correlate --car "$car" --track tracks/brannock-park.yaml --config medium --log "$tmp/q2.csv" \
  --time time_s --speed "Speed [km/h]" > /dev/null 2> "$tmp/err.txt"
[ $? -eq 2 ] && grep -q "q2.csv:7:[0-9]*: error: '' is not a number (column Speed \[km/h\])" "$tmp/err.txt" &&
  ok || bad "an empty field in a column read: $(cat "$tmp/err.txt")"

# 7. A sweep resumed with another shard split is refused and the file is left as it was; the
# same split's other shard joins the label.
S=(--car "$car" --track tracks/skidpad.yaml --set mass=620kg:680kg:3 --threads 1)
"$bin" sweep "${S[@]}" --shard 1/3 --out "$tmp/sh.sqlite" > /dev/null
cp "$tmp/sh.sqlite" "$tmp/sh0.sqlite"
"$bin" sweep "${S[@]}" --shard 1/2 --out "$tmp/sh.sqlite" > /dev/null 2> "$tmp/err.txt"
[ $? -eq 2 ] && grep -q "holds shard 1/3 of this study, and --shard 1/2 splits it another way" "$tmp/err.txt" &&
  cmp -s "$tmp/sh.sqlite" "$tmp/sh0.sqlite" && ok || bad "sweep resumed with another split: $(cat "$tmp/err.txt")"
"$bin" sweep "${S[@]}" --out "$tmp/sh.sqlite" > /dev/null 2> "$tmp/err.txt"
[ $? -eq 2 ] && cmp -s "$tmp/sh.sqlite" "$tmp/sh0.sqlite" && ok || bad "sweep resumed unsharded: $(cat "$tmp/err.txt")"
"$bin" sweep "${S[@]}" --shard 2/3 --out "$tmp/sh.sqlite" > /dev/null &&
  "$bin" sweep export "$tmp/sh.sqlite" --csv "$tmp/sh.csv" && [ "$(wc -l < "$tmp/sh.csv")" -eq 3 ] &&
  [ "$(python3 -c 'import sqlite3, sys; print(sqlite3.connect(sys.argv[1]).execute("SELECT shard FROM study").fetchone()[0])' "$tmp/sh.sqlite")" = 1/3,2/3 ] &&
  ok || bad "sweep's other shard of the same split"
# With its last shard the file holds the whole study (1/3 to 3/3): a run of the study split any
# way, or not at all, resumes it, finds every point there and adds none (it was refused: "holds
# shard 1/3,2/3,3/3 ... splits it another way").
"$bin" sweep "${S[@]}" --shard 3/3 --out "$tmp/sh.sqlite" > /dev/null &&
  "$bin" sweep "${S[@]}" --out "$tmp/sh.sqlite" > /dev/null 2> "$tmp/err.txt" &&
  "$bin" sweep "${S[@]}" --shard 1/2 --out "$tmp/sh.sqlite" > /dev/null 2>> "$tmp/err.txt" &&
  "$bin" sweep export "$tmp/sh.sqlite" --csv "$tmp/sh3.csv" && [ "$(wc -l < "$tmp/sh3.csv")" -eq 4 ] &&
  [ "$(python3 -c 'import sqlite3, sys; print(sqlite3.connect(sys.argv[1]).execute("SELECT shard FROM study").fetchone()[0])' "$tmp/sh.sqlite")" = 1/3,2/3,3/3 ] &&
  ok || bad "a whole study's file resumed without --shard: $(cat "$tmp/err.txt")"

echo "fromlog_test: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
