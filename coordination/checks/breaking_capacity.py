"""Breaking capacity: the device against the largest fault at its board (IEC 60364-4-43,
434.5.1), or a declared back-up by a device above it (:mod:`coordination.backup`)."""

from __future__ import annotations

import math
from typing import Any

from coordination import backup
from coordination.checks.common import a_text
from coordination.checks.results import CheckResult, _result
from coordination.criterion import breaking_duty
from coordination.model import SUPPLY_ID, Study
from curves.band import Band
from curves.spec import CAPACITY_KEYS, capacity_stated

__all__ = ["CAPACITY_KEYS"]


def _rating_name(band: Band) -> str:
    """Which rated capacity the band carries: Ics or Icu (IEC 60947-2 breakers), Icn (IEC
    60898-1 MCBs), else the rated breaking capacity."""
    if band.family in ("breaker-tm", "breaker-electronic"):
        return "Ics" if band.settings.get("ics_a") is not None else "Icu"
    return "Icn" if band.family == "mcb" else "rated breaking capacity"


def _breaking_capacity(study: Study, cid: str, band: Band, node: Any,
                       duty: tuple[float, str] | None = None) -> CheckResult:
    """The breaking-capacity check of one circuit; ``duty`` is its
    :func:`~coordination.criterion.breaking_duty` where the caller has it already."""
    circuit = study.by_id[cid]
    fault, kind = breaking_duty(node, circuit.phases) if duty is None else duty
    rating = _rating_name(band)
    if circuit.breaking_capacity_a is not None:
        capacity, origin = float(circuit.breaking_capacity_a), "given in the study"
        rating = "breaking capacity"
    elif band.breaking_capacity_a is not None:
        capacity = float(band.breaking_capacity_a)
        family = band.settings.get("short_circuit_family", band.family)  # a motor's device
        origin = ("given in the study" if capacity_stated(circuit.device)
                  else f"assumed: the {family} family default")
    else:
        capacity, origin = math.nan, "unknown"
    if rating == "Ics":
        origin += "; Ics used where given, the stricter of Icu and Ics"
    feeder = None if circuit.parent == SUPPLY_ID else study.by_id[circuit.parent]
    declared = backup.declared_backups(circuit, feeder)
    details: dict[str, Any] = {"current_a": fault, "fault": kind, "capacity_origin": origin,
                               "capacity_rating": rating, "source": "IEC 60364-4-43 434.5.1"}
    if declared:
        details["backups"] = tuple(backup.json_backups(declared))
    own_ok = math.isfinite(capacity) and fault <= capacity
    cover = None if own_ok else backup.covering(fault, declared)
    if cover is not None:
        details.update(backed_up_by=cover.upstream, backup_limit_a=cover.current_a,
                       source=backup.BACKUP_SOURCE)
        own = (f"its {rating} {a_text(capacity)} ({origin})" if math.isfinite(capacity)
               else "its own capacity unknown")
        reason = (f"{kind} fault {a_text(fault)} at the board exceeds {own} of {band.name}, "
                  f"within the {backup.describe(cover)}")
        return _result(cid, "breaking-capacity", True, fault, cover.current_a, "A", reason,
                       band, details, study.rule_set)
    if not math.isfinite(capacity):
        reason = (f"breaking capacity of {band.name} unknown; give the circuit's "
                  "breaking_capacity_a, or declare a back-up (backup_a, or conditional_a on "
                  "the feeder)")
        return _result(cid, "breaking-capacity", False, fault, math.nan, "A", reason, band,
                       details, study.rule_set)
    if own_ok:
        reason = (f"{band.name} breaks {a_text(capacity)} ({rating}, {origin}) >= {kind} fault "
                  f"{a_text(fault)} at its board")
    else:
        short = "" if not declared else (
            f"; the declared back-up reaches only {a_text(declared[0].current_a)} "
            f"({declared[0].key} by {declared[0].upstream})")
        reason = (f"{kind} fault {a_text(fault)} at the board exceeds the {rating} "
                  f"{a_text(capacity)} of {band.name} ({origin}){short}: choose a device rated "
                  f"for at least {a_text(fault)}, or declare back-up protection proven by the "
                  "maker's tests (backup_a, or conditional_a on the feeder)")
    return _result(cid, "breaking-capacity", own_ok, fault, capacity, "A", reason, band, details,
                   study.rule_set)
