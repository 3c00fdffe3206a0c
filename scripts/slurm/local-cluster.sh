#!/usr/bin/env bash
# A private one-node Slurm cluster on this machine, for tests and for trying the array job:
# its own munge daemon (own key and socket), slurmctld and slurmd, all configured under DIR
# and on their own ports, so nothing in /etc is touched. Needs Debian's slurm-wlm and munge
# (scripts/install-farm-tools.sh installs them) and root, since slurmd starts jobs.
#
#   local-cluster.sh start DIR   # writes DIR/slurm.conf, starts the daemons, waits for the node
#   local-cluster.sh stop DIR    # stops the daemons started by `start`
#
# After `start`, commands find the cluster with SLURM_CONF=DIR/slurm.conf. `start` exits
# non-zero with the reason (and the daemons' log tails) when the cluster does not come up.
set -euo pipefail
cmd=${1:-} dir=${2:-}
if [ -z "$cmd" ] || [ -z "$dir" ]; then
  echo "usage: $0 start|stop DIR" >&2
  exit 2
fi
mkdir -p "$dir"
dir=$(cd "$dir" && pwd)
conf="$dir/slurm.conf"

stop() {
  for pidfile in "$dir/slurmd.pid" "$dir/slurmctld.pid" "$dir/munge/munged.pid"; do
    if [ -f "$pidfile" ]; then
      pid=$(cat "$pidfile")
      kill "$pid" 2>/dev/null || true
      for _ in $(seq 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
      rm -f "$pidfile"
    fi
  done
}

die() {
  echo "local-cluster: $*" >&2
  for log in "$dir/munge/munged.log" "$dir/slurmctld.log" "$dir/slurmd.log"; do
    if [ -f "$log" ]; then
      echo "--- last lines of $log ---" >&2
      tail -n 15 "$log" >&2
    fi
  done
  stop
  exit 1
}

if [ "$cmd" = stop ]; then
  stop
  exit 0
fi
[ "$cmd" = start ] || { echo "unknown command $cmd (start or stop)" >&2; exit 2; }
[ "$(id -u)" = 0 ] || die "must run as root (slurmd starts jobs as their users)"
for tool in munged slurmctld slurmd sbatch sinfo; do
  command -v "$tool" >/dev/null || die "$tool not found; install slurm-wlm and munge (bash scripts/install-farm-tools.sh)"
done
stop
mkdir -p "$dir/munge" "$dir/state" "$dir/spool"
chmod 700 "$dir/munge"
# A fresh key for this cluster only.
dd if=/dev/urandom of="$dir/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$dir/munge/munge.key"
munged --force --socket="$dir/munge/munge.socket" --key-file="$dir/munge/munge.key" \
  --pid-file="$dir/munge/munged.pid" --log-file="$dir/munge/munged.log" \
  --seed-file="$dir/munge/munged.seed" || die "munged did not start"

host=$(hostname -s)
cpus=$(nproc)
# Ports from the environment or defaults away from Slurm's usual 6817/6818.
ctld_port=${SLURMCTLD_PORT:-16817}
slurmd_port=${SLURMD_PORT:-16818}
cat > "$conf" <<CONF
ClusterName=arithvec-local
SlurmctldHost=$host
SlurmUser=root
SlurmdUser=root
SlurmctldPort=$ctld_port
SlurmdPort=$slurmd_port
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$dir/munge/munge.socket
StateSaveLocation=$dir/state
SlurmdSpoolDir=$dir/spool
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/slurmctld.log
SlurmdLogFile=$dir/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
MpiDefault=none
ReturnToService=2
SlurmctldTimeout=30
SlurmdTimeout=30
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus State=UNKNOWN
PartitionName=local Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
cat > "$dir/cgroup.conf" <<CONF
CgroupPlugin=autodetect
IgnoreSystemd=yes
CONF
export SLURM_CONF="$conf"
slurmctld -c -i || die "slurmctld did not start"
slurmd -c || die "slurmd did not start"
# Wait (bounded) for the node to be idle.
for _ in $(seq 60); do
  state=$(sinfo -h -N -o '%t' 2>/dev/null | head -n 1 || true)
  case "$state" in
    idle*|mix*|alloc*) echo "local-cluster: node $host $state; SLURM_CONF=$conf"; exit 0 ;;
  esac
  sleep 0.5
done
die "the node did not become idle within 30 s (state: ${state:-none})"
