#!/usr/bin/env bash
# The cluster scripts (tools/cluster/) against a real Slurm: this test starts
# munged and a one-node Slurm (slurmctld and slurmd) of its own, everything in a
# scratch directory, and submits a sweep with tools/cluster/submit_sweep.sh as a
# job array of 3 shares plus a dependent merge. While the array runs, share 1 is
# requeued (`scontrol requeue`: Slurm restarts it by itself) and share 2 is
# cancelled as a wall-time limit would kill it. Then:
#   - the requeued share resumed from its journal (its log says so) and finished;
#   - the merge never ran: its afterok dependency failed with share 2;
#   - `submit_sweep.sh --rerun DIR` resubmitted share 2 alone, which resumed, and
#     a new merge, whose result equals a single-process run of the same case in
#     every dataset under /sweep, /detection and /falloff (h5py, value for value).
# Before that, dry runs check the sizing from the estimate: one task when the
# aimed task length exceeds the sweep, several but at most --max-tasks when it is
# short, and the time limit against the task's estimated time; the real
# submission checks that Slurm got the planned time limit, CPUs and dependency.
#
# Needs root, munge and slurm-wlm (tools/test.sh installs them). If the daemons
# cannot start the test fails with the reason and the daemons' logs; it never
# passes without running the array. It uses its own munge key and socket, its
# own ports (free ones, chosen at start) and its own state, spool, log and pid
# files, so a munged or Slurm already running on the machine is left alone. It
# stops the daemons it started by their process ids and removes its scratch.
# The case: cases/examples/fish_map.toml on a finer grid (17 x 9 points) and
# finer panels (6 mm), so that each share runs for a few seconds and can be
# interrupted part-way; the whole test takes about a minute on 2 cores.
# Usage: slurm_array.sh MURK SOURCE_DIR
set -uo pipefail
murk="$(realpath "$1")"; src="$(realpath "$2")"
py=/usr/bin/python3
submit="$src/tools/cluster/submit_sweep.sh"
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }

# A Slurm job around this test (ctest run inside an allocation) must not leak
# its job ids and options into the commands below.
while read -r v; do unset "$v"; done < <(compgen -e | grep -E '^(SLURM|SBATCH|SALLOC|SRUN)_')

dir="" munged_pid="" ctld_pid="" slurmd_pid="" whole_pid=""
alive() { [ -n "$1" ] && kill -0 "$1" 2> /dev/null; }
stop_pid() {  # NAME PID: SIGTERM, up to 20 s to exit, then SIGKILL (a failure)
  alive "$2" || return 0
  kill -TERM "$2" 2> /dev/null
  for _ in $(seq 1 80); do alive "$2" || { wait "$2" 2> /dev/null; return 0; }; sleep 0.25; done
  fail "$1 (pid $2) did not stop on SIGTERM within 20 s; killed"
  kill -KILL "$2" 2> /dev/null; wait "$2" 2> /dev/null
}
pids_named() {  # NAME: the processes whose command name is NAME (from /proc: procps may be absent)
  local d c
  for d in /proc/[0-9]*; do
    read -r c 2> /dev/null < "$d/comm" && [ "$c" = "$1" ] && echo "${d#/proc/}"
  done
}
our_stepds() {
  local p
  for p in $(pids_named slurmstepd); do
    tr '\0' '\n' 2> /dev/null < "/proc/$p/environ" | grep -qxF "SLURM_CONF=$dir/slurm.conf" && echo "$p"
  done
}
stop_cluster() {
  if alive "$ctld_pid"; then
    # Jobs first, while slurmd can still end their processes: cancel every job
    # of this cluster (SLURM_CONF names only ours) and give them 30 s to go.
    scancel --quiet $(squeue -h -o %A 2> /dev/null) 2> /dev/null
    for _ in $(seq 1 60); do [ -z "$(squeue -h -o %A 2> /dev/null)" ] && break; sleep 0.5; done
    # Any process of a job still on the node, by the pids slurmd reports.
    if alive "$slurmd_pid"; then
      for p in $(scontrol listpids 2> /dev/null | awk '$1 ~ /^[0-9]+$/ { print $1 }'); do
        fail "job process $p still running after the jobs were cancelled; killed"; kill -KILL "$p" 2> /dev/null
      done
    fi
  fi
  # Each job's slurmstepd leaves slurmd (its parent is init) and exits a moment
  # after its job. Ours are those started with this cluster's SLURM_CONF in their
  # environment: wait for them, and kill by pid one still there after 20 s.
  if [ -n "$dir" ]; then
    for _ in $(seq 1 80); do [ -z "$(our_stepds)" ] && break; sleep 0.25; done
    for p in $(our_stepds); do fail "slurmstepd $p still runs 20 s after its job; killed"; kill -KILL "$p" 2> /dev/null; done
  fi
  stop_pid slurmd "$slurmd_pid"; slurmd_pid=""
  stop_pid slurmctld "$ctld_pid"; ctld_pid=""
  stop_pid munged "$munged_pid"; munged_pid=""
}
cleanup() {
  alive "$whole_pid" && kill -KILL "$whole_pid" 2> /dev/null
  stop_cluster
  [ -n "$dir" ] && rm -rf "$dir"
}
trap cleanup EXIT
# A daemon that could not start: say why, show its log, and stop here (FAIL).
cannot_start() {
  echo "FAIL $*"
  # munged and the Slurm daemons in the foreground write their logs to the
  # .out files too; a daemon's log file is shown when it has one.
  for f in munged slurmctld slurmd; do
    for g in "$dir/log/$f.log" "$dir/$f.out"; do
      [ -s "$g" ] && { echo "---- $g (last lines)"; tail -n 15 "$g"; break; }
    done
  done
  exit 1
}

# ---- what the test needs; none of it missing may make it pass
[ "$(id -u)" -eq 0 ] || cannot_start "this test starts munged and Slurm daemons and needs root (CI runs as root)"
for c in munged mungekey munge unmunge setpriv slurmctld slurmd sbatch squeue scontrol sinfo scancel; do
  command -v "$c" > /dev/null || cannot_start "$c not found: install the Debian packages munge and slurm-wlm (tools/test.sh does)"
done
id munge > /dev/null 2>&1 || cannot_start "no user 'munge' (the munge package creates it)"
for d in munged slurmctld slurmd; do
  p="$(pids_named "$d" | tr '\n' ' ')"
  [ -z "$p" ] || echo "note: a $d is already running (pid $p); this test uses its own socket, key, ports and files and leaves it alone"
done

dir="$(mktemp -d /tmp/murk-slurm.XXXXXX)" || cannot_start "no scratch directory"
chmod 755 "$dir"  # munged runs as the user munge and must reach its socket inside
cd "$dir" || exit 1

# ---- the case, and the single-process run to compare with (in the background
# while the daemons start)
sed -e 's/^panel_size = "8 mm".*/panel_size = "6 mm"/' -e 's/count = 9 }/count = 33 }/' -e 's/count = 5 }/count = 9 }/' \
  "$src/cases/examples/fish_map.toml" > case.toml
grep -q 'count = 33 }' case.toml && grep -q 'count = 9 }' case.toml && grep -q '^panel_size = "6 mm"' case.toml \
  || cannot_start "the edit of cases/examples/fish_map.toml did not apply (its grid or panel size changed?)"
"$murk" run case.toml -o whole.h5 --threads 1 --quiet 2> whole.err & whole_pid=$!

# ---- the sizing, without Slurm (--dry-run prints the plan and the sbatch commands)
plan_value() { sed -n "s/^$1: *\([0-9.]*\).*/\1/p" <<< "$2"; }
long="$("$submit" --dry-run --cpus 1 --task-minutes 100000 case.toml "$dir/dry" 2>&1)" \
  || fail "dry run with a long aimed task: $long"
[ "$(plan_value tasks "$long")" = 1 ] || fail "a sweep far shorter than the aimed task length should be one task: $long"
short="$("$submit" --dry-run --cpus 1 --task-minutes 0.001 --max-tasks 4 --min-minutes 1 case.toml "$dir/dry" 2>&1)" \
  || fail "dry run with a short aimed task: $short"
n="$(plan_value tasks "$short")"
# A task aimed at 0.06 s, against points that take seconds: more than one task,
# and no more than --max-tasks.
{ [ -n "$n" ] && [ "$n" -ge 2 ] && [ "$n" -le 4 ]; } || fail "a short aimed task should give 2..4 tasks (--max-tasks 4), got '$n': $short"
limit="$(plan_value limit "$short")"; each="$(sed -n 's/^each task: about \([0-9.]*\) s.*/\1/p' <<< "$short")"
# The limit covers twice the estimated task plus 2 minutes (above the minimum of
# 1 minute here), in whole minutes.
{ [ -n "$limit" ] && [ -n "$each" ] && awk -v m="$limit" -v t="$each" 'BEGIN { exit !(m == int(m) && m * 60 >= 2 * t + 120) }'; } \
  || fail "time limit '$limit' min below 2 x '$each' s + 2 min: $short"
grep -q -- "--array=1-$n .*--cpus-per-task=1 .*--time=$limit " <<< "$short" \
  || fail "the dry run's array command lacks --array=1-$n, --cpus-per-task=1 or --time=$limit: $short"
grep -q -- "--dependency=afterok:.*merge_task.sh" <<< "$short" || fail "the dry run's merge command has no afterok dependency: $short"
[ ! -e "$dir/dry" ] || fail "a dry run created its directory"
echo "ok   sizing: 1 task for a long aim; $n tasks (at most 4) of $limit min for a short one"

# ---- munged: own key, socket, pid, log and seed files, as the user munge
mkdir -m 700 munge && mkdir -m 755 munge-socket && chown munge:munge munge munge-socket || cannot_start "munge directories"
mungekey --create --keyfile="$dir/munge/munge.key" && chown munge:munge munge/munge.key || cannot_start "mungekey could not make a key"
socket="$dir/munge-socket/munge.socket"
setpriv --reuid=munge --regid=munge --init-groups munged --foreground --socket="$socket" \
  --key-file="$dir/munge/munge.key" --pid-file="$dir/munge/munged.pid" --log-file="$dir/munge/munged.log" \
  --seed-file="$dir/munge/munged.seed" > munged.out 2>&1 & munged_pid=$!
for _ in $(seq 1 80); do
  munge -n --socket="$socket" 2> /dev/null | unmunge --socket="$socket" > /dev/null 2>&1 && break
  alive "$munged_pid" || cannot_start "munged exited"
  sleep 0.25
done
munge -n --socket="$socket" | unmunge --socket="$socket" > /dev/null 2>&1 || cannot_start "munged did not answer within 20 s"

# ---- slurmctld and slurmd: one node of 2 CPUs, one partition, no accounting
node="$(hostname -s)"
read -r ctld_port slurmd_port < <("$py" -c '
import socket
s = [socket.socket() for _ in range(2)]
for x in s: x.bind(("127.0.0.1", 0))
print(*[x.getsockname()[1] for x in s])')
[ -n "$slurmd_port" ] || cannot_start "no free ports"
mem_mib=$(awk '/^MemTotal:/ { print int($2 / 1024) }' /proc/meminfo)
mkdir -p state spool log
cat > slurm.conf << EOF
# A one-node Slurm for tests/cli/slurm_array.sh; every path in its scratch directory.
ClusterName=murktest
# The node and the controller at 127.0.0.1: no name resolution needed.
SlurmctldHost=$node(127.0.0.1)
SlurmctldPort=$ctld_port
SlurmdPort=$slurmd_port
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$socket
# No cgroups: processes tracked by their parents, tasks not bound.
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
JobAcctGatherType=jobacct_gather/none
MpiDefault=none
StateSaveLocation=$dir/state
SlurmdSpoolDir=$dir/spool
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/log/slurmctld.log
SlurmdLogFile=$dir/log/slurmd.log
# The node is usable as soon as it registers; a stop sends SIGTERM, then
# SIGKILL after 5 s (murk stops within a point).
ReturnToService=2
KillWait=5
# The node as written here, whatever the machine has (CI machines may differ).
SlurmdParameters=config_overrides
NodeName=$node NodeAddr=127.0.0.1 CPUs=2 RealMemory=$mem_mib State=UNKNOWN
PartitionName=murk Nodes=$node Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF="$dir/slurm.conf"
slurmctld -D -c -f "$SLURM_CONF" > slurmctld.out 2>&1 & ctld_pid=$!
slurmd -D -c -f "$SLURM_CONF" -N "$node" > slurmd.out 2>&1 & slurmd_pid=$!
# The node shows unk* until slurmd registers, which can take a while on a busy
# machine; a node that came up down is resumed, every 10 s.
state=""
for i in $(seq 1 240); do
  alive "$ctld_pid" || cannot_start "slurmctld exited"
  alive "$slurmd_pid" || cannot_start "slurmd exited"
  state="$(sinfo -h -N -n "$node" -o %T 2> /dev/null | head -n 1)"
  case "$state" in idle|mixed|allocated) break ;; esac
  if [ $((i % 40)) -eq 0 ] && [[ "$state" == down* || "$state" == drain* ]]; then
    scontrol update nodename="$node" state=resume 2> /dev/null
  fi
  sleep 0.25
done
case "$state" in idle|mixed|allocated) echo "ok   one-node Slurm up: node $node $state (${SECONDS} s)" ;;
  *) cannot_start "the node did not become idle within 60 s (state '$state')" ;; esac

# ---- the submission: 3 shares of 1 CPU, and the merge
wait_for_jobs() {  # ARRAY MERGE SECONDS: until neither is pending or running
  local end=$((SECONDS + $3))
  while [ $SECONDS -lt $end ]; do
    [ -z "$(squeue -h -o '%F %A' | awk -v a="$1" -v m="$2" '$1 == a || $2 == m')" ] && return 0
    sleep 0.5
  done
  return 1
}
job_state() { scontrol show job "$1" 2> /dev/null | sed -n 's/.*JobState=\([A-Z_]*\).*/\1/p' | head -n 1; }
points_in() { "$murk" inspect "$1" 2> /dev/null | sed -n 's/^points: *\([0-9]*\) of .*/\1/p'; }

out="$("$submit" --cpus 1 --tasks 3 --murk "$murk" case.toml "$dir/run" 2>&1)" || cannot_start "submit_sweep.sh failed: $out"
echo "$out" | sed -n '/^tasks:/,$p'
array="$(sed -n 's/^array job: *\([0-9]*\).*/\1/p' <<< "$out")"
merge="$(sed -n 's/^merge job: *\([0-9]*\).*/\1/p' <<< "$out")"
limit="$(plan_value limit "$out")"
{ [ -n "$array" ] && [ -n "$merge" ] && [ -n "$limit" ]; } || cannot_start "no job ids or limit in the output of submit_sweep.sh"
# What Slurm was given: the planned limit (whole minutes), 1 CPU per task, the dependency.
show="$(scontrol show job "${array}_1")"
grep -q "TimeLimit=$(printf '%02d:%02d:00' $((limit / 60)) $((limit % 60))) " <<< "$show" \
  || fail "task 1's time limit is not the planned $limit min: $(grep -o 'TimeLimit=[^ ]*' <<< "$show")"
grep -q "CPUs/Task=1 " <<< "$show" || fail "task 1 does not have 1 CPU: $(grep -o 'CPUs/Task=[^ ]*' <<< "$show")"
grep -q "Dependency=afterok:${array}_\*" <<< "$(scontrol show job "$merge")" || fail "the merge job does not wait for the array (afterok)"

# ---- interrupt shares 1 and 2 once each has finished a few points. murk commits
# points in batches (up to 16) and a stopped share still finishes its batch, so
# each share has about 100 points: several batches are left when it is stopped,
# and it leaves a journal rather than, by a late stop, its whole part.
run="$dir/run"
for _ in $(seq 1 600); do
  a="$(points_in "$run/part-1.h5.partial")"; b="$(points_in "$run/part-2.h5.partial")"
  [ -n "$a" ] && [ -n "$b" ] && [ "$a" -ge 2 ] && [ "$b" -ge 2 ] && break
  sleep 0.2
done
{ [ -n "$a" ] && [ -n "$b" ] && [ "$a" -ge 2 ] && [ "$b" -ge 2 ]; } \
  || cannot_start "shares 1 and 2 did not both run (journals with 2 points) within 120 s; logs: $(cat "$run"/logs/* 2>&1)"
scontrol requeue "${array}_1" || fail "scontrol requeue of share 1 failed (did it finish before the interruption?)"
scancel "${array}_2" || fail "scancel of share 2 failed"
echo "ok   interrupted share 1 (requeued) at $a points and share 2 (cancelled) at $b points (${SECONDS} s)"
# While the merge waits in the queue, --rerun refuses: a new task would race the old ones.
refusal="$("$submit" --rerun "$run" 2>&1)"; status=$?
{ [ "$status" -eq 2 ] && grep -q "still in the queue" <<< "$refusal"; } \
  || fail "--rerun while the first submission is queued: status $status: $refusal"
# A requeued job is held for about two minutes before it may start again; let it
# start sooner, but only once slurmd has ended the first attempt and a clock
# second has passed: slurmd revokes the job's credential when it ends the attempt
# and refuses a launch whose credential is from the same second ("Job credential
# revoked"), which fails the job. The two-minute hold is what keeps this from
# happening on a real cluster.
share1_id="$(scontrol show job "${array}_1" | sed -n 's/^ *JobId=\([0-9]*\).*/\1/p' | head -n 1)"
released=""
for _ in $(seq 1 240); do
  show="$(scontrol show job "${array}_1" 2> /dev/null)"
  if [ -z "$released" ] && grep -q "JobState=PENDING Reason=BeginTime" <<< "$show" \
     && grep -q "\[$share1_id.batch\] done with job" "$dir/log/slurmd.log" 2> /dev/null; then
    scontrol update jobid="${array}_1" StartTime=now+2 2> /dev/null && released=yes
  elif grep -q "Restarts=[1-9]" <<< "$show" && grep -Eq "JobState=(RUNNING|COMPLETED) " <<< "$show"; then
    break  # restarted (right after the requeue it is still COMPLETING, then PENDING)
  fi
  sleep 0.25
done
wait_for_jobs "$array" "$merge" 240 || cannot_start "the array and its merge were still queued after 240 s: $(squeue)"
[ "$(job_state "${array}_1")" = COMPLETED ] || fail "share 1 after its requeue: $(job_state "${array}_1"), expected COMPLETED"
[ "$(job_state "${array}_3")" = COMPLETED ] || fail "share 3: $(job_state "${array}_3"), expected COMPLETED"
[ "$(job_state "${array}_2")" = CANCELLED ] || fail "share 2: $(job_state "${array}_2"), expected CANCELLED"
grep -q "share 1/3: resuming from .*part-1.h5.partial" "$run/logs/share-1.log" \
  || fail "the requeued share 1 did not resume from its journal: $(cat "$run/logs/share-1.log")"
[ -e "$run/part-1.h5" ] && [ -e "$run/part-3.h5" ] || fail "shares 1 and 3 left no parts: $(ls "$run")"
[ -e "$run/part-2.h5.partial" ] && [ ! -e "$run/part-2.h5" ] || fail "the cancelled share 2 left no journal: $(ls "$run")"
[ "$(job_state "$merge")" = CANCELLED ] || fail "the merge after a failed share: $(job_state "$merge"), expected CANCELLED"
[ ! -e "$run/case.h5" ] || fail "a merge ran although share 2 failed"

# ---- --rerun: share 2 again (it resumes), and a new merge; with a longer time
# limit given after --, as after a wall-time kill
out="$("$submit" --rerun "$run" -- --time=25 2>&1)" || fail "submit_sweep.sh --rerun failed: $out"
echo "$out"
grep -q "^rerunning shares 2 of 3 " <<< "$out" || fail "--rerun should resubmit share 2 alone: $out"
array2="$(sed -n 's/^array job: *\([0-9]*\).*/\1/p' <<< "$out")"
merge2="$(sed -n 's/^merge job: *\([0-9]*\).*/\1/p' <<< "$out")"
if [ -n "$array2" ] && [ -n "$merge2" ]; then
  grep -q "TimeLimit=00:25:00 " <<< "$(scontrol show job "$merge2")" \
    || fail "the rerun's merge did not get the time limit given after --: $(scontrol show job "$merge2" | grep -o 'TimeLimit=[^ ]*')"
  wait_for_jobs "$array2" "$merge2" 240 || fail "the rerun and its merge were still queued after 240 s: $(squeue)"
  [ "$(job_state "$merge2")" = COMPLETED ] || fail "the merge after the rerun: $(job_state "$merge2"): $(cat "$run"/logs/merge-*.log 2>&1)"
  grep -q "share 2/3: resuming from .*part-2.h5.partial" "$run/logs/share-2.log" \
    || fail "the rerun of share 2 did not resume from its journal: $(cat "$run/logs/share-2.log")"
fi

# ---- the merged result against the single-process run
wait "$whole_pid"; status=$?; whole_pid=""
[ "$status" -eq 0 ] || fail "the single-process run: status $status: $(cat whole.err)"
if [ -e "$run/case.h5" ] && [ -e whole.h5 ]; then
  cmp="$("$py" "$src/tests/cli/compare_results.py" "$run/case.h5" whole.h5)" || fail "merged against the single run: $cmp"
  echo "merged by Slurm = single run: $cmp"
else
  fail "no merged result ($run/case.h5) or no single run to compare"
fi

# ---- stop the daemons here (not only at exit) so that one that will not stop fails the test
stop_cluster
echo "done in $SECONDS s, $failures failure(s)"
[ "$failures" -eq 0 ]
