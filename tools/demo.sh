#!/usr/bin/env bash
# Set up murk (packages, build) and run the main job on the shipped demo case.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
bash "$root/tools/setup.sh"
mkdir -p "$root/results"
cd "$root"
# The demo owns results/fish_prey.h5, so it may replace it on a re-run.
build/murk solve cases/examples/fish_prey.toml -o results/fish_prey.h5 --force
echo "demo: the result is results/fish_prey.h5 (open it with h5py, or: h5ls -r results/fish_prey.h5)"
