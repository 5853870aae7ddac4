#!/usr/bin/env bash
# Set up murk (packages, build) and run every test through CTest: the doctest
# unit tests, `murk verify --quick` and the end-to-end command-line tests.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
bash "$root/tools/setup.sh"
cd "$root/build"
# Two tests run at once on two cores: idle OpenMP threads should sleep, not spin,
# or each test's threads steal the other's cores (a several-fold slowdown).
export OMP_WAIT_POLICY=passive
ctest --output-on-failure -j 2
