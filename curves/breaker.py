"""IEC 60947-2 circuit-breakers: thermal-magnetic and electronic trip units as bands.

Two families:

* ``breaker-tm`` (inline ``family = "tm"``): a thermal (inverse-time) release with current
  setting ``Ir`` and a magnetic (instantaneous) release with pickup ``Ii``.
* ``breaker-electronic`` (inline ``family = "electronic"``): long-time (``Ir``, ``tr``),
  optional short-time (``Isd``, ``tsd``, optional I2t ramp) and optional instantaneous (``Ii``)
  protection.

Each element of a release has a lower edge (it will not trip before) and an upper edge (it has
tripped and the breaker has cleared by); the device trips on the first element that acts, so the
device's edges are the element-wise minimum of its elements' edges. A minimum of non-increasing
functions never rises, and ``lower <= upper`` holds element by element, hence for the device.

Tolerances and the two bases
----------------------------
``envelope`` takes each tolerance in full; ``typical`` takes the middle of each tolerance
interval plus and minus half its half-width (our design rule, the same for every tolerance), so
a typical band always lies inside the envelope. Typical therefore means: thermal / long-time
pickup 1.1125 .. 1.2375 Ir, tau 0.9 .. 1.1 x nominal, magnetic pickup 0.9 .. 1.1 Ii, electronic
pickups 0.95 .. 1.05 x setting, long-time delay 0.85 .. 0.95 tr, short-time delay tsd -10 ms ..
+10 ms. ``pickup_min_a`` / ``pickup_max_a`` are where the basis's lower / upper edges start, and
``instantaneous_a`` where its lower edge drops to ``TIME_FLOOR_S`` (0.8 Ii envelope, 0.9 Ii
typical for thermal-magnetic; 0.9 / 0.95 Ii electronic).

======================================  ======================  ================================
quantity                                envelope                source
======================================  ======================  ================================
long-time / thermal pickup              1.05 Ir .. 1.30 Ir      IEC 60947-2, 7.2.1.2.4, Table 6
conventional time                       1 h (In <= 63 A),       IEC 60947-2, Table 6
                                        2 h (In > 63 A)
thermal-magnetic: magnetic pickup Ii    +/-20 %                 IEC 60947-2, 7.2.1.2.4 a)
                                                                (from memory)
electronic: Isd and Ii pickups          +/-10 %                 common practice (from memory)
electronic: long-time delay at 6 Ir     -20 % / +0 % of tr      from memory
electronic: short-time delay tsd        -20 ms / +20 ms         from memory
breaker's own clearing time             30 ms, added to every   common practice
                                        upper edge (electronic)
                                        and the whole upper edge
                                        from 1.2 Ii (1.1 Ii
                                        typical) up, at every
                                        current (thermal-magnetic)
thermal law time constant tau           0.8 .. 1.2 x nominal    our design (from memory)
======================================  ======================  ================================

What the worst case rests on. IEC 60947-2 states for an inverse-time release only the
conventional currents and time and, for an instantaneous release, its tolerance (no operation at
the lower limit itself, operation at the upper). Between 1.30 Ir and the upper instantaneous
limit it guarantees nothing faster than the conventional time: the thermal curve is the maker's.
So the envelope's upper edge of a thermal-magnetic breaker holds the conventional time from
1.30 Ir up to 1.2 Ii (a disconnection check then needs the magnetic release, as for an MCB). For
an electronic unit the settings the study gives (``tr`` at 6 Ir, ``Isd``/``tsd``, ``Ii``) are the
user's statement of the characteristic; the envelope takes them with the tolerances above (the
I2t-constant long-time law through ``tr`` is the meaning of the setting, common practice). The
lower edges (the thermal law's lower limit below) are assumed shapes: they decide selectivity,
never a safety check.

Thermal law (thermal-magnetic): ``t = tau * ln(x^2 / (x^2 - x0^2))`` with ``x = I / Ir``, the
time a first-order heated element starting cold needs to reach its trip temperature. The nominal
characteristic has ``x0 = 1.175`` (the middle of 1.05 .. 1.30) and ``tau`` such that it trips in
10 s at 6 Ir (our design, within the range thermal releases of moulded-case breakers commonly
show; from memory). Envelope: lower edge ``x0 = 1.05``, ``0.8 tau``; upper edge infinite below
1.30 Ir, then the conventional time up to the upper magnetic limit (see above). Typical: the law
with its tolerances halved, both edges.

Long-time law (electronic): ``I^2 t = constant`` through ``tr`` at 6 Ir, ``t = tr * 36 / x^2``
(common practice), between the long-time pickup limits above.

Short-time delay: definite time ``tsd``; with ``sd_i2t = true`` an ``I^2 t = constant`` ramp
below 10 Ir, ``t = tsd * (10 Ir / I)^2`` (common practice). Lower edge: the minimum non-tripping
time ``tsd - 20 ms``; upper edge: the maximum clearing time ``tsd + 20 ms + 30 ms``.

Where the long-time law stops (common practice for the shape): a unit with a short-time element
follows the long-time curve down to the short-time pickup, then the short-time delay (flat, or
its I2t ramp) up to the instantaneous pickup; the long-time ``I^2 t`` law does not go on getting
faster above Isd. With the short-time pickup tolerance ``[Isd_lo, Isd_hi]`` of the basis:

* below ``Isd_lo``: the long-time edges;
* from ``Isd_lo`` to ``Isd_hi``: lower edge ``min(long-time, short-time)`` (the short-time
  element may pick up), upper edge the long-time one (it is not sure to);
* from ``Isd_hi`` up: the short-time edges; the long-time element stays only as the value it
  reached at the pickup, so an edge never rises where a short-time setting is slower than the
  long-time curve at Isd (the edge then stays flat at that value until the short-time delay is
  faster).

The long-time law is held at the same current on both bases, the upper pickup limit of the
envelope ``1.1 Isd``, so that the typical band stays inside the envelope; on the typical basis
this differs from "short-time only from ``1.05 Isd``" only where the long-time curve is still
faster than the short-time delay there. Without a short-time element the long-time law runs on
up to the instantaneous pickup. The instantaneous element acts as described above in every case,
and the device's edges are the minimum of the three elements' edges (:func:`electronic_elements`,
which evaluates them broadcast over arrays of settings as well).

The setting grids below are typical of adjustable units (common practice), our own design, and
what the chooser searches; settings off the grid are refused.

References
----------
IEC 60947-2:2016, Low-voltage switchgear and controlgear - Part 2: Circuit-breakers, 7.2.1.2.4
(tripping limits of over-current releases) and Table 6 (inverse time-delay releases: conventional
non-tripping current 1.05 Ir, tripping current 1.30 Ir; 1 h / 2 h). Clause and table numbers are
from memory.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np

from curves.band import TIME_FLOOR_S, Band
from curves.errors import InputError
from curves.laws import i2t_time, thermal_tau, thermal_time
from curves.validate import in_series, known_basis, on_grid, positive_number, values_text

#: Rated currents In of breakers and trip units [A], Renard R'10 series 16 .. 1600 A
#: (IEC 60059 preferred ratings, from memory; common practice).
BREAKER_RATINGS_A: tuple[float, ...] = (
    16, 20, 25, 32, 40, 50, 63, 80, 100, 125, 160, 200, 250, 320, 400, 500, 630, 800, 1000, 1250,
    1600,
)
#: Thermal setting Ir / In of adjustable thermal-magnetic units (typical of adjustable units,
#: common practice). A fixed unit has Ir = In (1.0).
TM_IR_FRACTIONS: tuple[float, ...] = (0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 1.0)
#: Long-time setting Ir / In of electronic units (typical of adjustable units, common practice).
ELECTRONIC_IR_FRACTIONS: tuple[float, ...] = (
    0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 1.0,
)
#: Long-time delay tr: the time at 6 Ir [s] (typical of adjustable units, common practice).
TR_S: tuple[float, ...] = (0.5, 1, 2, 4, 8, 12, 16, 20, 24)
#: Short-time pickup Isd / Ir (typical of adjustable units, common practice).
ISD_X: tuple[float, ...] = (1.5, 2, 2.5, 3, 4, 5, 6, 7, 8, 10)
#: Short-time delay tsd [s] (typical of adjustable units, common practice).
TSD_S: tuple[float, ...] = (0.1, 0.2, 0.3, 0.4)
#: Instantaneous pickup Ii / In offered by both kinds (typical of adjustable units, common
#: practice). Thermal-magnetic units offer exactly these; a fixed magnetic release is 10 In.
II_X: tuple[float, ...] = (5, 6, 7, 8, 9, 10)
#: Instantaneous pickup Ii / In of electronic units: a wider grid that contains ``II_X``.
ELECTRONIC_II_X: tuple[float, ...] = (2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 15)

#: Conventional non-tripping and tripping currents / Ir (IEC 60947-2, Table 6).
CONVENTIONAL_X: tuple[float, float] = (1.05, 1.30)
#: The breaker's own clearing (opening and arcing) time added to upper edges [s] (common
#: practice: 20 .. 30 ms; we take the slower end).
BREAKER_CLEARING_S = 0.03
#: Magnetic pickup tolerance of thermal-magnetic releases, relative (IEC 60947-2, 7.2.1.2.4 a),
#: from memory).
TM_MAGNETIC_TOLERANCE = 0.20
#: Short-time and instantaneous pickup tolerance of electronic units, relative (from memory).
ELECTRONIC_PICKUP_TOLERANCE = 0.10
#: Long-time delay tolerance of electronic units, relative to tr: (minus, plus) (from memory).
LONG_TIME_TOLERANCE = (0.20, 0.0)
#: Short-time delay tolerance around tsd [s]: (minus, plus) (from memory).
SHORT_TIME_TOLERANCE_S = (0.02, 0.02)
#: Thermal law: nominal x0 (middle of 1.05 .. 1.30), the nominal time at 6 Ir [s] (our design),
#: and the spread of tau (our design, from memory).
TM_X0_NOMINAL = 1.175
TM_T6_NOMINAL_S = 10.0
TM_TAU_SPREAD = 0.20
#: Electronic long-time delay is stated at this multiple of Ir (common practice).
TR_AT_X = 6.0
#: Below this multiple of Ir the short-time I2t ramp applies (common practice).
SD_RAMP_X = 10.0

BASES = ("typical", "envelope")
_T6_NOTE = f"nominal {TM_T6_NOMINAL_S:g} s at 6 Ir (modelling choice)"


# -- pure models -------------------------------------------------------------------------------
def nominal_tau_s(x0: float = TM_X0_NOMINAL, t6_s: float = TM_T6_NOMINAL_S) -> float:
    """The time constant [s] that puts the thermal law through ``t6_s`` at 6 Ir.

    Examples
    --------
    >>> print(round(nominal_tau_s(), 1))
    255.7
    """
    return thermal_tau(x0, 6.0, t6_s)


def conventional_time_s(rating_a: float) -> float:
    """Conventional time of IEC 60947-2 [s]: 1 h for In <= 63 A, 2 h above.

    References
    ----------
    IEC 60947-2, 7.2.1.2.4, Table 6 (confirmed in restatements; clause number from memory).

    Examples
    --------
    >>> print(conventional_time_s(100))
    7200.0
    """
    return 3600.0 if rating_a <= 63 else 7200.0


def tolerance(lo: float, hi: float, basis: str) -> tuple[float, float]:
    """The interval a basis takes from a tolerance interval ``[lo, hi]``.

    ``envelope`` takes it whole; ``typical`` its middle plus and minus half its half-width.

    References
    ----------
    Our design rule, the same for every tolerance of IEC 60947-2 releases.

    Examples
    --------
    >>> print(tolerance(1.05, 1.30, "typical"))
    (1.1125, 1.2375)
    """
    if basis == "envelope":
        return lo, hi
    mid, quarter = (lo + hi) / 2, (hi - lo) / 4
    return mid - quarter, mid + quarter


# -- input checks ------------------------------------------------------------------------------
def _multiple(name: str, base_name: str, base_a: float, x_value: Any, a_value: Any,
              grid: Sequence[float], default_x: float | None) -> float | None:
    """A current setting given as ``<name>_x`` (multiple of base) or ``<name>_a`` [A].

    Returns the multiple on ``grid``, or ``default_x`` when neither is given.
    """
    x = None if x_value is None else positive_number(f"{name}_x", x_value)
    a = None if a_value is None else positive_number(f"{name}_a", a_value)
    if x is not None:
        x = on_grid(f"{name}_x", x, grid, f"(multiple of {base_name})")
    if a is not None:
        allowed = [g * base_a for g in grid]
        try:
            from_a = on_grid(f"{name}_a", a / base_a, grid, "")
        except InputError:
            raise InputError(f"{name}_a = {a:g} A is not a setting with {base_name} = "
                             f"{base_a:g} A; allowed: {values_text(allowed)} A", key=f"{name}_a"
                             ) from None
        if x is not None and not math.isclose(x, from_a, rel_tol=1e-6):
            raise InputError(f"{name}_a = {a:g} A and {name}_x = {x:g} disagree "
                             f"({name}_x x {base_name} = {x * base_a:g} A); give one of them",
                             key=f"{name}_a")
        x = from_a
    return default_x if x is None else x


#: What a label calls each kind of adjustable breaker, after the releases IEC 60947-2 describes
#: (thermal and magnetic releases; electronic over-current releases).
KIND_WORDS: dict[str, str] = {"breaker-tm": "thermal-magnetic", "breaker-electronic": "electronic"}


def breaker_label(family: str, settings: Any, *, compact: bool = False) -> str:
    """The label of an adjustable breaker: its kind, its rating and its settings in words.

    The one place that builds the label a person reads for a thermal-magnetic or electronic
    breaker, in tables, plots, the report and JSON (a band's ``name``). The settings keep IEC
    60947-2's names (Ir, tr, Isd, tsd, Ii); a multiple names the current it multiplies
    (``Isd 4 Ir``, ``Ii 10 In``).

    Parameters
    ----------
    family : str
        ``"breaker-tm"`` or ``"breaker-electronic"``.
    settings : mapping
        A breaker band's settings (``In_a``, ``Ir_a``, ``tr_s``, ``Isd_x``, ``tsd_s``,
        ``sd_i2t``, ``Ii_x``; those of an element the unit lacks are absent).
    compact : bool
        For narrow table cells: the kind, the rating and Ir only (the register and the JSON
        carry the rest).

    Returns
    -------
    str
        E.g. ``"thermal-magnetic 250 A, Ir 200 A, Ii 10 In"``; compact
        ``"thermal-magnetic 250 A, Ir 200 A"``.

    References
    ----------
    IEC 60947-2:2016, 7.2.1.2.4 (the settings of over-current releases; from memory).

    Examples
    --------
    >>> print(breaker_label("breaker-electronic", {"In_a": 1600, "Ir_a": 1440, "tr_s": 12,
    ...                                            "Isd_x": 4, "tsd_s": 0.3, "sd_i2t": False}))
    electronic 1600 A, Ir 1440 A, tr 12 s, Isd 4 Ir, tsd 0.3 s
    >>> print(breaker_label("breaker-tm", {"In_a": 250, "Ir_a": 200, "Ii_x": 10}, compact=True))
    thermal-magnetic 250 A, Ir 200 A
    """
    parts = [f"{KIND_WORDS[family]} {settings['In_a']:g} A", f"Ir {settings['Ir_a']:g} A"]
    if not compact:
        if "tr_s" in settings:
            parts.append(f"tr {settings['tr_s']:g} s")
        if "Isd_x" in settings:
            parts.append(f"Isd {settings['Isd_x']:g} Ir")
            parts.append(f"tsd {settings['tsd_s']:g} s")
            if settings.get("sd_i2t"):
                parts.append("I2t ramp")
        if "Ii_x" in settings:
            parts.append(f"Ii {settings['Ii_x']:g} In")
    return ", ".join(parts)


def breaking_capacities(icu_a: Any, ics_a: Any) -> tuple[float | None, float | None]:
    """Icu and Ics of a breaker as given, checked: each positive, Ics not above Icu.

    The breaking-capacity check takes Ics where it is given (the fault is then broken with the
    breaker fit for further service: the stricter of the two), else Icu.

    Parameters
    ----------
    icu_a : float or None
        Rated ultimate short-circuit breaking capacity Icu [A].
    ics_a : float or None
        Rated service short-circuit breaking capacity Ics [A].

    Raises
    ------
    InputError
        For a value that is not a positive number, or Ics above Icu.

    References
    ----------
    IEC 60947-2, 4.3.5.3 (Icu) and 4.3.5.4 (Ics, a percentage of Icu: 25, 50, 75 or 100 %;
    clause numbers from memory).

    Examples
    --------
    >>> print(breaking_capacities(36000, 27000))
    (36000.0, 27000.0)
    """
    icu = None if icu_a is None else positive_number("icu_a", icu_a)
    ics = None if ics_a is None else positive_number("ics_a", ics_a)
    if icu is not None and ics is not None and ics > icu:
        raise InputError(f"Ics {ics:g} A is above Icu {icu:g} A; allowed: at most Icu (Ics is "
                         "25, 50, 75 or 100 % of Icu, IEC 60947-2)", key="ics_a")
    return icu, ics


# -- thermal-magnetic --------------------------------------------------------------------------
def thermal_magnetic_band(
    *,
    In_a: float,
    Ir_a: float | None = None,
    Ir_x: float | None = None,
    Ii_a: float | None = None,
    Ii_x: float | None = None,
    icu_a: float | None = None,
    ics_a: float | None = None,
    basis: str = "typical",
) -> Band:
    """The band of a thermal-magnetic breaker (IEC 60947-2).

    Parameters
    ----------
    In_a : float
        Rated current In [A], one of ``BREAKER_RATINGS_A``.
    Ir_a, Ir_x : float, optional
        Thermal setting, in amperes or as a fraction of In on ``TM_IR_FRACTIONS`` (give one, or
        both if they agree). Neither: a fixed unit, Ir = In.
    Ii_a, Ii_x : float, optional
        Magnetic pickup, in amperes or as a multiple of In on ``II_X``. Neither: 10 In.
    icu_a : float, optional
        Rated ultimate short-circuit breaking capacity Icu [A].
    ics_a : float, optional
        Rated service short-circuit breaking capacity Ics [A], at most Icu; where given it is
        the band's breaking capacity (:func:`breaking_capacities`).
    basis : str
        ``"typical"`` or ``"envelope"``.

    Returns
    -------
    Band
        Family ``"breaker-tm"``; ``instantaneous_a`` is the lower magnetic pickup (0.8 Ii on the
        envelope, 0.9 Ii typical); ``let_through`` is None (energy is ``I^2 t_max``).

    References
    ----------
    IEC 60947-2, 7.2.1.2.4 and Table 6 (conventional currents 1.05 / 1.30 Ir, 1 h / 2 h);
    magnetic tolerance +/-20 % (7.2.1.2.4 a), from memory).

    Examples
    --------
    >>> band = thermal_magnetic_band(In_a=250, Ir_x=0.8, Ii_x=10, basis="envelope")
    >>> print(band.instantaneous_a)
    2000.0
    """
    basis = known_basis(basis, BASES)
    rating = in_series(In_a, BREAKER_RATINGS_A, key="In_a", what="rated current",
                       standard="breaker")
    if isinstance(Ii_x, str):
        raise InputError(f"Ii_x = {Ii_x!r} is not allowed (a magnetic release cannot be "
                         f"switched off); allowed: {values_text(II_X)} x In", key="Ii_x")
    ir_x = _multiple("Ir", "In", rating, Ir_x, Ir_a, TM_IR_FRACTIONS, 1.0)
    ii_x = _multiple("Ii", "In", rating, Ii_x, Ii_a, II_X, 10.0)
    icu, ics = breaking_capacities(icu_a, ics_a)
    ir = ir_x * rating
    ii = ii_x * rating
    t_conv = conventional_time_s(rating)

    tau_n = nominal_tau_s()
    spread = (1 - TM_TAU_SPREAD, 1 + TM_TAU_SPREAD)
    tau_lo, tau_hi = (tau_n * s for s in tolerance(*spread, basis))
    x_lo, x_hi = tolerance(*CONVENTIONAL_X, basis)
    m_lo, m_hi = tolerance(1 - TM_MAGNETIC_TOLERANCE, 1 + TM_MAGNETIC_TOLERANCE, basis)
    mag_lo_a, mag_hi_a = m_lo * ii, m_hi * ii
    envelope = basis == "envelope"

    def lower(i: np.ndarray) -> np.ndarray:
        t = thermal_time(i / ir, x_lo, tau_lo)
        # no magnetic operation at the lower tolerance limit itself (IEC 60947-2, 8.3.3.1.2)
        return np.where(i > mag_lo_a, np.minimum(t, TIME_FLOOR_S), t)

    def upper(i: np.ndarray) -> np.ndarray:
        x = i / ir
        if envelope:
            # IEC 60947-2 guarantees a trip within the conventional time from 1.30 Ir and the
            # magnetic trip from the upper tolerance limit; nothing faster in between (the
            # thermal curve is the maker's): the worst case holds the conventional time
            t = np.where(x >= x_hi, t_conv, np.inf)
        else:
            t = thermal_time(x, x_hi, tau_hi)
        # from the upper magnetic pickup the magnetic release has acted: the breaker has
        # cleared by its own clearing time at every current, never sooner (the thermal law
        # alone would fall below it above about 130 Ir and understate I^2 t_max)
        return np.where(i >= mag_hi_a, BREAKER_CLEARING_S, t)

    settings: dict[str, Any] = {"In_a": rating, "Ir_x": ir_x, "Ir_a": ir, "Ii_x": ii_x,
                                "Ii_a": ii}
    if icu is not None:
        settings["icu_a"] = icu
    if ics is not None:
        settings["ics_a"] = ics
    notes = [f"{basis}: thermal pickup {x_lo:.4g}..{x_hi:.4g} Ir (Ir = {ir:g} A), "
             f"{_T6_NOTE}; magnetic release may act from {mag_lo_a:g} A (Ii = {ii:g} A, "
             f"{m_lo:.3g}..{m_hi:.3g} Ii): no energy withstand above it"]
    if icu is None and ics is None:
        notes.append("Icu not given: breaking capacity unknown")
    return Band(
        name=breaker_label("breaker-tm", settings),
        family="breaker-tm",
        basis=basis,
        rating_a=rating,
        pickup_min_a=x_lo * ir,
        pickup_max_a=x_hi * ir,
        conventional_time_s=t_conv,
        lower=lower,
        upper=upper,
        instantaneous_a=mag_lo_a,
        breaking_capacity_a=ics if ics is not None else icu,
        settings=settings,
        key=("breaker-tm", basis, rating, ir_x, ii_x, icu, ics),
        notes=tuple(notes),
    )


# -- electronic --------------------------------------------------------------------------------
def electronic_elements(
    current_a: np.ndarray,
    side: str,
    *,
    rating_a: float,
    ir_a: float,
    tr_s: Any,
    isd_a: Any = np.inf,
    tsd_s: Any = 0.0,
    ii_a: Any = np.inf,
    sd_i2t: bool = False,
    basis: str = "typical",
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """One edge of an electronic trip unit, element by element, broadcast over settings [s].

    The device's edge is the element-wise minimum of the three returned arrays. Each element is
    computed from only the settings it depends on, so arrays of settings broadcast separately:
    the long-time part over ``current_a``, ``tr_s`` and ``isd_a``; the short-time part over
    ``current_a``, ``isd_a`` and ``tsd_s``; the instantaneous part over ``current_a`` and
    ``ii_a``. Settings are assumed valid (on their grids, Isd at or below Ii).

    Parameters
    ----------
    current_a : ndarray
        Prospective currents [A], positive; broadcast with the settings.
    side : str
        ``"lower"`` (the unit will not trip before) or ``"upper"`` (tripped and cleared by).
    rating_a : float
        Rated current In [A] (selects the conventional time).
    ir_a : float
        Long-time setting Ir [A].
    tr_s : float or ndarray
        Long-time delay at 6 Ir [s].
    isd_a : float or ndarray
        Short-time pickup Isd [A]; ``inf`` for no short-time element.
    tsd_s : float or ndarray
        Short-time delay [s] (ignored where ``isd_a`` is ``inf``).
    ii_a : float or ndarray
        Instantaneous pickup Ii [A]; ``inf`` for no instantaneous element.
    sd_i2t : bool
        Short-time ``I^2 t = constant`` ramp below 10 Ir.
    basis : str
        ``"typical"`` or ``"envelope"``.

    Returns
    -------
    long_time, short_time, instantaneous : ndarray
        The elements' edges [s]; ``inf`` where an element does not (may not) act. The long-time
        law is held at its value at ``1.1 Isd`` above that current (the module's rule).

    References
    ----------
    IEC 60947-2, 7.2.1.2.4 and Table 6 (long-time conventional currents, 1 h / 2 h); tr at
    6 Ir with I2t = constant, the long-time curve giving way to the short-time delay above Isd
    (common practice); tolerances from memory.

    Examples
    --------
    >>> lt, st, inst = electronic_elements(np.array([50000.0]), "upper", rating_a=630,
    ...                                    ir_a=630, tr_s=8, isd_a=3780, tsd_s=0.2)
    >>> print(round(float(np.minimum(np.minimum(lt, st), inst)[0]), 3))
    0.24
    """
    if side not in ("lower", "upper"):
        raise ValueError(f"side must be 'lower' or 'upper', not {side!r}")
    i = np.asarray(current_a, dtype=np.float64)
    isd = np.asarray(isd_a, dtype=np.float64)
    ii = np.asarray(ii_a, dtype=np.float64)
    p_lo, p_hi = tolerance(1 - ELECTRONIC_PICKUP_TOLERANCE, 1 + ELECTRONIC_PICKUP_TOLERANCE,
                           basis)
    clear = BREAKER_CLEARING_S
    # the long-time law stops at the envelope's upper short-time pickup (both bases)
    x = np.minimum(i, (1 + ELECTRONIC_PICKUP_TOLERANCE) * isd) / ir_a
    if sd_i2t:
        with np.errstate(divide="ignore"):
            delay = np.asarray(tsd_s) * np.maximum(1.0, (SD_RAMP_X * ir_a / i) ** 2)
    else:
        delay = np.asarray(tsd_s, dtype=np.float64)
    if side == "lower":
        x_lo = tolerance(*CONVENTIONAL_X, basis)[0]
        lt_lo = tolerance(1 - LONG_TIME_TOLERANCE[0], 1 + LONG_TIME_TOLERANCE[1], basis)[0]
        d_lo = tolerance(-SHORT_TIME_TOLERANCE_S[0], SHORT_TIME_TOLERANCE_S[1], basis)[0]
        long_time = np.where(x > x_lo, i2t_time(x, np.asarray(tr_s) * lt_lo, TR_AT_X), np.inf)
        # no pickup at the lower tolerance limit itself (IEC 60947-2, 8.3.3.1.2)
        short_time = np.where(i > p_lo * isd, delay + d_lo, np.inf)
        instantaneous = np.where(i > p_lo * ii, TIME_FLOOR_S, np.inf)
    else:
        x_hi = tolerance(*CONVENTIONAL_X, basis)[1]
        lt_hi = tolerance(1 - LONG_TIME_TOLERANCE[0], 1 + LONG_TIME_TOLERANCE[1], basis)[1]
        d_hi = tolerance(-SHORT_TIME_TOLERANCE_S[0], SHORT_TIME_TOLERANCE_S[1], basis)[1]
        t_conv = conventional_time_s(rating_a)
        long_time = np.where(
            x >= x_hi,
            np.minimum(t_conv, i2t_time(x, np.asarray(tr_s) * lt_hi, TR_AT_X) + clear),
            np.inf)
        short_time = np.where(i >= p_hi * isd, delay + d_hi + clear, np.inf)
        instantaneous = np.where(i >= p_hi * ii, clear, np.inf)
    return long_time, short_time, instantaneous


def electronic_band(
    *,
    In_a: float,
    Ir_a: float | None = None,
    Ir_x: float | None = None,
    tr_s: float | None = None,
    Isd_a: float | None = None,
    Isd_x: float | None = None,
    tsd_s: float | None = None,
    sd_i2t: bool = False,
    Ii_a: float | None = None,
    Ii_x: float | str | None = None,
    icu_a: float | None = None,
    ics_a: float | None = None,
    basis: str = "typical",
) -> Band:
    """The band of a breaker with an electronic trip unit (IEC 60947-2).

    Parameters
    ----------
    In_a : float
        Rated current of the trip unit In [A], one of ``BREAKER_RATINGS_A``.
    Ir_a, Ir_x : float, optional
        Long-time setting [A] or Ir / In on ``ELECTRONIC_IR_FRACTIONS``; default Ir = In.
    tr_s : float, optional
        Long-time delay: the time at 6 Ir [s], on ``TR_S``; default 8 s (said in the notes).
    Isd_a, Isd_x : float, optional
        Short-time pickup [A] or Isd / Ir on ``ISD_X``. Neither: no short-time protection.
    tsd_s : float, optional
        Short-time delay [s] on ``TSD_S``; default 0.1 s when Isd is given.
    sd_i2t : bool
        Short-time ``I^2 t = constant`` ramp below 10 Ir.
    Ii_a, Ii_x : float or "off", optional
        Instantaneous pickup [A] or Ii / In on ``ELECTRONIC_II_X``. Neither, or ``"off"``: no
        instantaneous protection.
    icu_a : float, optional
        Rated ultimate short-circuit breaking capacity Icu [A].
    ics_a : float, optional
        Rated service short-circuit breaking capacity Ics [A], at most Icu; where given it is
        the band's breaking capacity (:func:`breaking_capacities`).
    basis : str
        ``"typical"`` or ``"envelope"``.

    Returns
    -------
    Band
        Family ``"breaker-electronic"``; ``instantaneous_a`` the lower instantaneous pickup
        (0.9 Ii envelope, 0.95 Ii typical) or None when off.

    References
    ----------
    IEC 60947-2, 7.2.1.2.4 and Table 6 (long-time conventional currents 1.05 / 1.30 Ir,
    1 h / 2 h); tr at 6 Ir with I2t = constant, giving way to the short-time delay above Isd
    (common practice; the rule in the module notes, :func:`electronic_elements`); pickup
    tolerances +/-10 % and delay tolerances (from memory).

    Examples
    --------
    >>> band = electronic_band(In_a=400, Ir_x=0.8, tr_s=8, Isd_x=6, tsd_s=0.2, Ii_x=10,
    ...                        basis="envelope")
    >>> print(round(float(band.t_max(6 * 320)), 3))
    8.03
    """
    basis = known_basis(basis, BASES)
    rating = in_series(In_a, BREAKER_RATINGS_A, key="In_a", what="rated current",
                       standard="breaker")
    ir_x = _multiple("Ir", "In", rating, Ir_x, Ir_a, ELECTRONIC_IR_FRACTIONS, 1.0)
    ir = ir_x * rating
    notes: list[str] = []
    if tr_s is None:
        tr = 8.0
        notes.append("tr_s not given: 8 s at 6 Ir assumed")
    else:
        tr = on_grid("tr_s", positive_number("tr_s", tr_s), TR_S, "(time at 6 Ir, s)")
    if not isinstance(sd_i2t, bool | np.bool_):
        raise InputError(f"sd_i2t must be true or false, not {sd_i2t!r}", key="sd_i2t")
    isd_x = _multiple("Isd", "Ir", ir, Isd_x, Isd_a, ISD_X, None)
    if isd_x is None:
        if tsd_s is not None or sd_i2t:
            key = "tsd_s" if tsd_s is not None else "sd_i2t"
            raise InputError(f"{key} needs a short-time pickup; give Isd_x (allowed: "
                             f"{values_text(ISD_X)} x Ir)", key=key)
        tsd = None
    else:
        tsd = (0.1 if tsd_s is None
               else on_grid("tsd_s", positive_number("tsd_s", tsd_s), TSD_S, "(s)"))
    if isinstance(Ii_x, str):
        if Ii_x.strip().lower() != "off":
            raise InputError(f"Ii_x = {Ii_x!r} is not allowed; allowed: "
                             f"{values_text(ELECTRONIC_II_X)} x In, or \"off\"", key="Ii_x")
        if Ii_a is not None:
            raise InputError("Ii_a given with Ii_x = \"off\"; give one of them", key="Ii_a")
        ii_x = None
    else:
        ii_x = _multiple("Ii", "In", rating, Ii_x, Ii_a, ELECTRONIC_II_X, None)
    icu, ics = breaking_capacities(icu_a, ics_a)
    ii = None if ii_x is None else ii_x * rating
    isd = None if isd_x is None else isd_x * ir
    if isd is not None and ii is not None and isd > ii * (1 + 1e-9):
        raise InputError(f"short-time pickup Isd = {isd_x:g} x Ir = {isd:g} A is above the "
                         f"instantaneous pickup Ii = {ii:g} A; allowed: Isd_x up to "
                         f"{ii / ir:g} with these settings, or Ii_x = \"off\"", key="Isd_x")

    t_conv = conventional_time_s(rating)
    x_lo, x_hi = tolerance(*CONVENTIONAL_X, basis)
    lt_lo, lt_hi = tolerance(1 - LONG_TIME_TOLERANCE[0], 1 + LONG_TIME_TOLERANCE[1], basis)
    p_lo, p_hi = tolerance(1 - ELECTRONIC_PICKUP_TOLERANCE, 1 + ELECTRONIC_PICKUP_TOLERANCE,
                           basis)
    elements = {"rating_a": rating, "ir_a": ir, "tr_s": tr,
                "isd_a": np.inf if isd is None else isd, "tsd_s": 0.0 if tsd is None else tsd,
                "ii_a": np.inf if ii is None else ii, "sd_i2t": bool(sd_i2t), "basis": basis}

    def lower(i: np.ndarray) -> np.ndarray:
        lt, st, inst = electronic_elements(i, "lower", **elements)
        return np.minimum(np.minimum(lt, st), inst)

    def upper(i: np.ndarray) -> np.ndarray:
        lt, st, inst = electronic_elements(i, "upper", **elements)
        return np.minimum(np.minimum(lt, st), inst)

    notes.append(f"{basis}: long-time pickup {x_lo:.4g}..{x_hi:.4g} Ir (Ir = {ir:g} A), "
                 f"delay {lt_lo:.3g}..{lt_hi:.3g} x tr at 6 Ir; pickups Isd, Ii within "
                 f"{p_lo:.3g}..{p_hi:.3g} x setting")
    if basis == "typical" and tr > lt_hi * tr + BREAKER_CLEARING_S:
        # the typical band takes the middle of the -20 %/+0 % tolerance, so it misses tr itself
        notes.append(f"typical: set tr = {tr:g} s lies outside this band (long-time delay at "
                     f"6 Ir {lt_lo:.3g}..{lt_hi:.3g} x tr + {BREAKER_CLEARING_S * 1000:g} ms "
                     "clearing; tolerance -20 %/+0 % of tr)")
    if ii is not None:
        notes.append(f"instantaneous release may act from {p_lo * ii:g} A: no energy withstand "
                     "above it")
    settings: dict[str, Any] = {"In_a": rating, "Ir_x": ir_x, "Ir_a": ir, "tr_s": tr}
    if isd_x is not None:
        settings.update(Isd_x=isd_x, Isd_a=isd, tsd_s=tsd, sd_i2t=bool(sd_i2t))
    if ii_x is not None:
        settings.update(Ii_x=ii_x, Ii_a=ii)
    else:
        notes.append("no instantaneous release (Ii off)")
    if icu is not None:
        settings["icu_a"] = icu
    if ics is not None:
        settings["ics_a"] = ics
    if icu is None and ics is None:
        notes.append("Icu not given: breaking capacity unknown")
    return Band(
        name=breaker_label("breaker-electronic", settings),
        family="breaker-electronic",
        basis=basis,
        rating_a=rating,
        pickup_min_a=x_lo * ir,
        pickup_max_a=x_hi * ir,
        conventional_time_s=t_conv,
        lower=lower,
        upper=upper,
        instantaneous_a=None if ii is None else p_lo * ii,
        breaking_capacity_a=ics if ics is not None else icu,
        settings=settings,
        key=("breaker-electronic", basis, rating, ir_x, tr, isd_x, tsd, bool(sd_i2t), ii_x, icu,
             ics),
        notes=tuple(notes),
    )
