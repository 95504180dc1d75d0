#!/usr/bin/env bash
# Times analyze.BenchmarkWelch10MinStereo and scipy.signal.welch on data of the
# same size and options, one after the other, and prints the speed ratio.
#
#   bash testdata/analyze/bench_welch.sh
#
# Uses Debian's /usr/bin/python3 with python3-scipy. Each side reports its best
# of 3 runs.
set -euo pipefail
cd "$(dirname "$0")/../.."

go_out=$(go test -run '^$' -bench '^BenchmarkWelch10MinStereo$' -benchtime 1x -count 3 ./analyze)
echo "$go_out" | grep '^Benchmark' >&2
go_s=$(echo "$go_out" | awk '/^BenchmarkWelch10MinStereo/ { s = $3 / 1e9; if (best == "" || s < best) best = s } END { printf "%.3f", best }')

py_out=$(/usr/bin/python3 testdata/analyze/bench_welch.py --repeat 3)
echo "$py_out" | head -1 >&2
py_s=$(echo "$py_out" | awk '/^scipy_welch_seconds/ { print $2 }')

echo "go_welch_seconds $go_s"
echo "scipy_welch_seconds $py_s"
awk -v g="$go_s" -v p="$py_s" 'BEGIN { printf "speedup %.2fx (scipy / go)\n", p / g }'
