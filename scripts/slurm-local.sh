#!/usr/bin/env bash
# A single-node Slurm cluster for the tests of rungs's scheduler support (src/scheduler/): munged, slurmctld and slurmd
# started by hand as root, without systemd, all their files in one folder; nothing under /etc or /run is touched.
#
#   scripts/slurm-local.sh start    write the configuration, start the daemons, wait until the node takes jobs
#   scripts/slurm-local.sh stop     stop the daemons (the folder stays, for its logs)
#   scripts/slurm-local.sh status   exit 0 when the cluster answers
#   scripts/slurm-local.sh env      print SLURM_CONF=… for the client commands (sbatch, scontrol, scancel)
#
# The folder is RUNGS_SLURM_DIR (default /tmp/rungs-slurm); ports RUNGS_SLURM_PORT and the next one (default 6917).
# Client commands find this cluster through SLURM_CONF=<folder>/slurm.conf.
#
# Choices (Slurm 22.05, Debian 12; common practice, no source): batch_sched_delay=0 so that a job starts within about
# a second of sbatch; MinJobAge=3600 so that scontrol still shows a finished job (there is no slurmdbd, hence no sacct);
# no cgroups (proctrack/linuxproc, task/none, no accounting gatherer), so --mem is not enforced; memory and CPUs are
# consumable (CR_Core_Memory, 256 MB per CPU unless a job asks), so a request beyond the node is refused at submission.
set -euo pipefail

DIR="${RUNGS_SLURM_DIR:-/tmp/rungs-slurm}"
PORT="${RUNGS_SLURM_PORT:-6917}"
CONF="$DIR/slurm.conf"
SOCKET="$DIR/munge/munge.socket"
export SLURM_CONF="$CONF"

answers() { timeout 10 scontrol ping 2>/dev/null | grep -q 'is UP'; }

node_ready() {
  local state
  state="$(timeout 10 sinfo -h -N -o '%T' 2>/dev/null | head -n 1 || true)"
  [ "$state" = idle ] || [ "$state" = mixed ] || [ "$state" = allocated ]
}

stop_pidfile() {
  local file="$1"
  [ -f "$file" ] || return 0
  local pid
  pid="$(cat "$file" 2>/dev/null || true)"
  if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
    kill "$pid" 2>/dev/null || true
    for _ in $(seq 1 100); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -9 "$pid" 2>/dev/null || true
  fi
  rm -f "$file"
}

start() {
  for cmd in munged slurmctld slurmd scontrol sinfo; do
    command -v "$cmd" >/dev/null 2>&1 || { echo "slurm-local: $cmd not found; install Debian's slurm-wlm and munge" >&2; exit 3; }
  done
  if [ -f "$CONF" ] && answers && node_ready; then echo "slurm-local: already running ($CONF)"; return 0; fi
  [ "$(id -u)" = 0 ] || { echo "slurm-local: the daemons are started as root (SlurmUser=root)" >&2; exit 3; }
  stop_daemons
  mkdir -p "$DIR/munge" "$DIR/state" "$DIR/spool" "$DIR/log"
  chmod 700 "$DIR" "$DIR/munge"
  [ -f "$DIR/munge/munge.key" ] || { dd if=/dev/urandom of="$DIR/munge/munge.key" bs=1024 count=1 status=none; chmod 400 "$DIR/munge/munge.key"; }
  munged --force --key-file="$DIR/munge/munge.key" --socket="$SOCKET" --pid-file="$DIR/munge/munged.pid" \
    --log-file="$DIR/log/munged.log" --seed-file="$DIR/munge/munged.seed" 9>&-

  local host cpus mem
  host="$(hostname -s)"
  cpus="$(nproc)"
  # The memory the node offers jobs: 2 GiB, or less on a smaller machine (slurmd refuses a node with less than declared).
  mem="$(awk '/MemTotal/ { print int($2 / 1024 * 0.8) }' /proc/meminfo)"
  [ "$mem" -gt 2048 ] && mem=2048
  cat > "$CONF" <<EOF
# Written by scripts/slurm-local.sh: a single-node cluster for tests.
ClusterName=rungs-test
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$PORT
SlurmdPort=$((PORT + 1))
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$SOCKET
StateSaveLocation=$DIR/state
SlurmdSpoolDir=$DIR/spool/slurmd-%n
SlurmctldPidFile=$DIR/slurmctld.pid
SlurmdPidFile=$DIR/slurmd.pid
SlurmctldLogFile=$DIR/log/slurmctld.log
SlurmdLogFile=$DIR/log/slurmd.log
SlurmctldDebug=info
SlurmdDebug=info
SchedulerType=sched/backfill
SchedulerParameters=batch_sched_delay=0
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
DefMemPerCPU=256
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
MpiDefault=none
ReturnToService=2
MinJobAge=3600
KillWait=5
InactiveLimit=0
Waittime=0
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
  # The daemons must not inherit the lock (fd 9), or they would hold it for as long as they run.
  slurmctld -f "$CONF" 9>&-
  slurmd -f "$CONF" 9>&-
  for _ in $(seq 1 300); do
    if answers && node_ready; then echo "slurm-local: up ($CONF)"; return 0; fi
    sleep 0.2
  done
  echo "slurm-local: the node did not become idle within 60 s; logs in $DIR/log" >&2
  tail -n 20 "$DIR/log/slurmctld.log" "$DIR/log/slurmd.log" >&2 || true
  exit 1
}

stop_daemons() {
  stop_pidfile "$DIR/slurmd.pid"
  stop_pidfile "$DIR/slurmctld.pid"
  stop_pidfile "$DIR/munge/munged.pid"
}

# One start or stop at a time (test files may ask for the cluster together).
mkdir -p "$(dirname "$DIR")"
exec 9>"$DIR.lock"
flock 9

case "${1:-}" in
  start) start ;;
  stop) stop_daemons; echo "slurm-local: stopped" ;;
  status) answers && node_ready ;;
  env) echo "SLURM_CONF=$CONF" ;;
  *) echo "usage: $0 start | stop | status | env" >&2; exit 2 ;;
esac
