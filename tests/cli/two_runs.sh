#!/usr/bin/env bash
# Two runs, one output: while a sweep runs, a second `murk run` on the same output is
# refused with exit status 2 and one line naming the live run (its process id and
# host), whatever its flags (none, --force, --resume), and the first run is left to
# finish with every point. Once a run is dead (SIGKILL), its journal is named an
# interrupted run's and --resume takes it over: the lock died with the process.
# Usage: two_runs.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; pid=""
cleanup() { [ -n "$pid" ] && kill -9 "$pid" 2> /dev/null; rm -rf "$dir"; }
trap cleanup EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
cd "$dir" || exit 1
# The demo, its flank zone coarsened: a few seconds on one thread.
sed -e '/^\[\[mesh.zone\]\]/,/^$/s/^panel_size = .*/panel_size = "3 mm"/' \
  "$src/cases/examples/fish_detection.toml" > case.toml

start_run() {  # OUTPUT: a run in the background, once its journal exists
  "$murk" run case.toml -o "$1" --force --quiet --threads 1 2> first.err & pid=$!
  for _ in $(seq 1 200); do
    [ -e "$1.partial" ] && return 0
    kill -0 "$pid" 2> /dev/null || break
    sleep 0.05
  done
  fail "the first run made no journal: $(cat first.err)"
  return 1
}

# refused NAME FLAGS...: a second run on out.h5 while the first is alive
refused() {
  local name="$1"; shift
  "$murk" run case.toml -o out.h5 --quiet "$@" > /dev/null 2> second.err
  local status=$?
  kill -0 "$pid" 2> /dev/null || { fail "$name: the first run ended before the check (too small a case)"; return; }
  if [ "$status" -ne 2 ] || [ "$(wc -l < second.err)" -ne 1 ] ||
     ! grep -qF "is being written by murk process $pid on $(hostname)" second.err; then
    fail "$name: exit $status, message: $(cat second.err)"
  else
    echo "ok   $name: $(cat second.err)"
  fi
}

start_run out.h5 && {
  refused "a second run"
  refused "a second run with --force" --force
  refused "a second run with --resume" --resume
  wait "$pid"; status=$?; pid=""
  [ "$status" -eq 0 ] || fail "the first run: exit $status: $(cat first.err)"
  [ -e out.h5 ] && [ ! -e out.h5.partial ] || fail "the first run did not commit its result"
  computed=$("$murk" inspect out.h5 | sed -n 's/^points: *\([0-9]*\) in all: \([0-9]*\) computed.*/\1 \2/p')
  [ -n "$computed" ] && [ "${computed% *}" = "${computed#* }" ] || fail "not every point computed: '$computed'"
  echo "ok   the first run finished alone: $computed points"
}

start_run dead.h5 && {
  kill -9 "$pid"; wait "$pid" 2> /dev/null; pid=""
  "$murk" run case.toml -o dead.h5 --quiet > /dev/null 2> second.err
  status=$?
  if [ "$status" -ne 2 ] || ! grep -q "holds the points of an interrupted run" second.err; then
    fail "after SIGKILL: exit $status, message: $(cat second.err)"
  else
    echo "ok   after SIGKILL: $(cat second.err)"
  fi
  "$murk" run case.toml -o dead.h5 --quiet --resume 2> second.err || fail "resume after SIGKILL: $(cat second.err)"
  [ -e dead.h5 ] && echo "ok   resumed after SIGKILL"
}
[ "$failures" -eq 0 ]
