"""IEC 60898-1 miniature circuit-breakers (types B, C and D) as :class:`~curves.band.Band`.

Two bases (the study chooses; the safety checks always take the envelope):

``envelope``
    The widest band a breaker complying with IEC 60898-1 may have: it never promises a trip
    sooner than the standard guarantees, nor a no-trip longer than it guarantees.

    * Lower edge (no-trip): ``inf`` at and below 1.13 In; above it the thermal law
      ``t = tau * ln(x^2 / (x^2 - x0^2))`` (``x = I / In``) with ``x0 = 1.13`` through
      ``t(2.55 In) = 1 s``; never below 0.1 s up to and including the lower instantaneous
      multiple (B 3, C 5, D 10 In: IEC 60898-1 test d is at the point itself); above it the time
      floor (the magnetic release may act there and a breaker withstands no energy).
      Guaranteed: the no-trip points; assumed: the thermal shape between 1.13 In and 2.55 In and
      between 2.55 In and the lower instantaneous multiple (a first-order thermal release).
    * Upper edge (clearing): ``inf`` below 1.45 In (the standard guarantees nothing there); from
      1.45 In the thermal law through ``t(1.45 In)`` = conventional time (1 h, 2 h above 63 A)
      and ``t(2.55 In)`` = 60 s (In <= 32 A) or 120 s (In > 32 A), ``tau`` and ``x0`` fitted
      (the widest thermal law through both points; its ``x0`` lands a hair below 1.45, so the
      edge is nearly vertical there: about 11 min at 1.46 In for In <= 32 A); from 2.55 In up to
      the upper instantaneous multiple (B 5, C 10, D 20 In) it stays at the 2.55 In time: that is
      all the standard guarantees there (a larger current trips no later than a smaller one);
      at and above the upper multiple ``min(0.1 s, I2t(I) / I^2)`` where a let-through is known
      (the energy-limiting class, or the maker's points the study gives), else 0.1 s. So the
      current that disconnects within 0.4 s or 5 s is the upper instantaneous multiple times In,
      as BS 7671 Table 41.3 takes it for both times.

``typical``
    A nominal characteristic in the middle of the limits: the same thermal law with its pickup
    ``x0 = 1.29`` (midway between 1.13 and 1.45) and ``t(2.55 In)`` at the log-middle of the
    window (``sqrt(1 * 60)`` s or ``sqrt(1 * 120)`` s), widened by a manufacturing tolerance of
    +/-10 % in current (:data:`TYPICAL_TOLERANCE`). The instantaneous region is as the envelope
    (0.1 s up to and including the lower multiple, the time floor above it; the let-through from
    the upper multiple), except below the first let-through point (see below).

Let-through (energy-limiting classes, EN 60898-1 Annex ZA, or the maker's points): log-log linear
between the table points (3, 4.5, 6, 10 kA for a class). Below the first point the envelope holds
the first point's value (the let-through rises with prospective current, so that bounds it); the
typical band lets it fall as ``I^1.5`` below it (:data:`TYPICAL_LET_THROUGH_EXPONENT`), so that its
clearing time grows slowly towards the instantaneous threshold, to about 10 ms there (a modelling
choice: the standard gives no value below 3 kA).
Above the last point the equivalent time ``I2t / I^2`` is held at its last value (the let-through
then grows as I^2, steeper than any segment of the table: conservative, and it keeps a larger
rating's let-through above a smaller one's at every current, which extending each table's last
slope does not). Annex ZA gives classes for types B and C up to 32 A only; for type D and for
In > 32 A a class is refused, and the maker's let-through may be given instead
(``let_through_a2s``, used on both bases); without it no energy limit is applied (0.1 s from the
upper multiple) and a note on the band says so.
"""

from __future__ import annotations

import csv
import math
from collections.abc import Callable
from functools import lru_cache
from pathlib import Path

import numpy as np

from curves.band import TIME_FLOOR_S, Band, as_current
from curves.errors import InputError
from curves.laws import (
    equivalent_time,
    fit_thermal_law,
    loglog_interpolate,
    thermal_tau,
    thermal_time,
)
from curves.validate import curve_points, in_series, known_basis

DATA_DIR = Path(__file__).resolve().parent / "data"

#: Rated currents In [A] (IEC 60898-1 preferred values up to 63 A, 80..125 A common practice).
MCB_RATINGS_A = (6, 10, 13, 16, 20, 25, 32, 40, 50, 63, 80, 100, 125)

#: Instantaneous tripping range per type, multiples of In: (no trip within 0.1 s at the lower,
#: trip within 0.1 s at the upper). IEC 60898-1, table of time-current operating
#: characteristics, tests d and e (confirmed).
MCB_INSTANTANEOUS = {"B": (3, 5), "C": (5, 10), "D": (10, 20)}

#: Energy-limiting classes of EN 60898-1 Annex ZA (class 1: no limit).
ENERGY_CLASSES = (1, 2, 3)

#: The bases a standard-built MCB band can have.
MCB_BASES = ("typical", "envelope")

#: Manufacturing tolerance in current of the typical band, +/- fraction (our modelling choice,
#: in line with the +/-10 % commonly quoted for curves, from memory; with the nominal pickup at
#: 1.29 In any tolerance below 12.4 % keeps the band's edges inside the 1.13 In and 1.45 In test
#: points).
TYPICAL_TOLERANCE = 0.10

#: Exponent of the typical let-through below the first table point, I2t ~ I^1.5 (our modelling
#: choice: the clearing time I2t / I^2 then grows as 1 / sqrt(I), about 10 ms near the
#: instantaneous threshold for the Annex ZA tables; the envelope holds the first value instead).
TYPICAL_LET_THROUGH_EXPONENT = 1.5

#: Standard values of rated short-circuit capacity Icn [A]: IEC 60898-1, 5.3.4 (1500, 3000, 4500,
#: 6000, 10 000 A; above 10 000 A, 15 000, 20 000 and 25 000 A). Values from memory (the
#: clause number too).
MCB_ICN_A: tuple[float, ...] = (1500.0, 3000.0, 4500.0, 6000.0, 10000.0, 15000.0, 20000.0,
                                25000.0)

#: Default rated short-circuit capacity Icn [A] (6 kA, a value of the IEC 60898-1 series).
DEFAULT_ICN_A = 6000.0


def read_data_table(name: str) -> list[dict[str, str]]:
    """Rows of a data table in ``curves/data`` (lines starting with ``#`` are its header note).

    Examples
    --------
    >>> print(len(read_data_table("mcb_energy_classes_en60898.csv")))
    32
    """
    with (DATA_DIR / name).open(encoding="utf-8") as handle:
        lines = [line for line in handle if line.strip() and not line.lstrip().startswith("#")]
    return list(csv.DictReader(lines))


@lru_cache(maxsize=1)
def _tripping_rows() -> tuple[tuple[str, float, float, float], ...]:
    return tuple(
        (r["quantity"], float(r["in_min_a"]), float(r["in_max_a"]), float(r["value"]))
        for r in read_data_table("mcb_tripping_iec60898.csv")
    )


@lru_cache(maxsize=1)
def _class_rows() -> dict[tuple[str, int, float, float], tuple[tuple[float, float], ...]]:
    table: dict[tuple[str, int, float, float], list[tuple[float, float]]] = {}
    for r in read_data_table("mcb_energy_classes_en60898.csv"):
        key = (r["type"], int(r["energy_class"]), float(r["in_min_a"]), float(r["in_max_a"]))
        table.setdefault(key, []).append((float(r["prospective_a"]), float(r["i2t_max_a2s"])))
    return {k: tuple(sorted(v)) for k, v in table.items()}


def tripping_limit(quantity: str, rating_a: float) -> float:
    """One value of the IEC 60898-1 time-current table for a rating.

    Parameters
    ----------
    quantity : str
        A ``quantity`` of ``curves/data/mcb_tripping_iec60898.csv``, e.g.
        ``"conventional_time_s"``, ``"test_current_max_time_s"``.
    rating_a : float
        Rated current In [A].

    Returns
    -------
    float
        The value (a multiple of In or a time [s]).

    References
    ----------
    IEC 60898-1, 8.6.1 and its table of time-current operating characteristics.

    Examples
    --------
    >>> print(tripping_limit("conventional_time_s", 80))
    7200.0
    """
    for name, lo, hi, value in _tripping_rows():
        if name == quantity and lo <= rating_a <= hi:
            return value
    raise KeyError(f"no {quantity!r} for In = {rating_a:g} A in mcb_tripping_iec60898.csv")


def class_let_through_table(
    curve_type: str, rating_a: float, energy_class: int
) -> tuple[tuple[float, float], ...] | None:
    """The energy-limiting class table of one breaker: ((prospective [A], I2t [A^2 s]), ...).

    ``None`` where EN 60898-1 Annex ZA gives no limit (class 1, type D, In > 32 A).

    References
    ----------
    EN 60898-1, Annex ZA (energy-limiting classes); the 10 kA column is confirmed, the others
    are from memory.

    Examples
    --------
    >>> print(class_let_through_table("B", 16, 3)[-1])
    (10000.0, 70000.0)
    """
    for (typ, cls, lo, hi), points in _class_rows().items():
        if typ == curve_type and cls == energy_class and lo <= rating_a <= hi:
            return points
    return None


def loglog_let_through(
    points: tuple[tuple[float, float], ...], *, below: str = "hold"
) -> Callable[[np.ndarray], np.ndarray]:
    """Let-through I2t [A^2 s] versus prospective current [A] from a table of points.

    Log-log linear between the table points; above the last point the equivalent time
    ``I2t / I^2`` is held (log-log slope 2, steeper than the table's segments, so conservative,
    and the order of ratings and classes is kept at every current). Below the first point:

    * ``below="hold"`` (worst case): the first point's value (the let-through rises with
      prospective current, so that bounds it);
    * ``below="typical"``: the let-through falls as ``I^1.5`` below the first point, so the
      clearing time ``I2t / I^2`` grows as ``1 / sqrt(I)`` towards the instantaneous threshold
      (about 10 ms there for the class tables; a modelling choice, no standard value exists).
      One exponent for every table keeps a larger rating or class above a smaller one.

    References
    ----------
    EN 60898-1, Annex ZA (energy-limiting classes).

    Examples
    --------
    >>> lt = loglog_let_through(((3000.0, 15000.0), (4500.0, 25000.0), (6000.0, 35000.0)))
    >>> print(round(float(lt(np.sqrt(3000.0 * 4500.0)))))
    19365
    >>> typical = loglog_let_through(((3000.0, 15000.0), (6000.0, 35000.0)), below="typical")
    >>> print(round(float(typical(750.0))))
    1875
    """
    if below not in ("hold", "typical"):
        raise ValueError(f"below must be 'hold' or 'typical', not {below!r}")
    lx = np.log(np.array([p[0] for p in points], dtype=np.float64))
    ly = np.log(np.array([p[1] for p in points], dtype=np.float64))
    i_first = float(np.exp(lx[0]))
    i2t_first = float(np.exp(ly[0]))
    last_x, last_y = float(lx[-1]), float(ly[-1])
    hold = below == "hold"

    def let_through(current_a: np.ndarray) -> np.ndarray:
        i = as_current(current_a)
        clamped = np.maximum(i, i_first)
        li = np.log(clamped)
        # above the last point the equivalent time is held: log-log slope 2
        i2t = np.where(li > last_x, np.exp(last_y + 2.0 * (li - last_x)),
                       loglog_interpolate(clamped, lx, ly))
        if hold:
            return i2t
        return np.where(i < i_first, i2t_first * (i / i_first) ** TYPICAL_LET_THROUGH_EXPONENT,
                        i2t)

    return let_through


def let_through_points(value: object) -> tuple[tuple[float, float], ...]:
    """A maker's let-through as ``((prospective [A], I2t [A^2 s]), ...)``, or InputError.

    The points must be pairs of finite positive numbers, at least two, with the prospective
    current rising from one point to the next and the let-through never falling (a let-through
    never falls as the prospective current rises): :func:`curves.validate.curve_points`.

    Examples
    --------
    >>> print(let_through_points([[3000, 20000], [10000, 120000]])[1])
    (10000.0, 120000.0)
    """
    return curve_points("let_through_a2s", value, rising=True)


def class_applies(curve_type: str, rating_a: float, energy_class: int) -> bool:
    """Whether EN 60898-1 Annex ZA has a let-through table for this type, rating and class
    (class 1, "no limit", applies to every breaker).

    Examples
    --------
    >>> print(class_applies("C", 16, 3), class_applies("D", 16, 3), class_applies("B", 40, 1))
    True False True
    """
    return energy_class == 1 or class_let_through_table(curve_type, rating_a,
                                                          energy_class) is not None


# -- validation ---------------------------------------------------------------------------------
def check_icn(icn_a: object) -> float:
    """A rated short-circuit capacity Icn [A] from the IEC 60898-1 standard values.

    Parameters
    ----------
    icn_a : float
        Rated short-circuit capacity Icn [A].

    Returns
    -------
    float
        The value of :data:`MCB_ICN_A` it equals [A].

    Raises
    ------
    InputError
        Not a finite number, or not a standard value (key ``icn_a``); the message lists the
        allowed values.

    References
    ----------
    IEC 60898-1, 5.3.4, standard values of rated short-circuit capacity (from memory).

    Examples
    --------
    >>> print(check_icn(10000))
    10000.0
    """
    return in_series(icn_a, MCB_ICN_A, key="icn_a",
                     what="rated short-circuit capacity Icn", standard="IEC 60898-1")


# -- the band ------------------------------------------------------------------------------------
def mcb_band(
    curve_type: str,
    rating_a: float,
    *,
    basis: str = "typical",
    energy_class: int | None = None,
    icn_a: float = DEFAULT_ICN_A,
    let_through_a2s: object = None,
) -> Band:
    """An IEC 60898-1 miniature circuit-breaker as a band.

    Parameters
    ----------
    curve_type : str
        Instantaneous tripping type: ``"B"``, ``"C"`` or ``"D"``.
    rating_a : float
        Rated current In [A], one of :data:`MCB_RATINGS_A`.
    basis : str
        ``"typical"`` (nominal characteristic with +/-10 % in current) or ``"envelope"``
        (widest band the standard allows).
    energy_class : int, optional
        Energy-limiting class 1, 2 or 3 (EN 60898-1 Annex ZA). Default: 3 where Annex ZA has a
        table for the type and rating (B and C up to 32 A), else none. Class 2 or 3 on a breaker
        the annex does not cover is refused (give ``let_through_a2s`` instead).
    icn_a : float
        Rated short-circuit capacity Icn [A], one of :data:`MCB_ICN_A`.
    let_through_a2s : sequence of (float, float), optional
        The maker's let-through: points (prospective current [A], I2t [A^2 s]), at least two,
        both rising. Used on both bases in place of a class; not with ``energy_class``.

    Returns
    -------
    Band
        Family ``"mcb"``; ``instantaneous_a`` = lower instantaneous multiple x In;
        ``breaking_capacity_a`` = Icn; ``let_through`` = ``I^2 * t_max(I)`` (the class or
        given let-through in the instantaneous region), or None for no limit.

    Raises
    ------
    InputError
        Unknown type (key ``type``), rating not in the series (``In_a``), class not 1..3 or not
        covered by Annex ZA (``energy_class``), bad let-through points (``let_through_a2s``),
        Icn not one of :data:`MCB_ICN_A` (``icn_a``), unknown basis (``basis``).

    References
    ----------
    IEC 60898-1, 8.6.1 and its table of time-current operating characteristics (1.13 In,
    1.45 In, 2.55 In, instantaneous ranges B 3..5, C 5..10, D 10..20 In; test d at the lower
    multiple itself); EN 60898-1 Annex ZA (energy-limiting classes); BS 7671:2018 Table 41.3
    (Ia = the upper instantaneous multiple for 0.4 s and 5 s alike).

    Examples
    --------
    >>> band = mcb_band("B", 16, basis="envelope")
    >>> print(round(float(band.t_min(2.55 * 16)), 6), float(band.t_max(80.0)))
    1.0 0.1
    >>> print(float(band.t_max(4 * 16)), float(mcb_band("B", 16).t_min(3 * 16)) >= 0.1)
    60.0 True
    """
    if not isinstance(curve_type, str) or curve_type.strip().upper() not in MCB_INSTANTANEOUS:
        raise InputError(
            f"MCB type {curve_type!r} is not known; allowed: {', '.join(MCB_INSTANTANEOUS)}",
            key="type",
        )
    typ = curve_type.strip().upper()
    rating = in_series(rating_a, MCB_RATINGS_A, key="In_a", what="rated current",
                       standard="IEC 60898-1")
    given_points = None if let_through_a2s is None else let_through_points(let_through_a2s)
    if energy_class is None:
        cls = None if given_points is not None or not class_applies(typ, rating, 3) else 3
    elif isinstance(energy_class, bool) or energy_class not in ENERGY_CLASSES:
        raise InputError(
            f"energy-limiting class {energy_class!r} is not known; allowed: 1, 2, 3",
            key="energy_class",
        )
    elif given_points is not None:
        raise InputError(
            "energy_class and let_through_a2s both given; give one of them (the maker's "
            "let-through replaces the class)", key="energy_class"
        )
    elif not class_applies(typ, rating, int(energy_class)):
        raise InputError(
            f"EN 60898-1 Annex ZA gives no energy-limiting class {int(energy_class)} for type "
            f"{typ} {rating:g} A (classes cover types B and C up to 32 A); allowed here: "
            "energy_class = 1 (no limit), or the maker's let-through as let_through_a2s = "
            "[[prospective A, I2t A2s], ...]",
            key="energy_class",
        )
    else:
        cls = int(energy_class)
    icn = check_icn(icn_a)
    basis = known_basis(basis, MCB_BASES)

    # IEC 60898-1 table of time-current operating characteristics
    non_trip_x = tripping_limit("non_tripping_current_x", rating)
    trip_x = tripping_limit("tripping_current_x", rating)
    conventional_s = tripping_limit("conventional_time_s", rating)
    test_x = tripping_limit("test_current_x", rating)
    test_min_s = tripping_limit("test_current_min_time_s", rating)
    test_max_s = tripping_limit("test_current_max_time_s", rating)
    inst_s = tripping_limit("instantaneous_limit_time_s", rating)
    k_lo, k_up = (float(k) for k in MCB_INSTANTANEOUS[typ])

    notes: list[str] = []
    if basis == "envelope":
        x0_lo, tau_lo = non_trip_x, thermal_tau(non_trip_x, test_x, test_min_s)
        x0_up, tau_up = fit_thermal_law(trip_x, conventional_s, test_x, test_max_s)
        upper_from_x = trip_x  # below 1.45 In the standard guarantees no trip
        held_from_x = test_x  # from 2.55 In to the upper multiple only the 2.55 In time holds
        pickup_min = non_trip_x * rating
        pickup_max = trip_x * rating
        notes.append(
            "envelope: widest band IEC 60898-1 allows (no trip at 1.13 In, trip by the "
            f"conventional time at 1.45 In, 1 s..{test_max_s:g} s at 2.55 In and no sooner "
            f"guaranteed up to {k_up:g} In)"
        )
    else:
        x0_nom = 0.5 * (non_trip_x + trip_x)
        tau_lo = tau_up = thermal_tau(x0_nom, test_x, math.sqrt(test_min_s * test_max_s))
        x0_lo = x0_nom * (1.0 - TYPICAL_TOLERANCE)
        x0_up = x0_nom * (1.0 + TYPICAL_TOLERANCE)
        upper_from_x = held_from_x = 0.0
        pickup_min = x0_lo * rating
        pickup_max = x0_up / math.sqrt(-math.expm1(-conventional_s / tau_up)) * rating
        notes.append(
            f"typical: nominal thermal pickup {x0_nom:g} In, "
            f"{math.sqrt(test_min_s * test_max_s):.3g} s at 2.55 In, "
            f"+/-{TYPICAL_TOLERANCE:.0%} in current (modelling choice)"
        )
    notes.append(
        f"magnetic release may act above {k_lo:g} In: no energy withstand above "
        f"{k_lo * rating:g} A"
    )

    if given_points is not None:
        table = given_points
    elif cls is not None and cls > 1:
        table = class_let_through_table(typ, rating, cls)
    else:
        table = None
    below = "hold" if basis == "envelope" else "typical"
    class_i2t = loglog_let_through(table, below=below) if table is not None else None
    i_last, t_last = (table[-1][0], table[-1][1] / table[-1][0] ** 2) if table else (0.0, 0.0)
    if given_points is not None:
        notes.append(
            f"let-through I2t from the maker's {len(given_points)} points as given (log-log "
            "between them; "
            + ("held at the first point's value below it" if basis == "envelope"
               else "growing as I^1.5 below the first point, a modelling choice")
            + "): verify against the maker's data"
        )
    elif cls == 1:
        notes.append("energy-limiting class 1: no let-through limit; 0.1 s from the upper multiple")
    elif table is None:
        notes.append(
            f"EN 60898-1 Annex ZA gives no energy-limiting class for type {typ} {rating:g} A: "
            f"no energy limit applied (0.1 s at and above {k_up:g} In) unless the maker's "
            "let-through is given"
        )
    else:
        notes.append(
            f"energy-limiting class {cls}: let-through I2t log-log between the Annex ZA points "
            "3..10 kA, "
            + ("held at the 3 kA value below" if basis == "envelope"
               else "growing as I^1.5 below 3 kA (modelling choice)")
            + ", constant I2t/I^2 above 10 kA"
        )

    # Thresholds compared in amperes (products of the same floats a caller would form).
    inv_in = 1.0 / rating
    i_never = pickup_min  # at and below it: no trip
    i_sure = upper_from_x * rating  # envelope: below 1.45 In the standard guarantees nothing
    i_held = held_from_x * rating  # envelope: from 2.55 In only its time is guaranteed
    i_inst_lo, i_inst_up = k_lo * rating, k_up * rating

    def lower(current_a: np.ndarray) -> np.ndarray:
        t = np.maximum(thermal_time(current_a * inv_in, x0_lo, tau_lo), inst_s)
        t = np.where(current_a <= i_never, np.inf, t)
        # IEC 60898-1 test d: no trip within 0.1 s at the lower multiple itself
        return np.where(current_a <= i_inst_lo, t, TIME_FLOOR_S)

    def upper(current_a: np.ndarray) -> np.ndarray:
        t = thermal_time(current_a * inv_in, x0_up, tau_up)
        if i_sure:
            t = np.where(current_a < i_sure, np.inf, t)
        if i_held:
            t = np.where(current_a >= i_held, test_max_s, t)
        if class_i2t is None:
            inst = inst_s
        else:
            with np.errstate(divide="ignore"):
                inst = equivalent_time(class_i2t(current_a), current_a)
            # past the last table point the equivalent time is held: exactly, no rounding ripple
            inst = np.clip(np.where(current_a > i_last, t_last, inst), TIME_FLOOR_S, inst_s)
        return np.where(current_a < i_inst_up, t, inst)

    let_through = None
    if class_i2t is not None:

        def let_through(current_a: np.ndarray) -> np.ndarray:
            i = as_current(current_a)
            return i * i * upper(i)

    in_setting = int(rating) if rating.is_integer() else rating
    settings: dict[str, object] = {"type": typ, "In_a": in_setting}
    if cls is not None:
        settings["energy_class"] = cls
    if given_points is not None:
        settings["let_through_a2s"] = given_points
    settings["icn_a"] = icn
    return Band(
        name=f"{typ}{rating:g}",
        family="mcb",
        basis=basis,
        rating_a=rating,
        pickup_min_a=pickup_min,
        pickup_max_a=pickup_max,
        conventional_time_s=conventional_s,
        lower=lower,
        upper=upper,
        let_through=let_through,
        pre_arcing_i2t_min_a2s=None,
        instantaneous_a=k_lo * rating,
        breaking_capacity_a=icn,
        settings=settings,
        key=("mcb", typ, rating, cls, given_points, icn, basis),
        notes=tuple(notes),
    )
