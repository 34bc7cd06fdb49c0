#!/usr/bin/env bash
# A sampled sweep in shards on one machine (or several, with --sshlogin) with GNU
# parallel, then merged into one table: the merged table equals the unsharded run bit for
# bit. docs/sweeps.md explains each step; cli/tests/sampled_sweep.rs runs this script.
#
# Usage: examples/sampled-sweep-parallel.sh CASE OUT_DIR [SHARDS] [SAMPLE_FILE]
#   SHARDS       number of shards (default 8); GNU parallel runs as many at once as there
#                are processors, each shard on one thread (-j 1)
#   SAMPLE_FILE  the --sample-file JSON (default: examples/sampled-sweep.json)
# Environment: BOREFLUX, the boreflux binary (default: boreflux on PATH).
set -euo pipefail

case_file=${1:?usage: $0 CASE OUT_DIR [SHARDS] [SAMPLE_FILE]}
out=${2:?usage: $0 CASE OUT_DIR [SHARDS] [SAMPLE_FILE]}
shards=${3:-8}
spec=${4:-$(dirname "$0")/sampled-sweep.json}
bin=${BOREFLUX:-boreflux}
mkdir -p "$out"

# One job per shard; --halt now,fail=1 stops the others when one fails.
parallel --will-cite --halt now,fail=1 "$bin" sweep "$case_file" --sample-file "$spec" \
    --shard {}/"$shards" -j 1 -q -o "$out"/part-{} ::: $(seq 1 "$shards")

"$bin" merge "$out"/part-*.h5 -o "$out"/all
