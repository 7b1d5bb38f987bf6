#!/usr/bin/env bash
# A private single-node Slurm for tests and the bench (start|stop|status|env): munged, slurmctld and
# slurmd from Debian's packages, on loopback ports, with every file under .data/slurm/ (munge
# socket and key, state, spool, logs, pid files). Ports: QUORUM_SLURM_CTLD_PORT (6917) and
# QUORUM_SLURM_NODE_PORT (6918). Run as root (the daemons run as root; SlurmUser=root).
# `env` prints `export SLURM_CONF=…` for sbatch/squeue/scancel of this cluster.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT="$PWD/.data/slurm"
CONF="$ROOT/slurm.conf"
CTLD_PORT="${QUORUM_SLURM_CTLD_PORT:-6917}"
NODE_PORT="${QUORUM_SLURM_NODE_PORT:-6918}"
HOST="$(hostname -s)"

pid_alive() { [ -f "$1" ] && kill -0 "$(cat "$1")" 2>/dev/null; }

ensure_packages() {
  command -v slurmctld >/dev/null 2>&1 && command -v slurmd >/dev/null 2>&1 && command -v sbatch >/dev/null 2>&1 && command -v munged >/dev/null 2>&1 && return 0
  if [ "$(id -u)" -ne 0 ]; then
    echo "Slurm is not installed. As root, run: apt-get update && apt-get install -y --no-install-recommends slurmctld slurmd slurm-client munge" >&2
    return 4
  fi
  echo "installing Debian packages: slurmctld slurmd slurm-client munge"
  apt-get update -q >/dev/null && DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends slurmctld slurmd slurm-client munge >/dev/null
}

write_conf() {
  mkdir -p "$ROOT/munge" "$ROOT/state" "$ROOT/spool" "$ROOT/log"
  chmod 700 "$ROOT/munge"
  [ -f "$ROOT/munge/munge.key" ] || { head -c 128 /dev/urandom > "$ROOT/munge/munge.key"; chmod 400 "$ROOT/munge/munge.key"; }
  local mem
  mem=$(awk '/MemTotal/ { printf "%d", $2 / 1024 * 0.8 }' /proc/meminfo)
  local cpus
  cpus=$(nproc)
  cat > "$CONF" <<CONF
# written by scripts/slurm.sh: a private single-node cluster for Quorum's tests
ClusterName=quorumtest
SlurmctldHost=$HOST(127.0.0.1)
SlurmctldPort=$CTLD_PORT
SlurmdPort=$NODE_PORT
SlurmUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$ROOT/munge/munge.socket
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
DefMemPerCPU=1000
StateSaveLocation=$ROOT/state
SlurmdSpoolDir=$ROOT/spool
SlurmctldPidFile=$ROOT/slurmctld.pid
SlurmdPidFile=$ROOT/slurmd.pid
SlurmctldLogFile=$ROOT/log/slurmctld.log
SlurmdLogFile=$ROOT/log/slurmd.log
ReturnToService=2
MinJobAge=600
KillWait=5
OverTimeLimit=0
InactiveLimit=0
SchedulerType=sched/backfill
MpiDefault=none
NodeName=$HOST NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=quorum Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
CONF
}

start() {
  ensure_packages || exit 4
  if pid_alive "$ROOT/slurmctld.pid" && pid_alive "$ROOT/slurmd.pid"; then echo "slurm already running (conf $CONF)"; return 0; fi
  stop >/dev/null 2>&1 || true
  write_conf
  munged --force --socket="$ROOT/munge/munge.socket" --key-file="$ROOT/munge/munge.key" \
    --pid-file="$ROOT/munge/munged.pid" --log-file="$ROOT/log/munged.log" --seed-file="$ROOT/munge/munged.seed"
  slurmctld -f "$CONF" -i
  slurmd -f "$CONF"
  export SLURM_CONF="$CONF"
  # wait (bounded) until the node accepts work
  for _ in $(seq 1 60); do
    if sinfo -h -o '%T' 2>/dev/null | grep -qE '^(idle|mixed|allocated)'; then
      echo "slurm running: controller 127.0.0.1:$CTLD_PORT, node $HOST:$NODE_PORT (conf $CONF)"
      return 0
    fi
    sleep 0.5
  done
  echo "slurm did not come up; see $ROOT/log/" >&2
  tail -n 5 "$ROOT/log/slurmctld.log" "$ROOT/log/slurmd.log" >&2 || true
  return 1
}

stop() {
  for d in slurmd slurmctld; do
    if pid_alive "$ROOT/$d.pid"; then kill "$(cat "$ROOT/$d.pid")" 2>/dev/null || true; fi
  done
  for d in slurmd slurmctld; do
    for _ in $(seq 1 40); do pid_alive "$ROOT/$d.pid" || break; sleep 0.25; done
    pid_alive "$ROOT/$d.pid" && kill -9 "$(cat "$ROOT/$d.pid")" 2>/dev/null || true
    rm -f "$ROOT/$d.pid"
  done
  if pid_alive "$ROOT/munge/munged.pid"; then kill "$(cat "$ROOT/munge/munged.pid")" 2>/dev/null || true; fi
  rm -f "$ROOT/munge/munged.pid"
  echo "slurm stopped"
}

case "${1:-}" in
  start) start ;;
  stop) stop ;;
  status)
    if pid_alive "$ROOT/slurmctld.pid" && pid_alive "$ROOT/slurmd.pid"; then echo "running (conf $CONF)"; else echo "not running"; exit 3; fi ;;
  env) echo "export SLURM_CONF=$CONF" ;;
  *) echo "usage: scripts/slurm.sh start|stop|status|env" >&2; exit 2 ;;
esac
