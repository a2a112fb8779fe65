#!/usr/bin/env bash
# Outputs against the command's own inputs and against a write that fails (README, "Output
# files"): no output replaces a file the command read (a log, a car, a track, a store),
# no --out folder replaced removes one, a write that fails (a file size limit standing in for a
# full disk: write(2) fails with EFBIG as it would with ENOSPC) exits 2 with the system's reason
# and leaves no temporary or folder of its own, missing parent folders are made by every writer,
# and a symlink that leads nowhere is refused by name. Each check fails on the version before
# these rules (the repro cases of the output-path review).
#   outputs_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
src=$(realpath "$2")
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cd "$tmp" || exit 1
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }
hash() { sha256sum < "$1"; }
# exit 2, and stderr holds TEXT (fixed string)
refused() { [ "$1" = 2 ] && grep -qF -- "$2" err.txt; }
# The folder's names, hidden ones too, one a line.
names() { ls -A "$1" | sort; }

cp "$src/cars/pellion-fr2.yaml" car.yaml
cp "$src/tracks/brannock-park.yaml" track.yaml
cp "$src/logs/brannock-park-survey-lap.csv" lap.csv
car_hash=$(hash car.yaml) track_hash=$(hash track.yaml) log_hash=$(hash lap.csv)
C=(--car car.yaml --track track.yaml)

# 1. An output that is an input file: refused (exit 2, naming both), the input unchanged.
"$bin" track from-log --log lap.csv --speed speed_kph --lat-accel lat_accel_g --distance distance_m \
  --out lap.yaml > /dev/null 2> err.txt
refused $? "cannot write ./lap.csv: it would replace lap.csv, which this command reads" &&
  [ "$(hash lap.csv)" = "$log_hash" ] && [ ! -e lap.yaml ] && ok ||
  bad "track from-log over its log: $(cat err.txt)"
for f in car.yaml track.yaml; do
  "$bin" check "${C[@]}" --json $f > /dev/null 2> err.txt
  refused $? "cannot write $f: it would replace $f, which this command reads" &&
    [ "$(hash car.yaml)" = "$car_hash" ] && [ "$(hash track.yaml)" = "$track_hash" ] && ok ||
    bad "check --json $f: $(cat err.txt)"
done
# The same file by another spelling or through a symlink.
ln -s car.yaml car-link.yaml
"$bin" check "${C[@]}" --json ./car-link.yaml > /dev/null 2> err.txt
refused $? "it would replace car.yaml, which this command reads" &&
  [ "$(hash car.yaml)" = "$car_hash" ] && ok || bad "check --json via a link: $(cat err.txt)"
# track line refuses the car's name before it solves the line.
"$bin" track line --track track.yaml --car car.yaml --out car.yaml > /dev/null 2> err.txt
refused $? "cannot write car.yaml: it would replace car.yaml, which this command reads" &&
  [ "$(hash car.yaml)" = "$car_hash" ] && ok || bad "track line --out the car: $(cat err.txt)"
# sweep's store, and sweep export's CSV, over an input.
"$bin" sweep "${C[@]}" --set mass=600,610 --threads 1 --out track.yaml > /dev/null 2> err.txt
refused $? "cannot write track.yaml: it would replace track.yaml, which this command reads" &&
  [ "$(hash track.yaml)" = "$track_hash" ] && ok || bad "sweep --out the track: $(cat err.txt)"

# 2. A --out folder holding an input of the same command is not replaced (that would delete it).
# (The inputs copied afresh: each part stands on its own, whatever the one before did.)
cp "$src/cars/pellion-fr2.yaml" car.yaml
cp "$src/tracks/brannock-park.yaml" track.yaml
"$bin" run "${C[@]}" --out fitted > /dev/null || bad "run --out fitted"
cp car.yaml fitted/car.yaml
cp track.yaml fitted/mytrack.yaml
"$bin" run --car fitted/car.yaml --track track.yaml --out fitted > /dev/null 2> err.txt
refused $? "will not replace fitted: it holds fitted/car.yaml, which this command reads" &&
  [ "$(hash fitted/car.yaml)" = "$car_hash" ] && ok || bad "run --out over its car: $(cat err.txt)"
"$bin" compare --car car.yaml --track fitted/mytrack.yaml --threads 1 --out fitted > /dev/null 2> err.txt
refused $? "it holds fitted/mytrack.yaml, which this command reads" &&
  [ "$(hash fitted/mytrack.yaml)" = "$track_hash" ] && ok || bad "compare --out over its track: $(cat err.txt)"
# The folder reached through a symlink, and an input named through one.
ln -s fitted fitted-link
"$bin" run --car fitted-link/car.yaml --track track.yaml --out fitted > /dev/null 2> err.txt
refused $? "which this command reads" && [ -e fitted/car.yaml ] && ok ||
  bad "run --out over its car named through a link: $(cat err.txt)"
"$bin" run --car fitted/car.yaml --track track.yaml --out fitted-link > /dev/null 2> err.txt
refused $? "which this command reads" && [ -e fitted/car.yaml ] && ok ||
  bad "run --out (a link) over its car: $(cat err.txt)"
# An input elsewhere: the folder is replaced as before.
"$bin" run "${C[@]}" --out fitted > /dev/null 2> err.txt && [ ! -e fitted/car.yaml ] && ok ||
  bad "run --out fitted with inputs elsewhere: $(cat err.txt)"

# 3. sweep merge into an output it cannot write: exit 2, the system's reason, nothing left.
# (20 points: a store, and its CSV, over the 1 KiB limit of 4.)
"$bin" sweep "${C[@]}" --set mass=600:700:20 --threads 2 --out s.sqlite > /dev/null || bad "sweep"
echo x > afile
before=$(names .)
"$bin" sweep merge afile/m.sqlite s.sqlite > /dev/null 2> err.txt
refused $? "lapwing: error: cannot write afile/m.sqlite: Not a directory" &&  # strerror(ENOTDIR)
  [ "$(names .)" = "$before" ] && ok || bad "merge through a file: $(cat err.txt)"
"$bin" sweep merge "" s.sqlite > /dev/null 2> err.txt
refused $? "lapwing: error: sweep merge: OUT is empty" && [ "$(names .)" = "$before" ] && ok ||
  bad "merge into an empty name: $(cat err.txt); $(names .)"
"$bin" sweep merge s.sqlite ./s.sqlite > /dev/null 2> err.txt
refused $? "cannot write s.sqlite: it would replace ./s.sqlite, which this command reads" && ok ||
  bad "merge into one of its inputs: $(cat err.txt)"
"$bin" sweep export s.sqlite --csv s.sqlite > /dev/null 2> err.txt
refused $? "cannot write s.sqlite: it would replace s.sqlite, which this command reads" && ok ||
  bad "export over its store: $(cat err.txt)"
# A missing parent is made, as by every writer (5 below).
"$bin" sweep merge new/deeper/m.sqlite s.sqlite > /dev/null 2> err.txt &&
  [ "$(names new/deeper)" = "m.sqlite" ] && ok || bad "merge into a new folder: $(cat err.txt)"

# 4. Writes that fail cleanly: a file size limit of 1 KiB (bash's ulimit -f counts 1024-byte
# blocks) makes write(2) fail with EFBIG once a file would pass it; SIGXFSZ ignored, as a full
# disk sends none. Each write exits 2 with the system's reason and leaves no temporary behind.
limited() { (ulimit -f 1 && trap '' XFSZ && exec "$bin" "$@") > /dev/null 2> err.txt; }
mkdir full && before=$(names full)
limited check "${C[@]}" --json full/c.json
refused $? "cannot write full/c.json: File too large" && [ "$(names full)" = "$before" ] && ok ||
  bad "check --json failing: $(cat err.txt); $(names full)"
limited track line --track track.yaml --out full/l.yaml
refused $? "cannot write full/l.csv: File too large" && [ "$(names full)" = "$before" ] && ok ||
  bad "track line failing: $(cat err.txt); $(names full)"
limited sweep "${C[@]}" --set mass=600,610 --threads 1 --out full/s.sqlite
refused $? "cannot write full/s.sqlite: File too large" && [ "$(names full)" = "$before" ] && ok ||
  bad "sweep failing: $(cat err.txt); $(names full)"
limited sweep export s.sqlite --csv full/s.csv
refused $? "cannot write full/s.csv: File too large" && [ "$(names full)" = "$before" ] && ok ||
  bad "sweep export failing: $(cat err.txt); $(names full)"
limited sweep merge full/m.sqlite s.sqlite
refused $? "cannot write full/m.sqlite: File too large" && [ "$(names full)" = "$before" ] && ok ||
  bad "sweep merge failing: $(cat err.txt); $(names full)"
# The folders a failed write made are removed again.
limited check "${C[@]}" --json made/here/c.json
refused $? "File too large" && [ ! -e made ] && ok || bad "a failed write left its folders: $(cat err.txt)"

# 5. Missing parent folders are made by every writer (README, "Output files"): check --json and sweep too.
"$bin" check "${C[@]}" --json p1/q/c.json > /dev/null 2> err.txt && [ -s p1/q/c.json ] && ok ||
  bad "check --json into a new folder: $(cat err.txt)"
"$bin" sweep "${C[@]}" --set mass=600,610 --threads 1 --out p2/q/s.sqlite > /dev/null 2> err.txt &&
  [ "$(names p2/q)" = "s.sqlite" ] && ok || bad "sweep into a new folder: $(cat err.txt)"
"$bin" sweep export s.sqlite --csv p3/q/s.csv > /dev/null 2> err.txt && [ -s p3/q/s.csv ] && ok ||
  bad "sweep export into a new folder: $(cat err.txt)"
# A symlink that leads nowhere is refused by what it is, the file or folder not made.
ln -s target.json link.json
"$bin" check "${C[@]}" --json link.json > /dev/null 2> err.txt
refused $? "cannot write link.json: it is a symlink that leads nowhere (to target.json: No such file or directory)" &&
  [ ! -e target.json ] && ok || bad "check --json a dangling link: $(cat err.txt)"
ln -s nowhere dl
"$bin" run "${C[@]}" --out dl > /dev/null 2> err.txt
refused $? "cannot create dl: it is a symlink that leads nowhere (to nowhere: No such file or directory)" &&
  [ ! -e nowhere ] && ok || bad "run --out a dangling link: $(cat err.txt)"

echo "outputs: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
