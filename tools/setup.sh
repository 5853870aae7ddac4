#!/usr/bin/env bash
# Shared set-up of murk on Debian 12: installs the Debian packages that are
# missing (apt-get update first), configures a Release build in build/ and
# builds it, printing a few lines of progress (the compiler's output goes to
# build/build.log). Idempotent: a second run installs nothing and rebuilds only
# what changed. Run by tools/demo.sh and tools/test.sh; packages given as
# arguments (test-only ones, from tools/test.sh) are installed too.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
source "$root/tools/quiet_step.sh"

packages=(build-essential cmake libeigen3-dev libboost-dev libhdf5-dev hdf5-tools libcli11-dev
          doctest-dev libtomlplusplus-dev libudunits2-dev libssl-dev libopenblas-dev liblapacke-dev
          libopenmpi-dev openmpi-bin zlib1g-dev
          python3 python3-h5py python3-numpy python3-matplotlib python3-meshio "$@")
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  mkdir -p "$root/build"
  log="$root/build/apt.log"
  : > "$log"
  printf 'setup: installing %s (apt output in build/apt.log)' "${missing[*]}"
  sudo_cmd=""
  [ "$(id -u)" -ne 0 ] && sudo_cmd="sudo"
  start=$SECONDS
  if ! quiet_step "$log" $sudo_cmd apt-get update \
     || ! quiet_step "$log" $sudo_cmd env DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends "${missing[@]}"; then
    show_log_tail "$log" "installing Debian packages"
    exit 1
  fi
  printf ' done%s\n' "$(elapsed "$start")"
fi

bash "$root/tools/build_tree.sh" build -DCMAKE_BUILD_TYPE=Release
