#!/usr/bin/env bash
# Error messages of the real binary on inputs a tester found wanting: each names its real cause
# at FILE:LINE:COL with its key path (README, "Output files": exit codes), exits 2 (3 for a car
# that cannot move) and writes nothing.
#   messages_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

# expect CODE MESSAGE ARGS...: exit CODE, stderr exactly MESSAGE (one line), no --out written.
expect() {
  local code=$1 want=$2
  shift 2
  rm -rf "$tmp/out"
  timeout 60 "$bin" "$@" --out "$tmp/out" > /dev/null 2> "$tmp/stderr"
  local got=$?
  [ "$got" -eq "$code" ] || { bad "$*: exit $got, expected $code ($(cat "$tmp/stderr"))"; return; }
  [ "$(cat "$tmp/stderr")" = "$want" ] || { bad "$*: expected '$want', got '$(cat "$tmp/stderr")'"; return; }
  [ -e "$tmp/out" ] && { bad "$*: wrote --out"; return; }
  ok
}
track=tracks/brannock-park.yaml
car=cars/pellion-fr2.yaml

# 1. Files that cannot be read name the cause: a directory, a binary file, an endless device.
mkdir -p "$tmp/cars"
expect 2 "$tmp/cars: error: is a directory, not a file" run --car "$tmp/cars" --track $track
printf '\0\0\0' > "$tmp/nul.yaml"
expect 2 "$tmp/nul.yaml:1:1: error: a NUL byte (byte 1): not a text file" run --car "$tmp/nul.yaml" --track $track
expect 2 "/dev/zero:1:1: error: a NUL byte (byte 1): not a text file" run --car /dev/zero --track $track
# A data file named in a track: a directory is the file key's error; /dev/zero the data's own.
mkdir -p "$tmp/t/data"
printf 'format: 1\nname: "S"\nclosed: false\ncurvature: {file: data}\n' > "$tmp/t/dir.yaml"
expect 2 "$tmp/t/dir.yaml:4:19: error: $tmp/t/data: is a directory, not a file (curvature.file)" \
  run --car $car --track "$tmp/t/dir.yaml"
printf 'format: 1\nname: "S"\nclosed: false\ncurvature: {file: /dev/zero}\n' > "$tmp/t/zero.yaml"
expect 2 "/dev/zero:1:1: error: a NUL byte (byte 1): not a text file" run --car $car --track "$tmp/t/zero.yaml"
# An endless text (a pipe that never ends) is refused at the cap (64 MiB for a car or track).
rm -rf "$tmp/out"
timeout 60 bash -c "yes '# a comment' | '$bin' run --car /dev/stdin --track $track --out '$tmp/out'" \
  > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "^/dev/stdin: error: the file is larger than 64 MiB" "$tmp/stderr" &&
  [ ! -e "$tmp/out" ] && ok || bad "endless pipe: $(cat "$tmp/stderr")"

# 2. A file that cannot be opened: FILE: error: with the system's reason (ENOENT's words).
expect 2 "$tmp/nonexist.yaml: error: cannot open the file: No such file or directory" \
  run --car "$tmp/nonexist.yaml" --track $track
printf 'format: 1\nname: "S"\nclosed: false\ncurvature: {file: nowhere.csv}\n' > "$tmp/t/missing.yaml"
expect 2 "$tmp/t/missing.yaml:4:19: error: $tmp/t/nowhere.csv: cannot open the file: No such file or directory (curvature.file)" \
  run --car $car --track "$tmp/t/missing.yaml"

# 3. Duplicate keys, anchors and a tab in an indentation name their key path.
sed 's/^  mu_lat: 1.70$/&\n  mu_lat: 1.70/' $car > "$tmp/dup.yaml"
line=$(grep -n "^  mu_lat" "$tmp/dup.yaml" | tail -n 1 | cut -d: -f1)
expect 2 "$tmp/dup.yaml:$line:3: error: duplicate key 'mu_lat' (first given at line $((line - 1))) (tyres.mu_lat)" \
  run --car "$tmp/dup.yaml" --track $track
sed 's/^mass: 640 kg/mass: \&m 640 kg/' $car > "$tmp/anchor.yaml"
line=$(grep -n "^mass:" "$tmp/anchor.yaml" | cut -d: -f1)
expect 2 "$tmp/anchor.yaml:$line:7: error: YAML anchors are not accepted; write the value out (mass)" \
  run --car "$tmp/anchor.yaml" --track $track
sed 's/^  mu_long: 1.55$/\tmu_long: 1.55/' $car > "$tmp/tab.yaml"
line=$(grep -n "mu_long" "$tmp/tab.yaml" | cut -d: -f1)
expect 2 "$tmp/tab.yaml:$line:9: error: YAML syntax: illegal map value; the line is indented with a tab (YAML indents with spaces) (tyres.mu_long)" \
  run --car "$tmp/tab.yaml" --track $track

# 4. --config of no config: at the car file's aero.configs, the suggestion case-insensitive.
at=$(grep -n "^  configs:" $car | cut -d: -f1)
expect 2 "$car:$((at + 1)):5: error: no config named 'nope' (the car has low, medium, high, medium_table, high_tunnel, high_map, high_trim, flap7, flap17, flap22, front_flap) (aero.configs)" \
  run --car $car --track $track --config nope
expect 2 "$car:$((at + 1)):5: error: no config named 'LOW'; did you mean 'low'? (the car has low, medium, high, medium_table, high_tunnel, high_map, high_trim, flap7, flap17, flap22, front_flap) (aero.configs)" \
  compare --car $car --track $track --config LOW

# 5. A car that cannot move in compare or trade: which track and config.
sed 's/^  mu_long: 1.55$/  mu_long: 0.3/' $car > "$tmp/lowmu.yaml"
printf 'format: 1\nname: "Wall"\nclosed: false\nmesh: 0.5 m\nsegments:\n  - straight: 10 m\n  - straight: {length: 100 m, grade: 50 %%}\n' > "$tmp/wall.yaml"
expect 3 "lapwing: error: the car cannot complete the track: track Wall ($tmp/wall.yaml), config low: the car cannot hold any speed at 10 m (the tyres cannot hold the car on this grade)" \
  compare --car "$tmp/lowmu.yaml" --track $track --track "$tmp/wall.yaml" --config low
# A car whose drive never exceeds its rolling resistance, on a level track: said so as level
# (it read "on this grade" where there was none), and check names the rolling resistance as the
# limit of its top speed of 0 km/h (it read "drag", which is nothing at standstill).
sed 's/torque: \[330, 390, 420, 395, 350\]/torque: [1, 1, 1, 1, 1]/' $car > "$tmp/weak.yaml"
grep -q "torque: \[1, 1, 1, 1, 1\]" "$tmp/weak.yaml" || bad "weak car not made"
expect 3 "lapwing: error: the car cannot complete the track: the car cannot hold any speed at 0 m (drive never exceeds the resistance even on the level)" \
  run --car "$tmp/weak.yaml" --track $track
"$bin" check --car "$tmp/weak.yaml" | grep -q "top speed 0.0 km/h (rolling resistance: the drive never exceeds it, the car cannot move on the level)" &&
  ok || bad "check: a car that cannot move named drag-limited"
# trade says which of its laps failed: a config's own lap (every config's is needed), or one of
# its perturbed laps, which run does not lap (a car at the edge of a climb with 2 % more mass).
expect 3 "lapwing: error: the car cannot complete the track: track Wall ($tmp/wall.yaml), config low, its own lap, which the study needs for every config (the grids span their operating points): the car cannot hold any speed at 10 m (the tyres cannot hold the car on this grade)" \
  trade --car "$tmp/lowmu.yaml" --track $track --track "$tmp/wall.yaml" --config low
# The weak engine and the low config alone (the other configs' own laps would fail first): a
# torque curve at which the car holds some speed on the 30 % grade, and with 2 % more mass none
# (a car that cannot hold a standstill there but can hold a speed higher up climbs: below).
sed 's/torque: \[330, 390, 420, 395, 350\]/torque: [47.15, 65.6, 73.8, 65.6, 57.4]/' $car |
  awk '{print} /^    low:/ {exit}' > "$tmp/edge.yaml"
grep -q "torque: \[47.15," "$tmp/edge.yaml" && [ "$(tail -n 1 "$tmp/edge.yaml" | cut -c1-8)" = "    low:" ] ||
  bad "edge car not made"
printf 'format: 1\nname: "Steep"\nclosed: false\nstart_speed: 0 km/h\nmesh: 0.5 m\nsegments:\n  - straight: 100 m\n  - straight: {length: 300 m, grade: 30 %%}\n' > "$tmp/steep.yaml"
"$bin" run --car "$tmp/edge.yaml" --track "$tmp/steep.yaml" > /dev/null && ok || bad "the edge car cannot climb the steep track"
expect 3 "lapwing: error: the car cannot complete the track: track Steep ($tmp/steep.yaml), config low, the study's lap with mass +2.0 % (run laps the config as given): the car cannot hold any speed at 100 m (drive never exceeds the resistance on this grade)" \
  trade --car "$tmp/edge.yaml" --track "$tmp/steep.yaml"
# A car whose drive from a standstill (the clutch slipping) is below its rolling resistance but
# above it at speed (91.6 t): it holds a flying start of 100 km/h, where it was refused as
# "cannot hold any speed at 0 m" (a robustness campaign's finding); heavier (95 t), a closed lap
# names the point where it stops, not the lap's start.
sed 's/^mass: 640 kg /mass: 91600 kg/' $car > "$tmp/heavy.yaml"
sed 's/^mass: 640 kg /mass: 95000 kg/' $car > "$tmp/heavier.yaml"
sed 's/^start_speed: 0 km\/h$/start_speed: 100 km\/h/' tracks/acceleration.yaml > "$tmp/flying.yaml"
grep -q "^mass: 91600 kg" "$tmp/heavy.yaml" && grep -q "^start_speed: 100 km/h" "$tmp/flying.yaml" &&
  "$bin" run --car "$tmp/heavy.yaml" --track "$tmp/flying.yaml" > /dev/null && ok ||
  bad "the 91.6 t car's flying start at 100 km/h"
expect 3 "lapwing: error: the car cannot complete the track: the car stops at 2586.23 m: drive cannot overcome the resistance there" \
  run --car "$tmp/heavier.yaml" --track $track

# 6. track from-log: the bundled log starts about 12 m before the line and runs on past it (its
#    lap ends 63 m before its last row, where its path crosses the line through its start again)
#    and its distance reads long: the overrun is cut with a note, and the turns, 1.004, warn of
#    the distance. Cut 60 rows (about 170 m) short of the line it does not close; its turns are
#    close to a whole number: the units look right; no unit hint.
rm -rf "$tmp/o"
"$bin" track from-log --log logs/brannock-park-survey-lap.csv --speed speed_kph --lat-accel lat_accel_g \
  --distance distance_m --closed --out "$tmp/o1/t.yaml" > "$tmp/stdout" 2>&1 &&
  grep -q "^note    the log runs 6[0-9.]* m past the line through its start" "$tmp/stdout" &&
  grep -q "^warning: .*the distance reads 0.[3-6][0-9] % long" "$tmp/stdout" &&
  ok || bad "from-log on the bundled log: $(cat "$tmp/stdout")"
head -n -60 logs/brannock-park-survey-lap.csv > "$tmp/short.csv"
"$bin" track from-log --log "$tmp/short.csv" --speed speed_kph --lat-accel lat_accel_g \
  --distance distance_m --closed --out "$tmp/o/t.yaml" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "the lap does not close" "$tmp/stderr" && ! grep -q "9.81" "$tmp/stderr" &&
  grep -q "the units look right: the log may not start and end at the same place" "$tmp/stderr" &&
  [ ! -e "$tmp/o" ] && ok || bad "from-log closure hint: $(cat "$tmp/stderr")"
# The same log with its g read as m/s2: 1/9.81 of a turn, the unit hint stays.
"$bin" track from-log --log logs/brannock-park-survey-lap.csv --speed speed_kph --lat-accel lat_accel_g \
  --accel-unit m/s2 --distance distance_m --closed --out "$tmp/o/t.yaml" > /dev/null 2> "$tmp/stderr"
[ $? -eq 2 ] && grep -q "9.81 times too small: if the log is in g, give --accel-unit g" "$tmp/stderr" &&
  [ ! -e "$tmp/o" ] && ok || bad "from-log unit hint: $(cat "$tmp/stderr")"

echo "messages: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
