#!/bin/sh
# Time `wavsieve apply` end to end (read, decode, filter, encode, write,
# sync, rename) against testdata/apply/bench_apply.py, which does the same
# with NumPy and SciPy, on one 10-minute 48 kHz 24-bit stereo file made by
# testdata/apply/gen, with the order-8 elliptic high-pass at 100 Hz (4
# sections, designed by wavsieve; the script gets the same sections).
# Three rounds, side by side; the best time of each is kept. Prints the
# times, the peak resident memory of wavsieve and the speed ratios.
#
#   sh testdata/apply/bench_apply.sh [rounds]
#
# Files go to a folder under ${TMPDIR:-/tmp}, removed at the end.
set -eu
rounds=${1:-3}
root=$(cd "$(dirname "$0")/../.." && pwd)
cd "$root"
work=$(mktemp -d "${TMPDIR:-/tmp}/wavsieve-bench-apply.XXXXXX")
trap 'rm -rf "$work"' EXIT
go build -o "$work/wavsieve" ./cmd/wavsieve
go run ./testdata/apply/gen -o "$work/in.wav"
spec="--family elliptic --response highpass --order 8 --cutoff 100 --ripple 0.5 --attenuation 80"
# shellcheck disable=SC2086
"$work/wavsieve" design $spec --rate 48000 --json |
	/usr/bin/python3 -c 'import json, sys; print(json.dumps(json.load(sys.stdin)["sections"]))' >"$work/sos.json"

# run NAME ARGS...: one timed apply; appends "NAME seconds peak-KB" to $work/times.
run() {
	name=$1
	shift
	# shellcheck disable=SC2086
	/usr/bin/time -f "$name %e %M" -a -o "$work/times" \
		"$work/wavsieve" apply $spec --replace --no-progress --json -o "$work/out.wav" "$@" "$work/in.wav" \
		>"$work/manifest.json" 2>/dev/null
}
run warmup --zero-phase
pad=$(/usr/bin/python3 -c 'import json, sys; print(json.load(open(sys.argv[1]))["files"][0]["zero_phase_pad_frames"])' "$work/manifest.json")
: >"$work/times"
i=0
while [ "$i" -lt "$rounds" ]; do
	run go-causal --no-dither
	run go-zerophase --zero-phase --no-dither
	run go-causal-dither
	run go-zerophase-dither --zero-phase
	/usr/bin/python3 testdata/apply/bench_apply.py "$work/in.wav" "$work" "$work/sos.json" "$pad" 1 |
		awk '/^numpy-/ {print $1, $2, 0}' >>"$work/times"
	i=$((i + 1))
done
/usr/bin/python3 -c 'import numpy, scipy; print("numpy", numpy.__version__, "scipy", scipy.__version__)'
echo "uptime: $(uptime)"
echo "pad $pad frames; best of $rounds rounds"
awk '
	{ if (!($1 in t) || $2 < t[$1]) t[$1] = $2; if ($3 > m[$1]) m[$1] = $3 }
	END {
		for (k in t) if (k ~ /^go-/) {
			ref = (k ~ /zerophase/) ? "numpy-zerophase" : "numpy-causal"
			printf "%-20s %6.2f s  peak %4.0f MB   %-16s %6.2f s   %5.2fx\n", k, t[k], m[k] * 1024 / 1e6, ref, t[ref], t[ref] / t[k]
		}
	}' "$work/times" | sort
