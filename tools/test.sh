#!/usr/bin/env bash
# Set up murk (packages, build) and run every test through CTest: the doctest
# unit tests, `murk verify --quick` and the end-to-end command-line tests.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
# Readers the tests exercise: xarray's two netCDF engines, ncdump, ParaView's XDMF reader (headless).
bash "$root/tools/setup.sh" python3-xarray python3-h5netcdf python3-netcdf4 netcdf-bin paraview python3-paraview xvfb xauth slurm-wlm munge
cd "$root/build"
# Two tests run at once on two cores: idle OpenMP threads should sleep, not spin,
# or each test's threads steal the other's cores (a several-fold slowdown).
export OMP_WAIT_POLICY=passive
ctest --output-on-failure -j 2
