#!/bin/sh
# An ensemble study as a Slurm job array: array task i computes shard i/N of the
# instance set (N = the number of tasks), each into its own result file; a last
# step joins them. Submit with, for example:
#   sbatch --array=0-7 scripts/slurm-ensemble-array.sh glasses.h5 schedules/linear.toml study -d 1,10,100
# and when every task has finished:
#   gapwise merge-shards study-shard-*.h5 --out study.h5
# Array indices must run 0..N-1 (--array=0-7, not 1-8). Each task uses the CPUs
# Slurm gives it (--cpus-per-task; gapwise reads its affinity mask) and checks
# memory against the job's cgroup limit (--mem). A task that is killed and
# requeued resumes from its journal (study-shard-i.h5.journal).
#SBATCH --job-name=gapwise-ensemble
#SBATCH --cpus-per-task=4
#SBATCH --mem=8G
#SBATCH --time=04:00:00
set -eu
if [ $# -lt 3 ]; then
  echo "usage: sbatch --array=0-(N-1) $0 SET SCHEDULE PREFIX [ensemble options...]" >&2
  exit 2
fi
: "${SLURM_ARRAY_TASK_ID:?not in a job array: submit with sbatch --array=0-7 (or set SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT)}"
: "${SLURM_ARRAY_TASK_COUNT:?not in a job array: submit with sbatch --array=0-7 (or set SLURM_ARRAY_TASK_COUNT)}"
set_file=$1
schedule=$2
prefix=$3
shift 3
exec "${GAPWISE:-gapwise}" ensemble "$set_file" "$schedule" \
  --shard "$SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT" --out "$prefix-shard-$SLURM_ARRAY_TASK_ID.h5" "$@"
