"""Residual-current devices (RCCBs, RCBOs, residual-current relays) as residual bands.

An RCD answers to the residual current (the vector sum of the live conductors' currents, an
earth-leakage or earth-fault current), not to the overcurrent that the other families answer to.
Its band is therefore a :class:`ResidualBand`, a type of its own with the same edge vocabulary as
:class:`curves.band.Band` (``t_min``, ``t_max``, pickups, ``key``, ``notes``) but whose current
axis is the RESIDUAL current. It is deliberately not a ``Band``: everything that takes a ``Band``
(the overlap engine, the chooser, fault windows) places it on the prospective-overcurrent axis,
and a 30 mA device drawn there would be compared with a 16 A breaker as if 30 mA of load current
tripped it. A separate type makes that mix-up an error instead of a wrong verdict. (An RCBO is
two devices in one case: its overcurrent part is an MCB band, its residual part this band.)

Only the standard's limits are known, so a residual band is always the worst case (basis
``envelope``): a real device trips well inside them, but nothing in the standard says where.

Edges (``x = I_residual / IΔn``):

* Upper edge (maximum break time): ``inf`` below IΔn (the standard guarantees operation from
  IΔn only); then the IEC 61008-1 / 61009-1 limits as a staircase, each point's time held up to
  the next point (a device is only guaranteed to clear by the time stated at the point below):
  general type 0.3 s from IΔn, 0.15 s from 2 IΔn, 0.04 s from 5 IΔn; type S 0.5 / 0.2 / 0.15 s.
  For a general-type device with IΔn <= 30 mA the 0.04 s step starts at 0.25 A when that is above
  5 IΔn: from memory, IEC 61008-1 allows 0.25 A as the test current in place of 5 IΔn for these
  devices, so a compliant one is only shown to clear within 0.04 s from 0.25 A (the safe side).
  Above the last point the last time holds (from memory, the standard's tests at larger fixed
  residual currents, up to 500 A, state the same limits as at 5 IΔn).
* Lower edge (minimum non-actuating time): ``inf`` at and below 0.5 IΔn (no operation there);
  above it, for a general type, the time floor (the standard states no non-actuating time for
  it: it may operate at once). For type S the minimum non-actuating times 0.13 s at IΔn, 0.06 s
  at 2 IΔn and 0.05 s at 5 IΔn, each taken back to the point below (a device's non-actuating
  time does not rise with residual current, so at I <= 2 IΔn it is at least the 2 IΔn value, and
  so on; common practice), the 5 IΔn value held above.
* Adjustable delay ``delay_s`` (residual-current relays and breakers with residual-current
  protection, IEC 60947-2 Annex B / Annex M, from memory): lower edge the set delay above
  0.5 IΔn (the limiting non-actuating time is the set delay, from memory); upper edge the set
  delay plus the general type's maximum break time at that current (a modelling choice: the
  delay, then a device no slower than an undelayed one; the maker's stated break time governs).

The waveform (AC, A, F, B) is validated and kept: the limits above are for sinusoidal residual
current. For pulsating direct residual current (types A, F, B) the standard tests at other
multiples (from memory: 1.4 IΔn and 2 IΔn), which are not modelled; a note on the band says so.

References
----------
IEC 61008-1 and IEC 61009-1, table of limit values of break time and non-actuating time for
alternating residual currents (general and type S); IEC 60947-2 Annex B and Annex M
(residual-current relays and breakers, from memory); IEC 60364-4-41, 411.5.3 (RA x IΔn <= 50 V);
IEC 60364-5-53 (selectivity between RCDs in series, from memory).
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

import numpy as np

from curves.band import TIME_FLOOR_S, as_current, merged_grid
from curves.errors import InputError
from curves.validate import positive_number

#: Rated residual operating currents IΔn [mA]: 6..500 mA the IEC 61008-1 / 61009-1 preferred
#: values (from memory); 1..30 A the settings of residual-current relays (IEC 60947-2 Annex M,
#: common practice).
RCD_IDN_MA = (6, 10, 30, 100, 300, 500, 1000, 3000, 5000, 10000, 30000)

#: Waveforms of residual current a device is rated for (IEC 61008-1 / 61009-1 types AC and A,
#: IEC 62423 types F and B).
WAVEFORMS = ("AC", "A", "F", "B")

#: No operation at or below this multiple of IΔn (IEC 61008-1, rated residual non-operating
#: current 0.5 IΔn).
NON_OPERATING_X = 0.5

#: Multiples of IΔn at which the standard states times (IEC 61008-1 / 61009-1).
TIME_POINTS_X = (1.0, 2.0, 5.0)

#: General type, maximum break time [s] at IΔn, 2 IΔn, 5 IΔn (IEC 61008-1 / 61009-1).
GENERAL_BREAK_MAX_S = (0.3, 0.15, 0.04)

#: Type S, maximum break time [s] at IΔn, 2 IΔn, 5 IΔn (IEC 61008-1 / 61009-1).
S_BREAK_MAX_S = (0.5, 0.2, 0.15)

#: Type S, minimum non-actuating time [s] at IΔn, 2 IΔn, 5 IΔn (IEC 61008-1 / 61009-1).
S_NON_ACTUATING_MIN_S = (0.13, 0.06, 0.05)

#: General type with IΔn at or below this [A]: the 5 IΔn test may be made at
#: :data:`SMALL_IDN_FAST_TEST_A` instead (IEC 61008-1, from memory).
SMALL_IDN_A = 0.030
#: The alternative test current for the 0.04 s limit of small general-type devices [A]
#: (IEC 61008-1, from memory).
SMALL_IDN_FAST_TEST_A = 0.25

#: Type S devices exist only above this IΔn [A] (IEC 61008-1, from memory).
S_MIN_IDN_A = 0.030

#: Largest adjustable delay accepted [s] (residual-current relays offer delays up to a few
#: seconds, common practice; a longer delay is refused as a likely unit mistake).
MAX_DELAY_S = 10.0

#: Touch-voltage limit of IEC 60364-4-41, 411.5.3: RA x IΔn <= 50 V [V].
TOUCH_VOLTAGE_LIMIT_V = 50.0

#: Standing leakage allowed, as a fraction of IΔn (common practice; BS 7671 531.3.2, from
#: memory).
LEAKAGE_FRACTION = 0.30

#: Least IΔn ratio upstream / downstream for selectivity (IEC 60364-5-53, from memory).
SELECTIVITY_RATIO = 3.0


@dataclass(frozen=True)
class RcdSettings:
    """What defines a residual-current device.

    Parameters
    ----------
    idn_a : float
        Rated residual operating current IΔn [A], one of :data:`RCD_IDN_MA` / 1000.
    selective : bool
        Type S (time-delayed, IEC 61008-1 / 61009-1); only for IΔn above 30 mA.
    waveform : str
        ``"AC"``, ``"A"``, ``"F"`` or ``"B"``.
    delay_s : float
        Adjustable delay [s] of a residual-current relay (IEC 60947-2 Annex M), 0 for none;
        not with ``selective``.

    Raises
    ------
    InputError
        A value out of range, with its key (``idn_ma``, ``selective``, ``waveform``,
        ``delay_s``) and what is allowed.

    Examples
    --------
    >>> print(RcdSettings(idn_a=0.03).idn_a)
    0.03
    """

    idn_a: float
    selective: bool = False
    waveform: str = "A"
    delay_s: float = 0.0

    def __post_init__(self) -> None:
        idn_ma = positive_number("idn_ma", self.idn_a) * 1000.0
        allowed = ", ".join(f"{v:g}" for v in RCD_IDN_MA)
        match = [v for v in RCD_IDN_MA if math.isclose(idn_ma, v, rel_tol=1e-9)]
        if not match:
            raise InputError(f"IΔn = {idn_ma:g} mA is not a rated residual operating current; "
                             f"allowed: {allowed} mA", key="idn_ma")
        object.__setattr__(self, "idn_a", match[0] / 1000.0)
        if not isinstance(self.selective, bool):
            raise InputError(f"selective = {self.selective!r} is not allowed; give true (type S) "
                             "or false (general type)", key="selective")
        if self.selective and self.idn_a <= S_MIN_IDN_A:
            raise InputError(f"type S is made only for IΔn above {S_MIN_IDN_A * 1000:g} mA "
                             f"(IEC 61008-1), not {idn_ma:g} mA; allowed: selective = false",
                             key="selective")
        if self.waveform not in WAVEFORMS:
            raise InputError(f"waveform {self.waveform!r} is not known; allowed: "
                             f"{', '.join(WAVEFORMS)}", key="waveform")
        delay = positive_number("delay_s", self.delay_s, allow_zero=True)
        if delay > MAX_DELAY_S:
            raise InputError(f"delay_s = {delay:g} s is not allowed; give 0 .. {MAX_DELAY_S:g} s",
                             key="delay_s")
        if delay > 0 and self.selective:
            raise InputError("delay_s and selective both given: a type S device's delay is fixed "
                             "by IEC 61008-1; give selective = true or delay_s > 0, not both",
                             key="delay_s")
        object.__setattr__(self, "delay_s", delay)

    @property
    def delayed(self) -> bool:
        """Type S or an adjustable delay above zero."""
        return self.selective or self.delay_s > 0


def fast_step_x(idn_a: float, selective: bool) -> float:
    """Multiple of IΔn from which the shortest maximum break time applies [-].

    5 IΔn; for a general-type device with IΔn <= 30 mA, 0.25 A / IΔn where that is larger
    (IEC 61008-1 allows the 0.25 A test in place of 5 IΔn there, from memory).

    Examples
    --------
    >>> print(round(fast_step_x(0.03, False), 3), fast_step_x(0.1, False))
    8.333 5.0
    """
    x5 = TIME_POINTS_X[2]
    if not selective and idn_a <= SMALL_IDN_A * (1 + 1e-9):
        return max(x5, SMALL_IDN_FAST_TEST_A / idn_a)
    return x5


def break_time_max(x: np.ndarray, *, selective: bool, delay_s: float = 0.0,
                   fast_x: float = 5.0) -> np.ndarray:
    """Maximum break time [s] at residual current ``x`` [multiples of IΔn]; ``inf`` below IΔn.

    A staircase: the time of each point of the standard held up to the next one.

    Parameters
    ----------
    x : ndarray
        Residual current / IΔn [-].
    selective : bool
        Type S limits when true, general type when false.
    delay_s : float
        Adjustable delay [s] added to the general type's limits (modelling choice).
    fast_x : float
        Multiple from which the last limit applies (:func:`fast_step_x`).

    References
    ----------
    IEC 61008-1 / 61009-1, limit values of break time for alternating residual currents.

    Examples
    --------
    >>> print(break_time_max(np.array([0.9, 1.0, 1.9, 2.0, 5.0, 50.0]), selective=False))
    [ inf 0.3  0.3  0.15 0.04 0.04]
    """
    t1, t2, t5 = S_BREAK_MAX_S if selective else GENERAL_BREAK_MAX_S
    x = np.asarray(x, dtype=np.float64)
    t = np.select([x < TIME_POINTS_X[0], x < TIME_POINTS_X[1], x < fast_x], [np.inf, t1, t2], t5)
    return t + delay_s


def non_actuating_time_min(x: np.ndarray, *, selective: bool,
                           delay_s: float = 0.0) -> np.ndarray:
    """Minimum non-actuating time [s] at residual current ``x`` [multiples of IΔn].

    ``inf`` at and below 0.5 IΔn. Above it: the set delay when ``delay_s > 0``; for type S the
    stated times taken back to the point below (0.13 s up to IΔn, 0.06 s up to 2 IΔn, 0.05 s
    above); for a general type the time floor (it may operate at once).

    References
    ----------
    IEC 61008-1 / 61009-1, limit values of non-actuating time (type S) and rated residual
    non-operating current 0.5 IΔn; IEC 60947-2 Annex M (set delay, from memory).

    Examples
    --------
    >>> print(non_actuating_time_min(np.array([0.5, 0.6, 1.0, 1.5, 3.0, 9.0]), selective=True))
    [ inf 0.13 0.13 0.06 0.05 0.05]
    """
    x = np.asarray(x, dtype=np.float64)
    if delay_s > 0:
        t = np.full(x.shape, delay_s)
    elif selective:
        t1, t2, t5 = S_NON_ACTUATING_MIN_S
        t = np.select([x <= TIME_POINTS_X[0], x <= TIME_POINTS_X[1]], [t1, t2], t5)
    else:
        t = np.full(x.shape, TIME_FLOOR_S)
    return np.where(x <= NON_OPERATING_X, np.inf, t)


@dataclass(frozen=True, eq=False)
class ResidualBand:
    """A residual-current device as a band on the RESIDUAL-current axis.

    Parameters
    ----------
    name : str
        What a person reads, e.g. ``"RCD 30 mA type A"``.
    settings : RcdSettings
        IΔn, type S, waveform, delay.
    lower : callable
        ``t_min(I)`` [s] over residual current [A]; ``inf`` where it never operates.
    upper : callable
        ``t_max(I)`` [s] over residual current [A]; ``inf`` where it may never operate.
    breakpoints_a : tuple of float
        Residual currents [A] where an edge steps (both edges are constant between them).
    key : tuple
        Identity (every setting).
    notes : tuple of str
        Assumptions a designer should read.
    """

    name: str
    settings: RcdSettings
    lower: Callable[[np.ndarray], np.ndarray] = field(repr=False)
    upper: Callable[[np.ndarray], np.ndarray] = field(repr=False)
    breakpoints_a: tuple[float, ...] = ()
    key: tuple = ()
    notes: tuple[str, ...] = ()
    family: str = "rcd"
    basis: str = "envelope"

    def __eq__(self, other: object) -> bool:
        return self is other or (isinstance(other, ResidualBand) and self.key == other.key)

    def __hash__(self) -> int:
        return hash(self.key)

    @property
    def idn_a(self) -> float:
        """Rated residual operating current IΔn [A]."""
        return self.settings.idn_a

    @property
    def pickup_min_a(self) -> float:
        """Residual current [A] at and below which the device never operates (0.5 IΔn)."""
        return NON_OPERATING_X * self.settings.idn_a

    @property
    def pickup_max_a(self) -> float:
        """Residual current [A] from which it always operates (IΔn)."""
        return self.settings.idn_a

    @property
    def setting_items(self) -> Mapping[str, Any]:
        """The settings with units in their keys (``idn_ma``, ``selective``, ...)."""
        s = self.settings
        return MappingProxyType({"idn_ma": round(s.idn_a * 1000.0, 9), "selective": s.selective,
                                 "waveform": s.waveform, "delay_s": s.delay_s})

    def t_min(self, residual_a: Any) -> np.ndarray:
        """Lower edge [s]: will not operate before; ``inf`` for never."""
        return self.lower(as_current(residual_a))

    def t_max(self, residual_a: Any) -> np.ndarray:
        """Upper edge [s]: has cleared by; ``inf`` for maybe never."""
        return self.upper(as_current(residual_a))


def rcd_band(idn_ma: float, selective: bool = False, waveform: str = "A",
             delay_s: float = 0.0) -> ResidualBand:
    """A residual-current device as a :class:`ResidualBand` (worst case of the standard).

    Parameters
    ----------
    idn_ma : float
        Rated residual operating current IΔn [mA], one of :data:`RCD_IDN_MA`.
    selective : bool
        Type S (time-delayed) per IEC 61008-1 / 61009-1.
    waveform : str
        ``"AC"``, ``"A"``, ``"F"`` or ``"B"`` (kept; the times are for sinusoidal current).
    delay_s : float
        Adjustable delay [s] of a residual-current relay (IEC 60947-2 Annex M, from memory).

    Returns
    -------
    ResidualBand
        Edges over residual current [A] (see the module docstring).

    Raises
    ------
    InputError
        Bad input, with the key and what is allowed.

    References
    ----------
    IEC 61008-1 / 61009-1, limit values of break and non-actuating times; IEC 60947-2 Annex M
    (from memory).

    Examples
    --------
    >>> band = rcd_band(30)
    >>> print(float(band.t_max(0.03)), float(band.t_max(0.06)), float(band.t_min(0.015)))
    0.3 0.15 inf
    """
    if isinstance(idn_ma, bool) or not isinstance(idn_ma, numbers.Real):
        raise InputError(f"idn_ma must be a number of milliamperes, not {idn_ma!r}; allowed: "
                         + ", ".join(f"{v:g}" for v in RCD_IDN_MA) + " mA", key="idn_ma")
    s = RcdSettings(idn_a=float(idn_ma) / 1000.0, selective=selective, waveform=waveform,
                    delay_s=delay_s)
    idn = s.idn_a
    fast_x = fast_step_x(idn, s.selective)
    inv = 1.0 / idn

    def lower(residual_a: np.ndarray) -> np.ndarray:
        return non_actuating_time_min(residual_a * inv, selective=s.selective, delay_s=s.delay_s)

    def upper(residual_a: np.ndarray) -> np.ndarray:
        return break_time_max(residual_a * inv, selective=s.selective, delay_s=s.delay_s,
                              fast_x=fast_x)

    kind = "type S" if s.selective else ("delayed" if s.delay_s > 0 else "general")
    notes = [
        "residual-current axis: times against residual (earth-leakage) current, not overcurrent",
        "worst case of IEC 61008-1 / 61009-1: each stated time held up to the next test point; "
        "no operation at or below 0.5 IΔn",
    ]
    if s.selective:
        notes.append("type S: minimum non-actuating time 0.13 s up to IΔn, 0.06 s up to "
                     "2 IΔn, 0.05 s above (each point's time taken back to the point below)")
    elif s.delay_s > 0:
        notes.append(f"delay {s.delay_s:g} s (IEC 60947-2 Annex M, from memory): no operation "
                     "before the delay; cleared by the delay plus the general type's break time "
                     "(modelling choice; the maker's stated break time governs)")
    else:
        notes.append("general type: no minimum non-actuating time; it may operate at once above "
                     "0.5 IΔn")
    if fast_x > TIME_POINTS_X[2]:
        notes.append(f"0.04 s only from {SMALL_IDN_FAST_TEST_A:g} A ({fast_x:.3g} IΔn): "
                     "IEC 61008-1 allows that test current in place of 5 IΔn (from memory)")
    notes.append("above the last test point its time is held (assumption; from memory the "
                 "standard's larger fixed test currents state the same limits)")
    if s.waveform != "AC":
        notes.append(f"waveform {s.waveform}: times for sinusoidal residual current; pulsating "
                     "or smooth d.c. residual current is tested at other multiples (not modelled)")
    multiples = {NON_OPERATING_X, *TIME_POINTS_X, fast_x}
    breakpoints = tuple(float(v) for v in merged_grid([m * idn for m in multiples]))
    label = f"RCD {idn * 1000:g} mA type {s.waveform}" + (
        " S" if s.selective else (f" delay {s.delay_s:g} s" if s.delay_s > 0 else ""))
    return ResidualBand(
        name=label,
        settings=s,
        lower=lower,
        upper=upper,
        breakpoints_a=breakpoints,
        key=("rcd", idn, s.selective, s.waveform, s.delay_s, kind),
        notes=tuple(notes),
    )


@dataclass(frozen=True)
class ResidualSelectivity:
    """The verdict on two RCDs in series.

    Attributes
    ----------
    verdict : str
        ``"total"`` or ``"none"`` (an RCD pair has no partial selectivity to report: a residual
        current is not limited by the installation's fault level).
    reason : str
        One line saying why, naming its source.
    decided_by : str
        ``"limits"`` (the IEC 61008-1 / 61009-1 limit values show it at every residual current),
        ``"rule"`` (the IEC 60364-5-53 conditions are met but the limit values alone do not show
        it everywhere) or ``"conditions"`` (a condition of the rule is not met).
    """

    verdict: str
    reason: str
    decided_by: str


def residual_selective(upstream: ResidualBand, downstream: ResidualBand) -> ResidualSelectivity:
    """Whether an upstream RCD stays closed while a downstream one clears any residual current.

    IEC 60364-5-53 (from memory) makes two RCDs in series selective when the upstream is type S
    or delayed and IΔn_up >= 3 IΔn_down. Where both hold, the limit values of IEC 61008-1 /
    61009-1 are compared as well: the upstream's minimum non-actuating time against the
    downstream's maximum break time at every residual current at which the upstream may operate
    (both edges are staircases, so checking at every step and just above it is exact).

    * a condition of the rule not met: ``"none"``;
    * the limit values show it everywhere: ``"total"``, decided by the limits;
    * the rule met but the limits alone leave a range unproven (a general 30 mA device below a
      100 mA type S may take 0.3 s at 50..60 mA where the type S may act after 0.13 s):
      ``"total"`` by the installation rule, and the reason names the unproven range and asks
      for the makers' data. Selectivity decides which device opens, never whether the fault is
      cleared, so the rule the installation standard states is taken, and said.

    Parameters
    ----------
    upstream, downstream : ResidualBand
        The two devices in series (downstream nearer the load).

    Returns
    -------
    ResidualSelectivity

    References
    ----------
    IEC 60364-5-53 (RCDs in series: type S or delayed, IΔn ratio at least 3; from memory);
    IEC 61008-1 / 61009-1 limit values of break and non-actuating time.

    Examples
    --------
    >>> print(residual_selective(rcd_band(500, selective=True), rcd_band(30)).verdict)
    total
    >>> print(residual_selective(rcd_band(100, selective=True), rcd_band(30)).decided_by)
    rule
    """
    up, down = upstream.settings, downstream.settings
    if not up.delayed:
        return ResidualSelectivity("none", (
            f"upstream {upstream.name} is a general type with no minimum non-actuating time "
            "(IEC 61008-1); selectivity needs type S or a delay (IEC 60364-5-53, from memory)"),
            "conditions")
    ratio = up.idn_a / down.idn_a
    if ratio < SELECTIVITY_RATIO * (1 - 1e-9):
        return ResidualSelectivity("none", (
            f"IΔn ratio {ratio:.3g} is below {SELECTIVITY_RATIO:g} ({upstream.name} over "
            f"{downstream.name}; IEC 60364-5-53, from memory)"), "conditions")
    steps = np.array(upstream.breakpoints_a + downstream.breakpoints_a)
    grid = merged_grid(steps, steps * (1 + 1e-9), [steps.max() * 10.0])
    t_up, t_down = upstream.t_min(grid), downstream.t_max(grid)
    ok = np.isinf(t_up) | (t_up > t_down)
    if ok.all():
        return ResidualSelectivity("total", (
            f"{upstream.name} waits longer than {downstream.name} takes to clear at every "
            f"residual current (IEC 61008-1 limits; IΔn ratio {ratio:.3g})"), "limits")
    bad = np.flatnonzero(~ok)
    first, last = int(bad[0]), int(bad[-1])
    # edges are constant between grid points: the gap runs up to the next point checked
    end = f"{grid[last + 1] * 1000:.4g} mA" if last + 1 < grid.size else "beyond"
    return ResidualSelectivity("total", (
        f"selective by the IEC 60364-5-53 rule ({upstream.name} is time-delayed, IΔn ratio "
        f"{ratio:.3g} >= {SELECTIVITY_RATIO:g}; from memory); the IEC 61008-1 limit values "
        f"alone leave just above {grid[first] * 1000:.4g} mA to {end} unproven "
        f"({upstream.name} may act after {t_up[first]:g} s, {downstream.name} may take "
        f"{t_down[first]:g} s): confirm with the makers' data"), "rule")


def touch_voltage_ok(ra_ohm: float, idn_a: float) -> tuple[bool, float]:
    """IEC 60364-4-41, 411.5.3 (TT systems): RA x IΔn <= 50 V.

    Parameters
    ----------
    ra_ohm : float
        Sum of the resistances of the earth electrode and the protective conductor to the
        exposed-conductive-parts [ohm].
    idn_a : float
        Rated residual operating current IΔn [A].

    Returns
    -------
    (ok, value_v) : tuple
        Whether the condition holds, and RA x IΔn [V].

    Examples
    --------
    >>> print(touch_voltage_ok(200.0, 0.03))
    (True, 6.0)
    """
    ra = positive_number("ra_ohm", ra_ohm)
    idn = positive_number("idn_a", idn_a)
    value = ra * idn
    return value <= TOUCH_VOLTAGE_LIMIT_V, value


def leakage_ok(leakage_ma: float, idn_ma: float) -> tuple[bool, float]:
    """Standing leakage at most 30 % of IΔn (common practice; BS 7671 531.3.2, from memory).

    Parameters
    ----------
    leakage_ma : float
        Expected standing protective-conductor current of the circuits downstream [mA].
    idn_ma : float
        Rated residual operating current IΔn [mA].

    Returns
    -------
    (ok, limit_ma) : tuple
        Whether the leakage is within the limit, and the limit [mA].

    Examples
    --------
    >>> print(leakage_ok(12.0, 30.0))
    (False, 9.0)
    """
    leakage = positive_number("leakage_ma", leakage_ma, allow_zero=True)
    limit = LEAKAGE_FRACTION * positive_number("idn_ma", idn_ma)
    return leakage <= limit, limit
