"""The checks of residual-current devices: touch voltage, additional protection, leakage; and the
RCD that disconnects an earth fault where the overcurrent device is too slow.

Each reads the circuit's ``rcd`` (and those above it), ``sockets``, ``leakage_ma`` and the
supply's ``ra_ohm``; the physics is in :mod:`coordination.residual`.
"""

from __future__ import annotations

import math
from typing import Any

from coordination.checks.common import a_text, s_text
from coordination.checks.results import CheckResult, _result
from coordination.model import Study
from coordination.residual import (
    ADDITIONAL_PROTECTION_IDN_MA,
    ADDITIONAL_PROTECTION_SOURCE,
    LEAKAGE_SOURCE,
    RCD_TIMES_SOURCE,
    TOUCH_VOLTAGE_SOURCE,
    RcdClearing,
    RcdPath,
    idn_ma,
    leakage_below_ma,
    leakage_limit_ma,
    needs_additional_protection,
    rcd_clearing,
    rcd_of,
    rcds_breaking,
    rcds_on_path,
    touch_voltage_v,
    tt_earth_fault_a,
)
from coordination.rules import tagged
from curves.rcd import TOUCH_VOLTAGE_LIMIT_V, ResidualBand

#: The checks of this module, in the order they are run and printed.
RESIDUAL_CHECK_NAMES = ("touch-voltage", "additional-protection", "leakage")


def _is_tt(study: Study) -> bool:
    return str(study.supply.earthing).upper() == "TT"


def rcd_earth_fault_a(study: Study, ief_a: float) -> float:
    """The earth-fault current an RCD is checked at [A]: in TT at most c_min U0 / RA."""
    supply = study.supply
    if not _is_tt(study):
        return float(ief_a)
    return tt_earth_fault_a(ief_a, supply.u0_v, getattr(supply, "ra_ohm", None), supply.c_min)


def rcd_disconnection(study: Study, circuit_id: str, ief_a: float, limit_s: float,
                      rcds: RcdPath | None = None) -> tuple[RcdClearing, ...]:
    """How each RCD on the circuit or above it (``rcds``, where the caller has them) clears the
    circuit's minimum earth fault, own first then nearest first (empty when there is none)."""
    current = rcd_earth_fault_a(study, ief_a)
    return tuple(rcd_clearing(cid, band, current, limit_s)
                 for cid, band in rcds_breaking(study, circuit_id, current, rcds))


def rcd_relied_on(clearings: tuple[RcdClearing, ...]) -> RcdClearing | None:
    """The RCD that disconnects in time (the nearest that does), else None."""
    return next((c for c in clearings if c.ok), None)


def rcd_reason(relied: RcdClearing, circuit_id: str, overcurrent: str) -> str:
    """The words of a disconnection met by an RCD."""
    where = "on this circuit" if relied.circuit == circuit_id else f"on {relied.circuit}"
    return (f"{relied.band.name} {where} clears the earth fault ({a_text(relied.current_a)} "
            f"residual) within {s_text(relied.t_s)}, limit {s_text(relied.limit_s)} "
            f"({RCD_TIMES_SOURCE}); {overcurrent}")


def rcd_failure(clearings: tuple[RcdClearing, ...]) -> str:
    """Why no RCD on the path disconnects in time (its quickest named)."""
    best = min(clearings, key=lambda c: c.t_s)
    idn_a = best.band.idn_a
    if best.current_a < idn_a:
        why = (f"{a_text(best.current_a)} is below its IΔn {idn_ma(best.band):g} mA: it may "
               "never operate")
    else:
        why = f"it may take {s_text(best.t_s)} at {a_text(best.current_a)} ({RCD_TIMES_SOURCE})"
    return (f"nor does {best.band.name} on {best.circuit}: {why}, limit {s_text(best.limit_s)}; "
            "choose a smaller IΔn or a general-type RCD")


def _touch_voltage(study: Study, cid: str, band: ResidualBand) -> CheckResult | None:
    if not _is_tt(study):
        return None
    ra = getattr(study.supply, "ra_ohm", None)
    limit = TOUCH_VOLTAGE_LIMIT_V
    details: dict[str, Any] = {"ra_ohm": ra, "idn_ma": idn_ma(band), "device": band.name,
                               "source": TOUCH_VOLTAGE_SOURCE}
    if ra is None:
        reason = (f"RA is not given: give [supply] ra_ohm (earth electrode and protective "
                  f"conductors of the exposed parts) to show RA x IΔn <= {limit:g} V for "
                  f"{band.name}")
        return _result(cid, "touch-voltage", False, math.nan, limit, "V", reason, band, details,
                       study.rule_set)
    value = touch_voltage_v(ra, band)
    ok = value <= limit
    text = f"RA x IΔn = {ra:g} ohm x {idn_ma(band):g} mA = {value:.3g} V"
    if ok:
        reason = f"{text} <= {limit:g} V for {band.name}"
    else:
        most = limit / ra * 1000.0
        reason = (f"{text} > {limit:g} V for {band.name}: choose IΔn <= {most:.3g} mA or lower "
                  "the earth electrode's resistance")
    return _result(cid, "touch-voltage", ok, value, limit, "V", reason, band, details,
                   study.rule_set)


def _additional_protection(study: Study, cid: str, in_a: float | None,
                           rcds: RcdPath | None) -> CheckResult | None:
    circuit = study.by_id[cid]
    if not needs_additional_protection(getattr(circuit, "sockets", False), in_a):
        return None
    limit = ADDITIONAL_PROTECTION_IDN_MA
    if rcds is None:
        rcds = rcds_on_path(study, cid)
    details: dict[str, Any] = {"in_a": in_a, "source": ADDITIONAL_PROTECTION_SOURCE}
    if not rcds:
        reason = (f"socket-outlet circuit up to 32 A with no RCD on it or above it: give it an "
                  f"RCD of at most {limit:g} mA (an RCBO, or an RCCB above)")
        return CheckResult(cid, "additional-protection", False, math.inf, limit, "mA",
                           tagged(study.rule_set, reason), "envelope", details,
                           study.rule_set.key)
    where, band = min(rcds, key=lambda r: r[1].idn_a)
    value = idn_ma(band)
    ok = value <= limit
    details.update({"rcd_circuit": where, "device": band.name})
    on = "on this circuit" if where == cid else f"on {where}"
    if ok:
        reason = f"{band.name} {on} gives additional protection to the socket-outlets"
    else:
        reason = (f"the most sensitive RCD on the path is {band.name} {on}: socket-outlets up to "
                  f"32 A need one of at most {limit:g} mA")
    return _result(cid, "additional-protection", ok, value, limit, "mA", reason, band, details,
                   study.rule_set)


def _leakage(study: Study, cid: str, band: ResidualBand) -> CheckResult | None:
    leak = leakage_below_ma(study, cid)
    if leak is None:
        return None
    limit = leakage_limit_ma(band)
    ok = leak <= limit
    details = {"idn_ma": idn_ma(band), "device": band.name, "source": LEAKAGE_SOURCE}
    text = (f"standing leakage {leak:.3g} mA of this circuit and those below it")
    if ok:
        reason = f"{text} within 30 % of IΔn of {band.name} ({limit:.3g} mA; common practice)"
    else:
        reason = (f"{text} exceeds 30 % of IΔn of {band.name} ({limit:.3g} mA; common "
                  "practice): it may trip without a fault; split the circuits among more RCDs")
    return _result(cid, "leakage", ok, leak, limit, "mA", reason, band, details, study.rule_set)


def residual_results(study: Study, cid: str, in_a: float | None,
                     rcds: RcdPath | None = None) -> tuple[CheckResult, ...]:
    """The residual-current checks of one circuit, in the order of
    :data:`RESIDUAL_CHECK_NAMES` (a check that does not apply is left out).

    Parameters
    ----------
    in_a : float or None
        The circuit's overcurrent device's In (Ir) [A]; ``None`` for an RCCB.
    rcds : tuple of (str, ResidualBand), optional
        The RCDs on the circuit's path (:func:`coordination.residual.rcds_on_path`), where the
        caller has them.
    """
    band = rcd_of(study, cid)
    out = []
    if band is not None:
        out.append(_touch_voltage(study, cid, band))
    out.append(_additional_protection(study, cid, in_a, rcds))
    if band is not None:
        out.append(_leakage(study, cid, band))
    return tuple(r for r in out if r is not None)
