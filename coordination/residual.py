"""Residual-current devices in a study: the RCD that clears an earth fault, the RCD checks, the
residual pairs and the IΔn to propose.

A circuit's ``rcd`` table (``{ idn_ma = 30, selective = false, waveform = "A", delay_s = 0 }``)
becomes a :class:`curves.rcd.ResidualBand` (the worst case of IEC 61008-1 / 61009-1). With an
overcurrent ``device`` beside it the circuit has an RCBO (or a breaker and an RCD); without one it
is a residual-current switch (RCCB) whose overcurrent protection comes from the device above.

The physics are pure functions here over plain numbers and bands; the checks and the engine call
them with a study's circuits and fault levels.

``disconnection``
    An RCD on the circuit or above it disconnects an earth fault within the IEC 60364-4-41
    Table 41.1 time when its maximum break time at the earth-fault current (a residual current)
    is within it (:func:`rcd_clearing`); in TN this is allowed by 411.4.5 where the loop is too
    high for the overcurrent device, in TT by 411.5.
``touch-voltage``
    TT only: RA x IΔn <= 50 V for every RCD (IEC 60364-4-41, 411.5.3).
``additional-protection``
    A circuit supplying socket-outlets of at most 32 A has an RCD of IΔn <= 30 mA on it or
    above it (IEC 60364-4-41, 411.3.3).
``leakage``
    The standing protective-conductor current below an RCD stays within 30 % of its IΔn
    (common practice; BS 7671 531.3.2, from memory).

References
----------
IEC 60364-4-41:2005, 411.3.3, 411.4.5, 411.5.3 and Table 41.1; IEC 61008-1 / IEC 61009-1
(limit values of break time); IEC 60364-5-53 (selectivity between RCDs, from memory).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from curves.errors import InputError
from curves.rcd import (
    LEAKAGE_FRACTION,
    RCD_IDN_MA,
    SELECTIVITY_RATIO,
    TOUCH_VOLTAGE_LIMIT_V,
    ResidualBand,
    rcd_band,
    residual_selective,
)

#: Keys of a circuit's ``rcd`` table.
RCD_KEYS = ("idn_ma", "selective", "waveform", "delay_s")

#: Additional protection: socket-outlets with a rated current up to this [A] need an RCD
#: (IEC 60364-4-41:2005, 411.3.3).
SOCKET_SCOPE_A = 32.0

#: ... of a rated residual operating current not above this [mA] (IEC 60364-4-41, 411.3.3).
ADDITIONAL_PROTECTION_IDN_MA = 30.0

#: IΔn the chooser proposes, smallest first [mA]: 30 mA for final circuits and 100, 300, 500,
#: 1000 mA for distribution (common practice); 6 and 10 mA devices are for special locations.
PROPOSED_IDN_MA = (30, 100, 300, 500, 1000)

#: An RCCB (an RCD with no overcurrent device) is credited with breaking an earth fault only up
#: to this current [A]: the least rated residual making and breaking capacity IΔm of
#: IEC 61008-1 (10 In or 500 A, whichever is greater; from memory). Above it the overcurrent
#: device must clear the fault (the safe side: the RCCB's own IΔm is not known).
RCCB_BREAKING_A = 500.0

#: Where the words of the checks come from.
TOUCH_VOLTAGE_SOURCE = "IEC 60364-4-41 411.5.3"
ADDITIONAL_PROTECTION_SOURCE = "IEC 60364-4-41 411.3.3"
LEAKAGE_SOURCE = "common practice (BS 7671 531.3.2, from memory)"
RCD_TIMES_SOURCE = "IEC 61008-1 / 61009-1 limit values of break time"


# -------------------------------------------------------------------------------------------
# the rcd table of a circuit
def rcd_from_table(table: Any) -> ResidualBand:
    """The band of a circuit's ``rcd`` table.

    Parameters
    ----------
    table : mapping
        ``idn_ma`` [mA] (required), ``selective`` (type S), ``waveform`` (AC, A, F, B; case
        ignored), ``delay_s`` [s].

    Returns
    -------
    ResidualBand

    Raises
    ------
    InputError
        Not a table, an unknown key (the nearest valid one named), a missing ``idn_ma`` or a
        value :func:`curves.rcd.rcd_band` refuses; the key is relative to the table
        (``"idn_ma"``), so the study layer prefixes ``rcd``.

    Examples
    --------
    >>> print(rcd_from_table({"idn_ma": 100, "selective": True}).name)
    RCD 100 mA type A S
    """
    if not isinstance(table, Mapping):
        raise InputError(f"{table!r} is not an RCD; give a table such as "
                         "{ idn_ma = 30, selective = false, waveform = \"A\", delay_s = 0 }")
    for key in table:
        if key not in RCD_KEYS:
            near = difflib.get_close_matches(str(key), RCD_KEYS, n=1)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            raise InputError(f"unknown key{hint}; allowed: {', '.join(RCD_KEYS)}", key=str(key))
    if "idn_ma" not in table:
        raise InputError("missing; give the rated residual operating current IΔn in mA, one of "
                         + ", ".join(f"{v:g}" for v in RCD_IDN_MA), key="idn_ma")
    waveform = table.get("waveform", "A")
    if isinstance(waveform, str):
        waveform = waveform.strip().upper()
    return _rcd_band(table["idn_ma"], table.get("selective", False), waveform,
                     table.get("delay_s", 0.0))


@lru_cache(maxsize=256)
def _rcd_band_cached(idn_ma: float, selective: bool, waveform: str,
                     delay_s: float) -> ResidualBand:
    return rcd_band(idn_ma, selective=selective, waveform=waveform, delay_s=delay_s)


def _rcd_band(idn_ma: Any, selective: Any, waveform: Any, delay_s: Any) -> ResidualBand:
    """:func:`curves.rcd.rcd_band`, cached where the values are plain (alike RCDs share one)."""
    plain = (isinstance(idn_ma, int | float) and not isinstance(idn_ma, bool)
             and isinstance(selective, bool) and isinstance(waveform, str)
             and isinstance(delay_s, int | float) and not isinstance(delay_s, bool))
    if plain:
        return _rcd_band_cached(float(idn_ma), selective, waveform, float(delay_s))
    return rcd_band(idn_ma, selective=selective, waveform=waveform, delay_s=delay_s)


def idn_ma(band: ResidualBand) -> float:
    """IΔn of a band [mA].

    Examples
    --------
    >>> print(idn_ma(rcd_band(30)))
    30.0
    """
    return round(band.idn_a * 1000.0, 9)


# -------------------------------------------------------------------------------------------
# pure physics
@dataclass(frozen=True)
class RcdClearing:
    """How fast one RCD clears an earth fault.

    Attributes
    ----------
    circuit : str
        The circuit whose ``rcd`` it is.
    band : ResidualBand
        The RCD.
    current_a : float
        The residual current it sees: the earth-fault current [A].
    t_s : float
        Its maximum break time at that current [s]; ``inf`` below IΔn (never guaranteed).
    limit_s : float
        The disconnection time required [s].
    ok : bool
        ``t_s <= limit_s``.
    """

    circuit: str
    band: ResidualBand
    current_a: float
    t_s: float
    limit_s: float
    ok: bool


def rcd_clearing(circuit: str, band: ResidualBand, earth_fault_a: float,
                 limit_s: float) -> RcdClearing:
    """The time an RCD takes, at worst, to clear an earth fault, against the time required.

    The earth-fault current flows out through the protective conductor and back through earth
    (TT) or the PEN/PE (TN), so all of it is residual current to every RCD it passes. The RCD's
    maximum break time at that current is the IEC 61008-1 / 61009-1 staircase: 0.3 s from IΔn,
    0.15 s from 2 IΔn, 0.04 s only where the fault reaches 5 IΔn (or 0.25 A for a general-type
    device up to 30 mA, from memory); type S 0.5 / 0.2 / 0.15 s.

    Parameters
    ----------
    circuit : str
        The circuit whose ``rcd`` it is.
    band : ResidualBand
        The RCD.
    earth_fault_a : float
        Earth-fault current [A].
    limit_s : float
        Required disconnection time [s] (IEC 60364-4-41 Table 41.1, or 5 s / 1 s).

    Returns
    -------
    RcdClearing

    References
    ----------
    IEC 61008-1 / 61009-1, limit values of break time; IEC 60364-4-41:2005, 411.4.5 (TN),
    411.5.3 (TT), Table 41.1.

    Examples
    --------
    >>> r = rcd_clearing("f1", rcd_band(30), 1.2, 0.2)
    >>> print(r.t_s, r.ok)
    0.04 True
    """
    i = float(earth_fault_a)
    t = break_time_s(band, i) if i > 0 and math.isfinite(i) else math.inf
    return RcdClearing(circuit, band, i, t, float(limit_s), t <= float(limit_s))


@lru_cache(maxsize=4096)
def break_time_s(band: ResidualBand, residual_a: float) -> float:
    """An RCD's maximum break time at a residual current [s]: its upper edge there, ``inf``
    below IΔn.

    Cached: a study's alike RCDs meet the same currents again and again (in TT every circuit's
    earth fault is held to c_min U0 / RA), and the edge is evaluated one current at a time.

    Examples
    --------
    >>> print(break_time_s(rcd_band(30), 0.06))
    0.15
    """
    return float(band.t_max(residual_a))


def tt_earth_fault_a(ief_a: float, u0_v: float, ra_ohm: float | None,
                     c_min: float = 0.95) -> float:
    """The earth-fault current an RCD in TT is checked at [A].

    The loop of a TT earth fault runs through the installation's earth electrode and the
    protective conductors of the exposed parts, RA, so the current is at most c_min U0 / RA
    whatever ``ze_ohm`` says; the smaller of the two is taken (the safe side).

    Examples
    --------
    >>> print(round(tt_earth_fault_a(10.0, 230.0, 100.0), 4))
    2.185
    """
    if ra_ohm is None or not ra_ohm > 0:
        return float(ief_a)
    return min(float(ief_a), c_min * u0_v / float(ra_ohm))


def touch_voltage_v(ra_ohm: float, band: ResidualBand) -> float:
    """RA x IΔn [V] (IEC 60364-4-41, 411.5.3), to be at most 50 V.

    Examples
    --------
    >>> print(touch_voltage_v(200.0, rcd_band(100)))
    20.0
    """
    return float(ra_ohm) * band.idn_a


def needs_additional_protection(sockets: bool, in_a: float | None) -> bool:
    """Whether IEC 60364-4-41 411.3.3 asks for an RCD of at most 30 mA on a circuit.

    A circuit that supplies socket-outlets with a rated current up to 32 A; its overcurrent
    device's In stands for the outlets' rating (``None``: an RCCB, taken as in scope).

    Examples
    --------
    >>> print(needs_additional_protection(True, 32.0), needs_additional_protection(True, 40.0))
    True False
    """
    return bool(sockets) and (in_a is None or in_a <= SOCKET_SCOPE_A)


def leakage_limit_ma(band: ResidualBand) -> float:
    """Standing leakage allowed below an RCD: 30 % of IΔn [mA] (common practice).

    Examples
    --------
    >>> print(leakage_limit_ma(rcd_band(30)))
    9.0
    """
    return LEAKAGE_FRACTION * idn_ma(band)


# -------------------------------------------------------------------------------------------
# residual selectivity of the RCDs on one path
@dataclass(frozen=True)
class ResidualPair:
    """Two RCDs in series on one path.

    Attributes
    ----------
    upstream, downstream : str
        Circuit ids.
    upstream_band, downstream_band : ResidualBand
    verdict : str
        ``"total"`` or ``"none"``.
    decided_by : str
        ``"time-current"`` (the IEC 61008-1 limit values show it at every residual current)
        or ``"rule"`` (the IEC 60364-5-53 conditions decided: met, with a range the limit values
        leave unproven, or not met).
    reason : str
        One line, naming its sources.
    """

    upstream: str
    downstream: str
    upstream_band: ResidualBand
    downstream_band: ResidualBand
    verdict: str
    decided_by: str
    reason: str


def residual_pair(upstream: str, up: ResidualBand, downstream: str,
                  down: ResidualBand) -> ResidualPair:
    """The residual selectivity of two RCDs (:func:`curves.rcd.residual_selective`).

    Examples
    --------
    >>> p = residual_pair("board", rcd_band(100, selective=True), "sockets", rcd_band(30))
    >>> print(p.verdict, p.decided_by)
    total rule
    """
    verdict, decided, reason = _selective(up, down)
    return ResidualPair(upstream, downstream, up, down, verdict, decided, reason)


@lru_cache(maxsize=1024)
def _selective(up: ResidualBand, down: ResidualBand) -> tuple[str, str, str]:
    """:func:`curves.rcd.residual_selective` once per pair of distinct RCDs (bands hash by
    their settings): verdict, decided by (in the engine's words) and reason."""
    result = residual_selective(up, down)
    return (result.verdict, "time-current" if result.decided_by == "limits" else "rule",
            result.reason)


def residual_pairs(paths: Iterable[tuple[str, ResidualBand, Sequence[tuple[str, ResidualBand]]]]
                   ) -> tuple[ResidualPair, ...]:
    """Every pair of RCDs on one path: each RCD with every RCD above it, nearest first.

    Parameters
    ----------
    paths : iterable of (circuit, band, above)
        A circuit with an RCD, its band, and the RCDs above it as (circuit, band), nearest
        first.

    Examples
    --------
    >>> s, g = rcd_band(300, selective=True), rcd_band(30)
    >>> pairs = residual_pairs([("f1", g, [("sub", s)])])
    >>> print([(p.upstream, p.downstream, p.verdict) for p in pairs])
    [('sub', 'f1', 'total')]
    """
    return tuple(residual_pair(up_id, up, cid, band)
                 for cid, band, above in paths for up_id, up in above)


# -------------------------------------------------------------------------------------------
# the RCD to propose where disconnection fails
@dataclass(frozen=True)
class RcdProposal:
    """An RCD that would meet what a circuit needs, or why none does.

    Attributes
    ----------
    rcd : mapping or None
        The ``rcd`` table to write in the study file (``None``: nothing fits).
    band : ResidualBand or None
    reason : str
        What it meets, or what stands against every candidate.
    """

    rcd: Mapping[str, Any] | None
    band: ResidualBand | None
    reason: str


def propose_rcd(*, earth_fault_a: float, limit_s: float, ra_ohm: float | None = None,
                tt: bool = False, sockets: bool = False,
                above: Sequence[ResidualBand] = (), below: Sequence[ResidualBand] = (),
                leakage_ma: float = 0.0) -> RcdProposal:
    """The smallest IΔn (general type first, then type S) that meets every RCD requirement.

    A candidate must clear the earth fault within ``limit_s`` (:func:`rcd_clearing`), keep
    RA x IΔn <= 50 V in TT, be at most 30 mA where the circuit supplies socket-outlets up to
    32 A, keep the standing leakage within 30 % of IΔn, and be selective (verdict total) under
    every RCD above and over every RCD below. Candidates: :data:`PROPOSED_IDN_MA`; the smallest
    that fits is taken (the most sensitive protection: the safe side).

    Parameters
    ----------
    earth_fault_a : float
        Earth-fault current at the circuit's far end [A].
    limit_s : float
        Required disconnection time [s].
    ra_ohm : float, optional
        RA [ohm] (TT).
    tt : bool
        The installation is TT.
    sockets : bool
        The circuit is in the scope of 411.3.3 (:func:`needs_additional_protection`).
    above, below : sequence of ResidualBand
        RCDs on the path above the circuit, and on circuits below it.
    leakage_ma : float
        Standing leakage of the circuit and everything below it [mA].

    Returns
    -------
    RcdProposal

    References
    ----------
    IEC 60364-4-41:2005, 411.3.3, 411.5.3, Table 41.1; IEC 61008-1 / 61009-1; IEC 60364-5-53
    (from memory).

    Examples
    --------
    >>> print(propose_rcd(earth_fault_a=2.0, limit_s=0.2, ra_ohm=100.0, tt=True).rcd)
    {'idn_ma': 30, 'selective': False}
    >>> below = [rcd_band(30)]
    >>> print(propose_rcd(earth_fault_a=2.0, limit_s=1.0, ra_ohm=100.0, tt=True,
    ...                   below=below).rcd)
    {'idn_ma': 100, 'selective': True}
    """
    against: list[str] = []
    for selective in (False, True):
        for idn in PROPOSED_IDN_MA:
            if selective and idn <= 30:
                continue
            band = _rcd_band(idn, selective, "A", 0.0)
            why = _misfit(band, earth_fault_a, limit_s, ra_ohm, tt, sockets, above, below,
                          leakage_ma)
            if why is None:
                kind = "type S " if selective else ""
                return RcdProposal({"idn_ma": idn, "selective": selective}, band, (
                    f"an RCD of {idn} mA {kind}clears {earth_fault_a:.3g} A within "
                    f"{float(band.t_max(earth_fault_a)):g} s (limit {limit_s:g} s) and meets "
                    "touch voltage, additional protection, leakage and RCD selectivity"))
            against.append(f"{band.name}: {why}")
    return RcdProposal(None, None, "no RCD fits: " + "; ".join(against[:3])
                       + ("; ..." if len(against) > 3 else ""))


def _misfit(band: ResidualBand, earth_fault_a: float, limit_s: float, ra_ohm: float | None,
            tt: bool, sockets: bool, above: Sequence[ResidualBand],
            below: Sequence[ResidualBand], leakage_ma: float) -> str | None:
    """Why a candidate RCD does not fit, or None."""
    if not rcd_clearing("", band, earth_fault_a, limit_s).ok:
        return f"may not clear {earth_fault_a:.3g} A within {limit_s:g} s"
    if tt and ra_ohm is not None and touch_voltage_v(ra_ohm, band) > TOUCH_VOLTAGE_LIMIT_V:
        return f"RA x IΔn above {TOUCH_VOLTAGE_LIMIT_V:g} V"
    if sockets and idn_ma(band) > ADDITIONAL_PROTECTION_IDN_MA:
        return f"socket-outlets need at most {ADDITIONAL_PROTECTION_IDN_MA:g} mA"
    if leakage_ma > leakage_limit_ma(band):
        return f"standing leakage {leakage_ma:g} mA above {leakage_limit_ma(band):g} mA"
    for up in above:
        if residual_selective(up, band).verdict != "total":
            return f"not selective under {up.name}"
    for down in below:
        if residual_selective(band, down).verdict != "total":
            return (f"not selective over {down.name} (needs type S and IΔn at least "
                    f"{SELECTIVITY_RATIO:g} times)")
    return None


# -------------------------------------------------------------------------------------------
# a study's RCDs (read from its circuits: ``rcd``, ``sockets``, ``leakage_ma``, ``device``)
def rcd_of(study: Any, circuit_id: str) -> ResidualBand | None:
    """The RCD of a circuit (``None`` when it has none).

    Raises
    ------
    InputError
        A bad ``rcd`` table, naming the circuit and the key (``rcd.idn_ma``).
    """
    table = getattr(study.by_id[circuit_id], "rcd", None)
    if table is None:
        return None
    try:
        return rcd_from_table(table)
    except InputError as error:
        raise error.within(circuit=circuit_id, key="rcd") from None


#: The RCDs on a circuit's path, as :func:`rcds_on_path` gives them: (circuit id, band).
RcdPath = tuple[tuple[str, ResidualBand], ...]


def rcds_on_path(study: Any, circuit_id: str) -> RcdPath:
    """The RCDs an earth fault on a circuit flows through: its own, then those above, nearest
    first, as (circuit id, band)."""
    with_rcd = study.rcd_circuits
    if not with_rcd:  # most studies: no walk up the tree at all
        return ()
    return tuple((cid, rcd_of(study, cid)) for cid in (circuit_id, *study.ancestors(circuit_id))
                 if cid in with_rcd)


def rcds_breaking(study: Any, circuit_id: str, current_a: float,
                  rcds: RcdPath | None = None) -> RcdPath:
    """The RCDs on a circuit's path (:func:`rcds_on_path`, or ``rcds`` where the caller has
    them) credited with breaking an earth fault of ``current_a`` [A]: every RCD beside an
    overcurrent device (an RCBO breaks with its breaker), an RCCB only up to
    :data:`RCCB_BREAKING_A`."""
    on_path = rcds_on_path(study, circuit_id) if rcds is None else rcds
    return tuple((cid, band) for cid, band in on_path
                 if study.by_id[cid].device is not None or current_a <= RCCB_BREAKING_A)


def rccb_label(study: Any, circuit_id: str) -> str:
    """What a person reads for a residual-current switch: ``"RCCB 30 mA type A"``."""
    band = rcd_of(study, circuit_id)
    return "RCCB" if band is None else band.name.replace("RCD", "RCCB", 1)


def leakage_below_ma(study: Any, circuit_id: str) -> float | None:
    """The standing leakage an RCD on this circuit carries: the circuit's ``leakage_ma`` and
    that of every circuit below it [mA]; ``None`` when none of them gives one."""
    # a final circuit has none below it: no walk over the study for it
    below = study.descendants(circuit_id) if study.children.get(circuit_id) else ()
    given = [study.by_id[c].leakage_ma for c in (circuit_id, *below)]
    given = [float(v) for v in given if v is not None]
    return sum(given) if given else None


def has_rcds(study: Any) -> bool:
    """Whether any circuit of the study has an RCD."""
    return bool(study.rcd_circuits)
