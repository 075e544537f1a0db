"""The commands' plain-text tables: fault levels, selectivity pairs, protection checks, times.

Each takes the results of a step (:func:`coordination.faults.compute`,
:func:`coordination.engine.analyse`, :func:`coordination.checks.run`, a band's times) and
returns the text that ``faults``, ``check``, ``times`` and the demo print; the JSON output is
the results' own ``to_json``. The cells are formatted here and laid out by
:func:`coordination.text.table`. The modules of the steps are imported where a table needs them,
so that printing one table loads no other step.
"""

from __future__ import annotations

import math
import textwrap
from collections import defaultdict
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING, Any

from coordination.model import Study
from coordination.text import (
    TERMINAL_COLUMNS,
    format_current,
    format_seconds,
    significant,
    table,
)

if TYPE_CHECKING:
    from coordination.checks import CheckResult
    from coordination.engine import Analysis, PairResult
    from coordination.faults import FaultLevels
    from coordination.standby import CaseAssessment, SupplyCase
    from curves.band import Band


# ---------------------------------------------------------------------------------------------
# fault levels (the faults command)
def _ka(i_a: float | None) -> str:
    return "-" if i_a is None or not math.isfinite(i_a) else f"{i_a / 1000:.3f}"


def _ohm(z: float | None) -> str:
    if z is None or not math.isfinite(z):
        return "-"
    return f"{z:.4f}" if z < 100 else f"{z:.1f}"


def fault_table(study: Study, levels: FaultLevels) -> str:
    """The fault levels as a readable table: currents in kA, impedances in ohm.

    Examples
    --------
    >>> from coordination.faults import compute
    >>> from coordination.study import from_dict
    >>> s = from_dict({"supply": {"pfc_a": 16000, "ze_ohm": 0.35, "phases": 1},
    ...                "circuit": [{"id": "a", "from": "supply", "device": "gG63"}]})
    >>> print(fault_table(s, compute(s)).count("16.000"))
    3
    """
    ik3 = (f"{_ka(levels.origin_ik3_a)} kA" if levels.origin_ik3_a is not None
           else "n/a (single-phase supply)")
    head = [
        f"Fault levels: {study.title}",
        f"origin: Ik3 max {ik3}, Ik1 (line-neutral) max {_ka(levels.origin_ik1_a)} kA, "
        f"Ze {_ohm(levels.ze_ohm)} ohm, U0 {levels.u0_v:g} V",
    ]
    head += textwrap.wrap("source: " + levels.source, 100, subsequent_indent="  ")
    rows = []
    rings = {c.id for c in study.circuits if c.ring}
    for node in levels.nodes:
        rows.append([
            node.circuit + (" (ring)" if node.circuit in rings else ""), node.board,
            str(node.phases), _ka(node.ik3_max_a),
            _ka(node.ik1_max_a), _ka(node.ik_max_a), _ohm(node.zs_ohm), _ka(node.ief_min_a),
            _ka(node.ik_min_end_a) + ("" if node.ik_min_end_kind == "line-neutral" else " LL"),
        ])
    body = table(
        ["circuit", "board", "ph", "Ik3 kA", "Ik1 kA", "window kA", "Zs ohm", "Ief min kA",
         "Ik min kA"],
        rows, "lllrrrrrr")
    return _with_notes(head, body, levels.convention, (
        "at the circuit's board (its origin) the maximum three-phase (Ik3) and "
        "line-neutral (Ik1) currents and the window's end; at its far end the earth-fault loop "
        "Zs, the minimum earth-fault current Ief and the minimum short-circuit current Ik min "
        "(LL: line-line, the cable has no neutral)."), RING_NOTE if rings else None)


#: Under a fault table that has a ring final circuit.
RING_NOTE = ("(ring): a ring final circuit; its far end is the ring's mid-point, where R1 + R2 "
             "is a quarter of the end-to-end (r1 + r2) (common practice).")


def _with_notes(head: list[str], body: str, convention: str, columns: str,
                more: str | None = None) -> str:
    """A fault table under its head lines, with the convention, the columns and any further
    note in words."""
    foot = textwrap.wrap("convention: " + convention, 100, subsequent_indent="  ")
    foot += textwrap.wrap("columns: " + columns, 100, subsequent_indent="  ")
    if more:
        foot += textwrap.wrap(more, 100, subsequent_indent="  ")
    return "\n".join([*head, "", body, "", *foot])


def case_heading(study: Study, case: SupplyCase) -> str:
    """The heading of a standby case's tables: the source and the board it feeds.

    Examples
    --------
    >>> from coordination.generator import StandbySource
    >>> from coordination.model import Circuit, Supply
    >>> from coordination.standby import case_levels
    >>> s = Study("t", Supply(pfc_a=16000.0), (Circuit("in", "supply", "gG200", board="MSB"),
    ...                                        Circuit("a", "in", "B16")))
    >>> print(case_heading(s, case_levels(s, StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3,
    ...                                                    5))))
    Case 'gen': standby generator 500 kVA on board MSB (1 circuit; sustained current 0 x In)
    """
    src = case.source
    where = ("the origin" if case.feeds == "supply"
             else f"board {study.by_id[case.feeds].board or case.feeds}")
    n = len(case.circuits)
    return (f"Case {case.name!r}: standby generator {src.rating_kva:g} kVA on {where} "
            f"({n} circuit{'s' if n != 1 else ''}; sustained current {src.sustained_x:g} x In)")


def case_fault_table(study: Study, case: SupplyCase) -> str:
    """A standby case's fault levels: initial currents, and how the earth fault at each far end
    decays (initial, transient, sustained).

    Examples
    --------
    >>> from coordination.generator import StandbySource
    >>> from coordination.model import Circuit, Supply
    >>> from coordination.standby import case_levels
    >>> s = Study("t", Supply(pfc_a=16000.0), (Circuit("in", "supply", "gG200"),
    ...                                        Circuit("a", "in", "B16")))
    >>> text = case_fault_table(s, case_levels(s, StandbySource("g", 500, 230, 12, 25, 0.02,
    ...                                                         0.3, 5)))
    >>> print(text.splitlines()[1])
    terminals: I''k3 max 6.402 kA, I''k1 max 7.975 kA, U0 230 V
    """
    levels = case.levels
    head = [case_heading(study, case),
            f"terminals: I''k3 max {_ka(levels.origin_ik3_a)} kA, I''k1 max "
            f"{_ka(levels.origin_ik1_a)} kA, U0 {levels.u0_v:g} V"]
    rows = []
    for node in levels.nodes:
        d = case.nodes[node.circuit].earth_end
        rows.append([
            node.circuit + (" (ring)" if study.by_id[node.circuit].ring else ""), node.board,
            str(node.phases), _ka(node.ik3_max_a),
            _ka(node.ik1_max_a), _ka(node.ik_max_a), _ka(node.ief_min_a),
            _ka(float(d.i_trans_a)), _ka(float(d.i_sust_a)),
            _ka(node.ik_min_end_a) + ("" if node.ik_min_end_kind == "line-neutral" else " LL"),
        ])
    body = table(["circuit", "board", "ph", "Ik3 kA", "Ik1 kA", "window kA", "Ief min kA",
                  "transient kA", "sustained kA", "Ik min kA"], rows, "lllrrrrrrr")
    return _with_notes(head, body, levels.convention, (
        "initial (subtransient) currents: at the circuit's board the maximum "
        "three-phase (Ik3) and line-neutral (Ik1) currents and the window's end; at its far "
        "end the minimum earth fault Ief, its transient and sustained values, and the minimum "
        "short circuit Ik min (LL: line-line)."),
        RING_NOTE if any(study.by_id[c].ring for c in case.circuits) else None)


# ---------------------------------------------------------------------------------------------
# selectivity pairs (the check command, the demo)
_BASIS_SHORT = {"typical": "typ", "envelope": "env", "datasheet": "data"}
_VERDICT_TEXT = {"total": "total", "partial": "partial", "none": "none"}


def _pair_ka(value: float | None) -> str:
    if value is None or not math.isfinite(value):
        return "-"
    return f"{value / 1000:.3g}"


def _window(window_a: tuple[float, float]) -> str:
    lo, hi = (float(significant(v, 3)) if math.isfinite(v) else v for v in window_a)
    return f"{format_current(lo)}-{format_current(hi)}"


def pair_table(study: Study, levels: Any, analysis: Analysis, *, unmet_only: bool = False,
               width: int | None = TERMINAL_COLUMNS) -> str:
    """The pairs grouped by the board the downstream device sits on, and a summary line.

    Columns: circuit, device, above (the upstream circuit and device), verdict, Is [kA],
    required [kA], ok, decided by, window (A or kA). Each board's heading gives its largest
    fault and the band bases (downstream/upstream) when every pair there shares them, else a
    column does. Devices are in their compact form (an adjustable breaker's kind, rating and
    Ir; the JSON has the rest).

    Parameters
    ----------
    unmet_only : bool
        Only the pairs below their required selectivity (the summary ``check`` prints).
    width : int or None
        The widest line: the above cells wrap inside their column to fit, between words, never
        a number (``None``: no limit).

    Examples
    --------
    >>> from coordination import study, faults
    >>> from coordination.engine import analyse
    >>> s = study.loads('''
    ... [study]
    ... title = "two fuses"
    ... [supply]
    ... pfc_a = 16000
    ... [[circuit]]
    ... id = "main"
    ... from = "supply"
    ... device = "gG100"
    ... [[circuit]]
    ... id = "sub"
    ... from = "main"
    ... device = "gG63"
    ... ''')
    >>> levels = faults.compute(s)
    >>> print(pair_table(s, levels, analyse(s, levels)).splitlines()[-1].split(":")[0])
    selectivity
    """
    from coordination import engine
    from coordination.devices import compact_labels

    # the devices as the analysis built them (engine.band_for)
    label = compact_labels(study, analysis.basis, band_of=engine.band_for)
    groups: dict[str, list[PairResult]] = {}
    for p in analysis.pairs:
        if unmet_only and p.ok:
            continue
        groups.setdefault(study.board_name(p.downstream), []).append(p)
    blocks = []
    for board, pairs in groups.items():
        bases = {(p.downstream_basis, p.upstream_basis) for p in pairs}
        one_basis = len(bases) == 1
        headers = ["circuit", "device", "above", "verdict", "Is kA", "required kA", "ok",
                   "decided by", "window"] + ([] if one_basis else ["bases"])
        rows = []
        previous = None
        for p in pairs:
            first = p.downstream != previous
            previous = p.downstream
            row = [
                p.downstream if first else "", label[p.downstream] if first else "",
                f"{p.upstream} ({label[p.upstream]})" if p.upstream_count == 1 else
                f"{p.upstream} to {p.upstream_last} ({p.upstream_count} x {label[p.upstream]})",
                _VERDICT_TEXT[p.verdict], _pair_ka(p.limit_a) if p.verdict != "total" else "-",
                "total" if p.required_a is None else _pair_ka(p.required_a),
                "yes" if p.ok else "NO", p.decided_by, _window(p.window_a),
            ]
            if not one_basis:
                row.append(_bases(p.downstream_basis, p.upstream_basis))
            rows.append(row)
        top = pairs[0].window_a[1]
        shared = f", bands {_bases(*next(iter(bases)))}" if one_basis else ""
        blocks.append(f"board {board} (max fault {_pair_ka(top)} kA{shared})\n"
                      + table(headers, rows, "llllrrrll" + "l" * (not one_basis),
                              width=width, wrap=2))
    residual = [p for p in analysis.residual if not (unmet_only and p.ok)]
    if residual:
        blocks.append(residual_pair_table(residual, width=width))
    s = analysis.summary()
    if not analysis.all_pairs:
        blocks.append("no upstream/downstream pairs (a single level of devices)")
    blocks.append(
        f"selectivity: {s['pairs']} pairs, {s['total']} total, {s['partial']} partial, "
        f"{s['none']} none; requirements unmet: {s['unmet']}")
    return "\n\n".join(blocks)


def _bases(downstream: str, upstream: str) -> str:
    """The band bases of a pair: one word when alike, else downstream/upstream (short)."""
    if downstream == upstream:
        return downstream
    return f"{_BASIS_SHORT.get(downstream, downstream)}/{_BASIS_SHORT.get(upstream, upstream)}"


def _ma(i_a: float) -> str:
    return f"{i_a * 1000:.4g} mA" if i_a < 1.0 else format_current(i_a)


def residual_pair_table(pairs: Sequence[PairResult],
                        width: int | None = TERMINAL_COLUMNS) -> str:
    """The pairs of RCDs in series: one row each, and the note of each pair decided by the
    rule (the range of residual current the limit values leave unproven).

    Examples
    --------
    >>> from coordination.engine import PairResult
    >>> p = PairResult("up", "down", "none", None, (0.015, 900.0), "rule", "envelope",
    ...                "envelope", None, False, "RCD 30 mA type A", "RCD 30 mA type A",
    ...                "upstream is a general type", protection="residual")
    >>> print(residual_pair_table([p]).splitlines()[0])
    residual-current selectivity (RCDs in series; residual current on the window)
    """
    headers = ["circuit", "RCD", "above", "verdict", "window", "decided by", "ok"]
    rows = []
    notes: dict[str, list[str]] = {}  # one note for every pair it reads the same for
    for p in pairs:
        rows.append([p.downstream, p.downstream_device, f"{p.upstream} ({p.upstream_device})",
                     _VERDICT_TEXT[p.verdict],
                     f"{_ma(p.window_a[0])} - {_ma(p.window_a[1])}", p.decided_by,
                     "yes" if p.ok else "NO"])
        if p.decided_by == "rule":
            notes.setdefault(p.note, []).append(f"{p.upstream} over {p.downstream}")
    lines = ["residual-current selectivity (RCDs in series; residual current on the window)",
             table(headers, rows, "llllllr", width=width, wrap=2)]
    for note, names in notes.items():  # each note wrapped to the width, indented
        lines += textwrap.wrap(f"{', '.join(names)}: {note}", width or 10_000,
                               initial_indent="  ", subsequent_indent="    ",
                               break_on_hyphens=False)
    return "\n".join(lines)


# ---------------------------------------------------------------------------------------------
# protection checks (the check command, the demo)
def _value_text(value: float, unit: str) -> str:
    """A check's value or limit in its unit, as the reasons write it."""
    from coordination.checks.common import a_text, mm2_text, s_text

    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "-"
    if unit == "s":
        return s_text(value)
    if unit == "A":
        return a_text(value)
    if unit == "mm2":
        return mm2_text(value)
    return f"{value:.3g} {unit}"


#: A check that passes with less than this share of its limit to spare is "near limit".
NEAR_LIMIT = 0.05
#: Checks with no margin to tell: a rated sensitivity against the 30 mA the standard names
#: (additional protection) is met or not, and a 30 mA RCD is the usual choice, not a near miss.
NO_MARGIN = ("additional-protection",)


def check_margin(result: CheckResult) -> float | None:
    """The share of the limit a check has to spare: ``1 - value / limit`` (negative: over it).

    For ``disconnection`` it is the earth-fault loop's margin, ``1 - Zs / Zs max``, the figure
    a designer reads beside the time; ``None`` where there is no finite figure to compare.

    Examples
    --------
    >>> from coordination.checks import CheckResult
    >>> r = CheckResult("c1", "overload", True, 33.0, 34.0, "A", "fine", "envelope")
    >>> print(round(check_margin(r), 3))
    0.029
    """
    if result.check in NO_MARGIN:
        return None
    value, limit = result.value, result.limit
    loop = _loop(result)
    if loop is not None:
        value, limit = loop
    if value is None or limit is None or not (math.isfinite(value) and math.isfinite(limit)):
        return None
    if limit <= 0:
        return None
    return 1.0 - value / limit


def _loop(result: CheckResult) -> tuple[float, float] | None:
    """Zs and the largest Zs for a disconnection the circuit's overcurrent device makes;
    ``None`` for one an RCD makes (its time against the limit is the figure then)."""
    if result.check != "disconnection" or result.details.get("rcd_device"):
        return None
    zs, zs_max = result.details.get("zs_ohm"), result.details.get("zs_max_ohm")
    if zs is not None and zs_max and math.isfinite(zs) and math.isfinite(zs_max):
        return zs, zs_max
    return None


def near_limit(result: CheckResult) -> bool:
    """A check that passes within :data:`NEAR_LIMIT` (5 %) of its limit."""
    margin = check_margin(result)
    return bool(result.ok and margin is not None and margin < NEAR_LIMIT)


def check_status(result: CheckResult) -> str:
    """``"ok"``, ``"near limit"`` or ``"FAIL"``."""
    if not result.ok:
        return "FAIL"
    return "near limit" if near_limit(result) else "ok"


def check_cells(result: CheckResult) -> tuple[str, str]:
    """The value and limit cells of a check, each naming what it is.

    ``disconnection``: Zs against the largest Zs with which the device disconnects in time
    (where an RCD disconnects, its time against the limit, marked RCD);
    ``overload``: the comparison that binds (``"I2 46.4 A"`` against ``"1.45 Iz 59.5 A"``);
    the others their value and limit in their unit.
    """
    from coordination.checks.common import ohm_text

    details = result.details
    loop = _loop(result)
    if loop is not None:
        return f"Zs {ohm_text(loop[0])}", f"max {ohm_text(loop[1])}"
    if result.check == "disconnection" and details.get("rcd_device"):
        return (f"RCD {_value_text(result.value, result.unit)}",
                f"max {_value_text(result.limit, result.unit)}")
    if result.check == "overload" and " <= " in str(details.get("binding", "")):
        left, right = str(details["binding"]).split(" <= ", 1)
        return (f"{left} {_value_text(result.value, result.unit)}",
                f"{right} {_value_text(result.limit, result.unit)}")
    return _value_text(result.value, result.unit), _value_text(result.limit, result.unit)


def _margin_text(result: CheckResult) -> str:
    margin = check_margin(result)
    if margin is None:
        return "-"
    return f"{margin * 100:.1f} %" if abs(margin) < 0.1 else f"{margin * 100:.0f} %"


def check_table(results: Sequence[CheckResult] | Iterable[CheckResult], *,
                attention_only: bool = False, width: int | None = TERMINAL_COLUMNS,
                expected: Sequence[str] | None = None) -> str:
    """The protection checks as a plain-text table, circuit by circuit, failures marked.

    Parameters
    ----------
    results : sequence of CheckResult
        From :func:`coordination.checks.run`.
    attention_only : bool
        Only the checks that fail or are near their limit (the summary ``check`` prints).
    width : int or None
        The widest line; each row's reason is set under it, wrapped to this width.
    expected : sequence of str, optional
        The checks each circuit should have (default: ``CIRCUIT_CHECK_NAMES``); those
        missing are listed as not checked.

    Returns
    -------
    str
        A heading, one row per check (result ``ok``, ``near limit`` within 5 % of the limit,
        or ``FAIL``; value and limit naming what they are; the margin left) with its reason
        under it, the checks that the study gave no data for, and a summary line.

    Examples
    --------
    >>> from coordination.checks import CheckResult
    >>> r = CheckResult("c1", "overload", True, 32.0, 34.0, "A", "fine", "envelope")
    >>> print(check_table([r]).splitlines()[-1])
    protection checks: 1 run on 1 circuit, all pass
    """
    from coordination.checks.results import CIRCUIT_CHECK_NAMES

    results = list(results)
    heading = ("Protection checks (worst case a compliant device allows: envelope upper edge, "
               "maximum let-through; each passes when value <= limit; near limit: within "
               f"{NEAR_LIMIT:.0%} of it; disconnection compares the loop impedance Zs)")
    if expected is not None and "overload" not in expected:  # a standby source's checks
        heading = heading.replace("disconnection compares the loop impedance Zs",
                                  "disconnection compares the clearing time under the "
                                  "decaying fault")
    grouped: dict[str, list[CheckResult]] = defaultdict(list)
    for r in results:
        grouped[r.circuit].append(r)
    rows = []
    reasons = []
    missing = []
    for cid, mine in grouped.items():
        shown = [r for r in mine if not attention_only or not r.ok or near_limit(r)]
        for i, r in enumerate(shown):
            value, limit = check_cells(r)
            rows.append([cid if i == 0 else "", r.check, check_status(r), value, limit,
                         _margin_text(r)])
            reasons.append(r.reason)
        present = {r.check for r in mine}
        absent = [c for c in (expected or CIRCUIT_CHECK_NAMES) if c not in present]
        if absent:
            missing.append(f"{cid} ({', '.join(absent)})")
    if rows:
        body = table(["circuit", "check", "result", "value", "limit", "margin"], rows, "lllrrr",
                     width=width, under=reasons)
    else:
        body = "(none fails or is near its limit)" if attention_only else "(no circuits)"
    failed = [r for r in results if not r.ok]
    near = sum(1 for r in results if near_limit(r))
    n_circ = len(grouped)
    summary = (f"protection checks: {len(results)} run on {n_circ} "
               f"circuit{'s' if n_circ != 1 else ''}, ")
    if failed:
        names = ", ".join(f"{r.circuit} {r.check}" for r in failed)
        summary += f"{len(failed)} FAIL: {names}"
    else:
        summary += "all pass"
    if near:
        summary += f"; {near} near limit"
    lines = [*textwrap.wrap(heading, width or 10_000), body]
    if missing:
        lines.extend(textwrap.wrap(
            "not checked (the study gives no load_a / cable.iz_a or no cable): "
            + "; ".join(missing), width or 10_000, subsequent_indent="  "))
    lines.extend(textwrap.wrap(summary, width or 10_000, subsequent_indent="  "))
    return "\n".join(lines)


# ---------------------------------------------------------------------------------------------
# what the check command prints
def check_text(study: Study, levels: Any, analysis: Analysis, results: Sequence[CheckResult],
               *, every_row: bool = False, study_path: str = "STUDY",
               width: int | None = TERMINAL_COLUMNS) -> str:
    """The ``check`` command's printout (the caution is the command's to add).

    By default a summary: the counts, then only the pairs below their required selectivity and
    the checks that fail or are near their limit, each with its reason; ``every_row`` prints
    every pair and every check (``check --all``).

    Examples
    --------
    >>> from coordination import checks, faults, study
    >>> from coordination.engine import analyse
    >>> s = study.from_dict({"supply": {"pfc_a": 6000, "ze_ohm": 0.35, "phases": 1},
    ...                      "circuit": [{"id": "a", "from": "supply", "device": "B6",
    ...                                   "phases": 1}]})
    >>> levels = faults.compute(s)
    >>> text = check_text(s, levels, analyse(s, levels), checks.run(s, levels))
    >>> print(text.splitlines()[-1])
    every pair and every check: coordination check STUDY --all
    """
    pairs = pair_table(study, levels, analysis, unmet_only=not every_row, width=width)
    protection = check_table(results, attention_only=not every_row, width=width)
    blocks = [f"{study.title}: selectivity of every pair, then the protection checks"]
    if not every_row:
        unmet = sum(1 for p in analysis.all_pairs if not p.ok)
        blocks.append(f"Pairs below their required selectivity: {unmet}"
                      + (" (none)" if not unmet else ""))
    from coordination import rules

    blocks += [pairs, protection]
    blocks[-1] += "\n" + "\n".join(textwrap.wrap(f"rules: {rules.summary(study.rule_set)}",
                                                  width or 10_000, subsequent_indent="  "))
    uppers = sorted({p.upstream for p in analysis.pairs if not p.ok})
    if uppers:
        blocks.append("\n".join(textwrap.wrap(
            "next: for a pair that falls short, choose a larger upstream device "
            f"(coordination choose {study_path} --circuit {uppers[0]}), give the "
            "manufacturer's tested limit (tested_limits_a), or state the selectivity the "
            "circuit needs (selective_to_a).", width or 10_000, subsequent_indent="  ")))
    if any(not p.ok for p in analysis.residual):
        blocks.append("\n".join(textwrap.wrap(
            "next: for RCDs in series that are not selective, make the upstream one type S "
            "(selective = true) or delayed (delay_s), with an I\u0394n at least 3 times the "
            "downstream one's (IEC 60364-5-53, from memory).", width or 10_000,
            subsequent_indent="  ")))
    if not every_row:
        blocks.append(f"every pair and every check: coordination check {study_path} --all")
    return "\n\n".join(blocks)


def case_text(study: Study, case: CaseAssessment, *, every_row: bool = False,
              width: int | None = TERMINAL_COLUMNS) -> str:
    """A standby source's part of the ``check`` command's printout: its heading, then as for
    the normal supply (:func:`check_text`) the pairs below their required selectivity and the
    checks that fail or are near their limit, or with ``every_row`` every pair and check.

    Examples
    --------
    >>> from coordination.generator import StandbySource
    >>> from coordination.model import Cable, Circuit, Supply
    >>> from coordination.standby import assess_case
    >>> s = Study("t", Supply(pfc_a=16000.0), (
    ...     Circuit("in", "supply", "gG200"), Circuit("sub", "in", "gG63", cable=Cable(30, 16)),
    ...     Circuit("a", "sub", "B16", phases=1, cable=Cable(20, 2.5, 1.5))))
    >>> case = assess_case(s, StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3, 5))
    >>> print(case_text(s, case).splitlines()[0])
    Case 'gen': standby generator 500 kVA on board in (2 circuits; sustained current 0 x In)
    """
    from coordination.standby import CASE_CHECKS

    blocks = [case_heading(study, case.case)]
    if not every_row:
        unmet = sum(1 for p in case.analysis.pairs if not p.ok)
        blocks.append(f"Pairs below their required selectivity on this source: {unmet}"
                      + (" (none)" if not unmet else ""))
    blocks.append(pair_table(study, case.case.levels, case.analysis, unmet_only=not every_row,
                             width=width))
    blocks.append(check_table(case.checks, attention_only=not every_row, width=width,
                              expected=CASE_CHECKS))
    return "\n\n".join(blocks)


# ---------------------------------------------------------------------------------------------
# a device's operating times (the times command)
def times_table(band: Band, points: Sequence[dict]) -> str:
    """The `times` table: earliest and latest operating time per current."""
    head = f"{band.name}  basis: {band.basis}"
    rows = [
        [format_current(p["current_a"]), significant(p["current_a"] / band.rating_a, 3),
         format_seconds(p["t_min_s"]), format_seconds(p["t_max_s"])]
        for p in points
    ]
    body = table(["current", "x In", "earliest (t_min)", "latest (t_max)"], rows, "rrrr")
    notes = "".join(f"\nnote: {n}" for n in band.notes)
    return f"{head}\n{body}{notes}"
