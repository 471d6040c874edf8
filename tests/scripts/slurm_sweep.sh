#!/usr/bin/env bash
# A sweep as a Slurm job array on a single-node cluster started here: the
# generated scripts are submitted as written, the array runs the shards, the
# dependent merge job combines them, and the merged CSV equals the same sweep
# run locally (every column but json_path). All daemon state lives under one
# mktemp folder; every daemon started here is stopped by its PID on exit.
# Prints "SKIP: ..." and exits 0 only where Slurm cannot be installed.
# $1 = tritsim binary, $2 = source dir. Recipe: the comments below (common practice for a test-local cluster).
set -euo pipefail
TRITSIM=$(readlink -f "$1")
SRC=$(readlink -f "$2")
POLL_TIMEOUT_S=300

need() { command -v slurmctld && command -v slurmd && command -v sbatch && command -v squeue &&
  command -v munged && command -v mungekey; } >/dev/null 2>&1
if ! need; then
  if [ "$(id -u)" -ne 0 ] || ! "$SRC/scripts/setup" >/dev/null 2>&1 || ! need; then
    echo "SKIP: Slurm (slurmctld slurmd slurm-client munge) is not installed and cannot be"
    echo "      installed here (scripts/setup needs root and apt); job-array test not run"
    exit 0
  fi
fi

R=$(mktemp -d /tmp/tritsim-slurm-XXXXXX)
chmod 755 "$R"  # munged needs execute permission on every folder above its socket
stop_pid_file() {  # stop_pid_file FILE: kill the PID in FILE and wait until it is gone
  [ -s "$1" ] || return 0
  local pid
  pid=$(cat "$1")
  kill "$pid" 2>/dev/null || return 0
  for _ in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || return 0; sleep 0.1; done
  kill -9 "$pid" 2>/dev/null || true
}
cleanup() {
  stop_pid_file "$R/slurm/slurmd.pid"
  stop_pid_file "$R/slurm/slurmctld.pid"
  stop_pid_file "$R/munge/munged.pid"
  rm -rf "$R"
}
trap cleanup EXIT
fail() {
  echo "FAIL: $*" >&2
  for f in "$R"/slurm/log/*.log "$R"/jobs/logs/*; do [ -f "$f" ] && { echo "== $f"; tail -20 "$f"; }; done >&2
  exit 1
}

# MUNGE, with its socket under $R (mode 755: 700 gives "Socket is inaccessible").
mkdir -p "$R/munge" "$R/slurm/state" "$R/slurm/spool" "$R/slurm/log"
chmod 755 "$R/munge"
mungekey --create --keyfile="$R/munge/munge.key"
munged --key-file="$R/munge/munge.key" --socket="$R/munge/munge.socket" \
  --pid-file="$R/munge/munged.pid" --log-file="$R/munge/munged.log" \
  --seed-file="$R/munge/munged.seed"

# Ports chosen per run so two copies of this test do not meet.
CTLD_PORT=$((20000 + RANDOM % 20000))
SLURMD_PORT=$((CTLD_PORT + 1))
cat > "$R/slurm/slurm.conf" <<CONF
ClusterName=tritsimtest
SlurmctldHost=localhost
SlurmctldPort=$CTLD_PORT
SlurmdPort=$SLURMD_PORT
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$R/munge/munge.socket
StateSaveLocation=$R/slurm/state
SlurmdSpoolDir=$R/slurm/spool
SlurmctldPidFile=$R/slurm/slurmctld.pid
SlurmdPidFile=$R/slurm/slurmd.pid
SlurmctldLogFile=$R/slurm/log/slurmctld.log
SlurmdLogFile=$R/slurm/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
MpiDefault=none
SwitchType=switch/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
MailProg=/bin/true
SlurmdParameters=config_overrides
NodeName=localhost CPUs=8 RealMemory=20000 State=UNKNOWN
PartitionName=debug Nodes=localhost Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF=$R/slurm/slurm.conf
slurmctld -f "$SLURM_CONF"
slurmd -f "$SLURM_CONF" -N localhost
for _ in $(seq 1 300); do
  [ "$(sinfo -h -o %T 2>/dev/null | head -1)" = "idle" ] && break
  sleep 0.1
done
[ "$(sinfo -h -o %T 2>/dev/null | head -1)" = "idle" ] || fail "the node never became idle"

# A small sweep: 12 points of a 2-layer Wren-0.7B decode step, 3 array tasks.
cat > "$R/small.yaml" <<YAML
name: slurm-small
base:
  model: $SRC/models/wren-0.7b.yaml
  workload: {decode: 1}
axes:
  arch.array.trees: [32, 64, 128]
  workload.batch: [1, 4, 16, 64]
  model.layers: [2]
YAML
"$TRITSIM" sweep "$R/small.yaml" --slurm "$R/jobs" --tasks 3 --partition debug \
  --time-limit 00:10:00 > /dev/null
grep -qF "TRITSIM='$TRITSIM'" "$R/jobs/sweep.sbatch" || fail "scripts do not name $TRITSIM"
"$R/jobs/submit.sh" > "$R/submitted" || fail "submit.sh failed: $(cat "$R/submitted")"
echo "submitted: $(cat "$R/submitted")"

start=$(date +%s)
while [ -n "$(squeue -h 2>/dev/null)" ]; do
  [ $(( $(date +%s) - start )) -lt "$POLL_TIMEOUT_S" ] || fail "jobs still queued after ${POLL_TIMEOUT_S}s: $(squeue)"
  sleep 1
done
echo "jobs done in $(( $(date +%s) - start )) s"
[ -s "$R/jobs/sweep.csv" ] || fail "the merge job wrote no sweep.csv"
for i in 0 1 2; do [ -s "$R/jobs/shard-$i.csv" ] || fail "no shard-$i.csv"; done

"$TRITSIM" sweep "$R/small.yaml" --out "$R/local.csv" --jobs 2 -q
/usr/bin/python3 - "$R/jobs/sweep.csv" "$R/local.csv" <<'PY'
import csv, sys
def rows(path):
    with open(path, newline="") as f:
        r = list(csv.reader(f))
    header, body = r[0], r[1:]
    keep = [i for i, h in enumerate(header) if h != "json_path"]
    return [header[i] for i in keep], {row[0]: [row[i] for i in keep] for row in body}
h1, merged = rows(sys.argv[1])
h2, local = rows(sys.argv[2])
assert h1 == h2, "headers differ"
assert len(merged) == 12, f"merged CSV has {len(merged)} points"
assert merged == local, "merged job-array result differs from the local sweep"
status = h1.index("status")
assert all(r[status] == "ok" for r in merged.values()), "a point failed on Slurm"
print("ok: Slurm job array + merge equals the local sweep (12 points, all metric columns)")
PY
