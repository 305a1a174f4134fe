#!/usr/bin/env bash
# Writes the fuzz targets' seed corpora (never committed) into OUT/<target>/:
#   decode   - short clips of each container we read, made by ffmpeg's lavfi
#              test sources: mp4/h264, mkv/ffv1, webm/vp9, gif, avi/mjpeg,
#              mov/mpeg4 with sound, and a single png picture; an mp4 with
#              random bytes written into its middle and one with stray bytes
#              after its last box
#   policy   - the built-in policy as printed by the CLI, the example policy
#              of docs/gate.md, a small hand-written one, one nested 100
#              levels deep and one that repeats a key
#   manifest - manifests as docs/gate.md describes them, --shard texts, a
#              line nested 100 levels deep and one repeating a key
#   report   - the JSON reports of analysing two of the clips above, one of
#              them with a path that is not UTF-8 (escaped form)
# Usage: make_seeds.sh OUT CLIPWARDEN_BINARY
set -euo pipefail
out=${1:?usage: make_seeds.sh OUT CLIPWARDEN_BINARY}
cli=${2:?usage: make_seeds.sh OUT CLIPWARDEN_BINARY}
source_dir="$(cd "$(dirname "$0")/../.." && pwd)"
mkdir -p "$out"/{decode,policy,manifest,report}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

# ---- decode: 4 frames at 64x48 (small seeds keep the fuzzer fast)
lavfi=(-hide_banner -loglevel error -y -f lavfi -i testsrc2=size=64x48:rate=8:duration=0.5)
ffmpeg "${lavfi[@]}" -c:v libx264 -pix_fmt yuv420p -g 2 "$out/decode/h264.mp4"
ffmpeg "${lavfi[@]}" -c:v ffv1 "$out/decode/ffv1.mkv"
ffmpeg "${lavfi[@]}" -c:v libvpx-vp9 -b:v 50k -deadline realtime "$out/decode/vp9.webm"
ffmpeg "${lavfi[@]}" "$out/decode/clip.gif"
ffmpeg "${lavfi[@]}" -c:v mjpeg -q:v 8 "$out/decode/mjpeg.avi"
ffmpeg "${lavfi[@]}" -f lavfi -i sine=frequency=440:duration=0.5 -c:v mpeg4 -c:a aac \
  -shortest "$out/decode/mpeg4_aac.mov"
ffmpeg "${lavfi[@]}" -frames:v 1 "$out/decode/picture.png"
size=$(stat -c %s "$out/decode/h264.mp4")
{ head -c $((size / 2)) "$out/decode/h264.mp4"; head -c 512 /dev/urandom
  tail -c +$((size / 2 + 513)) "$out/decode/h264.mp4"; } >"$out/decode/h264_mid_random.mp4"
{ cat "$out/decode/h264.mp4"; printf 'stray\377\376 bytes after the last box'; } \
  >"$out/decode/h264_trailing_bytes.mp4"

# nested N levels: {"a":{"a":...{}...}}
nested() { local n=$1; printf '%*s' "$n" '' | sed 's/ /{"a":/g'; printf '{}'; printf '%*s' "$n" '' | tr ' ' '}'; }

# ---- policy
"$cli" gate --print-default-policy >"$out/policy/default.json"
awk '/^```json/{on=1; next} /^```/{if (on) exit} on' "$source_dir/docs/gate.md" \
  >"$out/policy/docs_gate_example.json"
cat >"$out/policy/small.json" <<'JSON'
{"schema": "clipwarden.policy/1", "name": "small",
 "rules": {"coherence_review_below": 50, "dropped_frames_review": null},
 "metrics": {"flicker": {"segment": {"enter": 3, "leave": 1, "review_peak": null},
                         "thresholds": {"p95": {"review": 2, "reject": null}}}}}
JSON
nested 100 >"$out/policy/deep.json"
printf '{"name": "one", "name": "two"}\n' >"$out/policy/repeated_key.json"

# ---- manifest (the clips named need not exist: they are not opened)
printf '%s\n' '{"path": "a.mp4", "id": "a-1", "prompt_id": 17, "model": "m2", "seed": 4}' \
  '{"path": "clips/b.webm", "note": {"take": 3}}' '' '{"path": "/abs/c.gif", "id": 9}' \
  >"$out/manifest/manifest.jsonl"
printf '%s\r\n' '{"path": "x.mkv", "id": "x"}' '{"path": "y.mkv", "id": "y", "seed": "s"}' \
  >"$out/manifest/crlf.jsonl"
printf '1/4\n{"path": "a.mp4"}\n' >"$out/manifest/shard.jsonl"
printf 'auto/8\n' >"$out/manifest/shard_auto.txt"
{ printf '{"path": "a.mp4", "note": '; nested 100; printf '}\n'; } >"$out/manifest/deep.jsonl"
printf '{"path": "a.mp4", "id": "x", "id": "y"}\n' >"$out/manifest/repeated_key.jsonl"

# ---- report: analyse two clips (one with sound) with the CLI
for clip in h264.mp4 mpeg4_aac.mov; do
  "$cli" analyze "$out/decode/$clip" --out "$work/$clip" --no-html --quiet >/dev/null || true
  for report in "$work/$clip"/*.json; do
    [ -f "$report" ] && cp "$report" "$out/report/${clip%%.*}.json"
  done
done
ls "$out"/report/*.json >/dev/null  # at least one report was written
# a report of a clip whose name is not UTF-8 (the byte 0xFF)
sed 's|"path": "[^"]*"|"path": "take_\\\\xff.mp4", "path_escaped": true|' "$out/report/h264.json" \
  >"$out/report/escaped_path.json"
