"""A small vectorised bracketing root-finder: the project's one replacement for a library solver.

The overlap engine needs the current at which two edges meet, to a tight tolerance, on edge
functions that may be smooth (a thermal law, an I2t law) or step (an instantaneous release, a
short-time delay). Importing a general optimisation package for that one call costs more start-up
time than the whole study of a large building, so the search lives here, in plain numpy.

:func:`find_crossing` keeps a bracket ``[a, b]`` with ``g(a) <= 0 < g(b)`` for each of many
problems at once (one per array element) and shrinks it by the Illinois variant of false position
(regula falsi whose retained end has its function value halved when it is retained twice in a
row), falling back to bisection wherever the interpolation is unusable (an end at zero, a
non-finite value, a point outside the bracket) or where two steps have not halved the bracket (a
step function). It therefore converges superlinearly on smooth functions and at least as fast as
bisection, every second step, on steps, and ends on the step itself.

It runs in whatever variable the caller gives; the engine works in log10 of the current, where
the edges are near straight lines and a fixed tolerance is a relative one in amperes.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

import numpy as np

#: Default absolute tolerance on the bracket's width, in the caller's variable (the engine's is
#: log10 of the current [A], so 1e-13 is about 2.3e-13 relative in amperes).
XTOL = 1e-13
#: Default limit on evaluations per bracket (bisection alone takes 43 to shrink a bracket of
#: width 1 to 1e-13; the safeguard bisects at least every second step).
MAXITER = 200


def find_crossing(g: Callable[[np.ndarray], np.ndarray], a: Any, b: Any, *, xtol: float = XTOL,
                  maxiter: int = MAXITER) -> tuple[np.ndarray, np.ndarray]:
    """Where ``g`` turns positive in each bracket ``[a, b]``, vectorised: the final brackets.

    Parameters
    ----------
    g : callable
        Vectorised function: float array -> float array of the same shape. ``g(x) > 0`` on the
        side of ``b``, ``g(x) <= 0`` on the side of ``a`` (NaN counts as ``<= 0``).
    a, b : float or array_like
        Bracket ends, ``a < b`` element by element (broadcast together). ``g(a) <= 0 < g(b)`` is
        expected; where it does not hold the search bisects on the sign of ``g`` and still
        returns a point within ``[a, b]``.
    xtol : float
        Absolute tolerance on the width of each final bracket.
    maxiter : int
        Most evaluations of ``g`` per bracket.

    Returns
    -------
    lo, hi : numpy.ndarray
        The final brackets, ``hi - lo <= xtol`` (or adjacent floats), with the shape of ``a`` and
        ``b`` broadcast: ``g(lo) <= 0`` (unless ``a`` itself was evaluated only) and
        ``g(hi) > 0`` (unless ``g(b) > 0`` failed from the start).

    Notes
    -----
    Illinois false position (Dowell and Jarratt, 1971) with a bisection safeguard: where the
    interpolated point is not strictly inside the bracket, where either end value is not finite
    or not of the expected sign, or where the bracket has not halved over the last two steps,
    the next point is the midpoint. For a step function the final bracket straddles the step.

    References
    ----------
    M. Dowell and P. Jarratt, "A modified regula falsi method for computing the root of an
    equation", BIT 11 (1971) 168-174.

    Examples
    --------
    >>> import numpy as np
    >>> lo, hi = find_crossing(lambda x: x * x - 2.0, 0.0, 2.0)
    >>> print(f"{float(hi):.12f}")
    1.414213562373
    """
    lo, hi = np.broadcast_arrays(np.asarray(a, dtype=np.float64), np.asarray(b, dtype=np.float64))
    shape = lo.shape
    if lo.size == 1:  # one bracket (the engine's case): the same steps on Python floats
        x_lo, x_hi = _crossing_one(g, float(lo.ravel()[0]), float(hi.ravel()[0]), xtol, maxiter)
        return np.full(shape, x_lo), np.full(shape, x_hi)
    lo = lo.ravel().copy()
    hi = hi.ravel().copy()
    f_lo = np.asarray(g(lo), dtype=np.float64).ravel().copy()
    f_hi = np.asarray(g(hi), dtype=np.float64).ravel().copy()
    last = np.zeros(lo.shape, dtype=np.int8)  # +1: the upper end moved last, -1: the lower end
    width_before = np.full(lo.shape, np.inf)  # the bracket's width one step ago
    force_bisect = np.zeros(lo.shape, dtype=bool)
    for _ in range(maxiter):
        mid = 0.5 * (lo + hi)
        active = ((hi - lo) > xtol) & (mid > lo) & (mid < hi)
        if not active.any():
            break
        k = np.flatnonzero(active)
        a_k, b_k, fa, fb, m_k = lo[k], hi[k], f_lo[k], f_hi[k], mid[k]
        usable = (fa < 0.0) & (fb > 0.0) & np.isfinite(fa) & np.isfinite(fb) & ~force_bisect[k]
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            x = np.where(usable, b_k - fb * (b_k - a_k) / (fb - fa), m_k)
        x = np.where((x > a_k) & (x < b_k), x, m_k)
        fx = np.asarray(g(x), dtype=np.float64).ravel()
        up = fx > 0.0  # x becomes the upper end
        new_lo = np.where(up, a_k, x)
        new_hi = np.where(up, x, b_k)
        new_flo = np.where(up, fa, fx)
        new_fhi = np.where(up, fx, fb)
        # Illinois: an end kept for the second time in a row has its value halved
        prev = last[k]
        new_flo = np.where(up & (prev == 1), 0.5 * new_flo, new_flo)
        new_fhi = np.where(~up & (prev == -1), 0.5 * new_fhi, new_fhi)
        width_now = b_k - a_k
        width_new = new_hi - new_lo
        force_bisect[k] = width_new > 0.5 * width_before[k]
        width_before[k] = width_now
        last[k] = np.where(up, 1, -1)
        lo[k], hi[k], f_lo[k], f_hi[k] = new_lo, new_hi, new_flo, new_fhi
    return lo.reshape(shape), hi.reshape(shape)


def _crossing_one(g: Callable[[np.ndarray], np.ndarray], lo: float, hi: float, xtol: float,
                  maxiter: int) -> tuple[float, float]:
    """:func:`find_crossing` for one bracket, step for step, without array overhead."""

    def at(x: float) -> float:
        return float(np.asarray(g(np.array([x])), dtype=np.float64).ravel()[0])

    f_lo, f_hi = at(lo), at(hi)
    last = 0
    width_before = math.inf
    force_bisect = False
    for _ in range(maxiter):
        mid = 0.5 * (lo + hi)
        if not ((hi - lo) > xtol and lo < mid < hi):
            break
        x = mid
        if (f_lo < 0.0 < f_hi and math.isfinite(f_lo) and math.isfinite(f_hi)
                and not force_bisect):
            x = hi - f_hi * (hi - lo) / (f_hi - f_lo)  # inf / inf gives NaN: then the midpoint
            if not (lo < x < hi):
                x = mid
        fx = at(x)
        width_now = hi - lo
        if fx > 0.0:  # x becomes the upper end
            hi, f_hi = x, fx
            if last == 1:
                f_lo = 0.5 * f_lo
            last = 1
        else:
            lo, f_lo = x, fx
            if last == -1:
                f_hi = 0.5 * f_hi
            last = -1
        force_bisect = (hi - lo) > 0.5 * width_before
        width_before = width_now
    return lo, hi
