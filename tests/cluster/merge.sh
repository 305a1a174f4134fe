#!/bin/bash
# Joins the shards into $RUN/queue; refuses (exit 2) while a shard is
# missing or unfinished, naming it.
#SBATCH --job-name=clipwarden-merge
clipwarden merge "$RUN"/shard-* --out "$RUN/queue" --quiet
status=$?; case $status in 0|1|3) exit 0 ;; *) exit $status ;; esac
