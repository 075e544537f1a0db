"""The selectivity report: one printable PDF of a whole study, and its tables as CSV.

Pages, in order: a cover (title, date, tool version, the supply, a summary, the standards used and
the caution), the device register (the basis of every device), fault levels, the selectivity of
every upstream/downstream pair, the protection checks, a time-current plot per board and per
circuit that has a non-selective pair above it, and the notes and limitations.

The PDF is drawn with matplotlib alone (``PdfPages``; text pages are figures with text placed on
them): the plots need matplotlib anyway, so the report adds no dependency, and with TrueType
fonts embedded (``pdf.fonttype`` 42) its text layer can be searched, copied and extracted. Table
lines are set in Courier, a standard PDF face that needs no embedding and draws about ten times
faster (:data:`STANDARD_MONO`).

Everything is computed before the first byte is written; files are written beside their target
and moved into place only when complete (:func:`coordination.io.atomic_path`), so on any error no
file is written and an existing report is never left half-written.
"""

from __future__ import annotations

import csv as csv_module
import datetime as dt
import functools
import logging
import math
import os
import re
import sys
import textwrap
from collections.abc import Callable, Iterable, Sequence
from contextlib import ExitStack
from dataclasses import dataclass, fields, is_dataclass, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

from coordination import CAUTION, __version__
from coordination.io import atomic_path, check_output_path
from coordination.model import Study
from coordination.text import finite_or_none, format_current
from curves.errors import InputError

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

#: Standards the models, fault levels and checks rest on (shown on the cover).
STANDARDS = (
    ("IEC 60898-1", "circuit-breakers for household and similar installations (MCBs, types B, C "
                    "and D; energy-limiting classes)"),
    ("IEC 60269-1 / -2", "low-voltage fuses, gG fuse-links: gates, conventional currents, I2t"),
    ("IEC 60947-2", "circuit-breakers: thermal-magnetic and electronic releases, selectivity "
                    "(Annex A)"),
    ("IEC 60909-0", "short-circuit currents in three-phase a.c. systems (simplified for LV)"),
    ("IEC 60364-4-41", "protection against electric shock: disconnection times (Table 41.1)"),
    ("IEC 60364-4-43", "protection against overcurrent: overload and fault energy (k^2 S^2)"),
    ("IEC 60364-5-54", "earthing arrangements and protective conductors (Table A.54.3)"),
    ("IEC 60228", "conductors of insulated cables: resistance at 20 degC"),
    ("BS 7671 Table 41.3", "maximum earth-fault loop impedance for circuit-breakers"),
)

#: A4 portrait [in].
PAGE_SIZE_IN = (8.27, 11.69)
LEFT, RIGHT, TOP, BOTTOM = 0.07, 0.95, 0.93, 0.07
INK = "#1a1a1a"
MUTED = "#555555"
RULE = "#9a9a9a"
FAIL_INK = "#8b1a1a"
VERDICT_RANK = {"none": 0, "partial": 1, "total": 2}

#: The file name the demo writes; it replaces only a file of this name in the chosen folder.
DEMO_REPORT_NAME = "coordination-demo-report.pdf"
#: The bundled example the demo runs.
DEMO_EXAMPLE = "office-building.toml"


@dataclass(frozen=True)
class ReportSummary:
    """What :func:`write_report` wrote.

    Attributes
    ----------
    ok : bool
        Every selectivity requirement and every protection check is met.
    pages : int
        Pages in the PDF.
    extra_files : tuple of Path
        The CSV files written beside the PDF (empty unless asked for).
    path : Path
        The PDF.
    """

    ok: bool
    pages: int
    extra_files: tuple[Path, ...] = ()
    path: Path | None = None


# -- small formatting helpers -------------------------------------------------------------------
def _ka(value: Any) -> str:
    """A current in kA to three significant figures, for the tables; "-" when unknown."""
    v = finite_or_none(value)
    if v is None:
        return "-"
    return f"{v / 1000:.3g}"


def _ohm(value: Any) -> str:
    v = finite_or_none(value)
    return "-" if v is None else f"{v:.3g}"


def _value(value: Any, unit: str) -> str:
    v = finite_or_none(value)
    if v is None:
        return "never" if unit == "s" and value is not None else "-"
    if unit == "s":
        return f"{v * 1000:.3g} ms" if v < 1 else f"{v:.3g} s"
    if unit == "A":
        return format_current(v)
    if unit == "mm2":
        return f"{v:.3g} mm\u00b2"
    return f"{v:.3g} {unit}"


def _wrap(text: str, width: int) -> list[str]:
    """Lines of at most ``width`` characters, never broken at a hyphen (ids stay whole)."""
    return textwrap.wrap(text, width, break_on_hyphens=False)


def report_date() -> dt.date:
    """Today, or the date of ``SOURCE_DATE_EPOCH`` when set (reproducible documents).

    Examples
    --------
    >>> import os
    >>> os.environ["SOURCE_DATE_EPOCH"] = "86400"
    >>> print(report_date().isoformat())
    1970-01-02
    >>> del os.environ["SOURCE_DATE_EPOCH"]
    """
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.isdigit():
        return dt.datetime.fromtimestamp(int(epoch), tz=dt.UTC).date()
    return dt.date.today()


# -- tables on pages ----------------------------------------------------------------------------
@dataclass(frozen=True)
class TableSpec:
    """A table to set on one or more pages: column headings, relative widths, rows of text."""

    headers: tuple[str, ...]
    widths: tuple[float, ...]
    rows: tuple[tuple[str, ...], ...]
    align: str = ""  # one 'l' or 'r' per column; default all left
    wrap: tuple[int, ...] = ()  # columns whose text wraps onto more lines
    fit: tuple[int, ...] = ()  # columns at least as wide as their longest cell (up to FIT_MAX)
    flags: tuple[bool, ...] = ()  # rows to set in the failure ink


FONT_PT = 7.0
LINE_IN = FONT_PT * 1.32 / 72.0  # baseline to baseline [in]
MONO = "DejaVu Sans Mono"  # ships with matplotlib
MONO_EM = 0.62  # advance width of a DejaVu Sans Mono character [em] (0.602), with room
#: In the PDF, table lines are set in Courier, one of the standard faces every PDF reader has:
#: nothing to embed, and matplotlib writes such a line as one string instead of glyph by glyph,
#: which makes a page of tables about ten times faster to draw. Its advance width is 0.6 em, so
#: the columns line up as in DejaVu Sans Mono. A line with a character outside the face's
#: character set (a Greek or CJK letter in a circuit id, say) is set in DejaVu Sans Mono.
STANDARD_MONO = "Courier"
STANDARD_CHARSET = "cp1252"  # the standard faces' encoding as matplotlib writes them
COLUMN_GAP = 2  # characters between columns


FIT_MAX = 26


def _column_chars(spec: TableSpec) -> list[int]:
    """Characters per column: each column's heading (for ``fit`` columns, its longest cell; for
    ``wrap`` columns, its longest word, so that text wraps between words) first, then the rest
    of the page width shared out by the relative widths."""
    usable_pt = (RIGHT - LEFT) * PAGE_SIZE_IN[0] * 72.0
    total_chars = int(usable_pt / (FONT_PT * MONO_EM)) - COLUMN_GAP * (len(spec.widths) - 1)
    least = [max(3, len(h)) for h in spec.headers]
    for j in spec.fit:
        longest = max((len(str(row[j])) for row in spec.rows), default=0)
        least[j] = max(least[j], min(longest, FIT_MAX))
    for j in spec.wrap:
        word = max((len(w) for row in spec.rows for w in str(row[j]).split()), default=0)
        least[j] = max(least[j], min(word, FIT_MAX))
    spare = max(0, total_chars - sum(least))
    weight = sum(spec.widths)
    return [m + int(spare * w / weight) for m, w in zip(least, spec.widths, strict=True)]


def _row_lines(spec: TableSpec, row: Sequence[str], chars: Sequence[int]) -> list[list[str]]:
    cells = []
    for j, text in enumerate(row):
        text = str(text)
        if j in spec.wrap or j in spec.fit:
            cells.append(_wrap(text, chars[j]) or [""])
        else:
            cells.append([text if len(text) <= chars[j] else text[: chars[j] - 1] + "\u2026"])
    return cells


def _paginate(spec: TableSpec, first_room_in: float, room_in: float) -> list[list[int]]:
    """Row indices per page, given the height available on the first and later pages [in]."""
    chars = _column_chars(spec)
    pages: list[list[int]] = [[]]
    room = first_room_in - 2 * LINE_IN  # the heading row and its rule
    for i, row in enumerate(spec.rows):
        height = max(len(c) for c in _row_lines(spec, row, chars)) * LINE_IN
        if height > room and pages[-1]:
            pages.append([])
            room = room_in - 2 * LINE_IN
        pages[-1].append(i)
        room -= height
    return pages


def _table_line(cells: Sequence[str], chars: Sequence[int], align: str) -> str:
    gap = " " * COLUMN_GAP
    return gap.join(c.rjust(w) if a == "r" else c.ljust(w)
                    for c, w, a in zip(cells, chars, align, strict=True)).rstrip()


def _draw_table(fig: Figure, spec: TableSpec, rows: Sequence[int], top: float) -> float:
    """Set the heading and the given rows from ``top`` (figure fraction); returns the new top.

    Tables are set in a monospaced face, one text per printed line on its own baseline, so
    columns line up exactly, the text layer reads as rows, and a page costs one text object per
    line however many columns it has. Alternate rows are shaded.
    """
    from matplotlib.patches import Rectangle

    chars = _column_chars(spec)
    align = spec.align or "l" * len(spec.headers)
    pitch = LINE_IN / PAGE_SIZE_IN[1]
    ascent = 0.8 * pitch
    y = top
    line_class = _table_text_class()
    fig.text(LEFT, y - ascent, _table_line(spec.headers, chars, align), family=MONO,
             fontsize=FONT_PT, fontweight="bold", color=INK,
             va="baseline").__class__ = line_class
    y -= pitch * 1.15
    fig.add_artist(_rule(fig, y))
    y -= pitch * 0.2
    for k, i in enumerate(rows):
        cells = _row_lines(spec, spec.rows[i], chars)
        n = max(len(c) for c in cells)
        colour = FAIL_INK if spec.flags and spec.flags[i] else INK
        if k % 2 == 1:
            fig.add_artist(Rectangle((LEFT - 0.005, y - n * pitch - 0.05 * pitch),
                                     RIGHT - LEFT + 0.01, n * pitch, transform=fig.transFigure,
                                     facecolor="#ededed", edgecolor="none", zorder=-1))
        for line in range(n):
            texts = [c[line] if line < len(c) else "" for c in cells]
            fig.text(LEFT, y - ascent - line * pitch, _table_line(texts, chars, align),
                     family=MONO, fontsize=FONT_PT, color=colour,
                     va="baseline").__class__ = line_class
        y -= n * pitch
    return y


@functools.cache
def _table_text_class() -> type:
    """matplotlib's Text for table lines: drawn in :data:`STANDARD_MONO` in a PDF."""
    import matplotlib
    from matplotlib.text import Text

    class TableText(Text):
        def draw(self, renderer: Any) -> None:
            base = getattr(renderer, "_renderer", renderer)  # within a MixedModeRenderer
            if type(base).__name__ != "RendererPdf":
                return super().draw(renderer)
            try:
                self.get_text().encode(STANDARD_CHARSET)
            except UnicodeEncodeError:
                return super().draw(renderer)
            # a new FontProperties, never a changed one: matplotlib caches fonts by them
            original = self.get_fontproperties()
            standard = original.copy()
            standard.set_family(STANDARD_MONO)
            core = matplotlib.rcParams["pdf.use14corefonts"]
            # matplotlib notes that the face's regular weight is named "medium": not a problem
            logger = logging.getLogger("matplotlib.font_manager")
            level = logger.level
            try:
                self.set_fontproperties(standard)
                matplotlib.rcParams["pdf.use14corefonts"] = True
                logger.setLevel(logging.ERROR)
                return super().draw(renderer)
            finally:
                logger.setLevel(level)
                matplotlib.rcParams["pdf.use14corefonts"] = core
                self.set_fontproperties(original)

    return TableText


def _rule(fig: Figure, y: float, colour: str = RULE) -> Any:
    from matplotlib.lines import Line2D

    return Line2D([LEFT, RIGHT], [y, y], transform=fig.transFigure, color=colour, linewidth=0.5)


# -- the page frame ----------------------------------------------------------------------------
def _new_page(study: Study, heading: str | None) -> Figure:
    from matplotlib.figure import Figure

    fig = Figure(figsize=PAGE_SIZE_IN)
    title = study.title if len(study.title) <= 90 else study.title[:89] + "\u2026"
    fig.text(LEFT, 0.975, title, fontsize=7, color=MUTED, ha="left", va="top")
    fig.text(RIGHT, 0.975, "selectivity report", fontsize=7, color=MUTED, ha="right",
             va="top")
    if heading:
        fig.text(LEFT, 0.955, heading, fontsize=13, fontweight="bold", color=INK, va="top")
    return fig


def _finish_page(fig: Figure, number: int, total: int) -> None:
    fig.add_artist(_rule(fig, 0.045))
    fig.text(LEFT, 0.038, CAUTION, fontsize=5.6, color=MUTED, ha="left", va="top")
    fig.text(RIGHT, 0.02, f"page {number} of {total}", fontsize=7, color=MUTED, ha="right",
             va="bottom")


# -- what goes in the report -------------------------------------------------------------------
def _boards(study: Study) -> list[str]:
    """Circuits that feed a board, in study order."""
    return [c.id for c in study.circuits if study.children.get(c.id)]


def _worst_key(analysis: Any, circuit_id: str, rating: float) -> tuple:
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


def _signature(study: Study, analysis: Any, circuit_id: str) -> tuple:
    """Circuits with equal signatures have the same plot but for their cables and loads."""
    from coordination.devices import band_for

    pairs = tuple((p.upstream, p.verdict, p.limit_a, tuple(p.window_a), p.decided_by)
                  for p in analysis.for_circuit(circuit_id))
    return (study.by_id[circuit_id].parent, band_for(study, circuit_id, analysis.basis).key,
            pairs)


#: At most this many plots of non-selective pairs (the worst first); the notes name the rest.
MAX_PAIR_PLOTS = 60


def _severity(analysis: Any, circuit_id: str) -> tuple[int, float]:
    """Worst verdict first, then the smallest fraction of the window that is selective."""
    worst = (3, math.inf)
    for p in analysis.for_circuit(circuit_id):
        if p.verdict == "total":
            continue
        top = finite_or_none(p.window_a[1]) or 1.0
        worst = min(worst, (VERDICT_RANK[p.verdict], (finite_or_none(p.limit_a) or 0.0) / top))
    return worst


def plot_plan(study: Study, analysis: Any, *,
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
    for board_circuit in _boards(study):
        outgoing = study.children[board_circuit]
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


def not_drawn(analysis: Any, plan: Sequence[PlannedPlot]) -> list[str]:
    """Circuits with a non-selective pair above them that no plot of the plan stands for."""
    covered = {e.circuit for e in plan} | {c for e in plan for c in e.also}
    out: list[str] = []
    for p in analysis.pairs:
        if p.verdict != "total" and p.downstream not in covered and p.downstream not in out:
            out.append(p.downstream)
    return out


#: How the register shows a band's settings: a label and the unit to show the value in
#: (``None``: left out, because the device's name already says it).
SETTING_LABELS: dict[str, tuple[str, str] | None] = {
    "In_a": None, "type": None, "Ir_x": None, "Isd_x": None, "Ii_x": None,
    "energy_class": ("class", ""), "icn_a": ("Icn", "kA"), "icu_a": ("Icu", "kA"),
    "breaking_capacity_a": ("breaks", "kA"), "Ir_a": ("Ir", "A"), "Isd_a": ("Isd", "A"),
    "Ii_a": ("Ii", "A"), "tr_s": ("tr", "s"), "tsd_s": ("tsd", "s"),
}
CAPACITY_SETTINGS = ("icn_a", "icu_a", "breaking_capacity_a")


def register_settings(settings: Any, capacity_a: float | None = None) -> str:
    """A band's settings as a person reads them (``class 3, Icn 6 kA``).

    ``capacity_a``: a breaking capacity the study gives for the circuit, which replaces the
    device's own.

    Examples
    --------
    >>> print(register_settings({"type": "B", "In_a": 32, "energy_class": 3, "icn_a": 6000}))
    class 3, Icn 6 kA
    >>> print(register_settings({"In_a": 250, "Ir_a": 200, "Ii_a": 2500}, capacity_a=36000))
    Ir 200 A, Ii 2500 A, breaks 36 kA (study)
    """
    parts = []
    capacity_shown = False
    for key, val in dict(settings).items():
        label = SETTING_LABELS.get(key, (key, ""))
        if label is None:
            continue
        name, unit = label
        if key == "sd_i2t":
            if val:
                parts.append("I2t ramp")
            continue
        if key in CAPACITY_SETTINGS and capacity_a is not None:
            parts.append(f"{name} {capacity_a / 1000:g} kA (study)")
            capacity_shown = True
            continue
        if not isinstance(val, int | float):
            parts.append(f"{name} {val}")
        elif unit == "kA":
            parts.append(f"{name} {val / 1000:g} kA")
        else:
            parts.append(f"{name} {val:g}{' ' + unit if unit else ''}")
    if capacity_a is not None and not capacity_shown:
        parts.append(f"breaks {capacity_a / 1000:g} kA (study)")
    return ", ".join(parts)


def _cable_text(cable: Any) -> str:
    if cable is None:
        return "-"
    parallel = cable.parallel or 1
    par = f"{parallel}x" if parallel > 1 else ""
    cpc = f"/{cable.cpc_mm2:g}" if cable.cpc_mm2 else ""
    cpc_parallel = getattr(cable, "cpc_parallel", None)
    if cable.cpc_mm2 and cpc_parallel and cpc_parallel != parallel:  # e.g. one cpc for the set
        cpc = f" + cpc {cpc_parallel}x{cable.cpc_mm2:g}" if cpc_parallel > 1 else (
            f" + cpc {cable.cpc_mm2:g}")
    metal = {"copper": "cu", "aluminium": "al"}.get(cable.material, cable.material)
    return f"{par}{cable.csa_mm2:g}{cpc} {metal} {cable.insulation} {cable.length_m:g} m"


def _device_table(study: Study, basis: str | None) -> TableSpec:
    from coordination.devices import band_for

    rows = []
    for c in study.circuits:
        band = band_for(study, c.id, basis)
        rows.append((c.id, study.board_name(c.id), band.name, band.basis,
                     register_settings(band.settings, c.breaking_capacity_a),
                     "-" if c.load_a is None else f"{c.load_a:g}", _cable_text(c.cable)))
    return TableSpec(("circuit", "sits on", "device", "basis", "settings", "Ib A",
                      "cable mm\u00b2"), (0.0, 0.0, 0.6, 0.0, 2.0, 0.0, 0.0), tuple(rows),
                     "lllllrl", wrap=(2, 4), fit=(0, 1, 3, 6))


def _fault_table(study: Study, levels: Any) -> TableSpec:
    rows = []
    for c in study.circuits:
        n = levels.by_circuit.get(c.id)
        rows.append((c.id, study.board_name(c.id), str(c.phases),
                     _ka(getattr(n, "ik3_max_a", None)), _ka(getattr(n, "ik1_max_a", None)),
                     _ka(getattr(n, "ik_max_a", None)), _ka(getattr(n, "ik_min_end_a", None)),
                     _ka(getattr(n, "ief_min_a", None)), _ohm(getattr(n, "zs_ohm", None))))
    return TableSpec(("circuit", "board", "ph", "Ik3 max kA", "Ik1 max kA", "window kA",
                      "Ik min end kA", "Ief min end kA", "Zs end \u03a9"),
                     (0.5, 1.0, 0.0, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2), tuple(rows), "lllrrrrrr",
                     fit=(0, 1))


BASIS_SHORT = {"typical": "typ", "envelope": "env", "datasheet": "data"}


def _keep_together(label: str) -> str:
    """A label whose numbers stay with their units and setting names when a cell wraps.

    Examples
    --------
    >>> _keep_together("electronic 1600 A, Ir 1440 A").replace("\u00a0", "_")
    'electronic 1600_A, Ir_1440_A'
    """
    label = re.sub(r"(?<=\d) (?=[A-Za-z])", "\u00a0", label)
    return re.sub(r"\b(In|Ir|tr|Isd|tsd|Ii) (?=\d)", "\\1\u00a0", label)


def _pair_table(study: Study, analysis: Any) -> TableSpec:
    from coordination.devices import compact_labels

    # the register has every setting; a breaker's compact label wraps between its parts
    label = {k: _keep_together(v) for k, v in compact_labels(study, analysis.basis).items()}
    rows, flags = [], []
    for p in analysis.pairs:
        bases = "/".join(BASIS_SHORT.get(b, b) for b in (p.downstream_basis, p.upstream_basis))
        rows.append((
            p.downstream, p.upstream_span, f"{label[p.downstream]} / {label[p.upstream]}",
            p.verdict, "-" if p.verdict == "total" else _ka(p.limit_a),
            f"{_ka(p.window_a[0])}-{_ka(p.window_a[1])}", p.decided_by, bases,
            "total" if p.required_a is None else _ka(p.required_a), "yes" if p.ok else "NO"))
        flags.append(not p.ok)
    return TableSpec(("downstream", "upstream", "devices", "verdict", "Is kA", "window kA",
                      "decided by", "bases", "need kA", "met"),
                     (0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0), tuple(rows),
                     "llllrlllrr", wrap=(2,), fit=(0, 1, 3, 4, 5, 6, 7, 8), flags=tuple(flags))


CHECK_COLUMNS = (("disconnection", "disconnection"), ("overload", "overload"),
                 ("fault-energy", "fault energy"), ("breaking-capacity", "breaking capacity"))


def _check_cell(result: Any) -> str:
    """``ok 100 ms / 400 ms``: the verdict, the value and the limit it must not exceed."""
    word = "ok" if result.ok else "FAIL"
    return f"{word} {_value(result.value, result.unit)} / {_value(result.limit, result.unit)}"


def _check_matrix(study: Study, results: Sequence[Any]) -> TableSpec:
    """One row per circuit, one column per check (``-``: not run, for want of data)."""
    by_circuit: dict[str, dict[str, Any]] = {}
    for r in results:
        by_circuit.setdefault(r.circuit, {})[r.check] = r
    rows, flags = [], []
    for c in study.circuits:
        mine = by_circuit.get(c.id, {})
        rows.append((c.id, *(_check_cell(mine[k]) if k in mine else "-"
                             for k, _ in CHECK_COLUMNS)))
        flags.append(any(not r.ok for r in mine.values()))
    return TableSpec(("circuit", *(title for _, title in CHECK_COLUMNS)),
                     (0.0, 1.0, 1.0, 1.0, 1.0), tuple(rows), "lllll", wrap=(1, 2, 3, 4),
                     fit=(0,), flags=tuple(flags))


def _check_failures(results: Sequence[Any]) -> TableSpec:
    rows = [(r.circuit, r.check, _value(r.value, r.unit), _value(r.limit, r.unit), r.reason)
            for r in results if not r.ok]
    return TableSpec(("circuit", "check", "value", "limit", "what to do"),
                     (0.0, 0.0, 0.0, 0.0, 1.0), tuple(rows), "llrrl", wrap=(4,),
                     fit=(0, 1, 2, 3), flags=(True,) * len(rows))


def _supply_lines(study: Study, levels: Any) -> list[str]:
    s = study.supply
    lines = [f"{s.u0_v:g} V to earth, {s.phases}-phase, {s.earthing} earthing"]
    if s.transformer is not None:
        t = s.transformer
        upstream = (f", network {format_current(t.upstream_pfc_a)} referred to LV"
                    if t.upstream_pfc_a else ", infinite network assumed")
        lines.append(f"transformer {t.rating_kva:g} kVA, uk {t.impedance_pct:g} %, X/R "
                     f"{t.x_r:g}{upstream}")
    if s.pfc_a is not None:
        lines.append(f"declared prospective fault current {format_current(s.pfc_a)}")
    if s.ze_ohm is not None:
        lines.append(f"external earth-fault loop impedance Ze {s.ze_ohm:g} \u03a9")
    lines.append(f"voltage factors cmax {s.c_max:g}, cmin {s.c_min:g} (IEC 60909-0 Table 1)")
    ik3 = finite_or_none(getattr(levels, "origin_ik3_a", None))
    ik1 = finite_or_none(getattr(levels, "origin_ik1_a", None))
    ze = finite_or_none(getattr(levels, "ze_ohm", None))
    origin = []
    if ik3:
        origin.append(f"Ik3 max {ik3 / 1000:.3g} kA")
    if ik1:
        origin.append(f"Ik1 max {ik1 / 1000:.3g} kA")
    if ze:
        origin.append(f"Ze {ze:.3g} \u03a9")
    if origin:
        lines.append("at the origin: " + ", ".join(origin))
    return lines


def _basis_summary(study: Study, basis: str | None) -> str:
    from coordination.devices import band_for

    ids: dict[str, list[str]] = {}
    for c in study.circuits:
        ids.setdefault(band_for(study, c.id, basis).basis, []).append(c.id)
    ranked = sorted(ids.items(), key=lambda item: -len(item[1]))
    if len(ranked) == 1:
        parts = [f"{ranked[0][0]} for every device ({len(ranked[0][1])})"]
    else:  # the most common basis by count, the others by name
        parts = [f"{ranked[0][0]} for {len(ranked[0][1])} devices"]
        for b, members in ranked[1:]:
            shown = ", ".join(members[:8]) + (f" and {len(members) - 8} more"
                                              if len(members) > 8 else "")
            parts.append(f"{b} for {shown}")
    return "Selectivity basis: " + "; ".join(parts) + (
        " (each device's basis is in the device register). Protection checks: envelope, the "
        "worst case a compliant device allows.")


NOTES = (
    ("Fault levels", (
        "Short-circuit currents follow the method of IEC 60909-0, simplified for low voltage: "
        "the source impedance comes from the declared prospective fault current, the external "
        "loop impedance Ze or the transformer (rating, uk, X/R); conductor resistance from "
        "IEC 60228 at 20 degC for maximum currents and at operating temperature for minimum "
        "ones; reactance per metre from common practice unless the study gives it; voltage "
        "factors cmax and cmin as stated on the cover. Arc resistance, busbar and switchgear "
        "impedance are neglected, which puts maxima slightly high and minima slightly low (the "
        "safe side for both); the contribution of running motors to the maximum currents is "
        "neglected too, so where large motors run the maxima may be slightly low.")),
    ("Bands and bases", (
        "Each device is a band between its earliest operating time (lower edge) and its latest "
        "clearing time (upper edge). On the typical basis the band sits in the middle of the "
        "standard's limits, widened by the usual manufacturing tolerance; on the envelope basis "
        "it is the widest band any complying device may have; a datasheet basis uses the points "
        "the study gave. Below 10 ms times are equivalent times I2t / I^2 from the energy "
        "limits of the standards (let-through of MCB energy classes, fuse pre-arcing and "
        "operating I2t).")),
    ("Selectivity", (
        "A downstream device is selective with an upstream one at a current when its latest "
        "clearing time, times the margin and plus the interval over adjustable breakers, does "
        "not exceed the upstream device's earliest operating time. The window runs from the "
        "downstream device's conventional non-tripping current to the maximum fault at its "
        "board. Is is the lowest current where the bands meet; 'partial' means selective up to "
        "Is, 'none' that the bands meet in overload. An upstream breaker with an instantaneous "
        "release withstands no energy above it: only a tested limit given in the study, shown "
        "as 'tested', can show selectivity there. Crossover zones are hatched on the plots.")),
    ("Protection checks", (
        "Disconnection times (IEC 60364-4-41 Table 41.1), overload (Ib <= In <= Iz, "
        "I2 <= 1.45 Iz), fault energy (k^2 S^2 >= I2t, IEC 60364-4-43) and breaking capacity, "
        "always on the envelope basis whatever the selectivity basis.")),
    ("Not covered", (
        "Residual-current devices, back-up (cascade) ratings unless given as tested limits, "
        "earth-fault protection settings, ambient derating of devices, harmonics, voltage drop "
        "and discrimination under motor starting are outside this report. Manufacturers' "
        "selectivity tables and curves take precedence over the standard-based bands used "
        "here.")),
)


# -- page builders -----------------------------------------------------------------------------
PageBuilder = Callable[[int, int], "Figure"]


def _cover(study: Study, levels: Any, analysis: Any, results: Sequence[Any],
           basis: str | None) -> PageBuilder:
    def build(number: int, total: int) -> Figure:
        fig = _new_page(study, None)
        y = 0.9
        fig.text(LEFT, y, "Selectivity report", fontsize=24, fontweight="bold", color=INK,
                 va="top")
        y -= 0.05
        for line in _wrap(study.title, 64) or [""]:
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
                for k, text in enumerate(_wrap(raw, width) or [""]):
                    fig.text(LEFT + (0.02 if k else 0.0), y, text, fontsize=8.5, color=INK,
                             va="top")
                    y -= 0.0155
            return y - 0.012

        y = block("Supply", _supply_lines(study, levels), y)
        summary = analysis.summary()
        failed = [r for r in results if not r.ok]
        n_boards = len(_boards(study))
        verdict = ("Every selectivity requirement and protection check is met." if
                   (analysis.ok and not failed) else
                   "NOT every requirement is met: see the selectivity table and the checks.")
        y = block("Summary", [
            f"{len(study.circuits)} circuit{'s' if len(study.circuits) != 1 else ''}, "
            f"{n_boards} board{'s' if n_boards != 1 else ''} with an incoming device.",
            f"{summary['pairs']} upstream/downstream pairs: {summary['total']} total, "
            f"{summary['partial']} partial, {summary['none']} none; "
            f"{summary['unmet']} below their required selectivity.",
            f"{len(results)} protection checks, {len(failed)} failed.",
            verdict,
        ], y)
        y = block("Bases", [_basis_summary(study, basis)], y)
        y = block("Standards used", [f"{code}: {what}" for code, what in STANDARDS], y)
        # the caution, boxed
        fig.text(LEFT, y - 0.005, "Caution", fontsize=11, fontweight="bold", color=FAIL_INK,
                 va="top")
        fig.text(LEFT, y - 0.03, "\n".join(_wrap(CAUTION, 95)), fontsize=10,
                 color=INK, va="top", linespacing=1.4,
                 bbox={"boxstyle": "round,pad=0.6", "facecolor": "#f3efe6",
                       "edgecolor": FAIL_INK, "linewidth": 0.8})
        _finish_page(fig, number, total)
        return fig

    return build


def _sentence(text: str) -> str:
    """``text`` with its first letter capitalised (the fault convention reads as a clause)."""
    return text[:1].upper() + text[1:]


#: The most rows of one table the PDF sets out (about 25 to 40 pages). A larger study's table
#: keeps every row that misses a requirement first, then the others in study order up to the
#: limit, and says so above the table; the CSV output (``--csv``) has every row. The report of a
#: 20,000-circuit board is then 171 pages (11.7 s), not about 3,000.
MAX_TABLE_ROWS = 1500


def _capped(spec: TableSpec, limit: int | None = None) -> tuple[TableSpec, str | None]:
    """The table cut to ``limit`` rows (default :data:`MAX_TABLE_ROWS`; failing rows first,
    kept in order) and a sentence saying what was left out; ``(spec, None)`` when it fits."""
    limit = MAX_TABLE_ROWS if limit is None else limit
    n = len(spec.rows)
    if n <= limit:
        return spec, None
    flags = spec.flags or (False,) * n
    failing = [i for i in range(n) if flags[i]]
    keep = failing[:limit]
    keep += [i for i in range(n) if not flags[i]][:limit - len(keep)]
    keep.sort()
    if len(failing) >= limit:
        which = (f"the first {limit:,} of the {len(failing):,} that miss a requirement "
                 "(marked in red)")
    elif failing:
        which = (f"all {len(failing):,} that miss a requirement and the first "
                 f"{limit - len(failing):,} of the others")
    else:
        which = f"the first {limit:,}"
    note = (f"This table has {n:,} rows; to keep the report to a readable size it sets out "
            f"{which}. The CSV output (--csv) has every row.")
    cut = replace(spec, rows=tuple(spec.rows[i] for i in keep),
                  flags=tuple(flags[i] for i in keep) if spec.flags else ())
    return cut, note


def _table_pages(study: Study, heading: str, intro: Sequence[str],
                 spec: TableSpec) -> list[PageBuilder]:
    spec, note = _capped(spec)
    if note is not None:
        intro = (*intro, note)
    intro_in = (0.32 + 0.16 * sum(len(_wrap(t, 130)) for t in intro)) if intro else 0.3
    body_in = (TOP - BOTTOM) * PAGE_SIZE_IN[1]
    chunks = _paginate(spec, body_in - intro_in, body_in - 0.3)
    builders: list[PageBuilder] = []
    for k, rows in enumerate(chunks):
        def build(number: int, total: int, rows: list[int] = rows, k: int = k) -> Figure:
            title = heading if k == 0 else f"{heading} (continued)"
            fig = _new_page(study, title)
            y = TOP - 0.012
            if k == 0:
                for para in intro:
                    for line in _wrap(para, 130):
                        fig.text(LEFT, y, line, fontsize=7.5, color=MUTED, va="top")
                        y -= 0.013
                y -= 0.008
            _draw_table(fig, spec, rows, y)
            _finish_page(fig, number, total)
            return fig

        builders.append(build)
    return builders


def _plot_page(study: Study, levels: Any, analysis: Any, entry: PlannedPlot,
               basis: str | None) -> PageBuilder:
    kind, circuit_id, heading = entry.kind, entry.circuit, entry.heading

    def build(number: int, total: int) -> Figure:
        from coordination.plot import pairs_in_chain, plot_circuit

        fig = _new_page(study, heading)
        ax = fig.add_axes((0.11, 0.42, 0.84, 0.49))
        plot_circuit(study, levels, analysis, circuit_id, basis=basis, ax=ax,
                     title=f"{circuit_id} and the devices above it")
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
        for line in _wrap(text, 125):
            fig.text(LEFT, y, line, fontsize=7.5, color=INK, va="top")
            y -= 0.013
        rows, flags = [], []
        for p in pairs_in_chain(analysis, chain):
            rows.append((p.downstream, p.upstream_span, p.verdict,
                         "-" if p.verdict == "total" else _ka(p.limit_a),
                         f"{_ka(p.window_a[0])}-{_ka(p.window_a[1])}", p.decided_by,
                         "yes" if p.ok else "NO"))
            flags.append(not p.ok)
        if rows:
            spec = TableSpec(("downstream", "upstream", "verdict", "Is kA", "window kA",
                              "decided by", "met"), (1.0, 1.0, 0, 0, 0.3, 0.3, 0),
                             tuple(rows), "lllrllr", fit=(0, 1, 2, 3, 4, 5, 6),
                             flags=tuple(flags))
            _draw_table(fig, spec, range(len(rows)), y - 0.006)
        _finish_page(fig, number, total)
        return fig

    return build


def _notes_page(study: Study, levels: Any, omitted: Sequence[str] = ()) -> PageBuilder:
    def build(number: int, total: int) -> Figure:
        fig = _new_page(study, "Notes and limitations")
        y = TOP - 0.01
        convention = getattr(levels, "convention", "")
        notes = [*NOTES, ("Fault convention of this study", convention or "-")]
        if omitted:
            shown = ", ".join(omitted[:40]) + (f" and {len(omitted) - 40} more"
                                               if len(omitted) > 40 else "")
            notes.append(("Plots left out", (
                f"{len(omitted)} circuits with a non-selective pair above them are not drawn "
                f"(the report draws the {MAX_PAIR_PLOTS} worst); draw any of them with "
                f"'coordination plot STUDY --circuit ID': {shown}.")))
        for title, text in notes:
            fig.text(LEFT, y, title, fontsize=10, fontweight="bold", color=INK, va="top")
            y -= 0.019
            for line in _wrap(str(text), 108):
                fig.text(LEFT, y, line, fontsize=8.2, color=INK, va="top")
                y -= 0.0145
            y -= 0.012
        fig.text(LEFT, y - 0.01, "Caution", fontsize=10, fontweight="bold", color=FAIL_INK,
                 va="top")
        fig.text(LEFT, y - 0.032, "\n".join(_wrap(CAUTION, 110)), fontsize=8.5,
                 color=INK, va="top", linespacing=1.4)
        _finish_page(fig, number, total)
        return fig

    return build


# -- CSV ---------------------------------------------------------------------------------------
def _flat(value: Any) -> Any:
    if isinstance(value, float):
        return value if math.isfinite(value) else ""
    if value is None:
        return ""
    if isinstance(value, list | tuple):
        return " ".join(str(_flat(v)) for v in value)
    if isinstance(value, dict):
        return "; ".join(f"{k}={_flat(v)}" for k, v in value.items())
    return value


def _csv_rows(records: Sequence[dict[str, Any]]) -> tuple[list[str], list[list[Any]]]:
    headers: list[str] = []
    for r in records:
        for key in r:
            if key not in headers:
                headers.append(key)
    return headers, [[_flat(r.get(h)) for h in headers] for r in records]


def _pair_record(p: Any) -> dict[str, Any]:
    record = p.to_json()
    lo, hi = record.pop("window_a")
    record.pop("band_basis", None)
    out = {"upstream": record.pop("upstream"), "downstream": record.pop("downstream"),
           "verdict": record.pop("verdict"), "limit_a": record.pop("limit_a"),
           "window_lo_a": lo, "window_hi_a": hi, "decided_by": record.pop("basis"),
           "upstream_basis": p.upstream_basis, "downstream_basis": p.downstream_basis}
    out.update(record)
    return out


def _node_record(node: Any) -> dict[str, Any]:
    if is_dataclass(node):
        return {f.name: getattr(node, f.name) for f in fields(node)}
    return dict(vars(node))


def _write_csv(path: Path, records: Sequence[dict[str, Any]]) -> None:
    headers, rows = _csv_rows(records)
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv_module.writer(handle)
        writer.writerow(headers)
        writer.writerows(rows)


# -- the report --------------------------------------------------------------------------------
def _progress(enabled: bool, done: int, total: int) -> None:
    if not enabled:
        return
    width = 30
    filled = int(width * done / max(total, 1))
    sys.stderr.write(f"\rreport [{'#' * filled}{'.' * (width - filled)}] page {done}/{total}")
    if done >= total:
        sys.stderr.write("\n")
    sys.stderr.flush()


def build_pages(study: Study, basis: str | None = None) -> tuple[list[PageBuilder], bool, Any,
                                                                 Any, tuple[Any, ...]]:
    """Compute the study and lay out the report's pages (each drawn when called).

    Returns
    -------
    tuple
        ``(pages, ok, levels, analysis, results)``: ``pages[k](number, total)`` draws page k
        as a matplotlib Figure.
    """
    from coordination import checks, engine, faults

    levels = faults.compute(study)
    analysis = engine.analyse(study, levels, basis=basis)
    results = checks.run(study, levels)
    ok = bool(analysis.ok and all(r.ok for r in results))

    pages: list[PageBuilder] = [_cover(study, levels, analysis, results, basis)]
    pages += _table_pages(study, "Device register", [
        "Every protective device of the study: the board it sits on, its band and the basis of "
        "that band for selectivity, its settings, the design current Ib and its cable (line/"
        "protective conductor in mm\u00b2, material, insulation, length).",
    ], _device_table(study, basis))
    pages += _table_pages(study, "Fault levels", [
        "Maximum currents at each circuit's origin (its board): Ik3 three-phase, Ik1 "
        "line-neutral, and the window value (Ik3 for a three-phase circuit, Ik1 for a "
        "single-phase one), which is the top of its selectivity window. Minimum currents at the "
        "circuit's far end: Ik min (line-neutral), Ief min (earth fault) and the loop "
        "impedance Zs. Currents in kA, impedances in ohm (IEC 60909-0, simplified).",
        _sentence(str(getattr(levels, "convention", ""))),
    ], _fault_table(study, levels))
    pages += _table_pages(study, "Selectivity of every pair", [
        "Each circuit under each device above it. Verdict 'total': selective up to the maximum "
        "fault at its board; 'partial': selective up to Is; 'none': the bands meet in overload. "
        "Decided by the time-current edges, by energy (below 10 ms, I2t) or by a tested limit. "
        "Devices and bases downstream/upstream (typ: typical, env: envelope, data: datasheet; "
        "full device settings in the register). Need: the selectivity the study requires "
        "('total' unless it gives selective_to_a). Rows that miss it are marked NO.",
    ], _pair_table(study, analysis))
    pages += _table_pages(study, "Protection checks", [
        "Disconnection time (IEC 60364-4-41 Table 41.1), overload (IEC 60364-4-43, 433: the "
        "device's conventional tripping current I2 against 1.45 Iz), fault energy "
        "(IEC 60364-4-43, 434.5.2: the conductor section needed for the let-through I2t against "
        "the section installed) and breaking capacity against the maximum fault at the board, on "
        "the envelope basis. Each cell: the result, the value and the limit it must not exceed; "
        "'-' where the study lacks the data. Failures are set in red and detailed after the "
        "table; the reason for every check is in the CSV output (--csv).",
    ], _check_matrix(study, results))
    failures = _check_failures(results)
    if failures.rows:
        pages += _table_pages(study, "Failed protection checks", [
            "Each failed check with what it needs and what to do.",
        ], failures)
    plan = plot_plan(study, analysis)
    for entry in plan:
        pages.append(_plot_page(study, levels, analysis, entry, basis))
    pages.append(_notes_page(study, levels, not_drawn(analysis, plan)))

    return pages, ok, levels, analysis, results


def write_report(study: Study, path: str | os.PathLike, *, csv: bool = False,
                 basis: str | None = None, progress: bool = False) -> ReportSummary:
    """Write the selectivity report of a study as a PDF (and its tables as CSV on request).

    Parameters
    ----------
    study : Study
        The loaded study.
    path : path-like
        The PDF to write. Replaced atomically: on any error nothing is written and an existing
        file is left as it was.
    csv : bool
        Also write ``<stem>-pairs.csv``, ``<stem>-checks.csv`` and ``<stem>-faults.csv`` beside
        it (currents in A, impedances in ohm, as in the JSON output).
    basis : str, optional
        ``"typical"`` or ``"envelope"`` for every device's selectivity band; ``None``: each
        circuit's own, else the study's.
    progress : bool
        Show a one-line progress bar on stderr.

    Returns
    -------
    ReportSummary
        ``ok`` (every requirement met), the page count and the CSV files written.

    References
    ----------
    IEC 60909-0 (fault levels), IEC 60947-2 Annex A (selectivity), IEC 60364-4-41/-4-43/-5-54
    (protection checks): the pages say which clause each table rests on.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from pypdf import PdfReader
    >>> from coordination import study
    >>> text, where = bundled_example("small-shop.toml")
    >>> s = study.loads(text, source=where)
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     summary = write_report(s, Path(folder) / "shop.pdf")
    ...     print(summary.pages == len(PdfReader(summary.path).pages), summary.pages > 5)
    True True
    """
    import matplotlib
    from matplotlib.backends.backend_pdf import PdfPages

    from coordination.plot import LITERAL_TEXT

    target = check_output_path(path, inputs=(study.source,) if study.source else (), key="-o")
    if target.suffix.lower() != ".pdf":
        raise InputError(f"the report is a PDF; give a file ending in .pdf, not {target.name!r}",
                         key="-o")

    # everything that can fail on the study's data runs before a file is opened
    pages, ok, levels, analysis, results = build_pages(study, basis)
    total = len(pages)
    extra: list[Path] = []
    stem = target.with_suffix("")
    with ExitStack() as stack:
        pdf_tmp = stack.enter_context(atomic_path(target))
        if csv:
            tables = (
                ("pairs", [_pair_record(p) for p in analysis.pairs]),
                ("checks", [r.to_json() for r in results]),
                ("faults", [_node_record(n) for n in levels.nodes]),
            )
            for name, records in tables:
                out = check_output_path(stem.parent / f"{stem.name}-{name}.csv",
                                        inputs=(study.source,) if study.source else (),
                                        key="--csv")
                tmp = stack.enter_context(atomic_path(out))
                _write_csv(tmp, records)
                extra.append(out)
        metadata = {"Title": f"Selectivity report: {study.title}",
                    "Creator": f"coordination {__version__}", "Subject": CAUTION}
        # LITERAL_TEXT: a "$" in the study's text is printed as written, never as a formula
        with matplotlib.rc_context({"pdf.fonttype": 42, "font.family": "DejaVu Sans",
                                    **LITERAL_TEXT}), \
                PdfPages(pdf_tmp, metadata=metadata) as pdf:
            _progress(progress, 0, total)
            for number, build in enumerate(pages, start=1):
                fig = build(number, total)
                pdf.savefig(fig)
                _progress(progress, number, total)
    return ReportSummary(ok=ok, pages=total, extra_files=tuple(extra), path=target)


# -- the demo ----------------------------------------------------------------------------------
def bundled_example(name: str = DEMO_EXAMPLE) -> tuple[str, str]:
    """The text and a display name of a bundled example study.

    Installed, the examples are the package data ``coordination.examples``; in a source
    checkout (an editable install) they are the repository's ``examples/`` folder.

    Raises
    ------
    InputError
        When the installation lacks the example.

    Examples
    --------
    >>> text, where = bundled_example("small-shop.toml")
    >>> print(where.endswith("small-shop.toml"), "[[circuit]]" in text)
    True True
    """
    try:
        from importlib.resources import files

        resource = files("coordination.examples") / name
        if resource.is_file():
            return resource.read_text(encoding="utf-8"), str(resource)
    except (ModuleNotFoundError, FileNotFoundError, NotADirectoryError, TypeError):
        pass
    import coordination

    local = Path(coordination.__file__).resolve().parents[1] / "examples" / name
    if local.is_file():
        return local.read_text(encoding="utf-8"), str(local)
    raise InputError(f"the bundled example {name!r} is missing from this installation; "
                     "reinstall the package", key="demo")


def run_demo(output_dir: str | os.PathLike) -> int:
    """Check the bundled multi-board example and write its report into ``output_dir``.

    The folder is created when missing. Only a file named ``coordination-demo-report.pdf`` in it
    is ever replaced (atomically); nothing else is touched.

    Returns
    -------
    int
        0 when the demo ran (the example has non-selective pairs on purpose, so the checks'
        own exit code would be 1).

    Raises
    ------
    InputError
        When ``output_dir`` is a file.

    Examples
    --------
    Skipped under doctest because the whole report takes a few seconds; ``tests/test_report.py``
    runs it.

    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as folder:  # doctest: +SKIP
    ...     print(run_demo(folder))
    Demo: ...
    0
    """
    from coordination import checks, engine, faults, study, tables

    folder = Path(output_dir)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"{str(folder)!r} is a file, not a folder; give a folder for the "
                         "report", key="-o")
    text, where = bundled_example()
    s = study.loads(text, source=where)
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    results = checks.run(s, levels)
    print(f"Demo: {s.title}")
    print(f"study file: {where}\n")
    print(tables.pair_table(s, levels, analysis))
    print()
    print(tables.check_table(results))
    print()
    folder.mkdir(parents=True, exist_ok=True)
    target = folder / DEMO_REPORT_NAME
    summary = write_report(s, target, progress=sys.stderr.isatty())
    counts = analysis.summary()
    print(f"The example is invented and has non-selective pairs on purpose "
          f"({counts['partial']} partial, {counts['none']} none of {counts['pairs']}): their "
          "crossover zones are hatched on the plots.")
    print(f"report ({summary.pages} pages) written to {target.resolve()}")
    print(CAUTION)
    return 0


__all__ = ["STANDARDS", "PlannedPlot", "ReportSummary", "bundled_example", "not_drawn",
           "plot_plan", "run_demo", "write_report"]
