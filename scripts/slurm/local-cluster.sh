#!/bin/bash
# A one-node Slurm cluster on this machine, for tancheck's tests and for trying the job-array
# scripts beside this file. Needs root and Debian's slurm-wlm and munge packages.
#
#   scripts/slurm/local-cluster.sh start DIR   # munged, slurmctld and slurmd, state under DIR
#   export SLURM_CONF=DIR/slurm.conf           # (start prints this line) for sbatch, sinfo, ...
#   scripts/slurm/local-cluster.sh stop DIR    # stops the three daemons by their pid files
#
# munged runs as the user munge with a key generated into DIR/munge (not /etc/munge); the
# slurm.conf names this machine's short host name as control host and as the only node, with
# ProctrackType=proctrack/linuxproc, TaskPlugin=task/none, SelectType=select/cons_tres and
# SlurmUser=root, and keeps its state and spool folders under DIR. Ports: TANCHECK_SLURM_PORT
# (default 16817) for slurmctld and the next one for slurmd.
set -euo pipefail

usage() {
    echo "usage: $0 start|stop DIR" >&2
    exit 2
}
[ $# -eq 2 ] || usage
action=$1
dir=$2

pid_of() { [ -s "$1" ] && cat "$1" || true; }

stop() {
    local d=$1
    for f in "$d/slurmd.pid" "$d/slurmctld.pid" "$d/munge/munged.pid"; do
        local p
        p=$(pid_of "$f")
        if [ -n "$p" ] && kill -0 "$p" 2>/dev/null; then
            kill "$p" 2>/dev/null || true
            for _ in $(seq 1 100); do
                kill -0 "$p" 2>/dev/null || break
                sleep 0.1
            done
            kill -0 "$p" 2>/dev/null && kill -9 "$p" 2>/dev/null || true
        fi
        rm -f "$f"
    done
}

case "$action" in
start)
    [ "$(id -u)" -eq 0 ] || { echo "$0: start needs root (SlurmUser=root, munged as munge)" >&2; exit 2; }
    for tool in munged mungekey slurmctld slurmd sinfo; do
        command -v "$tool" >/dev/null || { echo "$0: $tool not found (apt-get install slurm-wlm munge)" >&2; exit 2; }
    done
    mkdir -p "$dir"
    dir=$(cd "$dir" && pwd)
    stop "$dir"
    host=$(hostname -s)
    port=${TANCHECK_SLURM_PORT:-16817}
    cpus=$(nproc)
    # Every folder on the way must let the munge user through to its socket.
    chmod 755 "$dir"
    mkdir -p "$dir/munge" "$dir/state" "$dir/spool" "$dir/log"
    if ! runuser -u munge -- test -x "$dir"; then
        echo "$0: the user munge cannot enter $dir (a parent folder is closed to it); choose a folder under /tmp" >&2
        exit 2
    fi
    chown munge: "$dir/munge"
    chmod 700 "$dir/munge"
    rm -f "$dir/munge/munge.key"
    runuser -u munge -- mungekey --create --keyfile="$dir/munge/munge.key"
    chmod 400 "$dir/munge/munge.key"
    runuser -u munge -- munged --key-file="$dir/munge/munge.key" --socket="$dir/munge/munge.socket" \
        --pid-file="$dir/munge/munged.pid" --log-file="$dir/munge/munged.log" \
        --seed-file="$dir/munge/munged.seed" --force
    cat > "$dir/slurm.conf" <<CONF
# Written by tancheck's scripts/slurm/local-cluster.sh: a one-node cluster for tests.
ClusterName=tancheck-local
SlurmctldHost=$host
SlurmUser=root
SlurmdUser=root
SlurmctldPort=$port
SlurmdPort=$((port + 1))
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
SelectTypeParameters=CR_Core
SchedulerType=sched/backfill
MpiDefault=none
ReturnToService=2
JobCompType=jobcomp/none
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
MaxArraySize=1001
NodeName=$host CPUs=$cpus State=UNKNOWN
PartitionName=local Nodes=$host Default=YES MaxTime=INFINITE State=UP OverSubscribe=NO
CONF
    export SLURM_CONF=$dir/slurm.conf
    slurmctld -c -f "$SLURM_CONF"
    slurmd -f "$SLURM_CONF"
    for _ in $(seq 1 300); do
        state=$(sinfo -h -N -o %t 2>/dev/null | head -1 || true)
        if [ "$state" = "idle" ]; then
            echo "export SLURM_CONF=$SLURM_CONF" > "$dir/env"
            echo "export SLURM_CONF=$SLURM_CONF"
            exit 0
        fi
        sleep 0.2
    done
    echo "$0: the node did not become idle within 60 s; logs in $dir/log" >&2
    sinfo -N >&2 || true
    tail -20 "$dir/log/slurmctld.log" "$dir/log/slurmd.log" >&2 || true
    stop "$dir"
    exit 1
    ;;
stop)
    [ -d "$dir" ] || { echo "$0: no folder $dir" >&2; exit 2; }
    stop "$(cd "$dir" && pwd)"
    ;;
*)
    usage
    ;;
esac
