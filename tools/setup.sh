#!/usr/bin/env bash
# Shared set-up of murk on Debian 12: installs the Debian packages that are
# missing (apt-get update first), configures a Release build in build/ and
# builds it. Idempotent: a second run installs nothing and rebuilds only what
# changed. Sourced by tools/demo.sh and tools/test.sh; packages given as arguments
# (test-only ones, from tools/test.sh) are installed too.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"

packages=(build-essential cmake libeigen3-dev libboost-dev libhdf5-dev hdf5-tools libcli11-dev
          doctest-dev libtomlplusplus-dev libudunits2-dev libssl-dev libopenblas-dev liblapacke-dev
          libopenmpi-dev openmpi-bin zlib1g-dev
          python3 python3-h5py python3-numpy python3-matplotlib python3-meshio "$@")
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing ${missing[*]}"
  sudo_cmd=""
  [ "$(id -u)" -ne 0 ] && sudo_cmd="sudo"
  $sudo_cmd apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo_cmd apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi

cmake -S "$root" -B "$root/build" -DCMAKE_BUILD_TYPE=Release > "$root/build-configure.log" 2>&1 \
  || { cat "$root/build-configure.log"; exit 1; }
cmake --build "$root/build" -j "$(nproc)"
