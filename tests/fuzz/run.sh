#!/usr/bin/env bash
# Runs the fuzz targets of a CLIPWARDEN_FUZZ build for a fixed time each, from
# their seed corpora (made by make_seeds.sh on first use), as many at once as
# there are cores. New inputs collect in BUILD/fuzz/corpus/<target>, crashes
# in BUILD/fuzz/artifacts/<target>/, logs in BUILD/fuzz/<target>.log.
# Usage: run.sh BUILD SECONDS [TARGET...]   (targets: decode policy manifest report)
# Exit status 1 when any target found a crash, leak, timeout or sanitizer report.
set -euo pipefail
build=$(cd "${1:?usage: run.sh BUILD SECONDS [TARGET...]}" && pwd)
seconds=${2:?usage: run.sh BUILD SECONDS [TARGET...]}
shift 2
targets=("$@")
[ ${#targets[@]} -gt 0 ] || targets=(decode policy manifest report)
here="$(cd "$(dirname "$0")" && pwd)"
fuzz="$build/fuzz"
[ -d "$fuzz/seeds/report" ] || "$here/make_seeds.sh" "$fuzz/seeds" "$build/clipwarden"

export ASAN_OPTIONS="${ASAN_OPTIONS:-detect_leaks=1}"
export UBSAN_OPTIONS="${UBSAN_OPTIONS:-print_stacktrace=1:halt_on_error=1}"
run_one() {
  local target=$1
  mkdir -p "$fuzz/corpus/$target" "$fuzz/artifacts/$target"
  "$build/tests/fuzz/fuzz_$target" "$fuzz/corpus/$target" "$fuzz/seeds/$target" \
    -max_total_time="$seconds" -timeout=25 -rss_limit_mb=2560 -print_final_stats=1 \
    -artifact_prefix="$fuzz/artifacts/$target/" >"$fuzz/$target.log" 2>&1
}

declare -A pids
for target in "${targets[@]}"; do
  while [ "$(jobs -rp | wc -l)" -ge "$(nproc)" ]; do wait -n || true; done
  run_one "$target" &
  pids[$target]=$!
done
status=0
for target in "${targets[@]}"; do
  if wait "${pids[$target]}"; then result=ok; else result=FAILED; status=1; fi
  runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$fuzz/$target.log" | tail -1)
  echo "fuzz_$target: $result, ${runs:-?} runs in ${seconds}s (log: $fuzz/$target.log)"
  [ "$result" = ok ] || grep -E "ERROR|runtime error|SUMMARY|Test unit written" \
    "$fuzz/$target.log" | head -20
done
exit $status
