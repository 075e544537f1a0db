"""The overlap engine: selectivity of every upstream/downstream pair of a study.

For a downstream band D under an upstream band U, over the window from D's overload region
(``D.pickup_min_a``) to the maximum prospective fault current at D's board, the pair is selective
at a current I when

    t_max_D(I) * margin (+ interval_s)  <=  t_min_U(I)

(at equal values the pair is selective, as the I2t criterion of IEC 60269-1 reads). The interval
is added only where U is an adjustable breaker and D's time is at or above
``ENERGY_REGION_S``. Below ``ENERGY_REGION_S`` the families give their edges as equivalent times
``t = I2t / I^2`` (an MCB's upper edge from its energy-limiting class, a fuse's lower edge from its
minimum pre-arcing I2t), so the same comparison is the energy test there; a decision made where
the edges meet below ``ENERGY_REGION_S`` is reported as decided by ``"energy"``.

One pair is decided by :func:`coordination.pair.compare` (sampled edges, the limit found
exactly by root-finding, the upstream's instantaneous release, a tested limit; cached per pair of
bands): this module pairs every circuit with every ancestor, groups alike ancestors in a row into
one decision, and adds the requirement of each pair (``selective_to_a``). Residual-current pairs
(two RCDs on one path) are decided by :mod:`coordination.residual`.

Geometry (shapely) is used only by :func:`overlap`, for plots and the report; its zone is built
from the same edges as :func:`compare` (margin, interval, instantaneous release), so it begins
at Is.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Literal

import numpy as np

from coordination import criterion
from coordination.devices import band_for
from coordination.faults import FaultLevels
from coordination.model import Study
from coordination.pair import (
    DecidedBy,
    Verdict,
    checked_positive,
    compare,
    decide,
    downstream_edge,
    pair_grid,
    upstream_edge,
)
from curves.band import TIME_CEILING_S, TIME_FLOOR_S, Band, merged_grid
from curves.errors import InputError

if TYPE_CHECKING:  # shapely is imported lazily, only by overlap()
    from shapely.geometry.base import BaseGeometry

#: What a pair protects against: overcurrent (the bands of this module) or residual current
#: (two RCDs in series, :mod:`coordination.residual`).
Protection = Literal["overcurrent", "residual"]



# ---------------------------------------------------------------------------------------------
# results
@dataclass(frozen=True)
class PairResult:
    """The selectivity of one circuit under one of its ancestors, with the requirement.

    ``ok`` is true when the verdict is total, or when ``limit_a`` reaches the required current
    (``required_a``, capped at the window's top; ``None`` requires total selectivity). ``case``
    is the supply it holds for: ``"normal"``, or a standby source's name (its window and limit
    are then the initial currents of decaying faults, :mod:`coordination.standby`).
    """

    upstream: str
    downstream: str
    verdict: Verdict
    limit_a: float | None
    window_a: tuple[float, float]
    decided_by: DecidedBy
    upstream_basis: str
    downstream_basis: str
    required_a: float | None
    ok: bool
    upstream_device: str = ""
    downstream_device: str = ""
    note: str = ""
    time_s: float | None = None
    margin: float = 1.0
    interval_s: float = 0.0
    tested_limit_a: float | None = None
    upstream_last: str = ""
    upstream_count: int = 1
    protection: Protection = "overcurrent"
    case: str = "normal"  # the supply case: "normal" or a standby source's name

    @property
    def basis(self) -> str:
        """The basis the pair's result rests on: ``"tested"`` when a tested limit decided it,
        else the bands' basis, the wider one when the two differ (``"envelope"`` over
        ``"typical"``), and ``"datasheet"`` only when both devices are given by points.

        Examples
        --------
        >>> p = PairResult("up", "down", "total", None, (10.0, 1e4), "energy", "datasheet",
        ...                "typical", None, True)
        >>> print(p.basis)
        typical
        """
        if self.decided_by == "tested":
            return "tested"
        bases = (self.upstream_basis, self.downstream_basis)
        if "envelope" in bases:
            return "envelope"
        if "typical" in bases:
            return "typical"
        return "datasheet"

    @property
    def upstream_span(self) -> str:
        """``upstream``, or for a run of alike devices ``"n7 to n1 (7 alike)"``."""
        if self.upstream_count == 1:
            return self.upstream
        return f"{self.upstream} to {self.upstream_last} ({self.upstream_count} alike)"

    def to_json(self) -> dict[str, Any]:
        """The contract's JSON for one pair (currents in A; ``limit_a`` null for total).

        ``upstream_count`` ancestors in a row, from ``upstream`` (the nearest) up to
        ``upstream_last``, have the same device: the row stands for each of those pairs.
        """
        return {
            "case": self.case,
            "upstream": self.upstream,
            "upstream_last": self.upstream_last or self.upstream,
            "upstream_count": self.upstream_count,
            "downstream": self.downstream,
            "verdict": self.verdict,
            "limit_a": None if self.verdict == "total" else self.limit_a,
            "window_a": [self.window_a[0], self.window_a[1]],
            "basis": self.basis,
            "decided_by": self.decided_by,
            "band_basis": {"upstream": self.upstream_basis, "downstream": self.downstream_basis},
            "required_a": self.required_a,
            "ok": self.ok,
            "upstream_device": self.upstream_device,
            "downstream_device": self.downstream_device,
            "time_s": self.time_s,
            "margin": self.margin,
            "interval_s": self.interval_s,
            "tested_limit_a": self.tested_limit_a,
            "note": self.note,
            "protection": self.protection,
        }


@dataclass(frozen=True)
class Analysis:
    """Every ancestor pair of a study, downstream circuits in study order, nearest ancestor first.

    Ancestors in a row with the same device give the same result, so one :class:`PairResult`
    stands for the run (``upstream_count`` pairs, ``upstream`` to ``upstream_last``).

    Attributes
    ----------
    pairs : tuple of PairResult
        The overcurrent pairs (the bands of the overcurrent devices).
    ok : bool
        Every pair (overcurrent and residual) meets its circuit's requirement.
    basis : str or None
        The basis asked for (``None``: each circuit's own, else the study's).
    residual : tuple of PairResult
        Every pair of RCDs on one path (``protection`` ``"residual"``, verdict total or none;
        :func:`residual_results`): listed after the overcurrent pairs in the JSON and the
        tables, never drawn on a time-current plot.
    """

    pairs: tuple[PairResult, ...]
    ok: bool
    basis: str | None = None
    _by_downstream: Mapping[str, tuple[PairResult, ...]] = field(
        default_factory=dict, repr=False, compare=False)
    residual: tuple[PairResult, ...] = ()

    @property
    def all_pairs(self) -> tuple[PairResult, ...]:
        """The overcurrent pairs, then the residual ones (what the JSON and tables list)."""
        return self.pairs + self.residual if self.residual else self.pairs

    def for_circuit(self, circuit_id: str) -> tuple[PairResult, ...]:
        """The pairs where ``circuit_id`` is downstream, nearest ancestor first."""
        if self._by_downstream:
            return self._by_downstream.get(circuit_id, ())
        return tuple(p for p in self.pairs if p.downstream == circuit_id)

    def summary(self) -> dict[str, Any]:
        """Counts of pairs (a run of alike ancestors counts each), verdicts and unmet ones."""
        counts = {"total": 0, "partial": 0, "none": 0}
        unmet = 0
        for p in self.all_pairs:
            counts[p.verdict] += p.upstream_count
            unmet += 0 if p.ok else p.upstream_count
        return {"pairs": sum(counts.values()), "rows": len(self.all_pairs), **counts,
                "unmet": unmet, "ok": self.ok}

    def to_json(self) -> dict[str, Any]:
        """``{"pairs": [...], "summary": {...}}`` (the contract's keys; currents in A)."""
        return {"pairs": [p.to_json() for p in self.all_pairs], "summary": self.summary()}


# ---------------------------------------------------------------------------------------------
# a whole study
#: At most this many result rows in one analysis (about 3 kB of memory and JSON each). Only a
#: tree hundreds of levels deep with differing devices comes near it: a 5,000-circuit building
#: four levels deep has about 15,000 rows, and a chain of alike devices one row per circuit.
MAX_ROWS = 500_000


@dataclass(frozen=True)
class _Run:
    """Ancestors in a row that share one band, nearest first; ``rest`` continues upwards.

    A circuit's list shares its tail with its parent's, so all the lists of a study take
    memory and time linear in the number of circuits, however deep the tree.
    """

    band: Band
    first: str
    last: str
    count: int
    rest: _Run | None
    rows: int  # runs in the list from this one up


def _ancestor_runs(study: Study, bands: Mapping[str, Band]) -> dict[str, _Run | None]:
    """The runs above every circuit (``None``: fed from the supply), in study order.

    They depend only on the circuit's parent, so the children of one circuit share one list,
    built for the first of them.
    """
    runs: dict[str, _Run | None] = {}
    below: dict[str, _Run | None] = {}  # the runs above the children of a circuit, by its id
    for c in study.circuits:  # parents first
        if c.parent not in below:
            below[c.parent] = _runs_below(study, bands, runs, c.parent)
        runs[c.id] = below[c.parent]
    return runs


def _runs_below(study: Study, bands: Mapping[str, Band], runs: Mapping[str, _Run | None],
                parent: str) -> _Run | None:
    """The runs above the children of ``parent``, from the runs above ``parent`` itself."""
    if parent not in bands:  # the supply
        return None
    if study.by_id[parent].device is None:  # an RCCB: no overcurrent device of its own
        return runs[parent]  # (the runs above it are the ones above its circuits)
    above, band = runs[parent], bands[parent]
    if above is not None and above.band is band:  # the parent extends the run above it
        return _Run(band, parent, above.last, above.count + 1, above.rest, above.rows)
    return _Run(band, parent, parent, 1, above, 1 + (above.rows if above is not None else 0))


def _segments(study: Study, head: _Run | None,
              tested: Mapping[str, float]) -> list[tuple[Band, str, str, int]]:
    """``(band, first, last, count)`` nearest first; an ancestor with a tested limit alone."""
    out: list[tuple[Band, str, str, int]] = []
    run = head
    while run is not None:
        if run.count == 1 or not tested:
            out.append((run.band, run.first, run.last, run.count))
        else:  # walk this run only when the circuit has tested limits
            node = start = end = run.first
            n = 0
            for _ in range(run.count):
                nxt = study.by_id[node].parent
                while nxt in study.by_id and study.by_id[nxt].device is None:
                    nxt = study.by_id[nxt].parent  # RCCBs are not in the runs
                if node in tested:
                    if n:
                        out.append((run.band, start, end, n))
                    out.append((run.band, node, node, 1))
                    start, n = nxt, 0
                else:
                    end, n = node, n + 1
                node = nxt
            if n:
                out.append((run.band, start, run.last, n))
        run = run.rest
    return out


def _window_top(levels: FaultLevels, circuit_id: str) -> float:
    try:
        node = levels.by_circuit[circuit_id]
    except KeyError:
        raise InputError("no fault level for this circuit", circuit=circuit_id) from None
    return float(node.ik_max_a)


def analyse(study: Study, levels: FaultLevels, *, basis: str | None = None) -> Analysis:
    """Selectivity of every circuit under every circuit above it.

    Parameters
    ----------
    study : Study
    levels : FaultLevels
        ``levels.by_circuit[id].ik_max_a`` is the maximum prospective fault at circuit id's
        board [A]: the top of the window of every pair where id is downstream.
    basis : str, optional
        ``"typical"`` or ``"envelope"`` for every device; ``None``: each circuit's own basis,
        else the study's.

    Returns
    -------
    Analysis
        One :class:`PairResult` per (ancestor, circuit) pair, circuits in study order, nearest
        ancestor first; ancestors in a row with the same device (and no tested limit) share one
        result, which says how many it stands for.

    Raises
    ------
    InputError
        When the results would need more than :data:`MAX_ROWS` rows (a tree hundreds of levels
        deep with differing devices).

    Notes
    -----
    Margin and interval come from the downstream circuit, else the study; a tested limit from
    ``tested_limits_a[upstream id]`` of the downstream circuit; the requirement from its
    ``selective_to_a`` (``None``: total selectivity, i.e. up to the window's top).

    A pair's result depends only on the two bands, the downstream circuit's window, margin,
    interval and requirement, and the pair's tested limit. So the ancestors of a circuit are
    taken in runs that share one band (:class:`_Run`): the work and the output grow with the
    number of circuits times the number of *different* devices in a row above them, which
    keeps a chain of thousands of alike devices linear in its length.

    References
    ----------
    IEC 60947-2:2016, Annex A; IEC 60364-5-53:2019, clause 536.4 (selectivity between
    overcurrent protective devices).

    Examples
    --------
    >>> from coordination import study, faults
    >>> s = study.loads('''
    ... [study]
    ... title = "two fuses"
    ... [supply]
    ... pfc_a = 16000
    ... [[circuit]]
    ... id = "main"
    ... from = "supply"
    ... device = "gG100"
    ... [[circuit]]
    ... id = "sub"
    ... from = "main"
    ... device = "gG63"
    ... ''')
    >>> print(analyse(s, faults.compute(s)).pairs[0].verdict)
    total
    """
    bands = {c.id: band_for(study, c.id, basis) for c in study.circuits}
    runs = _ancestor_runs(study, bands)
    rows = sum(r.rows for r in runs.values() if r is not None)
    rows += sum(2 * len(c.tested_limits_a) for c in study.circuits)  # a split adds two at most
    if rows > MAX_ROWS:
        deepest = max(study.circuits, key=lambda c: runs[c.id].rows if runs[c.id] else 0)
        raise InputError(
            f"{rows:,} selectivity rows to list (the tree is deep, with different devices in a "
            f"row above its circuits); at most {MAX_ROWS:,} are allowed: check the study in parts, "
            "one per board", circuit=deepest.id, key="from")
    results: list[PairResult] = []
    by_down: dict[str, tuple[PairResult, ...]] = {}
    # the ancestors of a circuit without tested limits, by its parent: its siblings share them
    untested: dict[str, list[tuple[Band, str, str, int]]] = {}
    all_ok = True
    for circuit in study.circuits:
        head = runs[circuit.id]
        if head is None or circuit.device is None:  # an RCCB has no overcurrent band
            continue
        down = bands[circuit.id]
        margin, interval, _ = study.pair_settings(circuit.id)
        try:  # compare()'s checks, once for all the pairs of this circuit
            lo = checked_positive(down.pickup_min_a, "window_a")
            hi = checked_positive(_window_top(levels, circuit.id), "window_a")
            margin = checked_positive(margin, "margin")
            interval = checked_positive(interval, "interval_s", allow_zero=True)
            tested_limits = {k: checked_positive(v, "tested_limits_a")
                             for k, v in circuit.tested_limits_a.items()}
        except InputError as error:
            raise error.within(circuit=circuit.id) from None
        required = circuit.selective_to_a
        need = hi if required is None else min(float(required), hi)
        if tested_limits:
            segments = _segments(study, head, tested_limits)
        elif circuit.parent in untested:
            segments = untested[circuit.parent]
        else:
            segments = untested[circuit.parent] = _segments(study, head, tested_limits)
        mine = []
        for up, first, last, count in segments:
            tested = tested_limits.get(first) if count == 1 else None
            sel = decide(up, down, lo, hi, margin, interval, tested)
            ok = criterion.requirement_met(sel.verdict, sel.limit_a, need)
            all_ok = all_ok and ok
            mine.append(PairResult(
                upstream=first, downstream=circuit.id, verdict=sel.verdict, limit_a=sel.limit_a,
                window_a=sel.window_a, decided_by=sel.decided_by, upstream_basis=up.basis,
                downstream_basis=down.basis, required_a=required, ok=ok,
                upstream_device=up.name, downstream_device=down.name, note=sel.note,
                time_s=sel.time_s, margin=margin, interval_s=interval, tested_limit_a=tested,
                upstream_last=last, upstream_count=count))
        by_down[circuit.id] = tuple(mine)
        results.extend(mine)
    residual = residual_results(study, levels)
    all_ok = all_ok and all(p.ok for p in residual)
    return Analysis(tuple(results), all_ok, basis, by_down, residual)


def residual_results(study: Study, levels: Any) -> tuple[PairResult, ...]:
    """Every pair of RCDs on one path, downstream circuits in study order, nearest RCD above
    first (:func:`coordination.residual.residual_pairs`).

    Selective (``total``) when the upstream RCD is type S or delayed and its IΔn is at least 3
    times the downstream one's (IEC 60364-5-53, from memory); ``decided_by`` is
    ``"time-current"`` where the IEC 61008-1 / 61009-1 limit values show it at every residual
    current, else ``"rule"`` (the note names a range they leave unproven). Total selectivity is
    required. The window is residual current [A]: from the downstream RCD's non-operating
    current 0.5 IΔn to the largest earth fault at its board.

    References
    ----------
    IEC 60364-5-53 (RCDs in series, from memory); IEC 61008-1 / 61009-1.
    """
    from coordination.residual import rcd_of, residual_pairs

    with_rcd = study.rcd_circuits
    if not with_rcd:
        return ()
    above: dict[str, int] = {}  # RCDs above each circuit, counted parents first
    for c in study.circuits:
        above[c.id] = above.get(c.parent, 0) + (c.parent in with_rcd)
    rows_needed = sum(above[cid] for cid in with_rcd)
    if rows_needed > MAX_ROWS:
        raise InputError(f"{rows_needed:,} pairs of RCDs in series to list; at most "
                         f"{MAX_ROWS:,} are allowed: check the study in parts, one per board",
                         circuit=max(with_rcd, key=above.__getitem__), key="rcd")
    bands = {cid: rcd_of(study, cid) for cid in with_rcd}
    chains: dict[str, tuple] = {}  # the RCDs above each circuit, nearest first, parents first
    paths = []
    for c in study.circuits:
        parent_chain = chains.get(c.parent, ())
        chains[c.id] = (((c.parent, bands[c.parent]), *parent_chain)
                        if c.parent in with_rcd else parent_chain)
        if c.id in with_rcd:
            paths.append((c.id, bands[c.id], chains[c.id]))
    rows = []
    for pair in residual_pairs(paths):
        node = levels.by_circuit.get(pair.downstream)
        top = getattr(node, "ief_max_board_a", None) or getattr(node, "ik_max_a", None)
        low = float(pair.downstream_band.pickup_min_a)
        ok = pair.verdict == "total"
        rows.append(PairResult(
            upstream=pair.upstream, downstream=pair.downstream, verdict=pair.verdict,
            limit_a=None, window_a=(low, float(top) if top else low),
            decided_by=pair.decided_by, upstream_basis=pair.upstream_band.basis,
            downstream_basis=pair.downstream_band.basis, required_a=None, ok=ok,
            upstream_device=pair.upstream_band.name, downstream_device=pair.downstream_band.name,
            note=pair.reason, upstream_last=pair.upstream, protection="residual"))
    return tuple(rows)


# ---------------------------------------------------------------------------------------------
# geometry, lazily, for plots and the report
def overlap(study: Study, levels: FaultLevels, pair: PairResult | tuple[str, str],
            basis: str | None = None) -> BaseGeometry:
    """The crossover zone of a pair: where the upstream may operate before the downstream clears.

    The zone is built from the edges :func:`compare` tests: D's upper edge with the margin (and
    the interval over an adjustable breaker), U's lower edge with no energy withstood at or above
    its instantaneous release. Over the currents from the pair's selectivity limit Is to the
    window's top, wherever the pair is not selective, it spans the times from U's lower edge up
    to D's upper edge (in the usual layout, the intersection of the two bands). So it begins at
    Is, and a pair selective over its whole window has none.

    Parameters
    ----------
    study : Study
    levels : FaultLevels
        For the window's top when ``pair`` is given as two ids.
    pair : PairResult or (upstream id, downstream id)
        A result of :func:`analyse` (its band bases, margin, interval and tested limit are
        used), or two circuit ids (the downstream circuit's margin, interval and tested limit).
    basis : str, optional
        Overrides the bases (as in :func:`analyse`).

    Returns
    -------
    shapely geometry
        In (log10 I [A], log10 t [s]) space, times clipped to [``TIME_FLOOR_S``,
        ``TIME_CEILING_S``] as the bands are; empty when the pair is selective over its window.
        With a tested limit the zone begins where both the tested limit and the curves say the
        pair stops being selective.

    Notes
    -----
    Computed lazily (only plots and the report ask for it): about a thousand currents, one
    vectorised call per edge, one shapely polygon. Where the pair stops being selective with
    both edges beyond the time range, the zone starts where they come into it.

    References
    ----------
    IEC 60947-2:2016, Annex A (selectivity limit current Is; the zone above it is where the
    upstream device may operate).

    Examples
    --------
    >>> from coordination import study, faults
    >>> s = study.loads('''
    ... [study]
    ... title = "two equal fuses"
    ... [supply]
    ... pfc_a = 16000
    ... [[circuit]]
    ... id = "main"
    ... from = "supply"
    ... device = "gG63"
    ... [[circuit]]
    ... id = "sub"
    ... from = "main"
    ... device = "gG63"
    ... ''')
    >>> print(overlap(s, faults.compute(s), ("main", "sub")).area > 0)
    True
    """
    from shapely.geometry import Polygon

    if isinstance(pair, PairResult):
        up_id, down_id = pair.upstream, pair.downstream
        up = band_for(study, up_id, basis or pair.upstream_basis)
        down = band_for(study, down_id, basis or pair.downstream_basis)
        hi = float(pair.window_a[1])
        margin, interval, tested = pair.margin, pair.interval_s, pair.tested_limit_a
    else:
        up_id, down_id = pair
        up = band_for(study, up_id, basis)
        down = band_for(study, down_id, basis)
        hi = _window_top(levels, down_id)
        margin, interval, _ = study.pair_settings(down_id)
        tested = study.by_id[down_id].tested_limits_a.get(up_id)
    lo = float(down.pickup_min_a)
    if not hi > lo:
        return Polygon()
    sel = compare(up, down, (lo, hi), margin=margin, interval_s=interval,
                  tested_limit_a=tested)
    if sel.verdict == "total" or sel.curves_limit_a is None:
        return Polygon()
    start = max(sel.curves_limit_a, sel.limit_a if sel.limit_a is not None else 0.0)
    if not hi > start:
        return Polygon()
    return _zone(up, down, start, hi, margin, interval)


#: Tolerance [decades of current and time] for dropping collinear vertices of a zone.
ZONE_SIMPLIFY_DECADES = 1e-9


def _zone(up: Band, down: Band, start: float, hi: float, margin: float,
          interval_s: float) -> BaseGeometry:
    """The non-selective region between U's lower and D's upper edge over [start, hi] [A]."""
    from shapely.geometry import MultiPolygon, Polygon
    from shapely.validation import make_valid

    i = pair_grid(down, up, start, hi)
    # just above the limit, so that a step there gives the zone's vertical left side at Is
    i = merged_grid(i, [start * (1 + 1e-9)])
    i = i[(i >= start) & (i <= hi)]
    t_down = downstream_edge(down, up, i, margin, interval_s)
    t_up = upstream_edge(up, i)
    bad = criterion.not_selective(t_down, t_up)
    lower = np.clip(t_up, TIME_FLOOR_S, TIME_CEILING_S)
    upper = np.where(bad, np.maximum(np.clip(t_down, TIME_FLOOR_S, TIME_CEILING_S), lower),
                     lower)
    x = np.log10(i)
    ring = np.concatenate([np.column_stack([x, np.log10(upper)]),
                           np.column_stack([x[::-1], np.log10(lower[::-1])])])
    shape = make_valid(Polygon(ring))
    # selective stretches have no height: make_valid turns them into lines, which are dropped
    parts = [g for g in getattr(shape, "geoms", [shape])
             if g.geom_type in ("Polygon", "MultiPolygon") and not g.is_empty]
    # drop the grid points that lie on straight runs (in log-log most edges are straight lines
    # between their table points): 2,000 vertices become about ten, so plots and the report
    # draw the zone in a fraction of the time; 1e-9 decade moves nothing visibly or Is at all
    polygons = [q.simplify(ZONE_SIMPLIFY_DECADES) for g in parts
                for q in getattr(g, "geoms", [g])]
    polygons = [q for q in polygons if not q.is_empty]
    if not polygons:
        return Polygon()
    return polygons[0] if len(polygons) == 1 else MultiPolygon(polygons)
