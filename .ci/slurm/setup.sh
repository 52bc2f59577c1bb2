#!/usr/bin/env bash
# Installs and starts a single-node Slurm cluster on this host, for the sweep integration test
# (popsynth/sweep, TestSlurm*). Run as root on Debian:
#
#   sudo bash .ci/slurm/setup.sh
#   COREFALL_SLURM=1 go test ./popsynth/sweep -run Slurm
#
# It installs slurm-wlm and munge, writes /etc/slurm/slurm.conf for one node with this machine's
# real CPUs and memory (as `slurmd -C` reports them), creates the munge key if there is none,
# starts munged, slurmctld and slurmd (no systemd needed), and waits until `sinfo` shows the node
# idle. Everything listens on the loopback address. Running it again restarts the daemons it started
# (found by their pid files) with a fresh configuration. On failure it prints the daemons' logs and
# exits non-zero.
set -euo pipefail

SPOOL=/var/spool/corefall-slurm
LOG=/var/log/corefall-slurm
RUN=/run/corefall-slurm
CONF=/etc/slurm/slurm.conf
WAIT_SECONDS=${SLURM_SETUP_WAIT:-90}

if [ "$(id -u)" -ne 0 ]; then
  echo "setup.sh: must run as root (it installs packages and starts daemons); try: sudo bash $0" >&2
  exit 1
fi

say() { echo "slurm-setup: $*"; }

diagnose() {
  say "FAILED: $*" >&2
  for f in "$LOG"/slurmctld.log "$LOG"/slurmd.log /var/log/munge/munged.log; do
    if [ -f "$f" ]; then
      echo "---- last lines of $f" >&2
      tail -n 40 "$f" >&2 || true
    fi
  done
  echo "---- sinfo" >&2
  sinfo -N -l 2>&1 >&2 || true
  echo "---- scontrol show node" >&2
  scontrol show node 2>&1 >&2 || true
  exit 1
}

# 1. Packages.
if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v munged >/dev/null || ! command -v sbatch >/dev/null; then
  say "installing slurm-wlm and munge"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends slurm-wlm munge >/dev/null
fi

# 2. Stop daemons a previous run of this script started (by their pid files only).
stop_pidfile() {
  local pf=$1 name=$2 pid
  [ -f "$pf" ] || return 0
  pid=$(cat "$pf" 2>/dev/null || true)
  # Only a live process that is still the daemon we started (a stale pid may have been reused).
  if [ -n "$pid" ] && [ "$(cat "/proc/$pid/comm" 2>/dev/null || true)" = "$name" ]; then
    kill "$pid" 2>/dev/null || true
    for _ in $(seq 1 50); do
      kill -0 "$pid" 2>/dev/null || break
      sleep 0.1
    done
  fi
  rm -f "$pf"
}
stop_pidfile "$RUN/slurmd.pid" slurmd
stop_pidfile "$RUN/slurmctld.pid" slurmctld
stop_pidfile "$RUN/munged.pid" munged

mkdir -p "$SPOOL/ctld" "$SPOOL/d" "$LOG" "$RUN" /run/munge /var/log/munge /var/lib/munge /etc/slurm
rm -rf "${SPOOL:?}/ctld/"* "${SPOOL:?}/d/"*

# 3. Munge: key and daemon (munged runs as the munge user, which owns its key and directories).
if [ ! -s /etc/munge/munge.key ]; then
  say "creating the munge key"
  mungekey --create --keyfile=/etc/munge/munge.key
fi
chown -R munge:munge /etc/munge /run/munge /var/log/munge /var/lib/munge
chmod 0700 /etc/munge
chmod 0400 /etc/munge/munge.key
chmod 0755 /run/munge
say "starting munged"
runuser -u munge -- /usr/sbin/munged --pid-file=/run/munge/munged.pid --log-file=/var/log/munge/munged.log 2>/dev/null \
  || runuser -u munge -- /usr/sbin/munged --force --pid-file=/run/munge/munged.pid --log-file=/var/log/munge/munged.log \
  || diagnose "munged did not start"
for _ in $(seq 1 50); do [ -s /run/munge/munged.pid ] && break; sleep 0.1; done
cp /run/munge/munged.pid "$RUN/munged.pid"
munge -n | unmunge >/dev/null || diagnose "munge cannot encode and decode a credential"

# 4. slurm.conf: one node, this host, on loopback, with the resources slurmd detects.
HOST=$(hostname -s)
NODE_LINE=$(slurmd -C | head -n 1)        # NodeName=HOST CPUs=... RealMemory=...
case "$NODE_LINE" in
  NodeName=*) ;;
  *) diagnose "slurmd -C printed no NodeName line: $NODE_LINE" ;;
esac
say "node: $NODE_LINE"
cat >"$CONF" <<CONF
# Written by corefall's .ci/slurm/setup.sh: a single-node cluster for the sweep integration test.
ClusterName=corefall-ci
SlurmctldHost=${HOST}(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
SlurmctldPort=6817
SlurmdPort=6818
StateSaveLocation=${SPOOL}/ctld
SlurmdSpoolDir=${SPOOL}/d
SlurmctldPidFile=${RUN}/slurmctld.pid
SlurmdPidFile=${RUN}/slurmd.pid
SlurmctldLogFile=${LOG}/slurmctld.log
SlurmdLogFile=${LOG}/slurmd.log
SlurmctldDebug=info
SlurmdDebug=info
# No cgroups: processes are tracked through /proc and tasks are not bound or confined.
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
MpiDefault=none
SwitchType=switch/none
SchedulerType=sched/backfill
# Test the pending array elements every second (defaults: 60 s and 30 s), so that a throttled
# job array moves on as soon as an element ends.
SchedulerParameters=sched_interval=1,bf_interval=1
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
DefMemPerCPU=512
ReturnToService=2
SlurmdTimeout=60
InactiveLimit=0
KillWait=10
MinJobAge=300
${NODE_LINE} NodeAddr=127.0.0.1 State=UNKNOWN
PartitionName=debug Nodes=ALL Default=YES MaxTime=INFINITE State=UP
CONF
# No cgroup plugin is used (see ProctrackType and TaskPlugin above); this file only says so, so that
# a site cgroup.conf left on the machine is not read with settings that need systemd.
cat >/etc/slurm/cgroup.conf <<'CONF'
# Written by corefall's .ci/slurm/setup.sh. The test cluster uses proctrack/linuxproc and
# task/none, so no cgroup plugin is loaded.
CgroupAutomount=no
CONF

# 5. Daemons. slurmctld -c starts from an empty state (no jobs left from a previous run).
say "starting slurmctld"
/usr/sbin/slurmctld -c -f "$CONF" || diagnose "slurmctld did not start"
say "starting slurmd"
/usr/sbin/slurmd -f "$CONF" || diagnose "slurmd did not start"

# 6. Wait for the node to be idle.
say "waiting up to ${WAIT_SECONDS}s for the node to be idle"
deadline=$((SECONDS + WAIT_SECONDS))
state=""
while [ $SECONDS -lt $deadline ]; do
  state=$(sinfo -h -N -o '%t' 2>/dev/null | head -n 1 || true)
  case "$state" in
    idle) say "node $HOST is idle"; sinfo; exit 0 ;;
    drain*|drng|down*|fail*)
      # A node that comes up drained (for example after a restart) is resumed once.
      scontrol update NodeName="$HOST" State=RESUME 2>/dev/null || true ;;
  esac
  sleep 1
done
diagnose "node not idle after ${WAIT_SECONDS}s (last state: '${state:-none}')"
