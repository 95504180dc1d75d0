#!/bin/sh
# Sends SIGINT or SIGTERM to each wavsieve command part-way through a long
# run and prints one line per case: the exit code, the time from the
# signal to the exit, the last line on stderr and any file left in the
# case's output folder (an interrupted run must leave none: no output
# under its final name, no temporary).
#
# A shell starts background jobs with SIGINT ignored; env --default-signal
# gives the command the default disposition, as a terminal would.
#
# gather is not covered: it needs the records of a sharded run.
#
# Not part of go test: it writes about 120 MB of WAV files and takes a
# minute or so. Run from the repository's root:
#   sh testdata/kill/sigint_all.sh [work-folder]
set -u
work=${1:-/tmp/wavsieve-kill}
delay=${DELAY:-1}
mkdir -p "$work"
bin=$work/wavsieve
go build -o "$bin" ./cmd/wavsieve || exit 1
if [ ! -f "$work/wav/logger-1/reedmere-00-48k.wav" ]; then
	go run ./testdata/cluster/gen -dir "$work/wav" -n 2 -frames 20000000 >/dev/null || exit 1
fi
in1=$work/wav/logger-1/reedmere-00-48k.wav
in2=$work/wav/logger-2/$(ls "$work/wav/logger-2" | head -n 1)

# A spec of 1000 notches, near the largest design.
big=$work/big-spec.json
printf '{"stages": [{"family": "notch", "fundamental_hz": 20, "harmonics": 1000, "bandwidth_hz": 0.5}]}\n' >"$big"

# A survey document to build the report from.
"$bin" survey --json "$in1" >"$work/survey.json" 2>/dev/null

run() { # name signal delay command...
	name=$1 sig=$2 wait=$3
	shift 3
	out=$work/out-$name-$sig
	rm -rf "$out" && mkdir -p "$out"
	start=$(date +%s.%N)
	(cd "$out" && exec env --default-signal=INT,TERM "$@") >"$work/$name-$sig.stdout" 2>"$work/$name-$sig.stderr" &
	pid=$!
	sleep "$wait"
	if kill -0 $pid 2>/dev/null; then
		sent=$(date +%s.%N)
		kill -s "$sig" $pid
		wait $pid
		code=$?
		end=$(date +%s.%N)
		took=$(echo "$end - $sent" | bc)
	else
		wait $pid
		code=$?
		took="(finished before the signal)"
	fi
	left=$(cd "$out" && find . -type f | sed 's|^\./||' | tr '\n' ' ')
	msg=$(tail -n 1 "$work/$name-$sig.stderr")
	printf '%-9s %-4s exit=%-3s time=%-8s leftovers=[%s] stderr: %s\n' "$name" "$sig" "$code" "$took" "$left" "$msg"
}

for sig in INT TERM; do
	run design $sig "$delay" "$bin" design --spec "$big" --rate 48000 --plot design.svg
	run spectrum $sig 0.3 "$bin" spectrum --plot spec.svg "$in1" "$in1"
	run verify $sig "$delay" "$bin" verify --spec "$big" --probe --rate 48000 --plot verify.svg
	run survey $sig "$delay" "$bin" survey --write-spec spec.json --track-csv track.csv "$in1"
	run bands $sig "$delay" "$bin" bands --plot plots "$in1" "$in2"
	run report $sig 0.1 "$bin" report --from "$work/survey.json" --output report.html
	run apply $sig "$delay" "$bin" apply --spec "$big" --output clean "$in1"
done
