#!/usr/bin/env bash
# murk layout with [placement] on the shipped example (cases/examples/robot_placement.toml, 6 of
# 24 candidate rings): exit 0; /placement opens in xarray with both engines (h5netcdf, netcdf4)
# and every name in it is in cases/RESULT_LAYOUT.md; its numbers agree with each other and with
# /layout_comparison; murk inspect lists the chosen sites; the plotting script draws the
# criterion curve; bad [placement] input is one line with exit status 2 and no file.
# Usage: placement_run.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
example="$src/cases/examples/robot_placement.toml"

"$murk" layout "$example" -o "$dir/placed.h5" --threads 2 > "$dir/out.txt" 2> "$dir/err.txt" \
  || { cat "$dir/err.txt"; echo "murk layout failed"; exit 1; }
grep -q "^placement: 6 of 24 candidates by detectable_area" "$dir/out.txt" && echo "ok   murk layout ran the placement" \
  || fail "murk layout printed no placement line: $(cat "$dir/out.txt")"
"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir/placed.h5" || fail "RESULT_LAYOUT.md"

# xarray, both engines: the group opens, its dimensions are named, and its values are those
# h5py reads.
"$py" - "$dir/placed.h5" <<'PY' || fail "xarray on /placement"
import sys, warnings, h5py, numpy as np, xarray as xr
warnings.simplefilter("ignore")
path = sys.argv[1]
g = h5py.File(path, "r")["placement"]
for engine in ("h5netcdf", "netcdf4"):
    ds = xr.open_dataset(path, group="placement", engine=engine)
    assert list(ds.candidate.values) == [f"c{k:02d}" for k in range(1, 25)], (engine, ds.candidate.values)
    assert ds.greedy_criterion.dims == ("step",) and list(ds.step.values) == [1, 2, 3, 4, 5, 6], engine
    assert ds.greedy_criterion.attrs["units"] == "m2", engine
    assert ds.layout_criterion.dims == ("layout",), engine
    assert list(ds.layout.values) == ["even_six", "middle_six", "tail_six", "chosen_six"], (engine, ds.layout.values)
    assert np.array_equal(ds.greedy_criterion.values, g["greedy_criterion"][...]), engine
    assert list(ds.chosen.values) == g.attrs["chosen_names"].split(","), engine
    assert int(ds.is_chosen.sum()) == 6, engine
print("ok   xarray (h5netcdf, netcdf4) opens /placement")
PY

# The numbers against each other: six distinct chosen sites; the greedy curve never falls
# (each step adds a sensor to the set before it, and a set detects at least where any subset
# does: d'^2 is a sum of non-negative terms, Kay 1998 Vol. II ch. 4, from memory); exchanges
# only raise it; the final value is the last of the curve; each layout's criterion is its own
# detectable area of /layout_comparison at the 2 cm size (the same points, cells and threshold).
"$py" - "$dir/placed.h5" <<'PY' || fail "contents of /placement"
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
g = f["placement"]
chosen = g["chosen_candidate"][...]
assert len(chosen) == 6 and len(set(chosen.tolist())) == 6, chosen
assert np.array_equal(np.flatnonzero(g["is_chosen"][...]), np.sort(chosen))
greedy = g["greedy_criterion"][...]
assert (np.diff(greedy) >= 0).all(), greedy
assert greedy[0] > 0, "one ring alone detects something: otherwise the curve says nothing"
last = greedy[-1]
if "exchange_criterion" in g:
    ex = g["exchange_criterion"][...]
    assert (np.diff(np.concatenate([[last], ex])) > 0).all(), ex
    last = ex[-1]
assert g["final_criterion"][()] == last
cmp = f["layout_comparison"]
sizes = list(cmp["size"][...])
k = sizes.index(g["target_size"][()])
assert g["target_size"][()] == max(sizes)
assert np.allclose(g["layout_criterion"][...], cmp["detectable_area"][:, k], rtol=1e-12, atol=0), \
    (g["layout_criterion"][...], cmp["detectable_area"][:, k])
# The example's layout chosen_six reads the chosen rings as floating electrodes; the placement
# read them as bare hull (cases/README.md, [placement]). The two areas agree within 10 %: the
# size of that approximation on this coarse case (a modelling check, the bound our own choice).
names = g.attrs["chosen_names"].split(",")
assert names == ["c19", "c20", "c21", "c22", "c23", "c24"], names
own = g["layout_criterion"][list(cmp["layout"].asstr()[...]).index("chosen_six")]
assert abs(own - g["final_criterion"][()]) <= 0.1 * g["final_criterion"][()], (own, g["final_criterion"][()])
assert g["final_criterion"][()] >= g["layout_criterion"][...][:3].max(), "the chosen rings beat the hand-picked ones"
print("ok   /placement: greedy curve rising, exchanges improving, layouts scored as their detectable area")
PY

"$murk" inspect "$dir/placed.h5" > "$dir/inspect.txt" 2>&1 || { cat "$dir/inspect.txt"; fail "murk inspect"; }
chosen=$("$py" -c 'import h5py,sys; print(h5py.File(sys.argv[1],"r")["placement"].attrs["chosen_names"].replace(",", ", "))' "$dir/placed.h5")
grep -q "^  chosen sites: $chosen\$" "$dir/inspect.txt" && echo "ok   murk inspect lists the chosen sites ($chosen)" \
  || fail "murk inspect does not list the chosen sites $chosen: $(cat "$dir/inspect.txt")"
grep -q "^  best layout: " "$dir/inspect.txt" && echo "ok   murk inspect compares with the best layout" \
  || fail "murk inspect: no comparison with the layouts"

"$py" "$src/tools/plot_results.py" "$dir/placed.h5" -o "$dir" > "$dir/plot.txt" 2>&1 \
  || { cat "$dir/plot.txt"; fail "plot_results.py on the placement file"; }
[ -s "$dir/placed_placement.png" ] && head -c 8 "$dir/placed_placement.png" | grep -q PNG \
  && echo "ok   plot_results.py draws the criterion curve" || fail "no placed_placement.png"

# The D-optimal criterion on the same case: it takes exchanges after the greedy steps here
# (checked in the file), which add the exchange dimension; both netCDF engines read it, the
# names are documented, and each exchange raises the criterion.
sed -e 's/^criterion = "detectable_area"/criterion = "mean_log_det"/' "$example" > "$dir/logdet.toml"
grep -q '^criterion = "mean_log_det"' "$dir/logdet.toml" || { echo "could not write the mean_log_det case"; exit 1; }
"$murk" layout "$dir/logdet.toml" -o "$dir/logdet.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk layout, mean_log_det"; }
"$py" "$src/tests/cli/check_layout_documented.py" "$src/cases/RESULT_LAYOUT.md" "$dir/logdet.h5" || fail "RESULT_LAYOUT.md, mean_log_det"
"$py" - "$dir/logdet.h5" <<'PY' || fail "mean_log_det placement"
import sys, warnings, h5py, numpy as np, xarray as xr
warnings.simplefilter("ignore")
g = h5py.File(sys.argv[1], "r")["placement"]
assert g.attrs["criterion"] == "mean_log_det" and g["final_criterion"].attrs["units"] == "1"
assert "exchange_criterion" in g, "this case is known to take exchanges; none were written"
values = np.concatenate([g["greedy_criterion"][...], g["exchange_criterion"][...]])
assert (np.diff(values[:len(g["greedy_criterion"])]) >= 0).all() and (np.diff(values[len(g["greedy_criterion"]) - 1:]) > 0).all(), values
assert np.isfinite(g["layout_criterion"][...]).all()
for engine in ("h5netcdf", "netcdf4"):
    ds = xr.open_dataset(sys.argv[1], group="placement", engine=engine)
    assert ds.exchange_criterion.dims == ("exchange",) and len(ds.exchange) == len(g["exchange_criterion"]), engine
    assert np.array_equal(ds.exchange_criterion.values, g["exchange_criterion"][...]), engine
print("ok   mean_log_det: exchanges written and read by both engines, each raising the criterion")
PY

# murk solve ignores [placement] (it solves the first layout, cases/README.md): it runs and writes
# no /placement.
"$murk" solve "$example" -o "$dir/solved.h5" --quiet 2> "$dir/err.txt" || { cat "$dir/err.txt"; fail "murk solve on the placement case"; }
"$py" -c 'import h5py, sys; sys.exit("placement" in h5py.File(sys.argv[1], "r"))' "$dir/solved.h5" \
  && echo "ok   murk solve ignores [placement]" || fail "murk solve wrote /placement"

# Bad [placement] input: one line naming the file, line and key; exit 2; no file left.
bad() {  # bad NAME SED_EXPRESSION WORDS
  sed -e "$2" "$example" > "$dir/$1.toml"
  cmp -s "$example" "$dir/$1.toml" && { fail "$1: the edit changed nothing"; return; }
  "$murk" layout "$dir/$1.toml" -o "$dir/$1.h5" --quiet 2> "$dir/err.txt"; status=$?
  if [ "$status" -eq 2 ] && [ "$(wc -l < "$dir/err.txt")" -eq 1 ] && grep -q "$3" "$dir/err.txt" \
     && grep -Eq "^(murk: )?[^ ]*$1\.toml:[0-9]+: placement" "$dir/err.txt" \
     && [ ! -e "$dir/$1.h5" ] && [ ! -e "$dir/$1.h5.partial" ]; then
    echo "ok   refused: $1"
  else
    fail "$1: status $status, message: $(cat "$dir/err.txt")"
  fi
}
bad budget 's/^budget = 6/budget = 25/' "placement.budget: expected a whole number from 1 to the 24 candidates"
bad drive 's/^drive = "even_six"/drive = "odd_six"/' "placement.drive: no \[\[layout\]\] is named 'odd_six'"
bad overlap 's/from = "-12 cm", to = "13.5 cm"/from = "-13.5 cm", to = "13.5 cm"/' "placement.candidate_rings: electrode 'c01' overlaps electrode 'ref'"
bad crowded 's/width = "6 mm"/width = "11 mm"/' "placement.candidate_rings.width: .*overlap each other"
bad criterion 's/^criterion = "detectable_area"/criterion = "coverage"/' "placement.criterion: expected one of"
bad size 's/^target_size = "2 cm"/target_size = "3 cm"/' "placement.target_size: is not one of the target sizes"

[ "$failures" -eq 0 ] || { echo "$failures checks failed"; exit 1; }
echo "murk layout placement: ok"
