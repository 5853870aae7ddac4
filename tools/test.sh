#!/usr/bin/env bash
# Set up murk (packages, the Release build in build/) and run every test through
# CTest: the doctest unit tests, `murk verify --quick` and the end-to-end
# command-line tests. This is the README's test command and what CI runs; it keeps
# to about 20 minutes on two cores (2026-12-03, two quiet cores: build 9.5 minutes,
# tests 5.5).
#
#   bash tools/test.sh           # the Release build and every test (CI)
#   bash tools/test.sh --deep    # then also the sanitizer tree and the fuzzer, about
#                                # 40 minutes more: run it before merging changes to
#                                # the readers, the solver's memory handling or any
#                                # index arithmetic
#
# --deep builds the same tests again in build-sanitize/ with AddressSanitizer and
# UndefinedBehaviorSanitizer and with assertions on (CMake build type Sanitize), and
# runs the unit and command-line tests there: the Release build compiles every
# MURK_ASSERT out, this one runs them. Then it fuzzes the file readers.
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

# Besides the build's packages, the programs the tests exercise: xarray's two netCDF engines,
# ncdump, ParaView's XDMF reader (headless), a one-node Slurm with munge.
deep=0
case "${1:-}" in
  "") ;;
  --deep) deep=1 ;;
  *) echo "usage: bash tools/test.sh [--deep]" >&2; exit 2 ;;
esac

bash tools/setup.sh python3-xarray python3-h5netcdf python3-netcdf4 netcdf-bin paraview python3-paraview xvfb xauth \
  slurm-wlm munge
run_tests build
# A whole CI run with the sanitizer tree and the fuzzer took 58 minutes on two cores
# (2026-12-03: Release build 11.6, tests 5.6, sanitizer build 19.5, sanitized tests 17.0,
# fuzz 4.6), three times the budget, so they moved behind --deep.
[ "$deep" -eq 1 ] || exit 0

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
# sanitized: murk verify's checks, --resume, murk inspect on damaged files
# (cli_plot_and_inspect, whose time goes mostly to the Python plots), and murk solve
# on every example (cli_solve_examples, 84 s sanitized; cli_solve_signs runs murk
# solve on direct-current and complex cases under the sanitizers). build/ runs every
# test. A clean clone's whole CI run took 18.7 minutes on two cores with
# cli_solve_examples sanitized, without it about 17 (2026-11); by 2026-12-03, with the layout,
# electrode-cut and placement code, 44 minutes on two quiet cores (build 8, tests 4, sanitizer
# build 12, sanitized tests 16, fuzz 4), and the sanitized tests 10 minutes with the two left
# out below.
# Also left out: the tests that run murk many times over as other programs drive it (thirty
# kills and resumes, two runs racing for one output, MPI ranks, a Slurm array, shares and merge, the netCDF readers and
# ParaView on the demo); the journal, placement, shares and merge code they drive is unit-tested
# under the sanitizers, and build/ runs them all. cli_layout_compare (murk layout on the
# three-layout example, murk solve beside it, xarray) is left out for the same reason: the
# reader, the readout, the sensitivity map and the region it drives are unit-tested sanitized.
# cli_placement_run (murk layout with [placement], twice, on a 2,343-unknown body plus four layouts,
# xarray and the plot: about 35 s in build/ on a busy machine) likewise: the [placement]
# reader and the placement stage are unit-tested sanitized on a small body.
# Also left out, measured on a clean clone on 2 quiet cores (2026-12-03), where the sanitized
# run took 16 minutes of a 42-minute CI: cli_disk_full (403 s sanitized, 11 s in build/: the
# fish demo run again and again under file-size limits; a full disk is then tested in build/
# only) and cli_run_refusals (272 s, 10 s; cli_bad_input runs murk's refusals sanitized, and the
# readers' refusals are unit-tested sanitized).
# cli_solver_choice (murk solve four times, two of them compressed, and xarray: 14 s in build/)
# likewise: the compressed path is unit-tested sanitized (tests/test_compressed_system.cpp,
# tests/test_hmatrix.cpp) and the [mesh] keys by the reader's tests.
# The command-line tests of bounded water and waveforms (cli_plane_distance_axis: 30 s in build/
# on a busy machine, cli_signal_waveform 18 s, cli_tank 13 s, cli_wall_distance_axis 10 s,
# cli_shallow_water 7 s: murk run and
# solve again and again, with kills, shares and xarray) are left out likewise: their readers'
# refusals, the image series, the tank's solver role and refusals, and the waveform's
# decomposition and synthesis are unit-tested sanitized (tests/test_image_series.cpp,
# tests/test_tank.cpp, tests/test_waveform.cpp), and cli_phase_channel runs murk run on a
# complex case. So are the image series' three meshed or entry-wise comparisons (2 to 4 s each
# in build/), whose small cases beside them run sanitized.
# "electrode hulls: the drive current of two rings converges monotonically" solves four dense
# systems of up to 4,536 panels (7 s in build/ on a busy machine, minutes sanitized); the hulls
# it meshes are unit-tested sanitized by the area and quality tests beside it. "patch electrodes:
# drive current and a sensing patch's potential converge monotonically" likewise (four dense
# systems of up to about 4,100 panels, 10 s in build/ on a busy machine); the cut hulls are
# unit-tested sanitized in tests/test_geometry_electrode_cut.cpp.
slow='^(cli_verify_quick|cli_run_methods|cli_run_resume|cli_plot_and_inspect|cli_solve_examples|cli_layout_compare|cli_placement_run'
slow+='|cli_kill_resume|cli_two_runs|cli_mpi_ranks|cli_slurm_array|cli_shard_merge|cli_netcdf_readers|cli_paraview_sidecar'
slow+='|cli_disk_full|cli_run_refusals|cli_solver_choice'
slow+='|cli_plane_distance_axis|cli_wall_distance_axis|cli_signal_waveform|cli_tank|cli_shallow_water'
slow+="|image series: a meshed block of sediment.*|image series: meshed insulating slabs.*"
slow+="|image series: dense and entry-wise assembly agree with sediment images.*"
slow+="|the computed tensor of a rotated prolate spheroid.*|the dipole path approaches the exact path.*"
slow+="|mesh zones: the image of a sphere by the flank converges.*"
slow+="|electrode hulls: the drive current of two rings converges monotonically.*"
slow+="|patch electrodes: drive current and a sensing patch.s potential converge monotonically.*)$"
run_tests build-sanitize -E "$slow"

# The readers under a coverage-guided fuzzer (libFuzzer, clang): about 20 s per reader;
# `bash tools/fuzz.sh 600` searches longer. tests/test_fuzz_findings.cpp replays every
# earlier finding in build/, so the plain run still guards what the fuzzer found.
mkdir -p build-fuzz
printf 'fuzz: the STL, MSH and case-file readers (output in build-fuzz/fuzz.log)'
start=$SECONDS
if ! quiet_step build-fuzz/fuzz.log bash tools/fuzz.sh 20; then
  show_log_tail build-fuzz/fuzz.log "fuzzing"
  exit 1
fi
printf ': no finding%s\n' "$(elapsed "$start")"
