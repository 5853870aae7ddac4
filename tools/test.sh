#!/usr/bin/env bash
# Set up murk (packages, the Release build in build/) and run every test through
# CTest: the doctest unit tests, `murk verify --quick` and the end-to-end
# command-line tests.
# Prints a few lines of progress; the output of each test run is in TREE/test.log.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
source "$root/tools/quiet_step.sh"
cd "$root"

# Two tests run at once on two cores: idle OpenMP threads should sleep, not spin,
# or each test's threads steal the other's cores (a several-fold slowdown).
export OMP_WAIT_POLICY=passive

# run_tests TREE [CTest options...]
run_tests() {
  local tree="$1" log="$1/test.log" start=$SECONDS
  shift
  : > "$log"
  printf 'test: %s/ (output in %s):' "$tree" "$log"
  if ! quiet_step "$log" ctest --test-dir "$tree" --output-on-failure -j 2 "$@"; then
    show_log_tail "$log" "testing $tree/"
    exit 1
  fi
  printf ' %s%s\n' "$(grep -Eo '[0-9]+% tests passed, [0-9]+ tests failed out of [0-9]+' "$log" | tail -n 1)" \
    "$(elapsed "$start")"
}

bash tools/setup.sh
run_tests build

