"""The physical laws the device families share, each defined once.

Every family (:mod:`curves.mcb`, :mod:`curves.fuse`, :mod:`curves.breaker`,
:mod:`curves.tabulated`) draws its edges from these pure, vectorised functions:

* the thermal law of a first-order heated element started cold,
  ``t = tau * ln(x^2 / (x^2 - x0^2))``, with its time constant through one point
  (:func:`thermal_tau`) and the widest law through two points (:func:`fit_thermal_law`);
* the ``I^2 t = constant`` law through a reference point (:func:`i2t_time`) and the equivalent
  time of an energy, ``t = I2t / I^2`` (:func:`equivalent_time`);
* straight lines between points on log-log axes (:func:`loglog_interpolate`), the way
  time-current curves and let-through tables are drawn and read.

Each function keeps the exact order of operations the families used before it was shared, so
the bands are the same to the last bit.
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Any

import numpy as np


def thermal_time(x: Any, x0: float, tau_s: float) -> np.ndarray:
    """Trip time of a thermal element started cold, ``tau * ln(x^2 / (x^2 - x0^2))`` [s].

    Parameters
    ----------
    x : array_like
        Current as a multiple of the reference current (In or Ir) [-].
    x0 : float
        Asymptote (pickup) as a multiple of the same current [-]: at or below it the element
        never trips.
    tau_s : float
        Thermal time constant [s].

    Returns
    -------
    ndarray
        Time [s]; ``inf`` where ``x <= x0``.

    References
    ----------
    First-order (adiabatic-with-losses) heating of a bimetal from cold (common practice); the
    standards set only the points it must respect (IEC 60898-1, 8.6.1; IEC 60947-2, Table 6).

    Examples
    --------
    >>> print(round(float(thermal_time(2.55, 1.13, 4.574)), 3))
    1.0
    >>> print(float(thermal_time(1.0, 1.13, 4.574)))
    inf
    """
    x = np.asarray(x, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = (x0 * x0) / (x * x)
        t = -tau_s * np.log1p(-ratio)
    return np.where(x > x0, t, np.inf)


def thermal_tau(x0: float, x: float, t_s: float) -> float:
    """Time constant [s] of the thermal law with asymptote ``x0`` through ``(x, t_s)``.

    Parameters
    ----------
    x0 : float
        Asymptote as a multiple of the reference current [-].
    x : float
        Current of the point, same multiple, above ``x0`` [-].
    t_s : float
        Time at that current [s].

    Returns
    -------
    float
        ``tau`` [s] such that :func:`thermal_time` gives ``t_s`` at ``x``.

    References
    ----------
    The thermal law above, solved for ``tau`` (from memory).

    Examples
    --------
    >>> print(round(thermal_tau(1.13, 2.55, 1.0), 3))
    4.574
    >>> print(round(thermal_tau(1.175, 6.0, 10.0), 1))
    255.7
    """
    return t_s / -math.log1p(-((x0 / x) ** 2))


@lru_cache(maxsize=32)
def fit_thermal_law(x1: float, t1_s: float, x2: float, t2_s: float) -> tuple[float, float]:
    """The thermal law through two points ``(x1, t1)`` and ``(x2, t2)``, ``x1 < x2``, ``t1 > t2``.

    Parameters
    ----------
    x1, x2 : float
        Currents of the two points as multiples of the reference current [-].
    t1_s, t2_s : float
        Times at those currents [s].

    Returns
    -------
    (x0, tau_s) : tuple of float
        Asymptote [multiple of the reference current] and time constant [s].

    Raises
    ------
    ValueError
        No thermal law passes through the points (``t1 / t2`` not above ``(x2 / x1)^2``).

    Notes
    -----
    Of all thermal laws with ``t(x1) <= t1`` and ``t(x2) <= t2`` this is the one with the
    longest times everywhere between and beyond (the widest), which is why an envelope uses it.
    With the IEC 60898-1 points (ratio 30..60) ``x0`` lands a hair below ``x1``: the upper edge
    is nearly vertical at 1.45 In. The fit aims 1 ppm inside the first point.

    References
    ----------
    IEC 60898-1 test points 1.45 In (conventional time) and 2.55 In (60 s or 120 s).

    Examples
    --------
    >>> x0, tau = fit_thermal_law(1.45, 3600.0, 2.55, 60.0)
    >>> print(round(float(thermal_time(1.45, x0, tau))))
    3600
    """
    # Aim 1 ppm inside the first point so that rounding never puts t(x1) above t1.
    ratio = t1_s / t2_s * (1.0 - 1e-6)
    if not (x2 > x1 > 0 and ratio > (x2 / x1) ** 2):
        raise ValueError("no thermal law through these points")

    def excess(x0: float) -> float:
        return math.log1p(-((x0 / x1) ** 2)) / math.log1p(-((x0 / x2) ** 2)) - ratio

    lo, hi = 1e-9 * x1, x1 * (1 - 1e-15)
    for _ in range(200):  # bisection: excess rises with x0 from below 0 to +inf
        mid = 0.5 * (lo + hi)
        if excess(mid) > 0:
            hi = mid
        else:
            lo = mid
        if hi - lo <= 1e-16 * x1:
            break
    # lo keeps t(x1) / t(x2) at or below the aim; tau from the second point keeps t(x2) = t2.
    return lo, thermal_tau(lo, x2, t2_s)


def i2t_time(x: Any, t_ref_s: Any, x_ref: float) -> np.ndarray:
    """Time of an ``I^2 t = constant`` law through ``t_ref_s`` at ``x_ref`` [s].

    Parameters
    ----------
    x : array_like
        Current as a multiple of the reference current [-], positive.
    t_ref_s : float or array_like
        Time at ``x_ref`` [s].
    x_ref : float
        Reference multiple (6 for an electronic long-time delay, 10 for a short-time ramp).

    Returns
    -------
    ndarray
        ``t_ref_s * (x_ref / x)^2`` [s].

    References
    ----------
    Electronic long-time delay stated at 6 Ir with I2t = constant (common practice).

    Examples
    --------
    >>> print(float(i2t_time(3.0, 8.0, 6.0)))
    32.0
    """
    x = np.asarray(x, dtype=np.float64)
    with np.errstate(divide="ignore"):
        return t_ref_s * (x_ref / x) ** 2


def equivalent_time(i2t_a2s: Any, current_a: Any) -> np.ndarray:
    """Equivalent time of an energy, ``t = I2t / I^2`` [s].

    Below about 10 ms the families give their edges as this time of a let-through or pre-arcing
    energy, so that one comparison of times covers overload and fault alike.

    Parameters
    ----------
    i2t_a2s : array_like
        Joule integral [A^2 s].
    current_a : array_like
        Prospective current [A], positive.

    Returns
    -------
    ndarray
        Time [s].

    References
    ----------
    IEC 60269-1, definition of the Joule integral I2t (from memory).

    Examples
    --------
    >>> print(float(equivalent_time(70_000.0, 10_000.0)))
    0.0007
    """
    current_a = np.asarray(current_a, dtype=np.float64)
    return np.asarray(i2t_a2s, dtype=np.float64) / (current_a * current_a)


def loglog_interpolate(x: Any, ln_xp: np.ndarray, ln_fp: np.ndarray, *,
                       descending: bool = False) -> np.ndarray:
    """Values on straight lines between points on log-log axes.

    Parameters
    ----------
    x : array_like
        Where to evaluate (a current [A] or a time [s]), positive.
    ln_xp : ndarray
        Natural logs of the points' abscissae, strictly increasing (strictly decreasing with
        ``descending``).
    ln_fp : ndarray
        Natural logs of the points' values.
    descending : bool
        The abscissae fall from one point to the next (the current at a time, read off an edge
        whose time falls as current rises).

    Returns
    -------
    ndarray
        ``exp`` of the linear interpolation of ``ln_fp`` at ``ln(x)``; outside the points the
        first or last value is held (``numpy.interp``). ``x <= 0`` gives what ``ln`` gives.

    References
    ----------
    Straight lines between points on log-log axes: the way time-current curves are drawn and
    read (common practice).

    Examples
    --------
    >>> ln_i, ln_t = np.log([100.0, 10000.0]), np.log([100.0, 0.01])
    >>> print(round(float(loglog_interpolate(1000.0, ln_i, ln_t)), 6))
    1.0
    >>> print(round(float(loglog_interpolate(1.0, ln_t, ln_i, descending=True)), 6))
    1000.0
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        ln_x = np.log(x)
    if descending:
        return np.exp(np.interp(-ln_x, -ln_xp, ln_fp))
    return np.exp(np.interp(ln_x, ln_xp, ln_fp))
