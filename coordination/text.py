"""Plain-text tables for the terminal (no colour codes: output is often piped or printed)."""

from __future__ import annotations

import math
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


def table(headers: Sequence[str], rows: Sequence[Sequence[str]], align: str | None = None) -> str:
    """A plain aligned table; ``align`` is one character per column, 'l' or 'r'.

    Examples
    --------
    >>> print(table(["circuit", "In"], [["lights", "6 A"], ["sockets", "32 A"]], "lr"))
    circuit    In
    -------  ----
    lights    6 A
    sockets  32 A
    """
    align = align or "l" * len(headers)
    # strict: every row has a cell for every header
    widths = [max(map(len, column)) for column in zip(headers, *rows, strict=True)]
    # one format for every line (a building's tables run to thousands of lines)
    fmt = "  ".join(f"{{:{'>' if a == 'r' else '<'}{w}}}" if w else "{}"
                    for a, w in zip(align, widths, strict=True))
    rule = "  ".join("-" * w for w in widths)
    return "\n".join([fmt.format(*headers).rstrip(), rule,
                      *(fmt.format(*row).rstrip() for row in rows)])
