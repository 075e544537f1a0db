"""Motor circuits and inrush loads: the start as a current profile, and whether any device on the
way from the supply operates during it.

A motor started direct-on-line draws several times its full-load current (FLC) for seconds, and
the first half-cycle carries a DC offset on top of that. A device that is right for the running
current may still operate during the start: a type D MCB carrying 5 In trips in one or two
seconds on its own thermal band, whatever the motor's start lasts. This module states the start
and the test, as pure functions of bands and a start profile; the study layer reads the study
file's ``motor`` and ``inrush`` tables into :class:`Motor` and :class:`Inrush` and gives each
device on the chain the current it carries.

The start (a rectangular profile, the trip side of a real start whose current falls as the motor
runs up; common practice):

``dol``
    ``start_x x FLC`` for ``start_s``.
``star-delta``
    A third of the direct-on-line current (the windings see 1/sqrt(3) of the voltage in star;
    common practice), for ``start_s``; ``start_x`` stays the motor's direct-on-line multiple.
    The changeover transient from star to delta is not modelled.
``soft``
    ``start_x x FLC`` as the designer gives it (the soft starter's current limit).

The first peak: the DC offset of the first half-cycle makes it about 1.7 to 2 times the r.m.s.
start current (common practice); :data:`PEAK_FACTOR` takes the safe end, 2.0, for every kind of
start (a soft starter's voltage ramp usually removes most of the offset; keeping 2.0 there is on
the trip side). An inrush load (a transformer, a capacitor bank) is given by its first peak as a
multiple of its running current, ``x``, for ``s`` seconds, as makers quote inrush; that peak is
also taken as the r.m.s. level over ``s`` (an upper bound, the trip side).

The test (:func:`starting_verdict`): each device on the chain, from the circuit's own up to the
origin, carries the start current plus the running load of the board it feeds (its circuit's
Ib; for an ancestor whose Ib counts the motor's FLC this counts the motor twice: the trip side).
It does not operate during the start when its lower edge ``t_min`` at that current is at least
the start time, on the study's selectivity basis; and the first peak stays at or below its lowest
instantaneous pickup, an r.m.s. setting compared here with a peak (the safe side by up to
sqrt(2)). The lower edges are those of a device started cold; a device already warm from its
running load trips sooner (not modelled, said in every verdict).

References
----------
IEC 60947-4-1 (starters, overload relays); IEC 60364-5-55 / IEC 60364-4-43 (a motor circuit's
protection must carry the start); the start current's first peak and the star-delta ratio are
common practice.

Examples
--------
>>> from curves.spec import band_from_spec
>>> start = motor_start(Motor(flc_a=22.0, start_x=7.0, start_s=6.0))
>>> verdict = starting_verdict(start, [ChainDevice("pump", band_from_spec("D32"))])
>>> print(verdict.ok, verdict.binding.circuit, round(verdict.binding.t_min_s, 2))
False pump 1.57
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from curves.band import Band
from curves.errors import InputError
from curves.validate import real

#: First peak of a motor's start over its r.m.s. start current: the DC offset of the first
#: half-cycle gives about 1.7-2 (common practice); the safe end.
PEAK_FACTOR = 2.0
#: Where :data:`PEAK_FACTOR` comes from, as the outputs say it.
PEAK_FACTOR_SOURCE = ("first peak 2.0 x the r.m.s. start current (DC offset; 1.7-2 is common "
                      "practice, the safe end taken)")
#: Start current in star over the direct-on-line start current (common practice).
STAR_DELTA_FRACTION = 1.0 / 3.0
#: The ways of starting a motor the study file accepts.
STARTING_METHODS = ("dol", "star-delta", "soft")
#: Keys of a circuit's ``motor`` table, and of its ``inrush`` table.
MOTOR_KEYS = ("flc_a", "start_x", "start_s", "starting", "relay_class", "relay_ir_a")
INRUSH_KEYS = ("x", "s")
#: Allowed ranges (inclusive) of the free numbers: a start current of 1..20 FLC for up to
#: 10 min; an inrush of 1..50 times the running current for up to 60 s (wide enough for any
#: motor, transformer or capacitor bank we know of; narrower values would be a unit slip).
START_X_RANGE = (1.0, 20.0)
START_S_RANGE = (0.01, 600.0)
INRUSH_X_RANGE = (1.0, 50.0)
INRUSH_S_RANGE = (0.001, 60.0)
#: A device that does not operate before the start ends by this relative amount is taken as
#: not operating (float noise only).
TIME_RTOL = 1e-9
#: What every verdict says about the devices' thermal state.
COLD_NOTE = ("lower edges from cold: a device warm from its running load operates sooner "
             "(not modelled)")


@dataclass(frozen=True)
class Motor:
    """A motor on a circuit (the study file's ``motor`` table).

    Attributes
    ----------
    flc_a : float
        Full-load current [A].
    start_x : float
        Start current as a multiple of FLC [-] (direct-on-line value; for a soft start the
        starter's current limit).
    start_s : float
        Duration of the start [s].
    starting : str
        ``"dol"``, ``"star-delta"`` or ``"soft"``.
    relay_class : str or None
        Trip class of the overload relay (IEC 60947-4-1: ``"10A"``, ``"10"``, ``"20"``,
        ``"30"``), or None for no relay.
    relay_ir_a : float or None
        The relay's current setting Ir [A]; with a relay, FLC when not given.
    """

    flc_a: float
    start_x: float
    start_s: float
    starting: str = "dol"
    relay_class: str | None = None
    relay_ir_a: float | None = None


@dataclass(frozen=True)
class Inrush:
    """An inrush load on a circuit (the study file's ``inrush`` table).

    Attributes
    ----------
    x : float
        First peak of the inrush as a multiple of the circuit's running current Ib [-].
    s : float
        How long the inrush lasts [s].
    """

    x: float
    s: float


@dataclass(frozen=True)
class StartProfile:
    """The current a start draws, as the test takes it (rectangular: the trip side).

    Attributes
    ----------
    current_a : float
        r.m.s. current during the start [A].
    duration_s : float
        How long it lasts [s].
    peak_a : float
        First peak [A] (``peak_factor x current_a``).
    peak_factor : float
        First peak over r.m.s. current [-].
    running_a : float
        Current after the start [A] (the motor's FLC, the inrush load's Ib).
    kind : str
        ``"dol"``, ``"star-delta"``, ``"soft"`` or ``"inrush"``.
    notes : tuple of str
        Assumptions the output must say.
    """

    current_a: float
    duration_s: float
    peak_a: float
    peak_factor: float
    running_a: float
    kind: str
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class ChainDevice:
    """One device a start passes through.

    Attributes
    ----------
    circuit : str
        Id of the circuit whose device it is.
    band : Band
        The device on the study's selectivity basis.
    running_a : float
        Load it carries besides the start [A] (0 for the starting circuit's own device).
    envelope : Band, optional
        The same device on the envelope basis: its lowest instantaneous pickup is the one the
        peak is compared with, and its lower edge is reported beside the selectivity basis's.
        None: ``band`` alone.
    """

    circuit: str
    band: Band
    running_a: float = 0.0
    envelope: Band | None = None


@dataclass(frozen=True)
class DeviceAtStart:
    """What one device does during a start.

    Attributes
    ----------
    circuit, device : str
        Circuit id and the device's name.
    current_a : float
        r.m.s. current it carries during the start [A].
    t_min_s : float
        Its least operating time at that current on the selectivity basis [s] (``inf``: never).
    t_min_envelope_s : float
        The same on the envelope basis [s] (the standard's worst case).
    peak_a : float
        First peak it sees [A] (the start's peak plus its running load).
    instantaneous_a : float or None
        Its lowest instantaneous pickup [A]; None: it has no instantaneous release.
    holds_time : bool
        ``t_min_s >= duration``.
    holds_peak : bool
        ``peak_a <= instantaneous_a`` (True with no instantaneous release): a release does not
        act at its lower pickup limit itself (IEC 60898-1 test d, IEC 60947-2 at 0.8 Ii).
    relay : bool
        The device is a motor's overload relay joined with its short-circuit device.
    """

    circuit: str
    device: str
    current_a: float
    t_min_s: float
    t_min_envelope_s: float
    peak_a: float
    instantaneous_a: float | None
    holds_time: bool
    holds_peak: bool
    relay: bool = False

    @property
    def holds(self) -> bool:
        return self.holds_time and self.holds_peak


@dataclass(frozen=True)
class StartingVerdict:
    """The outcome of a start over a chain of devices.

    Attributes
    ----------
    ok : bool
        No device operates during the start.
    profile : StartProfile
    devices : tuple of DeviceAtStart
        From the starting circuit's own device up to the origin.
    binding : DeviceAtStart
        The first device that operates, else the one with the least time to spare.
    basis : str
        Basis of the bands on which the time test ran.
    """

    ok: bool
    profile: StartProfile
    devices: tuple[DeviceAtStart, ...]
    binding: DeviceAtStart
    basis: str

    def reason(self) -> str:
        """One line a designer can act on."""
        p, b = self.profile, self.binding
        factor = ("as given" if p.kind == "inrush" else
                  f"{p.peak_factor:g} x r.m.s., common practice")
        what = (f"start {_a(p.current_a)} for {p.duration_s:g} s ({p.kind}), first peak "
                f"{_a(p.peak_a)} ({factor})")
        if not b.holds_time:
            fix = ("an overload relay of a higher trip class (IEC 60947-4-1: 20 or 30 for a "
                   "heavy start)" if b.relay else "a device with a later band at that current")
            return (f"{what}: {b.device} ({b.circuit}) carries {_a(b.current_a)} and may "
                    f"operate after {b.t_min_s:.3g} s, before the start ends "
                    f"({self.basis} basis); choose {fix}, or a shorter or softer start")
        if not b.holds_peak:
            return (f"{what}: {b.device} ({b.circuit}) sees a first peak of {_a(b.peak_a)}, "
                    f"above its lowest instantaneous pickup {_a(b.instantaneous_a)}; choose a "
                    "higher instantaneous pickup or a start with a lower current")
        spare = (f"the closest, {b.device} ({b.circuit}), waits {b.t_min_s:.3g} s at "
                 f"{_a(b.current_a)}" if math.isfinite(b.t_min_s) else
                 "no device's band reaches the start current")
        text = f"{what}: no device operates ({self.basis} basis); {spare}"
        worst = min(d.t_min_envelope_s for d in self.devices)
        if self.basis != "envelope" and worst < p.duration_s:
            text += (f"; on the envelope basis (the standard's limits alone) a compliant device "
                     f"may operate after {worst:.3g} s: verify with the maker's curve")
        return text

    def details(self) -> dict[str, Any]:
        """Numbers for the JSON output and the report, units in their keys."""
        p, b = self.profile, self.binding
        return {
            "starting": p.kind,
            "start_current_a": p.current_a,
            "start_s": p.duration_s,
            "peak_a": p.peak_a,
            "peak_x": p.peak_factor,
            "binding_circuit": b.circuit,
            "binding_current_a": b.current_a,
            "binding_t_min_s": b.t_min_s,
            "binding_peak_a": b.peak_a,
            "instantaneous_min_a": b.instantaneous_a,
            "notes": "; ".join((*p.notes, COLD_NOTE)),
        }


def _a(current_a: float | None) -> str:
    if current_a is None:
        return "-"
    return f"{current_a / 1000:.3g} kA" if current_a >= 10000 else f"{current_a:.4g} A"


# ---------------------------------------------------------------------------------------------
# the study file's tables
def _ranged(table: Mapping[str, Any], key: str, bounds: tuple[float, float],
            what: str) -> float:
    value = table[key]
    number = real(value)
    lo, hi = bounds
    if number is None or not math.isfinite(number) or not lo <= number <= hi:
        raise InputError(f"{key} = {value!r} is not allowed; give {what} from {lo:g} to {hi:g}",
                         key=key)
    return number


def _unknown_keys(table: Mapping[str, Any], allowed: tuple[str, ...], required: tuple[str, ...],
                  name: str) -> None:
    if not isinstance(table, Mapping):
        raise InputError(f"{name} must be a table {{{', '.join(allowed)}}}, not {table!r}")
    for key in table:
        if key not in allowed:
            raise InputError(f"unknown key {key!r} in {name}; allowed: {', '.join(allowed)}",
                             key=str(key))
    for key in required:
        if key not in table:
            raise InputError(f"{name} needs {key}; keys: {', '.join(allowed)}", key=key)


def motor_from_table(table: Mapping[str, Any]) -> Motor:
    """A :class:`Motor` from the study file's ``motor`` table, checked.

    Parameters
    ----------
    table : mapping
        ``flc_a`` [A], ``start_x`` [-], ``start_s`` [s] (required); ``starting`` (``"dol"``,
        default), ``relay_class`` (IEC 60947-4-1 trip class), ``relay_ir_a`` [A] (with a relay;
        default FLC).

    Raises
    ------
    InputError
        An unknown or missing key, a value out of range, a relay setting without a class; the
        key is relative to the table (``"start_x"``).

    References
    ----------
    IEC 60947-4-1, trip classes of overload relays.

    Examples
    --------
    >>> m = motor_from_table({"flc_a": 20, "start_x": 6, "start_s": 3, "relay_class": 10})
    >>> print(m.relay_class, m.relay_ir_a, m.starting)
    10 20.0 dol
    """
    from curves.relay import trip_class
    from curves.validate import positive_number

    _unknown_keys(table, MOTOR_KEYS, ("flc_a", "start_x", "start_s"), "motor")
    flc = positive_number("flc_a", table["flc_a"])
    start_x = _ranged(table, "start_x", START_X_RANGE, "a multiple of the full-load current")
    start_s = _ranged(table, "start_s", START_S_RANGE, "a time in seconds")
    starting = table.get("starting", "dol")
    if not isinstance(starting, str) or starting.strip().lower() not in STARTING_METHODS:
        raise InputError(f"starting = {starting!r} is not known; allowed: "
                         f"{', '.join(STARTING_METHODS)}", key="starting")
    relay_class = None
    if "relay_class" in table:
        try:
            relay_class = trip_class(table["relay_class"]).name
        except InputError as error:
            raise InputError(error.problem, key="relay_class") from None
    relay_ir = None
    if "relay_ir_a" in table:
        if relay_class is None:
            raise InputError("relay_ir_a needs relay_class (IEC 60947-4-1: 10A, 10, 20 or 30)",
                             key="relay_ir_a")
        relay_ir = positive_number("relay_ir_a", table["relay_ir_a"])
    elif relay_class is not None:
        relay_ir = flc
    return Motor(flc, start_x, start_s, starting.strip().lower(), relay_class, relay_ir)


def inrush_from_table(table: Mapping[str, Any]) -> Inrush:
    """An :class:`Inrush` from the study file's ``inrush`` table, checked.

    Parameters
    ----------
    table : mapping
        ``x``: first peak as a multiple of the circuit's Ib [-]; ``s``: duration [s].

    Raises
    ------
    InputError
        An unknown or missing key, or a value out of range.

    Examples
    --------
    >>> print(inrush_from_table({"x": 12, "s": 0.1}))
    Inrush(x=12.0, s=0.1)
    """
    _unknown_keys(table, INRUSH_KEYS, INRUSH_KEYS, "inrush")
    return Inrush(_ranged(table, "x", INRUSH_X_RANGE, "a multiple of the circuit's load_a"),
                  _ranged(table, "s", INRUSH_S_RANGE, "a time in seconds"))


# ---------------------------------------------------------------------------------------------
# the start
def start_current_a(flc_a: float, start_x: float, starting: str) -> float:
    """r.m.s. start current [A].

    ``start_x x FLC`` direct-on-line or soft; a third of it in star-delta (common practice).

    Parameters
    ----------
    flc_a : float
        Full-load current [A].
    start_x : float
        Start current as a multiple of FLC [-] (the direct-on-line value for star-delta).
    starting : str
        One of :data:`STARTING_METHODS`.

    References
    ----------
    Star-delta: line current in star one third of the direct-on-line value (common practice).

    Examples
    --------
    >>> print(start_current_a(30.0, 7.0, "dol"), start_current_a(30.0, 7.0, "star-delta"))
    210.0 70.0
    """
    if starting not in STARTING_METHODS:
        raise InputError(f"starting {starting!r} is not known; allowed: "
                         f"{', '.join(STARTING_METHODS)}", key="starting")
    current = flc_a * start_x
    return current * STAR_DELTA_FRACTION if starting == "star-delta" else current


def motor_start(motor: Motor) -> StartProfile:
    """A motor's start as a :class:`StartProfile`.

    References
    ----------
    First peak and star-delta ratio: common practice (see the module docstring).

    Examples
    --------
    >>> p = motor_start(Motor(flc_a=10.0, start_x=6.0, start_s=5.0))
    >>> print(p.current_a, p.peak_a, p.duration_s)
    60.0 120.0 5.0
    """
    current = start_current_a(motor.flc_a, motor.start_x, motor.starting)
    notes = [PEAK_FACTOR_SOURCE, "the start current held for the whole start (rectangular; the "
             "trip side)"]
    if motor.starting == "star-delta":
        notes.append("star-delta: a third of the direct-on-line current (common practice); the "
                     "changeover transient is not modelled")
    elif motor.starting == "soft":
        notes.append("soft start: the current limit given; the peak factor kept (the trip side)")
    return StartProfile(current, motor.start_s, PEAK_FACTOR * current, PEAK_FACTOR, motor.flc_a,
                        motor.starting, tuple(notes))


def inrush_start(inrush: Inrush, load_a: float) -> StartProfile:
    """An inrush load's start as a :class:`StartProfile`: its first peak ``x Ib``, taken also as
    the r.m.s. level over ``s`` (an upper bound, the trip side); peak factor 1.

    Parameters
    ----------
    inrush : Inrush
    load_a : float
        The circuit's running current Ib [A].

    Examples
    --------
    >>> p = inrush_start(Inrush(x=12.0, s=0.1), 50.0)
    >>> print(p.current_a, p.peak_a, p.peak_factor)
    600.0 600.0 1.0
    """
    peak = inrush.x * load_a
    notes = ("inrush x is its first peak as a multiple of Ib (as makers quote it), also taken as "
             "the r.m.s. level for the whole s (an upper bound, the trip side)",)
    return StartProfile(peak, inrush.s, peak, 1.0, load_a, "inrush", notes)


# ---------------------------------------------------------------------------------------------
# the test
def device_at_start(profile: StartProfile, device: ChainDevice) -> DeviceAtStart:
    """What one device does during a start.

    Parameters
    ----------
    profile : StartProfile
    device : ChainDevice

    Returns
    -------
    DeviceAtStart
        Its current (the start plus its running load), its least operating time there on both
        bases, its first peak (the start's peak plus its running load at its r.m.s. value) and
        whether it holds.

    References
    ----------
    The device's lower edge ("will not operate before"), as its standard bounds it
    (IEC 60898-1, IEC 60269-1/-2, IEC 60947-2, IEC 60947-4-1).

    Examples
    --------
    >>> from curves.spec import band_from_spec
    >>> at = device_at_start(motor_start(Motor(10.0, 6.0, 5.0)),
    ...                      ChainDevice("feeder", band_from_spec("gG63"), running_a=30.0))
    >>> print(at.current_a, at.holds)
    90.0 True
    """
    current = profile.current_a + device.running_a
    i = np.array(current, dtype=np.float64)
    t_min = float(device.band.t_min(i))
    envelope = device.envelope or device.band
    t_env = float(envelope.t_min(i))
    pickups = [p for p in (device.band.instantaneous_a, envelope.instantaneous_a)
               if p is not None]
    pickup = min(pickups) if pickups else None
    peak = profile.peak_a + device.running_a
    holds_time = t_min >= profile.duration_s * (1 - TIME_RTOL)
    holds_peak = pickup is None or peak <= pickup
    return DeviceAtStart(device.circuit, device.band.name, current, t_min, t_env, peak, pickup,
                         holds_time, holds_peak, device.band.family == "motor-circuit")


def starting_verdict(profile: StartProfile, chain: Sequence[ChainDevice]) -> StartingVerdict:
    """Whether any device on a chain operates during a start.

    Parameters
    ----------
    profile : StartProfile
        From :func:`motor_start` or :func:`inrush_start`.
    chain : sequence of ChainDevice
        The starting circuit's own device first, then every device above it (each with the
        running load of the board it feeds).

    Returns
    -------
    StartingVerdict
        ``ok`` when every device holds; ``binding`` the first that does not (nearest the start),
        else the one with the least time to spare (ratio of its ``t_min`` to the start time).

    Raises
    ------
    ValueError
        An empty chain.

    References
    ----------
    IEC 60947-4-1 (a starter's protective devices must carry the start); the profile's peak
    factor and rectangular shape: common practice.

    Examples
    --------
    >>> from curves.spec import band_from_spec
    >>> start = motor_start(Motor(flc_a=11.0, start_x=6.0, start_s=6.0))
    >>> v = starting_verdict(start, [ChainDevice("pump", band_from_spec("D32")),
    ...                              ChainDevice("main", band_from_spec("gG100"), 40.0)])
    >>> print(v.ok, v.binding.circuit)
    True pump
    """
    if not chain:
        raise ValueError("a start needs at least the circuit's own device")
    devices = tuple(device_at_start(profile, d) for d in chain)
    failing = [d for d in devices if not d.holds]
    binding = failing[0] if failing else min(devices, key=lambda d: d.t_min_s)
    return StartingVerdict(not failing, profile, devices, binding, chain[0].band.basis)


# ---------------------------------------------------------------------------------------------
# the motor circuit's protective band
@lru_cache(maxsize=1024)
def _combined(short_circuit: Band, relay_class: str, relay_ir_a: float) -> Band:
    from curves.relay import combined_band, relay_band

    return combined_band(relay_band(relay_class, relay_ir_a, basis=short_circuit.basis),
                         short_circuit)


def with_relay(short_circuit: Band, motor: Motor | None) -> Band:
    """A circuit's protective band: its device, joined with the motor's overload relay if any.

    The relay (IEC 60947-4-1, on the device's basis) and its contactor clear overloads, the
    device the faults (:func:`curves.relay.combined_band`: the earlier of the two, the relay only
    up to the contactor's breaking capacity, 8 Ir by default).

    Parameters
    ----------
    short_circuit : Band
        The circuit's device (MCB, gG or aM fuse-link, breaker).
    motor : Motor or None
        The circuit's motor; None or no relay: ``short_circuit`` itself.

    Raises
    ------
    InputError
        A relay with a datasheet device (key ``relay_class``): give the relay's curve in the
        datasheet's points instead.

    References
    ----------
    IEC 60947-4-1 (overload relays; contactor and short-circuit device).

    Examples
    --------
    >>> from curves.fuse_am import am_band
    >>> band = with_relay(am_band(25), Motor(20.0, 6.0, 3.0, relay_class="10", relay_ir_a=20.0))
    >>> print(band.family, band.rating_a, band.name)
    motor-circuit 20.0 overload relay class 10, Ir 20 A with aM25
    """
    if motor is None or motor.relay_class is None or motor.relay_ir_a is None:
        return short_circuit
    if short_circuit.basis not in ("typical", "envelope"):
        raise InputError("an overload relay with a datasheet device is not modelled; give the "
                         "relay's curve in the datasheet's points, or a standard device "
                         "(MCB, gG or aM fuse-link, breaker)", key="relay_class")
    return _combined(short_circuit, motor.relay_class, float(motor.relay_ir_a))
