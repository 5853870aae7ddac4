#!/bin/bash
# The last job of a murk job array: joins DIR/part-1.h5 .. DIR/part-N.h5 into one
# result, the same in every dataset as a run of the whole sweep. Submitted by
# tools/cluster/submit_sweep.sh to start once every share has succeeded; by hand:
#
#   sbatch --dependency=afterok:ARRAY_JOB_ID --kill-on-invalid-dep=yes --chdir=DIR \
#          tools/cluster/merge_task.sh MURK DIR N OUT.h5
#
# afterok: the merge starts only when every task of the array ended with status
# 0. If one failed or was killed (a wall-time limit), the dependency can never be
# met and --kill-on-invalid-dep=yes removes the merge from the queue instead of
# leaving it pending for ever; `submit_sweep.sh --rerun DIR` then resubmits the
# unfinished shares (they resume) and a new merge.
#
# Defaults for a submission by hand; sbatch options on its command line override them.
#SBATCH --job-name=murk-merge
#SBATCH --open-mode=append
set -euo pipefail

if [ $# -ne 4 ]; then
  echo "usage: sbatch --dependency=afterok:ARRAY_JOB_ID ... merge_task.sh MURK DIR N OUT.h5" >&2
  exit 2
fi
murk="$1" dir="$2" shares="$3" out="$4"

# Every part by name, not a glob: a missing part then stops the merge with its
# name ("DIR/part-K.h5: no such file") instead of being skipped, and a stray file
# matching a pattern is never merged. The merge itself needs one thread.
parts=()
for ((k = 1; k <= shares; ++k)); do parts+=("$dir/part-$k.h5"); done
echo "merging ${#parts[@]} parts into $out"
exec "$murk" merge "${parts[@]}" -o "$out"
