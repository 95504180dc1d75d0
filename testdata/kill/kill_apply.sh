#!/usr/bin/env bash
# Kill `wavsieve apply` at random points and check what it leaves.
#
#   bash testdata/kill/kill_apply.sh [rounds] [files]
#
# Makes a batch of input files (testdata/apply/gen, 30 s of 48 kHz 24-bit
# stereo each, under different names), runs apply once to the end into a
# reference folder, then `rounds` times starts apply (zero-phase or
# causal, -j 2, at random) into one output folder and, after a random
# delay, sends it SIGKILL, SIGINT or SIGTERM (at random; a signal that
# comes after the run has ended does nothing). After every round it checks:
#   - the inputs are byte for byte what they were;
#   - every file under an output's final name is byte for byte the
#     reference output (outputs are deterministic: the dither seed comes
#     from the input's name and size), so none is incomplete;
#   - what is left in the output folder besides outputs and the record:
#     temporary files, their count and bytes (counted before the next
#     round, which must remove those of killed runs);
#   - after a SIGINT or SIGTERM, no temporary file at all.
# At the end one run goes to completion: every output must equal the
# reference and no temporary file may be left. Prints the figures; exits
# 1 if a check failed. Not part of `go test` (it takes a minute or two).
#
# Files go to a folder under ${TMPDIR:-/tmp}, removed at the end.
set -euo pipefail
rounds=${1:-30}
nfiles=${2:-12}
root=$(cd "$(dirname "$0")/../.." && pwd)
cd "$root"
work=$(mktemp -d "${TMPDIR:-/tmp}/wavsieve-kill.XXXXXX")
trap 'rm -rf "$work"' EXIT
go build -o "$work/wavsieve" ./cmd/wavsieve
mkdir -p "$work/in"
go run ./testdata/apply/gen -o "$work/in/f01.wav" -minutes 0.5
for i in $(seq 2 "$nfiles"); do cp "$work/in/f01.wav" "$work/in/f$(printf %02d "$i").wav"; done
(cd "$work/in" && sha256sum ./*.wav) >"$work/in.sha"

spec=(--family butterworth --response highpass --order 4 --cutoff 80)
ws="$work/wavsieve"
"$ws" apply --no-progress -j 2 --zero-phase "${spec[@]}" -o "$work/ref-zp" "$work/in" 2>/dev/null
"$ws" apply --no-progress -j 2 "${spec[@]}" -o "$work/ref-causal" "$work/in" 2>/dev/null
full_start=$(date +%s%N)
"$ws" apply --no-progress -j 2 --zero-phase "${spec[@]}" -o "$work/timing" "$work/in" 2>/dev/null
full_ms=$((($(date +%s%N) - full_start) / 1000000))
rm -rf "$work/timing"

fail=0
bad() { echo "FAIL: $*"; fail=1; }
# temps DIR: the temporary files in DIR, one a line (none if DIR is missing).
temps() { find "$1" -maxdepth 1 -name '.*wavsieve-tmp-*' 2>/dev/null || true; }

out="$work/out"
kills=0 ints=0 terms=0 finished=0 checked=0 max_left=0 max_left_bytes=0 cleaned=0
for r in $(seq 1 "$rounds"); do
	# Leftovers of the previous round, which this round must clean.
	prev_left=$(temps "$out" | wc -l)
	if ((RANDOM % 2)); then mode=zp; zp=(--zero-phase); else mode=causal; zp=(); fi
	# --replace: redo every file, so that each round writes.
	"$ws" apply --no-progress --replace -j 2 "${zp[@]}" "${spec[@]}" -o "$out" "$work/in" >/dev/null 2>"$work/err" &
	pid=$!
	delay_ms=$((RANDOM % (full_ms + 200)))
	sleep "$(printf '%d.%03d' $((delay_ms / 1000)) $((delay_ms % 1000)))"
	case $((RANDOM % 4)) in
	0) sig=INT ;;
	1) sig=TERM ;;
	*) sig=KILL ;;
	esac
	if kill -s "$sig" "$pid" 2>/dev/null; then
		case $sig in KILL) kills=$((kills + 1)) ;; INT) ints=$((ints + 1)) ;; TERM) terms=$((terms + 1)) ;; esac
	else
		finished=$((finished + 1))
		sig=none
	fi
	wait "$pid" 2>/dev/null || true
	if ((prev_left > 0)) && grep -q 'temporary file left by an interrupted run' "$work/err"; then
		cleaned=$((cleaned + prev_left))
	fi
	# Inputs unchanged.
	(cd "$work/in" && sha256sum --quiet -c "$work/in.sha") || bad "round $r: an input changed"
	# Every output under its final name is the reference one.
	for f in "$out"/*.wav; do
		[ -e "$f" ] || continue
		checked=$((checked + 1))
		n=$(basename "$f")
		if ! cmp -s "$f" "$work/ref-zp/$n" && ! cmp -s "$f" "$work/ref-causal/$n"; then
			bad "round $r ($mode, $sig after ${delay_ms} ms): $n differs from both reference outputs"
		fi
	done
	left=$(temps "$out" | wc -l)
	left_bytes=$(temps "$out" | xargs -r stat -c %s | awk '{s+=$1} END {print s+0}')
	spills=$( (find "$out" "$work" -maxdepth 1 -name '*spill*' 2>/dev/null || true) | wc -l)
	((spills == 0)) || bad "round $r: $spills spill files on disk"
	if [ "$sig" = INT ] || [ "$sig" = TERM ]; then
		((left == 0)) || bad "round $r: $left temporary files after SIG$sig"
	fi
	if ((left > max_left)); then max_left=$left; fi
	if ((left_bytes > max_left_bytes)); then max_left_bytes=$left_bytes; fi
done

"$ws" apply --no-progress --replace -j 2 --zero-phase "${spec[@]}" -o "$out" "$work/in" >/dev/null 2>"$work/err" || bad "the final run failed: $(cat "$work/err")"
for f in "$work/ref-zp"/*.wav; do
	cmp -s "$f" "$out/$(basename "$f")" || bad "final run: $(basename "$f") differs from the reference"
done
final_left=$(temps "$out" | wc -l)
((final_left == 0)) || bad "$final_left temporary files after the final run"
python3 -c 'import json,sys; json.load(open(sys.argv[1]))' "$out/wavsieve-manifest.json" 2>/dev/null ||
	jq . "$out/wavsieve-manifest.json" >/dev/null 2>&1 || bad "the final record is not valid JSON"

echo "rounds: $rounds ($nfiles files of 30 s, 48 kHz 24-bit stereo; a full zero-phase run takes ${full_ms} ms)"
echo "signals: $kills SIGKILL, $ints SIGINT, $terms SIGTERM; $finished runs had ended before the signal"
echo "outputs checked after the rounds: $checked, each byte for byte a reference output"
echo "temporary files left by a round: at most $max_left ($max_left_bytes bytes); removed by the next run: $cleaned"
echo "temporary files after the final run: $final_left; spill files seen on disk: none"
if ((fail)); then
	echo "RESULT: FAILED"
	exit 1
fi
echo "RESULT: all checks passed"
