"""One assessment of a study: fault levels, the selectivity of every pair, the protection checks.

The commands ``check``, ``plot``, ``report`` and ``demo`` and the report itself call
:func:`assess` rather than each running the three stages themselves, so they all see the same
results computed in the same order.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from coordination import checks, engine, faults
from coordination.checks import CheckResult
from coordination.engine import Analysis
from coordination.faults import FaultLevels
from coordination.model import Study

if TYPE_CHECKING:  # imported by assess for a study with standby sources: most have none
    from coordination.standby import CaseAssessment


@dataclass(frozen=True)
class Assessment:
    """What a study comes to.

    Attributes
    ----------
    levels : FaultLevels
        Fault levels at every board and circuit end (:func:`coordination.faults.compute`).
    analysis : Analysis
        Selectivity of every upstream/downstream pair (:func:`coordination.engine.analyse`).
    checks : tuple of CheckResult
        Every protection check, on the envelope basis (:func:`coordination.checks.run`).
    ok : bool
        Every selectivity requirement and every protection check is met, on the normal supply
        and on every standby source.
    basis : str or None
        The band basis asked for (``None``: each circuit's own, else the study's).
    cases : tuple of CaseAssessment
        One per standby source (:func:`coordination.standby.assess_case`), in the study's
        order; empty without standby sources.
    """

    levels: FaultLevels
    analysis: Analysis
    checks: tuple[CheckResult, ...]
    ok: bool
    basis: str | None = None
    cases: tuple[CaseAssessment, ...] = ()


def assess(study: Study, basis: str | None = None) -> Assessment:
    """Fault levels, selectivity and protection checks of a study.

    Parameters
    ----------
    study : Study
        A loaded study.
    basis : str, optional
        ``"typical"`` or ``"envelope"`` for every device's selectivity band; ``None``: each
        circuit's own, else the study's. The protection checks always take the envelope.

    Returns
    -------
    Assessment
        The three results and whether every requirement is met.

    References
    ----------
    IEC 60909-0 (fault levels), IEC 60947-2 Annex A (selectivity), IEC 60364-4-41, -4-43 and
    -5-54 (protection checks).

    Examples
    --------
    >>> from coordination.study import from_dict
    >>> s = from_dict({"supply": {"pfc_a": 16000, "ze_ohm": 0.35, "phases": 1},
    ...                "circuit": [{"id": "a", "from": "supply", "device": "gG63"}]})
    >>> result = assess(s)
    >>> print(len(result.levels.nodes), len(result.analysis.pairs), result.basis)
    1 0 None
    """
    levels = faults.compute(study)
    analysis = engine.analyse(study, levels, basis=basis)
    results = checks.run(study, levels)
    cases: tuple[CaseAssessment, ...] = ()
    if study.supply.standby:
        from coordination.standby import assess_case

        cases = tuple(assess_case(study, source, basis) for source in study.supply.standby)
    ok = bool(analysis.ok and all(r.ok for r in results) and all(c.ok for c in cases))
    return Assessment(levels=levels, analysis=analysis, checks=results, ok=ok, basis=basis,
                      cases=cases)
