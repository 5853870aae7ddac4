#!/usr/bin/env bash
# Set up murk (packages, build) and run every test through CTest: the doctest
# unit tests, `murk verify --quick` and the end-to-end command-line tests.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
bash "$root/tools/setup.sh"
cd "$root/build"
ctest --output-on-failure -j 2
