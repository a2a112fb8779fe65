#!/usr/bin/env bash
# Kill tests (issue 19, deliver 5): `compare` is killed with SIGKILL at 20 random points while it
# replaces an output folder, and after each kill the folder must hold exactly the old set of
# files or exactly the new one (names and bytes), never a mix; the next run that completes must
# leave no temporary behind. Then `sweep` is killed at 20 random points while it fills its results
# store (README, "Sweep"): after each kill the store opens and every row it holds is, byte for
# byte, a row of the same study run without a kill; the same command resumes it; the complete
# store equals the uninterrupted one and nothing but the store is left beside it.
#   kill_test.sh LAPWING_BINARY SOURCE_DIR [SWEEP_SIDE]
# SWEEP_SIDE (default 24) values of each of the sweep's two keys: the sanitized build, some ten
# times slower, passes 12 to keep the test near a minute.
# The kill times are drawn from $RANDOM with a seed printed at the start; LAPWING_KILL_SEED=N
# repeats a run's points.
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
side=${3:-24}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail=0
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

seed=${LAPWING_KILL_SEED:-$(($(date +%s) % 32768))}
RANDOM=$seed
echo "kill: seed $seed"

# Two runs whose file sets differ in names and in bytes: a kill between them shows either.
small=(compare --car cars/caldra-gt.yaml --track tracks/skidpad.yaml)
large=(compare --car cars/pellion-fr2.yaml --track tracks/brannock-park.yaml)

# A folder's state: every file's name (hidden ones too) and bytes, as one hash.
state() { (cd "$1" && find . -type f -print0 | sort -z | xargs -0 sha256sum | sha256sum); }
ms() { echo $(($(date +%s%N) / 1000000)); }

"$bin" "${small[@]}" --out "$tmp/ref-small" > /dev/null || bad "small run"
t0=$(ms)
"$bin" "${large[@]}" --out "$tmp/ref-large" > /dev/null || bad "large run"
large_ms=$(($(ms) - t0))
t0=$(ms)
"$bin" "${small[@]}" --out "$tmp/ref-small2" > /dev/null || bad "small run"
small_ms=$(($(ms) - t0))
ref_small=$(state "$tmp/ref-small")
ref_large=$(state "$tmp/ref-large")
[ "$ref_small" = "$(state "$tmp/ref-small2")" ] || bad "the same run gave other bytes"

mkdir "$tmp/w"
out=$tmp/w/out
"$bin" "${small[@]}" --out "$out" > /dev/null
current=small
before=0 after=0 finished=0 staged=0
for i in $(seq 1 20); do
  # Each kill replaces the set that stands with the other one. The point is uniform over the
  # run's measured length and 20 % past it (so that some kills land after the swap, and some
  # runs finish): a run spends its last part writing, and a share of the points land there.
  if [ $current = small ]; then args=("${large[@]}") span=$large_ms want=$ref_large next=large
  else args=("${small[@]}") span=$small_ms want=$ref_small next=small; fi
  delay_ms=$((RANDOM * (span * 12 / 10 + 1) / 32768))
  stages_before=$(ls -A "$tmp/w" | grep lapwing-stage)
  "$bin" "${args[@]}" --out "$out" > /dev/null 2>&1 &
  pid=$!
  sleep "$(printf '%d.%03d' $((delay_ms / 1000)) $((delay_ms % 1000)))"
  kill -KILL $pid 2> /dev/null
  wait $pid 2> /dev/null  # (no "Killed" line from the shell)
  rc=$?
  # A staging folder this kill left (not one an earlier kill left and this run had not reached).
  [ -n "$(comm -13 <(echo "$stages_before") <(ls -A "$tmp/w" | grep lapwing-stage))" ] &&
    staged=$((staged + 1))
  now=$(state "$out")
  if [ "$now" = "$want" ]; then
    current=$next
    [ $rc -eq 0 ] && finished=$((finished + 1)) || after=$((after + 1))
  elif [ "$now" = "$(state "$tmp/ref-$current")" ]; then
    [ $rc -eq 137 ] && before=$((before + 1)) || bad "kill $i: exit $rc left the old set"
  else
    bad "kill $i at ${delay_ms} ms (exit $rc): the folder is neither the old set nor the new: $(ls -A "$out" | tr '\n' ' ')"
    break
  fi
done
echo "kill: 20 points: $before killed before the swap (old set; $staged left a staging folder)," \
  "$after killed after it (new set), $finished finished first; runs of ${small_ms} and ${large_ms} ms"
[ $((before + after + finished)) -eq 20 ] || bad "only $((before + after + finished)) of 20 points checked"

# The next run removes what the kills left, and leaves nothing of its own.
"$bin" "${small[@]}" --out "$out" > /dev/null || bad "the run after the kills"
[ "$(ls -A "$tmp/w")" = out ] || bad "temporaries beside the folder: $(ls -A "$tmp/w" | tr '\n' ' ')"
[ "$(state "$out")" = "$ref_small" ] || bad "the run after the kills wrote other bytes"
[ -z "$(ls -A "$out" | grep '\.tmp\.')" ] || bad "temporaries in the folder"

# Sweep: 20 kills while the same study fills (and resumes) one results store. side^2 points on the
# skid pad with the point mass (the store is under test, not the model), one thread, committed 64
# points at a time (README, "Sweep").
sweep=(sweep --car cars/pellion-fr2.yaml --track tracks/skidpad.yaml --set mass=600kg:700kg:$side
  --set tyres.mu_lat=1.4:1.8:$side --model point-mass --threads 1)
export_csv() { "$bin" sweep export "$1" --csv "$2" > /dev/null 2>&1; }
mkdir "$tmp/s"
t0=$(ms)
"$bin" "${sweep[@]}" --out "$tmp/s/ref.sqlite" > /dev/null 2>&1 || bad "sweep run"
sweep_ms=$(($(ms) - t0))
export_csv "$tmp/s/ref.sqlite" "$tmp/ref.csv" || bad "sweep export"
sort "$tmp/ref.csv" > "$tmp/ref-sorted.csv"
mkdir "$tmp/sk"
store=$tmp/sk/study.sqlite
empty=0 partial=0 complete=0
for i in $(seq 1 20); do
  # A complete store is started again, so that the kills keep landing inside a filling one.
  if [ -e "$store" ] && export_csv "$store" "$tmp/now.csv" &&
    [ "$(wc -l < "$tmp/now.csv")" = "$(wc -l < "$tmp/ref.csv")" ]; then rm -f "$store"; fi
  delay_ms=$((RANDOM * (sweep_ms + 1) / 32768))
  "$bin" "${sweep[@]}" --out "$store" > /dev/null 2>&1 &
  pid=$!
  sleep "$(printf '%d.%03d' $((delay_ms / 1000)) $((delay_ms % 1000)))"
  kill -KILL $pid 2> /dev/null
  wait $pid 2> /dev/null
  if [ ! -e "$store" ]; then
    empty=$((empty + 1))
    continue
  fi
  if ! export_csv "$store" "$tmp/now.csv"; then
    bad "sweep kill $i at ${delay_ms} ms: the store does not open: $("$bin" sweep export "$store" --csv "$tmp/now.csv" 2>&1)"
    break
  fi
  rows=$(($(wc -l < "$tmp/now.csv") - 1))
  # Every row held is a row of the uninterrupted study (the header too): none torn, none other.
  extra=$(sort "$tmp/now.csv" | comm -23 - "$tmp/ref-sorted.csv" | head -n 3)
  [ -z "$extra" ] || bad "sweep kill $i at ${delay_ms} ms: rows that the study does not hold: $extra"
  [ "$rows" -eq $(($(wc -l < "$tmp/ref.csv") - 1)) ] && complete=$((complete + 1)) || partial=$((partial + 1))
done
echo "kill: sweep, 20 points: $empty before the store existed, $partial in a partial store,"   "$complete with the store complete; an uninterrupted run of ${sweep_ms} ms"
[ $((empty + partial + complete)) -eq 20 ] || bad "sweep: only $((empty + partial + complete)) of 20 points checked"
# The same command completes the store: identical to the uninterrupted one, nothing left beside it.
"$bin" "${sweep[@]}" --out "$store" > /dev/null 2>&1 || bad "the sweep after the kills"
export_csv "$store" "$tmp/final.csv" && cmp -s "$tmp/final.csv" "$tmp/ref.csv" ||
  bad "the resumed sweep differs from the uninterrupted one"
[ "$(ls -A "$tmp/sk")" = study.sqlite ] || bad "beside the store: $(ls -A "$tmp/sk" | tr '\n' ' ')"

echo "kill: $fail failed"
[ "$fail" -eq 0 ]
