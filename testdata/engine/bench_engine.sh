#!/bin/sh
# Run the Go engine benchmarks and the SciPy timings on the same
# workload (order-8 elliptic high-pass, 4 sections, 10 minutes of 48 kHz
# stereo, pad 4800 frames) and print the Go/SciPy speed ratios: the best
# of 3 runs on each side, the Go runs first, then the SciPy ones.
#
#   sh testdata/engine/bench_engine.sh
set -eu
root=$(cd "$(dirname "$0")/../.." && pwd)
cd "$root"
go=$(go test -run '^$' -bench 'Ellip8' -benchtime 3x -count 3 ./process | awk '/^Benchmark/ {print $1, $(NF-1)}')
py=$(/usr/bin/python3 testdata/engine/bench_engine.py 3)
echo "$go"
echo "$py"
echo "uptime: $(uptime)"
printf '%s\n%s\n' "$go" "$py" | awk '
	/^Benchmark/ { sub(/-[0-9]+$/, "", $1); if ($2 > g[$1]) g[$1] = $2 }
	/^sosfilt /  { sf = $3 }
	/^sosfiltfilt / { sff = $3 }
	END {
		for (k in g) {
			ref = (k ~ /ZeroPhase/) ? sff : sf
			name = (k ~ /ZeroPhase/) ? "sosfiltfilt" : "sosfilt"
			printf "%-40s %8.1f M/s  %5.2fx scipy %s (%.1f M/s)\n", k, g[k], g[k] / ref, name, ref
		}
	}' | sort
