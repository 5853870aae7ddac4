#!/usr/bin/env bash
# SIGTERM before a run has anything worth keeping stops it at once, with one line
# and exit status 143 (128 + SIGTERM), leaving no file: `murk run` while the body
# is assembled and factored, and `murk solve` while it solves. (A stop during a
# sweep's points keeps them for --resume: tests/cli/run_resume.sh.)
# The body here is fine enough (2.5 mm panels, over 4,000) that assembling and
# factoring it takes well over a second, so the signal lands in that stage.
# Usage: stop_signals.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; pid=""
cleanup() { [ -n "$pid" ] && kill -9 "$pid" 2> /dev/null; rm -rf "$dir"; }
trap cleanup EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
sed -e 's/^panel_size = .*/panel_size = "2.5 mm"/' "$src/cases/examples/fish_detection.toml" > "$dir/fine.toml"
sed -e 's/^panel_size = .*/panel_size = "2.5 mm"/' "$src/cases/examples/fish_prey.toml" > "$dir/fine_solve.toml"

stop_during() {  # NAME OUTPUT COMMAND...
  local name="$1" out="$2"; shift 2
  "$@" > /dev/null 2> "$dir/err" & pid=$!
  sleep 1.5
  kill -0 "$pid" 2> /dev/null || { fail "$name: finished before the signal (the case is too small for this test)"; return; }
  local t0; t0=$(date +%s%N)
  kill -TERM "$pid"
  wait "$pid"; local status=$?; pid=""
  local ms=$(( ($(date +%s%N) - t0) / 1000000 ))
  [ "$status" -eq 143 ] || fail "$name: exit status $status, expected 143"
  [ "$ms" -lt 2000 ] || fail "$name: took $ms ms to stop"
  [ "$(wc -l < "$dir/err")" -eq 1 ] && grep -q "stopped by a signal" "$dir/err" || fail "$name: message: $(cat "$dir/err")"
  ls "$out"* > /dev/null 2>&1 && fail "$name: left $(ls "$out"*)"
  echo "ok   $name: stopped in $ms ms, nothing left"
}
stop_during "run, during the body's assembly and factorization" "$dir/run.h5" "$murk" run "$dir/fine.toml" -o "$dir/run.h5" --quiet
stop_during "solve, during the solve" "$dir/solve.h5" "$murk" solve "$dir/fine_solve.toml" -o "$dir/solve.h5" --quiet
[ "$failures" -eq 0 ]
