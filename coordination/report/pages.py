"""The report's pages, in order: a cover (title, date, tool version, the title block, the supply, a
summary, the standards used and the caution), the installation diagram (one sheet, or the boards
then a sheet per board), the device register, fault levels, the selectivity of every
pair, the protection checks, each standby source's section (:mod:`.cases`), a time-current plot
per board and per circuit that has a non-selective pair above it, and the notes and
limitations.

Each page is a :data:`~.layout.PageBuilder`, drawn only when the PDF is written.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from coordination import CAUTION, __version__, rules
from coordination.faults import FaultLevels
from coordination.model import Study
from coordination.pipeline import Assessment

from .cases import case_pages, summary_lines
from .content import (
    CHECKS_INTRO,
    CHECKS_RCD,
    FAILURES_INTRO,
    FAULTS_INTRO,
    NOTES,
    PAIRS_INTRO,
    PAIRS_RCD,
    RCD_STANDARDS,
    REGISTER_INTRO,
    REGISTER_RCD,
    STANDARDS,
    STARTING_INTRO,
    _basis_summary,
    _check_failures,
    _check_matrix,
    _device_table,
    _fault_table,
    _pair_table,
    _starting_table,
    _supply_lines,
    ka_text,
    report_date,
    sentence,
)
from .layout import (
    FAIL_INK,
    INK,
    LEFT,
    MUTED,
    TOP,
    PageBuilder,
    TableSpec,
    draw_table,
    finish_page,
    new_page,
    table_pages,
    wrap_words,
)
from .plan import MAX_PAIR_PLOTS, PlannedPlot, boards, not_drawn, plot_plan

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure


def _cover(study: Study, result: Assessment) -> PageBuilder:
    levels, analysis, results, basis = result.levels, result.analysis, result.checks, result.basis

    def build(number: int, total: int) -> Figure:
        fig = new_page(study, None)
        y = 0.9
        fig.text(LEFT, y, "Selectivity report", fontsize=24, fontweight="bold", color=INK,
                 va="top")
        y -= 0.05
        for line in wrap_words(study.title, 64) or [""]:
            fig.text(LEFT, y, line, fontsize=15, color=INK, va="top")
            y -= 0.025
        y -= 0.01
        source = f"   study file: {Path(study.source).name}" if study.source else ""
        fig.text(LEFT, y, f"Date {report_date().isoformat()}   tool: coordination "
                 f"{__version__}{source}", fontsize=9, color=MUTED, va="top")
        y -= 0.045

        def block(title: str, lines: Iterable[str], y: float, width: int = 118) -> float:
            fig.text(LEFT, y, title, fontsize=11, fontweight="bold", color=INK, va="top")
            y -= 0.022
            for raw in lines:
                for k, text in enumerate(wrap_words(raw, width) or [""]):
                    fig.text(LEFT + (0.02 if k else 0.0), y, text, fontsize=8.5, color=INK,
                             va="top")
                    y -= 0.0155
            return y - 0.012

        if study.title_block:  # two columns: seven short lines would crowd the page's foot
            fig.text(LEFT, y, "Title block", fontsize=11, fontweight="bold", color=INK,
                     va="top")
            y -= 0.022
            items = [f"{key}: {value}" for key, value in study.title_block]
            rows = (len(items) + 1) // 2
            for k, text in enumerate(items):
                column, row = divmod(k, rows)
                fig.text(LEFT + 0.44 * column, y - 0.0155 * row, text[:60], fontsize=8.5,
                         color=INK, va="top")
            y -= 0.0155 * rows + 0.012
        y = block("Supply", _supply_lines(study, levels), y)
        summary = analysis.summary()
        failed = [r for r in results if not r.ok]
        n_boards = len(boards(study))
        verdict = ("Every selectivity requirement and protection check is met"
                   f"{' on every supply' if result.cases else ''}." if result.ok else
                   "NOT every requirement is met: see the selectivity table and the checks"
                   f"{' of each supply' if result.cases else ''}.")
        y = block("Summary", [
            f"{len(study.circuits)} circuit{'s' if len(study.circuits) != 1 else ''}, "
            f"{n_boards} board{'s' if n_boards != 1 else ''} with an incoming device.",
            f"{summary['pairs']} upstream/downstream pairs: {summary['total']} total, "
            f"{summary['partial']} partial, {summary['none']} none; "
            f"{summary['unmet']} below their required selectivity.",
            f"{len(results)} protection checks, {len(failed)} failed.",
            *summary_lines(result),
            verdict,
        ], y)
        y = block("Bases", [_basis_summary(study, basis)], y)
        y = block("Rules", [rules.summary(study.rule_set)], y)
        from coordination.residual import has_rcds

        used = STANDARDS + (RCD_STANDARDS if has_rcds(study) else ())
        y = block("Standards used", [f"{code}: {what}" for code, what in used], y)
        # the caution, boxed
        fig.text(LEFT, y - 0.005, "Caution", fontsize=11, fontweight="bold", color=FAIL_INK,
                 va="top")
        fig.text(LEFT, y - 0.03, "\n".join(wrap_words(CAUTION, 95)), fontsize=10,
                 color=INK, va="top", linespacing=1.4,
                 bbox={"boxstyle": "round,pad=0.6", "facecolor": "#f3efe6",
                       "edgecolor": FAIL_INK, "linewidth": 0.8})
        finish_page(fig, number, total)
        return fig

    return build


def _plot_page(study: Study, result: Assessment, entry: PlannedPlot) -> PageBuilder:
    levels, analysis, basis = result.levels, result.analysis, result.basis
    kind, circuit_id, heading = entry.kind, entry.circuit, entry.heading

    def build(number: int, total: int) -> Figure:
        from coordination.plot import pairs_in_chain, plot_circuit

        fig = new_page(study, heading)
        ax = fig.add_axes((0.11, 0.42, 0.84, 0.49))
        plot_circuit(study, levels, analysis, circuit_id, basis=basis, ax=ax,
                     title=f"{circuit_id} and the devices above it", results=result.checks,
                     cases=[c.case for c in result.cases])
        chain = (circuit_id, *study.ancestors(circuit_id))
        y = 0.235
        parent = study.by_id[circuit_id].parent
        if kind == "board" and parent in study.by_id:
            board = study.by_id[parent].board or parent
            text = (f"Board {board} is fed by {parent}. Drawn: its outgoing circuit {circuit_id}, "
                    "the one with the least selectivity on this board, with every device "
                    "above it.")
        else:
            text = (f"Drawn: circuit {circuit_id} with every device above it; the hatched "
                    "zones are where both devices of a pair may operate.")
        if entry.also:
            text += (f" The same device on the same board, with the same results, also "
                     f"protects: {', '.join(entry.also)}.")
        for line in wrap_words(text, 125):
            fig.text(LEFT, y, line, fontsize=7.5, color=INK, va="top")
            y -= 0.013
        rows, flags = [], []
        for p in pairs_in_chain(analysis, chain):
            rows.append((p.downstream, p.upstream_span, p.verdict,
                         "-" if p.verdict == "total" else ka_text(p.limit_a),
                         f"{ka_text(p.window_a[0])}-{ka_text(p.window_a[1])}", p.decided_by,
                         "yes" if p.ok else "NO"))
            flags.append(not p.ok)
        if rows:
            spec = TableSpec(("downstream", "upstream", "verdict", "Is kA", "window kA",
                              "decided by", "met"), (1.0, 1.0, 0, 0, 0.3, 0.3, 0),
                             tuple(rows), "lllrllr", fit=(0, 1, 2, 5), whole=(3, 4, 6),
                             flags=tuple(flags),
                             failing=tuple((3, 6) if flag else () for flag in flags))
            draw_table(fig, spec, range(len(rows)), y - 0.006)
        finish_page(fig, number, total)
        return fig

    return build


def _residual_page(study: Study, result: Assessment, feeder: str) -> PageBuilder:
    """The residual-current plot of a board's RCDs and those above it, and their pairs."""
    name = "origin" if feeder not in study.by_id else (study.by_id[feeder].board or feeder)

    def build(number: int, total: int) -> Figure:
        from coordination.plot_residual import plot_residual

        fig = new_page(study, f"RCDs of board {name}")
        ax = fig.add_axes((0.11, 0.42, 0.84, 0.49))
        plot_residual(study, feeder, levels=result.levels, ax=ax,
                      title=f"RCDs of board {name} and above it (residual current)")
        y = 0.235
        text = ("Residual current in mA: each RCD between its minimum non-actuating time and "
                "its maximum break time, the worst case of IEC 61008-1 / 61009-1; RCDs of one "
                "kind share a band.")
        for line in wrap_words(text, 125):
            fig.text(LEFT, y, line, fontsize=7.5, color=INK, va="top")
            y -= 0.013
        on_board = set(study.children.get(feeder, ()))
        pairs = [p for p in result.analysis.residual if p.downstream in on_board]
        rows = tuple((p.downstream, p.upstream, p.verdict, p.decided_by, "yes" if p.ok else "NO")
                     for p in pairs)
        if rows:
            spec = TableSpec(("downstream", "upstream", "verdict", "decided by", "met"),
                             (1.0, 1.0, 0, 0.3, 0), rows, "llllr", fit=(0, 1, 2, 3, 4),
                             flags=tuple(not p.ok for p in pairs),
                             failing=tuple(() if p.ok else (4,) for p in pairs))
            draw_table(fig, spec, range(len(rows)), y - 0.006)
        finish_page(fig, number, total)
        return fig

    return build


def _notes_page(study: Study, levels: FaultLevels, omitted: Sequence[str] = (),
                sheets_left_out: int = 0) -> PageBuilder:
    def build(number: int, total: int) -> Figure:
        fig = new_page(study, "Notes and limitations")
        y = TOP - 0.01
        convention = levels.convention
        notes = [*NOTES, ("Fault convention of this study", convention or "-")]
        if omitted:
            shown = ", ".join(omitted[:40]) + (f" and {len(omitted) - 40} more"
                                               if len(omitted) > 40 else "")
            notes.append(("Plots left out", (
                f"{len(omitted)} circuits with a non-selective pair above them are not drawn "
                f"(the report draws the {MAX_PAIR_PLOTS} worst); draw any of them with "
                f"'coordination plot STUDY --circuit ID': {shown}.")))
        if sheets_left_out:
            notes.append(("Diagram sheets left out", (
                f"The report carries the first {MAX_DIAGRAM_PAGES} sheets of the installation "
                f"diagram; {sheets_left_out} more (boards later in the study) are drawn by "
                "'coordination diagram STUDY -o FILE.pdf'.")))
        for title, text in notes:
            fig.text(LEFT, y, title, fontsize=10, fontweight="bold", color=INK, va="top")
            y -= 0.019
            for line in wrap_words(str(text), 108):
                fig.text(LEFT, y, line, fontsize=8.2, color=INK, va="top")
                y -= 0.0145
            y -= 0.012
        fig.text(LEFT, y - 0.01, "Caution", fontsize=10, fontweight="bold", color=FAIL_INK,
                 va="top")
        fig.text(LEFT, y - 0.032, "\n".join(wrap_words(CAUTION, 110)), fontsize=8.5,
                 color=INK, va="top", linespacing=1.4)
        finish_page(fig, number, total)
        return fig

    return build


#: The most diagram pages a report carries (the boards' sheet first, then the boards in study
#: order); the diagram command draws every sheet.
MAX_DIAGRAM_PAGES = 24


def _diagram_pages(study: Study, result: Assessment) -> tuple[list[PageBuilder], int]:
    """The installation diagram's sheets as pages (:mod:`coordination.diagram`), at most
    :data:`MAX_DIAGRAM_PAGES`, and how many sheets were left out."""
    from coordination import diagram
    from coordination.devices import compact_labels

    sheets = diagram.plan(study)
    found = diagram.problems(result.analysis, result.checks)
    device = compact_labels(study, result.analysis.basis)
    builders: list[PageBuilder] = []
    for sheet in sheets[:MAX_DIAGRAM_PAGES]:
        def build(number: int, total: int, sheet: diagram.Sheet = sheet) -> Figure:
            return diagram.draw_sheet(study, result.levels, sheet, found, device, number=number,
                                      total=total, title_block=study.title_block,
                                      counted="page")

        builders.append(build)
    return builders, max(0, len(sheets) - MAX_DIAGRAM_PAGES)


def build_pages(study: Study, result: Assessment) -> list[PageBuilder]:
    """Lay out the report's pages from an assessment of the study (each drawn when called).

    Parameters
    ----------
    study : Study
        The loaded study.
    result : Assessment
        Its assessment (:func:`coordination.pipeline.assess`).

    Returns
    -------
    list of PageBuilder
        ``pages[k](number, total)`` draws page k as a matplotlib Figure.

    Examples
    --------
    >>> from coordination import study
    >>> from coordination.pipeline import assess
    >>> from coordination.report import bundled_example
    >>> s = study.loads(bundled_example("small-shop.toml")[0])
    >>> print(len(build_pages(s, assess(s))) > 5)
    True
    """
    levels, analysis, results, basis = result.levels, result.analysis, result.checks, result.basis
    from coordination.plot_residual import residual_boards

    rcd_boards = residual_boards(study)
    rcd = (lambda text: (text,)) if rcd_boards else (lambda text: ())  # only with RCDs
    pages: list[PageBuilder] = [_cover(study, result)]
    drawn, left_out = _diagram_pages(study, result)
    pages += drawn
    pages += table_pages(study, "Device register", (*REGISTER_INTRO, *rcd(REGISTER_RCD)),
                         _device_table(study, basis))
    pages += table_pages(study, "Fault levels", (*FAULTS_INTRO, sentence(levels.convention)),
                         _fault_table(study, levels))
    pages += table_pages(study, "Selectivity of every pair", (*PAIRS_INTRO, *rcd(PAIRS_RCD)),
                         _pair_table(study, analysis))
    pages += table_pages(study, "Protection checks", (*CHECKS_INTRO, *rcd(CHECKS_RCD)),
                         _check_matrix(study, results))
    starting = _starting_table(results)
    if starting.rows:
        pages += table_pages(study, "Motor starts and inrush", STARTING_INTRO, starting)
    failures = _check_failures(results)
    if failures.rows:
        pages += table_pages(study, "Protection checks that fail or are near their limit",
                             FAILURES_INTRO, failures)
    pages += case_pages(study, result)
    plan = plot_plan(study, analysis)
    for entry in plan:
        pages.append(_plot_page(study, result, entry))
    for feeder in rcd_boards:
        pages.append(_residual_page(study, result, feeder))
    pages.append(_notes_page(study, levels, not_drawn(analysis, plan), left_out))

    return pages

