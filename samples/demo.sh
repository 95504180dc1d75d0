#!/usr/bin/env bash
# The main job on the shipped samples, start to finish:
#   1. survey the recordings for hum and rumble,
#   2. filter the Reedmere field recordings (rumble high-pass and 50 Hz hum
#      notches, zero-phase) and the pump-house vibration logger (a zero-phase
#      elliptic low-pass), each file designed at its own sample rate, verifying
#      every output against the spec,
#   3. prove the field recordings' filter chain with tone probes (six
#      seconds of recording are too short to measure a 2 Hz wide notch, so
#      the verification of step 2 is inconclusive there),
#   4. measure third-octave band levels of the recordings before and after,
#   5. write one HTML report of all of it.
# Everything goes under out/demo (or the folder given as the first argument).
set -euo pipefail
cd "$(dirname "$0")/.."
out=${1:-out/demo}
mkdir -p "$out"
go build -o "$out/wavsieve" ./cmd/wavsieve
ws=$out/wavsieve

echo "== survey"
"$ws" survey samples
"$ws" survey --json samples >"$out/survey.json"

echo "== filter the field recordings"
"$ws" apply --spec samples/specs/rumble-and-hum.json --zero-phase --verify --replace \
  --output "$out/reedmere" samples/reedmere-*.wav

echo "== filter the vibration logger"
"$ws" apply --spec samples/specs/vibration-lowpass-zero-phase.json --verify --replace \
  --output "$out/pumphouse" samples/pumphouse-vibration-12800.wav

echo "== prove the field recordings' chain with tone probes (full table in $out/probe-reedmere-north.txt)"
"$ws" verify --probe --spec samples/specs/rumble-and-hum.json --zero-phase \
  --input samples/reedmere-north-48k.wav >"$out/probe-reedmere-north.txt" || true
grep -E '^(Verdict|Note):' "$out/probe-reedmere-north.txt"

echo "== third-octave band levels, before and after"
"$ws" bands --json samples/reedmere-*.wav "$out"/reedmere/reedmere-*.wav >"$out/bands.json"

echo "== report"
"$ws" report --from "$out/reedmere/wavsieve-manifest.json" --from "$out/pumphouse/wavsieve-manifest.json" \
  --from "$out/survey.json" --from "$out/bands.json" --output "$out/report.html"
echo "Open $out/report.html in a browser."
