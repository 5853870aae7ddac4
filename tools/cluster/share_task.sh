#!/bin/bash
# One task of a murk job array: computes share K of N of a sweep and writes
# DIR/part-K.h5. Submitted by tools/cluster/submit_sweep.sh, which sets the array,
# the threads, the time limit and the memory from `murk run --estimate`; by hand:
#
#   sbatch --array=1-N --cpus-per-task=T --time=MIN --chdir=DIR \
#          tools/cluster/share_task.sh MURK CASE.toml DIR N
#
# The array is numbered from 1, so the task id is the share: `--shard K/N` counts
# from 1 as well, and a single task is rerun as --array=K. Task 0 is refused.
# MURK, CASE.toml and DIR must be absolute paths that every node sees (a shared
# file system): Slurm runs a copy of this script from its spool directory, so the
# script cannot find the repository from where it lies.
#
# A task that was stopped part-way (a wall-time kill, a node failure, `scontrol
# requeue`, scancel) leaves DIR/part-K.h5.partial, the journal of its finished
# points. When the task runs again, requeued by Slurm or resubmitted with
# `submit_sweep.sh --rerun DIR`, it finds the journal and passes --resume, so only
# the missing points are computed; the part is the same as an uninterrupted one.
#
# These defaults apply when the script is submitted by hand; options given to
# sbatch on its command line override them.
#SBATCH --job-name=murk-share
# A requeued task (node failure, preemption, scontrol requeue) appends to the log
# of its first attempt instead of overwriting it, so both attempts can be read.
#SBATCH --open-mode=append
# Let Slurm requeue the task after a node failure: it resumes from its journal.
#SBATCH --requeue
set -euo pipefail

if [ $# -ne 4 ]; then
  echo "usage: sbatch --array=1-N ... share_task.sh MURK CASE.toml DIR N" >&2
  exit 2
fi
murk="$1" case_file="$2" dir="$3" shares="$4"

# The share is the array task id (the array runs from 1 to N).
k="${SLURM_ARRAY_TASK_ID:-}"
if [ -z "$k" ]; then
  echo "share_task.sh: not an array task (SLURM_ARRAY_TASK_ID is unset); submit with sbatch --array=1-$shares" >&2
  exit 2
fi
if [ "$k" -lt 1 ] || [ "$k" -gt "$shares" ]; then
  echo "share_task.sh: array task $k is not a share of 1..$shares; number the array from 1 (--array=1-$shares)" >&2
  exit 2
fi

# Threads: the CPUs Slurm gave the task (set when --cpus-per-task was asked for);
# otherwise one, the least any task is given, so that the task never runs more
# threads than it has cores (murk's default would take every core of the node).
threads="${SLURM_CPUS_PER_TASK:-1}"

part="$dir/part-$k.h5"
# A finished part: a rerun of the whole array (or a requeue after the part was
# written) has nothing left to do for this share.
if [ -e "$part" ]; then
  echo "share $k/$shares: $part is already complete"
  exit 0
fi
# A journal from an earlier attempt of this share: finish it. murk refuses a
# journal of another case text or share (exit status 2), which fails the task
# with that reason in the log rather than mixing two sweeps.
resume=()
if [ -e "$part.partial" ]; then
  resume=(--resume)
  echo "share $k/$shares: resuming from $part.partial (attempt $(( ${SLURM_RESTART_COUNT:-0} + 1 )))"
else
  echo "share $k/$shares: starting on $(hostname) with $threads thread(s)"
fi

# exec: murk becomes the task's process, so Slurm's SIGTERM at a wall-time limit
# or requeue reaches it directly; it keeps the finished points in the journal and
# exits. Not --quiet: written to a file, murk's progress is one line every 10 s,
# and it ends with the times of the body's factorization and of the points and
# the peak memory, to hold against the estimate when sizing the next array.
exec "$murk" run "$case_file" -o "$part" --shard "$k/$shares" --threads "$threads" "${resume[@]}"
