"""Disconnection: the time a device takes at the minimum earth fault, against IEC 60364-4-41."""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Any

import numpy as np

from coordination import rules
from coordination.checks.common import _Edges, _get, _in_a, _takes, a_text, ohm_text, s_text
from coordination.checks.residual_checks import (
    rcd_disconnection,
    rcd_failure,
    rcd_reason,
    rcd_relied_on,
)
from coordination.checks.results import CheckResult, _result
from coordination.model import Study
from coordination.residual import RcdPath, rcds_on_path
from curves.band import Band
from curves.errors import InputError

#: Final circuits within the scope of Table 41.1 carry at most this current [A] under IEC 60364
#: (IEC 60364-4-41:2005, 411.3.2.2; larger final circuits take the 5 s / 1 s of 411.3.2.3 (TN)
#: / 411.3.2.4 (TT)). The scope of each rule set is in :mod:`coordination.rules` (BS 7671: 63 A
#: with socket-outlets, from memory).
FINAL_CIRCUIT_SCOPE_A = rules.IEC.fixed_scope_a

#: IEC 60364-4-41:2005 Table 41.1, maximum disconnection times of final circuits, a.c. [s]:
#: (U0 above [V], U0 up to [V], TN [s], TT [s]).
#: Rows 120 < U0 <= 230 V and 230 < U0 <= 400 V: confirmed;
#: rows 50 < U0 <= 120 V and U0 > 400 V: from memory.
TABLE_41_1 = (
    (50.0, 120.0, 0.8, 0.3),  # from memory
    (120.0, 230.0, 0.4, 0.2),  # confirmed
    (230.0, 400.0, 0.2, 0.07),  # confirmed
    (400.0, math.inf, 0.1, 0.04),  # from memory
)
TABLE_41_1_SOURCE = "IEC 60364-4-41 Table 41.1"

#: Distribution circuits (and final circuits beyond the scope of Table 41.1) [s]:
#: TN 5 s (IEC 60364-4-41, 411.3.2.3), TT 1 s (411.3.2.4). Confirmed.
DISTRIBUTION_TIME_S = {"TN": 5.0, "TT": 1.0}

#: The earthing systems the checks know, and the row of Table 41.1 they read.
EARTHING_KIND = {"TN-S": "TN", "TN-C-S": "TN", "TN-C": "TN", "TN": "TN", "TT": "TT"}

#: The fastest overcurrent device a circuit can have operates within 0.1 s at 5 In (an IEC
#: 60898-1 type B MCB's upper instantaneous multiple): below 5 Ib no overcurrent device able to
#: carry the load disconnects fast enough, and only an RCD can (common practice).
FASTEST_OVERCURRENT_MULTIPLE = 5.0


# -------------------------------------------------------------------------------------------
# pure physics and tables
def disconnection_time_s(u0_v: float, earthing: str, final: bool) -> float:
    """Maximum disconnection time for fault protection by automatic disconnection [s].

    Parameters
    ----------
    u0_v : float
        Nominal a.c. line-to-earth voltage U0 [V], above 50 V.
    earthing : str
        ``"TN-S"``, ``"TN-C-S"``, ``"TN-C"`` or ``"TT"``.
    final : bool
        ``True`` for a final circuit within the scope of Table 41.1; ``False`` for a
        distribution circuit (or a final circuit beyond that scope).

    Returns
    -------
    float
        The time [s].

    Raises
    ------
    InputError
        For U0 of 50 V or less, or an earthing system not in the list.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2.2 and Table 41.1 (final circuits); 411.3.2.3 (TN distribution
    circuits, 5 s); 411.3.2.4 (TT distribution circuits, 1 s).

    Examples
    --------
    >>> print(disconnection_time_s(230.0, "TN-C-S", True))
    0.4
    """
    kind = EARTHING_KIND.get(str(earthing).upper())
    if kind is None:
        allowed = ", ".join(k for k in EARTHING_KIND if k != "TN")
        raise InputError(f"earthing {earthing!r} is not covered by the checks; allowed: {allowed}",
                         key="supply.earthing")
    if not (math.isfinite(u0_v) and u0_v > 50.0):
        raise InputError(f"U0 {u0_v:g} V is outside Table 41.1 of IEC 60364-4-41; give U0 above "
                         "50 V a.c.", key="supply.u0_v")
    if not final:
        return DISTRIBUTION_TIME_S[kind]
    for above, up_to, tn, tt in TABLE_41_1:
        if above < u0_v <= up_to:
            return tn if kind == "TN" else tt
    raise AssertionError("Table 41.1 covers every U0 above 50 V")  # pragma: no cover


def operating_current_a(band: Band, t_s: float) -> float:
    """Least current at which the band's upper edge is at or below ``t_s`` [A].

    The worst case a device of this band allows: at this current and above, it has cleared by
    ``t_s``. Found by a vectorised scan in log current followed by bisection on the upper edge
    (which never rises with current), so a step in the edge (an instantaneous release) is found
    exactly.

    Parameters
    ----------
    band : Band
        The device (use the envelope basis for a safety check).
    t_s : float
        Operating time [s], positive.

    Returns
    -------
    float
        Ia [A]; ``inf`` when the device may never operate that fast.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4 (Ia, the current causing automatic operation within the time).

    Examples
    --------
    >>> from curves.mcb import mcb_band
    >>> print(round(operating_current_a(mcb_band("B", 32, basis="envelope"), 0.4), 6))
    160.0
    """
    return _operating_current_a(band, float(t_s))


@lru_cache(maxsize=4096)
def _operating_current_a(band: Band, t_s: float) -> float:
    # bands are hashable by their key and shared through coordination.devices' cache
    lo = max(float(band.pickup_min_a), 1e-6)
    hi = max(float(band.rating_a), lo) * 1e6
    grid = np.geomspace(lo, hi, 4001)
    fast = band.t_max(grid) <= t_s
    if not fast.any():
        return math.inf
    k = int(np.argmax(fast))
    if k == 0:
        return float(grid[0])
    a, b = math.log(grid[k - 1]), math.log(grid[k])  # t_max(e^a) > t_s >= t_max(e^b)
    for _ in range(60):
        mid = 0.5 * (a + b)
        if float(band.t_max(math.exp(mid))) <= t_s:
            b = mid
        else:
            a = mid
        if b - a < 1e-13:
            break
    return math.exp(b)


def max_zs_ohm(band: Band, u0_v: float, t_s: float, c_min: float = 0.95) -> float:
    """Largest earth-fault loop impedance with which the device disconnects within ``t_s`` [ohm].

    ``Zs_max = c_min * U0 / Ia`` with Ia the current at which the band's upper edge reaches
    ``t_s`` (:func:`operating_current_a`). For an MCB on its envelope, 0.4 s is reached only in
    the instantaneous region, so Ia is the upper instantaneous multiple times In (5, 10, 20 In for
    types B, C, D) and the result is BS 7671 Table 41.3.

    Parameters
    ----------
    band : Band
        The device, on the envelope basis for a safety check.
    u0_v : float
        Nominal line-to-earth voltage U0 [V].
    t_s : float
        Required disconnection time [s].
    c_min : float
        Voltage factor for minimum fault currents [-] (0.95, IEC 60909-0 Table 1; BS 7671 Cmin).

    Returns
    -------
    float
        Zs_max [ohm]; 0 when the device never operates that fast.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4 (Zs x Ia <= U0); BS 7671:2018 Table 41.3 and Appendix 3
    (Cmin = 0.95).

    Examples
    --------
    >>> from curves.mcb import mcb_band
    >>> print(round(max_zs_ohm(mcb_band("B", 32, basis="envelope"), 230.0, 0.4), 2))
    1.37
    """
    ia = operating_current_a(band, t_s)
    return c_min * u0_v / ia if math.isfinite(ia) else 0.0


def _disconnection_limit(study: Study, cid: str, band: Band) -> tuple[float, str, str, bool]:
    """Required time [s], the circuit's class in words, its source, and whether it is final."""
    final = study.is_final(cid)
    sockets = bool(study.by_id[cid].sockets)
    return (*_limit_and_class(study.supply.u0_v, study.supply.earthing, final, sockets,
                              _in_a(band), study.rule_set), final)


@lru_cache(maxsize=1024)
def _limit_and_class(u0_v: float, earthing: str, final: bool, sockets: bool, in_a: float,
                     rule_set: rules.RuleSet) -> tuple[float, str, str]:
    """:func:`_disconnection_limit` for a class of circuit (the same for most of a study's):
    the scope of Table 41.1 and the clauses from the rule set (:func:`rules.circuit_class`)."""
    kind = EARTHING_KIND.get(str(earthing).upper(), "TN")
    in_scope, what, clause = rules.circuit_class(rule_set, final, sockets, in_a, kind)
    limit = disconnection_time_s(u0_v, earthing, in_scope)
    source = clause.cite
    if in_scope or final:  # where the scope itself comes from
        source += f"; scope: {rule_set.scope.cite}"
    return limit, what, source


def _carried_a(study: Study, cid: str, band: Band) -> float:
    """The current the circuit's device must carry: Ib where given, else In [A]."""
    ib = study.by_id[cid].load_a
    return float(ib) if ib else _in_a(band)


def _rcd_needed(study: Study, cid: str, band: Band, node: Any, edges: _Edges,
                limit_s: float | None = None, rcds: RcdPath | None = None) -> bool:
    """TT, no RCD on the circuit or above it, and the earth fault too small for any
    overcurrent device able to carry the load: the disconnection check fails and asks for an
    RCD. ``limit_s`` is the circuit's disconnection limit [s] and ``rcds`` the RCDs on its path,
    where the caller has them."""
    if EARTHING_KIND.get(str(study.supply.earthing).upper(), "TN") != "TT":
        return False
    if rcds_on_path(study, cid) if rcds is None else rcds:
        return False
    ief = _get(node, "ief_min_a", 0.0) or 0.0
    limit = _disconnection_limit(study, cid, band)[0] if limit_s is None else limit_s
    carry = _carried_a(study, cid, band)
    return edges.t_max(band, ief) > limit and ief < FASTEST_OVERCURRENT_MULTIPLE * carry


# -------------------------------------------------------------------------------------------
# the check of one circuit
def _disconnection(study: Study, cid: str, band: Band, node: Any, edges: _Edges,
                   rcds: RcdPath | None = None) -> CheckResult:
    """The disconnection check of one circuit; ``rcds`` are the RCDs on its path
    (:func:`~coordination.residual.rcds_on_path`), where the caller has them."""
    supply = study.supply
    limit, what, source, final = _disconnection_limit(study, cid, band)
    ief = _get(node, "ief_min_a", 0.0) or 0.0
    zs = _get(node, "zs_ohm", math.nan)
    zs = math.nan if zs is None else zs
    t = edges.t_max(band, ief)
    ia = operating_current_a(band, limit)
    zs_max = supply.c_min * supply.u0_v / ia if math.isfinite(ia) else 0.0
    ok = t <= limit
    details = {"current_a": ief, "zs_ohm": zs, "zs_max_ohm": zs_max, "ia_a": ia,
               "final": final, "circuit_class": what, "source": source}
    zs_text = f"Zs {ohm_text(zs)}" if math.isfinite(zs) else "Zs"
    if ok:
        reason = (f"{zs_text} within {ohm_text(zs_max)} for {band.name}: {a_text(ief)} cleared "
                  f"within {s_text(t)}, limit {s_text(limit)} ({what})")
    else:
        times = f"{_takes(band, ief, t)}, limit {s_text(limit)} ({what})"
        carry = _carried_a(study, cid, band)
        kind = EARTHING_KIND.get(str(supply.earthing).upper(), "TN")
        head = f"{zs_text} exceeds {ohm_text(zs_max)} for {band.name}"
        if kind == "TT" and ief < FASTEST_OVERCURRENT_MULTIPLE * carry:
            reason = (f"{head}: {times}; too high for any overcurrent device carrying "
                      f"{a_text(carry)} (a type B needs "
                      f"{a_text(FASTEST_OVERCURRENT_MULTIPLE * carry)}): an RCD is needed")
        else:
            reason = (f"{head}: {times}; shorten the run, enlarge the conductors, choose a "
                      "faster device or use an RCD")
        clearings = rcd_disconnection(study, cid, ief, limit, rcds)
        relied = rcd_relied_on(clearings)
        if relied is not None:  # IEC 60364-4-41 411.4.5 (TN), 411.5 (TT)
            ok, t = True, relied.t_s
            alone = f"{head}: {times}"
            reason = rcd_reason(relied, cid, f"{band.name} alone would not: {alone}")
            details.update({"rcd_circuit": relied.circuit, "rcd_device": relied.band.name,
                            "rcd_current_a": relied.current_a,
                            "source": f"{source}; IEC 60364-4-41 "
                                      f"{'411.5.3' if kind == 'TT' else '411.4.5'}"})
        elif clearings:
            t = min(t, *(c.t_s for c in clearings))
            reason = (f"{head}: {times}; "
                      + rcd_failure(clearings).replace("nor does", "and nor does", 1))
    return _result(cid, "disconnection", ok, t, limit, "s", reason, band, details,
                   study.rule_set)
