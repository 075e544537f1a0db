"""A device given as datasheet points: minimum and maximum curves, optional let-through energy.

Inline table (``family = "datasheet"``)::

    {family = "datasheet", name = "feeder ACB", In_a = 630,
     lower = [[700, 3000], [2000, 20], [6000, 0.05]],
     upper = [[820, 7200], [2500, 40], [7000, 0.08]],
     let_through = [[10000, 2.0e6], [50000, 9.0e6]],
     instantaneous_a = 6000, breaking_capacity_a = 50000}

Rules (our design):

* each curve is a list of ``[current_a, time_s]`` points: positive and finite, currents strictly
  increasing, times never rising; at least two points per curve;
* between points the curve is a straight line in log-log space (common practice for reading
  time-current curves);
* below a curve's first current it is infinite (the device never operates: the first lower
  point is the minimum pickup, the first upper point the maximum pickup), so the lower curve
  must start at or below the upper curve's first current;
* above a curve's last current it holds its last time: give points up to the largest fault
  current of the study (the notes say so);
* the lower curve is never above the upper curve (checked at every point of both curves, which
  suffices for two piecewise log-log-linear curves);
* ``instantaneous_a``: at and above it the lower edge is ``TIME_FLOOR_S`` (the device withstands
  no energy there);
* ``let_through``: ``[current_a, i2t_a2s]`` points, I2t never falling, interpolated in log-log;
  outside its range the band falls back on ``I^2 t_max`` (no limitation claimed).

The band's basis is always ``"datasheet"``.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from curves import laws
from curves.band import TIME_FLOOR_S, Band
from curves.errors import InputError
from curves.validate import curve_points, positive_number


def check_points(key: str, points: Any, *, rising: bool = False) -> tuple[np.ndarray, np.ndarray]:
    """Validate ``[[current_a, value], ...]`` points; return (currents, values) arrays.

    The rules and messages are :func:`curves.validate.curve_points`'s.

    Parameters
    ----------
    key : str
        The key the points came from, for messages (``"lower"``, ``"upper"``, ``"let_through"``).
    points : sequence of pairs
        Positive finite numbers; currents strictly increasing.
    rising : bool
        False: values never rise with current (times). True: values never fall (energies).

    Raises
    ------
    InputError
        Naming the key, the point and what is allowed.

    Examples
    --------
    >>> i, t = check_points("lower", [[100, 10.0], [1000, 0.1]])
    >>> print(float(t[1]))
    0.1
    """
    arr = np.array(curve_points(key, points, rising=rising), dtype=np.float64)
    return arr[:, 0], arr[:, 1]


def datasheet_curve(current_a: np.ndarray, xp: np.ndarray, fp: np.ndarray, *,
                    below: float, above: float | None = None) -> np.ndarray:
    """A datasheet curve at currents [A]: :func:`curves.laws.loglog_interpolate` between its
    points ``xp`` [A] (strictly increasing) and values ``fp`` (positive), ``below`` under its
    first current and ``above`` over its last (None holds the last value).

    Examples
    --------
    >>> xp, fp = np.array([100.0, 10000.0]), np.array([100.0, 0.01])
    >>> print(float(datasheet_curve(np.array([50.0, 20000.0]), xp, fp, below=np.inf)[0]))
    inf
    """
    i = np.asarray(current_a, dtype=np.float64)
    y = laws.loglog_interpolate(i, np.log(xp), np.log(fp))
    y = np.where(i < xp[0], below, y)
    if above is not None:
        y = np.where(i > xp[-1], above, y)
    return y


def datasheet_band(
    *,
    In_a: float,
    lower: Any,
    upper: Any,
    name: str | None = None,
    let_through: Any = None,
    instantaneous_a: float | None = None,
    breaking_capacity_a: float | None = None,
    pre_arcing_i2t_min_a2s: float | None = None,
) -> Band:
    """The band of a device given by datasheet points (basis ``"datasheet"``).

    Parameters
    ----------
    In_a : float
        Rated current [A].
    lower, upper : list of [current_a, time_s]
        Minimum (no-operation) and maximum (clearing) curves; see the module docstring.
    name : str, optional
        What a person reads; default ``"datasheet <In> A"``.
    let_through : list of [current_a, i2t_a2s], optional
        Maximum let-through I2t [A^2 s] versus prospective current [A].
    instantaneous_a : float, optional
        Lowest current of an instantaneous release [A]: the lower edge is ``TIME_FLOOR_S`` there.
    breaking_capacity_a : float, optional
        Rated breaking capacity [A].
    pre_arcing_i2t_min_a2s : float, optional
        A fuse's minimum pre-arcing I2t [A^2 s].

    Returns
    -------
    Band
        Family ``"datasheet"``, basis ``"datasheet"``; ``pickup_min_a`` the first lower current,
        ``pickup_max_a`` the first upper current, ``conventional_time_s`` the first upper time.

    References
    ----------
    Log-log reading of manufacturers' time-current curves (common practice).

    Examples
    --------
    >>> band = datasheet_band(In_a=100, lower=[[120, 3600], [1000, 1]],
    ...                       upper=[[150, 7200], [1500, 2]])
    >>> print(float(band.t_min(2000)))
    1.0
    """
    rating = positive_number("In_a", In_a)
    if name is None:
        label = f"datasheet {rating:g} A"
    elif isinstance(name, str) and name.strip():
        label = " ".join(name.split())
    else:
        raise InputError(f"name must be a non-empty string, not {name!r}", key="name")
    lo_i, lo_t = check_points("lower", lower)
    hi_i, hi_t = check_points("upper", upper)
    if lo_i[0] > hi_i[0]:
        raise InputError(f"the lower curve starts at {lo_i[0]:g} A, above the upper curve's "
                         f"first current {hi_i[0]:g} A; the lower curve (minimum pickup) must "
                         "start at or below the upper one", key="lower")
    inst = None if instantaneous_a is None else positive_number("instantaneous_a", instantaneous_a)
    icu = None if breaking_capacity_a is None else positive_number("breaking_capacity_a",
                                                           breaking_capacity_a)
    pre_arc = (None if pre_arcing_i2t_min_a2s is None
               else positive_number("pre_arcing_i2t_min_a2s", pre_arcing_i2t_min_a2s))
    lt = None if let_through is None else check_points("let_through", let_through, rising=True)

    def lower_edge(i: np.ndarray) -> np.ndarray:
        t = datasheet_curve(i, lo_i, lo_t, below=np.inf)
        if inst is not None:
            t = np.where(i >= inst, np.minimum(t, TIME_FLOOR_S), t)
        return t

    def upper_edge(i: np.ndarray) -> np.ndarray:
        return datasheet_curve(i, hi_i, hi_t, below=np.inf)

    probe = np.union1d(lo_i, hi_i)
    probe = probe[probe >= hi_i[0]]
    over = np.flatnonzero(lower_edge(probe) > upper_edge(probe) * (1 + 1e-9))
    if over.size:
        at = float(probe[over[0]])
        raise InputError(f"the lower curve is above the upper curve at {at:g} A "
                         f"({float(lower_edge(np.array(at))):g} s > "
                         f"{float(upper_edge(np.array(at))):g} s); lower must never exceed upper",
                         key="lower")

    let_fn = None
    if lt is not None:
        lt_i, lt_e = lt

        def let_fn(i: np.ndarray) -> np.ndarray:
            return datasheet_curve(i, lt_i, lt_e, below=np.inf, above=np.inf)

    settings: dict[str, Any] = {"In_a": rating}
    if inst is not None:
        settings["instantaneous_a"] = inst
    if icu is not None:
        settings["breaking_capacity_a"] = icu
    notes = [f"datasheet curves hold their last time above {lo_i[-1]:g} A (lower) and "
             f"{hi_i[-1]:g} A (upper)"]
    key = ("datasheet", label, rating, tuple(map(tuple, np.c_[lo_i, lo_t].tolist())),
           tuple(map(tuple, np.c_[hi_i, hi_t].tolist())),
           None if lt is None else tuple(map(tuple, np.c_[lt[0], lt[1]].tolist())),
           inst, icu, pre_arc)
    return Band(
        name=label,
        family="datasheet",
        basis="datasheet",
        rating_a=rating,
        pickup_min_a=float(lo_i[0]),
        pickup_max_a=float(hi_i[0]),
        conventional_time_s=float(hi_t[0]),
        lower=lower_edge,
        upper=upper_edge,
        let_through=let_fn,
        pre_arcing_i2t_min_a2s=pre_arc,
        instantaneous_a=inst,
        breaking_capacity_a=icu,
        settings=settings,
        key=key,
        notes=tuple(notes),
    )
