#!/usr/bin/env bash
# tools/slurm/sweep-array.sh on a real Slurm: a private single-node cluster on localhost (Debian's
# slurm-wlm and munge), started here and stopped here by PID: its own munge key and socket, a
# generated slurm.conf with free ports, slurmctld -D and slurmd -D in the background. Runs a study
# as 4 array tasks and the dependent merge job, and compares the merged store with the same study
# run in one process. Where Slurm cannot start (not root, packages missing, a daemon that does not
# come up), it says why and exits 77, which ctest reports as skipped (never as passed).
#   slurm_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
skip() {
  echo "SKIP: $* (the Slurm integration test did not run)"
  exit 77
}
for c in munged slurmctld slurmd sbatch sinfo squeue; do
  command -v "$c" > /dev/null || skip "no $c: install slurm-wlm and munge (tools/test does)"
done
[ "$(id -u)" = 0 ] || skip "a private slurmd needs root here"

d=$(mktemp -d /tmp/lapwing-slurm.XXXXXX)
pids=()
stop() {
  # Only what this test started, by PID: the daemons' own pid files and the background jobs.
  for f in "$d/slurmd.pid" "$d/slurmctld.pid" "$d/munge/munged.pid"; do
    [ -s "$f" ] && pids+=("$(cat "$f")")
  done
  for p in "${pids[@]}"; do kill "$p" 2> /dev/null; done
  sleep 1
  for p in "${pids[@]}"; do kill -9 "$p" 2> /dev/null; done
  rm -rf "$d"
}
trap stop EXIT
mkdir -p "$d/munge" "$d/state" "$d/spool" "$d/log" "$d/work"
chmod 700 "$d/munge"
dd if=/dev/urandom of="$d/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$d/munge/munge.key"
munged --key-file="$d/munge/munge.key" --socket="$d/munge/munge.socket" \
  --pid-file="$d/munge/munged.pid" --log-file="$d/log/munged.log" --seed-file="$d/munge/seed" -f ||
  skip "munged did not start: $(tail -n 3 "$d/log/munged.log" 2> /dev/null)"

free_port() { python3 -c 'import socket; s = socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])'; }
node=$(hostname -s)
cat > "$d/slurm.conf" << EOF
ClusterName=lapwingtest
SlurmctldHost=$node(127.0.0.1)
SlurmctldPort=$(free_port)
SlurmdPort=$(free_port)
AuthType=auth/munge
AuthInfo=socket=$d/munge/munge.socket
CredType=cred/munge
SlurmUser=root
SlurmdUser=root
StateSaveLocation=$d/state
SlurmdSpoolDir=$d/spool
SlurmctldPidFile=$d/slurmctld.pid
SlurmdPidFile=$d/slurmd.pid
SlurmctldLogFile=$d/log/slurmctld.log
SlurmdLogFile=$d/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
ReturnToService=2
SchedulerType=sched/builtin
NodeName=$node NodeAddr=127.0.0.1 CPUs=$(nproc) State=UNKNOWN
PartitionName=local Nodes=$node Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF=$d/slurm.conf
slurmctld -D -f "$SLURM_CONF" > "$d/log/slurmctld.out" 2>&1 &
pids+=($!)
slurmd -D -f "$SLURM_CONF" > "$d/log/slurmd.out" 2>&1 &
pids+=($!)
up=
for _ in $(seq 1 60); do
  sleep 0.5
  if sinfo -h -o %T 2> /dev/null | grep -qx idle; then up=1; break; fi
done
[ -n "$up" ] || skip "the private Slurm did not come up: $(tail -n 3 "$d/log/slurmctld.log" "$d/log/slurmd.log" 2> /dev/null | tr '\n' ' ')"

fail=0
study=(--car cars/pellion-fr2.yaml --track tracks/skidpad.yaml --track tracks/acceleration.yaml
  --set mass=600kg:680kg:5 --set front_flap=7deg:22deg:3 --threads 1)
LAPWING=$bin tools/slurm/sweep-array.sh --tasks 4 --out "$d/work/study.sqlite" -- "${study[@]}" \
  > "$d/submit.txt" 2>&1 || { echo "FAIL: submit: $(cat "$d/submit.txt")"; exit 1; }
echo "$(cat "$d/submit.txt")"
read -r array merge < <(sed -n 's/^array \([0-9]*\) (4 tasks), merge \([0-9]*\) .*/\1 \2/p' "$d/submit.txt")
[ -n "$array" ] && [ -n "$merge" ] || { echo "FAIL: no job ids in: $(cat "$d/submit.txt")"; exit 1; }
done_=
for _ in $(seq 1 240); do
  sleep 0.5
  if [ -z "$(squeue -h -j "$array,$merge" 2> /dev/null)" ]; then done_=1; break; fi
done
[ -n "$done_" ] || { echo "FAIL: the jobs did not finish in 120 s: $(squeue 2>&1)"; fail=1; }
for k in 1 2 3 4; do
  [ -s "$d/work/study.shard-$k-of-4.sqlite" ] || { echo "FAIL: no shard $k of 4"; fail=1; }
  [ -s "$d/work/lapwing-sweep-${array}_$k.log" ] || { echo "FAIL: no log of task $k"; fail=1; }
done
[ -s "$d/work/study.sqlite" ] || {
  echo "FAIL: the merge job wrote nothing: $(cat "$d"/work/lapwing-merge-*.log 2> /dev/null)"
  exit 1
}
"$bin" sweep "${study[@]}" --out "$d/single.sqlite" > /dev/null || { echo "FAIL: single run"; exit 1; }
"$bin" sweep export "$d/single.sqlite" --csv "$d/single.csv" > /dev/null
"$bin" sweep export "$d/work/study.sqlite" --csv "$d/array.csv" > /dev/null
# 15 points x 2 tracks = 30 rows and the header.
[ "$(wc -l < "$d/single.csv")" = 31 ] || { echo "FAIL: $(wc -l < "$d/single.csv") lines"; fail=1; }
cmp -s "$d/single.csv" "$d/array.csv" || { echo "FAIL: the job array's study differs from one process's"; fail=1; }
[ $fail = 0 ] && echo "slurm: 4 array tasks and the merge equal the single-process study"
exit $fail
