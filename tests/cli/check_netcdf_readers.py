#!/usr/bin/python3
"""Opens a murk result file the way a scientist's netCDF tools do, and checks that they see
what h5py sees (cases/RESULT_LAYOUT.md: every result file is a valid netCDF-4 file).

Usage: check_netcdf_readers.py OUT.h5

Readers (Debian 12 packages): xarray 2023.01 with its two engines, h5netcdf 1.1 (on h5py) and
netCDF4 1.6.2 (on netCDF-C 4.9.0); netCDF-C itself through netCDF4.Dataset. h5py 3.7 is the
reference every value is compared with. For each file:
  - every group opens with both engines, with every dimension named by a coordinate
    (no "phony_dim" invented by the reader);
  - netCDF-C sees every dataset h5py sees (it silently leaves out datasets it cannot type);
  - in a sweep, each axis of /sweep/status is a coordinate of /sweep, /detection and /falloff
    holding the values and units h5py reads from /sweep/<axis>;
  - every numeric variable has a `units` attribute;
  - one value, found in xarray by coordinate values, equals the one h5py reads by index
    (a complex one through netCDF4 is the structured {r, i} that engine returns);
  - CF attributes (CF conventions 1.8): Conventions and history at the root (section 2.6.2),
    _FillValue of the data's own type (2.5.1) and never on coded uint8 data, whose 0 is a
    code; flag_values of the data's type with as many blank-separated flag_meanings (3.5).
"""
import re
import sys
import warnings

import h5py
import netCDF4
import numpy as np
import xarray as xr

warnings.simplefilter("ignore")  # xarray's notes about engines and encodings are not failures
path = sys.argv[1]
failures = []


def check(condition, what):
    if not condition:
        failures.append(what)


ENGINES = ("h5netcdf", "netcdf4")
h5 = h5py.File(path, "r")
groups, datasets = ["/"], {}


def visit(name, obj):
    if isinstance(obj, h5py.Group):
        groups.append("/" + name)
    elif isinstance(obj, h5py.Dataset):
        datasets["/" + name] = obj


h5.visititems(visit)

# ---- every group opens with both engines, every dimension named
opened = {}
for engine in ENGINES:
    for group in groups:
        try:
            ds = xr.open_dataset(path, group=group, engine=engine)
        except Exception as error:  # the reader's own words are the finding
            failures.append(f"{engine} cannot open {group}: {type(error).__name__}: {error}")
            continue
        opened[engine, group] = ds
        for dim in ds.dims:
            check(not str(dim).startswith("phony_dim"), f"{engine} {group}: unnamed dimension {dim}")
            check(dim in ds.coords, f"{engine} {group}: dimension {dim} has no coordinate")
        for name, var in ds.variables.items():
            if var.dtype.kind in "fiuc":
                check("units" in var.attrs, f"{engine} {group}/{name}: no units attribute")

# ---- netCDF-C sees every dataset h5py sees
def netcdf_variables(group, prefix):
    names = {prefix.rstrip("/") + "/" + v for v in group.variables}
    for name, child in group.groups.items():
        names |= netcdf_variables(child, prefix.rstrip("/") + "/" + name)
    return names


try:
    with netCDF4.Dataset(path) as nc:
        seen = netcdf_variables(nc, "/")
    missing = sorted(set(datasets) - seen)
    check(not missing, f"netCDF-C does not see {missing}")
except Exception as error:
    failures.append(f"netCDF-C cannot open the file: {type(error).__name__}: {error}")

# ---- the sweep axes as coordinates, with their values and units
if "sweep" in h5:
    status = h5["sweep/status"]
    axes = [dim[0].name.split("/")[-1] for dim in status.dims]
    for engine in ENGINES:
        for group in ("/sweep", "/detection", "/falloff"):
            ds = opened.get((engine, group))
            if ds is None or group[1:] not in h5:
                continue
            for axis in axes:
                if group != "/sweep" and axis not in h5[group[1:]]:
                    check(group == "/detection" and axis == "distance", f"{engine} {group}: no coordinate {axis}")
                    continue
                original = h5[f"sweep/{axis}"]
                check(axis in ds.indexes, f"{engine} {group}: {axis} is not an index coordinate")
                check(np.array_equal(ds[axis].values, original[()]), f"{engine} {group}: {axis} values differ from h5py's")
                check(ds[axis].attrs.get("units") == original.attrs["units"], f"{engine} {group}: {axis} units")
        # One value: the perturbation at the computed point of largest peak, found by its coordinates.
        s = opened.get((engine, "/sweep"))
        if s is None:
            continue
        peak = np.where(status[()] == 1, h5["sweep/peak_perturbation"][()], -np.inf)  # 1: computed
        index = np.unravel_index(int(np.argmax(peak)), peak.shape)
        where = {axis: h5[f"sweep/{axis}"][i] for axis, i in zip(axes, index)}
        sensor = int(h5["sweep/peak_sensor"][index])
        expected = h5["sweep/perturbation"][index + (sensor,)]
        got = s.perturbation.sel(**where, sensor=sensor).values
        if got.dtype.names:  # netCDF4 engine, complex data: the structured {r, i}
            got = got["r"] + 1j * got["i"]
        check(got == expected, f"{engine}: perturbation at {where}, sensor {sensor} is {got}, h5py reads {expected}")
elif "perturbed" in h5:  # murk solve: the first surface's water-side potential with the objects, panel 0
    # (murk layout's values are selected by coordinates in tests/cli/layout_compare.sh)
    surface = sorted(h5["perturbed"])[0]
    expected = h5[f"perturbed/{surface}/outer_potential"][0]
    for engine in ENGINES:
        ds = opened.get((engine, f"/perturbed/{surface}"))
        if ds is None:
            continue
        got = ds.outer_potential.sel(panel=0).values
        if got.dtype.names:
            got = got["r"] + 1j * got["i"]
        check(got == expected, f"{engine}: /perturbed/{surface}/outer_potential[0] is {got}, h5py reads {expected}")

# ---- CF attributes
check(h5.attrs.get("Conventions") == "CF-1.8", f"root Conventions is {h5.attrs.get('Conventions')!r}")
history = str(h5.attrs.get("history", ""))
check(re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ \S.* (run|solve|layout) .*", history.splitlines()[0] if history else "")
      is not None, f"history {history!r} does not start with a UTC time and the command line")
for name, d in datasets.items():
    if "_FillValue" in d.attrs:
        check(d.attrs["_FillValue"].dtype == d.dtype, f"{name}: _FillValue of {d.attrs['_FillValue'].dtype}, data {d.dtype}")
        check(not (d.dtype == np.uint8 and "flag_values" in d.attrs), f"{name}: _FillValue on coded data")
    if "flag_values" in d.attrs:
        values = np.atleast_1d(d.attrs["flag_values"])
        check(values.dtype == d.dtype, f"{name}: flag_values of {values.dtype}, data {d.dtype}")
        words = str(d.attrs.get("flag_meanings", "")).split(" ")
        check(len(words) == len(values) and all(words), f"{name}: {len(values)} flag_values, flag_meanings {words}")
for coded in ("sweep/status", "sweep/path", "sweep/mask_reason", "detection/status", "falloff/near_fourth_power"):
    if coded.split("/")[0] in h5 and coded in h5:
        check("flag_values" in h5[coded].attrs, f"/{coded} has no flag_values")
    elif "sweep" in h5 and coded.startswith("sweep"):
        failures.append(f"/{coded} is missing")

for failure in failures:
    print("FAILED:", failure)
print(f"{path}: {len(groups)} groups, {len(datasets)} datasets, {'failed' if failures else 'ok'}")
sys.exit(1 if failures else 0)
