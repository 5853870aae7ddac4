#!/usr/bin/env bash
# Measures how a sweep scales over the ways murk spreads it: threads in one process,
# shares of a job array (--shard K/N, then murk merge), and MPI ranks. Prints one row
# per arrangement: wall time, CPU time (user + system of every process involved),
# and the parallel efficiency against one process on one thread,
#   efficiency = T(1 process, 1 thread) / (workers x wall time),
# where workers = processes x threads. Array tasks are run one after another here, as
# if each had a node of its own: their "wall" is the longest task plus the merge.
# Then merges a large map (20,000 dipole points on a fish of about 800 panels, read at
# every panel) from 4 parts and prints the merge time and its rate.
#
# Usage: bash tools/bench/cluster_scaling.sh [BUILD_DIR]   (default build/; needs
# murk built with MPI and mpirun). About 6 minutes on two cores. Say whether the
# machine was quiet when you quote the figures.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
murk="$(cd "${1:-$root/build}" && pwd)/murk"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
export OMP_WAIT_POLICY=passive
export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1   # for root, as on CI machines
mpi=(mpirun --oversubscribe --bind-to none)

# The benchmark map: the fish of tools/bench/fish_grid.toml on a 20 x 10 grid, exact path.
sed -e 's/^u = .*/u = { from = "-9 cm", to = "9 cm", count = 20 }/' \
    -e 's/^v = .*/v = { from = "1.5 cm", to = "6 cm", count = 10 }/' \
    "$root/tools/bench/fish_grid.toml" > "$work/map.toml"
# The large map for the merge: a coarser fish, 200 x 100 positions, induced dipoles.
sed -e 's/^panel_size = .*/panel_size = "6 mm"/' \
    -e 's/^u = .*/u = { from = "-9 cm", to = "9 cm", count = 200 }/' \
    -e 's/^v = .*/v = { from = "1.5 cm", to = "6 cm", count = 100 }/' \
    -e 's/^object = "prey"/object = "prey"\nmethod = "dipole"/' \
    "$root/tools/bench/fish_grid.toml" > "$work/large.toml"

# timed LABEL COMMAND...: runs COMMAND quietly, adds its wall and CPU seconds to WALL and CPU.
timed() {
  local label="$1"; shift
  /usr/bin/time -f "%e %U %S" -o "$work/time" "$@" > "$work/$label.log" 2>&1 ||
    { echo "cluster_scaling: $label failed:"; tail -5 "$work/$label.log"; exit 1; }
  read -r w u s < "$work/time"
  WALL=$(awk -v a="$WALL" -v b="$w" 'BEGIN { print a + b }')
  CPU=$(awk -v a="$CPU" -v u="$u" -v s="$s" 'BEGIN { print a + u + s }')
  LAST=$w
}

row() {  # row ARRANGEMENT WORKERS WALL CPU
  awk -v name="$1" -v n="$2" -v w="$3" -v c="$4" -v t1="$T1" \
    'BEGIN { printf "%-44s %7d %9.1f %9.1f %10.2f\n", name, n, w, c, t1 / (n * w) }'
}

echo "cluster_scaling: $(nproc) cores, $(date -u +%Y-%m-%dT%H:%MZ), load average $(cut -d' ' -f1-3 /proc/loadavg)"
"$murk" run "$work/map.toml" --estimate --threads 1 | sed 's/^/  estimate: /' | head -4
printf '%-44s %7s %9s %9s %10s\n' "arrangement (benchmark map, 200 exact points)" workers "wall (s)" "CPU (s)" efficiency

WALL=0; CPU=0; T1=1
timed one_thread "$murk" run "$work/map.toml" -o "$work/one.h5" --threads 1 --quiet
T1=$WALL; row "1 process x 1 thread" 1 "$WALL" "$CPU"

WALL=0; CPU=0
timed two_threads "$murk" run "$work/map.toml" -o "$work/two.h5" --threads 2 --quiet
row "1 process x 2 threads" 2 "$WALL" "$CPU"

# Two array tasks, each on its own (here: one after the other), then the merge.
WALL=0; CPU=0; longest=0
for k in 1 2; do
  timed "share$k" "$murk" run "$work/map.toml" -o "$work/part-$k.h5" --shard "$k/2" --threads 1 --quiet
  longest=$(awk -v a="$longest" -v b="$LAST" 'BEGIN { print (b > a ? b : a) }')
done
timed merge "$murk" merge "$work/part-1.h5" "$work/part-2.h5" -o "$work/merged.h5"
merge_small=$LAST
row "2 array tasks x 1 thread, + merge" 2 "$(awk -v a="$longest" -v b="$merge_small" 'BEGIN { print a + b }')" "$CPU"

WALL=0; CPU=0
timed mpi2 "${mpi[@]}" -np 2 "$murk" run "$work/map.toml" -o "$work/mpi2.h5" --threads 1 --quiet
row "2 MPI ranks x 1 thread" 2 "$WALL" "$CPU"

WALL=0; CPU=0
timed mpi1 "${mpi[@]}" -np 1 "$murk" run "$work/map.toml" -o "$work/mpi1.h5" --threads 2 --quiet
row "1 MPI rank x 2 threads" 2 "$WALL" "$CPU"
echo "  (sharing overhead: each share and each rank assembles and factors the body again;"
echo "   the merge of the two parts took ${merge_small} s)"

# The large map: 4 parts computed, then merged (the merge alone is timed).
for k in 1 2 3 4; do
  "$murk" run "$work/large.toml" -o "$work/large-$k.h5" --shard "$k/4" --threads 2 --quiet > "$work/large-$k.log" 2>&1 ||
    { echo "cluster_scaling: large share $k failed:"; tail -5 "$work/large-$k.log"; exit 1; }
done
WALL=0; CPU=0
timed large_merge "$murk" merge "$work"/large-[1-4].h5 -o "$work/large.h5"
bytes=$(stat -c %s "$work/large.h5")
parts=$(du -cb "$work"/large-[1-4].h5 | tail -1 | cut -f1)
awk -v w="$WALL" -v b="$bytes" -v p="$parts" 'BEGIN {
  printf "merge of a large map: 20000 points x 1 water, 4 parts (%.0f MB in all) into %.0f MB in %.1f s (%.0f points/s, %.0f MB/s read)\n",
         p / 1e6, b / 1e6, w, 20000 / w, p / 1e6 / w }'
