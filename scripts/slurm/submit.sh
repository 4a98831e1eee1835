#!/bin/bash
# Submit a tancheck campaign as a Slurm job array of N shards and a merge job that runs when
# every shard has ended (afterany: also after failed ones, so missing shards get named).
#
#   scripts/slurm/submit.sh CAMPAIGN OUTDIR N [tancheck campaign options...]
#
# Prints the two job ids. TANCHECK (the program) is passed on to the jobs.
set -euo pipefail
if [ $# -lt 3 ]; then
    echo "usage: $0 CAMPAIGN OUTDIR N [tancheck campaign options...]" >&2
    exit 2
fi
here=$(cd "$(dirname "$0")" && pwd)
campaign=$1
out=$2
n=$3
shift 3
mkdir -p "$out"
array=$(sbatch --parsable --array=0-$((n - 1)) "$here/campaign.sbatch" "$campaign" "$out" "$@")
array=${array%%;*}
merge=$(sbatch --parsable --dependency=afterany:"$array" "$here/merge.sbatch" "$out")
echo "campaign array job $array, merge job ${merge%%;*}: results in $out/campaign.json"
