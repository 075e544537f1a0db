"""Which time-current plots the report carries: one per board, one per circuit with a
non-selective pair above it (alike circuits share one), at most :data:`MAX_PAIR_PLOTS` of those.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from coordination.engine import Analysis
from coordination.model import Study
from coordination.text import finite_or_none

#: Verdicts from worst to best.
VERDICT_RANK = {"none": 0, "partial": 1, "total": 2}


# -- what goes in the report -------------------------------------------------------------------
def boards(study: Study) -> list[str]:
    """Circuits that feed a board, in study order."""
    return [c.id for c in study.circuits if study.children.get(c.id)]


def _worst_key(analysis: Analysis, circuit_id: str, rating: float) -> tuple:
    pairs = analysis.for_circuit(circuit_id)
    if not pairs:
        return (3, math.inf, -rating)
    worst = min(pairs, key=lambda p: (VERDICT_RANK[p.verdict],
                                      finite_or_none(p.limit_a) or math.inf))
    return (VERDICT_RANK[worst.verdict], finite_or_none(worst.limit_a) or math.inf, -rating)


@dataclass(frozen=True)
class PlannedPlot:
    """One plot page of the report.

    Attributes
    ----------
    kind : str
        ``"board"`` (a board's representative circuit) or ``"pair"`` (a circuit with a
        non-selective pair above it).
    circuit : str
        The circuit drawn, with every device above it.
    heading : str
        The page heading.
    also : tuple of str
        Circuits of the same board with the same device and the same selectivity results: the
        plot stands for them too (their cables and loads differ).
    """

    kind: str
    circuit: str
    heading: str
    also: tuple[str, ...] = ()


def _signature(study: Study, analysis: Analysis, circuit_id: str) -> tuple:
    """Circuits with equal signatures have the same plot but for their cables and loads."""
    from coordination.devices import band_for

    pairs = tuple((p.upstream, p.verdict, p.limit_a, tuple(p.window_a), p.decided_by)
                  for p in analysis.for_circuit(circuit_id))
    return (study.by_id[circuit_id].parent, band_for(study, circuit_id, analysis.basis).key,
            pairs)


#: At most this many plots of non-selective pairs (the worst first); the notes name the rest.
MAX_PAIR_PLOTS = 60


def _severity(analysis: Analysis, circuit_id: str) -> tuple[int, float]:
    """Worst verdict first, then the smallest fraction of the window that is selective."""
    worst = (3, math.inf)
    for p in analysis.for_circuit(circuit_id):
        if p.verdict == "total":
            continue
        top = finite_or_none(p.window_a[1]) or 1.0
        worst = min(worst, (VERDICT_RANK[p.verdict], (finite_or_none(p.limit_a) or 0.0) / top))
    return worst


def plot_plan(study: Study, analysis: Analysis, *,
              max_pair_plots: int = MAX_PAIR_PLOTS) -> list[PlannedPlot]:
    """The plots the report carries.

    One per board that has an incoming device (its outgoing circuit with the least selectivity,
    which draws the whole chain above it), then one per circuit that has a non-selective pair
    above it, except that circuits of one board with the same device and the same results share
    one plot (listed in ``also``), so a large study does not print a page per final circuit.
    Of those, at most ``max_pair_plots``, the worst first (kept in study order);
    :func:`not_drawn` names the rest.
    """
    from coordination.devices import band_for

    plan: list[PlannedPlot] = []
    covered: dict[tuple, list[str]] = {}  # signature -> [drawn circuit, others...]
    for board_circuit in boards(study):
        # a residual-current switch has no overcurrent band to draw
        outgoing = [c for c in study.children[board_circuit] if study.by_id[c].device is not None]
        if not outgoing:
            continue
        pick = min(outgoing, key=lambda cid: _worst_key(
            analysis, cid, band_for(study, cid, analysis.basis).rating_a))
        name = study.by_id[board_circuit].board or board_circuit
        plan.append(PlannedPlot("board", pick, f"Board {name}"))
        covered.setdefault(_signature(study, analysis, pick), [pick])
    above: dict[str, list[str]] = {}
    for p in analysis.pairs:
        if p.verdict != "total":
            above.setdefault(p.downstream, []).append(p.upstream_span)
    for downstream, upstreams in above.items():
        sig = _signature(study, analysis, downstream)
        if sig in covered:
            if downstream not in covered[sig]:
                covered[sig].append(downstream)
            continue
        covered[sig] = [downstream]
        plan.append(PlannedPlot("pair", downstream,
                                f"Not selective: {downstream} under {', '.join(upstreams)}"))
    pair_plots = [e for e in plan if e.kind == "pair"]
    if len(pair_plots) > max_pair_plots:
        keep = {e.circuit for e in sorted(pair_plots, key=lambda e: _severity(
            analysis, e.circuit))[:max_pair_plots]}
        plan = [e for e in plan if e.kind == "board" or e.circuit in keep]
    by_drawn = {members[0]: tuple(members[1:]) for members in covered.values()}
    return [PlannedPlot(e.kind, e.circuit, e.heading, by_drawn.get(e.circuit, ()))
            for e in plan]


def not_drawn(analysis: Analysis, plan: Sequence[PlannedPlot]) -> list[str]:
    """Circuits with a non-selective pair above them that no plot of the plan stands for."""
    covered = {e.circuit for e in plan} | {c for e in plan for c in e.also}
    out: list[str] = []
    for p in analysis.pairs:
        if p.verdict != "total" and p.downstream not in covered and p.downstream not in out:
            out.append(p.downstream)
    return out

