#!/usr/bin/env bash
# gate_batch.sh CORPUS OUT.jsonl: writes the clips listed in gate_batch.txt
# (beside this script) as a `clipwarden gate` manifest of absolute paths
# into CORPUS/clips. Fails, naming it, when a listed clip is missing.
# Then e.g.: /usr/bin/time -f '%U %S %e %M' clipwarden gate OUT.jsonl --out DIR --quiet
set -eu
corpus=${1:?usage: gate_batch.sh CORPUS OUT.jsonl}
out=${2:?usage: gate_batch.sh CORPUS OUT.jsonl}
list="$(dirname "$0")/gate_batch.txt"
clips="$(cd "$corpus/clips" && pwd)"
: >"$out"
grep -v '^#' "$list" | grep -v '^$' | while read -r name; do
  [ -f "$clips/$name" ] || { echo "gate_batch.sh: $clips/$name is missing" >&2; exit 1; }
  printf '{"path": "%s/%s", "id": "%s"}\n' "$clips" "$name" "$name" >>"$out"
done
echo "$(wc -l <"$out") clips -> $out"
