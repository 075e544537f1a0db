"""The report's sections for the standby sources: for each one, its fault levels (initial
currents and how the earth faults decay), the selectivity of every pair it feeds, its protection
checks and the plots of the circuits that fail on it, each plot with the decaying currents.

Nothing here is drawn for a study without a ``[[supply.standby]]`` source.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

from coordination.model import Study

from .content import FAILURES_INTRO, _check_cell, _check_failures, _pair_table, ka_text, sentence
from .layout import (
    INK,
    LEFT,
    PageBuilder,
    TableSpec,
    draw_table,
    finish_page,
    new_page,
    table_pages,
    wrap_words,
)

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

    from coordination.pipeline import Assessment
    from coordination.standby import CaseAssessment

#: The check columns of a standby case (overload does not depend on the source).
CASE_COLUMNS = (("disconnection", "disconnection"), ("fault-energy", "fault energy"),
                ("breaking-capacity", "breaking capacity"))
#: Plots per standby source at most (its circuits that fail, worst first).
MAX_CASE_PLOTS = 6

CASE_FAULTS_INTRO = (
    "Initial (subtransient) currents of each fault, the generator's impedances after "
    "IEC 60909-0 (K_G on maximum currents): at each circuit's board Ik3 three-phase, Ik1 "
    "line-neutral and the window value; at its far end the minimum earth fault Ief with its "
    "transient and sustained values (the current decays from the first through the second to "
    "the third with the time constants T''d and T'd) and the minimum short circuit Ik min. "
    "Currents in kA.",
)
CASE_PAIRS_INTRO = (
    "Each circuit the source feeds under each device above it that it feeds too. A fault is "
    "named by its initial current; the downstream device's clearing time is read where the "
    "decaying current meets its upper edge, the upstream device's time where it meets its "
    "lower edge (common practice; the upstream device has carried the larger earlier current, "
    "so allow a margin). Columns as in the selectivity of the normal supply.",
)
CASE_CHECKS_INTRO = (
    "Disconnection: the envelope's clearing time under the decaying minimum earth fault at the "
    "far end against IEC 60364-4-41 Table 41.1 ('never': the current decays before the device "
    "is sure to operate); fault energy: the integral of I(t)^2 up to that clearing time, no more "
    "than the device's let-through at the initial current (IEC 60364-4-43, 434.5.2); breaking "
    "capacity against the initial current. Overload does not depend on the source and is "
    "checked on the normal supply.",
)


def _fault_table(case: CaseAssessment) -> TableSpec:
    levels, nodes = case.case.levels, case.case.nodes
    rows = []
    for n in levels.nodes:
        d = nodes[n.circuit].earth_end
        rows.append((n.circuit, n.board, str(n.phases), ka_text(n.ik3_max_a),
                     ka_text(n.ik1_max_a), ka_text(n.ik_max_a), ka_text(n.ief_min_a),
                     ka_text(float(d.i_trans_a)), ka_text(float(d.i_sust_a)),
                     ka_text(n.ik_min_end_a)))
    return TableSpec(("circuit", "board", "ph", "Ik3 kA", "Ik1 kA", "window kA", "Ief kA",
                      "transient kA", "sustained kA", "Ik min kA"),
                     (0.5, 1.0, 0.0, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2), tuple(rows),
                     "lllrrrrrrr", fit=(0, 1))


def _check_matrix(case: CaseAssessment) -> TableSpec:
    """One row per circuit the source feeds, one column per check; only the cells of failed
    checks are set in the failure ink (as the normal supply's, ``content._check_matrix``)."""
    by_circuit: dict[str, dict[str, Any]] = {}
    for r in case.checks:
        by_circuit.setdefault(r.circuit, {})[r.check] = r
    rows, flags, failing = [], [], []
    for cid in case.case.circuits:
        mine = by_circuit.get(cid, {})
        rows.append((cid, *(_check_cell(mine[k]) if k in mine else "-"
                            for k, _ in CASE_COLUMNS)))
        flags.append(any(not r.ok for r in mine.values()))
        failing.append(tuple(j for j, (k, _) in enumerate(CASE_COLUMNS, start=1)
                             if k in mine and not mine[k].ok))
    return TableSpec(("circuit", *(title for _, title in CASE_COLUMNS)), (0.0, 1.0, 1.0, 1.0),
                     tuple(rows), "llll", wrap=(1, 2, 3), fit=(0,), flags=tuple(flags),
                     failing=tuple(failing))


def heading_of(study: Study, case: CaseAssessment) -> str:
    """``Standby source 'genset'`` and the board it feeds, for page headings."""
    feeds = case.case.feeds
    where = ("the origin" if feeds == "supply"
             else f"board {study.by_id[feeds].board or feeds}")
    return f"Standby source {case.name!r} on {where}"


def summary_lines(result: Assessment) -> list[str]:
    """One cover line per standby source: its pairs and checks, and whether they are met."""
    lines = []
    for case in result.cases:
        s = case.analysis.summary()
        failed = sum(1 for r in case.checks if not r.ok)
        lines.append(
            f"Standby source {case.name!r} ({case.case.source.rating_kva:g} kVA, "
            f"{len(case.case.circuits)} circuits): {s['pairs']} pairs, {s['unmet']} below "
            f"their required selectivity; {len(case.checks)} protection checks, {failed} "
            f"failed{'' if case.ok else ' - NOT met'}.")
    return lines


def _plot_page(study: Study, result: Assessment, case: CaseAssessment,
               circuit_id: str) -> PageBuilder:
    def build(number: int, total: int) -> Figure:
        from coordination.plot import plot_circuit

        fig = new_page(study, f"Standby source {case.name!r}: {circuit_id}")
        ax = fig.add_axes((0.11, 0.42, 0.84, 0.49))
        plot_circuit(study, result.levels, result.analysis, circuit_id, basis=result.basis,
                     ax=ax, title=f"{circuit_id} and the devices above it",
                     results=result.checks, cases=[case.case])
        text = (f"Drawn: circuit {circuit_id} with every device above it, and the decaying "
                f"faults of standby source {case.name!r} (a curve meets a band where that "
                "device operates; the checks read the envelope). What fails on this source:")
        y = 0.235
        for line in wrap_words(text, 125):
            fig.text(LEFT, y, line, fontsize=7.5, color=INK, va="top")
            y -= 0.013
        rows = [(r.check, r.reason) for r in case.checks
                if r.circuit == circuit_id and not r.ok]
        rows += [(f"selectivity under {p.upstream}",
                  f"{p.verdict}, Is {ka_text(p.limit_a)} kA of initial current; {p.note}")
                 for p in case.analysis.for_circuit(circuit_id) if not p.ok]
        if rows:
            spec = TableSpec(("what", "why"), (0.0, 1.0), tuple(rows), "ll", wrap=(1,),
                             fit=(0,), flags=(True,) * len(rows), failing=((0,),) * len(rows))
            draw_table(fig, spec, range(len(rows)), y - 0.006)
        finish_page(fig, number, total)
        return fig

    return build


def _failing(case: CaseAssessment) -> list[str]:
    """The circuits that fail a check or a pair on this source, in study order."""
    bad = {r.circuit for r in case.checks if not r.ok}
    bad |= {p.downstream for p in case.analysis.pairs if not p.ok}
    return [cid for cid in case.case.circuits if cid in bad]


def case_pages(study: Study, result: Assessment,
               max_plots: int = MAX_CASE_PLOTS) -> list[PageBuilder]:
    """Every standby source's section: fault levels, selectivity, checks, failures, plots."""
    pages: list[PageBuilder] = []
    for case in result.cases:
        title = f"Standby source {case.name!r}"
        pages += table_pages(study, f"{heading_of(study, case)}: fault levels",
                             (*CASE_FAULTS_INTRO, sentence(case.case.levels.convention)),
                             _fault_table(case))
        if case.analysis.pairs:
            pages += table_pages(study, f"{title}: selectivity", CASE_PAIRS_INTRO,
                                 _pair_table(study, case.analysis))
        pages += table_pages(study, f"{title}: protection checks", CASE_CHECKS_INTRO,
                             _check_matrix(case))
        failures = _check_failures(case.checks)
        if failures.rows:
            pages += table_pages(study, f"{title}: checks that fail or are near their limit",
                                 FAILURES_INTRO, failures)
        for cid in _failing(case)[:max_plots]:
            pages.append(_plot_page(study, result, case, cid))
    return pages


def csv_records(result: Assessment) -> dict[str, Sequence[dict[str, Any]]]:
    """The standby sources' rows for the CSV files: pairs, checks and fault levels, each row
    with its ``case``."""
    pairs = [p for case in result.cases for p in case.analysis.pairs]
    checks = [r.to_json() for case in result.cases for r in case.checks]
    nodes = [row for case in result.cases for row in case.case.to_json()["nodes"]]
    return {"pairs": pairs, "checks": checks, "faults": nodes}
