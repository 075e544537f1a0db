"""Plain-text tables for the terminal (no colour codes: output is often piped or printed)."""

from __future__ import annotations

import math
import textwrap
from collections.abc import Sequence
from typing import Any


def finite_or_none(value: Any) -> float | None:
    """``float(value)`` when it is a finite number, else ``None`` (for optional numbers shown).

    >>> print(finite_or_none("2.5"), finite_or_none(float("inf")), finite_or_none("x"))
    2.5 None None
    """
    if value is None:
        return None
    try:
        v = float(value)
    except (TypeError, ValueError):
        return None
    return v if math.isfinite(v) else None


def positive_or_none(value: Any) -> float | None:
    """:func:`finite_or_none`, and ``None`` also for zero or less (currents drawn on log axes).

    >>> print(positive_or_none(0.0), positive_or_none(16))
    None 16.0
    """
    v = finite_or_none(value)
    return v if v is not None and v > 0 else None


def significant(x: float, figures: int) -> str:
    """``x`` to ``figures`` significant figures in plain decimal notation (never an exponent).

    Examples
    --------
    >>> print(significant(999.89, 3), significant(0.1, 3), significant(12345.6, 4))
    1000 0.1 12350
    """
    if x == 0 or not math.isfinite(x):
        return f"{x:g}"
    decimals = figures - 1 - math.floor(math.log10(abs(x)))
    text = f"{round(x, decimals):.{max(decimals, 0)}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text


def format_seconds(t: float | None) -> str:
    """A time for people: 'never', ms below 1 s, s above; never in exponent notation.

    Examples
    --------
    >>> print(format_seconds(0.99989), format_seconds(0.0001), format_seconds(12345.6))
    0.9999 s 0.1 ms 12350 s
    """
    if t is None or not math.isfinite(t):
        return "never"
    if t < 1.0:
        ms = significant(t * 1000, 3)
        if float(ms) < 1000:
            return f"{ms} ms"
    return f"{significant(t, 4)} s"


def format_current(i_a: float | None) -> str:
    """A current for people: A below 1 kA, kA above; never in exponent notation.

    Examples
    --------
    >>> print(format_current(999.96), format_current(1234567.0))
    1 kA 1230 kA
    """
    if i_a is None or not math.isfinite(i_a):
        return "-"
    amperes = significant(i_a, 4)
    if float(amperes) < 1000:
        return f"{amperes} A"
    return f"{significant(i_a / 1000, 3)} kA"


#: Terminal output fits this many columns: longer text wraps (under its row, or in its cell).
TERMINAL_COLUMNS = 120


def fit_lines(text: str, width: int = TERMINAL_COLUMNS) -> str:
    """A sentence for the terminal: whole when it fits, else broken after its first ``; ``
    (between clauses) and wrapped there.

    Examples
    --------
    >>> print(fit_lines("Check the cable; a person decides.", 20))
    Check the cable;
    a person decides.
    """
    if len(text) <= width:
        return text
    head, sep, tail = text.partition("; ")
    parts = [head + sep.rstrip(), tail] if sep else [text]
    return "\n".join(line for part in parts if part for line in textwrap.wrap(part, width))


def table(headers: Sequence[str], rows: Sequence[Sequence[str]], align: str | None = None, *,
          width: int | None = None, wrap: int | Sequence[int] | None = None,
          under: Sequence[str] | None = None) -> str:
    """A plain aligned table; ``align`` is one character per column, 'l' or 'r'.

    Parameters
    ----------
    headers, rows : sequences of str
        The header and one list of cells per row (every row a cell for every header).
    align : str, optional
        ``'l'`` or ``'r'`` per column (default: all left).
    width : int, optional
        The widest a line may be: when the table is wider, the ``wrap`` columns (text columns,
        never a number) wrap inside their cells, each row then taking several lines.
    wrap : int or sequence of int, optional
        The columns that may wrap to fit ``width``, between words: the room left by the
        others is shared out narrowest first, so a short column keeps its width, and a column
        is never narrower than its longest word.
    under : sequence of str, optional
        Text set under each row, indented and wrapped to ``width`` (a reason, a note);
        empty for none.

    Examples
    --------
    >>> print(table(["circuit", "In"], [["lights", "6 A"], ["sockets", "32 A"]], "lr"))
    circuit    In
    -------  ----
    lights    6 A
    sockets  32 A
    >>> print(table(["circuit", "above", "Is"], [["lights", "the incomer of the board", "6 A"]],
    ...             "llr", width=26, wrap=1))
    circuit  above          Is
    -------  ------------  ---
    lights   the incomer   6 A
             of the board
    """
    align = align or "l" * len(headers)
    # strict: every row has a cell for every header
    widths = [max(map(len, column)) for column in zip(headers, *rows, strict=True)]
    wrapping = (wrap,) if isinstance(wrap, int) else tuple(wrap or ())
    if width is not None and wrapping:
        room = width - sum(w for i, w in enumerate(widths) if i not in wrapping)
        room -= 2 * (len(widths) - 1)
        for n, column in enumerate(sorted(wrapping, key=lambda i: widths[i])):
            share = room // (len(wrapping) - n)
            longest_word = max((len(w) for row in rows for w in row[column].split()), default=0)
            widths[column] = max(min(widths[column], share), len(headers[column]), longest_word)
            room -= widths[column]
    # one format for every line (a building's tables run to thousands of lines)
    fmt = "  ".join(f"{{:{'>' if a == 'r' else '<'}{w}}}" if w else "{}"
                    for a, w in zip(align, widths, strict=True))
    rule = "  ".join("-" * w for w in widths)
    lines = [fmt.format(*headers).rstrip(), rule]
    for k, row in enumerate(rows):
        if any(len(row[i]) > widths[i] for i in wrapping):
            cells = [textwrap.wrap(cell, widths[i], break_on_hyphens=False) or [""]
                     if i in wrapping else [cell] for i, cell in enumerate(row)]
            for depth in range(max(map(len, cells))):
                lines.append(fmt.format(*(c[depth] if depth < len(c) else ""
                                          for c in cells)).rstrip())
        else:
            lines.append(fmt.format(*row).rstrip())
        if under is not None and under[k]:
            lines.extend(textwrap.wrap(under[k], (width or TERMINAL_COLUMNS),
                                       initial_indent="    ", subsequent_indent="    ",
                                       break_on_hyphens=False))
    return "\n".join(lines)
