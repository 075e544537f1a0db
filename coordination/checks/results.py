"""The result of a protection check: one record per check and circuit."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

from coordination.rules import RuleSet, tagged
from curves.band import Band

#: Check names, in the order they are run and printed.
CHECK_NAMES = ("disconnection", "overload", "fault-energy", "breaking-capacity",
               "touch-voltage", "additional-protection", "leakage", "starting")
#: The checks every circuit with an overcurrent device has data for, or is listed "not
#: checked" without (the residual-current checks apply only where there are RCDs or sockets,
#: starting only on a circuit with a motor or an inrush).
CIRCUIT_CHECK_NAMES = CHECK_NAMES[:4]


# -------------------------------------------------------------------------------------------
# the result
@dataclass(frozen=True)
class CheckResult:
    """One protection check of one circuit.

    Parameters
    ----------
    circuit : str
        Circuit id.
    check : str
        One of :data:`CHECK_NAMES`.
    ok : bool
        The check passes (``value <= limit`` and nothing else stands against it).
    value : float
        What the installation has or needs, in ``unit`` (operating time [s], current [A],
        required cross-section [mm2]); ``inf`` for never.
    limit : float
        What it must not exceed, in ``unit``.
    unit : str
        ``"s"``, ``"A"`` or ``"mm2"``.
    reason : str
        One line a designer can act on.
    basis : str
        Basis of the band used (``"envelope"``, or ``"datasheet"`` for a device given by points).
    details : mapping
        Further numbers with units in their keys (``zs_ohm``, ``zs_max_ohm``, ``current_a``,
        ``source`` ...), for the JSON output and the report.
    rules : str
        The rule set the check applied (``"iec"``, ``"bs7671"``; :mod:`coordination.rules`),
        also named at the head of ``reason``.
    case : str
        The supply case: ``"normal"``, or a standby source's name (:mod:`coordination.standby`).
    """

    circuit: str
    check: str
    ok: bool
    value: float
    limit: float
    unit: str
    reason: str
    basis: str
    details: Mapping[str, Any] = field(default_factory=dict)
    rules: str = "iec"
    case: str = "normal"

    def __post_init__(self) -> None:
        if self.details.__class__ is not MappingProxyType:  # a read-only view is kept as given
            object.__setattr__(self, "details", MappingProxyType(dict(self.details)))

    def to_json(self) -> dict[str, Any]:
        """The contract keys (circuit, check, ok, value, limit, unit) and more; ``None`` for
        never (:meth:`json_record` with every number finite or ``None``)."""
        out = self.json_record()
        finite = math.isfinite
        for key, val in out.items():  # values replaced in place: the keys stay as they are
            cls = val.__class__
            if cls is float:  # the common case first
                if not finite(val):
                    out[key] = None
            elif cls is str or cls is bool or val is None:
                continue
            elif isinstance(val, float | int) and not isinstance(val, bool):
                out[key] = _finite(val)
        return out

    def json_record(self) -> dict[str, Any]:
        """The contract keys and the details, with numbers left as they are: for the encoder,
        since ``coordination.cli.json_bytes`` writes inf and NaN as null (the same JSON as
        :meth:`to_json`, built in one merge, without a pass over the details: a building's
        check has 8,183 results).

        The merge is ``head | details``: ``details`` is a read-only view of a dict, which the
        ``|`` operator merges as two dicts, where ``{**head, **details}`` reads the view key
        by key (half the merge's cost)."""
        value, limit = self.value, self.limit
        head = {
            "case": self.case,
            "circuit": self.circuit,
            "check": self.check,
            "ok": bool(self.ok),
            "value": None if value is None else float(value),
            "limit": None if limit is None else float(limit),
            "unit": self.unit,
            "reason": self.reason,
            "basis": self.basis,
            "rules": self.rules,
        }
        details = self.details
        out = head | details
        if len(out) < len(head) + len(details):  # a detail named like a contract key
            out.update(head)  # the contract's value, as in to_json
        return out


def _result(cid: str, check: str, ok: bool, value: float, limit: float, unit: str, reason: str,
            band: Band, details: dict[str, Any], rule_set: RuleSet) -> CheckResult:
    """A check's result over a details dict made for it alone (kept as a read-only view of that
    dict rather than copied: 8,183 copies in a building's check), its reason headed by the rule
    set's name (:func:`coordination.rules.tagged`)."""
    return CheckResult(cid, check, ok, value, limit, unit, tagged(rule_set, reason), band.basis,
                       MappingProxyType(details), rule_set.key)


def _finite(x: Any) -> Any:
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None
