"""Motor overload relays (IEC 60947-4-1 trip classes) as :class:`~curves.band.Band`.

A thermal (or electronic) overload relay trips a contactor; it is meant for overloads only, and
a short-circuit device (an aM fuse-link, a gG fuse-link, a breaker) upstream of the contactor
takes the faults. :func:`relay_band` builds the relay alone (its edges are the relay's operating
times; it clears through a contactor), :func:`combined_band` the relay, its contactor and its
short-circuit device as one protective band (element-wise minimum of the edges, as a breaker's
elements are combined, the relay counting only up to the contactor's breaking capacity).

Current is the motor-circuit current; ``x = I / Ir`` with Ir the relay's current setting.
IEC 60947-4-1 states, for a relay energized on all poles (firm values):

* 1.05 Ir: no trip within 2 h (from cold);
* 1.2 Ir: trip within 2 h;
* 1.5 Ir: trip within 2 / 4 / 8 / 12 min for classes 10A / 10 / 20 / 30;
* 7.2 Ir: trip time Tp with 2 < Tp <= 10 s (10A), 4 < Tp <= 10 s (10), 6 < Tp <= 20 s (20),
  9 < Tp <= 30 s (30) (from cold).

From memory, the 1.2 Ir and 1.5 Ir tests follow the 1.05 Ir test (the relay already warm), while
the 7.2 Ir test starts cold. The band uses the stated times as they are; from a cold start a relay
may take longer than them at 1.2..1.5 Ir (noted on the band: an assumption that is not the safe
side for a cold start, where a motor is rarely overloaded).

``envelope``
    The widest band the points allow, never clearing faster than guaranteed:

    * upper edge ``inf`` below 1.2 Ir; 2 h from 1.2 Ir; the class time from 1.5 Ir; the
      largest Tp from 7.2 Ir and above (each stated time held up to the next point);
    * lower edge ``inf`` at and below 1.05 Ir (the conventional non-tripping current, taken as
      "never", as the other families take theirs); the smallest Tp from there up to 7.2 Ir (the
      trip time does not rise with current, so it is at least the 7.2 Ir value below it); above
      7.2 Ir that time falling as ``1 / I^2`` (adiabatic heating of the thermal element, a
      modelling choice: the standard states nothing above 7.2 Ir), never below the time floor.

``typical``
    A nominal thermal law ``t = tau * ln(x^2 / (x^2 - x0^2))`` (the first-order law of
    :func:`curves.laws.thermal_time`) with ``x0 = 1.125`` (midway between 1.05 and 1.2) and
    ``tau`` such that the nominal curve passes through the log-middle of the Tp window at 7.2 Ir,
    shortened where needed so that the upper edge meets the class time at 1.5 Ir (class 10A
    and 10); widened by +/-5 % in current (:data:`TYPICAL_TOLERANCE`); clipped into the envelope,
    so it always lies inside. A modelling choice throughout: the standard places no curve.

References
----------
IEC 60947-4-1, limits of operation of time-delay overload relays energized on all poles and the
table of trip classes (Tp at 7.2 Ir).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from curves.band import TIME_FLOOR_S, Band
from curves.errors import InputError
from curves.laws import thermal_tau, thermal_time
from curves.validate import known_basis, positive_number


@dataclass(frozen=True)
class TripClass:
    """One trip class of IEC 60947-4-1.

    Attributes
    ----------
    name : str
        ``"10A"``, ``"10"``, ``"20"`` or ``"30"``.
    t_1_5_max_s : float
        Trip within this time at 1.5 Ir [s].
    tp_min_s, tp_max_s : float
        Tp window at 7.2 Ir [s]: ``tp_min_s < Tp <= tp_max_s``.
    """

    name: str
    t_1_5_max_s: float
    tp_min_s: float
    tp_max_s: float


#: The trip classes (IEC 60947-4-1, table of trip classes and limits of operation).
TRIP_CLASSES = {
    "10A": TripClass("10A", 120.0, 2.0, 10.0),
    "10": TripClass("10", 240.0, 4.0, 10.0),
    "20": TripClass("20", 480.0, 6.0, 20.0),
    "30": TripClass("30", 720.0, 9.0, 30.0),
}

#: No trip within :data:`CONVENTIONAL_TIME_S` at this multiple of Ir (IEC 60947-4-1).
NO_TRIP_X = 1.05
#: Trip within :data:`CONVENTIONAL_TIME_S` at this multiple of Ir (IEC 60947-4-1).
TRIP_X = 1.2
#: Multiple of Ir of the class-time test (IEC 60947-4-1).
CLASS_TEST_X = 1.5
#: Multiple of Ir at which Tp is stated (IEC 60947-4-1).
TP_X = 7.2
#: The 2 h of the 1.05 Ir and 1.2 Ir limits [s] (IEC 60947-4-1).
CONVENTIONAL_TIME_S = 7200.0

#: Nominal thermal pickup of the typical curve, multiple of Ir (midway between 1.05 and 1.2;
#: modelling choice).
TYPICAL_X0 = 0.5 * (NO_TRIP_X + TRIP_X)
#: Tolerance in current of the typical band, +/- fraction (modelling choice; below 6.7 % keeps
#: its pickups between 1.05 Ir and 1.2 Ir).
TYPICAL_TOLERANCE = 0.05


def trip_class(value: object) -> TripClass:
    """A trip class from ``"10A"``, ``"10"``, ``10``, ... or InputError (key ``trip_class``).

    Examples
    --------
    >>> print(trip_class(20).tp_max_s)
    20.0
    """
    name = str(value).strip().upper() if isinstance(value, str | int) and not isinstance(
        value, bool) else None
    if name not in TRIP_CLASSES:
        raise InputError(f"trip class {value!r} is not known; allowed (IEC 60947-4-1): "
                         f"{', '.join(TRIP_CLASSES)}", key="trip_class")
    return TRIP_CLASSES[name]


def envelope_upper(x: np.ndarray, cls: TripClass) -> np.ndarray:
    """Worst-case trip time [s] at ``x = I / Ir``: each stated time held up to the next point.

    References
    ----------
    IEC 60947-4-1: 1.2 Ir within 2 h, 1.5 Ir within the class time, Tp at 7.2 Ir.

    Examples
    --------
    >>> print(envelope_upper(np.array([1.1, 1.2, 1.5, 7.2, 20.0]), TRIP_CLASSES["10"]).tolist())
    [inf, 7200.0, 240.0, 10.0, 10.0]
    """
    x = np.asarray(x, dtype=np.float64)
    return np.select([x < TRIP_X, x < CLASS_TEST_X, x < TP_X],
                     [np.inf, CONVENTIONAL_TIME_S, cls.t_1_5_max_s], cls.tp_max_s)


def envelope_lower(x: np.ndarray, cls: TripClass) -> np.ndarray:
    """Least trip time [s] at ``x = I / Ir``: ``inf`` at and below 1.05 Ir, the smallest Tp up
    to 7.2 Ir, then ``Tp_min (7.2 / x)^2`` (adiabatic, modelling choice), floored.

    References
    ----------
    IEC 60947-4-1: 1.05 Ir no trip within 2 h, Tp window at 7.2 Ir.

    Examples
    --------
    >>> print(envelope_lower(np.array([1.05, 2.0, 7.2, 14.4]), TRIP_CLASSES["20"]))
    [inf 6.  6.  1.5]
    """
    x = np.asarray(x, dtype=np.float64)
    with np.errstate(divide="ignore"):
        adiabatic = cls.tp_min_s * (TP_X / x) ** 2
    t = np.where(x <= TP_X, cls.tp_min_s, np.maximum(adiabatic, TIME_FLOOR_S))
    return np.where(x <= NO_TRIP_X, np.inf, t)


def typical_tau_s(cls: TripClass) -> float:
    """Time constant [s] of the typical thermal law of a class.

    Through the log-middle of the Tp window at 7.2 Ir with pickup :data:`TYPICAL_X0`, shortened
    where needed so that the upper edge (pickup ``x0 (1 + tolerance)``) trips by the class time at
    1.5 Ir. A modelling choice.

    Examples
    --------
    >>> print(round(typical_tau_s(TRIP_CLASSES["20"]), 1))
    443.2
    """
    tau_mid = thermal_tau(TYPICAL_X0, TP_X, math.sqrt(cls.tp_min_s * cls.tp_max_s))
    tau_cap = thermal_tau(TYPICAL_X0 * (1 + TYPICAL_TOLERANCE), CLASS_TEST_X, cls.t_1_5_max_s)
    return min(tau_mid, tau_cap)


def relay_band(trip_class_name: str | int, Ir_a: float, *, basis: str = "typical") -> Band:
    """An IEC 60947-4-1 motor overload relay as a band.

    Parameters
    ----------
    trip_class_name : str or int
        ``"10A"``, ``"10"``, ``"20"`` or ``"30"``.
    Ir_a : float
        Current setting Ir [A] (the motor's full-load current, as set on the relay).
    basis : str
        ``"typical"`` or ``"envelope"``.

    Returns
    -------
    Band
        Family ``"overload-relay"``; ``rating_a`` = Ir; no let-through (the relay limits no
        current) and no breaking capacity (its contactor breaks; see :func:`combined_band`).

    Raises
    ------
    InputError
        Unknown class (key ``trip_class``), Ir not a finite positive number (``Ir_a``), unknown
        basis (``basis``).

    References
    ----------
    IEC 60947-4-1, limits of operation of overload relays and table of trip classes.

    Examples
    --------
    >>> band = relay_band("10", 12.0, basis="envelope")
    >>> print(float(band.t_max(1.5 * 12)), float(band.t_min(7.2 * 12)))
    240.0 4.0
    """
    cls = trip_class(trip_class_name)
    ir = positive_number("Ir_a", Ir_a)
    basis = known_basis(basis, ("typical", "envelope"))
    inv = 1.0 / ir
    notes = [
        "overload only: a short-circuit device must take the faults (IEC 60947-4-1)",
        "the 1.2 Ir and 1.5 Ir limits are for a warm relay (from memory); from cold it may take "
        "longer there (assumption)",
    ]
    if basis == "envelope":

        def lower(i: np.ndarray) -> np.ndarray:
            return envelope_lower(i * inv, cls)

        def upper(i: np.ndarray) -> np.ndarray:
            return envelope_upper(i * inv, cls)

        pickup_min, pickup_max = NO_TRIP_X * ir, TRIP_X * ir
        notes.append(f"envelope: class {cls.name} points held as a staircase; above 7.2 Ir the "
                     "least time falls as 1/I^2 (modelling choice)")
    else:
        tau = typical_tau_s(cls)
        x_lo = TYPICAL_X0 * (1 - TYPICAL_TOLERANCE)
        x_hi = TYPICAL_X0 * (1 + TYPICAL_TOLERANCE)

        def lower(i: np.ndarray) -> np.ndarray:
            x = i * inv
            return np.clip(thermal_time(x, x_lo, tau), envelope_lower(x, cls),
                           envelope_upper(x, cls))

        def upper(i: np.ndarray) -> np.ndarray:
            x = i * inv
            return np.clip(thermal_time(x, x_hi, tau), envelope_lower(x, cls),
                           envelope_upper(x, cls))

        pickup_min = x_lo * ir
        pickup_max = x_hi / math.sqrt(-math.expm1(-CONVENTIONAL_TIME_S / tau)) * ir
        notes.append(f"typical: thermal law, pickup {TYPICAL_X0:g} Ir +/-"
                     f"{TYPICAL_TOLERANCE:.0%}, tau {tau:.4g} s, clipped into the envelope "
                     "(modelling choice)")
    settings = {"trip_class": cls.name, "Ir_a": int(ir) if ir.is_integer() else ir}
    return Band(
        name=f"overload relay class {cls.name}, Ir {ir:g} A",
        family="overload-relay",
        basis=basis,
        rating_a=ir,
        pickup_min_a=pickup_min,
        pickup_max_a=pickup_max,
        conventional_time_s=CONVENTIONAL_TIME_S,
        lower=lower,
        upper=upper,
        settings=settings,
        key=("overload-relay", cls.name, ir, basis),
        notes=tuple(notes),
    )


#: Breaking capacity of a contactor in utilization category AC-3, multiple of its rated
#: operational current Ie (IEC 60947-4-1, making and breaking capacities, from memory).
AC3_BREAKING_X = 8.0


def combined_band(relay: Band, short_circuit: Band, *,
                  contactor_breaking_a: float | None = None) -> Band:
    """An overload relay, its contactor and its short-circuit device as one protective band.

    Lower edge: the element-wise minimum of the two devices' lower edges (either may act first).
    Upper edge: the element-wise minimum of the upper edges up to the contactor's breaking
    capacity (the relay clears through its contactor); above it the short-circuit device's alone
    (the contactor cannot break there). Up to that current the edge is held no lower than the
    short-circuit device's time just above it, so that it never rises with current (a small
    overstatement of the clearing time near the contactor's limit, on the safe side).

    Parameters
    ----------
    relay : Band
        From :func:`relay_band`.
    short_circuit : Band
        The short-circuit device (an aM fuse-link, a gG fuse-link, an MCB or a breaker), on the
        same basis as the relay.
    contactor_breaking_a : float, optional
        Largest current the contactor breaks [A]. Default: 8 Ir, the AC-3 breaking capacity of a
        contactor whose Ie equals the relay's setting (IEC 60947-4-1, from memory; a larger
        contactor breaks more, so this is the safe side), noted on the band.

    Returns
    -------
    Band
        Family ``"motor-circuit"``; the short-circuit device's let-through, instantaneous
        current and breaking capacity; no minimum pre-arcing I2t (the relay may act first).

    Raises
    ------
    InputError
        ``relay`` is not an overload relay (key ``relay``), ``short_circuit`` is one (key
        ``short_circuit``), the bases differ (key ``basis``), or a bad
        ``contactor_breaking_a``.

    References
    ----------
    IEC 60947-4-1 (relay limits; contactor breaking capacity in AC-3, from memory; coordination
    types 1 and 2 of the contactor with the short-circuit device, which are not checked).

    Examples
    --------
    >>> from curves.mcb import mcb_band
    >>> both = combined_band(relay_band("10", 12.0), mcb_band("D", 16))
    >>> print(float(both.t_max(1000.0)), float(both.t_max(24.0)) < 7200)
    0.1 True
    """
    if not isinstance(relay, Band) or relay.family != "overload-relay":
        raise InputError("relay must be an overload-relay band (curves.relay.relay_band)",
                         key="relay")
    if not isinstance(short_circuit, Band) or short_circuit.family == "overload-relay":
        raise InputError("short_circuit must be the band of a short-circuit device (aM or gG "
                         "fuse-link, MCB or breaker), not an overload relay", key="short_circuit")
    if relay.basis != short_circuit.basis:
        raise InputError(f"the relay is on basis {relay.basis!r} and the short-circuit device on "
                         f"{short_circuit.basis!r}; give both on the same basis", key="basis")
    notes = [*relay.notes, *short_circuit.notes]
    if contactor_breaking_a is None:
        i_break = AC3_BREAKING_X * relay.rating_a
        notes.append(f"contactor breaking capacity not given: {AC3_BREAKING_X:g} Ir = "
                     f"{i_break:g} A assumed (AC-3, Ie = Ir; IEC 60947-4-1, from memory)")
    else:
        i_break = positive_number("contactor_breaking_a", contactor_breaking_a)
    # the short-circuit device's time just above the contactor's limit (non-increasing edge)
    t_sc_above = float(short_circuit.upper(np.array(i_break * (1 + 1e-12))))
    if math.isinf(t_sc_above):
        notes.append(f"GAP: just above the contactor's breaking capacity ({i_break:g} A) the "
                     f"{short_circuit.name} may never operate, so no current is shown cleared up "
                     "to its operating range; choose a smaller short-circuit device or a larger "
                     "contactor")

    def lower(i: np.ndarray) -> np.ndarray:
        return np.minimum(relay.lower(i), short_circuit.lower(i))

    def upper(i: np.ndarray) -> np.ndarray:
        t_sc = short_circuit.upper(i)
        both = np.maximum(np.minimum(relay.upper(i), t_sc), t_sc_above)  # <= t_sc up to i_break
        return np.where(i <= i_break, both, t_sc)

    notes.append(f"combined: the earlier of relay and short-circuit device, the relay only up to "
                 f"the contactor's breaking capacity {i_break:g} A; the IEC 60947-4-1 "
                 "coordination type is not checked")
    return Band(
        name=f"{relay.name} with {short_circuit.name}",
        family="motor-circuit",
        basis=relay.basis,
        rating_a=relay.rating_a,
        pickup_min_a=min(relay.pickup_min_a, short_circuit.pickup_min_a),
        pickup_max_a=min(relay.pickup_max_a, short_circuit.pickup_max_a),
        conventional_time_s=relay.conventional_time_s,
        lower=lower,
        upper=upper,
        let_through=short_circuit.let_through,
        instantaneous_a=short_circuit.instantaneous_a,
        breaking_capacity_a=short_circuit.breaking_capacity_a,
        settings={"relay": dict(relay.settings), "short_circuit": dict(short_circuit.settings),
                  "short_circuit_family": short_circuit.family,
                  "contactor_breaking_a": i_break},
        key=("motor-circuit", relay.key, short_circuit.key, i_break),
        notes=tuple(notes),
    )
