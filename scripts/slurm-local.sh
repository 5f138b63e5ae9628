#!/usr/bin/env bash
# A real one-node Slurm cluster on this machine, for testing scripts/slurm-build.sh (the test in
# test/scale/slurm.test.ts and CI use it). Debian 12's packages: slurm-wlm 22.05 and munge.
#
#   scripts/slurm-local.sh install       install slurm-wlm and munge with apt-get when missing (root)
#   scripts/slurm-local.sh start DIR     write DIR/slurm.conf for this host, start munged, slurmctld
#                                        and slurmd with all their state, logs and PID files under
#                                        DIR, and wait until `sinfo` shows the node idle
#   scripts/slurm-local.sh stop DIR      stop the daemons that `start DIR` started, by their PIDs
#
# After `start`, point the client commands at the cluster with `export SLURM_CONF=DIR/slurm.conf`.
# Nothing under /etc is written or read except what the packages installed: the cluster has its own
# munge key and socket and free TCP ports, so it cannot meet a cluster already on the machine.
#
# The configuration asks nothing of the kernel: no cgroups (ProctrackType=proctrack/linuxproc,
# TaskPlugin=task/none), consumable cores and memory (select/cons_tres, CR_Core_Memory), the node
# line as `slurmd -C` reports it (cores and RealMemory), reached on the loopback address (so the
# host name need not resolve), no accounting database (so `sacct` has nothing to say here;
# `squeue` and `scontrol show job` do). The daemons run as the user who starts them (SlurmUser
# and SlurmdUser), and so do the jobs: root, as in CI, or any user once the packages are installed.
#
# Exit codes: 0 done; 1 the packages could not be installed or a daemon did not start (the reason
# and the end of the daemon's log are printed); 2 a usage error.
set -euo pipefail

usage() { sed -n '5,9p' "$0" | sed 's/^# \{0,1\}//' >&2; exit 2; }
[[ $# -ge 1 ]] || usage
cmd=$1

have_packages() { command -v slurmctld >/dev/null && command -v slurmd >/dev/null && command -v munged >/dev/null && command -v sbatch >/dev/null; }

install_packages() {
  if have_packages; then return 0; fi
  if [[ $(id -u) -ne 0 ]]; then
    echo "slurm-local: slurmctld, slurmd, munged or sbatch is missing and installing needs root: apt-get install slurm-wlm munge" >&2
    return 1
  fi
  if ! command -v apt-get >/dev/null; then
    echo "slurm-local: slurm-wlm and munge are missing and there is no apt-get to install them" >&2
    return 1
  fi
  echo "slurm-local: installing slurm-wlm and munge with apt-get" >&2
  (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends slurm-wlm munge >/dev/null) || {
    echo "slurm-local: apt-get could not install slurm-wlm and munge" >&2
    return 1
  }
  have_packages
}

# A TCP port nobody listens on now (asked of the kernel by binding port 0).
free_port() { node -e 'const s=require("net").createServer();s.listen(0,"0.0.0.0",()=>{console.log(s.address().port);s.close()})'; }

# Print the end of a log file, for a daemon that did not come up.
show_log() { [[ -f $1 ]] && { echo "---- last lines of $1" >&2; tail -n 20 "$1" >&2; }; return 0; }

wait_for_file() { # path seconds
  local i
  for ((i = 0; i < $2 * 10; i++)); do [[ -s $1 ]] && return 0; sleep 0.1; done
  return 1
}

start() {
  local dir host node_line ctld_port slurmd_port i state
  dir=$(mkdir -p "$1" && cd "$1" && pwd)
  install_packages || exit 1
  chmod 700 "$dir"
  mkdir -p "$dir/munge" "$dir/state" "$dir/spool" "$dir/log"
  chmod 700 "$dir/munge"
  host=$(hostname)

  # 1. munge: a fresh key only this cluster uses, a socket under DIR.
  head -c 1024 /dev/urandom >"$dir/munge/munge.key"
  chmod 400 "$dir/munge/munge.key"
  munged --force --key-file="$dir/munge/munge.key" --socket="$dir/munge/munge.socket" \
    --pid-file="$dir/munge/munged.pid" --log-file="$dir/log/munged.log" --seed-file="$dir/munge/munged.seed" \
    || { echo "slurm-local: munged did not start" >&2; show_log "$dir/log/munged.log"; exit 1; }
  wait_for_file "$dir/munge/munged.pid" 10 || { echo "slurm-local: munged wrote no PID file" >&2; show_log "$dir/log/munged.log"; exit 1; }

  # 2. slurm.conf for this host: the node as slurmd sees it (first line of `slurmd -C`).
  node_line=$(slurmd -C | head -n 1)
  [[ $node_line == NodeName=* ]] || { echo "slurm-local: 'slurmd -C' printed no node line: $node_line" >&2; exit 1; }
  node_line="NodeName=$host ${node_line#NodeName=* }"
  ctld_port=$(free_port)
  slurmd_port=$(free_port)
  [[ $slurmd_port != "$ctld_port" ]] || slurmd_port=$(free_port)
  cat >"$dir/slurm.conf" <<EOF
# Written by scripts/slurm-local.sh: a one-node test cluster on $host.
ClusterName=lacuna-local
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$ctld_port
SlurmdPort=$slurmd_port
SlurmUser=$(id -un)
SlurmdUser=$(id -un)
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$dir/munge/munge.socket
StateSaveLocation=$dir/state
SlurmdSpoolDir=$dir/spool
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/log/slurmctld.log
SlurmdLogFile=$dir/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
MpiDefault=none
MailProg=/bin/true
ReturnToService=2
MinJobAge=600
$node_line NodeAddr=127.0.0.1 State=UNKNOWN
PartitionName=local Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
  export SLURM_CONF="$dir/slurm.conf"

  # 3. The controller, then the node daemon; each writes its PID file once it runs.
  slurmctld -f "$SLURM_CONF" || { echo "slurm-local: slurmctld did not start" >&2; show_log "$dir/log/slurmctld.log"; exit 1; }
  wait_for_file "$dir/slurmctld.pid" 20 || { echo "slurm-local: slurmctld wrote no PID file" >&2; show_log "$dir/log/slurmctld.log"; exit 1; }
  slurmd -f "$SLURM_CONF" || { echo "slurm-local: slurmd did not start" >&2; show_log "$dir/log/slurmd.log"; exit 1; }
  wait_for_file "$dir/slurmd.pid" 20 || { echo "slurm-local: slurmd wrote no PID file" >&2; show_log "$dir/log/slurmd.log"; exit 1; }

  # 4. Ready when the node is idle (it registers within a few seconds).
  for ((i = 0; i < 600; i++)); do
    state=$(sinfo -h -n "$host" -o %t 2>/dev/null || true)
    [[ $state == idle ]] && { echo "slurm-local: node $host idle; export SLURM_CONF=$SLURM_CONF" >&2; return 0; }
    sleep 0.1
  done
  echo "slurm-local: node $host did not become idle within 60 s (state: '${state:-none}')" >&2
  show_log "$dir/log/slurmctld.log"
  show_log "$dir/log/slurmd.log"
  exit 1
}

# Stop by the PIDs in DIR's PID files, only while the process still runs the daemon named.
stop() {
  local dir=$1 entry name file pid i
  for entry in slurmd:"$dir/slurmd.pid" slurmctld:"$dir/slurmctld.pid" munged:"$dir/munge/munged.pid"; do
    name=${entry%%:*}
    file=${entry#*:}
    [[ -s $file ]] || continue
    pid=$(<"$file")
    [[ $pid =~ ^[0-9]+$ ]] || continue
    if [[ $(cat "/proc/$pid/comm" 2>/dev/null) == "$name" ]]; then
      kill "$pid" 2>/dev/null || true
      for ((i = 0; i < 100; i++)); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
      kill -0 "$pid" 2>/dev/null && kill -9 "$pid" 2>/dev/null || true
    fi
    rm -f "$file"
  done
}

case $cmd in
  install) install_packages || exit 1 ;;
  start) [[ $# -eq 2 ]] || usage; start "$2" ;;
  stop) [[ $# -eq 2 ]] || usage; stop "$2" ;;
  *) usage ;;
esac
