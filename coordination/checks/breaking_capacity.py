"""Breaking capacity: the device against the largest fault at its board (IEC 60364-4-43,
434.5.1)."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from coordination.checks.common import _get, a_text
from coordination.checks.results import CheckResult, _result
from coordination.model import Study
from curves.band import Band

#: Study-file keys of a device table that state its breaking capacity.
CAPACITY_KEYS = ("icn_a", "icu_a", "ics_a", "breaking_capacity_a")


def _breaking_capacity(study: Study, cid: str, band: Band, node: Any) -> CheckResult:
    circuit = study.by_id[cid]
    ik_max = _get(node, "ik_max_a")
    ik3 = _get(node, "ik3_max_a", ik_max)
    ik1 = _get(node, "ik1_max_a", ik_max)
    if circuit.phases == 3:
        options = [(x, n) for x, n in ((ik3, "three-phase"), (ik1, "line-neutral"))
                   if x is not None]
        fault, kind = max(options) if options else (ik_max or 0.0, "maximum")
    else:
        fault, kind = (ik1, "line-neutral") if ik1 is not None else (ik_max or 0.0, "maximum")
    ief_max = _get(node, "ief_max_board_a")
    if ief_max is not None and math.isfinite(ief_max) and ief_max > fault:
        fault, kind = ief_max, "earth"  # the device must break the largest fault it can see
    device = circuit.device
    stated = isinstance(device, Mapping) and any(k in device for k in CAPACITY_KEYS)
    if circuit.breaking_capacity_a is not None:
        capacity, origin = float(circuit.breaking_capacity_a), "given in the study"
    elif band.breaking_capacity_a is not None:
        capacity = float(band.breaking_capacity_a)
        origin = "given in the study" if stated else f"assumed: the {band.family} family default"
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
