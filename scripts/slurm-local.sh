#!/bin/bash
# slurm-local.sh: a one-node Slurm cluster on this machine, for tests of job arrays.
#
#   SLURM_TMP=/tmp/x scripts/slurm-local.sh up     # install if missing, start, wait until idle
#   SLURM_TMP=/tmp/x scripts/slurm-local.sh down   # stop what `up` started, by PID
#   SLURM_TMP=/tmp/x scripts/slurm-local.sh env    # print the export line for clients
#
# Everything lives under $SLURM_TMP (default /tmp/broadline-slurm): the configuration
# ($SLURM_TMP/slurm.conf, used through SLURM_CONF, so /etc/slurm is left alone), a munge key and
# socket of its own, the controller's state, the spool, logs and pid files. Clients (sinfo,
# sbatch, squeue) must see SLURM_CONF=$SLURM_TMP/slurm.conf; `env` prints that line.
#
# The node is this host (its short name), all cores, no cgroups (proctrack/linuxproc,
# task/none), jobs run as root. Ports: $SLURM_CTLD_PORT (default 6817) and $SLURMD_PORT
# (default 6818). `up` waits at most $SLURM_UP_TIMEOUT seconds (default 60) for the node to be
# idle. It needs root; it installs Debian's slurm-wlm and munge through apt only when missing.
# It exits non-zero with a message on stderr when it cannot start, after stopping whatever it
# had started.
set -euo pipefail

SLURM_TMP=${SLURM_TMP:-/tmp/broadline-slurm}
CTLD_PORT=${SLURM_CTLD_PORT:-6817}
SLURMD_PORT=${SLURMD_PORT:-6818}
TIMEOUT=${SLURM_UP_TIMEOUT:-60}
CONF=$SLURM_TMP/slurm.conf
RUN=$SLURM_TMP/run

die() { echo "slurm-local: $*" >&2; exit 1; }

# stop_pid FILE: stop the daemon whose pid FILE holds (TERM, then KILL after 10 s).
stop_pid() {
  [ -f "$1" ] || return 0
  local p
  p=$(cat "$1" 2>/dev/null || true)
  if [[ "$p" =~ ^[0-9]+$ ]] && kill -0 "$p" 2>/dev/null; then
    kill -TERM "$p" 2>/dev/null || true
    for _ in $(seq 1 100); do kill -0 "$p" 2>/dev/null || break; sleep 0.1; done
    kill -0 "$p" 2>/dev/null && kill -KILL "$p" 2>/dev/null || true
  fi
  rm -f "$1"
}

down() {
  stop_pid "$RUN/slurmd.pid"
  stop_pid "$RUN/slurmctld.pid"
  stop_pid "$RUN/munged.pid"
  # The hosts line, only if `up` had to add it.
  if [ -f "$RUN/hosts-added" ]; then
    local line; line=$(cat "$RUN/hosts-added")
    grep -vxF "$line" /etc/hosts > "$RUN/hosts.new" && cat "$RUN/hosts.new" > /etc/hosts
    rm -f "$RUN/hosts-added" "$RUN/hosts.new"
  fi
}

# fail MSG: show the logs, stop what was started, exit 1.
fail() {
  echo "slurm-local: $*" >&2
  for f in "$SLURM_TMP"/log/*.log "$SLURM_TMP"/munge/munged.log; do
    [ -s "$f" ] && { echo "--- $f" >&2; tail -n 20 "$f" >&2; }
  done
  down
  exit 1
}

up() {
  [ "$(id -u)" = 0 ] || die "must run as root (the daemons and jobs run as root here)"
  case "$SLURM_TMP" in /*) ;; *) die "SLURM_TMP must be an absolute path, got '$SLURM_TMP'";; esac
  [ "$SLURM_TMP" != / ] || die "SLURM_TMP must not be /"

  # 1. packages, only if missing
  if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null ||
     ! command -v munged >/dev/null || ! command -v sbatch >/dev/null; then
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq >/dev/null || die "apt-get update failed"
    apt-get install -y -qq --no-install-recommends -o DPkg::Lock::Timeout=600 \
      slurm-wlm munge >/dev/null || die "apt-get install slurm-wlm munge failed"
  fi

  # 2. a fresh state dir (stop an earlier cluster of the same dir first)
  [ -f "$CONF" ] && down
  for d in state spool log run munge munge-sock; do rm -rf "${SLURM_TMP:?}/$d"; done
  mkdir -p "$SLURM_TMP"/{state,spool,log,run}
  chmod 0755 "$SLURM_TMP"

  local H; H=$(hostname -s)
  # slurmd and slurmctld look the short host name up; add it only if it does not resolve.
  if ! getent hosts "$H" >/dev/null; then
    local line="127.0.0.1 $H # slurm-local.sh"
    echo "$line" >> /etc/hosts
    echo "$line" > "$RUN/hosts-added"
  fi

  # 3. munge of our own: key, socket, pid and log under $SLURM_TMP/munge, daemon as user munge
  id munge >/dev/null 2>&1 || fail "no user 'munge' (the munge package creates it)"
  install -d -o munge -g munge -m 0700 "$SLURM_TMP/munge"
  /usr/sbin/mungekey --create --keyfile="$SLURM_TMP/munge/munge.key" ||
    fail "mungekey could not create a key"
  chown munge:munge "$SLURM_TMP/munge/munge.key"
  chmod 0600 "$SLURM_TMP/munge/munge.key"
  # The socket directory must be reachable by clients (root here) but not writable by others.
  install -d -o munge -g munge -m 0755 "$SLURM_TMP/munge-sock"
  local SOCK=$SLURM_TMP/munge-sock/munge.socket
  runuser -u munge -- /usr/sbin/munged \
    --key-file="$SLURM_TMP/munge/munge.key" \
    --socket="$SOCK" \
    --pid-file="$SLURM_TMP/munge/munged.pid" \
    --log-file="$SLURM_TMP/munge/munged.log" \
    --seed-file="$SLURM_TMP/munge/munged.seed" ||
    fail "munged did not start"
  # munged forks and writes its pid file; keep a copy where down() looks.
  for _ in $(seq 1 50); do [ -s "$SLURM_TMP/munge/munged.pid" ] && break; sleep 0.1; done
  cp "$SLURM_TMP/munge/munged.pid" "$RUN/munged.pid" 2>/dev/null || fail "munged wrote no pid file"
  munge -S "$SOCK" -n | unmunge -S "$SOCK" >/dev/null || fail "munge does not work (munge -n | unmunge)"

  # 4. slurm.conf, used through SLURM_CONF (daemons and clients)
  local cpus mem
  cpus=$(nproc)
  mem=$(( $(awk '/MemTotal/{print int($2/1024)}' /proc/meminfo) * 9 / 10 ))
  cat > "$CONF" <<EOF
# Written by scripts/slurm-local.sh for a one-node test cluster; state under $SLURM_TMP.
ClusterName=local
SlurmctldHost=$H
SlurmctldPort=$CTLD_PORT
SlurmdPort=$SLURMD_PORT
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$SOCK
MpiDefault=none
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
MailProg=/bin/true
MinJobAge=${SLURM_MINJOBAGE:-300}
StateSaveLocation=$SLURM_TMP/state
SlurmdSpoolDir=$SLURM_TMP/spool
SlurmctldPidFile=$RUN/slurmctld.pid
SlurmdPidFile=$RUN/slurmd.pid
SlurmctldLogFile=$SLURM_TMP/log/slurmctld.log
SlurmdLogFile=$SLURM_TMP/log/slurmd.log
NodeName=$H CPUs=$cpus Sockets=1 CoresPerSocket=$cpus ThreadsPerCore=1 RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=$H Default=YES MaxTime=INFINITE State=UP
EOF
  export SLURM_CONF=$CONF

  # 5. daemons (both fork into the background and write their pid files)
  slurmctld || fail "slurmctld did not start"
  slurmd || fail "slurmd did not start"

  # 6. wait until the node is idle
  local st="" t0=$SECONDS
  while (( SECONDS - t0 < TIMEOUT )); do
    st=$(sinfo -h -n "$H" -o %t 2>/dev/null || true)
    [ "$st" = idle ] && break
    sleep 0.5
  done
  [ "$st" = idle ] || fail "node '$H' not idle after ${TIMEOUT}s (state '$st'); if another cluster holds port $CTLD_PORT or $SLURMD_PORT, set SLURM_CTLD_PORT and SLURMD_PORT"
  sinfo
  echo "slurm-local: up; clients need: export SLURM_CONF=$CONF"
}

case "${1:-}" in
  up) up ;;
  down) down ;;
  env) echo "export SLURM_CONF=$CONF" ;;
  *) echo "usage: SLURM_TMP=DIR $0 up|down|env" >&2; exit 2 ;;
esac
