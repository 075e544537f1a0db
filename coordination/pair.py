"""The pure pair test: selectivity of one downstream band under one upstream band over a window.

For a downstream band D under an upstream band U the pair is selective at a current I when D's
upper edge (times the margin, plus the interval over an adjustable breaker) is at or below U's
lower edge (:mod:`coordination.criterion`, the one statement of the rule). How a pair is
decided (:func:`compare`):

1. The two edges are sampled together on a log-spaced grid of currents (one vectorised call per
   edge; the devices' known breakpoints are added to the grid so that no step is stepped over).
   The first sample where D's upper edge rises above U's lower edge brackets the selectivity
   limit Is, which is then found exactly on the edge functions (Illinois false position in
   log10 I with a bisection safeguard, :func:`coordination.roots.find_crossing`; it converges
   to the step itself where an edge steps).
2. An upstream device with an instantaneous release withstands no energy above its
   ``instantaneous_a``: the limit is never above it, unless the study gives a tested limit.
   A limit set there is reported as decided by ``"time-current"`` whatever D's time at that
   current: the upstream's current pickup decides, not an energy comparison.
3. A tested limit for the pair overrides both and is reported as ``"tested"``.

The search runs from the window's low end up to at least ``SEARCH_TOP_A`` whatever the window's
top, so the costly part depends only on the two bands, the low end, the margin and the interval:
it is cached, and identical pairs (the same devices in many boards) are computed once.

gG fuse-links in the ratio 1.6:1 come out selective on both bases: on the ``typical`` basis by
their characteristics, on the ``envelope`` basis because the envelope carries IEC 60269's
selectivity requirement (:mod:`curves.fuse`).
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Literal

import numpy as np

from coordination import criterion
from coordination.criterion import ADJUSTABLE_FAMILIES, EQUAL_RTOL
from coordination.roots import find_crossing
from curves.band import ENERGY_REGION_S, Band, merged_grid
from curves.errors import InputError

Verdict = Literal["total", "partial", "none"]
DecidedBy = Literal["time-current", "energy", "tested", "rule"]

#: The crossing search always runs up to at least this current [A] (1 MA), whatever the window,
#: so that its result can be shared by every window with the same low end.
SEARCH_TOP_A = 1.0e6
#: Samples of the coarse grid over the search range (log-spaced).
GRID_POINTS = 1024
#: Relative offset either side of a known breakpoint added to the grid.
_BREAK_EPS = 1e-7
#: Tolerance factors around an upstream current setting whose neighbourhood is sampled densely.
_SETTING_FACTORS = (0.8, 0.85, 0.9, 0.95, 1.0, 1.05, 1.1, 1.2)
#: Tolerance of the limit search in log10 of the current (about 2.3e-13 relative in amperes).
_XTOL = 1e-13
#: Log10 stand-in for an infinite time (never operates) when root-finding.
_LOG_NEVER = 30.0


@dataclass(frozen=True)
class Selectivity:
    """The selectivity of one pair of bands over one window.

    Attributes
    ----------
    verdict : {"total", "partial", "none"}
        ``total``: selective over the whole window; ``partial``: selective up to ``limit_a``;
        ``none``: the bands already meet at or below D's conventional tripping current.
    limit_a : float or None
        Selectivity limit Is [A]: the lowest current at which the pair stops being selective
        (``None`` for total).
    decided_by : {"time-current", "energy", "tested"}
        Which test decided: the edges meeting at or above ``ENERGY_REGION_S``, below it (energy
        as equivalent time), or a tested limit given by the user. A limit set by the upstream's
        instantaneous release is ``"time-current"`` (its current pickup decides).
    window_a : tuple of float
        The current window [A]: D's conventional non-tripping current to the maximum fault.
    note : str
        A short reason a person reads (e.g. "limited by the upstream instantaneous pickup").
    time_s : float or None
        Time at which the edges meet [s] (for total: U's time where the edges come closest). For
        a limit set by the upstream's instantaneous release it is the downstream device's time
        at that current, which may be below ``ENERGY_REGION_S`` although the pickup decided.
    curves_limit_a : float or None
        The limit the curves alone give [A] when a tested limit overrode them (``None``: total).
    """

    verdict: Verdict
    limit_a: float | None
    decided_by: DecidedBy
    window_a: tuple[float, float]
    note: str = ""
    time_s: float | None = None
    curves_limit_a: float | None = None


# ---------------------------------------------------------------------------------------------
# the pure pair test
def checked_positive(value: float, key: str, *, allow_zero: bool = False) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{key} must be a number, not {value!r}", key=key) from None
    if not math.isfinite(v) or v < 0 or (v == 0 and not allow_zero):
        allowed = "a finite number >= 0" if allow_zero else "a finite number > 0"
        raise InputError(f"{key} = {v:g} is not allowed; give {allowed}", key=key)
    return v


def downstream_edge(down: Band, up: Band, i: np.ndarray, margin: float,
                     interval_s: float) -> np.ndarray:
    """D's upper edge with the margin, plus the interval over an adjustable breaker [s]."""
    return criterion.downstream_time(down.t_max(i), margin, interval_s,
                                     up.family in ADJUSTABLE_FAMILIES)


def upstream_edge(up: Band, i: np.ndarray) -> np.ndarray:
    """U's lower edge [s]; at or above an instantaneous release, no energy is withstood."""
    return criterion.upstream_time(up.t_min(i), i, up.instantaneous_a)


def pair_grid(down: Band, up: Band, lo: float, top: float) -> np.ndarray:
    """Log-spaced currents over [lo, top] with both sides of every known breakpoint [A]."""
    base = np.logspace(math.log10(lo), math.log10(top), GRID_POINTS)
    marks = [down.pickup_max_a, down.instantaneous_a, up.pickup_min_a, up.pickup_max_a,
             up.instantaneous_a]
    # current settings of the upstream unit (Isd_a, Ii_a...) and their usual tolerances
    settings = [v for k, v in up.settings.items()
                if k.endswith("_a") and isinstance(v, int | float) and not isinstance(v, bool)]
    marks += [v * f for v in settings for f in _SETTING_FACTORS]
    extra = np.array([m for m in marks if m is not None and math.isfinite(m) and m > 0], float)
    extra = np.concatenate([extra * (1 - _BREAK_EPS), extra, extra * (1 + _BREAK_EPS)])
    extra = extra[(extra > lo) & (extra < top)]
    return merged_grid(base, extra)


def _refine(down: Band, up: Band, a: float, b: float, margin: float, interval_s: float) -> float:
    """The selectivity limit between a selective current ``a`` and a non-selective ``b`` [A]."""

    def gap(x: np.ndarray) -> np.ndarray:  # > 0 where not selective, <= 0 where selective
        i = 10.0**x
        td = downstream_edge(down, up, i, margin, interval_s)
        tu = upstream_edge(up, i) * (1.0 + EQUAL_RTOL)
        finite_d, finite_u = np.isfinite(td), np.isfinite(tu)
        with np.errstate(invalid="ignore"):
            ld = np.where(finite_d, np.log10(np.maximum(td, 1e-30)), _LOG_NEVER)
            lu = np.where(finite_u, np.log10(np.maximum(tu, 1e-30)), _LOG_NEVER)
        return np.where(finite_d | finite_u, ld - lu, -1.0)  # both never: selective

    # the final bracket straddles the boundary to _XTOL; its selective end is the limit
    x_lo, _ = find_crossing(gap, math.log10(a), math.log10(b), xtol=_XTOL)
    return float(10.0 ** float(x_lo))


@lru_cache(maxsize=16)
def _sampled_edges(up: Band, down: Band, lo: float, top: float, margin: float,
                   interval_s: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The pair's grid of currents over [lo, top] [A] (:func:`pair_grid`), D's edge there with
    margin and interval [s] and U's edge [s] (cached: read, never written, by their users).

    :func:`_first_crossing` and, for a pair selective over its window, :func:`_approach` read
    the same samples of a pair one after the other, so the edges are evaluated once for both.
    Only the latest few pairs are kept: the two readers cache what they find.
    """
    i = pair_grid(down, up, lo, top)
    return i, downstream_edge(down, up, i, margin, interval_s), upstream_edge(up, i)


@lru_cache(maxsize=65536)
def _first_crossing(up: Band, down: Band, lo: float, top: float, margin: float,
                    interval_s: float) -> float | None:
    """Lowest current in [lo, top] where the pair is not selective [A], or None (cached)."""
    i, td, tu = _sampled_edges(up, down, lo, top, margin, interval_s)
    bad = criterion.not_selective(td, tu)
    if not bad.any():
        return None
    k = int(np.argmax(bad))
    if k == 0:
        return float(i[0])
    return _refine(down, up, float(i[k - 1]), float(i[k]), margin, interval_s)


@lru_cache(maxsize=65536)
def _time_at(down: Band, up: Band, current_a: float, margin: float, interval_s: float) -> float:
    """Time where the edges meet, just below ``current_a`` [s] (the lower of the two edges)."""
    i = np.array([current_a * (1 - 1e-9)])
    td = float(downstream_edge(down, up, i, margin, interval_s)[0])
    tu = float(upstream_edge(up, i)[0])
    return min(td, tu)


@lru_cache(maxsize=65536)
def _approach(up: Band, down: Band, lo: float, margin: float,
              interval_s: float) -> tuple[list[float], list[float], list[float], list[int]]:
    """The pair's edges from ``lo`` up to the search top, once per pair (its windows differ only
    in their top): currents [A], D's edge with margin and interval [s], U's edge [s], and for
    each point the index of the least ratio t_U / t_D at or below it (the first, as argmin).
    As lists: each window reads a few points of them, which numpy's scalars make slower."""
    i, td, tu = _sampled_edges(up, down, lo, SEARCH_TOP_A, margin, interval_s)
    both = np.isfinite(td) & np.isfinite(tu) & (td > 0)
    ratio = np.where(both, tu / np.where(both, td, 1.0), np.inf)
    before = np.concatenate([[np.inf], np.minimum.accumulate(ratio)[:-1]])
    new_least = ratio < before
    new_least[0] = True
    best = np.maximum.accumulate(np.where(new_least, np.arange(i.size), 0))
    return i.tolist(), td.tolist(), tu.tolist(), best.tolist()


def _scalar_ratio(td: float, tu: float) -> float:
    """t_U / t_D where both edges exist, else ``inf``."""
    ok = math.isfinite(td) and math.isfinite(tu) and td > 0
    return tu / td if ok else math.inf


def _closest_approach_time(up: Band, down: Band, lo: float, hi: float, margin: float,
                           interval_s: float) -> float | None:
    """U's time where the two edges come closest (least ratio t_U / t_D) in the window [s].

    For a pair selective over the whole window this is where selectivity is tightest, so it
    says which test decided it: below ``ENERGY_REGION_S`` the energy test. Read from the pair's
    edges up to the search top (:func:`_approach`, computed once per pair), with the edges at
    the window's top interpolated log-log between the grid points around it (exact on the
    straight log-log runs most edges are made of) or, where an edge is missing there, evaluated.
    """
    i, td, tu, best = _approach(up, down, lo, margin, interval_s)
    n = bisect.bisect_right(i, hi)
    if 0 < n < len(i) and min(td[n - 1], td[n], tu[n - 1], tu[n]) > 0 and all(
            math.isfinite(v) for v in (td[n - 1], td[n], tu[n - 1], tu[n])):
        x0, x1 = math.log10(i[n - 1]), math.log10(i[n])
        w = (math.log10(hi) - x0) / (x1 - x0) if x1 > x0 else 0.0
        td_hi = 10.0 ** (math.log10(td[n - 1]) * (1 - w) + math.log10(td[n]) * w)
        tu_hi = 10.0 ** (math.log10(tu[n - 1]) * (1 - w) + math.log10(tu[n]) * w)
    else:
        top = np.array([hi])
        td_hi = float(downstream_edge(down, up, top, margin, interval_s)[0])
        tu_hi = float(upstream_edge(up, top)[0])
    r_hi = _scalar_ratio(td_hi, tu_hi)
    if n > 0:
        k = best[n - 1]
        r_k = _scalar_ratio(td[k], tu[k])
        if r_k <= r_hi:  # the first least, as an argmin over the points and then the top
            return tu[k] if math.isfinite(r_k) else None
    return tu_hi if math.isfinite(r_hi) else None


def _in_energy_region(t_s: float) -> bool:
    """Whether a crossing at time ``t_s`` is decided by energy: at or below ENERGY_REGION_S,
    where the edges are equivalent times I2t / I^2 (a fuse's typical edge is flat at exactly
    0.01 s until its energy limit takes over)."""
    return t_s <= ENERGY_REGION_S * (1.0 + EQUAL_RTOL)


@lru_cache(maxsize=65536)
def decide(up: Band, down: Band, lo: float, hi: float, margin: float, interval_s: float,
           tested: float | None) -> Selectivity:
    """One pair over one window, its arguments checked (:func:`compare` checks them); cached,
    so identical pairs of a study are decided once."""
    window = (lo, hi)
    if not hi > lo:
        return Selectivity("total", None, "tested" if tested is not None else "time-current",
                           window, note="the fault level does not reach the downstream device's "
                           "overload region", time_s=None)
    crossing = _first_crossing(up, down, lo, max(hi, SEARCH_TOP_A), margin, interval_s)
    limit = crossing if crossing is not None and crossing < hi else None
    note = ""
    inst = up.instantaneous_a
    if inst is not None and inst < hi and (limit is None or inst <= limit * (1 + 1e-8)):
        limit = max(inst, lo)
        note = "limited by the upstream device's instantaneous pickup"

    if tested is not None:
        if tested >= hi:
            verdict: Verdict = "total"
        else:
            verdict = "none" if tested <= down.pickup_max_a else "partial"
        what = "no curve crossing in the window" if limit is None else (
            f"curves alone give {limit:.4g} A")
        return Selectivity(verdict, None if verdict == "total" else tested, "tested", window,
                           note=f"tested limit {tested:.4g} A given ({what})",
                           time_s=None, curves_limit_a=limit)

    if limit is None:
        t = _closest_approach_time(up, down, lo, hi, margin, interval_s)
        decided: DecidedBy = ("energy" if t is not None and _in_energy_region(t)
                              else "time-current")
        return Selectivity("total", None, decided, window, note=note, time_s=t)

    t = _time_at(down, up, limit, margin, interval_s)
    if note:  # the upstream's instantaneous current pickup ends selectivity, not an energy test
        decided = "time-current"
    else:
        decided = "energy" if _in_energy_region(t) else "time-current"
    verdict = "none" if limit <= down.pickup_max_a * (1 + EQUAL_RTOL) else "partial"
    if verdict == "none" and not note:
        note = "the bands meet in the downstream device's overload region"
    return Selectivity(verdict, limit, decided, window, note=note, time_s=t, curves_limit_a=limit)


def compare(upstream: Band, downstream: Band, window_a: tuple[float, float], *,
            margin: float = 1.0, interval_s: float = 0.0,
            tested_limit_a: float | None = None) -> Selectivity:
    """Selectivity of a downstream band under an upstream band over a current window.

    Parameters
    ----------
    upstream, downstream : Band
        The device nearer the supply and the one nearer the fault.
    window_a : tuple of float
        ``(low, high)`` [A]: normally D's conventional non-tripping current and the maximum
        prospective fault current at D's board.
    margin : float
        Factor on D's upper edge (>= 1 adds a safety margin between the bands) [-].
    interval_s : float
        Coordination time interval added to D's upper edge where U is an adjustable breaker and
        D's time is at or above ``ENERGY_REGION_S`` [s].
    tested_limit_a : float, optional
        A selectivity limit established by test for this pair [A]; it overrides the curves.

    Returns
    -------
    Selectivity
        Verdict, limit Is [A], the test that decided, the window, a note, the crossing time.

    Raises
    ------
    InputError
        For a non-positive or non-finite window, margin, interval or tested limit.

    Notes
    -----
    The selectivity limit is found exactly on the edge functions: the first non-selective
    sample of a log-spaced grid (with the bands' breakpoints added) brackets it, a bracketing
    root-finder (:func:`coordination.roots.find_crossing`) on ``log10 t_D - log10 t_U`` over
    ``log10 I`` then converges to it, to 1e-13 in log10 I (to the step itself where an edge is
    discontinuous). A non-selective island narrower than one grid step (about 1.4 %
    in current) away from any known breakpoint could be missed.

    gG fuse-links in the ratio 1.6:1 come out selective on both bases: on the ``typical`` basis by
    their characteristics, on the ``envelope`` basis because its pre-arcing edge carries the
    IEC 60269 selectivity requirement (:func:`curves.fuse.minor_rating`).

    References
    ----------
    IEC 60947-2:2016, Annex A (co-ordination between circuit-breakers and other short-circuit
    protective devices: selectivity limit current Is, total and partial selectivity).
    IEC 60269-1:2006, clause 5.7.1 and IEC 60269-2 (gG fuse-links selective when the minor
    fuse's maximum operating I2t does not exceed the major fuse's minimum pre-arcing I2t).

    Examples
    --------
    >>> import numpy as np
    >>> from curves.band import Band
    >>> up = Band("U", "datasheet", "datasheet", 100.0, 105.0, 130.0, 3600.0,
    ...           lower=lambda i: np.where(i > 105, 4e6 / i**2, np.inf),
    ...           upper=lambda i: np.where(i > 130, 1e7 / i**2 + 0.02, np.inf))
    >>> down = Band("D", "datasheet", "datasheet", 20.0, 21.0, 26.0, 3600.0,
    ...             lower=lambda i: np.where(i > 21, 2e5 / i**2 + 0.005, np.inf),
    ...             upper=lambda i: np.where(i > 26, 5e5 / i**2 + 0.01, np.inf))
    >>> r = compare(up, down, (21.0, 50_000.0))
    >>> print(r.verdict, round(r.limit_a, 1), r.decided_by)
    partial 18708.3 time-current
    """
    lo_raw, hi_raw = window_a
    lo = checked_positive(lo_raw, "window_a")
    hi = checked_positive(hi_raw, "window_a")
    m = checked_positive(margin, "margin")
    dt = checked_positive(interval_s, "interval_s", allow_zero=True)
    tested = None if tested_limit_a is None else checked_positive(tested_limit_a, "tested_limits_a")
    return decide(upstream, downstream, lo, hi, m, dt, tested)
