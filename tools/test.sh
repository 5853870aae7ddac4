#!/usr/bin/env bash
# Set up murk (packages, the Release build in build/) and run every test through
# CTest: the doctest unit tests, `murk verify --quick` and the end-to-end
# command-line tests. Then build the same tests again in build-sanitize/ with
# AddressSanitizer and UndefinedBehaviorSanitizer and with assertions on
# (CMake build type Sanitize), and run the unit and command-line tests there:
# the Release build compiles every MURK_ASSERT out, this one runs them.
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
  printf ': %s%s\n' "$(grep -Eo '[0-9]+% tests passed, [0-9]+ tests failed out of [0-9]+' "$log" | tail -n 1)" \
    "$(elapsed "$start")"
}

bash tools/setup.sh
run_tests build

# The sanitizer tree: no benchmarks (they assert nothing and would only cost time),
# and code for any x86-64 rather than this CPU, which compiles about a sixth faster
# under the sanitizers; murk's own code is the same, only Eigen takes its SSE2 paths.
bash tools/build_tree.sh build-sanitize -DCMAKE_BUILD_TYPE=Sanitize -DMURK_BENCHMARKS=OFF -DMURK_NATIVE=OFF
# Under the sanitizers murk runs 15 to 40 times slower. A full sanitized run of every
# test took 24 minutes on two shared cores, 18 of them in the tests left out here.
# Most of what they run is run under the sanitizers by cheaper tests: sweeps and
# their HDF5 output by cli_run_sweep, the exact and dipole paths with one and two
# threads by cli_run_threads, murk solve on every example by cli_solve_examples,
# polarization by a sphere's tensor and the solver by the unit tests. Not run
# sanitized: murk verify's checks, --resume, and murk inspect on damaged files
# (cli_plot_and_inspect, whose time goes mostly to the Python plots). build/ runs
# every test.
slow='^(cli_verify_quick|cli_run_methods|cli_run_resume|cli_plot_and_inspect'
slow+="|the computed tensor of a rotated prolate spheroid.*|the dipole path approaches the exact path.*)$"
run_tests build-sanitize -E "$slow"
