"""Time-current plots: a circuit's device and every device above it, on log-log axes.

Each device is a translucent band between its edges (``t_min`` below, ``t_max`` above); the
crossover zones the engine found between a pair are hatched and marked with their selectivity
limit Is; vertical markers show the maximum fault at the circuit's board, the minimum earth fault
at its far end and its design current Ib; two falling lines show the adiabatic withstand
``t = k^2 S^2 / I^2`` of the circuit's line conductor and protective conductor.

matplotlib is imported only here (and in the report), never by the command-line entry point.
Figures are built with :class:`matplotlib.figure.Figure` directly, on the non-interactive Agg
canvas: no window, no pyplot state, safe in a server and in a notebook.

Every artist that stands for something carries a ``gid`` so that tests and callers can find it:
``band:<id>``, ``edge:<id>``, ``zone:<upstream>><downstream>``, ``limit:<upstream>><downstream>``,
``marker:max-fault``, ``marker:min-earth-fault``, ``marker:load``, ``withstand:line``,
``withstand:cpc``.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

import numpy as np

from coordination.checks import k_factor
from coordination.devices import band_for
from coordination.io import atomic_path
from coordination.model import Cable, Study
from coordination.text import format_current, format_seconds, positive_or_none
from curves.band import TIME_CEILING_S, TIME_FLOOR_S, Band
from curves.errors import InputError

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

#: Band colours, downstream device first. Chosen for distinct lightness (so that a greyscale print
#: still tells them apart) and paired with distinct edge dash patterns.
PALETTE = ("#1d4e89", "#e09f3e", "#2a7f62", "#9e2a2b", "#7b6d8d", "#c9b458", "#335c67")
DASHES: tuple[Any, ...] = ("-", "--", "-.", ":", (0, (6, 2, 1, 2)), (0, (1, 1)), (0, (8, 3)))
BAND_ALPHA = 0.22
ZONE_FACE = "#f2c14e"
ZONE_EDGE = "#7a0f12"
#: One hatch per crossover zone on a plot, so the legend tells them apart in greyscale.
ZONE_HATCHES = ("xxxx", "////", "\\\\\\\\", "++++", "....")
MARKER_STYLE = {
    "max-fault": {"color": "#111111", "linestyle": "-", "linewidth": 1.6},
    "min-earth-fault": {"color": "#444444", "linestyle": (0, (4, 2)), "linewidth": 1.3},
    "load": {"color": "#777777", "linestyle": (0, (1, 2)), "linewidth": 1.4},
}
#: Where the Is marks go, in points from the limit (alternating sides).
LIMIT_OFFSETS = ((-12, -26), (14, 22), (-12, -46), (14, 42))
WITHSTAND_STYLE = {
    "line": {"color": "#5c3d2e", "linestyle": (0, (10, 3)), "linewidth": 1.2},
    "cpc": {"color": "#a0785a", "linestyle": (0, (3, 2, 3, 6)), "linewidth": 1.2},
}

#: The adiabatic equation holds for faults up to 5 s (IEC 60364-4-43, 434.5.2).
ADIABATIC_LIMIT_S = 5.0


def withstand_time(current_a: Any, k: float, csa_mm2: float) -> np.ndarray:
    """Adiabatic withstand time of a conductor, ``t = k^2 S^2 / I^2`` [s].

    Parameters
    ----------
    current_a : array_like
        Fault current [A].
    k : float
        Material factor [A s^0.5 / mm^2] (``coordination.checks.k_factor``).
    csa_mm2 : float
        Conductor cross-section [mm^2] (sum of parallel conductors).

    References
    ----------
    IEC 60364-4-43:2008, 434.5.2, equation t = (k S / I)^2, valid up to 5 s.

    Examples
    --------
    >>> print(round(float(withstand_time(1000.0, 115.0, 2.5)), 4))
    0.0827
    """
    i = np.asarray(current_a, dtype=np.float64)
    return (k * csa_mm2) ** 2 / (i * i)


# -- helpers -----------------------------------------------------------------------------------
def _chain(study: Study, circuit_id: str) -> tuple[str, ...]:
    """The circuit and every circuit above it, nearest first."""
    if circuit_id not in study.by_id:
        raise InputError(f"no circuit {circuit_id!r} in the study; give one of its circuit ids",
                         key="--circuit")
    return (circuit_id, *study.ancestors(circuit_id))


def _current_grid(band: Band, i_lo: float, i_hi: float, points: int = 500) -> np.ndarray:
    """A log-spaced grid with the band's corners (pickups, instantaneous) added on both sides."""
    start = max(i_lo, band.pickup_min_a * (1 + 1e-6))
    if not i_hi > start:
        return np.array([])
    grid = np.geomspace(start, i_hi, points)
    corners = [band.pickup_max_a, band.instantaneous_a]
    for key in ("Isd_a", "Ii_a"):
        corners.append(band.settings.get(key))
    extra = [c * f for c in corners if positive_or_none(c) for f in (1 - 1e-6, 1 + 1e-6)
             if start < c * f < i_hi]
    return np.unique(np.concatenate([grid, np.asarray(extra, dtype=np.float64)]))


def _decade_label(value: float, unit: str) -> str:
    """Tick labels: 1 A, 10 A, 1 kA ... and 0.1 ms, 1 ms, 1 s, 10000 s."""
    if unit == "A":
        return format_current(value)
    if value >= 1.0:
        return f"{value:.0f} s"
    return format_seconds(value)


def _geometry_polygons(geometry: Any) -> list[Any]:
    if geometry is None or getattr(geometry, "is_empty", True):
        return []
    kind = geometry.geom_type
    if kind == "Polygon":
        return [geometry]
    if kind in ("MultiPolygon", "GeometryCollection"):
        out: list[Any] = []
        for part in geometry.geoms:
            out.extend(_geometry_polygons(part))
        return out
    return []


def _zone_patch(polygons: Sequence[Any], gid: str, label: str | None, hatch: str) -> Any:
    """One PathPatch (holes included) from shapely polygons in (log10 I, log10 t)."""
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path as MplPath

    vertices: list[np.ndarray] = []
    codes: list[np.ndarray] = []
    for poly in polygons:
        for ring in (poly.exterior, *poly.interiors):
            xy = 10.0 ** np.asarray(ring.coords, dtype=np.float64)
            if len(xy) < 3:
                continue
            c = np.full(len(xy), MplPath.LINETO, dtype=np.uint8)
            c[0] = MplPath.MOVETO
            c[-1] = MplPath.CLOSEPOLY
            vertices.append(xy)
            codes.append(c)
    path = MplPath(np.concatenate(vertices), np.concatenate(codes))
    return PathPatch(path, facecolor=ZONE_FACE, edgecolor=ZONE_EDGE, hatch=hatch,
                     linewidth=0.9, alpha=0.75, gid=gid, label=label, zorder=4)


def _tag_point(band: Band, grid: np.ndarray, target_s: float) -> tuple[float, float] | None:
    """Where the band's upper edge passes a given time (for the device's inline label)."""
    if grid.size == 0:
        return None
    t_hi = np.clip(band.t_max(grid), TIME_FLOOR_S, TIME_CEILING_S)
    below = np.nonzero(t_hi <= target_s)[0]
    if below.size == 0:
        return None
    j = int(below[0])
    return float(grid[j]), float(t_hi[j])


def _minor_grid(x_lo: float, x_hi: float, y_lo: float, y_hi: float) -> Any:
    """Light lines at 2..9 x each decade of both axes, as one collection."""
    from matplotlib.collections import LineCollection

    def minors(lo: float, hi: float) -> np.ndarray:
        decades = 10.0 ** np.arange(math.floor(math.log10(lo)), math.ceil(math.log10(hi)))
        values = (decades[:, None] * np.arange(2, 10)[None, :]).ravel()
        return values[(values > lo) & (values < hi)]

    segments = [((x, y_lo), (x, y_hi)) for x in minors(x_lo, x_hi)]
    segments += [((x_lo, y), (x_hi, y)) for y in minors(y_lo, y_hi)]
    return LineCollection(segments, colors="#e6e6e6", linewidths=0.4, zorder=0.5)


def pairs_in_chain(analysis: Any, chain: Sequence[str]) -> list[Any]:
    """The engine's pairs whose upstream and downstream are both in a chain of circuits."""
    members = set(chain)
    return [p for cid in reversed(chain) for p in analysis.for_circuit(cid)
            if p.upstream in members]


# -- the plot ----------------------------------------------------------------------------------
def plot_circuit(study: Study, levels: Any, analysis: Any, circuit_id: str, *,
                 basis: str | None = None, ax: Axes | None = None,
                 title: str | None = None) -> Figure:
    """Time-current plot of a circuit's device and every device above it.

    Parameters
    ----------
    study : Study
        The loaded study.
    levels : FaultLevels
        From ``coordination.faults.compute(study)``.
    analysis : Analysis
        From ``coordination.engine.analyse(study, levels, basis=basis)``.
    circuit_id : str
        The circuit to plot; its ancestors are drawn with it.
    basis : str, optional
        Band basis (``"typical"`` or ``"envelope"``); ``None``: the basis the analysis was made
        with (``analysis.basis``), else each circuit's own.
    ax : matplotlib Axes, optional
        Draw into these axes (the report does); by default a new figure is made.
    title : str, optional
        Axes title; by default the study title and the circuit.

    Returns
    -------
    matplotlib.figure.Figure
        The figure (current [A] on a log x axis, time [s] on a log y axis).

    References
    ----------
    IEC 60898-1, IEC 60269-2 and IEC 60947-2 (the bands); IEC 60364-4-43, 434.5.2 (adiabatic
    withstand ``k^2 S^2 / I^2``); IEC 60909-0 (the fault levels marked).

    Examples
    --------
    >>> from coordination import study, faults, engine
    >>> s = study.load("examples/small-shop.toml")  # doctest: +SKIP
    >>> lv = faults.compute(s); an = engine.analyse(s, lv)  # doctest: +SKIP
    >>> fig = plot_circuit(s, lv, an, "bakery-oven")  # doctest: +SKIP
    >>> print(fig.axes[0].get_xscale())  # doctest: +SKIP
    log
    """
    from matplotlib.figure import Figure
    from matplotlib.ticker import FuncFormatter, LogLocator, NullLocator

    if basis is None:
        basis = getattr(analysis, "basis", None)
    chain = _chain(study, circuit_id)
    bands = {cid: band_for(study, cid, basis) for cid in chain}
    # the circuit, then the engine's rows above it: ancestors in a row with one device are one
    # row there, and one band here (first, last, count)
    drawn = [(circuit_id, circuit_id, 1)] + [
        (p.upstream, p.upstream_last or p.upstream, p.upstream_count)
        for p in analysis.for_circuit(circuit_id)]
    node = levels.by_circuit.get(circuit_id)
    circuit = study.by_id[circuit_id]

    # -- current span: below the smallest pickup to a bit past the largest fault in the chain
    faults_a = [positive_or_none(getattr(levels.by_circuit.get(cid), key, None))
                for key in ("ik_max_a", "ik3_max_a") for cid in chain]
    faults_a = [f for f in faults_a if f]
    lows = [v for v in (*(positive_or_none(b.pickup_min_a) for b in bands.values()),
                        positive_or_none(circuit.load_a)) if v]
    i_min = 10.0 ** math.floor(math.log10(0.7 * min(lows))) if lows else 1.0
    top = max(faults_a) if faults_a else 100.0 * max(b.rating_a for b in bands.values())
    i_max = 10.0 ** math.ceil(math.log10(1.3 * top))

    if ax is None:
        fig = Figure(figsize=(9.0, 7.6))
        ax = fig.add_axes((0.1, 0.27, 0.86, 0.65))
        standalone = True
    else:
        fig = ax.figure
        standalone = False
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_xlim(i_min, i_max)
    ax.set_ylim(TIME_FLOOR_S, TIME_CEILING_S)

    # -- bands, downstream first (drawn last so it sits on top); alike devices in a row once
    for k, (cid, last, count) in reversed(list(enumerate(drawn))):
        band = bands[cid]
        who = cid if count == 1 else f"{cid} to {last} ({count} alike)"
        colour = PALETTE[k % len(PALETTE)]
        dash = DASHES[k % len(DASHES)]
        grid = _current_grid(band, i_min, i_max)
        if grid.size == 0:
            continue
        t_lo, t_hi = band.edges(grid)
        ax.fill_between(grid, t_lo, t_hi, facecolor=colour, alpha=BAND_ALPHA, linewidth=0, zorder=2,
                        gid=f"band:{cid}",
                        label=f"{who}: {band.name} ({band.basis})")
        for edge in (t_lo, t_hi):
            ax.plot(grid, edge, color=colour, linestyle=dash, linewidth=1.3, zorder=3,
                    gid=f"edge:{cid}")
        tag = _tag_point(band, grid, 10.0 ** (3.0 - 0.7 * k))
        if tag is not None:
            # to the left of the edge in the right third of the axis, so it stays inside
            right = math.log10(tag[0] / i_min) > 0.66 * math.log10(i_max / i_min)
            ax.annotate(f"{who}\n{band.name}", xy=tag, xytext=(-4 if right else 4, 2),
                        textcoords="offset points", ha="right" if right else "left",
                        fontsize=7, color=colour, zorder=6, gid=f"tag:{cid}",
                        bbox={"boxstyle": "round,pad=0.15", "facecolor": "white",
                              "edgecolor": "none", "alpha": 0.7})

    # -- crossover zones and their limits
    from coordination import engine

    marks = 0
    zones = 0
    shown = {cid for cid, _, _ in drawn}
    for pair in pairs_in_chain(analysis, chain):
        if pair.verdict == "total" or pair.upstream not in shown or pair.downstream not in shown:
            continue
        name = f"{pair.upstream}>{pair.downstream}"
        polys = _geometry_polygons(engine.overlap(study, levels, pair, basis))
        limit = positive_or_none(pair.limit_a)
        if polys:
            where = f", Is {format_current(limit)}" if limit is not None else ""
            ax.add_patch(_zone_patch(
                polys, f"zone:{name}",
                f"crossover, both may operate: {pair.upstream} over {pair.downstream}{where}",
                ZONE_HATCHES[zones % len(ZONE_HATCHES)]))
            zones += 1
        if limit is not None:
            t_at = float(np.clip(bands[pair.downstream].t_max(limit), TIME_FLOOR_S,
                                 TIME_CEILING_S))
            if polys:  # put the mark on the zone's left end when there is one
                xs = np.concatenate([np.asarray(p.exterior.coords)[:, 0] for p in polys])
                ys = np.concatenate([np.asarray(p.exterior.coords)[:, 1] for p in polys])
                t_at = float(10.0 ** ys[int(np.argmin(xs))])
            # successive marks go to alternate sides and further out, so they do not collide
            dx, dy = LIMIT_OFFSETS[marks % len(LIMIT_OFFSETS)]
            marks += 1
            ax.annotate(f"Is {format_current(limit)}",
                        xy=(limit, t_at), xytext=(dx, dy), textcoords="offset points",
                        ha="right" if dx < 0 else "left", fontsize=7, color=ZONE_EDGE, zorder=7,
                        gid=f"limit:{name}",
                        arrowprops={"arrowstyle": "->", "color": ZONE_EDGE, "linewidth": 0.8})

    # -- vertical markers
    board = study.board_name(circuit_id)
    markers = [
        ("max-fault", positive_or_none(getattr(node, "ik_max_a", None)),
         "maximum fault at {board}: {i}"),
        ("min-earth-fault", positive_or_none(getattr(node, "ief_min_a", None)),
         "minimum earth fault at the far end: {i}"),
        ("load", positive_or_none(circuit.load_a), "design current Ib: {i}"),
    ]
    for key, current, text in markers:
        if current is None:
            continue
        ax.axvline(current, zorder=5, gid=f"marker:{key}",
                   label=text.format(board=board, i=format_current(current)),
                   **MARKER_STYLE[key])

    # -- adiabatic withstand of the circuit's conductors
    cable: Cable | None = circuit.cable
    if cable is not None:
        line_s = float(cable.csa_mm2) * int(cable.parallel or 1)
        cpc_s = float(cable.cpc_mm2 or cable.csa_mm2)
        cpc_material = cable.cpc_material or cable.material
        for key, s_mm2, material, what in (
            ("line", line_s, cable.material, "line conductor"),
            ("cpc", cpc_s, cpc_material, "protective conductor"),
        ):
            k = k_factor(material, cable.insulation, float(cable.csa_mm2))
            t_hi = min(ADIABATIC_LIMIT_S, TIME_CEILING_S)
            i_a = k * s_mm2 / math.sqrt(t_hi)
            i_b = k * s_mm2 / math.sqrt(TIME_FLOOR_S)
            ax.plot([i_a, i_b], [t_hi, TIME_FLOOR_S], zorder=4, gid=f"withstand:{key}",
                    label=f"{what} {s_mm2:g} mm\u00b2 withstand, k={k:g}: k\u00b2S\u00b2/I\u00b2",
                    **WITHSTAND_STYLE[key])

    # -- axes, ticks, legend
    # major ticks and grid at every decade; the minor grid (2 to 9 in each decade) is one line
    # collection rather than minor ticks, which keeps drawing fast
    ax.xaxis.set_major_locator(LogLocator(base=10.0, numticks=20))
    ax.yaxis.set_major_locator(LogLocator(base=10.0, numticks=20))
    ax.xaxis.set_minor_locator(NullLocator())
    ax.yaxis.set_minor_locator(NullLocator())
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: _decade_label(v, "A")))
    ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: _decade_label(v, "s")))
    ax.grid(True, which="major", color="#b5b5b5", linewidth=0.6)
    ax.add_collection(_minor_grid(i_min, i_max, TIME_FLOOR_S, TIME_CEILING_S))
    ax.tick_params(labelsize=8)
    ax.set_xlabel("prospective current [A]", fontsize=9)
    ax.set_ylabel("time [s]", fontsize=9)
    ax.set_title(title or f"{study.title}\n{circuit_id} and the devices above it", fontsize=10,
                 y=1.01)  # a fixed position: no layout pass over the tick labels
    ax.legend(loc="upper left", bbox_to_anchor=(0.0, -0.09), ncol=2, fontsize=6.5,
              frameon=False, title="key", title_fontsize=7.5, alignment="left")
    if standalone:
        from coordination import CAUTION

        fig.text(0.1, 0.015, CAUTION, fontsize=6.5, color="#444444")
    return fig


def save_figure(fig: Figure, path: str | os.PathLike) -> None:
    """Save a figure atomically; PNG, SVG or PDF by the file's suffix.

    On any error the target is left as it was (absent, or the previous file).

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> save_figure(Figure(), "/tmp/empty.png")  # doctest: +SKIP
    """
    import matplotlib

    suffix = os.fspath(path).rsplit(".", 1)[-1].lower() if "." in os.fspath(path) else ""
    if suffix not in ("png", "svg", "pdf"):
        raise InputError(f"unknown plot format {suffix!r}; allowed: png, svg, pdf", key="-o")
    with matplotlib.rc_context({"pdf.fonttype": 42, "svg.fonttype": "none"}), \
            atomic_path(path) as tmp:
        fig.savefig(tmp, format=suffix, dpi=150)
