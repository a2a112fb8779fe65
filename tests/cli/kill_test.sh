#!/usr/bin/env bash
# Kill tests (issue 19, deliver 5): `compare` is killed with SIGKILL at 20 random points while it
# replaces an output folder, and after each kill the folder must hold exactly the old set of
# files or exactly the new one (names and bytes), never a mix; the next run that completes must
# leave no temporary behind. (`sweep` is not part of lapwing yet; when it is, it joins here.)
#   kill_test.sh LAPWING_BINARY SOURCE_DIR
# The kill times are drawn from $RANDOM with a seed printed at the start; LAPWING_KILL_SEED=N
# repeats a run's points.
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
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

echo "kill: $fail failed"
[ "$fail" -eq 0 ]
