#!/usr/bin/python3
"""Writes a synthetic `murk run` result file, laid out as cases/RESULT_LAYOUT.md says, so that
the read side (murk inspect, tools/plot_results.py) can be tested before and independently of
the sweep runner. Written with h5py, not with murk.

Usage: make_synthetic_result.py OUT.h5 [--kind sweep|grid|robot]
  sweep  a fish-like body; axes conductivity x size x distance (the runner's order), 3 masked
         points, 3 points not computed (an interrupted run), detection ranges and falloff
         exponents planted as listed in PLANTED below
  grid   the same body; axes size (one value) x grid_u x grid_v around it; no distance axis
  robot  a capsule hull with six named sensor channels, axes size x distance, a 1 kHz lock-in
         (complex perturbations)

All numbers are invented but of plausible size (DEVELOPERS.md, "Physics and method"): a baseline transdermal
voltage of about a millivolt, an image of about a microvolt at the detection range. Each
planted exponent is exact: the data are an exact power law times a curvature term that is
orthogonal (over the fitted points) to the fitted line, so the least-squares slope is the
planted exponent and R^2 is below 1. Each planted range is exact: the amplitude is tuned so that
the crossing of the detection level, interpolated linearly against ln(distance) between
computed points (the rule of cases/detection/detectability.hpp), falls on it.
"""
import argparse
import hashlib
import math
import statistics

import h5py
import numpy as np

WATER_S_PER_M = 0.01            # 100 uS/cm
FALSE_ALARM = 1e-3
LEVEL = 0.5
NOISE_V = 0.1e-6                # effective noise of the whole skin, for the synthetic snr
DISTANCES_M = np.array([2, 3, 4, 6, 8, 11, 15, 20, 28, 40]) * 1e-3
SIZES_M = np.array([1, 2, 4]) * 1e-3
CONDUCTIVITIES = np.array([0.0, 0.05, math.inf])
FIT_FROM_M = 8e-3               # the "far part" the exponent is fitted over
CURVATURE = -0.15               # bends the near end flatter, as near an elongated body

# (conductivity index, size index) -> (detection status, range in mm or None, exponent).
# Status as in RESULT_LAYOUT.md: 1 crossed, 2 detectable at every distance computed, 3 never.
PLANTED = {
    (0, 0): (3, None, -4.10), (0, 1): (1, 6.5, -3.95), (0, 2): (1, 11.0, -3.30),
    (1, 0): (1, 3.5, -4.20), (1, 1): (1, 7.0, -4.05), (1, 2): (1, 12.0, -3.60),
    (2, 0): (1, 4.0, -4.62), (2, 1): (1, 8.0, -4.00), (2, 2): (2, None, -3.85),
}
MASKED = [(c, 2, 0) for c in range(3)]         # the largest object at 2 mm: would touch the plane
MISSING = [(2, 2, 7), (2, 2, 8), (2, 2, 9)]    # the run stopped before these
BEYOND_VIRTUAL_RANGE_MM = 17.0                 # where row (2, 2) would cross if the run had finished
NEVER_PD_AT_NEAREST = 0.2                      # row (0, 0): P_D at the nearest distance

CASE_TEXT = """# synthetic result for murk's read-side tests (tests/cli/make_synthetic_result.py)
title = "Synthetic prey sweep"
[water]
conductivity = "100 uS/cm"
"""


# ---------------------------------------------------------------- helpers

def put(group, name, data, units, long_name, dtype=None):
    d = group.create_dataset(name, data=np.asarray(data) if dtype is None else np.asarray(data, dtype=dtype))
    d.attrs["units"] = units
    d.attrs["long_name"] = long_name
    return d


def q_tail(x):
    """Right tail of the standard normal, from the standard library (not murk)."""
    return 1.0 - statistics.NormalDist().cdf(x)


def detection_probability(snr):
    threshold = statistics.NormalDist().inv_cdf(1.0 - FALSE_ALARM)
    return np.array([q_tail(threshold - s) if np.isfinite(s) else np.nan for s in np.atleast_1d(snr)])


def crossing(distances, pd):
    """Last downward crossing of LEVEL going outward, linear in ln(distance); None if none."""
    ok = np.isfinite(pd)
    d, p = distances[ok], pd[ok]
    for i in range(len(d) - 2, -1, -1):
        if p[i] >= LEVEL > p[i + 1]:
            t = (p[i] - LEVEL) / (p[i] - p[i + 1])
            return math.exp(math.log(d[i]) + t * (math.log(d[i + 1]) - math.log(d[i])))
    return None


# ---------------------------------------------------------------- meshes

def ellipsoid_mesh(half_axes, rings=14, segments=16):
    """A closed surface around the x axis, triangles counter-clockwise seen from outside."""
    a, b, c = half_axes
    verts = [(-a, 0.0, 0.0)]
    for i in range(1, rings):
        t = math.pi * i / rings
        for j in range(segments):
            phi = 2 * math.pi * j / segments
            verts.append((-a * math.cos(t), b * math.sin(t) * math.cos(phi), c * math.sin(t) * math.sin(phi)))
    verts.append((a, 0.0, 0.0))
    ring = lambda i, j: 1 + (i - 1) * segments + j % segments
    tris = [(0, ring(1, j + 1), ring(1, j)) for j in range(segments)]
    for i in range(1, rings - 1):
        for j in range(segments):
            tris += [(ring(i, j), ring(i, j + 1), ring(i + 1, j + 1)), (ring(i, j), ring(i + 1, j + 1), ring(i + 1, j))]
    last = len(verts) - 1
    tris += [(last, ring(rings - 1, j), ring(rings - 1, j + 1)) for j in range(segments)]
    return orient_outward(np.array(verts), np.array(tris, dtype=np.int32))


def capsule_mesh(length=0.3, radius=0.03):
    """A robot hull: an ellipsoid stretched into a cigar shape is close enough here."""
    return ellipsoid_mesh((length / 2, radius, radius), rings=18, segments=12)


def orient_outward(v, t):
    """Flips every triangle if the enclosed signed volume is negative."""
    volume = np.einsum("ij,ij->i", v[t[:, 0]], np.cross(v[t[:, 1]], v[t[:, 2]])).sum() / 6
    return (v, t if volume > 0 else t[:, ::-1].copy())


def write_mesh(root, name, v, t):
    g = root.create_group(f"mesh/{name}")
    p0, p1, p2 = v[t[:, 0]], v[t[:, 1]], v[t[:, 2]]
    cross = np.cross(p1 - p0, p2 - p0)
    area = 0.5 * np.linalg.norm(cross, axis=1)
    put(g, "vertices", v, "m", "vertex coordinates")
    put(g, "triangles", t, "1", "vertex indices of each panel, counter-clockwise seen from outside", np.int32)
    put(g, "region", np.zeros(len(t)), "1", "region tag of each panel", np.int32)
    put(g, "centroid", (p0 + p1 + p2) / 3, "m", "panel centroid (collocation point)")
    put(g, "normal", cross / (2 * area[:, None]), "1", "outward unit normal of each panel")
    put(g, "area", area, "m2", "panel area")
    return (p0 + p1 + p2) / 3


# ---------------------------------------------------------------- root and baseline

def write_root(f, title, frequency_hz):
    text = CASE_TEXT.replace("Synthetic prey sweep", title)
    f.attrs["murk_version"] = "0.1.0-synthetic"
    f.attrs["title"] = title
    f.attrs["case"] = text
    f.attrs["case_path"] = "synthetic.toml"
    f.attrs["case_sha256"] = hashlib.sha256(text.encode()).hexdigest()
    f.attrs["created_utc"] = "2026-01-02T03:04:05Z"
    f.attrs["command"] = "murk run synthetic.toml -o synthetic.h5"
    f.attrs["approximation"] = "synthetic data for tests (no solve)"
    f.attrs["near_ratio"] = 3.0
    f.attrs["far_ratio"] = 10.0
    f.attrs["system_solver"] = "auto"
    f.attrs["dense_limit"] = np.int64(8000)
    f.attrs["compression_tolerance"] = 1e-8
    f.attrs["iteration_tolerance"] = 1e-10
    f.attrs["preconditioner_tolerance"] = 1e-4
    f.attrs["frequency_Hz"] = float(frequency_hz)


def write_fish_baseline(f, centroid):
    # About a millivolt, largest near the organ's ends, as a dipole-like organ gives.
    x = centroid[:, 0]
    tdv = 1e-3 * (0.3 + np.abs(np.sin(math.pi * x / 0.15)))
    g = f.create_group("baseline/fish")
    put(g, "outer_potential", -0.5 * tdv, "V", "potential on the water side of each panel")
    put(g, "inner_potential", 0.5 * tdv, "V", "potential on the inner side of each panel")
    put(g, "current_density", tdv / 0.25, "A m-2", "normal current density leaving the interior through each panel")
    put(g, "transdermal_voltage", tdv, "V", "transdermal voltage, inside minus outside, at each panel")


# ---------------------------------------------------------------- sweep datasets

def write_axes(f, axes):
    """axes: list of (name, values, units, long_name). Returns the scale datasets."""
    scales = []
    for name, values, units, long_name in axes:
        d = put(f, f"sweep/{name}", values, units, long_name)
        d.make_scale(name)
        scales.append(d)
    return scales


def attach(d, scales):
    for k, s in enumerate(scales):
        d.dims[k].attach_scale(s)
    return d


# The codes of the coded datasets and their words, typed in from cases/RESULT_LAYOUT.md.
STATUS_FLAGS = ([0, 1, 2], "not_computed computed masked")
MASK_REASON_FLAGS = ([0, 1, 2, 3, 4, 5], "not_masked touches_body touches_object beyond_plane unreachable near_source")
DETECTION_FLAGS = ([0, 1, 2, 3], "no_point_computed crossed beyond_sweep never_detectable")
FOURTH_POWER_FLAGS = ([0, 1, 2], "no yes unknown")


def flags(d, table):
    """CF flag_values (in the dataset's own type) and flag_meanings."""
    d.attrs["flag_values"] = np.asarray(table[0], dtype=d.dtype)
    d.attrs["flag_meanings"] = table[1]
    return d


def copy_axes(group, scales):
    """Copies of /sweep axes as the group's own coordinates (each group is self-contained)."""
    copies = []
    for scale in scales:
        name = scale.name.split("/")[-1]
        d = put(group, name, scale[()], scale.attrs["units"], scale.attrs["long_name"])
        d.make_scale(name)
        copies.append(d)
    return copies


def write_point_data(f, scales, data, sensor_units, kind):
    """data: dict of arrays shaped by the axes (and the sensors / xyz)."""
    s = f["sweep"]
    s.attrs["system_solver_used"] = "dense"  # the fixed part's solver, as murk run writes it
    s.attrs["system_iterations"] = np.int64(0)
    flags(attach(put(s, "status", data["status"], "1", "what happened at the point", np.uint8), scales), STATUS_FLAGS)
    reasons = data.get("mask_reason", np.zeros(data["status"].shape, np.uint8))
    flags(attach(put(s, "mask_reason", reasons, "1", "why the point is masked", np.uint8), scales), MASK_REASON_FLAGS)
    attach(put(s, "perturbation", data["perturbation"], sensor_units, f"change of the {kind} caused by the object"),
           scales + [f["sweep/sensor"]])
    attach(put(s, "peak_perturbation", data["peak"], sensor_units, "largest |perturbation| over the sensors"), scales)
    attach(put(s, "peak_sensor", data["peak_sensor"], "1", "sensor index of the peak", np.int32), scales)
    put(s, "peak_position", data["peak_position"], "m", "position of the peak sensor")
    put(s, "object_position", data["object_position"], "m", "object centre")
    if "image_width" in data:
        attach(put(s, "image_width", data["image_width"], "m",
                   "full width at half maximum of |perturbation| along the body axis"), scales)
    attach(put(s, "snr", data["snr"], "1", "ideal-observer signal-to-noise ratio d' (amplitude)"), scales)
    attach(put(s, "detection_probability", data["pd"], "1", "detection probability"), scales)


def write_sensor_axis(f, count, names=None):
    d = put(f, "sweep/sensor", np.arange(count, dtype=np.int32), "1",
            "skin panel index" if names is None else "sensor channel index")
    d.make_scale("sensor")
    if names is not None:
        d.attrs["sensor_names"] = ",".join(names)


def image_on_skin(centroid, obj_centre, radius, clearance, peak, sign):
    """A bump centred on the panel nearest the object, falling as the cube of the distance."""
    r = np.linalg.norm(centroid - obj_centre, axis=1)
    shape = ((clearance + radius) / r) ** 3
    shape /= shape.max()
    return sign * peak * shape


def fwhm_along_x(centroid, image):
    half = np.abs(image) >= 0.5 * np.abs(image).max()
    return centroid[half, 0].max() - centroid[half, 0].min()


# ---------------------------------------------------------------- the planted rows

def curvature_term(log_d, fit_mask):
    """(ln d - mean)^2 made orthogonal to 1 and ln d over the fitted points."""
    x = log_d[fit_mask]
    basis = np.vstack([np.ones_like(x), x]).T
    q = (log_d - x.mean()) ** 2
    coef, *_ = np.linalg.lstsq(basis, q[fit_mask], rcond=None)
    return q - (coef[0] + coef[1] * log_d)


def peak_curve(amplitude, exponent, computed):
    """Peak perturbation at every distance: a power law through 1 V*m^-n times the curvature."""
    log_d = np.log(DISTANCES_M)
    fit = computed & (DISTANCES_M >= FIT_FROM_M - 1e-12)
    return amplitude * DISTANCES_M ** exponent * np.exp(CURVATURE * curvature_term(log_d, fit)), fit


def tuned_amplitude(exponent, computed, target_m):
    """The amplitude whose P_D curve crosses LEVEL exactly at target_m (bisection in log space)."""
    lo, hi = -80.0, 20.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        peak, _ = peak_curve(math.exp(mid), exponent, computed)
        pd = np.where(computed, detection_probability(peak / NOISE_V), np.nan)
        r = crossing(DISTANCES_M, pd)
        too_small = np.nanmax(pd) < LEVEL if r is None else r < target_m
        if too_small:
            lo = mid
        else:
            hi = mid
    return math.exp(0.5 * (lo + hi))


def row_amplitude(key, computed):
    status, range_mm, exponent = PLANTED[key]
    if status == 1:
        return tuned_amplitude(exponent, computed, range_mm * 1e-3)
    if status == 2:
        every = np.ones_like(computed)
        return tuned_amplitude(exponent, every, BEYOND_VIRTUAL_RANGE_MM * 1e-3)
    # Never detectable: snr at the nearest distance gives P_D = NEVER_PD_AT_NEAREST.
    threshold = statistics.NormalDist().inv_cdf(1.0 - FALSE_ALARM)
    snr = threshold - statistics.NormalDist().inv_cdf(1.0 - NEVER_PD_AT_NEAREST)
    peak_at_1, _ = peak_curve(1.0, exponent, computed)
    return snr * NOISE_V / peak_at_1[0]


def fit_line(distances, peak):
    x, y = np.log(distances), np.log(peak)
    slope, intercept = np.polyfit(x, y, 1)
    residual = y - (slope * x + intercept)
    return slope, 1.0 - (residual ** 2).sum() / ((y - y.mean()) ** 2).sum()


# ---------------------------------------------------------------- the three kinds

def contrast(sigma):
    """Clausius-Mossotti factor of a sphere in water: -1/2 insulator .. 1 perfect conductor."""
    return 1.0 if math.isinf(sigma) else (sigma - WATER_S_PER_M) / (sigma + 2 * WATER_S_PER_M)


def make_fish_sweep(path):
    v, t = ellipsoid_mesh((0.075, 0.0075, 0.01))
    with h5py.File(path, "w") as f:
        write_root(f, "Synthetic prey sweep", 0.0)
        centroid = write_mesh(f, "fish", v, t)
        write_fish_baseline(f, centroid)
        scales = write_axes(f, [
            ("conductivity", CONDUCTIVITIES, "S m-1", "conductivity of the object (0: insulator, inf: perfect conductor)"),
            ("size", SIZES_M, "m", "object size (sphere radius)"),
            ("distance", DISTANCES_M, "m", "clearance between the object and the body surface")])
        write_sensor_axis(f, len(t))
        shape = (len(CONDUCTIVITIES), len(SIZES_M), len(DISTANCES_M))
        data = fish_point_data(shape, centroid)
        write_point_data(f, scales, data, "V", "transdermal voltage")
        write_analysis(f, scales[:2], data)


def empty_point_data(shape, sensors):
    nan = lambda *extra: np.full(shape + extra, np.nan)
    return {"status": np.ones(shape, np.uint8), "perturbation": nan(sensors), "peak": nan(),
            "peak_sensor": np.zeros(shape, np.int32), "peak_position": nan(3), "object_position": nan(3),
            "snr": nan(), "pd": nan()}


def fish_point_data(shape, centroid):
    data = empty_point_data(shape, len(centroid))
    data["image_width"] = np.full(shape, np.nan)
    data["mask_reason"] = np.zeros(shape, np.uint8)
    for index in MASKED:
        data["status"][index] = 2
        data["mask_reason"][index] = 3   # beyond_plane
    for index in MISSING:
        data["status"][index] = 0
    data["amplitude"] = {}
    for (c, s), _ in PLANTED.items():
        computed = data["status"][c, s] == 1
        amplitude = row_amplitude((c, s), computed)
        data["amplitude"][(c, s)] = amplitude
        peak, _ = peak_curve(amplitude, PLANTED[(c, s)][2], computed)
        for k in np.flatnonzero(computed):
            fill_fish_point(data, (c, s, k), centroid, SIZES_M[s], DISTANCES_M[k], peak[k],
                            math.copysign(1.0, contrast(CONDUCTIVITIES[c])))
    return data


def fill_fish_point(data, index, centroid, radius, clearance, peak, sign):
    x0 = 0.03   # beside the widest part of the body, on its +y flank
    y_skin = 0.0075 * math.sqrt(1 - (x0 / 0.075) ** 2)
    centre = np.array([x0, y_skin + clearance + radius, 0.0])
    image = image_on_skin(centroid, centre, radius, clearance, peak, sign)
    k = int(np.argmax(np.abs(image)))
    data["perturbation"][index] = image
    data["peak"][index] = peak
    data["peak_sensor"][index] = k
    data["peak_position"][index] = centroid[k]
    data["object_position"][index] = centre
    data["image_width"][index] = fwhm_along_x(centroid, image)
    data["snr"][index] = peak / NOISE_V
    data["pd"][index] = detection_probability(peak / NOISE_V)[0]


def write_analysis(f, scales, data):
    """/detection and /falloff over (conductivity, size), the planted values."""
    n_c, n_s, n_d = data["status"].shape
    rng, status = np.full((n_c, n_s), np.nan), np.zeros((n_c, n_s), np.uint8)
    exponent, r2, fit_from, fit_to = (np.full((n_c, n_s), np.nan) for _ in range(4))
    local = np.full((n_c, n_s, n_d), np.nan)
    for (c, s), (st, range_mm, planted_exponent) in PLANTED.items():
        status[c, s] = st
        rng[c, s] = np.nan if range_mm is None else range_mm * 1e-3
        computed = data["status"][c, s] == 1
        fit = computed & (DISTANCES_M >= FIT_FROM_M - 1e-12)
        slope, r2[c, s] = fit_line(DISTANCES_M[fit], data["peak"][c, s][fit])
        assert abs(slope - planted_exponent) < 1e-9, (c, s, slope, planted_exponent)
        check_planted_range(data["pd"][c, s], st, range_mm)
        exponent[c, s] = planted_exponent
        fit_from[c, s], fit_to[c, s] = DISTANCES_M[fit].min(), DISTANCES_M[fit].max()
        local[c, s, computed] = np.gradient(np.log(data["peak"][c, s][computed]), np.log(DISTANCES_M[computed]))
    det = f.create_group("detection")
    det.attrs["probability_level"] = LEVEL
    det.attrs["false_alarm_probability"] = FALSE_ALARM
    own = copy_axes(det, scales)
    attach(put(det, "range", rng, "m", "distance where the detection probability crosses the level"), own)
    flags(attach(put(det, "status", status, "1", "where the detection probability crosses the level", np.uint8), own),
          DETECTION_FLAGS)
    fo = f.create_group("falloff")
    own = copy_axes(fo, scales + [f["sweep/distance"]])
    attach(put(fo, "local_exponent", local, "1", "d ln(peak) / d ln(distance)"), own)
    attach(put(fo, "exponent", exponent, "1", "least-squares exponent over the far part"), own[:-1])
    attach(put(fo, "fit_from", fit_from, "m", "nearest distance in the fit"), own[:-1])
    attach(put(fo, "fit_to", fit_to, "m", "farthest distance in the fit"), own[:-1])
    attach(put(fo, "r_squared", r2, "1", "coefficient of determination of the fit"), own[:-1])
    near = np.where(np.isnan(local), 2, np.abs(local + 4) <= 0.5).astype(np.uint8)
    flags(attach(put(fo, "near_fourth_power", near, "1", "whether |local exponent + 4| <= 0.5"), own), FOURTH_POWER_FLAGS)


def check_planted_range(pd, status, range_mm):
    """The data must say what the planted detection entry says."""
    r = crossing(DISTANCES_M, pd)
    if status == 1:
        assert r is not None and abs(r - range_mm * 1e-3) < 1e-9 * range_mm, (r, range_mm)
    elif status == 2:
        assert np.nanmin(pd) >= LEVEL, pd
    else:
        assert np.nanmax(pd) < LEVEL, pd


def make_fish_grid(path):
    v, t = ellipsoid_mesh((0.075, 0.0075, 0.01))
    u_values, v_values = np.linspace(0, 0.2, 41), np.linspace(0, 0.12, 25)
    origin, ud, vd = np.array([-0.1, -0.06, 0.0]), np.array([1.0, 0, 0]), np.array([0, 1.0, 0])
    radius = 3e-3
    with h5py.File(path, "w") as f:
        write_root(f, "Synthetic detection map around a fish", 0.0)
        centroid = write_mesh(f, "fish", v, t)
        write_fish_baseline(f, centroid)
        scales = write_axes(f, [("size", [radius], "m", "object size (sphere radius)"),
                                ("grid_u", u_values, "m", "object centre along the grid's first direction"),
                                ("grid_v", v_values, "m", "object centre along the grid's second direction")])
        f["sweep/grid_u"].attrs["grid_origin"] = origin
        f["sweep/grid_u"].attrs["grid_u_direction"] = ud
        f["sweep/grid_u"].attrs["grid_v_direction"] = vd
        write_sensor_axis(f, len(t))
        shape = (1, len(u_values), len(v_values))
        data = empty_point_data(shape, len(t))
        data["image_width"] = np.full(shape, np.nan)
        data["mask_reason"] = np.zeros(shape, np.uint8)
        outline = ellipse_points(0.075, 0.0075)
        for i, u in enumerate(u_values):
            for j, w in enumerate(v_values):
                centre = origin + u * ud + w * vd
                clearance = np.min(np.linalg.norm(outline - centre[:2], axis=1)) - radius
                inside = (centre[0] / 0.075) ** 2 + (centre[1] / 0.0075) ** 2 < 1
                if inside or clearance < 2e-3:
                    data["status"][0, i, j] = 2
                    data["mask_reason"][0, i, j] = 1   # touches_body
                    continue
                peak = 1e-14 * clearance ** -4.0
                fill_grid_point(data, (0, i, j), centroid, centre, radius, clearance, peak)
        write_point_data(f, scales, data, "V", "transdermal voltage")


def ellipse_points(a, b, n=720):
    phi = np.linspace(0, 2 * math.pi, n, endpoint=False)
    return np.stack([a * np.cos(phi), b * np.sin(phi)], axis=1)


def fill_grid_point(data, index, centroid, centre, radius, clearance, peak):
    image = image_on_skin(centroid, centre, radius, clearance, peak, 1.0)
    k = int(np.argmax(np.abs(image)))
    data["perturbation"][index] = image
    data["peak"][index] = peak
    data["peak_sensor"][index] = k
    data["peak_position"][index] = centroid[k]
    data["object_position"][index] = centre
    data["image_width"][index] = fwhm_along_x(centroid, image)
    data["snr"][index] = peak / NOISE_V
    data["pd"][index] = detection_probability(peak / NOISE_V)[0]


def make_robot(path):
    v, t = capsule_mesh()
    names = ["front_left", "front_right", "mid_left", "mid_right", "rear_left", "rear_right"]
    sensor_x = np.array([0.1, 0.1, 0.0, 0.0, -0.1, -0.1])
    sensor_y = np.array([0.03, -0.03, 0.03, -0.03, 0.03, -0.03])
    sizes, distances = np.array([5e-3, 10e-3]), np.geomspace(0.01, 0.2, 8)
    with h5py.File(path, "w") as f:
        write_root(f, "Synthetic robot hull sweep", 1000.0)
        centroid = write_mesh(f, "hull", v, t)
        put(f, "baseline/hull/outer_potential", 0.5 * centroid[:, 0] / 0.15, "V",
            "potential on the water side of each panel")
        put(f, "baseline/hull/current_density", np.zeros(len(t)), "A m-2",
            "normal current density leaving the interior through each panel")
        e = f.create_group("baseline/electrodes")
        pot = put(e, "potential", [1.0, -1.0] + [0.01 * k for k in range(6)], "V", "electrode potential")
        cur = put(e, "current", [1e-3, -1e-3] + [0.0] * 6, "A", "current from the electrode into the water")
        for d in (pot, cur):
            d.attrs["electrode_names"] = ",".join(["emitter_head", "emitter_tail"] + names)
        scales = write_axes(f, [("size", sizes, "m", "object size (sphere radius)"),
                                ("distance", distances, "m", "clearance between the object and the body surface")])
        write_sensor_axis(f, len(names), names)
        shape = (len(sizes), len(distances))
        data = empty_point_data(shape, len(names))
        data["perturbation"] = data["perturbation"].astype(np.complex128)
        for i, a in enumerate(sizes):
            for j, d in enumerate(distances):
                centre = np.array([0.05, 0.03 + d + a, 0.0])
                r = np.hypot(sensor_x - centre[0], sensor_y - centre[1])
                reading = 2e-3 * a ** 3 / r ** 4 * np.exp(0.3j * np.sign(sensor_y))
                k = int(np.argmax(np.abs(reading)))
                data["perturbation"][i, j] = reading
                data["peak"][i, j] = abs(reading[k])
                data["peak_sensor"][i, j] = k
                data["peak_position"][i, j] = [sensor_x[k], sensor_y[k], 0.0]
                data["object_position"][i, j] = centre
                data["snr"][i, j] = abs(reading[k]) / 1e-6
                data["pd"][i, j] = detection_probability(data["snr"][i, j])[0]
        write_point_data(f, scales, data, "V", "sensor reading")
        write_computed_analysis(f, scales[:1], data, distances)


def write_computed_analysis(f, scales, data, distances):
    """/detection and /falloff of a sweep whose last axis is the distance, from its data."""
    rows = data["peak"].shape[0]
    rng, status = np.full(rows, np.nan), np.ones(rows, np.uint8)
    exponent, r2, fit_from, fit_to = (np.full(rows, np.nan) for _ in range(4))
    far = distances >= distances[len(distances) // 2]
    for i in range(rows):
        r = crossing(distances, data["pd"][i])
        if r is None:
            status[i] = 2 if np.nanmin(data["pd"][i]) >= LEVEL else 3
        rng[i] = np.nan if r is None else r
        exponent[i], r2[i] = fit_line(distances[far], data["peak"][i][far])
        fit_from[i], fit_to[i] = distances[far].min(), distances[far].max()
    det = f.create_group("detection")
    det.attrs["probability_level"] = LEVEL
    det.attrs["false_alarm_probability"] = FALSE_ALARM
    own = copy_axes(det, scales)
    attach(put(det, "range", rng, "m", "distance where the detection probability crosses the level"), own)
    flags(attach(put(det, "status", status, "1", "where the detection probability crosses the level", np.uint8), own),
          DETECTION_FLAGS)
    fo = f.create_group("falloff")
    own = copy_axes(fo, scales + [f["sweep/distance"]])
    attach(put(fo, "exponent", exponent, "1", "least-squares exponent over the far part"), own[:-1])
    attach(put(fo, "fit_from", fit_from, "m", "nearest distance in the fit"), own[:-1])
    attach(put(fo, "fit_to", fit_to, "m", "farthest distance in the fit"), own[:-1])
    attach(put(fo, "r_squared", r2, "1", "coefficient of determination of the fit"), own[:-1])
    local = np.gradient(np.log(data["peak"]), np.log(distances), axis=-1)
    attach(put(fo, "local_exponent", local, "1", "d ln(peak) / d ln(distance)"), own)
    flags(attach(put(fo, "near_fourth_power", (np.abs(local + 4) <= 0.5).astype(np.uint8), "1",
                     "whether |local exponent + 4| <= 0.5"), own), FOURTH_POWER_FLAGS)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("output")
    parser.add_argument("--kind", choices=["sweep", "grid", "robot"], default="sweep")
    args = parser.parse_args()
    {"sweep": make_fish_sweep, "grid": make_fish_grid, "robot": make_robot}[args.kind](args.output)
    print(args.output)


if __name__ == "__main__":
    main()
