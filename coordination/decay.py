"""Operating times and selectivity under a decaying fault current (a generator's decrement).

Under a constant prospective current a device's edges give its times directly. Under a current
that decays (:class:`coordination.generator.Decrement`) the common practice is to read the
time-current plot: the device operates where the decrement curve I(t) meets the edge, i.e. at
the first time t with ::

    t >= edge(I(t))

(:func:`operating_time_s`). A device whose edge the decaying current never reaches (the current
falls below its pickup first) does not operate: its time is ``inf``.

For the upper edge (has cleared by) this first meeting is a safe reading: up to t the device has
carried at least I(t), for at least the time its edge allows at I(t). For the lower edge (will not
operate before) it is the same reading of the plot, not a bound: a device that carried the larger
earlier current may be further on its way than the constant current I(t) would put it (its
heating is not reset as the current falls); a result that rests on the upstream device's time
under a decaying current says so.

A pair (:func:`compare_decaying`) is selective under a fault when the downstream device's
clearing time, with margin and interval, is not above the upstream device's time under the same
current (:mod:`coordination.criterion`). Faults are taken from the bolted fault at the downstream
device's board down to its overload region, each as a resistive impedance added to the board's
loop (low-voltage cables are mainly resistive: common practice), and each is named by its
initial (subtransient) current: the selectivity limit Is is the lowest such current at which the
pair is not selective, as for a constant current.

References
----------
IEC 60947-2:2016, Annex A (selectivity, Is); IEC 60364-4-41:2005, 411.3.2 (disconnection times);
the decrement and its crossing with the characteristic on the time-current plot: common practice.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from coordination import criterion
from coordination.criterion import ADJUSTABLE_FAMILIES, EQUAL_RTOL
from coordination.generator import Decrement, decrement_current_a, stage_currents_a
from curves.band import ENERGY_REGION_S, Band

#: The time grid on which a decrement is read [s]: from 10 us (the fault's start: T''d is at
#: least 1 ms, so the current has fallen by at most 1 % there) to 10^4 s, this many samples a
#: decade (a meeting between two samples is searched on a finer grid, see operating_time_s).
T_START_S = 1e-5
T_END_S = 1e4
POINTS_PER_DECADE = 20
#: Samples inside a grid interval where the edge may have been met between two samples.
_FINE_POINTS = 64
#: Tolerance of the crossing's time in log10 t (about 2.3e-6 relative).
_XTOL = 1e-6
#: Faults per pair's window (log-spaced initial currents), before the limit is refined.
WINDOW_POINTS = 48
#: Tolerance of a limit in log10 of the initial current (about 2.3e-4 relative).
_LIMIT_XTOL = 1e-4

Edge = Callable[[np.ndarray], np.ndarray]
#: What every pair's result under a decaying current rests on, in its note.
_READING = ("the upstream device's time is read where the decaying current meets its lower edge "
            "(common practice, not a bound: it has carried the larger earlier current)")


def _time_grid() -> np.ndarray:
    decades = math.log10(T_END_S / T_START_S)
    return np.logspace(math.log10(T_START_S), math.log10(T_END_S),
                       round(decades * POINTS_PER_DECADE) + 1)


_GRID = _time_grid()


def _edge_times(edge: Edge, decrement: Decrement, t: np.ndarray) -> np.ndarray:
    """``edge(I(t))`` for every fault (rows) at every time (columns) [s]."""
    current = np.atleast_2d(decrement.current_a(t[np.newaxis, :]))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        h = np.asarray(edge(current.ravel()), dtype=float).reshape(current.shape)
    return np.where(np.isnan(h), np.inf, h)


def _column(x: Any, rows: int) -> np.ndarray:
    return np.broadcast_to(np.asarray(x, dtype=float).reshape(-1, 1), (rows, 1))


def operating_time_s(edge: Edge, decrement: Decrement) -> np.ndarray:
    """The first time at which a decaying current meets an edge: ``t >= edge(I(t))`` [s].

    Parameters
    ----------
    edge : callable
        A device's edge (``band.t_max``, ``band.t_min`` or a criterion's time), vectorised over
        currents [A] -> [s], non-increasing, ``inf`` where the device does not operate.
    decrement : Decrement
        The decaying current; with array fields, one fault per element.

    Returns
    -------
    numpy.ndarray
        One time per fault [s] (a 1-d array); ``inf`` where the edge is never met up to
        ``T_END_S`` (the current fell below the device's pickup first, or never reached it).

    Notes
    -----
    The edge is sampled along I(t) on a log-spaced time grid. ``edge(I(t))`` never falls as t
    grows (I(t) does not rise, the edge does not rise with current), so no meeting can lie in a
    grid interval ``[t_j, t_j+1]`` where ``t_j+1 < edge(I(t_j))``; every other interval before
    the first sampled meeting is searched again on a finer grid, and the meeting found is then
    refined by bisection in log10 t (all faults at once) to the later end of the final bracket
    (a time at which the edge has been met). A step edge is also probed at its own time
    (``x = edge(I(t_j))``), so a definite time met only briefly is found exactly; another
    meeting that lasts less than one step of the finer grid (about 0.2 % in time) may be
    missed.

    References
    ----------
    Common practice: the operating time under a decaying current read where the decrement curve
    meets the device's characteristic on the time-current plot.

    Examples
    --------
    >>> from coordination.generator import Decrement
    >>> edge = lambda i: np.where(i > 1000.0, 1.0e6 / np.maximum(i - 1000.0, 1e-300), np.inf)
    >>> flat = Decrement(3000.0, 3000.0, 3000.0, 0.02, 0.3)
    >>> print(round(float(operating_time_s(edge, flat)[0]), 3))
    500.0
    >>> print(operating_time_s(edge, Decrement(3000.0, 2000.0, 0.0, 0.02, 0.3)).tolist())
    [inf]
    """
    fields = np.broadcast_arrays(*(np.asarray(x, dtype=float).ravel()
                                   for x in (decrement.i_sub_a, decrement.i_trans_a,
                                             decrement.i_sust_a)))
    rows = fields[0].size
    columns = Decrement(*(f.reshape(-1, 1) for f in fields), decrement.td2_s, decrement.td1_s)
    t = _GRID
    h = _edge_times(edge, columns, t)
    met = t[np.newaxis, :] >= h
    first = np.where(met.any(axis=1), met.argmax(axis=1), t.size)
    result = np.full(rows, np.inf)
    result[first == 0] = t[0]  # met within the first 10 us
    lo = np.full(rows, np.nan)
    hi = np.full(rows, np.nan)
    inside = (first > 0) & (first < t.size)
    lo[inside] = t[first[inside] - 1]
    hi[inside] = t[first[inside]]
    # a meeting may lie between two samples before the first sampled one: no meeting is
    # possible in [t_j, t_j+1] where t_j+1 < edge(I(t_j)) (edge(I(t)) never falls)
    maybe = np.zeros_like(met)
    maybe[:, :-1] = t[np.newaxis, 1:] >= h[:, :-1]
    maybe &= np.arange(t.size)[np.newaxis, :] < (first - 1)[:, np.newaxis]
    for r in np.flatnonzero(maybe.any(axis=1) & (first > 0)).tolist():
        row = Decrement(*(float(f[r]) for f in fields), decrement.td2_s, decrement.td1_s)
        for j in np.flatnonzero(maybe[r]).tolist():
            fine = np.logspace(math.log10(t[j]), math.log10(t[j + 1]), _FINE_POINTS)
            inner = np.flatnonzero(fine >= _edge_times(edge, row, fine)[0])
            if inner.size:
                k = int(inner[0])
                lo[r], hi[r] = (fine[k - 1], fine[k]) if k else (t[j], fine[0])
                break
    todo = np.flatnonzero(np.isfinite(hi))
    if todo.size:
        sub = Decrement(*(f[todo] for f in fields), decrement.td2_s, decrement.td1_s)
        result[todo] = _refine(edge, sub, lo[todo], hi[todo])
    return np.minimum(result, _probe(edge, fields, decrement, t, h, first))


def _probe(edge: Edge, fields: list[np.ndarray], decrement: Decrement, t: np.ndarray,
           h: np.ndarray, first: np.ndarray) -> np.ndarray:
    """Meetings at the edge's own time: where ``x = edge(I(t_j))`` falls inside the next grid
    interval and the edge is still met there (``edge(I(x)) <= x``), the device operates at x
    exactly (before x the edge lies above the time). This finds a step edge (a definite time,
    an instantaneous release) met only briefly, however briefly, before the current falls
    below its pickup [s] (``inf`` where there is none)."""
    x = h[:, :-1]
    columns = np.arange(x.shape[1])[np.newaxis, :]
    with np.errstate(invalid="ignore"):
        candidate = (x > t[np.newaxis, :-1]) & (x <= t[np.newaxis, 1:]) & (
            columns < first[:, np.newaxis])
    out = np.full(x.shape[0], np.inf)
    rows, cols = np.nonzero(candidate)
    if rows.size == 0:
        return out
    at = x[rows, cols]
    current = decrement_current_a(at, fields[0][rows], fields[1][rows], fields[2][rows],
                                  decrement.td2_s, decrement.td1_s)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        h_at = np.asarray(edge(np.asarray(current, dtype=float)), dtype=float)
    met = at >= np.where(np.isnan(h_at), np.inf, h_at)
    np.minimum.at(out, rows[met], at[met])
    return out


def _refine(edge: Edge, rows: Decrement, a_s: np.ndarray, b_s: np.ndarray) -> np.ndarray:
    """The meetings in ``[a_s, b_s]`` (not met at a_s, met at b_s), one per fault, by bisection
    in log10 t to ``_XTOL``: the later end of each final bracket [s]."""
    a, b = np.log10(a_s), np.log10(b_s)
    while np.any(b - a > _XTOL):
        mid = 0.5 * (a + b)
        x = 10.0**mid
        current = rows.current_a(x)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            h = np.asarray(edge(np.asarray(current, dtype=float)), dtype=float)
        now = x >= np.where(np.isnan(h), np.inf, h)
        b = np.where(now, mid, b)
        a = np.where(now, a, mid)
    return 10.0**b


def clearing_time_s(band: Band, decrement: Decrement) -> np.ndarray:
    """When a device has cleared a decaying fault: its upper edge met [s] (``inf``: never).

    Safety checks pass the envelope band.

    Examples
    --------
    >>> from curves.mcb import mcb_band
    >>> from coordination.generator import Decrement
    >>> b16 = mcb_band("B", 16, basis="envelope")
    >>> print(clearing_time_s(b16, Decrement(400.0, 380.0, 0.0, 0.02, 0.3))[0] <= 0.1)
    True
    """
    return operating_time_s(band.t_max, decrement)


def upstream_time_s(band: Band, decrement: Decrement) -> np.ndarray:
    """The time an upstream device withstands a decaying fault [s]: its lower edge met, at most
    ``TIME_FLOOR_S`` once the current is at or above its instantaneous release.

    Examples
    --------
    >>> from curves.fuse import gg_band
    >>> from coordination.generator import Decrement
    >>> print(upstream_time_s(gg_band(200), Decrement(400.0, 380.0, 0.0, 0.02, 0.3)).tolist())
    [inf]
    """
    inst = band.instantaneous_a

    def edge(i: np.ndarray) -> np.ndarray:
        return criterion.upstream_time(band.t_min(i), i, inst)

    return operating_time_s(edge, decrement)


# -- a pair --------------------------------------------------------------------------------------
@dataclass(frozen=True)
class FaultFamily:
    """The faults below one board of a source: the source's stage loops, the board's loop and
    the driving voltage; a fault further away adds a resistance to the board's loop.

    Attributes
    ----------
    loops : tuple
        :func:`coordination.generator.stage_loops` [ohm].
    board_ohm : complex
        The installation's loop from the source's terminals to the board [ohm].
    voltage_v : float
        :func:`coordination.generator.driving_voltage_v` [V].
    td2_s, td1_s : float
        The source's time constants [s].
    """

    loops: tuple[complex, complex, complex | None]
    board_ohm: complex
    voltage_v: float
    td2_s: float
    td1_s: float

    @property
    def bolted_a(self) -> float:
        """The initial current of a bolted fault at the board [A]."""
        return float(self.voltage_v / abs(self.loops[0] + self.board_ohm))

    def at_initial_a(self, initial_a: Any) -> Decrement:
        """The decrements of faults with these initial (subtransient) currents [A], each a
        resistance added to the board's loop (at most :attr:`bolted_a`)."""
        i0 = np.minimum(np.asarray(initial_a, dtype=float), self.bolted_a)
        z = self.loops[0] + self.board_ohm
        with np.errstate(divide="ignore"):
            r_add = np.sqrt(np.maximum((self.voltage_v / i0) ** 2 - z.imag**2, 0.0)) - z.real
        path = self.board_ohm + np.maximum(r_add, 0.0)
        i_sub, i_trans, i_sust = stage_currents_a(self.loops, path, self.voltage_v)
        return Decrement(i_sub, i_trans, i_sust, self.td2_s, self.td1_s)


@dataclass(frozen=True)
class DecayingSelectivity:
    """The selectivity of a pair under a decaying fault current.

    Attributes
    ----------
    verdict : {"total", "partial", "none"}
    limit_a : float or None
        The lowest initial (subtransient) current of a fault at which the pair is not selective
        [A] (``None`` for total).
    decided_by : {"time-current", "energy", "tested"}
    window_a : tuple of float
        D's conventional non-tripping current to the bolted fault's initial current at D's
        board [A].
    note : str
        What a person reads.
    time_s : float or None
        The downstream device's clearing time at the limit [s].
    """

    verdict: str
    limit_a: float | None
    decided_by: str
    window_a: tuple[float, float]
    note: str = ""
    time_s: float | None = None


def _not_selective(up: Band, down: Band, decrement: Decrement, margin: float,
                   interval_s: float) -> tuple[np.ndarray, np.ndarray]:
    """Where the pair is not selective under each fault, and D's clearing times [s]."""
    t_down = clearing_time_s(down, decrement)
    t_up = upstream_time_s(up, decrement)
    td = criterion.downstream_time(t_down, margin, interval_s, up.family in ADJUSTABLE_FAMILIES)
    return criterion.not_selective(td, t_up), t_down


def compare_decaying(upstream: Band, downstream: Band, faults: FaultFamily, *,
                     margin: float = 1.0, interval_s: float = 0.0,
                     tested_limit_a: float | None = None) -> DecayingSelectivity:
    """Selectivity of a downstream device under an upstream one for the decaying faults below
    the downstream device's board.

    Parameters
    ----------
    upstream, downstream : Band
        The device nearer the source and the one nearer the fault.
    faults : FaultFamily
        The faults at and beyond the downstream device's board.
    margin, interval_s : float
        As :func:`coordination.engine.compare` [-], [s].
    tested_limit_a : float, optional
        A selectivity limit established by test [A]: it overrides the curves, read against the
        faults' initial currents (a decaying current is below its initial value).

    Returns
    -------
    DecayingSelectivity

    Notes
    -----
    ``WINDOW_POINTS`` faults, log-spaced in initial current over the window, are compared at
    once; the first non-selective one brackets the limit, which is refined on finer grids
    between the last selective and the first non-selective fault (each ``WINDOW_POINTS`` faults
    at once) to ``_LIMIT_XTOL`` in log10 of the initial current. A non-selective island
    narrower than one step of the first grid (about 6 % in current over a window of three
    decades) may be missed, as with the engine's grid.

    References
    ----------
    IEC 60947-2:2016, Annex A (Is, total and partial selectivity); the crossing of the decrement
    with the characteristics: common practice.

    Examples
    --------
    >>> from curves.fuse import gg_band
    >>> from curves.mcb import mcb_band
    >>> faults = FaultFamily((0.03j, 0.06j, None), 0.05 + 0.01j, 230.0, 0.02, 0.3)
    >>> r = compare_decaying(gg_band(200), mcb_band("B", 16), faults)
    >>> print(r.verdict, round(r.window_a[1]))
    total 3592
    """
    lo = float(downstream.pickup_min_a)
    hi = faults.bolted_a
    window = (lo, hi)
    if tested_limit_a is not None:
        tested = float(tested_limit_a)
        if tested >= hi:
            return DecayingSelectivity("total", None, "tested", window,
                                       note=f"tested limit {tested:.4g} A given")
        verdict = "none" if tested <= downstream.pickup_max_a else "partial"
        return DecayingSelectivity(verdict, tested, "tested", window,
                                   note=f"tested limit {tested:.4g} A given")
    if not hi > lo:
        return DecayingSelectivity("total", None, "time-current", window,
                                   note="the fault level does not reach the downstream "
                                   "device's overload region")
    grid = np.logspace(math.log10(lo), math.log10(hi), WINDOW_POINTS)
    grid[0] = lo * (1 + 1e-9)
    bad, _ = _not_selective(upstream, downstream, faults.at_initial_a(grid), margin, interval_s)
    where = np.flatnonzero(bad)
    if where.size == 0:
        return DecayingSelectivity("total", None, "time-current", window,
                                   note=f"selective for every fault in the window; {_READING}")
    k = int(where[0])
    limit = float(grid[0])
    if k > 0:  # the first non-selective fault, on finer grids between the last two samples
        a, b = math.log10(grid[k - 1]), math.log10(grid[k])
        while b - a > _LIMIT_XTOL:
            x = np.linspace(a, b, WINDOW_POINTS)[1:]
            flags, _ = _not_selective(upstream, downstream, faults.at_initial_a(10.0**x),
                                      margin, interval_s)
            j = int(np.argmax(flags)) if flags.any() else x.size - 1
            a, b = (x[j - 1] if j else a), x[j]
        limit = float(10.0**b)
    _, t_down = _not_selective(upstream, downstream, faults.at_initial_a(limit), margin,
                               interval_s)
    t = float(t_down[0])
    decided = "energy" if t <= ENERGY_REGION_S * (1 + EQUAL_RTOL) else "time-current"
    verdict = "none" if limit <= downstream.pickup_max_a * (1 + EQUAL_RTOL) else "partial"
    return DecayingSelectivity(verdict, limit, decided, window, note=_READING,
                               time_s=t if math.isfinite(t) else None)
