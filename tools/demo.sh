#!/usr/bin/env bash
# Set up murk (packages, build) and run the main job on the shipped demo case:
# a prey-detection sweep beside a fish-like body, its summary and its plots.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
bash "$root/tools/setup.sh"
mkdir -p "$root/results"
cd "$root"
# The demo owns results/fish_detection.h5, so it may replace it on a re-run.
build/murk run cases/examples/fish_detection.toml -o results/fish_detection.h5 --force
build/murk inspect results/fish_detection.h5
/usr/bin/python3 tools/plot_results.py results/fish_detection.h5 -o results
echo "demo: map in results/fish_detection.h5 (+ .xdmf for ParaView), plots in results/*.png"
