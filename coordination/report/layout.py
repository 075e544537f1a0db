"""The report's page layout: the A4 frame, tables set in a monospaced face across pages.

Nothing here knows what a study is beyond its title: the content (:mod:`.content`) hands over
:class:`TableSpec` tables and the page builders (:mod:`.pages`) draw them with
:func:`table_pages`.

Table lines are set in Courier, a standard PDF face that needs no embedding and draws about ten
times faster (:data:`STANDARD_MONO`).
"""

from __future__ import annotations

import functools
import logging
import textwrap
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any

from coordination import CAUTION
from coordination.model import Study

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

#: A4 portrait [in].
PAGE_SIZE_IN = (8.27, 11.69)
LEFT, RIGHT, TOP, BOTTOM = 0.07, 0.95, 0.93, 0.07
INK = "#1a1a1a"
MUTED = "#555555"
RULE = "#9a9a9a"
FAIL_INK = "#8b1a1a"


def wrap_words(text: str, width: int) -> list[str]:
    """Lines of at most ``width`` characters, never broken at a hyphen (ids stay whole)."""
    return textwrap.wrap(text, width, break_on_hyphens=False)


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
    flags: tuple[bool, ...] = ()  # rows that miss a requirement (kept first when capped)
    failing: tuple[tuple[int, ...], ...] = ()  # per row, the cells set in the failure ink
    whole: tuple[int, ...] = ()  # columns never wrapped nor cut (numbers): as wide as needed


FONT_PT = 7.0
LINE_IN = FONT_PT * 1.32 / 72.0  # baseline to baseline [in]
MONO = "DejaVu Sans Mono"  # ships with matplotlib
MONO_EM = 0.62  # advance width of a DejaVu Sans Mono character [em] (0.602), with room
CHAR_ADVANCE_EM = 0.6  # the advance of a Courier character [em], where a cell starts
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
    for j in spec.whole:  # a number is never wrapped nor cut, however long
        least[j] = max([least[j], *(len(str(row[j])) for row in spec.rows)])
    spare = max(0, total_chars - sum(least))
    weight = sum(spec.widths)
    return [m + int(spare * w / weight) for m, w in zip(least, spec.widths, strict=True)]


def _row_lines(spec: TableSpec, row: Sequence[str], chars: Sequence[int]) -> list[list[str]]:
    cells = []
    for j, text in enumerate(row):
        text = str(text)
        if j in spec.whole:
            cells.append([text])
        elif j in spec.wrap or j in spec.fit:
            cells.append(wrap_words(text, chars[j]) or [""])
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


def draw_table(fig: Figure, spec: TableSpec, rows: Sequence[int], top: float) -> float:
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
        failing = set(spec.failing[i]) if spec.failing else set()
        if k % 2 == 1:
            fig.add_artist(Rectangle((LEFT - 0.005, y - n * pitch - 0.05 * pitch),
                                     RIGHT - LEFT + 0.01, n * pitch, transform=fig.transFigure,
                                     facecolor="#ededed", edgecolor="none", zorder=-1))
        for line in range(n):
            texts = [c[line] if line < len(c) else "" for c in cells]
            base = [" " * len(t) if j in failing else t for j, t in enumerate(texts)]
            baseline = y - ascent - line * pitch
            fig.text(LEFT, baseline, _table_line(base, chars, align), family=MONO,
                     fontsize=FONT_PT, color=INK, va="baseline").__class__ = line_class
            for j in sorted(failing):
                if texts[j].strip():
                    _failing_cell(fig, texts[j], j, chars, align, baseline, line_class)
        y -= n * pitch
    return y


def _failing_cell(fig: Figure, text: str, column: int, chars: Sequence[int], align: str,
                  baseline: float, line_class: type) -> None:
    """A failing cell, in the failure ink, over its blank place in the line: only the cell
    that fails is coloured (its words say so too: NO, FAIL)."""
    start = sum(chars[:column]) + COLUMN_GAP * column
    if align[column] == "r":
        start += chars[column] - len(text)
    x = LEFT + start * FONT_PT * CHAR_ADVANCE_EM / 72.0 / PAGE_SIZE_IN[0]
    artist = fig.text(x, baseline, text, family=MONO, fontsize=FONT_PT, color=FAIL_INK,
                      va="baseline")
    artist.__class__ = line_class
    artist.set_gid(f"failing-cell:{column}")


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
def new_page(study: Study, heading: str | None) -> Figure:
    """A blank A4 page: the study's title and "selectivity report" at the top, the heading."""
    from matplotlib.figure import Figure

    fig = Figure(figsize=PAGE_SIZE_IN)
    title = study.title if len(study.title) <= 90 else study.title[:89] + "\u2026"
    fig.text(LEFT, 0.975, title, fontsize=7, color=MUTED, ha="left", va="top")
    fig.text(RIGHT, 0.975, "selectivity report", fontsize=7, color=MUTED, ha="right",
             va="top")
    if heading:
        fig.text(LEFT, 0.955, heading, fontsize=13, fontweight="bold", color=INK, va="top")
    if study.title_block:
        fig.text(LEFT, 0.02, title_block_line(study.title_block), fontsize=6, color=MUTED,
                 ha="left", va="bottom", gid="title-block")
    return fig


#: The footer's title block, at most this many characters (left of ``page N of M``).
FOOTER_CHARS = 125


def title_block_line(fields: Sequence[tuple[str, str]], chars: int = FOOTER_CHARS) -> str:
    """The title block in one line for a page's footer, cut short with an ellipsis.

    Examples
    --------
    >>> print(title_block_line([("client", "Invented Ltd"), ("revision", "B")]))
    client: Invented Ltd | revision: B
    >>> print(title_block_line([("project", "x" * 40)], chars=20))
    project: xxxxxxxxxx…
    """
    line = " | ".join(f"{key}: {value}" for key, value in fields)
    return line if len(line) <= chars else line[:chars - 1] + "\u2026"


def finish_page(fig: Figure, number: int, total: int) -> None:
    """The page's foot: a rule, the caution and ``page N of M``."""
    fig.add_artist(_rule(fig, 0.045))
    fig.text(LEFT, 0.038, CAUTION, fontsize=5.6, color=MUTED, ha="left", va="top")
    fig.text(RIGHT, 0.02, f"page {number} of {total}", fontsize=7, color=MUTED, ha="right",
             va="bottom")


# -- pages of tables ---------------------------------------------------------------------------
#: Draws one page: ``build(number, total)`` returns the page as a matplotlib Figure.
PageBuilder = Callable[[int, int], "Figure"]


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
                  flags=tuple(flags[i] for i in keep) if spec.flags else (),
                  failing=tuple(spec.failing[i] for i in keep) if spec.failing else ())
    return cut, note


def table_pages(study: Study, heading: str, intro: Sequence[str],
                spec: TableSpec) -> list[PageBuilder]:
    """A table under a heading and its introduction, on as many pages as it takes (capped at
    :data:`MAX_TABLE_ROWS` rows, said in the introduction)."""
    spec, note = _capped(spec)
    if note is not None:
        intro = (*intro, note)
    intro_in = (0.32 + 0.16 * sum(len(wrap_words(t, 130)) for t in intro)) if intro else 0.3
    body_in = (TOP - BOTTOM) * PAGE_SIZE_IN[1]
    chunks = _paginate(spec, body_in - intro_in, body_in - 0.3)
    builders: list[PageBuilder] = []
    for k, rows in enumerate(chunks):
        def build(number: int, total: int, rows: list[int] = rows, k: int = k) -> Figure:
            title = heading if k == 0 else f"{heading} (continued)"
            fig = new_page(study, title)
            y = TOP - 0.012
            if k == 0:
                for para in intro:
                    for line in wrap_words(para, 130):
                        fig.text(LEFT, y, line, fontsize=7.5, color=MUTED, va="top")
                        y -= 0.013
                y -= 0.008
            draw_table(fig, spec, rows, y)
            finish_page(fig, number, total)
            return fig

        builders.append(build)
    return builders

