#!/usr/bin/env bash
# The [mesh] solver keys (cases/README.md) reach the result files and the screen: murk solve
# and murk run write system_solver, dense_limit (and the tolerances unless dense) at the root,
# and the solver each system got beside it (cases/RESULT_LAYOUT.md); h5py and xarray read them;
# murk inspect shows them; murk run --estimate says which solver it assumes. A solve routed
# through the compressed choice gives the dense solve's values to within its tolerances. A bad
# value is refused with one line naming file, line and key.
# Usage: solver_choice.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees h5py and xarray
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
examples="$src/cases/examples"

# fish_prey and fish_detection with KEYS added to their [mesh] table.
with_mesh_keys() {  # EXAMPLE OUT KEYS
  sed -e "s/^\[mesh\]\$/[mesh]\n$3/" "$examples/$1.toml" > "$2"
  grep -q "^${3%%\\n*}\$" "$2" || { echo "could not write $2"; exit 1; }
}
with_mesh_keys fish_prey "$dir/dense.toml" 'solver = "dense"\ndense_limit = 1'
with_mesh_keys fish_prey "$dir/compressed.toml" 'solver = "compressed"\ncompression_tolerance = 1e-12\niteration_tolerance = 1e-13\npreconditioner_tolerance = 1e-3'
with_mesh_keys fish_detection "$dir/run.toml" 'dense_limit = 100000'

"$murk" solve "$dir/dense.toml" -o "$dir/dense.h5" > "$dir/dense.log" 2>&1 || { cat "$dir/dense.log"; echo "murk solve dense failed"; exit 1; }
"$murk" solve "$dir/compressed.toml" -o "$dir/compressed.h5" > "$dir/compressed.log" 2>&1 \
  || { cat "$dir/compressed.log"; echo "murk solve compressed failed"; exit 1; }
"$murk" solve "$examples/fish_prey.toml" -o "$dir/default.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; exit 1; }
"$murk" run "$dir/run.toml" -o "$dir/run.h5" --threads 1 > "$dir/run.log" 2>&1 || { cat "$dir/run.log"; echo "murk run failed"; exit 1; }
# An exact-path sweep on a compressed body (one GMRES per point on its whole
# perturbation system, batches one after another with both threads inside)
# against the same sweep on the dense body (the Schur complement against the LU).
with_mesh_keys fish_detection "$dir/sweep_dense.toml" 'solver = "dense"'
with_mesh_keys fish_detection "$dir/sweep_compressed.toml" 'solver = "compressed"\ncompression_tolerance = 1e-11\niteration_tolerance = 1e-12'
sed -i 's/^\[sweep\]$/[sweep]\nmethod = "exact"/' "$dir/sweep_dense.toml" "$dir/sweep_compressed.toml"
grep -q '^method = "exact"$' "$dir/sweep_compressed.toml" || { echo "could not set the sweep method"; exit 1; }
for kind in dense compressed; do
  "$murk" run "$dir/sweep_$kind.toml" -o "$dir/sweep_$kind.h5" --threads 2 --quiet > "$dir/sweep_$kind.log" 2>&1 \
    || { cat "$dir/sweep_$kind.log"; echo "murk run ($kind, exact) failed"; exit 1; }
done

# The start-up lines.
grep -q '^system solver: dense LU, [0-9]* unknowns (solver = "dense", dense_limit = 1)$' "$dir/dense.log" \
  && echo "ok   murk solve prints the dense choice" || fail "murk solve's solver line: $(grep solver "$dir/dense.log")"
grep -q '^system solver: compressed operator .*compression_tolerance = 1e-12, iteration_tolerance = 1e-13, preconditioner_tolerance = 0.001)$' "$dir/compressed.log" \
  && echo "ok   murk solve prints the compressed choice" || fail "murk solve's solver line: $(grep solver "$dir/compressed.log")"
grep -q '^murk: system solver: dense LU, [0-9]* unknowns (solver = "auto", dense_limit = 100000)$' "$dir/run.log" \
  && grep -q '^murk: body system: assembly .*; dense LU$' "$dir/run.log" \
  && echo "ok   murk run prints the solver" || fail "murk run's solver lines: $(grep 'system' "$dir/run.log")"

# The attributes, read by h5py and by xarray (both engines), and the values: the scenes solved
# through the compressed choice agree with the dense solve within 1e-6 of the largest value.
# The electric image is the difference of two solutions about a thousand times larger
# (DEVELOPERS.md, orders of magnitude), so tolerances of 1e-12 and 1e-13 leave it about 1e-9.
"$py" - "$dir" <<'EOF' || fail "attributes or values"
import sys
import h5py
import numpy as np
import xarray as xr

d = sys.argv[1]
bad = []
def check(ok, what):
    print(("ok   " if ok else "FAIL ") + what)
    if not ok:
        bad.append(what)

with h5py.File(f"{d}/dense.h5", "r") as f:
    check(f.attrs["system_solver"] == "dense" and int(f.attrs["dense_limit"]) == 1, "dense: root system_solver, dense_limit")
    check(not any(t in f.attrs for t in ("compression_tolerance", "iteration_tolerance", "preconditioner_tolerance")),
          "dense: no tolerances")
    for g in ("baseline", "perturbed"):
        check(f[g].attrs["system_solver_used"] == "dense" and int(f[g].attrs["system_iterations"]) == 0,
              f"dense: /{g} solved dense although dense_limit is 1")
with h5py.File(f"{d}/compressed.h5", "r") as f:
    check(f.attrs["system_solver"] == "compressed", "compressed: root system_solver")
    check(f.attrs["compression_tolerance"] == 1e-12 and f.attrs["iteration_tolerance"] == 1e-13
          and f.attrs["preconditioner_tolerance"] == 1e-3, "compressed: tolerances")
    for g in ("baseline", "perturbed"):
        used = f[g].attrs["system_solver_used"]
        check(used == "compressed", f"compressed: /{g} says {used}")
        check("compression_ratio" in f[g].attrs and 0 < f[g].attrs["compression_ratio"] <= 1.5,
              f"compressed: /{g} compression_ratio")
        check(int(f[g].attrs["system_iterations"]) > 0, f"compressed: /{g} iterations")
with h5py.File(f"{d}/default.h5", "r") as f:
    check(f.attrs["system_solver"] == "auto" and int(f.attrs["dense_limit"]) == 16000, "default: auto, 16000")
    check(f.attrs["compression_tolerance"] == 1e-7 and f.attrs["iteration_tolerance"] == 1e-10
          and f.attrs["preconditioner_tolerance"] == 1e-4, "default: tolerances")
with h5py.File(f"{d}/run.h5", "r") as f:
    check(f.attrs["system_solver"] == "auto" and int(f.attrs["dense_limit"]) == 100000, "run: root attributes")
    check(f["sweep"].attrs["system_solver_used"] == "dense" and int(f["sweep"].attrs["system_iterations"]) == 0,
          "run: /sweep solved dense")

with h5py.File(f"{d}/dense.h5", "r") as a, h5py.File(f"{d}/compressed.h5", "r") as b:
    for name in ("perturbed/electrodes/potential", "difference/electrodes/potential"):
        if name in a:
            x, y = a[name][...], b[name][...]
            scale = max(np.max(np.abs(x)), 1e-300)
            check(np.max(np.abs(x - y)) <= 1e-6 * scale, f"{name}: compressed choice agrees with dense")
    body = [k for k in a["difference"] if k != "electrodes"][0]
    x, y = a[f"difference/{body}/transdermal_voltage"][...], b[f"difference/{body}/transdermal_voltage"][...]
    check(np.max(np.abs(x - y)) <= 1e-6 * np.max(np.abs(x)), "the electric image: compressed choice agrees with dense")

with h5py.File(f"{d}/sweep_dense.h5", "r") as a, h5py.File(f"{d}/sweep_compressed.h5", "r") as b:
    check(a["sweep"].attrs["system_solver_used"] == "dense" and b["sweep"].attrs["system_solver_used"] == "compressed",
          "exact sweeps: one dense body, one compressed")
    x, y = a["sweep/perturbation"][...], b["sweep/perturbation"][...]
    scale = np.nanmax(np.abs(x))
    check(scale > 0 and np.nanmax(np.abs(x - y)) <= 1e-6 * scale,
          f"exact sweep on the compressed body agrees with the dense one: {np.nanmax(np.abs(x - y)) / scale:.1e}")

for engine in ("h5netcdf", "netcdf4"):
    root = xr.open_dataset(f"{d}/compressed.h5", engine=engine)
    check(root.attrs["system_solver"] == "compressed" and float(root.attrs["iteration_tolerance"]) == 1e-13,
          f"xarray {engine}: root attributes")
    base = xr.open_dataset(f"{d}/dense.h5", engine=engine, group="perturbed")
    check(base.attrs["system_solver_used"] == "dense", f"xarray {engine}: /perturbed system_solver_used")
    sweep = xr.open_dataset(f"{d}/run.h5", engine=engine, group="sweep")
    check(sweep.attrs["system_solver_used"] == "dense" and int(sweep.attrs["system_iterations"]) == 0,
          f"xarray {engine}: /sweep attributes")
sys.exit(1 if bad else 0)
EOF
"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir"/*.h5 || fail "cases/RESULT_LAYOUT.md"

# murk inspect shows the declared choice and what each system got.
"$murk" inspect "$dir/compressed.h5" > "$dir/inspect.txt" 2>&1 || fail "murk inspect: $(cat "$dir/inspect.txt")"
grep -q '^  system solver:  compressed, dense_limit 16000 unknowns, compression_tolerance 1e-12, iteration_tolerance 1e-13, preconditioner_tolerance 0.001$' "$dir/inspect.txt" \
  && grep -q '^solved by: .*(baseline), .*(with the objects)$' "$dir/inspect.txt" \
  && echo "ok   murk inspect shows the solver" || fail "murk inspect: $(grep -i solve "$dir/inspect.txt")"
"$murk" inspect "$dir/run.h5" > "$dir/inspect.txt" 2>&1 || fail "murk inspect run: $(cat "$dir/inspect.txt")"
grep -q '^  system solver:  auto, dense_limit 100000 unknowns' "$dir/inspect.txt" && grep -q '^body system: *dense$' "$dir/inspect.txt" \
  && echo "ok   murk inspect shows the sweep's solver" || fail "murk inspect run: $(grep -i 'solver\|system' "$dir/inspect.txt")"

# murk run --estimate says which solver it assumes; the compressed estimate holds less than the dense one.
with_mesh_keys fish_detection "$dir/est_dense.toml" 'solver = "dense"'
with_mesh_keys fish_detection "$dir/est_compressed.toml" 'solver = "compressed"'
"$murk" run "$dir/est_dense.toml" --estimate > "$dir/est_dense.txt" 2>&1 || fail "--estimate dense: $(cat "$dir/est_dense.txt")"
"$murk" run "$dir/est_compressed.toml" --estimate > "$dir/est_compressed.txt" 2>&1 || fail "--estimate compressed: $(cat "$dir/est_compressed.txt")"
grep -q '^solver: *dense LU' "$dir/est_dense.txt" && grep -q '^solver: *compressed operator' "$dir/est_compressed.txt" \
  && echo "ok   --estimate names the solver it assumes" || fail "--estimate solver lines: $(grep solver "$dir"/est_*.txt)"

# Bad values: one line naming file, line and key, exit status 2.
expect_bad() {  # NAME TEXT CASE
  "$murk" solve "$3" -o "$dir/bad.h5" > /dev/null 2> "$dir/err"
  local status=$? lines; lines=$(wc -l < "$dir/err")
  if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -qF -- "$2" "$dir/err"; then
    fail "$1: status $status, $lines lines: $(cat "$dir/err")"
  else
    echo "ok   $1: $(cat "$dir/err")"
  fi
  [ ! -e "$dir/bad.h5" ] || fail "$1: a result file was written"
}
line=$(grep -n '^\[mesh\]$' "$examples/fish_prey.toml" | cut -d: -f1)
with_mesh_keys fish_prey "$dir/bad1.toml" 'solver = "iterative"'
expect_bad "unknown solver" "bad1.toml:$((line + 1)): mesh.solver: expected one of auto, dense, compressed" "$dir/bad1.toml"
with_mesh_keys fish_prey "$dir/bad2.toml" 'dense_limit = 0'
expect_bad "dense_limit 0" "bad2.toml:$((line + 1)): mesh.dense_limit: expected a whole number from 1" "$dir/bad2.toml"
with_mesh_keys fish_prey "$dir/bad3.toml" 'compression_tolerance = 0.1'
expect_bad "coarse compression_tolerance" "bad3.toml:$((line + 1)): mesh.compression_tolerance: must be a relative tolerance" "$dir/bad3.toml"
with_mesh_keys fish_prey "$dir/bad4.toml" 'iteration_tolerance = 1e-16'
expect_bad "fine iteration_tolerance" "bad4.toml:$((line + 1)): mesh.iteration_tolerance: must be a relative tolerance" "$dir/bad4.toml"
with_mesh_keys fish_prey "$dir/bad5.toml" 'preconditioner_tolerance = 0.7'
expect_bad "coarse preconditioner_tolerance" "bad5.toml:$((line + 1)): mesh.preconditioner_tolerance: must be a relative tolerance between 1e-14 and 0.5" "$dir/bad5.toml"
# The memory check counts the compressed system when that is what will be held.
"$murk" solve "$dir/compressed.toml" -o "$dir/bad.h5" --memory-limit "1 MiB" > /dev/null 2> "$dir/err"
grep -q "(a compressed system of [0-9]* unknowns" "$dir/err" && echo "ok   memory refusal names the compressed system" \
  || fail "memory refusal: $(cat "$dir/err")"

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "solver choice: ok"
