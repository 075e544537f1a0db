"""Marks on a time-current plot that say how to read it: the energy region, tested limits and
the operating point of the disconnection check.

Drawing steps of :func:`coordination.plot.plot_circuit`, each on the Axes it is given, each
artist with a ``gid``: ``energy-region`` (the line at 10 ms) and ``energy-region-text``,
``tested:<upstream>><downstream>``, ``marker:disconnection`` (the point the check took),
``marker:disconnection-limit`` (its required time at the same current) and, on a circuit a
standby source feeds, ``decrement:<case>:max-fault`` and ``decrement:<case>:min-earth-fault``
(its decaying faults, :mod:`coordination.standby`).
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from typing import TYPE_CHECKING, Any

from coordination.text import format_current, format_seconds, positive_or_none, significant
from curves.band import ENERGY_REGION_S

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.axes import Axes

    from coordination.checks import CheckResult
    from coordination.engine import PairResult

ENERGY_STYLE = {"color": "#6b6b6b", "linestyle": (0, (1, 1.5)), "linewidth": 0.9}
TESTED_STYLE = {"color": "#0e4f7a", "linestyle": (0, (6, 1.5, 1, 1.5, 1, 1.5)), "linewidth": 1.5}
CHECK_POINT_STYLE = {"color": "#111111", "markersize": 6.0, "markeredgewidth": 1.2}
#: The decaying fault currents of a standby source (our own colour: a dark teal).
DECREMENT_STYLE = {
    "max-fault": {"color": "#0b5e55", "linestyle": "-", "linewidth": 1.8},
    "min-earth-fault": {"color": "#0b5e55", "linestyle": (0, (5, 2, 1, 2)), "linewidth": 1.5},
}
#: The y axis label: what a time below 10 ms means on these plots.
TIME_LABEL = "time [s]  (below 10 ms: equivalent time I\u00b2t / I\u00b2)"


def current_text(current_a: float | None) -> str:
    """A current to three significant figures, as the plot writes Is (``"605 A"``).

    Examples
    --------
    >>> print(current_text(605.43), current_text(2254.0))
    605 A 2.25 kA
    """
    if current_a is None or not math.isfinite(current_a):
        return "-"
    return format_current(float(significant(current_a, 3)))


def draw_energy_region(ax: Axes, i_min: float) -> Any:
    """A dotted line at 10 ms, and under it at the left: below it times are I2t / I^2.

    Returns the line (for the label layout)."""
    line = ax.axhline(ENERGY_REGION_S, zorder=1.5, gid="energy-region", **ENERGY_STYLE)
    ax.annotate("below 10 ms: equivalent time I\u00b2t / I\u00b2 (energy)",
                xy=(i_min, ENERGY_REGION_S), xytext=(3.0, -3.0), textcoords="offset points",
                ha="left", va="top", fontsize=6.0, color=ENERGY_STYLE["color"], zorder=6,
                gid="energy-region-text")
    return line


def draw_tested_limits(ax: Axes, key: list[tuple[Any, str]],
                       pairs: Iterable[PairResult]) -> list[float]:
    """A vertical line at each tested limit a pair of the plot has (the study's
    ``tested_limits_a``), named in the key; returns their currents [A]."""
    drawn = []
    for p in pairs:
        limit = positive_or_none(p.tested_limit_a)
        if limit is None:
            continue
        label = (f"tested limit (from the study) for {p.downstream} under {p.upstream}: "
                 f"{current_text(limit)}")
        line = ax.axvline(limit, zorder=5, gid=f"tested:{p.upstream}>{p.downstream}",
                          label=label, **TESTED_STYLE)
        key.append((line, label))
        drawn.append(limit)
    return drawn


def draw_disconnection_point(ax: Axes, key: list[tuple[Any, str]],
                             result: CheckResult | None) -> tuple[float, float] | None:
    """The disconnection check's operating point on the minimum earth-fault marker: the
    envelope's latest clearing time at that current (a filled dot), and the time the check
    requires there (a bar). Returns the point (current [A], time [s]) or None."""
    if result is None or result.check != "disconnection":
        return None
    current = positive_or_none(result.details.get("current_a"))
    if current is None:
        return None
    time = result.value if math.isfinite(result.value) else None
    low, high = ax.get_ylim()
    verdict = "met" if result.ok else "NOT met"
    label = (f"disconnection ({result.basis}): {format_seconds(time)} at "
             f"{current_text(current)}, limit {format_seconds(result.limit)}, {verdict}")
    shown = min(max(time, low), high) if time is not None else high
    (point,) = ax.plot([current], [shown], marker="o" if time is not None else "^",
                       linestyle="none", zorder=8, gid="marker:disconnection", label=label,
                       **CHECK_POINT_STYLE)
    ax.plot([current], [result.limit], marker="_", markersize=14.0, markeredgewidth=2.0,
            color=CHECK_POINT_STYLE["color"], linestyle="none", zorder=8,
            gid="marker:disconnection-limit")
    key.append((point, label))
    return current, shown


def draw_decrements(ax: Axes, key: list[tuple[Any, str]], case: Any, circuit_id: str,
                    i_min: float) -> None:
    """A standby source's decaying faults on a circuit it feeds, as curves (I(t), t): the
    maximum fault at the board and the minimum earth fault at the far end; a curve meets a
    band where that device operates (common practice).

    Parameters
    ----------
    ax : Axes
        The plot.
    key : list
        The legend's (handle, label) pairs, appended to.
    case : SupplyCase
        :func:`coordination.standby.case_levels` of the source.
    circuit_id : str
        The circuit drawn (nothing is drawn where the source does not feed it).
    i_min : float
        The current axis' left end [A]: a curve stops there.
    """
    if circuit_id not in case.nodes:
        return
    from coordination.generator import decrement_curve
    from coordination.standby import window_decrement
    from curves.band import TIME_CEILING_S, TIME_FLOOR_S

    node = case.nodes[circuit_id]
    for name, decrement, what in (
            ("max-fault", window_decrement(node), "maximum fault at the board"),
            ("min-earth-fault", node.earth_end, "minimum earth fault at far end")):
        i, t = decrement_curve(decrement, t_from_s=TIME_FLOOR_S, t_to_s=TIME_CEILING_S,
                               floor_a=i_min)
        if i.size < 2:
            continue
        label = f"{case.name}: {what}, {format_current(float(i[0]))} decaying"
        (line,) = ax.plot(i, t, zorder=5, gid=f"decrement:{case.name}:{name}", label=label,
                          **DECREMENT_STYLE[name])
        key.append((line, label))
