#!/usr/bin/env bash
# A single-node Slurm for the cluster test (test/cluster/slurm.test.ts), on a machine where we are
# root and PID 1 is not systemd.
#   .ci/slurm-local.sh install   apt-get install slurm-wlm munge (daemons are started below: the
#                                image's policy-rc.d blocks autostart during the install)
#   .ci/slurm-local.sh start DIR  munged (if not running), slurmctld and slurmd with DIR/slurm.conf;
#                                prints SLURM_CONF=DIR/slurm.conf when the node is idle
#   .ci/slurm-local.sh stop DIR   stops the daemons this script started (their pids are in DIR)
# Stopped daemons stay as zombies under a non-systemd PID 1, so a daemon is "running" when
# /proc/PID/stat says a state other than Z, never by kill -0.
set -euo pipefail

cmd=${1:-}
dir=${2:-}

alive() { # pid → 0 when the process exists and is not a zombie
  local st
  [ -r "/proc/$1/stat" ] || return 1
  st=$(sed -E 's/^[0-9]+ \(.*\) ([A-Za-z]).*/\1/' "/proc/$1/stat" 2>/dev/null) || return 1
  [ "$st" != Z ] && [ "$st" != X ]
}

wait_for() { # seconds command... → 0 once the command succeeds
  local n=$(( $1 * 10 )); shift
  for _ in $(seq "$n"); do "$@" >/dev/null 2>&1 && return 0; sleep 0.1; done
  return 1
}

stop_pidfile() { # pid file → TERM the pid it names if alive, wait, remove the file
  local f=$1 pid
  [ -f "$f" ] || return 0
  pid=$(cat "$f")
  if [ -n "$pid" ] && alive "$pid"; then
    kill -TERM "$pid" 2>/dev/null || true
    for _ in $(seq 50); do alive "$pid" || break; sleep 0.1; done
    alive "$pid" && kill -KILL "$pid" 2>/dev/null || true
  fi
  rm -f "$f"
}

case "$cmd" in
install)
  if command -v slurmctld >/dev/null && command -v munged >/dev/null; then exit 0; fi
  [ "$(id -u)" = 0 ] || { echo "not root: cannot install slurm-wlm and munge" >&2; exit 3; }
  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq slurm-wlm munge >/dev/null
  ;;
start)
  [ -n "$dir" ] || { echo "usage: $0 start DIR" >&2; exit 2; }
  [ "$(id -u)" = 0 ] || { echo "not root: cannot start munged and slurmd" >&2; exit 3; }
  for b in munged munge unmunge slurmctld slurmd sbatch; do command -v "$b" >/dev/null || { echo "$b not installed" >&2; exit 3; }; done
  mkdir -p "$dir/state" "$dir/spool" "$dir/log"
  # munge: its run, state and log folders belong to the munge user, which runs the daemon.
  install -d -o munge -g munge -m 0755 /run/munge
  install -d -o munge -g munge -m 0700 /var/lib/munge /var/log/munge
  if ! munge -n 2>/dev/null | unmunge >/dev/null 2>&1; then
    [ -f /etc/munge/munge.key ] || { dd if=/dev/urandom of=/etc/munge/munge.key bs=1 count=128 status=none; chown munge:munge /etc/munge/munge.key; chmod 0400 /etc/munge/munge.key; }
    rm -f /run/munge/munged.pid
    runuser -u munge -- munged
    wait_for 5 sh -c 'munge -n | unmunge' || { echo "munged did not start" >&2; exit 4; }
    cp /run/munge/munged.pid "$dir/munged.pid"
  fi
  # The node as slurmd sees it (real CPUs and memory), reachable at 127.0.0.1.
  node=$(slurmd -C | head -n1)
  name=$(sed -E 's/^NodeName=([^ ]+).*/\1/' <<<"$node")
  cat >"$dir/slurm.conf" <<EOF
ClusterName=iontrail-ci
SlurmctldHost=$name(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
StateSaveLocation=$dir/state
SlurmdSpoolDir=$dir/spool
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/log/slurmctld.log
SlurmdLogFile=$dir/log/slurmd.log
SlurmctldPort=16817
SlurmdPort=16818
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SchedulerParameters=batch_sched_delay=0,sched_min_interval=0
MailProg=/bin/true
ReturnToService=2
MinJobAge=300
$node NodeAddr=127.0.0.1 State=UNKNOWN
PartitionName=debug Nodes=$name Default=YES MaxTime=INFINITE State=UP
EOF
  sed -i -E 's/ UpTime=[^ ]*//' "$dir/slurm.conf"
  export SLURM_CONF="$dir/slurm.conf"
  stop_pidfile "$dir/slurmctld.pid"; stop_pidfile "$dir/slurmd.pid"
  slurmctld -i
  wait_for 10 scontrol ping || { echo "slurmctld did not answer; see $dir/log/slurmctld.log" >&2; exit 4; }
  slurmd
  wait_for 15 sh -c "sinfo -h -N -o %T | grep -Eq '^(idle|mixed|allocated)'" || { echo "the node did not come up; see $dir/log/slurmd.log" >&2; exit 4; }
  echo "SLURM_CONF=$SLURM_CONF"
  ;;
stop)
  [ -n "$dir" ] || { echo "usage: $0 stop DIR" >&2; exit 2; }
  stop_pidfile "$dir/slurmd.pid"
  stop_pidfile "$dir/slurmctld.pid"
  stop_pidfile "$dir/munged.pid"
  ;;
*)
  echo "usage: $0 install | start DIR | stop DIR" >&2; exit 2
  ;;
esac
