"""Residual-current time plots: the RCDs of a board and the RCDs above it.

An RCD answers to residual current (earth leakage, an earth fault), not to overcurrent, so its
band is drawn on an axis of its own: residual current in mA, never on a time-current plot of the
overcurrent devices. Each distinct RCD is one translucent band between its minimum non-actuating
time (below) and its maximum break time (above), the worst case of IEC 61008-1 / 61009-1; RCDs
of one kind on the board share one band, labelled with their circuits.

Every artist that stands for something carries a ``gid``: ``rcd-band:<id>`` (the first circuit
of the band), ``rcd-edge:<id>``, ``marker:earth-fault`` (the smallest earth-fault current among
the board's circuits, where the study's fault levels are given).

matplotlib is imported only when a plot is drawn.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

import numpy as np

from coordination.model import SUPPLY_ID, Study
from coordination.plot import BAND_ALPHA, DASHES, LITERAL_TEXT, PALETTE
from coordination.residual import rcd_of
from curves.rcd import ResidualBand

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

#: The time axis [s].
T_LO_S, T_HI_S = 0.01, 10.0


def residual_boards(study: Study) -> dict[str, tuple[str, ...]]:
    """The boards that have RCDs: the feeder's id (``"supply"`` for the origin) -> the ids of
    the circuits on that board that have one, in study order.

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=6000.0, ze_ohm=0.35),
    ...           (Circuit("m", "supply", "gG63"), Circuit("f", "m", "B16", rcd={"idn_ma": 30})))
    >>> print(residual_boards(s))
    {'m': ('f',)}
    """
    boards: dict[str, list[str]] = {}
    for c in study.circuits:
        if getattr(c, "rcd", None) is not None:
            boards.setdefault(c.parent, []).append(c.id)
    return {k: tuple(v) for k, v in boards.items()}


def _groups(study: Study, ids: Sequence[str]) -> list[tuple[ResidualBand, list[str]]]:
    """Distinct RCDs and the circuits that have each, in the order first met."""
    out: dict[Any, tuple[ResidualBand, list[str]]] = {}
    for cid in ids:
        band = rcd_of(study, cid)
        if band is not None:
            out.setdefault(band.key, (band, []))[1].append(cid)
    return list(out.values())


def _names(ids: Sequence[str]) -> str:
    return ", ".join(ids[:3]) + (f" and {len(ids) - 3} more" if len(ids) > 3 else "")


def plot_residual(study: Study, feeder: str, *, levels: Any = None, ax: Axes | None = None,
                  title: str | None = None) -> Figure:
    """Residual-current time plot of the RCDs on one board and of those above it.

    Parameters
    ----------
    study : Study
        The loaded study.
    feeder : str
        The circuit that feeds the board (``"supply"`` for the origin); a circuit that feeds no
        board with RCDs stands for its own path: its RCD (if any) and those above it.
    levels : FaultLevels, optional
        Fault levels: the smallest earth fault among the drawn circuits is marked.
    ax : matplotlib Axes, optional
        Draw into these axes; by default a new figure is made.
    title : str, optional
        Axes title; by default the study's title and the board.

    Returns
    -------
    matplotlib.figure.Figure
        Residual current [mA] on a log x axis, time [s] on a log y axis.

    References
    ----------
    IEC 61008-1 / IEC 61009-1 (limit values of break and non-actuating times); IEC 60947-2
    Annex M (delayed relays, from memory).

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=6000.0, ze_ohm=0.35),
    ...           (Circuit("m", "supply", "gG63", rcd={"idn_ma": 100, "selective": True}),
    ...            Circuit("f", "m", "B16", rcd={"idn_ma": 30})))
    >>> ax = plot_residual(s, "m").axes[0]
    >>> print(sorted(c.get_gid() for c in ax.collections))
    ['rcd-band:f', 'rcd-band:m']
    """
    import matplotlib
    from matplotlib.figure import Figure

    with matplotlib.rc_context(LITERAL_TEXT):  # user text as written, "$" included
        if feeder != SUPPLY_ID and feeder not in residual_boards(study):  # one circuit's path
            here: tuple[str, ...] = (feeder,)
            above = study.ancestors(feeder)
            where = f"the RCDs on the path of {feeder}"
        else:
            here = residual_boards(study).get(feeder, ())
            above = () if feeder == SUPPLY_ID else (feeder, *study.ancestors(feeder))
            name = "origin" if feeder == SUPPLY_ID else (study.by_id[feeder].board or feeder)
            where = f"RCDs of board {name} and above it"
        groups = _groups(study, [*here, *above])
        standalone = ax is None
        if ax is None:
            fig = Figure(figsize=(9.0, 7.0))
            ax = fig.add_axes((0.1, 0.24, 0.86, 0.68))
        else:
            fig = ax.figure
        faults_ma: list[float] = []
        if levels is not None:
            found = [getattr(levels.by_circuit.get(c), "ief_min_a", None) for c in here]
            faults_ma = [float(c) * 1000.0 for c in found if c]
        lo = min((b.pickup_min_a for b, _ in groups), default=0.015) * 1000.0 / 3.0
        hi = max((b.idn_a for b, _ in groups), default=0.03) * 1000.0 * 30.0
        hi = max(hi, 2.0 * min(faults_ma)) if faults_ma else hi
        lo, hi = 10 ** np.floor(np.log10(lo)), 10 ** np.ceil(np.log10(hi))
        grid_ma = np.geomspace(lo, hi, 800)
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlim(lo, hi)
        ax.set_ylim(T_LO_S, T_HI_S)
        for n, (band, ids) in enumerate(groups):
            colour, dash = PALETTE[n % len(PALETTE)], DASHES[n % len(DASHES)]
            i_a = grid_ma / 1000.0
            t_lo = np.clip(band.t_min(i_a), T_LO_S, T_HI_S * 10)
            t_hi = np.clip(band.t_max(i_a), T_LO_S, T_HI_S * 10)
            shown = np.isfinite(band.t_min(i_a))
            label = f"{_names(ids)}: {band.name}"
            fill = ax.fill_between(grid_ma, t_lo, t_hi, where=shown, step="post", color=colour,
                                   alpha=BAND_ALPHA, linewidth=0, label=label)
            fill.set_gid(f"rcd-band:{ids[0]}")
            for edge in (t_lo, t_hi):
                line, = ax.step(grid_ma[shown], edge[shown], where="post", color=colour,
                                linestyle=dash, linewidth=1.2)
                line.set_gid(f"rcd-edge:{ids[0]}")
        if faults_ma and lo <= min(faults_ma) <= hi:
            marker = ax.axvline(min(faults_ma), color="#444444", linestyle=(0, (4, 2)),
                                linewidth=1.3, label="smallest earth fault on the board "
                                f"({min(faults_ma) / 1000.0:.3g} A)")
            marker.set_gid("marker:earth-fault")
        from matplotlib.ticker import FuncFormatter, LogLocator, NullLocator

        for axis in (ax.xaxis, ax.yaxis):  # plain numbers: mA and s are in the axis labels
            axis.set_major_locator(LogLocator(base=10.0, numticks=20))
            axis.set_minor_locator(NullLocator())
            axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
        ax.grid(True, which="major", color="#b5b5b5", linewidth=0.6)
        ax.set_xlabel("residual current [mA]", fontsize=9)
        ax.set_ylabel("time [s]", fontsize=9)
        ax.tick_params(labelsize=8)
        ax.set_title(title or f"{study.title}\n{where} (residual current)", fontsize=10, y=1.01)
        ax.legend(loc="upper left", bbox_to_anchor=(0.0, -0.09), ncol=1, fontsize=6.5,
                  frameon=False, title="key (worst case of IEC 61008-1 / 61009-1)",
                  title_fontsize=7.5, alignment="left")
        if standalone:
            from coordination import CAUTION

            fig.text(0.1, 0.015, CAUTION, fontsize=6.5, color="#444444")
    return fig
