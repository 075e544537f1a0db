"""Plain-text tables for the terminal (no colour codes: output is often piped or printed)."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

from curves.band import Band


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


def format_seconds(t: float | None) -> str:
    """A time for people: 'never', ms below 1 s, s above."""
    if t is None or not math.isfinite(t):
        return "never"
    if t < 1.0:
        return f"{t * 1000:.3g} ms"
    return f"{t:.4g} s"


def format_current(i_a: float | None) -> str:
    """A current for people: A below 1 kA, kA above."""
    if i_a is None or not math.isfinite(i_a):
        return "-"
    return f"{i_a / 1000:.3g} kA" if i_a >= 1000 else f"{i_a:.4g} A"


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


def format_times(band: Band, points: Sequence[dict]) -> str:
    """The `times` table: earliest and latest operating time per current."""
    head = f"{band.name}  basis: {band.basis}"
    rows = [
        [format_current(p["current_a"]), f"{p['current_a'] / band.rating_a:.3g}",
         format_seconds(p["t_min_s"]), format_seconds(p["t_max_s"])]
        for p in points
    ]
    body = table(["current", "x In", "earliest (t_min)", "latest (t_max)"], rows, "rrrr")
    notes = "".join(f"\nnote: {n}" for n in band.notes)
    return f"{head}\n{body}{notes}"
