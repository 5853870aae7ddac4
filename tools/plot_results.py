#!/usr/bin/python3
"""Figures of a murk result file, as PNG images.

Usage: plot_results.py OUT.h5 [-o DIR] [--points AXIS=INDEX[,AXIS=INDEX...] ...]

Reads OUT.h5 with h5py (no murk needed), laid out as cases/RESULT_LAYOUT.md says, and writes
into DIR (default: the folder of OUT.h5), each figure titled with the case's title:

  <name>_detection_map.png     signal-to-noise ratio over two sweep axes (distance on x whenever
                               it varies, size on y when it varies too), with the detection
                               level and the file's detection ranges
  <name>_electric_image_K.png  the perturbation over the unrolled skin of a fish (or per sensor
                               channel of a robot) at chosen sweep points
  <name>_falloff.png           peak perturbation against distance (log-log), the fitted exponent
                               and a distance^-4 reference through the data
  <name>_grid_map.png          detection probability over a planar grid of object positions,
                               with the body's outline, to scale
  <name>_layouts.png           (murk layout) the layouts side by side: electrodes on the unrolled
                               hull, detection probability and, when computed, the position bound
  <name>_placement.png         (murk layout with [placement]) the criterion after each greedy step
                               and exchange, with every layout's criterion as a level
  <name>_body_view.png         a 3-D view of the body with the strongest electric image painted
                               on its skin (signed, on a colour scale centred on zero, for direct
                               current; magnitudes for complex images), and the object beside it

Conductivity, object and any axis holding 0 or inf are drawn as equal cells in sweep order
(conductivity 0 reads 'insulator', inf 'conductor'); grid axes are linear and to scale; other
axes that span a factor of 4 or more with positive values are logarithmic.

Figures that do not apply to the file are skipped with a one-line note. --points picks the
sweep points of the electric image by index along named axes (negative counts from the end;
axes not named are at index 0), e.g. --points distance=0 distance=-1,size=2. By default: the
nearest and the farthest computed distance at the first index of every other axis.

Coded datasets (/sweep/status, /detection/status) are read through their own flag_values and
flag_meanings: codes are looked up by their words ("computed", "crossed"), never by number.

Run it with /usr/bin/python3 (Debian's h5py, numpy and matplotlib). Bad input gets one line
on stderr and exit status 2.
"""
import argparse
import math
import os
import sys

DPI = 100  # figure sizes below are in inches: pixels = inches * DPI


class BadInput(Exception):
    """A problem with the user's file or options; its text is the whole message."""


class Skip(Exception):
    """A figure that does not apply to this file; its text says why."""


# ------------------------------------------------------------------ reading the file

GRID_AXES = ("grid_u", "grid_v")


class Axis:
    def __init__(self, name, values, units, labels=None):
        self.name, self.values, self.units = name, values, units
        self.labels = labels  # names of the values (the alternative axis: attribute alternative_names)

    def label(self):
        return {"m": f"{self.name} (mm)", "S m-1": f"{self.name} (S/m)"}.get(self.units, self.name)

    def shown(self, values):
        """Values in the units of label(): lengths in millimetres."""
        return values * 1e3 if self.units == "m" else values

    def name_of(self, i):
        """The value's name on a named axis (object), else None."""
        v = self.values[i]
        if self.labels and math.isfinite(v) and v == int(v) and 0 <= int(v) < len(self.labels):
            return self.labels[int(v)]
        return None

    def text(self, i):
        v = self.values[i]
        if self.name_of(i) is not None:
            return f"{self.name} {self.name_of(i)}"
        if self.units == "m":
            return f"{self.name} {v * 1e3:g} mm"
        if self.units == "S m-1":
            return f"{self.name} " + ("0 S/m (insulator)" if v == 0 else
                                       "inf (perfect conductor)" if math.isinf(v) else f"{v:g} S/m")
        return f"{self.name} {v:g}"

    def is_grid(self):
        return self.name in GRID_AXES

    def categorical(self):
        """Drawn as equal cells in sweep order: conductivities (0 = insulator, inf = conductor),
        named values (objects) and any axis holding 0 or inf, which have no place on a log scale
        (inf none on a linear one either). Grid axes are positions in space and stay linear."""
        if self.is_grid():
            return False
        v = self.values
        return bool(self.units == "S m-1" or self.labels or (~np_finite(v)).any() or (v == 0).any())

    def log(self):
        """Sweeps of distance and size are usually geometric: a log axis gives them even cells.
        Never for grid axes (a spatial map) or for values that are not all positive."""
        v = self.values
        return bool(not self.is_grid() and not self.categorical() and len(v) >= 2
                    and np_all_finite_positive(v) and v.max() / v.min() >= 4)

    def coords(self):
        """Where the values sit on a plot axis: cell numbers 0, 1, .. on a categorical axis."""
        import numpy as np
        return np.arange(len(self.values), dtype=float) if self.categorical() else self.shown(self.values)

    def cell_edges(self):
        import numpy as np
        if self.categorical():
            return np.arange(len(self.values) + 1) - 0.5
        return edges(self.coords(), self.log())

    def tick_text(self, i):
        v = self.values[i]
        if self.name_of(i) is not None:
            return self.name_of(i)
        if self.units == "S m-1" and (v == 0 or math.isinf(v)):
            return "insulator" if v == 0 else "conductor"
        if math.isinf(v):
            return "inf"
        return f"{self.shown(v):.3g}"


def np_finite(v):
    import numpy as np
    return np.isfinite(np.asarray(v, dtype=float))


class Result:
    """A murk result file opened with h5py; every missing piece is a BadInput naming it."""

    def __init__(self, path):
        import h5py
        if not os.path.exists(path):
            raise BadInput(f"{path}: no such file")
        try:
            self.file = h5py.File(path, "r")
        except OSError:
            raise BadInput(f"{path}: not an HDF5 file (or it cannot be read)") from None
        self.path = path
        if "murk_version" not in self.file.attrs:
            raise BadInput(f"{path}: not a murk result file (no murk_version attribute at the root)")
        self.title = str(self.file.attrs.get("title", os.path.basename(path)))
        self.is_sweep = "sweep" in self.file
        if self.is_sweep:
            self.axes = self._axes()

    def has(self, name):
        return name in self.file

    def dataset(self, name):
        import h5py
        if name not in self.file or not isinstance(self.file[name], h5py.Dataset):
            raise BadInput(f"{self.path}: no dataset /{name}")
        return self.file[name]

    def array(self, name, shape=None):
        """The dataset's values as floats (magnitudes for complex ones are left to the caller)."""
        d = self.dataset(name)
        if d.dtype.kind not in "fiuc":
            raise BadInput(f"{self.path}: dataset /{name} holds {d.dtype}, expected numbers")
        if shape is not None and d.shape != tuple(shape):
            raise BadInput(f"{self.path}: dataset /{name} has shape {d.shape}, expected {tuple(shape)}")
        return d[()]

    def words(self, name, shape=None):
        """A coded dataset as the words its flag_values / flag_meanings give its codes."""
        import numpy as np
        d = self.dataset(name)
        if "flag_values" not in d.attrs or "flag_meanings" not in d.attrs:
            raise BadInput(f"{self.path}: dataset /{name} has no flag_values and flag_meanings: "
                           "what its codes mean is unknown")
        codes = [int(v) for v in np.atleast_1d(d.attrs["flag_values"])]
        meanings = str(d.attrs["flag_meanings"]).split()
        if len(codes) != len(meanings):
            raise BadInput(f"{self.path}: dataset /{name} has {len(codes)} flag_values for {len(meanings)} words")
        data = self.array(name, shape)
        unknown = set(np.unique(data).tolist()) - set(codes)
        if unknown:
            raise BadInput(f"{self.path}: dataset /{name} holds {sorted(unknown)}, which its flag_values do not list")
        word_of = dict(zip(codes, meanings))
        return np.vectorize(lambda code: word_of[int(code)], otypes=[object])(data)

    def attribute(self, name, key):
        obj = self.file[name] if name in self.file else None
        if obj is None or key not in obj.attrs:
            raise BadInput(f"{self.path}: /{name} has no attribute {key}")
        return obj.attrs[key]

    def _axes(self):
        """Sweep axes, in the order of /sweep/status, from its dimension scales."""
        status = self.dataset("sweep/status")
        axes = []
        for k, dim in enumerate(status.dims):
            if len(dim) == 0:
                raise BadInput(f"{self.path}: dataset /sweep/status has no axis attached to dimension {k} "
                               "(expected a dimension scale from /sweep/<axis>)")
            # A scale whose link was deleted keeps the name make_scale gave it (its NAME).
            name = dim[0].name.split("/")[-1] if dim[0].name else (list(dim.keys()) or ["?"])[0]
            values = self.array(f"sweep/{name}", (status.shape[k],)).astype(float)
            attrs = self.file[f"sweep/{name}"].attrs
            units = str(attrs.get("units", ""))
            labels = str(attrs["alternative_names"]).split(",") if "alternative_names" in attrs else None
            axes.append(Axis(name, values, units, labels))
        return axes

    def axis_index(self, name):
        return next((k for k, a in enumerate(self.axes) if a.name == name), None)

    def shape(self):
        return tuple(len(a.values) for a in self.axes)

    def status(self):
        """What happened at each point, as words: "computed", "masked", "not_computed"."""
        return self.words("sweep/status", self.shape())

    def body(self):
        """Name of the sensing body's mesh: the runner's `body` attribute, or the only mesh."""
        if "body" in self.file.attrs:
            return str(self.file.attrs["body"])
        meshes = list(self.file["mesh"]) if "mesh" in self.file else []
        if len(meshes) != 1:
            raise BadInput(f"{self.path}: cannot tell the body's mesh: /mesh holds {meshes} and no body attribute")
        return meshes[0]

    def centroids(self, body):
        if self.has(f"mesh/{body}/centroid"):
            return self.array(f"mesh/{body}/centroid")
        v, t = self.mesh(body)
        return v[t].mean(axis=1)

    def mesh(self, body):
        v = self.array(f"mesh/{body}/vertices")
        t = self.array(f"mesh/{body}/triangles")
        if v.ndim != 2 or v.shape[1] != 3 or t.ndim != 2 or t.shape[1] != 3:
            raise BadInput(f"{self.path}: /mesh/{body} vertices or triangles are not (n, 3)")
        if t.min() < 0 or t.max() >= len(v):
            raise BadInput(f"{self.path}: dataset /mesh/{body}/triangles indexes missing vertices")
        return v, t

    def probability_level(self):
        """The detection level: stored on /detection, else on /sweep/detection_probability."""
        for name in ("detection", "sweep/detection_probability"):
            if name in self.file and "probability_level" in self.file[name].attrs:
                return float(self.file[name].attrs["probability_level"]), True
        return 0.5, False

    def point_text(self, index, skip=()):
        return ", ".join(a.text(i) for k, (a, i) in enumerate(zip(self.axes, index)) if k not in skip)


# ------------------------------------------------------------------ small helpers

def voltage_scale(values, units):
    """A factor and a label unit that put the largest value between 1 and 1000 (V -> µV)."""
    import numpy as np
    size = np.abs(np.asarray(values))
    size = size[np.isfinite(size)]
    big = float(size.max()) if size.size else 0.0
    for factor, prefix in ((1, ""), (1e3, "m"), (1e6, "µ"), (1e9, "n"), (1e12, "p")):
        if big * factor >= 1:
            return factor, prefix + units
    return 1e15, "f" + units


def edges(centres, log):
    """Cell edges around centres (geometric midpoints on a log axis)."""
    import numpy as np
    c = np.asarray(centres, dtype=float)
    if len(c) == 1:
        return np.array([c[0] * 0.9, c[0] * 1.1]) if log else np.array([c[0] - 0.5, c[0] + 0.5])
    if log:
        mid = np.sqrt(c[1:] * c[:-1])
        return np.concatenate([[c[0] ** 2 / mid[0]], mid, [c[-1] ** 2 / mid[-1]]])
    mid = 0.5 * (c[1:] + c[:-1])
    return np.concatenate([[2 * c[0] - mid[0]], mid, [2 * c[-1] - mid[-1]]])


def np_all_finite_positive(v):
    import numpy as np
    return bool(np.isfinite(v).all() and (v > 0).all())


def nice_log_ticks(lo, hi):
    """1-2-5 steps inside [lo, hi]: plain numbers a reader can place (not 10^1 alone)."""
    ticks = [m * 10.0 ** e for e in range(math.floor(math.log10(lo)) - 1, math.ceil(math.log10(hi)) + 1)
             for m in (1, 2, 5)]
    inside = [t for t in ticks if lo * (1 - 1e-9) <= t <= hi * (1 + 1e-9)]
    return inside if len(inside) >= 3 else [t * f for t in inside for f in (1, 1.5, 3)] or [lo, hi]


def plain_log_axis(axis_obj, lo, hi):
    """Labels a log axis (matplotlib's x or y axis object) with plain numbers."""
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullFormatter
    axis_obj.set_major_locator(FixedLocator(nice_log_ticks(lo, hi)))
    axis_obj.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    axis_obj.set_minor_formatter(NullFormatter())


def new_figure(size, title):
    import matplotlib.pyplot as plt
    fig = plt.figure(figsize=size, dpi=DPI, layout="constrained")
    fig.suptitle(title, fontsize=12)
    return fig


def save(fig, path):
    import matplotlib.pyplot as plt
    fig.savefig(path, dpi=DPI)
    plt.close(fig)
    return path


def slice_at(array, index, keep):
    """array[index] with the axes in `keep` left whole."""
    return array[tuple(slice(None) if k in keep else i for k, i in enumerate(index))]


def held_text(result, keep):
    others = [k for k in range(len(result.axes)) if k not in keep and len(result.axes[k].values) > 1]
    if not others:
        return ""
    return "held at " + ", ".join(result.axes[k].text(0) for k in others)


def outline_effect():
    """A dark rim under a light line: visible on both ends of the colour map."""
    import matplotlib.patheffects as pe
    return [pe.Stroke(linewidth=4, foreground="black"), pe.Normal()]


# ------------------------------------------------------------------ (a) detection map

def map_axes(result):
    """(x axis, y axis) of a map: distance on x whenever it varies, with size (else the first
    other axis that varies) on y; grid_u on x and grid_v on y; else the first two that vary."""
    varying = [k for k, a in enumerate(result.axes) if len(a.values) > 1]
    d, s = result.axis_index("distance"), result.axis_index("size")
    u, v = result.axis_index("grid_u"), result.axis_index("grid_v")
    if len(varying) < 2:
        raise Skip("fewer than two sweep axes with more than one value")
    if d in varying:
        others = [k for k in varying if k != d]
        return d, (s if s in others else others[0])
    if u in varying and v in varying:
        return u, v
    return varying[0], varying[1]


def detection_map(result, out_dir, stem):
    import numpy as np
    from matplotlib.colors import LogNorm
    if not result.is_sweep:
        raise Skip("not a sweep (a murk solve file)")
    if not result.has("sweep/snr"):
        raise Skip("no /sweep/snr (the case has no noise model)")
    xk, yk = map_axes(result)
    xa, ya = result.axes[xk], result.axes[yk]
    start = [0] * len(result.axes)
    snr = slice_at(result.array("sweep/snr", result.shape()), start, (xk, yk))
    pd = slice_at(result.array("sweep/detection_probability", result.shape()), start, (xk, yk))
    if xk > yk:
        snr, pd = snr.T, pd.T
    level, stored = result.probability_level()
    held = held_text(result, (xk, yk))
    positive = snr[np.isfinite(snr) & (snr > 0)]
    if positive.size == 0:
        raise Skip("no computed point with a positive signal-to-noise ratio in this slice")
    title = f"{result.title}\nsignal-to-noise ratio" + (f", {held}" if held else "")
    spatial = xa.is_grid() and ya.is_grid()

    def draw(size):
        fig = new_figure(size, title)
        ax = fig.add_subplot()
        image = ax.pcolormesh(xa.cell_edges(), ya.cell_edges(), np.ma.masked_invalid(snr.T),
                              cmap=colour_map("viridis"), norm=LogNorm(positive.min(), positive.max()), shading="flat")
        colour_bar(fig, ax, image, "signal-to-noise ratio d' (amplitude)", spatial)
        draw_level(ax, xa, ya, pd, level, stored)
        if xa.name == "distance":
            draw_ranges(result, ax, xk, yk)
        set_scales(ax, xa, ya)
        if spatial:
            ax.set_aspect("equal")
        legend_below(fig, ax)
        return fig, ax

    fig = fitted_height(draw, (8, 6.5)) if spatial else draw((8, 6.5))[0]
    return [save(fig, os.path.join(out_dir, f"{stem}_detection_map.png"))]


def colour_map(name):
    import matplotlib
    cmap = matplotlib.colormaps[name].copy()
    cmap.set_bad("0.85")  # light grey: masked or not computed
    return cmap


def colour_bar(fig, ax, image, label, attached):
    """The colour scale at the right. Attached to the axes (as tall as the drawn map, which an
    equal aspect may make shorter than the space the layout gives it) when `attached`."""
    if attached:
        fig.colorbar(image, cax=ax.inset_axes([1.03, 0, 0.035, 1]), label=label)
    else:
        fig.colorbar(image, ax=ax, label=label)


def draw_level(ax, xa, ya, pd_grid, level, stored):
    """Where the detection probability (pd_grid[x, y]) crosses the level: a contour over two
    continuous axes; along a categorical axis, a bar across each cell where its row or column
    crosses (there is nothing between the cells to interpolate over)."""
    import numpy as np
    finite = np.isfinite(pd_grid)
    label = f"detection probability {level:g}" + ("" if stored else " (level not stored in the file)")
    drawn = False
    if finite.sum() >= 2 and np.nanmin(pd_grid) < level < np.nanmax(pd_grid):
        xcat, ycat = xa.categorical(), ya.categorical()
        if not xcat and not ycat and finite.sum() >= 4 and min(pd_grid.shape) >= 2:
            cs = ax.contour(xa.coords(), ya.coords(), np.ma.masked_invalid(pd_grid.T), levels=[level],
                            colors="white", linewidths=2)
            for artist in getattr(cs, "collections", [cs]):
                artist.set_path_effects(outline_effect())
            drawn = True
        elif xcat != ycat:
            along, grid = (ya, pd_grid) if xcat else (xa, pd_grid.T)  # grid[cell, along]
            for cell, row in enumerate(grid):
                for at in level_crossings(along, row, level):
                    ends = (cell - 0.42, cell + 0.42)
                    xs, ys = ((at, at), ends) if ycat else (ends, (at, at))
                    ax.plot(xs, ys, color="white", linewidth=2, path_effects=outline_effect(), zorder=3)
                    drawn = True
    if drawn:
        ax.plot([], [], color="white", linewidth=2, path_effects=outline_effect(), label=label)
    if not finite.all():
        ax.plot([], [], marker="s", linestyle="none", color="0.85", markeredgecolor="0.5",
                label="masked or not computed")


def level_crossings(axis, row, level):
    """Plot coordinates where row crosses level between neighbouring computed points,
    interpolated linearly in the axis's own scale (in ln of the value on a log axis)."""
    import numpy as np
    c = axis.coords()
    t = np.log(c) if axis.log() else c
    out = []
    for i in range(len(row) - 1):
        p, q = row[i], row[i + 1]
        if np.isfinite(p) and np.isfinite(q) and (p - level) * (q - level) < 0:
            at = t[i] + (level - p) / (q - p) * (t[i + 1] - t[i])
            out.append(float(np.exp(at) if axis.log() else at))
    return out


def draw_ranges(result, ax, xk, yk):
    """The file's own detection ranges (/detection/range) as markers along the distance axis
    (x), one per cell of the y axis."""
    import numpy as np
    if not result.has("detection/range"):
        return
    xa, ya = result.axes[xk], result.axes[yk]
    xv, yv = xa.coords(), ya.coords()
    rng, status = detection_slice(result, xk, yk)
    crossed = np.isfinite(rng) & (status == "crossed")
    if crossed.any():
        ax.plot(xa.shown(rng[crossed]), yv[crossed], "o", color="white", markeredgecolor="black", markersize=8,
                linestyle="none", zorder=4, label="detection range (/detection/range)")
    for word, x, marker, text in (("beyond_sweep", xv.max(), ">", "detectable at every distance computed"),
                                  ("never_detectable", xv.min(), "<", "not detectable at any distance computed")):
        hit = status == word
        if hit.any():
            ax.plot(np.full(hit.sum(), x), yv[hit], marker, color="white", markeredgecolor="black",
                    markersize=10, linestyle="none", zorder=4, label=text)


def detection_slice(result, dk, yk):
    """/detection/range and status along axis yk, other axes at index 0 (scales name the dims)."""
    import numpy as np
    out = []
    for name in ("detection/range", "detection/status"):
        d = result.dataset(name)
        names = [dim[0].name.split("/")[-1] if len(dim) else None for dim in d.dims]
        others = [a.name for k, a in enumerate(result.axes) if k != dk]
        if None in names:
            names = others if d.shape == tuple(len(result.axes[k].values) for k in range(len(result.axes))
                                               if k != dk) else None
        if names is None or result.axes[yk].name not in names:
            raise BadInput(f"{result.path}: cannot tell which sweep axes /{name} lies over")
        index = tuple(slice(None) if n == result.axes[yk].name else 0 for n in names)
        values = result.words(name) if name.endswith("status") else np.asarray(d[()], dtype=float)
        out.append(values[index])
    return out


def set_scales(ax, xa, ya):
    """Scales, labels and ticks: categorical axes get one labelled tick per cell, short sweeps
    a tick at every value, long log sweeps plain 1-2-5 numbers."""
    for a, axis_obj, set_scale, set_ticks, set_label, set_lim in (
            (xa, ax.xaxis, ax.set_xscale, ax.set_xticks, ax.set_xlabel, ax.set_xlim),
            (ya, ax.yaxis, ax.set_yscale, ax.set_yticks, ax.set_ylabel, ax.set_ylim)):
        set_scale("log" if a.log() else "linear")
        set_label(a.label())
        e = a.cell_edges()
        set_lim(e[0], e[-1])
        if a.categorical() or len(a.values) <= 8:
            set_ticks(a.coords(), [a.tick_text(i) for i in range(len(a.values))], minor=False)
            set_ticks([], minor=True)
        elif a.log():
            shown = a.coords()
            plain_log_axis(axis_obj, shown.min(), shown.max())


def legend_below(fig, ax, ncol=2):
    """The axes' legend under the whole figure, outside the plot, with room kept for it."""
    handles, labels = ax.get_legend_handles_labels()
    if not handles:
        return
    legend = fig.legend(handles, labels, loc="lower center", bbox_to_anchor=(0.5, 0.005), ncol=min(ncol, len(handles)),
                        fontsize=9, frameon=False)
    fig.canvas.draw()
    height = legend.get_window_extent().height / fig.dpi + 0.08  # inches
    fig.get_layout_engine().set(rect=(0, height / fig.get_figheight(), 1, 1 - height / fig.get_figheight()))


def fitted_height(draw, size, least=3.0):
    """The figure of draw(size), drawn again less tall while its equal-aspect map leaves empty
    bands above and below it (the aspect fills only the width of the box the layout gives it).
    The width stays; the height never grows past size[1] nor shrinks below `least` inches."""
    import matplotlib.pyplot as plt
    fig, ax = draw(size)
    for _ in range(3):
        spare = vertical_spare(fig, ax)
        height = max(least, round((fig.get_figheight() - spare) * DPI) / DPI)
        if spare < 0.05 or height >= fig.get_figheight():
            break
        plt.close(fig)
        fig, ax = draw((size[0], height))
    return fig


def vertical_spare(fig, ax):
    """Inches of empty figure between the title and the axes (with its labels and colour bar)
    and between those and the legend at the bottom, beyond a normal gap."""
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    inch = fig.dpi
    body = ax.get_tightbbox(renderer)
    suptitle = getattr(fig, "_suptitle", None)
    title = suptitle.get_window_extent(renderer) if suptitle else None
    top = (title.y0 if title else fig.bbox.y1) - body.y1
    bottom = body.y0 - max([leg.get_window_extent(renderer).y1 for leg in fig.legends] or [fig.bbox.y0])
    gap = 0.12 * inch
    return max(0.0, top - gap) / inch + max(0.0, bottom - gap) / inch


# ------------------------------------------------------------------ (b) electric image

def parse_point(result, spec):
    index = [0] * len(result.axes)
    for part in spec.split(","):
        name, _, value = part.partition("=")
        k = result.axis_index(name.strip())
        if k is None:
            raise BadInput(f"--points {spec}: no sweep axis '{name.strip()}' (axes: "
                           f"{', '.join(a.name for a in result.axes)})")
        try:
            i = int(value)
        except ValueError:
            raise BadInput(f"--points {spec}: '{value}' is not an index along {name.strip()}") from None
        n = len(result.axes[k].values)
        if not -n <= i < n:
            raise BadInput(f"--points {spec}: index {i} is outside axis {name.strip()} of {n} values")
        index[k] = i % n
    return tuple(index)


def default_points(result, status):
    """Nearest and farthest computed distance, every other axis at index 0; without a distance
    axis, the computed points of largest and smallest peak perturbation."""
    import numpy as np
    d = result.axis_index("distance")
    if d is not None:
        line = slice_at(status, [0] * len(result.axes), (d,))
        done = np.flatnonzero(line == "computed")
        picks = sorted({done[0], done[-1]}) if done.size else []
        return [tuple(int(k) if j == d else 0 for j in range(len(result.axes))) for k in picks]
    peak = result.array("sweep/peak_perturbation", result.shape())
    peak = np.where(status == "computed", np.abs(peak), np.nan)
    if not np.isfinite(peak).any():
        return []
    picks = [np.nanargmax(peak), np.nanargmin(peak)]
    return [tuple(int(i) for i in np.unravel_index(p, peak.shape)) for p in dict.fromkeys(picks)]


def electric_images(result, out_dir, stem, point_specs):
    if not result.is_sweep:
        return solve_image(result, out_dir, stem)
    status = result.status()
    points = [parse_point(result, s) for s in point_specs] if point_specs else default_points(result, status)
    if not points:
        raise Skip("no computed point")
    sensor = result.dataset("sweep/sensor")
    n_sensors = sensor.shape[0]
    perturbation = result.dataset("sweep/perturbation")
    if perturbation.shape != result.shape() + (n_sensors,):
        raise BadInput(f"{result.path}: dataset /sweep/perturbation has shape {perturbation.shape}, "
                       f"expected {result.shape() + (n_sensors,)}")
    units = str(perturbation.attrs.get("units", "V"))
    written = []
    for number, index in enumerate(points, start=1):
        if status[index] != "computed":
            note(f"skipped electric image at {result.point_text(index)}: point {status[index].replace('_', ' ')}")
            continue
        values = perturbation[index]
        where = result.point_text(index)
        path = os.path.join(out_dir, f"{stem}_electric_image_{number}.png")
        if "sensor_names" in sensor.attrs:
            names = str(sensor.attrs["sensor_names"]).split(",")
            written.append(channel_bars(result, values, units, names, where, path))
        else:
            written.append(skin_image(result, result.body(), values, units, where, path))
    return written


def solve_image(result, out_dir, stem):
    """A murk solve file: the change of transdermal voltage of the first surface that has one,
    else the change of every electrode's potential."""
    path = os.path.join(out_dir, f"{stem}_electric_image_1.png")
    where = "the configuration of the case (murk solve)"
    for surface in result.file["mesh"] if result.has("mesh") else []:
        name = f"difference/{surface}/transdermal_voltage"
        if result.has(name):
            units = str(result.dataset(name).attrs.get("units", "V"))
            return [skin_image(result, surface, result.array(name), units, where, path)]
    name = "difference/electrodes/potential"
    if result.has(name):
        d = result.dataset(name)
        names = str(d.attrs.get("electrode_names", ",".join(str(k) for k in range(d.shape[0])))).split(",")
        return [channel_bars(result, d[()], str(d.attrs.get("units", "V")), names, where, path, "electrode")]
    raise Skip("no /difference/<surface>/transdermal_voltage or /difference/electrodes in this murk solve file")


def skin_image(result, body, values, units, where, path):
    """Perturbation per skin panel against the panel's position along the body axis (x) and its
    angle around that axis, so that the whole skin shows at once."""
    import numpy as np
    c = result.centroids(body)
    if len(c) != len(values):
        raise BadInput(f"{result.path}: {len(values)} sensors but /mesh/{body} has {len(c)} panels")
    complex_values = np.iscomplexobj(values)
    shown = np.abs(values) if complex_values else np.asarray(values, dtype=float)
    factor, unit = voltage_scale(shown, units)
    what = ("|change of transdermal voltage|" if complex_values else "change of transdermal voltage") + f" ({unit})"
    x = c[:, 0] * 1e3
    centre = 0.5 * (c.min(axis=0) + c.max(axis=0))
    angle = np.degrees(np.arctan2(c[:, 2] - centre[2], c[:, 1] - centre[1]))
    fig = new_figure((12, 5), f"{result.title}\nelectric image: {where}")
    left, right = fig.subplots(1, 2, width_ratios=[1, 1.3])
    left.scatter(x, shown * factor, s=10, color="0.15")
    left.axhline(0, color="0.6", linewidth=0.8)
    left.set_xlabel("position along the body axis x (mm)")
    left.set_ylabel(what)
    left.set_title("every skin panel", fontsize=10)
    points = right.scatter(x, angle, c=shown * factor, cmap="viridis", s=28, edgecolors="none")
    peak = int(np.nanargmax(np.abs(shown)))
    right.plot(x[peak], angle[peak], "o", markersize=13, markerfacecolor="none", markeredgecolor="black",
               markeredgewidth=1.5, label="peak panel")
    right.set_xlabel("position along the body axis x (mm)")
    right.set_ylabel("angle around the body axis, atan2(z, y) (degrees)")
    right.set_yticks(range(-180, 181, 90))
    right.set_title("unrolled skin (90° = up, ±180° = the -y side)", fontsize=10)
    right.legend(loc="upper right", fontsize=9)
    fig.colorbar(points, ax=right, label=what)
    return save(fig, path)


def channel_bars(result, values, units, names, where, path, kind="sensor channel"):
    import numpy as np
    if len(names) != len(values):
        raise BadInput(f"{result.path}: {len(names)} {kind} names for {len(values)} values")
    complex_values = np.iscomplexobj(values)
    shown = np.abs(values) if complex_values else np.asarray(values, dtype=float)
    factor, unit = voltage_scale(shown, units)
    fig = new_figure((8, 5), f"{result.title}\nchange of each {kind}'s reading: {where}")
    ax = fig.add_subplot()
    ax.bar(range(len(names)), shown * factor, color="0.35", edgecolor="black")
    ax.axhline(0, color="black", linewidth=0.8)
    ax.set_xticks(range(len(names)), names, rotation=30, ha="right")
    ax.set_xlabel(kind)
    ax.set_ylabel(("|change of reading|" if complex_values else "change of reading") + f" ({unit})")
    return save(fig, path)


# ------------------------------------------------------------------ (c) falloff

MARKERS = ["o", "s", "^", "D", "v", "P"]


def falloff(result, out_dir, stem):
    import matplotlib
    import numpy as np
    if not result.is_sweep:
        raise Skip("not a sweep (a murk solve file)")
    d = result.axis_index("distance")
    if d is None or len(result.axes[d].values) < 2:
        raise Skip("no distance axis with two or more values")
    peak = np.abs(result.array("sweep/peak_perturbation", result.shape()))
    status = result.status()
    units = str(result.dataset("sweep/peak_perturbation").attrs.get("units", "V"))
    curve_axis = pick_curve_axis(result, d)
    keep = (d,) if curve_axis is None else (d, curve_axis)
    held = held_text(result, keep)
    fig = new_figure((8, 6), f"{result.title}\nfalloff of the peak perturbation" + (f", {held}" if held else ""))
    ax = fig.add_subplot()
    distances = result.axes[d].values
    factor, unit = voltage_scale(peak[status == "computed"], units)
    count = 1 if curve_axis is None else min(len(result.axes[curve_axis].values), len(MARKERS))
    colours = [matplotlib.colormaps["viridis"](t) for t in np.linspace(0, 0.85, count)]
    anchor, plotted = None, []
    for c in range(count):
        index = [0] * len(result.axes)
        if curve_axis is not None:
            index[curve_axis] = c
        line = slice_at(peak, index, (d,))
        ok = (slice_at(status, index, (d,)) == "computed") & np.isfinite(line) & (line > 0)
        label = result.axes[curve_axis].text(c) if curve_axis is not None else "peak perturbation"
        fit = fitted_line(result, index, d, distances[ok], line[ok])
        if fit:
            label += f": exponent {fit[0]:.2f} (R² {fit[3]:.4f})"
        ax.plot(distances[ok] * 1e3, line[ok] * factor, marker=MARKERS[c], color=colours[c], linestyle="-",
                linewidth=0.8, markeredgecolor="black", markeredgewidth=0.5, label=label, zorder=3)
        plotted.extend(line[ok])
        if anchor is None and ok.any():
            far = np.flatnonzero(ok)[-1]
            anchor = (distances[far], line[far])  # the farthest point of the first curve
        if fit:
            # A wide pale band under the points: the fitted line would hide under them otherwise.
            exponent, lo, hi, _, intercept = fit
            xs = np.geomspace(lo, hi, 20)
            ax.plot(xs * 1e3, np.exp(intercept) * xs ** exponent * factor, color=colours[c], linewidth=9,
                    alpha=0.3, solid_capstyle="butt", zorder=2)
    draw_fourth_power(ax, distances, anchor, plotted, factor)
    ax.plot([], [], color="0.3", linewidth=9, alpha=0.3, label="fitted power law, over its fit range")
    ax.set_xscale("log")
    ax.set_yscale("log")
    shown = distances * 1e3
    plain_log_axis(ax.xaxis, shown.min(), shown.max())
    ax.set_xlabel("distance: clearance between object and body (mm)")
    ax.set_ylabel(f"peak |perturbation| ({unit})")
    ax.grid(True, which="both", color="0.9")
    ax.legend(fontsize=8.5, loc="lower left")
    return [save(fig, os.path.join(out_dir, f"{stem}_falloff.png"))]


def pick_curve_axis(result, d):
    """One curve per size when sizes vary, else per the first other axis that varies."""
    varying = [k for k, a in enumerate(result.axes) if k != d and len(a.values) > 1]
    s = result.axis_index("size")
    return s if s in varying else (varying[0] if varying else None)


def fitted_line(result, index, d, distances, peaks):
    """(exponent, fit_from, fit_to, R^2, intercept) of /falloff at this row, or None. The file
    stores no intercept: it is the least-squares one for the stored slope over the fit range."""
    import numpy as np
    if not result.has("falloff/exponent"):
        return None
    row = [i for k, i in enumerate(index) if k != d]
    shape = tuple(len(a.values) for k, a in enumerate(result.axes) if k != d)
    values = []
    for name in ("exponent", "fit_from", "fit_to", "r_squared"):
        a = np.asarray(result.array(f"falloff/{name}"), dtype=float)
        if a.shape != shape and not (shape == () and a.size == 1):
            raise BadInput(f"{result.path}: dataset /falloff/{name} has shape {a.shape}, expected {shape} "
                           "over the sweep axes other than distance")
        values.append(float(a[tuple(row)]) if row else float(a.ravel()[0]))
    exponent, lo, hi, r2 = values
    inside = (distances >= lo * (1 - 1e-9)) & (distances <= hi * (1 + 1e-9))
    if not np.isfinite(exponent) or not inside.any():
        return None
    intercept = np.mean(np.log(peaks[inside]) - exponent * np.log(distances[inside]))
    return exponent, lo, hi, r2, intercept


def draw_fourth_power(ax, distances, anchor, peaks, factor):
    """A distance^-4 line through the anchor (a measured point), only where it stays within
    the span of the measured peaks: a guide to compare slopes, not a curve to scale the axes."""
    import numpy as np
    if anchor is None or not len(peaks):
        return
    d0, p0 = anchor
    low, high = float(np.min(peaks)), float(np.max(peaks))
    # p0 (d/d0)^-4 lies within [low, high] for d within [d0 (high/p0)^-1/4, d0 (low/p0)^-1/4].
    start = max(float(distances.min()), d0 * (high / p0) ** -0.25)
    stop = min(float(distances.max()), d0 * (low / p0) ** -0.25)
    if not stop > start:
        return
    xs = np.geomspace(start, stop, 20)
    ax.plot(xs * 1e3, p0 * (xs / d0) ** -4 * factor, color="0.45", linestyle=":", linewidth=2,
            label="distance$^{-4}$ reference, through the first curve's farthest point")


# ------------------------------------------------------------------ (d) planar grid map

def grid_map(result, out_dir, stem):
    import numpy as np
    if not result.is_sweep:
        raise Skip("not a sweep (a murk solve file)")
    u, v = result.axis_index("grid_u"), result.axis_index("grid_v")
    if u is None or v is None:
        raise Skip("no grid_u and grid_v axes")
    if not result.has("sweep/detection_probability"):
        raise Skip("no /sweep/detection_probability (the case has no noise model)")
    origin, ud, vd = (np.asarray(result.attribute("sweep/grid_u", key), dtype=float)
                      for key in ("grid_origin", "grid_u_direction", "grid_v_direction"))
    for key, vec in (("grid_origin", origin), ("grid_u_direction", ud), ("grid_v_direction", vd)):
        if vec.shape != (3,):
            raise BadInput(f"{result.path}: attribute {key} of /sweep/grid_u is not a 3-vector (m)")
    pd = slice_at(result.array("sweep/detection_probability", result.shape()), [0] * len(result.axes), (u, v))
    if u > v:
        pd = pd.T
    level, stored = result.probability_level()
    held = held_text(result, (u, v))
    title = f"{result.title}\ndetection probability around the body" + (f", {held}" if held else "")
    ua, va = result.axes[u], result.axes[v]
    ue, ve = ua.cell_edges(), va.cell_edges()
    vertices, _ = result.mesh(result.body())
    hull = convex_hull(np.stack([(vertices - origin) @ ud, (vertices - origin) @ vd], axis=1) * 1e3)

    def draw(size):
        fig = new_figure(size, title)
        ax = fig.add_subplot()
        image = ax.pcolormesh(ue, ve, np.ma.masked_invalid(pd.T), cmap=colour_map("cividis"),
                              vmin=0, vmax=1, shading="flat")
        colour_bar(fig, ax, image, "detection probability", attached=True)
        draw_level(ax, ua, va, pd, level, stored)
        ax.fill(hull[:, 0], hull[:, 1], facecolor="none", edgecolor="black", linewidth=2, hatch="//",
                label="body (outline projected on the grid plane)")
        ax.set_aspect("equal")
        # Tight limits: the grid's cells and the body's outline, nothing more.
        pad = 0.02 * max(ue[-1] - ue[0], ve[-1] - ve[0])
        ax.set_xlim(min(ue[0], hull[:, 0].min() - pad), max(ue[-1], hull[:, 0].max() + pad))
        ax.set_ylim(min(ve[0], hull[:, 1].min() - pad), max(ve[-1], hull[:, 1].max() + pad))
        ax.set_xlabel("grid_u: along " + vector_text(ud) + " from the grid origin (mm)")
        ax.set_ylabel("grid_v: along " + vector_text(vd) + " (mm)")
        legend_below(fig, ax, ncol=3)
        return fig, ax

    fig = fitted_height(draw, (9.5, 5.6))
    return [save(fig, os.path.join(out_dir, f"{stem}_grid_map.png"))]


def vector_text(vec):
    return "(" + ", ".join(f"{x:.2g}" for x in vec) + ")"


def convex_hull(points):
    """Outline of the projected body (Andrew's monotone chain), closed."""
    import numpy as np
    pts = sorted(set(map(tuple, np.round(points, 9))))
    if len(pts) < 3:
        return np.array(pts + pts[:1])

    def half(seq):
        chain = []
        for p in seq:
            while len(chain) >= 2 and ((chain[-1][0] - chain[-2][0]) * (p[1] - chain[-2][1]) -
                                       (chain[-1][1] - chain[-2][1]) * (p[0] - chain[-2][0])) <= 0:
                chain.pop()
            chain.append(p)
        return chain[:-1]

    ring = half(pts) + half(reversed(pts))
    return np.array(ring + ring[:1])


# ------------------------------------------------------------------ (e) 3-D view of the body

def strongest_point(result):
    """The computed point of largest peak perturbation (the one the sweep's XDMF sidecar shows)."""
    import numpy as np
    peak = np.where(result.status() == "computed", np.abs(result.array("sweep/peak_perturbation", result.shape())),
                    -np.inf)
    if not np.isfinite(peak).any():
        raise Skip("no computed point")
    return tuple(int(i) for i in np.unravel_index(int(np.argmax(peak)), peak.shape))


def body_view(result, out_dir, stem):
    import numpy as np
    if result.is_sweep:
        sensor = result.dataset("sweep/sensor")
        if "sensor_names" in sensor.attrs:
            raise Skip("the sensors are channels, not skin panels")
        body = result.body()
        index = strongest_point(result)
        perturbation = result.dataset("sweep/perturbation")
        values, units = perturbation[index], str(perturbation.attrs.get("units", "V"))
        where = "strongest electric image of the sweep: " + result.point_text(index)
        centre = result.array("sweep/object_position", result.shape() + (3,))[index]
        s = result.axis_index("size")
        radius = result.axes[s].values[index[s]] if s is not None else None
    else:
        surfaces = [n for n in (result.file["mesh"] if result.has("mesh") else [])
                    if result.has(f"difference/{n}/transdermal_voltage")]
        if not surfaces:
            raise Skip("no /difference/<surface>/transdermal_voltage in this murk solve file")
        body = surfaces[0]
        d = result.dataset(f"difference/{body}/transdermal_voltage")
        values, units = d[()], str(d.attrs.get("units", "V"))
        where, centre, radius = "electric image of the case's configuration (murk solve)", None, None
    vertices, triangles = result.mesh(body)
    if len(values) != len(triangles):
        raise BadInput(f"{result.path}: {len(values)} image values for the {len(triangles)} panels of /mesh/{body}")
    return [draw_body(result, vertices, triangles, values, units, where, centre, radius,
                      os.path.join(out_dir, f"{stem}_body_view.png"))]


def draw_body(result, vertices, triangles, values, units, where, centre, radius, path):
    """The skin panels coloured by the image; a real image on a diverging map centred on zero
    (the sign tells a conductor from an insulator), a complex one by its magnitude."""
    import matplotlib
    import numpy as np
    from matplotlib.colors import Normalize
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection
    complex_values = np.iscomplexobj(values)
    shown = np.abs(values) if complex_values else np.asarray(values, dtype=float)
    factor, unit = voltage_scale(shown, units)
    shown = shown * factor
    if complex_values:
        cmap, norm = matplotlib.colormaps["viridis"], Normalize(0, float(np.nanmax(shown)))
        label = f"|change of transdermal voltage| ({unit}), magnitude of a complex image"
    else:
        reach = float(np.nanmax(np.abs(shown))) or 1.0
        cmap, norm = matplotlib.colormaps["RdBu_r"], Normalize(-reach, reach)
        label = f"change of transdermal voltage ({unit}); red +, blue -"
    fig = new_figure((10, 6.5), f"{result.title}\n{where}")
    ax = fig.add_subplot(projection="3d", computed_zorder=False)
    mm = vertices * 1e3
    ax.add_collection3d(Poly3DCollection(mm[triangles], facecolors=cmap(norm(shown)), edgecolors=(0, 0, 0, 0.15),
                                         linewidths=0.2))
    corners = [mm.min(axis=0), mm.max(axis=0)]
    if centre is not None and np.isfinite(centre).all():
        c = centre * 1e3
        if radius:
            u, v = np.meshgrid(np.linspace(0, 2 * np.pi, 24), np.linspace(0, np.pi, 12))
            r = radius * 1e3
            ax.plot_surface(c[0] + r * np.cos(u) * np.sin(v), c[1] + r * np.sin(u) * np.sin(v), c[2] + r * np.cos(v),
                            color="0.45", linewidth=0, zorder=3)
            corners += [c - r, c + r]
        else:
            ax.scatter(*c, color="0.2", s=40, zorder=3)
            corners.append(c)
        ax.plot([], [], "o", color="0.45", label="object at this point")
        ax.legend(loc="upper left", fontsize=9)
    low, high = np.min(corners, axis=0), np.max(corners, axis=0)
    # Equal scales on the three axes: each axis spans what is drawn along it (a slender body's
    # thin sides padded to a fifth of its length, so that the box keeps some depth), and the
    # box has the proportions of those spans.
    middle = (low + high) / 2
    half = np.maximum((high - low) / 2 * 1.05, (high - low).max() / 10)
    for set_lim, m, h in zip((ax.set_xlim, ax.set_ylim, ax.set_zlim), middle, half):
        set_lim(m - h, m + h)
    ax.set_box_aspect(tuple(half), zoom=1.25)
    ax.set_xlabel("x (mm)")
    ax.set_ylabel("y (mm)")
    ax.set_zlabel("z (mm)")
    # Looking at the side of the body where the image is strongest (its y side, from the half of
    # the body it lies in), from a little above or below it.
    centroids = mm[triangles].mean(axis=1)
    peak = centroids[int(np.nanargmax(np.abs(shown)))] - mm.mean(axis=0)
    ax.view_init(elev=25 if peak[2] >= -abs(peak[1]) else -25,
                 azim=math.degrees(math.atan2(math.copysign(1, peak[1]), math.copysign(0.8, peak[0]))))
    mappable = matplotlib.cm.ScalarMappable(norm=norm, cmap=cmap)
    fig.colorbar(mappable, ax=ax, location="bottom", shrink=0.6, pad=0.02, aspect=40, label=label)
    return save(fig, path)



# ------------------------------------------------------------------ layouts (murk layout)

PART_COLOURS = {"emitter_current": "tab:red", "emitter_voltage": "tab:red", "sensor": "tab:blue",
                "held_sensor": "tab:blue", "reference": "tab:green"}


def layout_sites(path):
    """The electrode sites of the case kept in the file, to draw on the unrolled hull: name ->
    ("ring", from, to) in m along the hull, or ("patch", x, angle, radius) with the patch centre's
    position along the hull (m), its angle around the axis (degrees from +y towards +z, -180 to
    180) and its
    radius (m); and the hull radius (m, or None). ({}, None) when the case cannot be read."""
    import h5py
    import tomllib
    with h5py.File(path, "r") as f:
        text = f.attrs.get("case", "")
    text = text.decode() if isinstance(text, bytes) else str(text)
    try:
        case = tomllib.loads(text)
    except tomllib.TOMLDecodeError:
        return {}, None
    robot = case.get("robot", {})
    try:
        hull_radius = length_m(robot["radius"])
    except (KeyError, ValueError):
        hull_radius = None
    sites = {}
    for e in robot.get("electrode", []):
        try:
            if e.get("form") == "ring":
                sites[e["name"]] = ("ring", length_m(e["from"]), length_m(e["to"]))
            elif e.get("form") == "patch":
                x, y, z = (length_m(c) for c in e["at"])
                sites[e["name"]] = ("patch", x, math.degrees(math.atan2(z, y)), length_m(e["radius"]))
        except (KeyError, ValueError, TypeError):
            continue
    rings = case.get("placement", {}).get("candidate_rings")
    if isinstance(rings, dict):  # [placement] candidate_rings: c01, c02, ... as murk makes them (cases/README.md)
        try:
            lo, hi, count, width = length_m(rings["from"]), length_m(rings["to"]), int(rings["count"]), length_m(rings["width"])
            gap = (hi - lo - count * width) / (count - 1) if count > 1 else 0.0
            digits = max(2, len(str(count)))
            for k in range(count):
                start = lo + k * (width + gap) if count > 1 else 0.5 * (lo + hi - width)
                sites[f"c{k + 1:0{digits}d}"] = ("ring", start, start + width)
        except (KeyError, ValueError, TypeError):
            pass
    return sites, hull_radius


def length_m(text):
    """A length of the case file ("15 cm"); only the units the examples use."""
    number, _, unit = str(text).strip().partition(" ")
    scale = {"m": 1.0, "cm": 1e-2, "mm": 1e-3}.get(unit.strip() or "m")
    if scale is None:
        raise ValueError(text)
    return float(number) * scale


def layout_maps(path, out_dir, stem):
    """One column per layout: its electrodes on the unrolled hull (rings as bands along the axis,
    patches as discs, coloured by their part), below it the detection probability of the largest
    target over the grid with the detectable region's outline, and, when the file has the position
    bound, the bound's longest semi-axis with the region within the accuracy."""
    import h5py
    import matplotlib.patches
    import matplotlib.pyplot as plt
    import numpy as np
    with h5py.File(path, "r") as f:
        if "layouts" not in f:
            raise Skip("not a murk layout file")
        names = sorted(f["layouts"].keys())
        sites, hull_radius = layout_sites(path)
        bounds = all("error_semi_axes" in f["layouts"][n] for n in names)
        rows = 3 if bounds else 2
        fig, axes = plt.subplots(rows, len(names), figsize=(4.2 * len(names), 5.4 + 4.0 * (rows - 2)), dpi=DPI,
                                 squeeze=False, gridspec_kw={"height_ratios": [1, 3, 3][:rows]}, layout="constrained")
        fig.suptitle("Electrode layouts on the unrolled hull (red emitter, blue sensor, green reference, grey unused), "
                     "the detection probability of the largest target"
                     + (",\nand the bound on its position error (longest semi-axis; white: within the accuracy)"
                        if bounds else ""))
        bound_image, bound_norm = None, common_bound_norm(f, names) if bounds else None
        for col, name in enumerate(names):
            g = f["layouts"][name]
            top, ax = axes[0][col], axes[1][col]
            parts = dict(zip([n.decode() if isinstance(n, bytes) else n for n in g["electrode"][:]],
                             g["electrode_part"][:]))
            meanings = g["electrode_part"].attrs["flag_meanings"]
            meanings = (meanings.decode() if isinstance(meanings, bytes) else meanings).split()
            for site, shape in sites.items():
                part = meanings[parts[site]] if site in parts else None
                colour, alpha = PART_COLOURS.get(part, "lightgrey"), 1.0 if part else 0.5
                if shape[0] == "ring":
                    lo, hi = shape[1], shape[2]
                    top.axvspan(lo * 100, hi * 100, color=colour, alpha=alpha)
                    top.text((lo + hi) * 50, 0, site, ha="center", va="center", fontsize=7, rotation=90)
                else:  # a patch: a disc of its radius along the hull and, around it, of radius/hull radius
                    _, x, angle, radius = shape
                    height = math.degrees(2 * radius / hull_radius) if hull_radius else 20
                    top.add_patch(matplotlib.patches.Ellipse((x * 100, angle), 2 * radius * 100, height,
                                                             color=colour, alpha=alpha))
                    top.text(x * 100, angle, site, ha="center", va="center", fontsize=6)
            top.set_ylim(-180, 180)
            top.set_yticks([-180, -90, 0, 90, 180])
            top.set_xlabel("along the hull (cm)")
            top.set_ylabel("around (deg)")
            top.set_title(name)
            u, v = g["u"][:] * 100, g["v"][:] * 100
            sizes = g["size"][:]
            k = int(np.argmax(sizes))
            pd = g["detection_probability"][k]
            image = ax.pcolormesh(u, v, pd.T, vmin=0, vmax=1, cmap="viridis", shading="nearest")
            ring, hole = g["outline_ring"][:], g["outline_hole"][:]
            ou, ov, osz = g["outline_u"][:] * 100, g["outline_v"][:] * 100, g["outline_size"][:]
            for r in np.unique(ring[osz == sizes[k]]):
                pick = (ring == r) & (osz == sizes[k])
                ax.plot(np.append(ou[pick], ou[pick][0]), np.append(ov[pick], ov[pick][0]),
                        color="white", linestyle="--" if hole[pick][0] else "-", linewidth=1.2)
            ax.set_aspect("equal")
            ax.set_xlabel("u (cm)")
            ax.set_ylabel("v (cm)")
            ax.set_title(f"size {sizes[k] * 1000:g} mm, area {g['detectable_area'][k] * 1e4:.0f} cm²", fontsize=9)
            if bounds:
                bound_image = position_bound_map(axes[2][col], g, k, u, v, bound_norm) or bound_image
        fig.colorbar(image, ax=axes[1, :].tolist(), location="bottom", shrink=0.5, label="detection probability")
        if bound_image is not None:
            fig.colorbar(bound_image, ax=axes[2, :].tolist(), location="bottom", shrink=0.5, extend="max",
                         label="longest semi-axis of the position error (mm), log scale")
    return [save(fig, os.path.join(out_dir, f"{stem}_layouts.png"))]


def placement_curve(path, out_dir, stem):
    """The criterion of the chosen sites after each greedy step and each exchange of /placement,
    the chosen sites' names along the curve, and each layout's criterion as a level."""
    import h5py
    import matplotlib.pyplot as plt
    with h5py.File(path, "r") as f:
        if "placement" not in f:
            raise Skip("the file has no /placement")
        g = f["placement"]
        text = lambda v: v.decode() if isinstance(v, bytes) else str(v)
        criterion = text(g.attrs["criterion"])
        names = [text(n) for n in g["candidate"][:]]
        layouts = [text(n) for n in g["layout"][:]]
        scale, unit = {"detectable_area": (1e4, "cm²"), "detectable_volume": (1e6, "cm³")}.get(criterion, (1.0, ""))
        values = list(g["greedy_criterion"][:] * scale)
        labels = ["+" + names[c] for c in g["greedy_added"][:]]
        if "exchange_criterion" in g:
            values += list(g["exchange_criterion"][:] * scale)
            labels += [f"{names[a]} for {names[r]}" for a, r in zip(g["exchange_added"][:], g["exchange_removed"][:])]
        own = g["layout_criterion"][:] * scale
        greedy_steps = len(g["greedy_criterion"])
        chosen = ", ".join(text(n) for n in g["chosen"][:])
        title = text(f.attrs.get("title", ""))
        fig = new_figure((7.5, 4.8), title)
        ax = fig.add_subplot(1, 1, 1)
        x = list(range(1, len(values) + 1))
        ax.plot(x[:greedy_steps], values[:greedy_steps], "o-", color="tab:blue", label="greedy: one site added per step")
        if len(values) > greedy_steps:
            ax.plot(x[greedy_steps - 1:], values[greedy_steps - 1:], "s--", color="tab:orange",
                    label="exchanges: one chosen site swapped")
        for xi, v, lab in zip(x, values, labels):
            ax.annotate(lab, (xi, v), textcoords="offset points", xytext=(0, 7), ha="center", fontsize=8)
        styles = [":", "-.", (0, (5, 2)), (0, (1, 3))]
        colours = ["tab:green", "tab:red", "tab:purple", "tab:brown", "tab:olive", "tab:cyan"]
        for k, (name, v) in enumerate(zip(layouts, own)):
            ax.axhline(v, color=colours[k % len(colours)], linestyle=styles[k % len(styles)], linewidth=1.2,
                       label=f"layout {name}")
        ax.set_xticks(x)
        ax.set_xticklabels([str(k) for k in x[:greedy_steps]] + [f"swap {k}" for k in range(1, len(x) - greedy_steps + 1)])
        ax.set_xlabel("sensors chosen (greedy steps), then exchanges")
        ax.set_ylabel(criterion.replace("_", " ") + (f" ({unit})" if unit else ""))
        ax.set_title(f"chosen: {chosen}", fontsize=9)
        ax.margins(y=0.15)
        ax.legend(fontsize=8, loc="lower right")
    return [save(fig, os.path.join(out_dir, f"{stem}_placement.png"))]


def common_bound_norm(f, names):
    """One log colour scale (mm) for the bound maps of every layout: from the smallest finite
    longest semi-axis of the largest target to at most 100 times the accuracy (an ill-conditioned
    point's bound can be metres; beyond the scale it takes the end colour)."""
    import matplotlib.colors
    import numpy as np
    values, accuracy = [], None
    for name in names:
        g = f["layouts"][name]
        k = int(np.argmax(g["size"][:]))
        longest = g["error_semi_axes"][k][..., 0] * 1e3
        values.append(longest[np.isfinite(longest) & (longest > 0)])
        accuracy = float(g["localization_accuracy"][()]) * 1e3
    values = np.concatenate(values)
    if values.size == 0:
        return None
    lo = values.min()
    hi = min(values.max(), 100 * accuracy) if accuracy else values.max()
    return matplotlib.colors.LogNorm(vmin=lo, vmax=max(hi, lo * 1.01))


def position_bound_map(ax, g, k, u, v, norm):
    """The Cramer-Rao bound's longest semi-axis (mm) of size k over the grid on the colour scale
    `norm`, grey where it is not computed or unbounded, with the cells within the accuracy
    outlined in white. Returns the image (None when no point has a finite bound)."""
    import numpy as np
    longest = g["error_semi_axes"][k][..., 0] * 1e3
    finite = np.isfinite(longest) & (longest > 0)
    ax.set_facecolor("0.8")
    ax.set_aspect("equal")
    step_u = (u[1] - u[0]) / 2 if len(u) > 1 else 1
    step_v = (v[1] - v[0]) / 2 if len(v) > 1 else 1
    ax.set_xlim(u[0] - step_u, u[-1] + step_u)
    ax.set_ylim(v[0] - step_v, v[-1] + step_v)
    ax.set_xlabel("u (cm)")
    ax.set_ylabel("v (cm)")
    accuracy = float(g["localization_accuracy"][()]) * 1e3
    area = g["localizable_area"][k] * 1e4 if "localizable_area" in g else float("nan")
    ax.set_title(f"position bound, accuracy {accuracy:g} mm: {area:.0f} cm² within", fontsize=9)
    if not finite.any() or norm is None:
        ax.text(0.5, 0.5, "no finite bound\n(some direction not informed)", transform=ax.transAxes,
                ha="center", va="center", fontsize=9)
        return None
    image = ax.pcolormesh(u, v, np.where(finite, longest, np.nan).T, norm=norm, cmap="magma_r", shading="nearest")
    within = g["within_accuracy"][k] == 1
    if within.any() and len(u) > 1 and len(v) > 1:
        ax.contour(u, v, within.T.astype(float), levels=[0.5], colors="white", linewidths=1.2)
    return image


# ------------------------------------------------------------------ driver

def note(text):
    print(text)


def is_layout_file(path):
    import h5py
    try:
        with h5py.File(path, "r") as f:
            return "layouts" in f
    except OSError:
        return False  # Result() says what is wrong with it


def make_figures(args):
    import matplotlib
    matplotlib.use("Agg")
    out_dir_early = args.output_dir or os.path.dirname(os.path.abspath(args.result))
    if is_layout_file(args.result):
        if not os.path.isdir(out_dir_early):
            raise BadInput(f"{out_dir_early}: no such folder")
        stem = os.path.splitext(os.path.basename(args.result))[0]
        for path in layout_maps(args.result, out_dir_early, stem):
            print(path)
        try:
            for path in placement_curve(args.result, out_dir_early, stem):
                print(path)
        except Skip as why:
            note(f"skipped placement curve: {why}")
        return
    result = Result(args.result)
    out_dir = args.output_dir or os.path.dirname(os.path.abspath(args.result))
    if not os.path.isdir(out_dir):
        raise BadInput(f"{out_dir}: no such folder")
    stem = os.path.splitext(os.path.basename(args.result))[0]
    figures = [("detection map", lambda: detection_map(result, out_dir, stem)),
               ("electric image", lambda: electric_images(result, out_dir, stem, args.points)),
               ("falloff", lambda: falloff(result, out_dir, stem)),
               ("grid map", lambda: grid_map(result, out_dir, stem)),
               ("body view", lambda: body_view(result, out_dir, stem))]
    for name, make in figures:
        try:
            for path in make():
                print(path)
        except Skip as why:
            note(f"skipped {name}: {why}")


def main():
    parser = argparse.ArgumentParser(description="Figures (PNG) of a murk result file.",
                                     epilog="See the top of this script for the figures and --points.")
    parser.add_argument("result", help="result file of murk run or murk solve (HDF5)")
    parser.add_argument("-o", "--output-dir", help="folder for the PNG files (default: beside the result)")
    parser.add_argument("--points", nargs="+", metavar="AXIS=INDEX[,AXIS=INDEX]",
                        help="sweep points for the electric image, by index along named axes")
    args = parser.parse_args()
    try:
        make_figures(args)
    except ImportError as missing:
        print(f"plot_results.py: {missing.name} is missing; run with /usr/bin/python3 or install "
              "python3-h5py python3-numpy python3-matplotlib", file=sys.stderr)
        sys.exit(1)
    except BadInput as problem:
        print(f"plot_results.py: {problem}", file=sys.stderr)
        sys.exit(2)
    except Exception as failure:  # a bug or a file broken in a way not foreseen: still one line
        print(f"plot_results.py: failed on {args.result}: {type(failure).__name__}: {failure}", file=sys.stderr)
        sys.exit(1)


if __name__ == "__main__":
    main()
