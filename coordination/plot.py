"""Time-current plots: a circuit's device and every device above it, on log-log axes.

Each device is a translucent band between its edges (``t_min`` below, ``t_max`` above), labelled
on the plot with its circuit id (device and settings are in the key below the axes); the
crossover zones the engine found between a pair are hatched and marked with their selectivity
limit Is, and a zone too small to see is also boxed and tied to the current axis by a hatched
strip; vertical markers show the maximum fault at the circuit's board, the minimum earth fault at
its far end and its design current Ib; two falling lines show the adiabatic withstand
``t = k^2 S^2 / I^2`` of the circuit's line conductor and protective conductor (one of several
in parallel, which alone carries a fault just past the board, each with the k of its own
material and size, as the protection checks take them there).

Greyscale print: the band colours differ in lightness as well as hue, each band's edges have
their own dash pattern, and the key shows each band as its fill with its edge pattern.

Labels are placed where they cover nothing that matters: each candidate place is scored against
the axes' frame, the labels already placed, the crossover zones, the other bands and the lines,
and the best one is taken (Is marks first, then the bands' labels).

matplotlib is imported only here (and in the report), never by the command-line entry point.
Figures are built with :class:`matplotlib.figure.Figure` directly, on the non-interactive Agg
canvas: no window, no pyplot state, safe in a server and in a notebook.

Every artist that stands for something carries a ``gid`` so that tests and callers can find it:
``band:<id>``, ``edge:<id>``, ``tag:<id>`` (the band's label), ``zone:<upstream>><downstream>``,
``zone-mark:<upstream>><downstream>`` (a small zone's box and strip),
``limit:<upstream>><downstream>`` (Is, the upstream named), ``marker:max-fault``,
``marker:min-earth-fault``, ``marker:load``, ``withstand:line``, ``withstand:cpc``, and those of
:mod:`coordination.plot_marks` (the 10 ms line, tested limits, the disconnection check's point,
a standby source's decaying faults).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, NamedTuple

import numpy as np

from coordination import checks, engine
from coordination.checks import CheckResult
from coordination.devices import band_for
from coordination.engine import Analysis, PairResult
from coordination.faults import FaultLevels, NodeFaults
from coordination.model import Cable, Study
from coordination.motors import StartProfile
from coordination.plot_marks import TIME_LABEL, current_text, draw_decrements
from coordination.text import format_current, format_seconds, positive_or_none
from curves.band import TIME_CEILING_S, TIME_FLOOR_S, Band, merged_grid
from curves.errors import InputError

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

#: Band colours, downstream device first: our own, chosen so that their CIE lightness L* differs
#: by about 8 between any two (18 to 66, none near white) and neighbours in the list differ most,
#: so a greyscale print still tells them apart; each is paired with its own edge dash pattern.
PALETTE = ("#1a3d71", "#d0731e", "#2a6f46", "#421d4b", "#9262b9", "#155862", "#afa333")
DASHES: tuple[Any, ...] = ("-", "--", "-.", ":", (0, (6, 2, 1, 2)), (0, (1, 1)), (0, (8, 3)))
BAND_ALPHA = 0.24
ZONE_FACE = "#f2c14e"
ZONE_EDGE = "#7a0f12"
#: One hatch per crossover zone on a plot, so the legend tells them apart in greyscale.
ZONE_HATCHES = ("xxxx", "////", "\\\\\\\\", "++++", "....")
MARKER_STYLE = {
    "max-fault": {"color": "#111111", "linestyle": "-", "linewidth": 1.6},
    "min-earth-fault": {"color": "#444444", "linestyle": (0, (4, 2)), "linewidth": 1.3},
    "load": {"color": "#777777", "linestyle": (0, (1, 2)), "linewidth": 1.4},
}
#: Where an Is mark may go, in points from its limit, in order of preference.
LIMIT_OFFSETS = ((-12, -24), (14, 22), (-12, 24), (14, -24), (-16, -44), (18, 42), (-16, 44),
                 (18, -44), (-30, 0), (30, 0), (-22, -66), (24, 64))
#: Times where a band's label may go [s], in order of preference: long times, near the pickup.
TAG_TIMES_S = (1000.0, 3000.0, 300.0, 100.0, 30.0, 10.0, 3.0)
TAG_FONT_PT = 7.5
LIMIT_FONT_PT = 7.0
#: A crossover zone narrower or lower than this [pt] (about 8 pixels at 150 dpi) is also boxed
#: and tied to the current axis by a hatched strip, so that it can be seen.
MIN_ZONE_PT = 4.0
#: The box around such a zone is at least this wide and high [pt].
ZONE_MARK_PT = 7.0
WITHSTAND_STYLE = {
    "line": {"color": "#5c3d2e", "linestyle": (0, (10, 3)), "linewidth": 1.2},
    "cpc": {"color": "#a0785a", "linestyle": (0, (3, 2, 3, 6)), "linewidth": 1.2},
}

#: The start of a motor or an inrush load: the r.m.s. profile and the first peak.
START_STYLE = {"color": "#0b6e4f", "linestyle": "-", "linewidth": 1.6}
PEAK_STYLE = {"color": "#0b6e4f", "marker": "^", "markersize": 6, "linestyle": "none"}
#: Time at which the first peak is drawn [s] (the first half-cycle at 50 Hz; common practice).
PEAK_TIME_S = 0.01

#: The adiabatic equation holds for faults up to 5 s (IEC 60364-4-43, 434.5.2).
ADIABATIC_LIMIT_S = 5.0


# -- helpers -----------------------------------------------------------------------------------
def _chain(study: Study, circuit_id: str) -> tuple[str, ...]:
    """The circuit and every circuit above it, nearest first."""
    if circuit_id not in study.by_id:
        raise InputError(f"no circuit {circuit_id!r} in the study; give one of its circuit ids",
                         key="--circuit")
    if study.by_id[circuit_id].device is None:
        raise InputError(f"circuit {circuit_id!r} is a residual-current switch (rcd without "
                         "device) with no overcurrent band to draw; draw its residual-current "
                         "plot instead (plot --residual)", key="--circuit")
    # a residual-current switch above has no overcurrent band: the engine pairs none
    return (circuit_id, *(a for a in study.ancestors(circuit_id)
                          if study.by_id[a].device is not None))


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
    return merged_grid(grid, extra)


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


def _edge_crossing(currents: np.ndarray, times: np.ndarray, target_s: float) -> float | None:
    """The current where a falling edge first comes down to a given time [A] (None: never)."""
    below = np.nonzero(times <= target_s)[0]
    if below.size == 0:
        return None
    j = int(below[0])
    if j == 0 or not times[j - 1] > times[j]:
        return float(currents[j])
    # log-log interpolation between the two grid points around the crossing
    x0, x1 = np.log10(currents[j - 1 : j + 1])
    y0, y1 = np.log10(times[j - 1 : j + 1])
    y = math.log10(target_s)
    return float(10.0 ** (x0 + (x1 - x0) * (y - y0) / (y1 - y0)))


# -- placing labels ----------------------------------------------------------------------------
@functools.cache
def _text_size_pt(text: str, size_pt: float) -> tuple[float, float]:
    """Width and height of a one- or several-line text in the default face [pt]."""
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import TextToPath

    measure = TextToPath()
    prop = FontProperties(size=size_pt)
    lines = text.split("\n")
    width = max(measure.get_text_width_height_descent(line, prop, ismath=False)[0]
                for line in lines)
    return float(width), 1.2 * size_pt * len(lines)


@dataclass
class _Layout:
    """What a label must keep clear of, in points on the figure (shapely geometries).

    ``texts`` are placed labels (never overlapped); ``zones`` the crossover zones and their
    marks; ``bands`` each band's area by circuit; ``lines`` the markers and withstand lines;
    ``edges`` the bands' edges.
    """

    frame: Any
    texts: list[Any]
    zones: list[Any]
    bands: dict[str, Any]
    lines: list[Any]
    edges: list[Any]

    @classmethod
    def empty(cls, ax: Axes) -> _Layout:
        """Nothing placed yet; the frame is the axes' area, 1 pt inside."""
        from shapely.geometry import box

        frame = ax.get_position().bounds  # figure fraction: x, y, width, height
        fig_w_pt, fig_h_pt = (float(v) * 72.0 for v in ax.figure.get_size_inches())
        return cls(frame=box(frame[0] * fig_w_pt + 1, frame[1] * fig_h_pt + 1,
                             (frame[0] + frame[2]) * fig_w_pt - 1,
                             (frame[1] + frame[3]) * fig_h_pt - 1),
                   texts=[], zones=[], bands={}, lines=[], edges=[])

    def score(self, box: Any, own: str | None, weights: dict[str, float]) -> float:
        if not self.frame.contains(box):
            return 1e6
        total = 1e4 * sum(box.intersects(t) for t in self.texts)
        total += weights["zones"] * sum(box.intersects(z) for z in self.zones)
        total += weights["bands"] * sum(box.intersects(b) for cid, b in self.bands.items()
                                        if cid != own)
        total += weights["lines"] * sum(box.intersects(ln) for ln in self.lines)
        total += weights["edges"] * sum(box.intersects(e) for e in self.edges)
        return float(total)


#: What covering each kind of thing costs a candidate place (a placed label: always worst).
#: Is marks must stay off zones and withstand lines; band labels off zones and other bands.
LIMIT_WEIGHTS = {"zones": 300.0, "bands": 0.0, "lines": 80.0, "edges": 4.0}
TAG_WEIGHTS = {"zones": 300.0, "bands": 120.0, "lines": 15.0, "edges": 0.0}


def _points(ax: Axes, x: Any, y: Any) -> np.ndarray:
    """Data coordinates to points on the figure (rows of x, y)."""
    xy = np.column_stack([np.ravel(np.asarray(x, dtype=np.float64)),
                          np.ravel(np.asarray(y, dtype=np.float64))])
    return ax.transData.transform(xy) * (72.0 / ax.figure.dpi)


def _data(ax: Axes, x_pt: Any, y_pt: Any) -> np.ndarray:
    """Points on the figure to data coordinates (rows of x, y)."""
    xy = np.column_stack([np.ravel(np.asarray(x_pt, dtype=np.float64)),
                          np.ravel(np.asarray(y_pt, dtype=np.float64))])
    return ax.transData.inverted().transform(xy * (ax.figure.dpi / 72.0))


def _text_box(anchor: np.ndarray, offset: tuple[float, float], ha: str, text: str,
              size_pt: float, pad_pt: float = 1.5) -> Any:
    """The box [pt] of a text placed at ``anchor + offset`` with the given alignment, centred
    vertically."""
    from shapely.geometry import box

    width, height = _text_size_pt(text, size_pt)
    x = float(anchor[0]) + offset[0]
    y = float(anchor[1]) + offset[1]
    x0 = x if ha == "left" else x - width
    return box(x0 - pad_pt, y - height / 2 - pad_pt, x0 + width + pad_pt, y + height / 2 + pad_pt)


def _band_area(ax: Axes, grid: np.ndarray, t_lo: np.ndarray, t_hi: np.ndarray) -> Any:
    """A band's area in points (shapely), for keeping labels off it."""
    from shapely.geometry import Polygon

    ring = np.concatenate([_points(ax, grid, t_hi), _points(ax, grid[::-1], t_lo[::-1])])
    area = Polygon(ring)
    return area if area.is_valid else area.buffer(0)


def _best(candidates: Sequence[tuple[Any, Any]], layout: _Layout, own: str | None,
          weights: dict[str, float]) -> tuple[Any, Any] | None:
    """The candidate (box, placement) with the lowest score; earlier ones win ties."""
    best = None
    for rank, (box, placement) in enumerate(candidates):
        score = layout.score(box, own, weights) + 0.5 * rank
        if best is None or score < best[0]:
            best = (score, box, placement)
    return None if best is None else (best[1], best[2])


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


def pairs_in_chain(analysis: Analysis, chain: Sequence[str]) -> list[PairResult]:
    """The engine's pairs whose upstream and downstream are both in a chain of circuits."""
    members = set(chain)
    return [p for cid in reversed(chain) for p in analysis.for_circuit(cid)
            if p.upstream in members]


# -- the plot ----------------------------------------------------------------------------------
#: matplotlib settings under which every text is drawn as written: a ``$`` in a title, a circuit
#: id or a device name is a dollar sign, never the start of a formula (text.parse_math).
LITERAL_TEXT = {"text.parse_math": False}


def _literal_text(draw: Any) -> Any:
    """Run a drawing function with :data:`LITERAL_TEXT`: matplotlib reads the setting when a
    text is made, so every text of the figure keeps it, whenever the figure is saved."""

    @functools.wraps(draw)
    def run(*args: Any, **kwargs: Any) -> Any:
        import matplotlib

        with matplotlib.rc_context(LITERAL_TEXT):
            return draw(*args, **kwargs)

    return run


@_literal_text
def plot_circuit(study: Study, levels: FaultLevels, analysis: Analysis, circuit_id: str, *,
                 basis: str | None = None, ax: Axes | None = None,
                 title: str | None = None,
                 results: Sequence[CheckResult] | None = None, cases: Sequence[Any] = ()) -> Figure:
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
        Draw into these axes (the report does); by default a new figure is made. Place the axes
        on their figure before calling: labels are laid out for their size.
    title : str, optional
        Axes title; by default the study title and the circuit.
    results : sequence of CheckResult, optional
        The study's protection checks (:func:`coordination.checks.run`): the disconnection
        check's operating point is marked on the minimum earth-fault line. By default the
        circuit's checks are run here.
    cases : sequence of SupplyCase, optional
        Standby sources: their decaying faults on the circuit (:func:`plot_marks.draw_decrements`).

    Returns
    -------
    matplotlib.figure.Figure
        The figure (current [A] on a log x axis, time [s] on a log y axis).

    References
    ----------
    IEC 60898-1, IEC 60269-2 and IEC 60947-2 (the bands); IEC 60364-4-43, 434.5.2 (adiabatic
    withstand ``k^2 S^2 / I^2``, k from Table 43A and IEC 60364-5-54 Table A.54.3); IEC 60909-0
    (the fault levels marked).

    Examples
    --------
    >>> from coordination import engine, faults, study
    >>> from coordination.report import bundled_example
    >>> text, where = bundled_example("small-shop.toml")
    >>> s = study.loads(text, source=where)
    >>> lv = faults.compute(s)
    >>> fig = plot_circuit(s, lv, engine.analyse(s, lv), "bakery-oven")
    >>> ax = fig.axes[0]
    >>> print(ax.get_xscale(), len([c for c in ax.collections
    ...                             if (c.get_gid() or "").startswith("band:")]))
    log 2
    """
    from matplotlib.figure import Figure

    if basis is None:
        basis = analysis.basis
    chain = _chain(study, circuit_id)
    bands = {cid: band_for(study, cid, basis) for cid in chain}
    # the circuit, then the engine's rows above it: ancestors in a row with one device are one
    # row there, and one band here (first, last, count)
    drawn = [(circuit_id, circuit_id, 1)] + [
        (p.upstream, p.upstream_last or p.upstream, p.upstream_count)
        for p in analysis.for_circuit(circuit_id)]
    circuit = study.by_id[circuit_id]
    i_min, i_max = _current_span(levels, chain, bands, circuit.load_a)

    standalone = ax is None
    if ax is None:
        fig = Figure(figsize=(9.0, 7.6))
        ax = fig.add_axes((0.1, 0.27, 0.86, 0.65))
    else:
        fig = ax.figure
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_xlim(i_min, i_max)
    ax.set_ylim(TIME_FLOOR_S, TIME_CEILING_S)
    layout = _Layout.empty(ax)
    key: list[tuple[Any, str]] = []  # the legend: (handle, label)

    tags = _draw_bands(ax, layout, key, bands, drawn, i_min, i_max)
    limits = _draw_zones(ax, layout, key, study, levels, analysis, chain, drawn, bands, basis)
    _draw_markers(ax, layout, key, study.board_name(circuit_id),
                  levels.by_circuit.get(circuit_id), circuit.load_a)
    _draw_reading_marks(ax, layout, key, study, levels, analysis, circuit_id, drawn, i_min,
                        results)
    if circuit.cable is not None:
        _draw_withstand(ax, layout, key, circuit.cable)
    start = checks.start_profile(study, circuit_id)
    if start is not None:
        _draw_start(ax, layout, key, start)
    for case in cases:
        draw_decrements(ax, key, case, circuit_id, i_min)
    # labels: the Is marks first, then each band's circuit id, clear of each other
    _place_limits(ax, layout, limits)
    _place_tags(ax, layout, tags)
    _dress_axes(ax, i_min, i_max,
                title or f"{study.title}\n{circuit_id} and the devices above it")
    _draw_key(ax, key)
    if standalone:
        from coordination import CAUTION

        fig.text(0.1, 0.015, CAUTION, fontsize=6.5, color="#444444")
    return fig


# -- the drawing steps of plot_circuit, each on the Axes it is given ---------------------------
class _Tag(NamedTuple):
    """A band's label to place: its circuit id (or run of ids), colour and edges."""

    cid: str
    text: str
    colour: str
    grid: np.ndarray
    t_lo: np.ndarray
    t_hi: np.ndarray


class _Limit(NamedTuple):
    """An Is mark to place: the pair's name, Is [A] and the time at its mark [s]."""

    name: str
    current_a: float
    t_s: float


def _current_span(levels: FaultLevels, chain: Sequence[str], bands: dict[str, Band],
                  load_a: float | None) -> tuple[float, float]:
    """The current axis [A]: below the smallest pickup to a bit past the largest fault in the
    chain, whole decades, at least one."""
    faults_a = [positive_or_none(getattr(levels.by_circuit.get(cid), key, None))
                for key in ("ik_max_a", "ik3_max_a") for cid in chain]
    faults_a = [f for f in faults_a if f]
    lows = [v for v in (*(positive_or_none(b.pickup_min_a) for b in bands.values()),
                        positive_or_none(load_a)) if v]
    i_min = 10.0 ** math.floor(math.log10(0.7 * min(lows))) if lows else 1.0
    top = max(faults_a) if faults_a else 100.0 * max(b.rating_a for b in bands.values())
    i_max = 10.0 ** math.ceil(math.log10(1.3 * top))
    if i_max <= i_min:  # a fault level below every pickup: still a decade to draw in
        i_max = 10.0 * i_min
    return i_min, i_max


def _draw_bands(ax: Axes, layout: _Layout, key: list[tuple[Any, str]], bands: dict[str, Band],
                drawn: Sequence[tuple[str, str, int]], i_min: float,
                i_max: float) -> list[_Tag]:
    """Each band between its edges, downstream drawn last so that it sits on top; alike devices
    in a row once. Adds them to the key, downstream first; returns their labels to place."""
    from matplotlib.colors import to_rgba
    from matplotlib.patches import Patch
    from shapely.geometry import LineString

    tags: list[_Tag] = []
    band_keys: list[tuple[Any, str]] = []
    for k, (cid, last, count) in reversed(list(enumerate(drawn))):
        band = bands[cid]
        who = cid if count == 1 else f"{cid} to {last} ({count} alike)"
        colour = PALETTE[k % len(PALETTE)]
        dash = DASHES[k % len(DASHES)]
        grid = _current_grid(band, i_min, i_max)
        if grid.size == 0:
            continue
        t_lo, t_hi = band.edges(grid)
        label = f"{who}: {band.name} ({band.basis})"
        ax.fill_between(grid, t_lo, t_hi, facecolor=colour, alpha=BAND_ALPHA, linewidth=0,
                        zorder=2, gid=f"band:{cid}", label=label)
        for edge in (t_lo, t_hi):
            ax.plot(grid, edge, color=colour, linestyle=dash, linewidth=1.3, zorder=3,
                    gid=f"edge:{cid}")
            layout.edges.append(LineString(_points(ax, grid, edge)))
        layout.bands[cid] = _band_area(ax, grid, t_lo, t_hi)
        # the key shows the band as it is drawn: its fill with its edges' colour and dashes
        band_keys.append((Patch(facecolor=to_rgba(colour, BAND_ALPHA), edgecolor=colour,
                                linestyle=dash, linewidth=1.3, gid=f"key:{cid}"), label))
        tags.append(_Tag(cid, cid if count == 1 else f"{cid} to {last}", colour, grid, t_lo,
                         t_hi))
    key.extend(reversed(band_keys))  # downstream first, as the bands are numbered
    tags.reverse()
    return tags


def _draw_zones(ax: Axes, layout: _Layout, key: list[tuple[Any, str]], study: Study,
                levels: FaultLevels, analysis: Analysis, chain: Sequence[str],
                drawn: Sequence[tuple[str, str, int]], bands: dict[str, Band],
                basis: str | None) -> list[_Limit]:
    """The crossover zone of each pair drawn that is not selective throughout, hatched (boxed
    too when small); adds them to the key and returns their Is marks to place."""
    from shapely.geometry import Polygon

    limits: list[_Limit] = []
    zones = 0
    shown = {cid for cid, _, _ in drawn}
    for pair in pairs_in_chain(analysis, chain):
        if pair.verdict == "total" or pair.upstream not in shown or pair.downstream not in shown:
            continue
        name = f"{pair.upstream}>{pair.downstream}"
        polys = _geometry_polygons(engine.overlap(study, levels, pair, basis))
        limit = positive_or_none(pair.limit_a)
        if polys:
            where = f", Is {current_text(limit)}" if limit is not None else ""
            hatch = ZONE_HATCHES[zones % len(ZONE_HATCHES)]
            label = (f"crossover, both may operate: {pair.upstream} over {pair.downstream}"
                     f"{where}")
            patch = _zone_patch(polys, f"zone:{name}", label, hatch)
            ax.add_patch(patch)
            key.append((patch, label))
            zones += 1
            for poly in polys:
                ring = 10.0 ** np.asarray(poly.exterior.coords, dtype=np.float64)
                area = Polygon(_points(ax, ring[:, 0], ring[:, 1]))
                layout.zones.append(area if area.is_valid else area.buffer(0))
            mark = _small_zone_mark(ax, polys, f"zone-mark:{name}", hatch)
            if mark is not None:
                layout.zones.append(mark)
        if limit is not None:
            t_at = float(np.clip(bands[pair.downstream].t_max(limit), TIME_FLOOR_S,
                                 TIME_CEILING_S))
            if polys:  # put the mark on the zone's left end when there is one
                xs = np.concatenate([np.asarray(p.exterior.coords)[:, 0] for p in polys])
                ys = np.concatenate([np.asarray(p.exterior.coords)[:, 1] for p in polys])
                t_at = float(10.0 ** ys[int(np.argmin(xs))])
            limits.append(_Limit(name, limit, t_at))
    return limits


def _draw_markers(ax: Axes, layout: _Layout, key: list[tuple[Any, str]], board: str,
                  node: NodeFaults | None, load_a: float | None) -> None:
    """Vertical lines at the maximum fault at the board, the minimum earth fault at the far end
    and the design current Ib (each where known)."""
    from shapely.geometry import LineString

    markers = [
        ("max-fault", positive_or_none(getattr(node, "ik_max_a", None)),
         "maximum fault at {board}: {i}"),
        ("min-earth-fault", positive_or_none(getattr(node, "ief_min_a", None)),
         "minimum earth fault at the far end: {i}"),
        ("load", positive_or_none(load_a), "design current Ib: {i}"),
    ]
    for name, current, text in markers:
        if current is None:
            continue
        label = text.format(board=board, i=current_text(current))
        line = ax.axvline(current, zorder=5, gid=f"marker:{name}", label=label,
                          **MARKER_STYLE[name])
        key.append((line, label))
        layout.lines.append(LineString(_points(ax, [current, current],
                                               [TIME_FLOOR_S, TIME_CEILING_S])))


def _draw_withstand(ax: Axes, layout: _Layout, key: list[tuple[Any, str]],
                    cable: Cable) -> None:
    """The adiabatic withstand of the circuit's line and protective conductors, as the
    protection checks take them at the board, where the faults are largest: one conductor of
    several in parallel carries a fault just past the board (the checks take all of them only
    for far-end faults)."""
    from shapely.geometry import LineString

    sizes = checks.conductor_sizes(cable)
    line_count = max(int(cable.parallel or 1), 1)
    cpc_count = max(round(sizes.cpc_mm2 / sizes.cpc_each_mm2), 1) if sizes.cpc_each_mm2 else 1
    for name, s_mm2, k, count, what in (
        ("line", float(cable.csa_mm2), sizes.k_line, line_count, "line conductor"),
        ("cpc", sizes.cpc_each_mm2, sizes.k_cpc, cpc_count, "protective conductor"),
    ):
        t_hi = min(ADIABATIC_LIMIT_S, TIME_CEILING_S)
        i_a = k * s_mm2 / math.sqrt(t_hi)
        i_b = k * s_mm2 / math.sqrt(TIME_FLOOR_S)
        size = (f"{s_mm2:g} mm\u00b2 (one of {count} in parallel)" if count > 1
                else f"{s_mm2:g} mm\u00b2")
        label = f"{what} {size} withstand, k={k:g}: k\u00b2S\u00b2/I\u00b2"
        (line,) = ax.plot([i_a, i_b], [t_hi, TIME_FLOOR_S], zorder=4, gid=f"withstand:{name}",
                          label=label, **WITHSTAND_STYLE[name])
        key.append((line, label))
        layout.lines.append(LineString(_points(ax, [i_a, i_b], [t_hi, TIME_FLOOR_S])))


def _draw_start(ax: Axes, layout: _Layout, key: list[tuple[Any, str]],
                start: StartProfile) -> None:
    """The start as the starting check takes it: the running current from the top of the axis
    down to the start's end, the start current across and down to the first half-cycle, and the
    first peak there (:mod:`coordination.motors`)."""
    from shapely.geometry import LineString

    i = [start.running_a, start.running_a, start.current_a, start.current_a]
    t = [TIME_CEILING_S, start.duration_s, start.duration_s, PEAK_TIME_S]
    label = (f"start ({start.kind}): {format_current(start.current_a)} for "
             f"{format_seconds(start.duration_s)}")
    (line,) = ax.plot(i, t, zorder=6, gid="starting:line", label=label, **START_STYLE)
    key.append((line, label))
    peak_label = (f"first peak {format_current(start.peak_a)} ({start.peak_factor:g} x r.m.s.; "
                  "common practice)")
    (peak,) = ax.plot([start.peak_a], [PEAK_TIME_S], zorder=6, gid="starting:peak",
                      label=peak_label, **PEAK_STYLE)
    key.append((peak, peak_label))
    layout.lines.append(LineString(_points(ax, i, t)))


def _draw_reading_marks(ax: Axes, layout: _Layout, key: list[tuple[Any, str]], study: Study,
                        levels: FaultLevels, analysis: Analysis, circuit_id: str,
                        drawn: Sequence[tuple[str, str, int]], i_min: float,
                        results: Sequence[CheckResult] | None) -> None:
    """The 10 ms line of the energy region, the tested limits of the pairs drawn and the
    disconnection check's operating point (:mod:`coordination.plot_marks`)."""
    from shapely.geometry import LineString

    from coordination import plot_marks

    plot_marks.draw_energy_region(ax, i_min)
    shown = {cid for cid, _, _ in drawn}
    pairs = [p for p in pairs_in_chain(analysis, _chain(study, circuit_id))
             if p.upstream in shown and p.downstream in shown]
    for current in plot_marks.draw_tested_limits(ax, key, pairs):
        layout.lines.append(LineString(_points(ax, [current, current],
                                               [TIME_FLOOR_S, TIME_CEILING_S])))
    if results is None and circuit_id in levels.by_circuit:
        results = checks.check_device(study, levels, circuit_id,
                                      band_for(study, circuit_id, "envelope"))
    own = next((r for r in results or () if r.circuit == circuit_id
                and r.check == "disconnection"), None)
    point = plot_marks.draw_disconnection_point(ax, key, own)
    if point is not None:
        layout.lines.append(LineString(_points(ax, [point[0] * 0.97, point[0] * 1.03],
                                               [point[1], point[1]])))


def _dress_axes(ax: Axes, i_min: float, i_max: float, title: str) -> None:
    """Ticks and grid at every decade, the minor grid, the axis labels and the title."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullLocator

    # the minor grid (2 to 9 in each decade) is one line collection rather than minor ticks,
    # which keeps drawing fast
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
    ax.set_ylabel(TIME_LABEL, fontsize=9)
    ax.set_title(title, fontsize=10, y=1.01)  # a fixed position: no layout pass over the ticks


def _draw_key(ax: Axes, key: Sequence[tuple[Any, str]]) -> None:
    """The legend below the axes, in two columns."""
    handles, labels = zip(*key, strict=True) if key else ((), ())
    legend = ax.legend(list(handles), list(labels), loc="upper left",
                       bbox_to_anchor=(0.0, -0.09), ncol=2, fontsize=6.5, frameon=False,
                       title="key", title_fontsize=7.5, alignment="left", handlelength=3.2,
                       handleheight=1.1)
    # the legend draws copies of the handles, and a patch's copy keeps its dashes but not the
    # name of its line style: set it again so that the key reports what it shows
    for original, shown in zip(handles, legend.legend_handles, strict=True):
        if (original.get_gid() or "").startswith("key:"):
            shown.set_linestyle(original.get_linestyle())
            shown.set_gid(original.get_gid())


def _small_zone_mark(ax: Axes, polygons: Sequence[Any], gid: str, hatch: str) -> Any | None:
    """Box a crossover zone too small to see, and tie it to the current axis.

    Returns the marked area in points (for the label layout), or None when the zone is large
    enough to be seen as it is.
    """
    from matplotlib.patches import Rectangle
    from shapely.geometry import box

    x0, y0 = np.inf, np.inf
    x1, y1 = -np.inf, -np.inf
    for poly in polygons:
        bx0, by0, bx1, by1 = poly.bounds
        x0, y0, x1, y1 = min(x0, bx0), min(y0, by0), max(x1, bx1), max(y1, by1)
    (px0, py0), (px1, py1) = _points(ax, 10.0 ** np.array([x0, x1]), 10.0 ** np.array([y0, y1]))
    if px1 - px0 >= MIN_ZONE_PT and py1 - py0 >= MIN_ZONE_PT:
        return None
    cx, cy = (px0 + px1) / 2, (py0 + py1) / 2
    half_w = max(px1 - px0, ZONE_MARK_PT) / 2 + 1.5
    half_h = max(py1 - py0, ZONE_MARK_PT) / 2 + 1.5
    (dx0, dy0), (dx1, dy1) = _data(ax, [cx - half_w, cx + half_w], [cy - half_h, cy + half_h])
    floor = max(TIME_FLOOR_S, ax.get_ylim()[0])
    # the strip: from the current axis up to the zone, across the zone's currents
    ax.add_patch(Rectangle((dx0, floor), dx1 - dx0, max(dy0 - floor, 0.0), facecolor=ZONE_FACE,
                           edgecolor=ZONE_EDGE, hatch=hatch, linewidth=0.6, alpha=0.45, zorder=4,
                           gid=gid))
    # the box around the zone itself
    ax.add_patch(Rectangle((dx0, dy0), dx1 - dx0, dy1 - dy0, facecolor="none",
                           edgecolor=ZONE_EDGE, linewidth=1.1, zorder=6, gid=gid))
    bottom = _points(ax, [dx0], [floor])[0][1]
    return box(cx - half_w, bottom, cx + half_w, cy + half_h)


def _place_limits(ax: Axes, layout: _Layout, limits: Sequence[_Limit]) -> None:
    """The Is marks, each where it covers no other label, zone or withstand line."""
    from shapely.geometry import LineString

    for name, limit, t_at in limits:
        text = f"{name.split('>', 1)[0]}: Is {current_text(limit)}"  # the upstream named
        anchor = _points(ax, [limit], [t_at])[0]
        candidates = []
        for dx, dy in LIMIT_OFFSETS:
            ha = "right" if dx < 0 else "left"
            candidates.append((_text_box(anchor, (dx, dy), ha, text, LIMIT_FONT_PT),
                               (dx, dy, ha)))
        box_pt, (dx, dy, ha) = _best(candidates, layout, None, LIMIT_WEIGHTS)
        ax.annotate(text, xy=(limit, t_at), xytext=(dx, dy), textcoords="offset points",
                    ha=ha, va="center", fontsize=LIMIT_FONT_PT, color=ZONE_EDGE, zorder=7,
                    gid=f"limit:{name}",
                    bbox={"boxstyle": "round,pad=0.2", "facecolor": "white",
                          "edgecolor": "none", "alpha": 0.85},
                    arrowprops={"arrowstyle": "->", "color": ZONE_EDGE, "linewidth": 0.8})
        layout.texts.append(box_pt)
        layout.lines.append(LineString([anchor, box_pt.centroid.coords[0]]))


def _place_tags(ax: Axes, layout: _Layout,
                tags: Sequence[_Tag]) -> None:
    """Each band's circuit id beside the band at a long time, near its pickup, where it covers
    no Is mark, zone, other label or other band (the best place found)."""
    for cid, text, colour, grid, t_lo, t_hi in tags:
        candidates = []
        for target in TAG_TIMES_S:
            right = _edge_crossing(grid, t_hi, target)  # the band's right side at that time
            left = _edge_crossing(grid, t_lo, target)  # and its left side
            for current, dx, ha in ((right, 3.0, "left"), (left, -3.0, "right")):
                if current is None:
                    continue
                anchor = _points(ax, [current], [target])[0]
                candidates.append((_text_box(anchor, (dx, 0.0), ha, text, TAG_FONT_PT),
                                   (current, target, dx, ha)))
        found = _best(candidates, layout, cid, TAG_WEIGHTS)
        if found is None:
            continue
        box_pt, (current, target, dx, ha) = found
        ax.annotate(text, xy=(current, target), xytext=(dx, 0.0), textcoords="offset points",
                    ha=ha, va="center", fontsize=TAG_FONT_PT, color=colour, zorder=6,
                    gid=f"tag:{cid}",
                    bbox={"boxstyle": "round,pad=0.15", "facecolor": "white",
                          "edgecolor": "none", "alpha": 0.8})
        layout.texts.append(box_pt)
