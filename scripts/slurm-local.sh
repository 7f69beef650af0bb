#!/bin/sh
# Brings up a one-node Slurm cluster on this machine for the cluster test (tests/series-slurm.test.ts):
# installs the Debian packages when missing (slurmctld slurmd slurm-client munge), writes a minimal
# configuration (no systemd, no cgroups: proctrack/linuxproc, task/none, select/cons_tres), starts
# munged, slurmctld and slurmd directly, and waits until the node is idle. Needs root (apt, daemons).
# Usage: scripts/slurm-local.sh up | down | status. Exit 0 when the cluster is up; non-zero with a
# one-line reason on stderr otherwise (the test then skips and prints that reason).
set -u
cmd=${1:-up}
conf_dir=/etc/slurm
conf=$conf_dir/slurm.conf
node=$(hostname -s)

die() { echo "slurm-local: $*" >&2; exit 1; }

status() { sinfo -h -o '%T' 2>/dev/null | head -n 1; }

if [ "$cmd" = status ]; then status; exit 0; fi
if [ "$cmd" = down ]; then
  pkill -x slurmd 2>/dev/null; pkill -x slurmctld 2>/dev/null; pkill -x munged 2>/dev/null
  exit 0
fi

[ "$(id -u)" = 0 ] || die "needs root to install packages and start the daemons"
if ! command -v sbatch >/dev/null 2>&1 || ! command -v slurmctld >/dev/null 2>&1 || ! command -v munged >/dev/null 2>&1; then
  command -v apt-get >/dev/null 2>&1 || die "no apt-get to install Slurm"
  export DEBIAN_FRONTEND=noninteractive
  apt-get install -y --no-install-recommends slurmctld slurmd slurm-client munge >/tmp/slurm-local-apt.log 2>&1 ||
    { apt-get update >>/tmp/slurm-local-apt.log 2>&1 && apt-get install -y --no-install-recommends slurmctld slurmd slurm-client munge >>/tmp/slurm-local-apt.log 2>&1; } ||
    die "apt-get could not install slurmctld slurmd slurm-client munge (see /tmp/slurm-local-apt.log)"
fi

# Already up?
case "$(status)" in idle*|mixed*|allocated*) exit 0 ;; esac

# munge: a key and the daemon (as root: --force).
mkdir -p /etc/munge /var/lib/munge /var/log/munge /run/munge
if [ ! -s /etc/munge/munge.key ]; then
  dd if=/dev/urandom of=/etc/munge/munge.key bs=1 count=1024 2>/dev/null || die "cannot write /etc/munge/munge.key"
fi
chmod 0400 /etc/munge/munge.key
chmod 0700 /etc/munge /var/lib/munge /var/log/munge
chmod 0755 /run/munge
pgrep -x munged >/dev/null 2>&1 || munged --force >/dev/null 2>&1 || die "munged did not start"

cpus=$(nproc)
mem=$(awk '/MemTotal/ { printf "%d", $2 / 1024 * 0.8 }' /proc/meminfo)
mkdir -p $conf_dir /var/spool/slurmctld /var/spool/slurmd /var/log/slurm /run/slurm
cat > $conf <<CONF
ClusterName=lamella-test
SlurmctldHost=$node
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
MpiDefault=none
ReturnToService=2
SchedulerType=sched/backfill
JobAcctGatherType=jobacct_gather/none
StateSaveLocation=/var/spool/slurmctld
SlurmdSpoolDir=/var/spool/slurmd
SlurmctldPidFile=/run/slurm/slurmctld.pid
SlurmdPidFile=/run/slurm/slurmd.pid
SlurmctldLogFile=/var/log/slurm/slurmctld.log
SlurmdLogFile=/var/log/slurm/slurmd.log
NodeName=$node CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=local Nodes=$node Default=YES MaxTime=INFINITE State=UP
CONF
pgrep -x slurmctld >/dev/null 2>&1 || slurmctld >/dev/null 2>&1 || die "slurmctld did not start (see /var/log/slurm/slurmctld.log)"
pgrep -x slurmd >/dev/null 2>&1 || slurmd >/dev/null 2>&1 || die "slurmd did not start (see /var/log/slurm/slurmd.log)"
i=0
while [ $i -lt 60 ]; do
  case "$(status)" in idle*|mixed*|allocated*) exit 0 ;; esac
  sleep 1
  i=$((i + 1))
done
die "the node did not become idle within 60 s (state: $(status); see /var/log/slurm/)"
