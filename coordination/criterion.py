"""The requirements a protective device is held to, defined once for the engine, the checks and
the chooser.

Selectivity of a downstream device D under an upstream device U at a prospective current I:

    t_max_D(I) * margin (+ interval_s)  <=  t_min_U(I) * (1 + rtol)

* D's side (:func:`downstream_time`): its upper edge times the margin, plus the coordination
  interval where U is an adjustable breaker and D's time is at or above ``ENERGY_REGION_S``.
* U's side (:func:`upstream_time`): its lower edge, with no energy withstood at or above an
  instantaneous release (the edge drops to ``TIME_FLOOR_S`` there).
* The comparison (:func:`not_selective`): equal within ``rtol`` counts as selective. Below
  ``ENERGY_REGION_S`` the edges are equivalent times ``I2t / I^2``, so the same comparison is
  the energy criterion there.

The engine (:func:`coordination.engine.compare`) finds where this first fails; the chooser's
exact check runs the engine, and its vectorised screen applies the same three functions to a
whole grid of candidates at once (with its own, lenient tolerance).

And the fault a device must break (:func:`breaking_duty`): the largest prospective fault at its
board, the board's maximum earth fault included.

References
----------
IEC 60947-2:2016, Annex A (selectivity by comparison of time-current characteristics; the
selectivity limit current Is). IEC 60269-1:2006, 5.7.1 and IEC 60269-2 (selectivity of fuses by
their I2t: the minor's maximum operating I2t not above the major's minimum pre-arcing I2t).
IEC 60364-4-43:2008, 434.5.1 (a device's breaking capacity not less than the maximum prospective
short-circuit current where it is installed). The margin and the interval: common practice.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from curves.band import ENERGY_REGION_S, TIME_FLOOR_S
from curves.families import REGISTRY

#: Band families over which a coordination time interval applies (adjustable breakers).
ADJUSTABLE_FAMILIES = frozenset(f.band_family for f in REGISTRY if f.adjustable)
#: Edges within this relative difference are equal, and at equal values the pair is selective.
EQUAL_RTOL = 1e-9


def downstream_time(t_max_s: Any, margin: float, interval_s: float,
                    adjustable_upstream: bool) -> np.ndarray:
    """The time the device above must not undercut: D's upper edge with margin and interval [s].

    Parameters
    ----------
    t_max_s : array_like
        D's upper edge (latest operating time) at the currents compared [s].
    margin : float
        Factor on D's time (>= 1 leaves a gap between the bands) [-].
    interval_s : float
        Coordination time interval [s], added only where ``adjustable_upstream`` and where the
        time with margin is at or above ``ENERGY_REGION_S`` (below it the edges are energies).
    adjustable_upstream : bool
        The device above is an adjustable breaker (see :data:`ADJUSTABLE_FAMILIES`).

    Returns
    -------
    numpy.ndarray
        ``t_max_s * margin (+ interval_s)`` [s].

    References
    ----------
    IEC 60947-2:2016, Annex A (time-current comparison); margin and interval: common practice.

    Examples
    --------
    >>> print(downstream_time([0.005, 0.2], 1.5, 0.1, True).round(4).tolist())
    [0.0075, 0.4]
    """
    t = np.asarray(t_max_s, dtype=float) * margin
    if interval_s > 0.0 and adjustable_upstream:
        t = np.where(t >= ENERGY_REGION_S, t + interval_s, t)
    return t


def upstream_time(t_min_s: Any, current_a: Any, instantaneous_a: float | None) -> np.ndarray:
    """The time the device above withstands: U's lower edge, none above its instantaneous
    release [s].

    Parameters
    ----------
    t_min_s : array_like
        U's lower edge (earliest operating time) at the currents compared [s].
    current_a : array_like
        The currents [A].
    instantaneous_a : float or None
        U's lowest instantaneous operating current [A] (None: no instantaneous release).

    Returns
    -------
    numpy.ndarray
        ``t_min_s``, at most ``TIME_FLOOR_S`` at and above ``instantaneous_a`` [s].

    References
    ----------
    IEC 60947-2:2016, 8.3.3.1.2 and Annex A (an instantaneous release operates without
    intentional delay: no selectivity above its operating current without a test).

    Examples
    --------
    >>> print(upstream_time([2.0, 0.5], [900.0, 1100.0], 1000.0).tolist())
    [2.0, 0.0001]
    """
    t = np.asarray(t_min_s, dtype=float)
    if instantaneous_a is not None:
        t = np.where(np.asarray(current_a) >= instantaneous_a, np.minimum(t, TIME_FLOOR_S), t)
    return t


def not_selective(t_down_s: Any, t_up_s: Any, rtol: float = EQUAL_RTOL) -> np.ndarray:
    """Where the pair is not selective: D's time (with margin and interval) above U's.

    Parameters
    ----------
    t_down_s : array_like
        :func:`downstream_time` [s].
    t_up_s : array_like
        :func:`upstream_time` [s].
    rtol : float
        Relative tolerance: within it the times are equal, and equal is selective (as the I2t
        criterion of IEC 60269-1 reads). Both never (``inf``) is selective.

    Returns
    -------
    numpy.ndarray of bool

    References
    ----------
    IEC 60947-2:2016, Annex A; IEC 60269-1:2006, 5.7.1 (I2t: "does not exceed").

    Examples
    --------
    >>> print(not_selective([1.0, 2.0, np.inf], [1.0, 1.0, np.inf]).tolist())
    [False, True, False]
    """
    with np.errstate(invalid="ignore"):
        return np.asarray(t_down_s, dtype=float) > np.asarray(t_up_s, dtype=float) * (1.0 + rtol)


def requirement_met(verdict: str, limit_a: float | None, required_a: float) -> bool:
    """Whether a pair's selectivity meets its requirement: total, or a limit that reaches the
    required current (equal within :data:`EQUAL_RTOL` counts).

    Parameters
    ----------
    verdict : str
        ``"total"``, ``"partial"`` or ``"none"``.
    limit_a : float or None
        The selectivity limit Is [A].
    required_a : float
        Selective up to this current [A] (``selective_to_a``, else the fault level).

    References
    ----------
    IEC 60947-2:2016, Annex A (total and partial selectivity; Is).

    Examples
    --------
    >>> print(requirement_met("partial", 5999.99999999, 6000.0), requirement_met("none", None, 1.0))
    True False
    """
    return verdict == "total" or (limit_a is not None and limit_a >= required_a * (1 - EQUAL_RTOL))


def breaking_duty(node: Any, phases: int) -> tuple[float, str]:
    """The largest fault a device must break where it sits, and its kind.

    The three-phase or line-neutral maximum at the device's board (the larger for a
    three-phase circuit, the line-neutral value for a single-phase one), or the board's maximum
    earth fault where that is larger (an earth fault flows in a line conductor too).

    Parameters
    ----------
    node : NodeFaults
        The circuit's fault levels (``ik_max_a``, and where known ``ik3_max_a``, ``ik1_max_a``,
        ``ief_max_board_a``) [A].
    phases : int
        1 or 3.

    Returns
    -------
    current_a : float
        The fault [A] (0 where the levels give none).
    kind : str
        ``"three-phase"``, ``"line-neutral"``, ``"earth"`` or ``"maximum"``.

    References
    ----------
    IEC 60364-4-43:2008, 434.5.1 (breaking capacity not less than the maximum prospective
    short-circuit current at the point of installation).

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> node = SimpleNamespace(ik_max_a=9000.0, ik3_max_a=9000.0, ik1_max_a=6000.0,
    ...                        ief_max_board_a=6500.0)
    >>> print(breaking_duty(node, 3), breaking_duty(node, 1))
    (9000.0, 'three-phase') (6500.0, 'earth')
    """

    def get(name: str, default: float | None = None) -> float | None:
        value = getattr(node, name, None)
        return default if value is None else float(value)

    ik_max = get("ik_max_a")
    ik3 = get("ik3_max_a", ik_max)
    ik1 = get("ik1_max_a", ik_max)
    if phases == 3:
        options = [(x, n) for x, n in ((ik3, "three-phase"), (ik1, "line-neutral"))
                   if x is not None]
        fault, kind = max(options) if options else (ik_max or 0.0, "maximum")
    else:
        fault, kind = (ik1, "line-neutral") if ik1 is not None else (ik_max or 0.0, "maximum")
    ief_max = get("ief_max_board_a")
    if ief_max is not None and math.isfinite(ief_max) and ief_max > fault:
        fault, kind = ief_max, "earth"
    return fault, kind
