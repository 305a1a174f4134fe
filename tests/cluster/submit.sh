#!/bin/bash
# Submits a batch: the gate as a job array, the merge once every task has
# succeeded (a failed task cancels it). Prints the two job ids.
#   INPUT=/data/run-42/manifest.jsonl RUN=/data/gate/run-42 SHARDS=16 ./submit.sh
set -euo pipefail
export INPUT RUN SHARDS
here=$(dirname "$0")
array=$(sbatch --parsable --array=0-$((SHARDS - 1)) "$here/gate-array.sh")
merge=$(sbatch --parsable --dependency=afterok:"$array" --kill-on-invalid-dep=yes "$here/merge.sh")
echo "$array $merge"
