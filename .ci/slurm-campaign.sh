#!/usr/bin/env bash
# Runs a small campaign on a real single-node Slurm (recipe:
# ../shared/reference/slurm-single-node.md) as an sbatch array of 3 shards
# plus a dependent merge, and checks that its efficiency.csv is
# byte-identical to a single-process run of the same campaign. Also kills
# a shard mid-way and checks that the rerun completes it identically.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$PWD
export DEBIAN_FRONTEND=noninteractive
if ! command -v slurmctld >/dev/null || ! command -v munged >/dev/null; then
	apt-get -o DPkg::Lock::Timeout=600 update -qq
	apt-get -o DPkg::Lock::Timeout=600 install -y -qq --no-install-recommends slurm-wlm munge >/dev/null
fi

RUN=$(mktemp -d /tmp/wallcross-slurm.XXXXXX)
chmod 0755 "$RUN"
install -d -o slurm -g slurm "$RUN/ctld" "$RUN/log"
install -d "$RUN/d"
install -d -o munge -g munge -m 0755 /run/munge
install -d -o munge -g munge -m 0700 /etc/munge
[ -s /etc/munge/munge.key ] || { mungekey --create --force; chown munge:munge /etc/munge/munge.key; chmod 0400 /etc/munge/munge.key; }
mkdir -p /etc/slurm
cat > /etc/slurm/slurm.conf <<CONF
ClusterName=ci
SlurmctldHost=localhost
SlurmUser=slurm
AuthType=auth/munge
StateSaveLocation=$RUN/ctld
SlurmdSpoolDir=$RUN/d
SlurmctldPidFile=$RUN/slurmctld.pid
SlurmdPidFile=$RUN/slurmd.pid
SlurmctldLogFile=$RUN/log/slurmctld.log
SlurmdLogFile=$RUN/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
MpiDefault=none
NodeName=localhost NodeAddr=127.0.0.1 CPUs=$(nproc) RealMemory=1000 State=UNKNOWN
PartitionName=debug Nodes=localhost Default=YES MaxTime=INFINITE State=UP
CONF

PIDS=()
stop() {
	local p
	for p in "${PIDS[@]}"; do kill "$p" 2>/dev/null || true; done
	for p in "${PIDS[@]}"; do
		for _ in $(seq 1 20); do kill -0 "$p" 2>/dev/null || break; sleep 0.5; done
	done
}
trap stop EXIT
setpriv --reuid=munge --regid=munge --init-groups /usr/sbin/munged -F >"$RUN/log/munged.log" 2>&1 &
PIDS+=($!)
for _ in $(seq 1 20); do munge -n 2>/dev/null | unmunge >/dev/null 2>&1 && break; sleep 0.25; done
/usr/sbin/slurmctld -D >/dev/null 2>&1 &
PIDS+=($!)
/usr/sbin/slurmd -D -N localhost >/dev/null 2>&1 &
PIDS+=($!)
up=0
for _ in $(seq 1 30); do timeout 5 sinfo -h -o %T 2>/dev/null | grep -qx idle && { up=1; break; }; sleep 1; done
[ "$up" = 1 ] || { echo "slurm: did not come up"; tail -n 20 "$RUN"/log/*.log; exit 1; }
echo "slurm: node idle"

BIN="$RUN/wallcross"
go build -o "$BIN" ./cmd/wallcross
CAMP="$ROOT/testdata/campaign/ci-campaign.yaml"

echo "slurm: single-process run"
"$BIN" campaign "$CAMP" --out "$RUN/single" --workers 2 >"$RUN/single.log" 2>&1 || { cat "$RUN/single.log"; exit 1; }

echo "slurm: sbatch array of 3 shards + dependent merge"
chmod 0777 "$RUN"
JID=$(sbatch --parsable --array=0-2 --output="$RUN/log/task_%A_%a.out" \
	--wrap "'$BIN' campaign '$CAMP' --out '$RUN/sharded' --workers 1")
MID=$(sbatch --parsable --dependency=afterok:"$JID" --output="$RUN/log/merge.out" \
	--wrap "'$BIN' merge '$RUN/sharded'")
deadline=$((SECONDS + 900))
while squeue -h -j "$JID,$MID" 2>/dev/null | grep -q .; do
	if ((SECONDS > deadline)); then
		echo "slurm: jobs still queued after 15 min"; squeue; scancel "$JID" "$MID" || true; exit 1
	fi
	if squeue -h -j "$MID" -o %r 2>/dev/null | grep -q DependencyNeverSatisfied; then
		echo "slurm: a shard failed"; cat "$RUN"/log/task_*.out; scancel "$MID" || true; exit 1
	fi
	sleep 1
done
cat "$RUN/log/merge.out"
[ -s "$RUN/sharded/efficiency.csv" ] || { echo "slurm: merge wrote no efficiency.csv"; cat "$RUN"/log/*.out; exit 1; }
if ! cmp "$RUN/single/efficiency.csv" "$RUN/sharded/efficiency.csv"; then
	echo "slurm: sharded efficiency.csv differs from the single-process run"
	diff "$RUN/single/efficiency.csv" "$RUN/sharded/efficiency.csv" || true
	exit 1
fi
echo "slurm: 3-shard array + merge == single process (efficiency.csv byte-identical)"

echo "slurm: kill a shard mid-way, rerun it"
"$BIN" campaign "$CAMP" --out "$RUN/killed" --shard 0/3 --workers 1 >/dev/null 2>&1 &
kp=$!
for _ in $(seq 1 100); do
	j="$RUN/killed/shard-0000-of-0003/journal.csv"
	[ -f "$j" ] && [ "$(wc -l <"$j")" -ge 4 ] && break
	sleep 0.1
done
kill -9 "$kp" 2>/dev/null || true
wait "$kp" 2>/dev/null || true
if [ -f "$RUN/killed/shard-0000-of-0003/manifest.json" ]; then
	echo "slurm: note: shard 0 finished before it could be killed"
fi
for i in 0 1 2; do "$BIN" campaign "$CAMP" --out "$RUN/killed" --shard "$i/3" --workers 1 >/dev/null 2>"$RUN/log/resume-$i.err" || { cat "$RUN/log/resume-$i.err"; exit 1; }; done
grep -h "trials (" "$RUN/log/resume-0.err" | head -1 || true
"$BIN" merge "$RUN/killed" >/dev/null
cmp "$RUN/single/efficiency.csv" "$RUN/killed/efficiency.csv"
echo "slurm: killed and resumed shard == single process"
