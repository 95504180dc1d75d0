#!/usr/bin/env bash
# Runs wavsieve on a real single-node Slurm cluster started for the check:
# submits samples/cluster/wavsieve-array.sbatch (an array of 4 tasks, at
# most 2 at once, each running apply --shard K/4) over generated files at
# mixed sample rates, waits for it, merges the share records with
# 'wavsieve gather', and checks that every file was done exactly once,
# that the outputs are byte-identical to a single-machine run of the same
# command, and that the merged record is complete. It also runs the
# command of samples/cluster/wavsieve-indexed-job.yaml for each index,
# and prints files per second for 1 task (the same command without
# --shard, one Slurm task) and for the array of 4 tasks.
#
# Slurm runs with munge authentication, no cgroups (proctrack/linuxproc,
# task/none), its state, logs and sockets under a temporary folder, and
# two ports of its own (from 20000). The daemons it starts are stopped at
# the end.
#
# Where slurmctld, slurmd, munged or sbatch are missing they are installed
# with apt-get when run as root (Debian's slurmctld, slurmd, munge and
# slurm-client); where that is not possible the check says so and skips.
set -euo pipefail
cd "$(dirname "$0")/../.."
repo=$(pwd)

have() { command -v slurmctld >/dev/null && command -v slurmd >/dev/null && command -v munged >/dev/null && command -v sbatch >/dev/null; }
export PATH="$PATH:/usr/sbin:/sbin"
if ! have; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    echo "slurm check: installing Debian's slurmctld, slurmd, munge and slurm-client"
    export DEBIAN_FRONTEND=noninteractive
    { apt-get install -y --no-install-recommends slurmctld slurmd munge slurm-client >/dev/null 2>&1 ||
      { apt-get update >/dev/null 2>&1 && apt-get install -y --no-install-recommends slurmctld slurmd munge slurm-client >/dev/null 2>&1; }; } || true
  fi
  if ! have; then
    echo "slurm check: skipped, Slurm (slurmctld, slurmd, munge, slurm-client) is not installed and could not be installed here"
    exit 0
  fi
fi

work=$(mktemp -d /tmp/wavsieve-slurm.XXXXXX)
chmod 755 "$work"
pids=()
stop() {
  for p in "${pids[@]}"; do kill "$p" 2>/dev/null || true; done
  for p in "${pids[@]}"; do
    for _ in $(seq 50); do kill -0 "$p" 2>/dev/null || break; sleep 0.1; done
    kill -9 "$p" 2>/dev/null || true
  done
  rm -rf "$work"
}
trap stop EXIT
trap "exit 130" INT TERM

go build -o "$work/bin/wavsieve" ./cmd/wavsieve
export PATH="$work/bin:$PATH"

# munge: its own key, socket and state, run as the user of the check.
mkdir -p "$work/munge"
chmod 700 "$work/munge"
dd if=/dev/urandom of="$work/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$work/munge/munge.key"
munged --force --socket="$work/munge/munge.socket" --key-file="$work/munge/munge.key" \
  --pid-file="$work/munge/munged.pid" --log-file="$work/munge/munged.log" --seed-file="$work/munge/munged.seed"
for _ in $(seq 50); do [ -s "$work/munge/munged.pid" ] && break; sleep 0.1; done
pids+=("$(cat "$work/munge/munged.pid")")

host=$(hostname -s)
# Ports of its own, so that a Slurm already running here is not disturbed.
port=$((20000 + $$ % 10000 * 2))
user=$(id -un)
mkdir -p "$work/slurm/state" "$work/slurm/spool"
cat >"$work/slurm/slurm.conf" <<CONF
ClusterName=wavsieve-check
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$port
SlurmdPort=$((port + 1))
SlurmUser=$user
SlurmdUser=$user
AuthType=auth/munge
AuthInfo=socket=$work/munge/munge.socket
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/backfill
SchedulerParameters=sched_interval=1,bf_interval=1
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
ReturnToService=2
MinJobAge=10
StateSaveLocation=$work/slurm/state
SlurmdSpoolDir=$work/slurm/spool
SlurmctldPidFile=$work/slurm/slurmctld.pid
SlurmdPidFile=$work/slurm/slurmd.pid
SlurmctldLogFile=$work/slurm/slurmctld.log
SlurmdLogFile=$work/slurm/slurmd.log
NodeName=$host NodeAddr=127.0.0.1 CPUs=2 State=UNKNOWN
PartitionName=check Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF="$work/slurm/slurm.conf"
slurmctld -i
for _ in $(seq 100); do [ -s "$work/slurm/slurmctld.pid" ] && break; sleep 0.1; done
pids+=("$(cat "$work/slurm/slurmctld.pid")")
slurmd
for _ in $(seq 100); do [ -s "$work/slurm/slurmd.pid" ] && break; sleep 0.1; done
pids+=("$(cat "$work/slurm/slurmd.pid")")
up=no
for _ in $(seq 150); do
  if sinfo -h -o '%t' 2>/dev/null | grep -Eq '^idle'; then up=yes; break; fi
  sleep 0.2
done
if [ $up != yes ]; then
  echo "slurm check: FAIL, the single-node cluster did not come up; its logs:" >&2
  tail -20 "$work/slurm/slurmctld.log" "$work/slurm/slurmd.log" >&2 || true
  exit 1
fi
echo "slurm check: a single-node Slurm ($(sinfo -V)) is up with $(sinfo -h -o %c) CPUs"

calc() { awk "BEGIN { print $* }"; }
fail=0
check() { if eval "$2"; then echo "ok    $1"; else echo "FAIL  $1"; fail=1; fi; }

# The archive: files at mixed rates in two folders; the same archive for
# each run (hard links: wavsieve never writes its inputs). Every file holds
# the same number of frames (80 s at 48 kHz), so the four shares, cut by
# count, are equal work and the speed-up shows the scheduler, not a share
# that drew the 96 kHz files.
n=24
go run ./testdata/cluster/gen -dir "$work/archive" -n $n -frames 3840000
digest() { (cd "$work/archive" && find . -type f | sort | xargs sha256sum | sha256sum); }
inputs0=$(digest)
job="$repo/samples/cluster/wavsieve-array.sbatch"

# sbatch runs the script as printed, from a folder holding archive/ and
# the spec; it waits for the array and prints the seconds it took, from
# submission to the end of its last task.
submit() { # folder, extra sbatch flags...
  local dir=$1; shift
  mkdir -p "$dir"
  cp -rl "$work/archive" "$dir/archive"
  cp samples/specs/rumble-and-hum.json "$dir/"
  local t0 t1 id
  t0=$(date +%s.%N)
  if [ "${1:-}" != --wrap ]; then set -- "$@" "$job"; fi
  id=$(cd "$dir" && sbatch --parsable "$@")
  id=${id%%;*}
  # Until no task of the array is pending or running (sbatch --wait
  # polls too seldom to time it).
  # Each poll notes the time and the tasks running, for the timeline.
  local most=0 now q
  : >"$dir/timeline"
  while q=$(squeue -h -j "$id" -o '%K %t' 2>/dev/null) && [ -n "$q" ]; do
    now=$(grep -c ' R$' <<<"$q" || true)
    [ "$now" -gt "$most" ] && most=$now
    grep ' R$' <<<"$q" | sed "s/^/$(calc "$(date +%s.%N) - $t0") /" >>"$dir/timeline" || true
    sleep 0.1
  done
  t1=$(date +%s.%N)
  echo "$(calc "$t1 - $t0") $most"
}
# timeline folder: when each task was first and last seen running, in
# seconds from submission.
timeline() {
  awk '{ k = ($2 == "N/A") ? "" : " " $2; if (!(k in a)) { a[k] = $1; o[++n] = k } b[k] = $1 }
    END { for (i = 1; i <= n; i++) { sep = (i > 1) ? "; " : ""; printf "%stask%s ran %.1f-%.1f s", sep, o[i], a[o[i]], b[o[i]] } print "" }' "$1/timeline"
}
load0=$(cut -d' ' -f1 /proc/loadavg)
read -r s4 most4 < <(submit "$work/four")
# One task doing all the files: the script's command without --shard.
read -r s1 most1 < <(submit "$work/one" --wrap "wavsieve apply --spec rumble-and-hum.json --zero-phase --recursive --workers 1 --dither-seed 7 --no-progress --output out/archive archive")
load1=$(cut -d' ' -f1 /proc/loadavg)
check "the %2 limit held: at most $most4 of the 4 tasks ran at once, and 2 did" "[ $most4 = 2 ]"

# The same command on one machine, no shares.
mkdir -p "$work/single"
cp -rl "$work/archive" "$work/single/archive"
cp samples/specs/rumble-and-hum.json "$work/single/"
(cd "$work/single" && wavsieve apply --spec rumble-and-hum.json --zero-phase --recursive --workers 1 --dither-seed 7 --no-progress --output out/archive archive 2>/dev/null)

records=$(ls "$work/four/out/archive"/wavsieve-manifest.*-of-4.json 2>/dev/null | wc -l)
check "4 array tasks wrote 4 share records" "[ $records = 4 ]"
gather_rc=0
(cd "$work/four" && wavsieve gather --json out/archive >gather.json 2>gather.err) || gather_rc=$?
check "gather exits 0: every input done exactly once ($(head -1 "$work/four/gather.err"))" "[ $gather_rc = 0 ]"
check "gather --json: no missing, no failed, shares 4 of 4" \
  "grep -q '\"missing\": \[\]' '$work/four/gather.json' && grep -q '\"failed\": \[\]' '$work/four/gather.json' && [ \$(tr -d ' \n' <'$work/four/gather.json' | grep -o '\"shares\":{\"total\":4,\"found\":\[1,2,3,4\]}' | wc -l) = 1 ]"
rows=$(tail -n +2 "$work/four/out/archive/wavsieve-manifest.csv" | grep -c ',done,' || true)
check "the merged record holds $n rows done ($rows)" "[ $rows = $n ]"
outs=$(cd "$work/four/out/archive" && find . -name '*.wav' | wc -l)
check "$n outputs, one per input ($outs)" "[ $outs = $n ]"
differ=0
while IFS= read -r f; do
  cmp -s "$work/four/out/archive/$f" "$work/single/out/archive/$f" || { echo "  differs: $f"; differ=$((differ + 1)); }
done < <(cd "$work/single/out/archive" && find . -name '*.wav')
check "the outputs of the 4 tasks are byte-identical to one machine's" "[ $differ = 0 ]"
one_diff=$(diff -rq -x 'wavsieve-manifest*' -x '.wavsieve*' "$work/one/out/archive" "$work/single/out/archive" | wc -l)
check "the 1-task job gives the same outputs" "[ $one_diff = 0 ]"

# A lost task: remove share 3's record and outputs, gather says what to
# redo; running what it prints completes the run.
(
  cd "$work/four/out/archive"
  for f in $(grep -o '"output": "[^"]*"' wavsieve-manifest.3-of-4.json | cut -d'"' -f4); do rm -f "$work/four/$f"; done
  rm -f wavsieve-manifest.3-of-4.json wavsieve-manifest.json wavsieve-manifest.csv
)
lost_rc=0
(cd "$work/four" && wavsieve gather out/archive >lost.txt 2>&1) || lost_rc=$?
sed 's/^/  | /' "$work/four/lost.txt"
check "with share 3 lost, gather exits 1 and prints the command for share 3" "[ $lost_rc = 1 ] && grep -Eq '^  cd .* && .*--shard 3/4' '$work/four/lost.txt' && grep -q 'array=2 ' '$work/four/lost.txt'"
# Resubmit the array index it names, as the README says.
idx=$(grep -o 'array=[0-9,]*' "$work/four/lost.txt" | cut -d= -f2)
id=$(cd "$work/four" && sbatch --parsable --array="$idx" "$job")
while squeue -h -j "${id%%;*}" 2>/dev/null | grep -q .; do sleep 0.1; done
(cd "$work/four" && wavsieve gather out/archive >/dev/null 2>&1) && redone=yes || redone=no
check "resubmitting array index $idx completes the run" "[ $redone = yes ]"
differ=0
while IFS= read -r f; do
  cmp -s "$work/four/out/archive/$f" "$work/single/out/archive/$f" || differ=$((differ + 1))
done < <(cd "$work/single/out/archive" && find . -name '*.wav')
check "and the outputs are still those of one machine" "[ $differ = 0 ]"

# The Kubernetes indexed Job's command, as printed, for each index.
kcmd=$(grep -o '"sh", "-c", "[^"]*"' samples/cluster/wavsieve-indexed-job.yaml | sed 's/^"sh", "-c", "//; s/"$//')
mkdir -p "$work/k8s"
cp -rl "$work/archive" "$work/k8s/archive"
cp samples/specs/rumble-and-hum.json "$work/k8s/"
for i in 0 1 2 3; do (cd "$work/k8s" && JOB_COMPLETION_INDEX=$i sh -c "$kcmd" 2>/dev/null) || true; done
(cd "$work/k8s" && wavsieve gather out/archive >/dev/null 2>&1) && k8s=yes || k8s=no
kdiff=$(diff -rq -x 'wavsieve-manifest*' -x '.wavsieve*' "$work/k8s/out/archive" "$work/single/out/archive" | wc -l)
check "the indexed Job's command for indexes 0-3 gives the single run's outputs" "[ $k8s = yes ] && [ $kdiff = 0 ]"

# The README prints the job script and the Job manifest as they are here:
# the fenced block after the line that names each file.
block() { awk -v name="\`$1\`" 'index($0, name) && /:$/ { f = 1; next } f == 1 && /^```/ { f = 2; next } f == 2 && /^```$/ { exit } f == 2 { print }' README.md; }
check "README prints samples/cluster/wavsieve-array.sbatch as it is" "diff <(block samples/cluster/wavsieve-array.sbatch) '$job' >/dev/null"
check "README prints samples/cluster/wavsieve-indexed-job.yaml as it is" "diff <(block samples/cluster/wavsieve-indexed-job.yaml) samples/cluster/wavsieve-indexed-job.yaml >/dev/null"

check "the inputs are unchanged" "[ \"\$(digest)\" = \"\$inputs0\" ]"

fps1=$(calc "$n / $s1")
fps4=$(calc "$n / $s4")
printf 'slurm check: %d files of 3840000 frames each (40-480 s) at 8-96 kHz, zero-phase rumble-and-hum\n' $n
printf 'slurm check: 1 task:  %.1f s, %.2f files/s\n' "$s1" "$fps1"
printf 'slurm check: 4 tasks (%%2 at once): %.1f s, %.2f files/s (%.2fx)\n' "$s4" "$fps4" "$(calc "$fps4 / $fps1")"
echo "slurm check: 1 task:  $(timeline "$work/one") (from submission)"
echo "slurm check: 4 tasks: $(timeline "$work/four")"
printf 'slurm check: (wall time from sbatch to the array'"'"'s end, Slurm'"'"'s scheduling included, on %d cores; load average %s before, %s after)\n' "$(nproc)" "$load0" "$load1"
if [ $fail = 0 ]; then
  echo "slurm check: all passed; the daemons it started are stopped"
else
  echo "slurm check: failed"
  exit 1
fi
