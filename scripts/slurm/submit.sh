#!/bin/bash
# Submits a Falciform cohort to Slurm: a job array of SHARDS tasks, then a merge job that runs once
# every task has ended with exit code 0 (afterok). Extra sbatch options (partition, account, time,
# --chdir for the logs) go in SBATCH_OPTS; FALCIFORM names the command when it is not on the PATH.
#   usage: submit.sh COHORT_DIR OUT_DIR SHARDS
set -euo pipefail
if [ $# -ne 3 ] || ! [[ $3 =~ ^[1-9][0-9]*$ ]]; then
  echo "usage: $0 COHORT_DIR OUT_DIR SHARDS" >&2
  exit 2
fi
here=$(cd "$(dirname "$0")" && pwd)
COHORT=$(realpath "$1")
OUT=$(realpath -m "$2")
SHARDS=$3
export COHORT OUT SHARDS
# shellcheck disable=SC2086 # SBATCH_OPTS is a list of options
array=$(sbatch --parsable --export=ALL --array=0-$((SHARDS - 1)) ${SBATCH_OPTS:-} "$here/shard.sbatch")
array=${array%%;*}
# shellcheck disable=SC2086
merge=$(sbatch --parsable --export=ALL --dependency=afterok:"$array" ${SBATCH_OPTS:-} "$here/merge.sbatch")
merge=${merge%%;*}
echo "array job $array ($SHARDS tasks), merge job $merge"
