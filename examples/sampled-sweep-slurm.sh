#!/usr/bin/env bash
# A sampled sweep as a Slurm job array: task K of N runs shard K/N on one node; a
# dependent job merges the shards. docs/sweeps.md explains each step.
#
# Submit (from the directory holding the case and the sample file):
#   sbatch --array=1-32 examples/sampled-sweep-slurm.sh cases/municipal-sand-gravel.json mc.json out/mc
#   # when the array is done (or with --dependency=afterok:<array job id>):
#   boreflux merge out/mc/part-*.h5 -o out/mc/all
# Adjust the resources below to your cluster; one shard uses --cpus-per-task threads.
#SBATCH --job-name=boreflux-sweep
#SBATCH --cpus-per-task=4
#SBATCH --time=02:00:00
#SBATCH --output=boreflux-sweep-%A_%a.log
set -euo pipefail

case_file=${1:?usage: sbatch --array=1-N $0 CASE SAMPLE_FILE OUT_DIR}
spec=${2:?usage: sbatch --array=1-N $0 CASE SAMPLE_FILE OUT_DIR}
out=${3:?usage: sbatch --array=1-N $0 CASE SAMPLE_FILE OUT_DIR}
mkdir -p "$out"

# Slurm numbers the tasks SLURM_ARRAY_TASK_MIN..MAX; with --array=1-N, K runs from 1 to N.
shards=${SLURM_ARRAY_TASK_COUNT:?submit with sbatch --array=1-N}
k=${SLURM_ARRAY_TASK_ID:?submit with sbatch --array=1-N}

boreflux sweep "$case_file" --sample-file "$spec" --shard "$k/$shards" \
    -j "${SLURM_CPUS_PER_TASK:-1}" -q -o "$out/part-$k"
