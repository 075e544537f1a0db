"""The installation diagram: supply, boards and circuits in single-line style.

Two steps, kept apart so each can be tested on its own:

- :func:`plan` is pure: from the study's tree of circuits it decides which sheets to draw and
  where every busbar and circuit sits on each (columns and levels, no drawing);
- :func:`draw_sheet` draws one such sheet with matplotlib and returns the figure.

A small study is one sheet of the whole installation. A larger one (more circuits than fit
across a sheet, or more levels than fit down it) gets a sheet of its boards, where each board's
final circuits stand as one group, then a sheet for each board with every circuit on it (a long
board over several sheets).

Each board is a busbar labelled with its name and its largest fault current; each circuit is a
line down from its busbar through its device (a plain box) with its id, its device and its cable
beside it. A circuit that misses a selectivity requirement or fails a protection check has its
device box drawn with a heavy dashed outline and a ``FAIL n`` tag above it, and note ``n`` under
the diagram says what fails: the mark is a shape and a word, never colour alone.

Every artist that stands for something has a ``gid``: ``supply``, ``busbar:<board>``,
``fault-level:<board>``, ``drop:<id>``, ``device:<id>``, ``label:<id>``, ``mark:<id>``,
``note:<id>``, ``group:<board>``, ``continues:<board>``, ``incoming:<board>``,
``title-block``, ``caution``. Text from the study is drawn as written (``$`` included).
"""

from __future__ import annotations

import math
import os
import textwrap
from collections import deque
from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from coordination import CAUTION
from coordination.boards import board_name, board_names, feeder_of
from coordination.model import SUPPLY_ID, Cable, Study
from coordination.text import format_current, format_seconds, significant
from curves.errors import InputError

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from coordination.checks import CheckResult
    from coordination.engine import Analysis
    from coordination.faults import FaultLevels

#: Circuits across one sheet; a study with more is drawn as boards plus one sheet per board.
MAX_COLUMNS = 26
#: Busbar levels down one sheet of the whole installation.
MAX_LEVELS = 4
#: Notes listed under one sheet; the rest are counted (the tables list every failure).
MAX_NOTES = 14
#: A PNG or SVG holds one figure; wider than this many columns it would be unreadable.
MAX_IMAGE_COLUMNS = 400

COLUMN_IN = 0.42
MARGIN_IN = 0.6
HEAD_IN = 0.75
SUPPLY_IN = 0.75
FOOT_IN = 1.05
NOTE_LINE_IN = 0.15
LABEL_PT = 6.5
BOARD_PT = 7.0
MARK_PT = 5.5
#: Average width of a character of the label font, as a share of its size (DejaVu Sans, a
#: little generous so that labels never reach the next busbar).
CHAR_EM = 0.6
#: Below its busbar, a drop's device box spans these depths [in].
BOX_TOP_IN = 0.30
BOX_BOTTOM_IN = 0.52
BOX_HALF_WIDTH_IN = 0.07
LABEL_GAP_IN = 0.08
LINE = "#1b1b1b"
FAIL_EDGE = "#a3161b"
MUTED = "#555555"


# -- the plan (pure) ---------------------------------------------------------------------------
@dataclass(frozen=True)
class Drop:
    """One line down from a busbar: a circuit, or a group of a board's final circuits.

    Attributes
    ----------
    key : str
        The circuit's id; for a group, the name of the board whose final circuits it stands for.
    x : float
        Column (0 is the first).
    level : int
        The level of the busbar it hangs from (0 at the top of the sheet).
    kind : {"circuit", "group"}
    feeds : str or None
        The board it feeds when that board is drawn on this sheet, one level down.
    elsewhere : str or None
        The board it feeds when that board is drawn on another sheet.
    members : tuple of str
        A group's circuits.
    """

    key: str
    x: float
    level: int
    kind: str = "circuit"
    feeds: str | None = None
    elsewhere: str | None = None
    members: tuple[str, ...] = ()


@dataclass(frozen=True)
class Busbar:
    """A board, drawn as a horizontal bar from column ``x0`` to ``x1`` at ``level``.

    ``feeder`` is the circuit feeding it (``None``: the origin, fed by the supply); ``stub``
    marks a board shown only as where a sheet's incoming feeder comes from.
    """

    name: str
    level: int
    x0: float
    x1: float
    feeder: str | None
    stub: bool = False
    x_in: float = 0.0  # where the line feeding it comes in


@dataclass(frozen=True)
class Sheet:
    """What one sheet of the diagram shows, and where.

    ``view`` is ``"installation"`` (every circuit), ``"boards"`` (feeders and groups) or
    ``"board"`` (one board's circuits, ``board`` names it); ``part`` is (n, of) when a board
    takes several sheets.
    """

    view: str
    title: str
    busbars: tuple[Busbar, ...]
    drops: tuple[Drop, ...]
    columns: int
    levels: int
    board: str | None = None
    part: tuple[int, int] = (1, 1)


def _span(study: Study, node: str) -> int:
    """Columns a board takes at least: its label (its name above its largest fault current)
    stands right of the line coming into it, over the right half of the board's columns."""
    chars = max(len(board_name(study, node)), len("Ik3 99.9 kA"))
    return 2 * max(1, math.ceil((chars * CHAR_EM * BOARD_PT / 72.0 + 0.15) / COLUMN_IN))


def _place(study: Study, root: str, kids_of: Mapping[str, Sequence[str]],
           level_of: Mapping[str, int]) -> tuple[list[Drop], list[Busbar], int]:
    """Columns for a tree drawn from ``root``'s busbar down: each leaf takes a column, each
    board at least the columns its label needs (:func:`_span`), each feeder sits over the
    middle of its board's circuits. Iterative: a deep tree never recurses. ``kids_of`` gives
    every node's drops in drawing order (a group's key starts with ``"group:"``, its members
    under the key with ``"/"`` added)."""
    width: dict[str, int] = {}
    stack: list[tuple[str, bool]] = [(root, False)]
    while stack:  # widths, children before parents
        node, done = stack.pop()
        kids = kids_of.get(node, ())
        if not kids:
            width[node] = 1
        elif done:
            width[node] = max(sum(width[k] for k in kids), _span(study, node))
        else:
            stack.append((node, True))
            stack.extend((k, False) for k in kids)
    x: dict[str, float] = {}
    start: list[tuple[str, float]] = [(root, 0.0)]
    while start:  # positions, parents before children
        node, left = start.pop()
        kids = kids_of.get(node, ())
        if not kids:
            x[node] = left
            continue
        left += (width[node] - sum(width[k] for k in kids)) / 2.0
        for k in kids:
            start.append((k, left))
            left += width[k]
    for node in _postorder(root, kids_of):
        kids = kids_of.get(node, ())
        if kids:
            x[node] = _between(x[kids[0]], x[kids[-1]], [x[k] for k in kids])
    drops: list[Drop] = []
    busbars: list[Busbar] = []
    order = deque([root])
    while order:
        node = order.popleft()
        kids = kids_of.get(node, ())
        if not kids:
            continue
        level = level_of[node] + 1
        busbars.append(Busbar(board_name(study, node), level, x[kids[0]], x[kids[-1]],
                              None if node == SUPPLY_ID else node, x_in=x[node]))
        for k in kids:
            if k.startswith("group:"):
                drops.append(Drop(k[6:], x[k], level, "group", members=tuple(kids_of[k + "/"])))
                continue
            drops.append(Drop(k, x[k], level, feeds=board_name(study, k)
                              if kids_of.get(k) else None))
            order.append(k)
    return drops, busbars, width[root]


def _between(first: float, last: float, taken: Sequence[float]) -> float:
    """Where a board's incoming line meets it: the middle of its circuits, or half a column
    aside when a circuit's own line is there (the two would read as one line)."""
    middle = (first + last) / 2.0
    if len(taken) > 1 and any(abs(t - middle) < 0.25 for t in taken):
        middle += 0.5
    return middle


def _postorder(root: str, kids_of: Mapping[str, Sequence[str]]) -> list[str]:
    """The tree's nodes, children before their parent (iterative)."""
    out: list[str] = []
    stack = [root]
    while stack:
        node = stack.pop()
        out.append(node)
        stack.extend(kids_of.get(node, ()))
    return out[::-1]


def _installation(study: Study) -> Sheet:
    kids = {node: list(children) for node, children in study.children.items()}
    levels = {SUPPLY_ID: -1, **study.depth}
    drops, busbars, columns = _place(study, SUPPLY_ID, kids, levels)
    depth = max((b.level for b in busbars), default=0) + 1
    return Sheet("installation", "the installation", tuple(busbars), tuple(drops), columns,
                 depth)


def _boards(study: Study) -> Sheet:
    """Feeders and boards only; each board's final circuits as one group drop."""
    kids: dict[str, list[str]] = {}
    for node, children in study.children.items():
        feeders = [c for c in children if study.children.get(c)]
        finals = [c for c in children if not study.children.get(c)]
        if finals:
            key = f"group:{board_name(study, node)}"
            kids[key + "/"] = finals
            feeders.append(key)
        if feeders:
            kids[node] = feeders
    levels = {SUPPLY_ID: -1, **study.depth}
    drops, busbars, columns = _place(study, SUPPLY_ID, kids, levels)
    # a group hangs from its board's busbar: its level is the board's
    depth = max((b.level for b in busbars), default=0) + 1
    return Sheet("boards", "the boards", tuple(busbars), tuple(drops), columns, depth)


def _board(study: Study, feeder: str, circuits: Sequence[str], part: tuple[int, int]) -> Sheet:
    """One board: where it is fed from (a stub), its feeder, its busbar and ``circuits``."""
    name = board_name(study, feeder)
    n = len(circuits)
    drops = [Drop(c, float(i), 1, elsewhere=board_name(study, c)
                  if study.children.get(c) else None) for i, c in enumerate(circuits)]
    middle = _between(0.0, n - 1.0, range(n))
    busbars = [Busbar(name, 1, 0.0, float(max(n - 1, 0)), None if feeder == SUPPLY_ID else feeder,
                      x_in=middle)]
    if feeder != SUPPLY_ID:
        parent = study.by_id[feeder].parent
        busbars.insert(0, Busbar(board_name(study, parent), 0, middle, middle,
                                 None if parent == SUPPLY_ID else parent, stub=True))
        drops.insert(0, Drop(feeder, middle, 0, feeds=name))
    title = f"board {name}" + (f" (sheet {part[0]} of {part[1]})" if part[1] > 1 else "")
    return Sheet("board", title, tuple(busbars), tuple(drops), max(n, _span(study, feeder)), 2,
                 board=name, part=part)


def board_sheets(study: Study, feeder: str, max_columns: int | None = MAX_COLUMNS
                 ) -> list[Sheet]:
    """The sheets of one board (``feeder``: the circuit that feeds it, or ``"supply"``), its
    circuits in study order, ``max_columns`` to a sheet (``None``: one sheet)."""
    circuits = list(study.children.get(feeder, ()))
    if not circuits:
        raise InputError(f"circuit {feeder!r} feeds no board", key="--board")
    size = max_columns or len(circuits)
    chunks = [circuits[i:i + size] for i in range(0, len(circuits), size)]
    return [_board(study, feeder, chunk, (k + 1, len(chunks))) for k, chunk in enumerate(chunks)]


def plan(study: Study, *, board: str | None = None,
         max_columns: int | None = MAX_COLUMNS) -> list[Sheet]:
    """The sheets of the diagram, in the order they are read.

    Parameters
    ----------
    study : Study
        The installation.
    board : str, optional
        Only this board (its name as printed, or the id of the circuit that feeds it).
    max_columns : int or None
        Circuits across one sheet (``None``: no limit, one sheet per view, for an image file).

    Returns
    -------
    list of Sheet
        One sheet of the whole installation when it fits (at most ``max_columns`` columns and
        :data:`MAX_LEVELS` levels), else a sheet of the boards, then each board's sheets in
        study order (the origin first).

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=6000.0), (Circuit("main", "supply", "gG63", board="DB-1"),
    ...                                       Circuit("a", "main", "B6"),
    ...                                       Circuit("b", "main", "B10")))
    >>> [(sheet.view, sheet.columns) for sheet in plan(s)]
    [('installation', 4)]
    >>> [sheet.title for sheet in plan(s, max_columns=1)]
    ['the boards', 'board origin', 'board DB-1 (sheet 1 of 2)', 'board DB-1 (sheet 2 of 2)']
    """
    if board is not None:
        return board_sheets(study, feeder_of(study, board), max_columns)
    whole = _installation(study)
    if max_columns is None or (whole.columns <= max_columns and whole.levels <= MAX_LEVELS):
        return [whole]
    sheets = [_boards(study)]
    for feeder in (SUPPLY_ID, *board_names(study)):
        sheets.extend(board_sheets(study, feeder, max_columns))
    return sheets


# -- what fails, per circuit -------------------------------------------------------------------
@dataclass(frozen=True)
class Problems:
    """What each circuit misses, in words: ``by_circuit[id]`` is a tuple of phrases."""

    by_circuit: Mapping[str, tuple[str, ...]] = field(default_factory=dict)

    def of(self, keys: Sequence[str]) -> list[str]:
        return [k for k in keys if self.by_circuit.get(k)]


def _amperes(value: float | None) -> str:
    """A current to 3 significant figures (``"605 A"``, ``"3.99 kA"``)."""
    if value is None or not math.isfinite(value):
        return "-"
    return format_current(float(significant(value, 3)))


def _check_value(value: float, unit: str) -> str:
    if unit == "s":
        return format_seconds(value)
    if unit == "A":
        return format_current(value)
    if value is None or not math.isfinite(value):
        return "-"
    return f"{significant(value, 3)} {unit}"


def problems(analysis: Analysis, results: Sequence[CheckResult]) -> Problems:
    """Each circuit's unmet selectivity requirements and failed protection checks, in words.

    A pair is unmet when its ``ok`` is false (below the required selectivity; RCDs in series
    included); a check when its ``ok`` is false. Circuits that miss nothing are absent.
    """
    found: dict[str, list[str]] = {}
    for p in analysis.all_pairs:
        if p.ok:
            continue
        above = p.upstream_span
        if p.protection == "residual":
            words = f"RCD not selective with the RCD of {above}"
        elif p.verdict == "none":
            words = f"not selective with {above} even in overload"
        else:
            need = ("total" if p.required_a is None
                    else _amperes(min(p.required_a, p.window_a[1])))
            words = f"selective with {above} only to {_amperes(p.limit_a)} ({need} required)"
        found.setdefault(p.downstream, []).append(words)
    for r in results:
        if not r.ok:
            found.setdefault(r.circuit, []).append(
                f"{r.check} fails ({_check_value(r.value, r.unit)} against "
                f"{_check_value(r.limit, r.unit)})")
    return Problems({k: tuple(v) for k, v in found.items()})


# -- drawing -----------------------------------------------------------------------------------
def cable_text(cable: Cable | None) -> str:
    """A cable in a few words: ``"4/1.5 mm2 cu pvc, 25 m"`` (``"3x240/240 ..."`` in parallel).

    Examples
    --------
    >>> print(cable_text(Cable(length_m=25, csa_mm2=4, cpc_mm2=1.5)))
    4/1.5 mm2 cu pvc, 25 m
    >>> print(cable_text(None))
    no cable
    """
    if cable is None:
        return "no cable"
    par = f"{cable.parallel}x" if cable.parallel > 1 else ""
    cpc = f"/{cable.cpc_mm2:g}" if cable.cpc_mm2 else ""
    metal = {"copper": "cu", "aluminium": "al"}.get(cable.material, cable.material)
    return f"{par}{cable.csa_mm2:g}{cpc} mm2 {metal} {cable.insulation}, {cable.length_m:g} m"


def _board_fault(study: Study, levels: FaultLevels, busbar: Busbar) -> str:
    """The largest fault current at a board: three-phase where there is one, else line-neutral."""
    if busbar.feeder is None:
        ik3, ik1 = levels.origin_ik3_a, levels.origin_ik1_a
    else:
        node = levels.by_circuit[busbar.feeder]
        ik3, ik1 = node.ik3_max_end_a, node.ik1_max_end_a
    if ik3 is not None:
        return f"Ik3 {_amperes(ik3)}"
    return f"Ik1 {_amperes(ik1)}"


def _labels(study: Study, drop: Drop, device: Mapping[str, str]) -> str:
    if drop.kind == "group":
        n = len(drop.members)
        return f"{n} final circuit{'s' if n != 1 else ''}\non board {drop.key}"
    circuit = study.by_id[drop.key]
    lines = [drop.key, device[drop.key], cable_text(circuit.cable)]
    if drop.elsewhere is not None:
        lines.append(f"to board {drop.elsewhere}")
    return "\n".join(lines)


def _label_in(text: str) -> float:
    longest = max(len(line) for line in text.splitlines())
    return longest * CHAR_EM * LABEL_PT / 72.0


def _supply_text(study: Study, levels: FaultLevels) -> str:
    s = study.supply
    if s.transformer is not None:
        source = (f"transformer {s.transformer.rating_kva:g} kVA, "
                  f"{s.transformer.impedance_pct:g} %")
    elif s.pfc_a is not None:
        source = f"prospective fault current {format_current(s.pfc_a)}"
    else:
        source = "supply"
    ze = f", Ze {significant(levels.ze_ohm, 3)} ohm" if levels.ze_ohm else ""
    return (f"supply: {source}, {s.phases}-phase, U0 {s.u0_v:g} V, {s.earthing}{ze}")


def _text(ax: Axes, x: float, y: float, text: str, gid: str, **style: Any) -> Any:
    artist = ax.text(x, y, text, **{"fontsize": LABEL_PT, "color": LINE, **style})
    artist.set_gid(gid)
    return artist


def draw_sheet(study: Study, levels: FaultLevels, sheet: Sheet, found: Problems,
               device: Mapping[str, str], *, number: int = 1, total: int = 1,
               title_block: Sequence[tuple[str, str]] = (), counted: str = "sheet") -> Figure:
    """Draw one sheet of the diagram.

    Parameters
    ----------
    study, levels : Study, FaultLevels
        The installation and its fault levels (the busbars' labels).
    sheet : Sheet
        From :func:`plan`.
    found : Problems
        From :func:`problems`: the circuits to mark and what their notes say.
    device : mapping
        Each circuit's device as printed (:func:`coordination.devices.compact_labels`).
    number, total : int
        This sheet's number and how many there are.
    counted : str
        What is counted in the title block: ``"sheet"`` (a diagram file) or ``"page"`` (a
        page of the report).
    title_block : sequence of (str, str)
        The study's title-block fields (name, value) for the block in the corner.

    Returns
    -------
    matplotlib.figure.Figure
        The sheet, on a canvas of its own (no pyplot).
    """
    import matplotlib
    from matplotlib.figure import Figure
    from matplotlib.patches import Rectangle

    with matplotlib.rc_context({"text.parse_math": False}):
        labels = {_gid_key(d): _labels(study, d, device) for d in sheet.drops}
        hang_in = max((_label_in(t) for t in labels.values()), default=0.5)
        level_in = BOX_BOTTOM_IN + LABEL_GAP_IN + hang_in + 0.45
        marked = [d for d in sheet.drops if _failing(d, found)]
        notes = _notes(marked, found)
        width = max(11.69, 2 * MARGIN_IN + max(sheet.columns, 1) * COLUMN_IN)
        body = SUPPLY_IN + (sheet.levels - 1) * level_in + BOX_BOTTOM_IN + hang_in + 0.3
        height = max(8.27, HEAD_IN + body + len(notes) * NOTE_LINE_IN + 0.3 + FOOT_IN)
        fig = Figure(figsize=(width, height))
        ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
        ax.set_xlim(0.0, width)
        ax.set_ylim(0.0, height)
        ax.set_axis_off()

        def x_of(column: float) -> float:
            return MARGIN_IN + (column + 0.5) * COLUMN_IN

        def y_of(level: int) -> float:
            return height - HEAD_IN - SUPPLY_IN - level * level_in

        _text(ax, MARGIN_IN, height - 0.35, f"{study.title}: installation diagram, {sheet.title}",
              "heading", fontsize=11, va="baseline")
        _text(ax, MARGIN_IN, height - 0.55,
              "each board: its name and largest fault current (Ik3 three-phase, Ik1 "
              "line-neutral); each circuit: id, device, cable (line/cpc mm2, material, "
              "insulation, length). FAIL n: see note n below.",
              "legend", fontsize=6.5, color=MUTED, va="baseline")
        top = min(sheet.busbars, key=lambda b: b.level) if sheet.busbars else None
        if top is not None and top.level == 0 and top.feeder is None:
            xs = x_of((top.x0 + top.x1) / 2.0)
            y0 = y_of(0)
            ax.add_patch(Rectangle((xs - 0.12, y0 + 0.32), 0.24, 0.22, fill=False,
                                   edgecolor=LINE, linewidth=1.2, gid="supply"))
            ax.plot([xs, xs], [y0, y0 + 0.32], color=LINE, linewidth=1.2)
            _text(ax, xs + 0.2, y0 + 0.43, _supply_text(study, levels), "supply-text",
                  va="center", fontsize=7)
        for bar in sheet.busbars:
            _draw_busbar(ax, study, levels, bar, x_of, y_of)
        numbers = {_gid_key(d): i + 1 for i, d in enumerate(marked)}
        for drop in sheet.drops:
            key = _gid_key(drop)
            _draw_drop(ax, drop, labels[key], numbers.get(key), x_of, y_of, level_in)
        y = y_of(sheet.levels - 1) - BOX_BOTTOM_IN - LABEL_GAP_IN - hang_in - 0.3
        for key, line in notes:
            _text(ax, MARGIN_IN, y, line, f"note:{key}" if key else "note:more", fontsize=7,
                  va="top", family="monospace")
            y -= NOTE_LINE_IN
        _footer(ax, study, width, (counted, f"{number} of {total}"), title_block)
    return fig


def _gid_key(drop: Drop) -> str:
    """A drop's name in gids: the circuit's id, or ``group:<board>``."""
    return drop.key if drop.kind == "circuit" else f"group:{drop.key}"


def _failing(drop: Drop, found: Problems) -> bool:
    if drop.kind == "group":
        return bool(found.of(drop.members))
    return bool(found.by_circuit.get(drop.key))


def _notes(marked: Sequence[Drop], found: Problems) -> list[tuple[str | None, str]]:
    notes: list[tuple[str | None, str]] = []
    for n, drop in enumerate(marked, start=1):
        if drop.kind == "group":
            failing = found.of(drop.members)
            names = ", ".join(failing[:6]) + (f" and {len(failing) - 6} more"
                                              if len(failing) > 6 else "")
            text = (f"{len(failing)} of {len(drop.members)} final circuits on board "
                    f"{drop.key} fail: {names} (see that board's sheet)")
        else:
            text = f"{drop.key}: " + "; ".join(found.by_circuit[drop.key])
        notes.append((_gid_key(drop), f"FAIL {n}  {text}"))
    if len(notes) > MAX_NOTES:
        rest = len(notes) - (MAX_NOTES - 1)
        more = f"... and {rest} more failing: the check tables list every one"
        notes = [*notes[:MAX_NOTES - 1], (None, more)]
    return notes


def _draw_busbar(ax: Axes, study: Study, levels: FaultLevels, bar: Busbar, x_of: Any,
                 y_of: Any) -> None:
    y = y_of(bar.level)
    if bar.stub:
        x = x_of(bar.x0)
        ax.plot([x - 0.25, x + 0.25], [y, y], color=LINE, linewidth=2.5, linestyle=(0, (2, 1)),
                gid=f"incoming:{bar.name}")
        _text(ax, x + 0.3, y, f"from board {bar.name}", f"incoming-text:{bar.name}",
              va="center", fontsize=7)
        return
    x0, x1 = x_of(bar.x0) - 0.15, x_of(bar.x1) + 0.15
    ax.plot([x0, x1], [y, y], color=LINE, linewidth=3.0, solid_capstyle="butt",
            gid=f"busbar:{bar.name}")
    left = x_of(bar.x_in) + 0.08  # right of the line coming in
    _text(ax, left, y + 0.06 + BOARD_PT * 1.25 / 72.0, bar.name, f"board:{bar.name}",
          fontsize=BOARD_PT, fontweight="bold", va="bottom")
    _text(ax, left, y + 0.06, _board_fault(study, levels, bar), f"fault-level:{bar.name}",
          fontsize=BOARD_PT, va="bottom")


def _draw_drop(ax: Axes, drop: Drop, label: str, mark: int | None, x_of: Any, y_of: Any,
               level_in: float) -> None:
    from matplotlib.patches import Rectangle

    x, y = x_of(drop.x), y_of(drop.level)
    gid_key = _gid_key(drop)
    bottom = y - level_in if drop.feeds else y - BOX_BOTTOM_IN - 0.06
    ax.plot([x, x], [y, bottom], color=LINE, linewidth=1.0, gid=f"drop:{gid_key}")
    failing = mark is not None
    edge = {"edgecolor": FAIL_EDGE, "linewidth": 1.8, "linestyle": (0, (3, 1.5))} if failing \
        else {"edgecolor": LINE, "linewidth": 1.0}
    if drop.kind == "group":
        ax.add_patch(Rectangle((x - BOX_HALF_WIDTH_IN * 1.6, y - BOX_BOTTOM_IN), 0.22,
                               BOX_BOTTOM_IN - BOX_TOP_IN, facecolor="#e6e6e6",
                               gid=f"group:{drop.key}", **edge))
    else:
        ax.add_patch(Rectangle((x - BOX_HALF_WIDTH_IN, y - BOX_BOTTOM_IN), 2 * BOX_HALF_WIDTH_IN,
                               BOX_BOTTOM_IN - BOX_TOP_IN, facecolor="white",
                               gid=f"device:{drop.key}", **edge))
    if failing:
        _text(ax, x, y - 0.04, f"FAIL {mark}", f"mark:{gid_key}", fontsize=MARK_PT,
              fontweight="bold", color=FAIL_EDGE, ha="center", va="top")
    if drop.feeds:
        _text(ax, x + 0.05, y - BOX_BOTTOM_IN - LABEL_GAP_IN, label, f"label:{gid_key}",
              rotation=90, ha="right", va="top", rotation_mode="anchor", linespacing=1.15)
        return
    _text(ax, x, y - BOX_BOTTOM_IN - LABEL_GAP_IN - 0.02, label, f"label:{gid_key}",
          rotation=90, ha="right", va="center", rotation_mode="anchor", linespacing=1.15)
    if drop.elsewhere is not None:  # an arrowhead: the line goes on, to the board's own sheet
        ax.plot([x], [bottom + 0.01], marker="v", markersize=3.5, color=LINE, linestyle="none",
                gid=f"continues:{drop.elsewhere}")


def _footer(ax: Axes, study: Study, width: float, count: tuple[str, str],
            title_block: Sequence[tuple[str, str]]) -> None:
    """The title block in the lower right corner: the study's title on its own line, then the
    title-block fields in two columns and the sheet's number; the caution beside it."""
    from matplotlib.patches import Rectangle

    fields = [*title_block, count]
    per_column = math.ceil(len(fields) / 2)
    box_w, box_h = 5.2, 0.32 + per_column * 0.15
    x0, y0 = width - MARGIN_IN - box_w, 0.25
    ax.add_patch(Rectangle((x0, y0), box_w, box_h, fill=False, edgecolor=LINE, linewidth=0.8,
                           gid="title-block"))
    _text(ax, x0 + 0.08, y0 + box_h - 0.08, study.title, "title-block:study", fontsize=7.5,
          fontweight="bold", va="top")
    for i, (name, value) in enumerate(fields):
        col, row = divmod(i, per_column)
        _text(ax, x0 + 0.08 + col * box_w / 2, y0 + box_h - 0.3 - row * 0.15,
              f"{name}: {value}", f"title-block:{name}", fontsize=6.5, va="top")
    room = max(x0 - MARGIN_IN - 0.2, 2.0) * 72.0 / (6.5 * CHAR_EM)
    _text(ax, MARGIN_IN, 0.3, "\n".join(textwrap.wrap(CAUTION, int(room))), "caution",
          fontsize=6.5, color=MUTED, va="bottom")


# -- the whole diagram -------------------------------------------------------------------------
def figures(study: Study, levels: FaultLevels, analysis: Analysis,
            results: Sequence[CheckResult], *,
            board: str | None = None, max_columns: int | None = MAX_COLUMNS,
            title_block: Sequence[tuple[str, str]] = ()) -> Iterator[Figure]:
    """Every sheet of the diagram as a figure, one at a time (:func:`plan`, :func:`draw_sheet`).

    ``analysis`` and ``results`` are the study's selectivity and protection checks: the
    circuits that miss a requirement are marked.
    """
    from coordination.devices import compact_labels

    sheets = plan(study, board=board, max_columns=max_columns)
    found = problems(analysis, results)
    device = compact_labels(study, analysis.basis)
    for number, sheet in enumerate(sheets, start=1):
        yield draw_sheet(study, levels, sheet, found, device, number=number, total=len(sheets),
                         title_block=title_block)


def write_diagram(study: Study, levels: FaultLevels, analysis: Analysis,
                  results: Sequence[CheckResult],
                  path: str | os.PathLike, *, board: str | None = None,
                  title_block: Sequence[tuple[str, str]] = ()) -> int:
    """Write the diagram: every sheet into a PDF, or one image (PNG, SVG) of the first view.

    An image holds one figure, so it shows the whole installation, or for a large study the
    boards (``board``: that board), unsplit; a PDF has every sheet. On any error the target is
    left as it was.

    Returns
    -------
    int
        The number of sheets written.

    Raises
    ------
    InputError
        An unknown format or board, or an image wider than :data:`MAX_IMAGE_COLUMNS` columns.
    """
    import matplotlib

    from coordination.io import atomic_path

    target = os.fspath(path)
    suffix = target.rsplit(".", 1)[-1].lower() if "." in os.path.basename(target) else ""
    if suffix not in ("png", "svg", "pdf"):
        raise InputError(f"unknown diagram format {suffix!r}; allowed: png, svg, pdf", key="-o")
    if suffix != "pdf":
        sheets = plan(study, board=board)[:1]
        if board is not None:
            sheets = plan(study, board=board, max_columns=None)
        if sheets[0].columns > MAX_IMAGE_COLUMNS:
            raise InputError(f"{sheets[0].title} is {sheets[0].columns} circuits wide; an image "
                             f"holds at most {MAX_IMAGE_COLUMNS}: write a PDF (every board on "
                             "sheets of its own)", key="-o")
    with matplotlib.rc_context({"pdf.fonttype": 42, "svg.fonttype": "none"}), \
            atomic_path(path) as tmp:
        if suffix != "pdf":
            fig = next(figures(study, levels, analysis, results, board=board,
                               max_columns=None if board is not None else MAX_COLUMNS,
                               title_block=title_block))
            fig.savefig(tmp, format=suffix, dpi=150)
            return 1
        from matplotlib.backends.backend_pdf import PdfPages

        count = 0
        with PdfPages(tmp) as pdf:
            for fig in figures(study, levels, analysis, results, board=board,
                               title_block=title_block):
                pdf.savefig(fig)
                count += 1
        return count
