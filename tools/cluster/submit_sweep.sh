#!/bin/bash
# Runs a murk sweep on a Slurm cluster as a job array plus a merge job.
#
#   tools/cluster/submit_sweep.sh [options] CASE.toml DIR [-- SBATCH_OPTIONS...]
#   tools/cluster/submit_sweep.sh --rerun DIR [-- SBATCH_OPTIONS...]
#
# 1. `murk run CASE.toml --estimate --threads T` (T = --cpus) gives the time of
#    the fixed part (the body assembled and factored, which every task repeats)
#    and of the points, from rates measured on this machine, and the memory.
# 2. From these it chooses the number of tasks N and each task's time limit and
#    memory (see "Sizing" below), and writes them to DIR/plan.txt.
# 3. It submits tools/cluster/share_task.sh as the array 1-N (task K computes
#    --shard K/N into DIR/part-K.h5) and tools/cluster/merge_task.sh with
#    --dependency=afterok:<array job id> (it joins the parts into DIR/OUT.h5),
#    and prints both job ids. DIR/logs/ gets one log per task and one for the merge.
#
# A task killed at its time limit (or cancelled) leaves DIR/part-K.h5.partial;
# the merge is then dropped from the queue (its dependency can no longer be met).
# When every job of the submission has left the queue, `--rerun DIR` resubmits
# the shares whose part is not complete, with the same settings (they resume
# from their journals), and a new merge; sbatch options after -- are added to
# the first submission's (e.g. -- --time=240 for a longer limit). A task that Slurm requeues by itself
# (node failure, scontrol requeue) resumes in the same way, with no rerun.
#
# Options:
#   --cpus T           threads (CPUs) per task; default 4
#   --task-minutes M   aimed length of one task; default 60
#   --max-tasks M      at most this many tasks; default 200
#   --tasks N          exactly N tasks instead of the sizing below
#   --safety F         time limit = F x the estimated task time + 2 min; default 2
#   --min-minutes M    no time limit below M minutes; default 10
#   --mem MIB          memory per task in MiB instead of the estimate's; 0: ask for none
#   --output NAME      the merged result's name in DIR; default CASE's name with .h5
#   --murk PATH        the murk program; default build/murk of this repository
#   --dry-run          print the plan and the sbatch commands; submit nothing
#   -- OPTIONS...      passed to both sbatch calls (e.g. --partition=..., --account=...)
#
# Sizing (the numbers come from the estimate, for T threads per task):
#   F = fixed part, P = all points, A = the aimed task length.
#   Each task pays F once and about P/N of the points. Aiming at tasks of length
#   A gives each task A - F of points; but when F is most of A, many short tasks
#   would each repeat F for little work, so a task gets at least F of points
#   (the repeated fixed parts then cost at most as much as the points):
#     N = ceil(P / max(A - F, F)),  between 1 and min(--max-tasks, work units)
#   where the work units are the exact and full points and the dipole blocks of
#   128 points (murk deals whole units, so more tasks than units would idle).
#   The time limit is --safety x (F + P/N) plus 2 minutes for what the estimate
#   leaves out (reading the case, meshing, placing the points, writing the
#   part), rounded up to whole minutes and at least --min-minutes. The factor
#   covers a compute node slower or busier than this machine and the model's
#   approximations (it counts the dominant operations; shares are balanced to
#   within one unit, not exactly). A task that runs out of time anyway loses no
#   finished point: --rerun resumes it.
#   Memory: the estimate counts the factors, the per-thread blocks and the
#   per-point records; 25 % and 256 MiB are added for the program, HDF5's
#   buffers and the meshes.
#
# Every path given to the jobs is absolute and must be visible from the compute
# nodes (a shared file system). Do not edit CASE.toml until the merge is done:
# each task reads it when it starts, and murk merge refuses parts of different
# case texts.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
root="$(cd "$here/../.." && pwd)"

die() { echo "submit_sweep.sh: $*" >&2; exit 2; }

cpus=4 task_minutes=60 max_tasks=200 tasks="" safety=2 min_minutes=10 mem="" output=""
murk="$root/build/murk" dry_run=0 rerun=0
sbatch_extra=()
positional=()
while [ $# -gt 0 ]; do
  case "$1" in
    --cpus) cpus="${2:?--cpus needs a value}"; shift 2 ;;
    --task-minutes) task_minutes="${2:?--task-minutes needs a value}"; shift 2 ;;
    --max-tasks) max_tasks="${2:?--max-tasks needs a value}"; shift 2 ;;
    --tasks) tasks="${2:?--tasks needs a value}"; shift 2 ;;
    --safety) safety="${2:?--safety needs a value}"; shift 2 ;;
    --min-minutes) min_minutes="${2:?--min-minutes needs a value}"; shift 2 ;;
    --mem) mem="${2:?--mem needs a value}"; shift 2 ;;
    --output) output="${2:?--output needs a value}"; shift 2 ;;
    --murk) murk="${2:?--murk needs a value}"; shift 2 ;;
    --dry-run) dry_run=1; shift ;;
    --rerun) rerun=1; shift ;;
    --) shift; sbatch_extra=("$@"); break ;;
    -h|--help) sed -n '2,/^set -euo/p' "${BASH_SOURCE[0]}" | sed -e '$d' -e 's/^# \{0,1\}//'; exit 0 ;;
    -*) die "unknown option $1 (see --help)" ;;
    *) positional+=("$1"); shift ;;
  esac
done

whole() { [[ "$1" =~ ^[0-9]+$ ]] && [ "$1" -ge "$2" ] || die "$3: '$1' is not a whole number of at least $2"; }
number() { [[ "$1" =~ ^[0-9]*\.?[0-9]+$ ]] || die "$2: '$1' is not a positive number"; }
whole "$cpus" 1 --cpus; whole "$max_tasks" 1 --max-tasks; whole "$min_minutes" 1 --min-minutes
number "$task_minutes" --task-minutes; number "$safety" --safety
[ -z "$tasks" ] || whole "$tasks" 1 --tasks
[ -z "$mem" ] || whole "$mem" 0 --mem

# The job ids from `sbatch --parsable` ("ID" or "ID;CLUSTER"); in a dry run a
# placeholder, and the command is printed instead (on fd 3, this script's own
# output: the function's output is the id).
exec 3>&1
submit() {
  if [ "$dry_run" -eq 1 ]; then
    { printf 'sbatch'; printf ' %q' "$@"; printf '\n'; } >&3
    echo "<job id>"
    return
  fi
  local id
  id="$(sbatch --parsable "$@")" || die "sbatch failed: sbatch $*"
  echo "${id%%;*}"
}

# The array of the given shares and the merge after it; records the job ids.
submit_jobs() {  # ARRAY_SPEC
  local common=(--chdir="$dir" --time="$minutes" "${sbatch_extra[@]}")
  [ "$mem_mib" -gt 0 ] && common+=(--mem="${mem_mib}M")
  # %a in the log name is the task id, so each share keeps its own log.
  array_job="$(submit --array="$1" --cpus-per-task="$cpus" --output="$dir/logs/share-%a.log" "${common[@]}" \
    "$here/share_task.sh" "$murk" "$case_file" "$dir" "$shares")"
  # The merge reads the parts one point at a time: one CPU, and the same time
  # limit as a task (reading a point costs far less than computing it).
  merge_job="$(submit --dependency="afterok:$array_job" --kill-on-invalid-dep=yes --cpus-per-task=1 \
    --output="$dir/logs/merge-%j.log" "${common[@]}" "$here/merge_task.sh" "$murk" "$dir" "$shares" "$dir/$output")"
  echo "array job: $array_job (tasks $1 of $shares)"
  echo "merge job: $merge_job (starts when every task has succeeded)"
  echo "result:    $dir/$output"
  if [ "$dry_run" -eq 0 ]; then
    # Appended, so that the last submission's ids win when the file is read back.
    printf 'array_job=%q\nmerge_job=%q\n' "$array_job" "$merge_job" >> "$dir/submission"
  fi
}

if [ "$rerun" -eq 1 ]; then
  # ---- --rerun DIR: the unfinished shares of an earlier submission, and a new merge.
  [ ${#positional[@]} -eq 1 ] || die "usage: submit_sweep.sh --rerun DIR"
  dir="$(cd "${positional[0]}" 2> /dev/null && pwd)" || die "${positional[0]}: no such directory"
  [ -r "$dir/submission" ] || die "$dir: no submission of submit_sweep.sh there (no $dir/submission)"
  # The settings of the first submission: murk, case_file, shares, cpus, minutes,
  # mem_mib, output, sbatch_extra, then the job ids of each submission.
  # Options after -- on this command line come after the first submission's, so
  # they win where sbatch reads an option twice: `--rerun DIR -- --time=240`
  # gives the resubmitted tasks and the merge a longer limit.
  extra_now=("${sbatch_extra[@]}")
  # shellcheck source=/dev/null
  . "$dir/submission"
  sbatch_extra+=("${extra_now[@]}")
  # A job of the last submission still queued or running would race with the
  # rerun (a task writing the part that a new task resumes): wait for it instead.
  if [ "$dry_run" -eq 0 ]; then
    queue="$(squeue -h -u "$(id -un)" -o '%F %A')" || die "squeue failed: cannot tell whether the last submission still runs"
    queued="$(awk -v a="$array_job" -v m="$merge_job" '$1 == a || $2 == m' <<< "$queue")"
    [ -z "$queued" ] || die "jobs of the last submission ($array_job, $merge_job) are still in the queue; wait until they end or scancel them"
  fi
  missing=()
  for ((k = 1; k <= shares; ++k)); do [ -e "$dir/part-$k.h5" ] || missing+=("$k"); done
  if [ ${#missing[@]} -eq 0 ]; then
    [ -e "$dir/$output" ] && { echo "every share is complete and $dir/$output exists: nothing to do"; exit 0; }
    # Only the merge is missing: an array of one task that finds its part
    # complete and exits keeps the submission's shape (array, then merge).
    missing=(1)
  fi
  list="$(IFS=,; echo "${missing[*]}")"
  echo "rerunning shares $list of $shares (a share with a journal resumes)"
  submit_jobs "$list"
  exit 0
fi

# ---- a new submission
[ ${#positional[@]} -eq 2 ] || die "usage: submit_sweep.sh [options] CASE.toml DIR [-- SBATCH_OPTIONS...] (see --help)"
[ -r "${positional[0]}" ] || die "${positional[0]}: no such file"
case_file="$(realpath "${positional[0]}")"
[ -x "$murk" ] || die "$murk: not an executable murk (build it, or give --murk PATH)"
murk="$(realpath "$murk")"
[ -n "$output" ] || output="$(basename "${case_file%.toml}").h5"
[[ "$output" != */* ]] || die "--output: '$output' is a name in DIR, not a path"
dir="$(realpath -m "${positional[1]}")"
[ ! -e "$dir/submission" ] || [ "$dry_run" -eq 1 ] \
  || die "$dir already holds a submission; use --rerun $dir to finish it, or another directory"

estimate="$("$murk" run "$case_file" --estimate --threads "$cpus")" || die "murk run --estimate failed (above)"

# The estimate's lines (cases/sweep/sweep_estimate.cpp):
#   points:  45 in all: 40 exact, 0 dipole, 0 full re-solve, 5 masked
#   memory:  about 38 MiB
#   time:    about 1.2 min on 4 threads: fixed part 3.1 s, points 1.1 min
# Durations are in s, min or h; memory in KiB, MiB or GiB. Each is turned into
# seconds or MiB here; a line not found stops the script rather than guess.
times="$(awk '
  function sec(v, u) { return u == "h" ? v * 3600 : (u == "min" ? v * 60 : v) }
  /^time:/ { gsub(/,/, ""); for (i = 1; i < NF - 1; ++i) {
      if ($i == "part") { f = sec($(i + 1), $(i + 2)); nf++ }
      if ($i == "points") { p = sec($(i + 1), $(i + 2)); np++ } }
    if (nf == 1 && np == 1) printf "%.1f %.1f\n", f, p }' <<< "$estimate")"
read -r fixed_s points_s <<< "$times" || true
est_mib="$(awk '/^memory:/ { u = $4; v = $3
  print (u == "GiB" ? v * 1024 : (u == "KiB" ? v / 1024 : v)) }' <<< "$estimate")"
units="$(awk '/^points:/ { for (i = 1; i <= NF; ++i) {
      if ($(i + 1) == "exact,") e = $i
      if ($(i + 1) == "dipole,") d = $i
      if ($(i + 1) == "full") f = $i }
    print e + f + int((d + 127) / 128) }' <<< "$estimate")"
[ -n "${fixed_s:-}" ] && [ -n "${points_s:-}" ] && [ -n "${est_mib:-}" ] && [ -n "${units:-}" ] \
  || die "could not read murk's estimate: $estimate"

if [ -z "$tasks" ]; then
  shares="$(awk -v f="$fixed_s" -v p="$points_s" -v a="$task_minutes" -v most="$max_tasks" -v u="$units" 'BEGIN {
    budget = a * 60 - f; if (budget < f) budget = f
    n = (budget > 0) ? int(p / budget) : 1; if (n * budget < p) n += 1
    if (u < most) most = u
    if (n > most) n = most
    if (n < 1) n = 1
    print n }')"
  how="from the estimate: tasks of about $task_minutes min aimed at, at most $max_tasks, $units work units"
else
  shares="$tasks"
  how="given by --tasks"
fi
sizes="$(awk -v f="$fixed_s" -v p="$points_s" -v n="$shares" -v s="$safety" -v lo="$min_minutes" 'BEGIN {
  t = f + p / n
  m = int((s * t + 120) / 60); if (m * 60 < s * t + 120) m += 1
  if (m < lo) m = lo
  printf "%.1f %d\n", t, m }')"
read -r task_s minutes <<< "$sizes"
if [ -z "$mem" ]; then
  mem_mib="$(awk -v m="$est_mib" 'BEGIN { x = 1.25 * m + 256; printf "%d\n", (x == int(x)) ? x : int(x) + 1 }')"
else
  mem_mib="$mem"
fi

plan="$(cat <<PLAN
case:      $case_file
murk:      $murk
estimate on $(hostname) for $cpus thread(s) per task:
$(sed 's/^/  /' <<< "$estimate")
tasks:     $shares ($how)
each task: about $task_s s estimated (fixed part $fixed_s s + points $points_s s / $shares)
limit:     $minutes min per task ($safety x estimate + 2 min, at least $min_minutes min)
memory:    $( [ "$mem_mib" -gt 0 ] && echo "$mem_mib MiB per task" || echo "the cluster's default")
PLAN
)"
echo "$plan"
if [ "$dry_run" -eq 0 ]; then
  mkdir -p "$dir/logs"
  echo "$plan" > "$dir/plan.txt"
  # The settings, in a form the shell reads back (--rerun).
  {
    printf 'murk=%q\ncase_file=%q\nshares=%q\ncpus=%q\nminutes=%q\nmem_mib=%q\noutput=%q\n' \
      "$murk" "$case_file" "$shares" "$cpus" "$minutes" "$mem_mib" "$output"
    printf 'sbatch_extra=('; for o in "${sbatch_extra[@]}"; do printf ' %q' "$o"; done; printf ' )\n'
  } > "$dir/submission"
fi
submit_jobs "1-$shares"
