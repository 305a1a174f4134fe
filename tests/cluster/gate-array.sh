#!/bin/bash
# One share of the batch per array task, the task id being the shard:
#   sbatch --array=0-$((SHARDS - 1)) gate-array.sh   (the array counts from 0)
# INPUT, RUN and SHARDS come from the submitting shell (sbatch passes it on).
#SBATCH --job-name=clipwarden-gate
#SBATCH --cpus-per-task=8
#SBATCH --mem=8G
clipwarden gate "$INPUT" --shard "auto/$SHARDS" --jobs 4 --quiet \
  --out "$RUN/shard-$SLURM_ARRAY_TASK_ID"
# 1 and 3 are verdicts (they are in the queue); 2 (bad usage) and 130, 143,
# 137 (interrupted, killed) fail the task.
status=$?; case $status in 0|1|3) exit 0 ;; *) exit $status ;; esac
