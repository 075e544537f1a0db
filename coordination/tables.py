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
from coordination.text import format_current, format_seconds, significant, table

if TYPE_CHECKING:
    from coordination.checks import CheckResult
    from coordination.engine import Analysis, PairResult
    from coordination.faults import FaultLevels
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
    for node in levels.nodes:
        rows.append([
            node.circuit, node.board, str(node.phases), _ka(node.ik3_max_a),
            _ka(node.ik1_max_a), _ka(node.ik_max_a), _ohm(node.zs_ohm), _ka(node.ief_min_a),
            _ka(node.ik_min_end_a) + ("" if node.ik_min_end_kind == "line-neutral" else " LL"),
        ])
    body = table(
        ["circuit", "board", "ph", "Ik3 kA", "Ik1 kA", "window kA", "Zs ohm", "Ief min kA",
         "Ik min kA"],
        rows, "lllrrrrrr")
    foot = textwrap.wrap("convention: " + levels.convention, 100, subsequent_indent="  ")
    foot += textwrap.wrap(
        "columns: at the circuit's board (its origin) the maximum three-phase (Ik3) and "
        "line-neutral (Ik1) currents and the window's end; at its far end the earth-fault loop "
        "Zs, the minimum earth-fault current Ief and the minimum short-circuit current Ik min "
        "(LL: line-line, the cable has no neutral).", 100, subsequent_indent="  ")
    return "\n".join([*head, "", body, "", *foot])


# ---------------------------------------------------------------------------------------------
# selectivity pairs (the check command, the demo)
_BASIS_SHORT = {"typical": "typ", "envelope": "env", "datasheet": "data"}
_VERDICT_TEXT = {"total": "total", "partial": "partial", "none": "none"}


def _pair_ka(value: float | None) -> str:
    if value is None or not math.isfinite(value):
        return "-"
    return f"{value / 1000:.3g}"


def pair_table(study: Study, levels: Any, analysis: Analysis) -> str:
    """The pairs grouped by the board the downstream device sits on, and a summary line.

    Columns: circuit, device, above (the upstream circuit and device), verdict, Is [kA], window
    (A or kA), decided by, band bases (downstream/upstream), required [kA], ok. Devices are in
    their compact form (an adjustable breaker's kind, rating and Ir; the JSON has the rest).

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
        groups.setdefault(study.board_name(p.downstream), []).append(p)
    headers = ["circuit", "device", "above", "verdict", "Is kA", "window", "decided by",
               "bases", "required kA", "ok"]
    blocks = []
    for board, pairs in groups.items():
        rows = []
        previous = None
        for p in pairs:
            bases = (f"{_BASIS_SHORT.get(p.downstream_basis, p.downstream_basis)}/"
                     f"{_BASIS_SHORT.get(p.upstream_basis, p.upstream_basis)}")
            first = p.downstream != previous
            previous = p.downstream
            rows.append([
                p.downstream if first else "", label[p.downstream] if first else "",
                f"{p.upstream} ({label[p.upstream]})" if p.upstream_count == 1 else
                f"{p.upstream} to {p.upstream_last} ({p.upstream_count} x {label[p.upstream]})",
                _VERDICT_TEXT[p.verdict], _pair_ka(p.limit_a) if p.verdict != "total" else "-",
                f"{format_current(p.window_a[0])} - {format_current(p.window_a[1])}",
                p.decided_by, bases,
                "total" if p.required_a is None else _pair_ka(p.required_a),
                "yes" if p.ok else "NO",
            ])
        top = pairs[0].window_a[1] if pairs else float("nan")
        blocks.append(f"board {board} (max fault {_pair_ka(top)} kA)\n"
                      + table(headers, rows, "lllllrlllr"))
    if analysis.residual:
        blocks.append(residual_pair_table(analysis.residual))
    s = analysis.summary()
    if not analysis.all_pairs:
        blocks.append("no upstream/downstream pairs (a single level of devices)")
    blocks.append(
        f"selectivity: {s['pairs']} pairs, {s['total']} total, {s['partial']} partial, "
        f"{s['none']} none; requirements unmet: {s['unmet']}")
    return "\n\n".join(blocks)


def _ma(i_a: float) -> str:
    return f"{i_a * 1000:.4g} mA" if i_a < 1.0 else format_current(i_a)


def residual_pair_table(pairs: Sequence[PairResult]) -> str:
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
             table(headers, rows, "llllllr")]
    lines += [f"  {', '.join(names)}: {note}" for note, names in notes.items()]
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


def check_table(results: Sequence[CheckResult] | Iterable[CheckResult]) -> str:
    """The protection checks as a plain-text table, circuit by circuit, failures marked.

    Parameters
    ----------
    results : sequence of CheckResult
        From :func:`coordination.checks.run`.

    Returns
    -------
    str
        A heading, one row per check (``FAIL`` rows marked with ``!``), the checks that the
        study gave no data for, and a summary line.

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
               "maximum let-through; starting on the selectivity basis; each passes when "
               "value <= limit)")
    grouped: dict[str, list[CheckResult]] = defaultdict(list)
    for r in results:
        grouped[r.circuit].append(r)
    order = list(grouped)
    rows = []
    missing = []
    for cid in order:
        mine = grouped[cid]
        for i, r in enumerate(mine):
            rows.append([cid if i == 0 else "", r.check, "ok" if r.ok else "! FAIL",
                         _value_text(r.value, r.unit), _value_text(r.limit, r.unit), r.reason])
        present = {r.check for r in mine}
        absent = [c for c in CIRCUIT_CHECK_NAMES if c not in present]
        if absent:
            missing.append(f"{cid} ({', '.join(absent)})")
    body = table(["circuit", "check", "result", "value", "limit", "why / what to do"], rows,
                 "lllrrl") if rows else "(no circuits)"
    failed = [r for r in results if not r.ok]
    n_circ = len(order)
    summary = (f"protection checks: {len(results)} run on {n_circ} "
               f"circuit{'s' if n_circ != 1 else ''}, ")
    if failed:
        names = ", ".join(f"{r.circuit} {r.check}" for r in failed)
        summary += f"{len(failed)} FAIL: {names}"
    else:
        summary += "all pass"
    lines = [heading, body]
    if missing:
        lines.append("not checked (the study gives no load_a / cable.iz_a or no cable): "
                     + "; ".join(missing))
    lines.append(summary)
    return "\n".join(lines)


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
