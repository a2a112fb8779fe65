#!/usr/bin/env bash
# A lapwing sweep on a Slurm cluster as a job array (README, "Sweep on a cluster"): one shard of
# the study per array task, then a merge job that starts when every task has succeeded.
#
#   tools/slurm/sweep-array.sh --tasks N --out STUDY.sqlite [--sbatch "OPTIONS"] -- SWEEP-OPTIONS...
#
# SWEEP-OPTIONS are lapwing sweep's (--car, --track, --set, --config, --design, ...), without
# --shard and --out. Task K (of 1..N) runs `lapwing sweep SWEEP-OPTIONS --shard K/N --out
# STUDY.shard-K-of-N.sqlite`; the merge job runs `lapwing sweep merge STUDY.sqlite` on the N shard
# files. Jobs run in the directory this script is called from (relative paths in SWEEP-OPTIONS
# are read there: it must be on a file system every node sees), and write their logs beside
# STUDY.sqlite (lapwing-sweep-JOBID_TASK.log, lapwing-merge-JOBID.log). The lapwing command is
# $LAPWING (default: `lapwing` on the PATH); --sbatch passes options to both sbatch calls (a
# partition, a time limit, an account). A task killed by the scheduler (time limit, preemption)
# keeps the rows it committed: requeue it, or run this script again with the same options, and
# the tasks skip the points their shard files hold already.
#
# Prints the two job ids: "array JOBID (N tasks), merge MERGEID -> STUDY.sqlite".
set -euo pipefail

lapwing=${LAPWING:-lapwing}

shard_file() {  # STUDY K N
  echo "${1%.sqlite}.shard-$2-of-$3.sqlite"
}

case "${1:-}" in
  --task)  # inside the array: --task N STUDY -- SWEEP-OPTIONS
    n=$2 out=$3
    shift 4
    k=${SLURM_ARRAY_TASK_ID:?the array task id (run through sbatch --array)}
    exec "$lapwing" sweep "$@" --shard "$k/$n" --out "$(shard_file "$out" "$k" "$n")"
    ;;
  --merge)  # after the array: --merge N STUDY
    n=$2 out=$3
    shards=()
    for k in $(seq 1 "$n"); do shards+=("$(shard_file "$out" "$k" "$n")"); done
    exec "$lapwing" sweep merge "$out" "${shards[@]}"
    ;;
esac

tasks= out= extra=
while [ $# -gt 0 ]; do
  case "$1" in
    --tasks) tasks=$2; shift 2 ;;
    --out) out=$2; shift 2 ;;
    --sbatch) extra=$2; shift 2 ;;
    --) shift; break ;;
    *) echo "sweep-array.sh: unknown option '$1' (see the comment at the top)" >&2; exit 2 ;;
  esac
done
if ! [[ "$tasks" =~ ^[1-9][0-9]*$ ]] || [ -z "$out" ] || [ $# -eq 0 ]; then
  echo "usage: sweep-array.sh --tasks N --out STUDY.sqlite [--sbatch \"OPTIONS\"] -- SWEEP-OPTIONS..." >&2
  exit 2
fi
case "$out" in /*) ;; *) out=$PWD/$out ;; esac
logs=$(dirname "$out")
script=$(realpath "$0")
# The lapwing the tasks run: an absolute path, so that a job's environment finds the same one.
if [[ "$lapwing" == */* ]]; then lapwing=$(realpath "$lapwing"); else lapwing=$(command -v "$lapwing"); fi
export LAPWING=$lapwing
# shellcheck disable=SC2086  # --sbatch's options are words
array=$(sbatch --parsable $extra --job-name=lapwing-sweep --array="1-$tasks" --export=ALL \
  --chdir="$PWD" --output="$logs/lapwing-sweep-%A_%a.log" "$script" --task "$tasks" "$out" -- "$@")
array=${array%%;*}
# shellcheck disable=SC2086
merge=$(sbatch --parsable $extra --job-name=lapwing-merge --dependency="afterok:$array" \
  --export=ALL --chdir="$PWD" --output="$logs/lapwing-merge-%j.log" "$script" --merge "$tasks" "$out")
merge=${merge%%;*}
echo "array $array ($tasks tasks), merge $merge -> $out"
