#!/usr/bin/env bash
# How good is `murk run --estimate`? For three body sizes (the fish of
# tools/bench/fish_grid.toml at three panel sizes, 200 exact points each) prints the
# estimated memory and time next to the measured peak memory (resident set, from
# /usr/bin/time) and wall time of the same run, and the relative error of each.
#
# Usage: bash tools/bench/estimate_check.sh [BUILD_DIR] [THREADS]   (default build/, 2)
# About 2 minutes on two cores. The estimate uses reference rates of this kind of
# machine unless murk has measured them; a busy machine makes the runs slower than
# estimated, so say whether it was quiet when you quote the figures.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
murk="$(cd "${1:-$root/build}" && pwd)/murk"
threads="${2:-2}"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
export OMP_WAIT_POLICY=passive

# MiB or GiB as the estimate prints them, in MiB.
to_mib() { awk -v v="$1" -v u="$2" 'BEGIN { print (u == "GiB" ? v * 1024 : v) }'; }

echo "estimate_check: $threads threads, $(date -u +%Y-%m-%dT%H:%MZ), load average $(cut -d' ' -f1-3 /proc/loadavg)"
printf '%-12s %8s | %9s %9s %7s | %8s %8s %7s\n' "panel size" panels "est. MiB" "peak MiB" error "est. s" "wall s" error
for size in 6 4.5 3.1; do
  sed -e "s/^panel_size = .*/panel_size = \"$size mm\"/" \
      -e 's/^u = .*/u = { from = "-9 cm", to = "9 cm", count = 20 }/' \
      -e 's/^v = .*/v = { from = "1.5 cm", to = "6 cm", count = 10 }/' \
      "$root/tools/bench/fish_grid.toml" > "$work/case.toml"
  "$murk" run "$work/case.toml" --estimate --threads "$threads" > "$work/estimate.txt"
  panels=$(sed -n 's/.*unknowns in the fixed part (\([0-9]*\) panels).*/\1/p' "$work/estimate.txt")
  read -r mem unit < <(sed -n 's/^memory: *about \([0-9.]*\) \([MG]iB\).*/\1 \2/p' "$work/estimate.txt")
  est_mib=$(to_mib "$mem" "$unit")
  est_s=$(sed -n 's/^time: *about \([0-9.]*\) s.*/\1/p' "$work/estimate.txt")
  est_min=$(sed -n 's/^time: *about \([0-9.]*\) min.*/\1/p' "$work/estimate.txt")
  [ -n "$est_s" ] || est_s=$(awk -v m="$est_min" 'BEGIN { print m * 60 }')
  /usr/bin/time -f "%e %M" -o "$work/time" "$murk" run "$work/case.toml" -o "$work/out.h5" --force \
    --threads "$threads" --quiet > "$work/run.log" 2>&1 || { tail -5 "$work/run.log"; exit 1; }
  read -r wall peak_kib < "$work/time"
  awk -v s="$size" -v n="$panels" -v em="$est_mib" -v pk="$peak_kib" -v et="$est_s" -v w="$wall" 'BEGIN {
    pm = pk / 1024
    printf "%-12s %8d | %9.0f %9.0f %+6.0f%% | %8.1f %8.1f %+6.0f%%\n", s " mm", n, em, pm, 100 * (em - pm) / pm,
           et, w, 100 * (et - w) / w }'
done
echo "error = (estimate - measured) / measured"
