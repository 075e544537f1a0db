"""Breaking capacity: the device against the largest fault at its board (IEC 60364-4-43,
434.5.1)."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from coordination.checks.common import a_text
from coordination.checks.results import CheckResult, _result
from coordination.criterion import breaking_duty
from coordination.model import Study
from curves.band import Band

#: Study-file keys of a device table that state its breaking capacity.
CAPACITY_KEYS = ("icn_a", "icu_a", "ics_a", "breaking_capacity_a")


def _breaking_capacity(study: Study, cid: str, band: Band, node: Any) -> CheckResult:
    circuit = study.by_id[cid]
    fault, kind = breaking_duty(node, circuit.phases)
    device = circuit.device
    stated = isinstance(device, Mapping) and any(k in device for k in CAPACITY_KEYS)
    if circuit.breaking_capacity_a is not None:
        capacity, origin = float(circuit.breaking_capacity_a), "given in the study"
    elif band.breaking_capacity_a is not None:
        capacity = float(band.breaking_capacity_a)
        family = band.settings.get("short_circuit_family", band.family)  # a motor's device
        origin = "given in the study" if stated else f"assumed: the {family} family default"
    else:
        capacity, origin = math.nan, "unknown"
    details = {"current_a": fault, "fault": kind, "capacity_origin": origin,
               "source": "IEC 60364-4-43 434.5.1"}
    if not math.isfinite(capacity):
        reason = (f"breaking capacity of {band.name} unknown; give the circuit's "
                  "breaking_capacity_a")
        return _result(cid, "breaking-capacity", False, fault, math.nan, "A", reason, band,
                       details)
    ok = fault <= capacity
    if ok:
        reason = (f"{band.name} breaks {a_text(capacity)} ({origin}) >= {kind} fault "
                  f"{a_text(fault)} at its board")
    else:
        reason = (f"{kind} fault {a_text(fault)} at the board exceeds the {a_text(capacity)} of "
                  f"{band.name} ({origin}): choose a device rated for at least {a_text(fault)}, or "
                  "back-up protection proven by the maker's tests")
    return _result(cid, "breaking-capacity", ok, fault, capacity, "A", reason, band, details)
