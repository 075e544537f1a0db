"""A small vectorised bracketing root-finder: the project's one replacement for a library solver.

The overlap engine needs the current at which two edges meet, to a tight tolerance, on edge
functions that may be smooth (a thermal law, an I2t law), piecewise (a law meeting a definite-time
floor) or stepped (an instantaneous release, a short-time delay). Importing a general optimisation
package for that one call costs more start-up time than the whole study of a large building, so
the search lives here, in plain numpy.

:func:`find_crossing` keeps a bracket ``[lo, hi]`` with ``g(lo) <= 0 < g(hi)`` for each of many
problems at once (one per array element) and shrinks it by a safeguarded secant method:

* the next point is the secant through the two latest points evaluated (where it falls inside the
  bracket), else false position between the bracket's ends, else the midpoint;
* it is moved ``0.4 xtol`` past the estimate, away from the nearer end of the bracket (and kept
  at least ``xtol / 4`` inside it), so that once the secant has found the root the next point
  lands just across it and closes the bracket to ``xtol`` (this is what makes a straight piece
  next to a kink, or a smooth edge, converge in a few steps);
* wherever two steps have not halved the bracket (a step function, a badly curved edge), the next
  point is the midpoint, so the search is never much slower than bisection.

It converges superlinearly on smooth or piecewise-straight functions, ends on the step itself for
a step, and runs in whatever variable the caller gives; the engine works in log10 of the current,
where the edges are near straight lines and a fixed tolerance is a relative one in amperes.
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
#: The next point is moved this many ``xtol`` from the estimate, away from the nearer end.
_NUDGE = 0.4


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
        expected; where it does not hold the search still returns a bracket within ``[a, b]``
        across which ``g`` changes from ``<= 0`` to ``> 0``, or an end of ``[a, b]``.
    xtol : float
        Absolute tolerance on the width of each final bracket (> 0).
    maxiter : int
        Most evaluations of ``g`` per bracket after the two ends.

    Returns
    -------
    lo, hi : numpy.ndarray
        The final brackets, ``hi - lo <= xtol`` (or adjacent floats), with the shape of ``a`` and
        ``b`` broadcast: ``g(lo) <= 0`` and ``g(hi) > 0`` wherever that held for ``a`` and ``b``.

    Notes
    -----
    A safeguarded secant method in the family of Dekker's and Brent's: the secant through the
    two latest points (else false position between the ends, else the midpoint), moved
    ``0.4 xtol`` away from the nearer end and kept ``xtol / 4`` inside the bracket, and bisection
    wherever the bracket has not halved over two steps. One bracket is solved with Python floats
    (no array overhead per step), several with numpy arrays; both take the same steps.

    References
    ----------
    T. J. Dekker, "Finding a zero by means of successive linear interpolation", in Constructive
    Aspects of the Fundamental Theorem of Algebra, Wiley (1969) 37-48; R. P. Brent, Algorithms
    for Minimization without Derivatives, Prentice-Hall (1973), chapter 4.

    Examples
    --------
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
    x0, f0, x1, f1 = lo.copy(), f_lo.copy(), hi.copy(), f_hi.copy()  # the two latest points
    w1 = np.full(lo.shape, np.inf)  # the bracket's width one step ago
    w2 = np.full(lo.shape, np.inf)  # and two steps ago
    for _ in range(maxiter):
        mid = 0.5 * (lo + hi)
        width = hi - lo
        active = (width > xtol) & (mid > lo) & (mid < hi)
        if not active.any():
            break
        k = np.flatnonzero(active)
        lo_k, hi_k, mid_k, w_k = lo[k], hi[k], mid[k], width[k]
        t = _secant(x0[k], f0[k], x1[k], f1[k])
        inside = (t > lo_k) & (t < hi_k)
        t = np.where(inside, t, _secant(lo_k, f_lo[k], hi_k, f_hi[k]))
        inside = (t > lo_k) & (t < hi_k) & ~(w_k > 0.5 * w2[k])
        t = t + np.where(t - lo_k < hi_k - t, _NUDGE, -_NUDGE) * xtol
        t = np.minimum(np.maximum(t, lo_k + 0.25 * xtol), hi_k - 0.25 * xtol)
        x = np.where(inside, t, mid_k)
        fx = np.asarray(g(x), dtype=np.float64).ravel()
        up = fx > 0.0  # x becomes the upper end
        lo[k] = np.where(up, lo_k, x)
        f_lo[k] = np.where(up, f_lo[k], fx)
        hi[k] = np.where(up, x, hi_k)
        f_hi[k] = np.where(up, fx, f_hi[k])
        x0[k], f0[k], x1[k], f1[k] = x1[k], f1[k], x, fx
        w2[k], w1[k] = w1[k], w_k
    return lo.reshape(shape), hi.reshape(shape)


def _secant(xa: Any, fa: Any, xb: Any, fb: Any) -> Any:
    """Where the line through (xa, fa) and (xb, fb) crosses zero (NaN where it does not)."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return xb - fb * (xb - xa) / (fb - fa)


def _crossing_one(g: Callable[[np.ndarray], np.ndarray], lo: float, hi: float, xtol: float,
                  maxiter: int) -> tuple[float, float]:
    """:func:`find_crossing` for one bracket, step for step, on Python floats."""

    def at(x: float) -> float:
        return float(np.asarray(g(np.array([x])), dtype=np.float64).ravel()[0])

    def secant(xa: float, fa: float, xb: float, fb: float) -> float:
        if fb == fa or not (math.isfinite(fa) and math.isfinite(fb)):
            return math.nan
        return xb - fb * (xb - xa) / (fb - fa)

    f_lo, f_hi = at(lo), at(hi)
    x0, f0, x1, f1 = lo, f_lo, hi, f_hi
    w1 = w2 = math.inf
    for _ in range(maxiter):
        mid = 0.5 * (lo + hi)
        width = hi - lo
        if not (width > xtol and lo < mid < hi):
            break
        t = secant(x0, f0, x1, f1)
        if not lo < t < hi:
            t = secant(lo, f_lo, hi, f_hi)
        if lo < t < hi and not width > 0.5 * w2:
            t += _NUDGE * xtol if t - lo < hi - t else -_NUDGE * xtol
            x = min(max(t, lo + 0.25 * xtol), hi - 0.25 * xtol)
        else:
            x = mid
        fx = at(x)
        if fx > 0.0:
            hi, f_hi = x, fx
        else:
            lo, f_lo = x, fx
        x0, f0, x1, f1 = x1, f1, x, fx
        w2, w1 = w1, width
    return lo, hi
