#!/usr/bin/env bash
# Configures and builds one CMake build tree of murk, quietly: CMake's and the
# compiler's output go to TREE/build.log and the terminal gets one line with the
# build's percentage. On a failure it shows the end of the log and exits non-zero.
# Usage: build_tree.sh TREE [CMake configure options...]   (TREE relative to the
# repository or absolute). Called by tools/setup.sh and tools/test.sh.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
source "$root/tools/quiet_step.sh"
cd "$root"
tree="$1"
shift
mkdir -p "$tree"
log="$tree/build.log"
: > "$log"
start=$SECONDS

printf 'build: %s/ (compiler output in %s): configuring' "$tree" "$log"
if ! quiet_step "$log" cmake -S "$root" -B "$tree" "$@"; then
  show_log_tail "$log" "configuring $tree/"
  exit 1
fi
printf ', building'
if ! quiet_step "$log" cmake --build "$tree" -j "$(nproc)"; then
  show_log_tail "$log" "building $tree/"
  exit 1
fi
printf ' done%s\n' "$(elapsed "$start")"
# The build is meant to be free of warnings: say so when it is not.
warnings=$(grep -c 'warning:' "$log" || true)
if [ "$warnings" -gt 0 ]; then
  echo "build: $warnings compiler warnings in $tree/, see $log"
fi
