"""What the checks share: the words for numbers in reasons, and a device's edges at the
fault currents of its circuit."""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from functools import lru_cache
from types import MappingProxyType
from typing import Any

import numpy as np

from coordination.residual import break_time_s
from coordination.text import significant
from curves.band import Band


# -------------------------------------------------------------------------------------------
# formatting helpers (our own wording), cached: a building's reasons format 38,000 numbers, most
# of them again and again (a board's fault level for each of its circuits, the usual ratings)
@lru_cache(maxsize=4096)
def a_text(i: float) -> str:
    """A current in words: ``"160 A"``, ``"6.3 kA"``; ``"-"`` for none [A].

    Examples
    --------
    >>> print(a_text(6300.0))
    6.3 kA
    """
    if not math.isfinite(i):
        return "-"
    return f"{i / 1000:.3g} kA" if i >= 1000 else f"{i:.3g} A"


@lru_cache(maxsize=4096)
def s_text(t: float) -> str:
    """A time in words: ``"12 ms"`` below 0.1 s, ``"0.4 s"``; ``"never"`` for inf [s].

    Examples
    --------
    >>> print(s_text(0.012), s_text(0.4))
    12 ms 0.4 s
    """
    if not math.isfinite(t):
        return "never"
    return f"{t * 1000:.3g} ms" if t < 0.1 else f"{t:.3g} s"


@lru_cache(maxsize=4096)
def ohm_text(z: float) -> str:
    """An impedance in words: three figures below 0.1 ohm, else two decimals [ohm].

    Examples
    --------
    >>> print(ohm_text(1.366))
    1.37 ohm
    """
    return f"{z:.3g} ohm" if z < 0.1 else f"{z:.2f} ohm"


@lru_cache(maxsize=4096)
def mm2_text(s: float) -> str:
    """A cross-section in words: ``"2.5 mm2"``; ``"-"`` for none [mm2].

    Examples
    --------
    >>> print(mm2_text(2.5))
    2.5 mm2
    """
    return "-" if not math.isfinite(s) else f"{s:.3g} mm2"


@lru_cache(maxsize=4096)
def a2s_text(energy: float) -> str:
    """An energy in words, three figures in plain decimals: ``"32500 A2s"`` [A2s].

    Cached like the others: the energy that governs a circuit's fault-energy check is most
    often let through at its board's largest fault, the same for the board's alike circuits.

    Examples
    --------
    >>> print(a2s_text(32526.46))
    32500 A2s
    """
    return f"{significant(energy, 3)} A2s"


# -------------------------------------------------------------------------------------------
# a device and its circuit's fault levels
def _in_a(band: Band) -> float:
    """The device's current setting: Ir for adjustable breakers, else In [A]."""
    return float(band.settings.get("Ir_a", band.rating_a) or band.rating_a)


def _get(node: Any, name: str, default: float | None = None) -> float | None:
    value = getattr(node, name, None)
    return default if value is None else float(value)


#: Fault currents of a node [A] at which the checks read its device's edges.
_NODE_CURRENTS = ("ief_min_a", "ik_max_a", "ik3_max_a", "ik1_max_a", "ik_min_end_a",
                  "ief_max_board_a")


_NOTHING: Mapping[float, tuple[float, float]] = MappingProxyType({})


class _Edges:
    """Upper edge [s] and maximum let-through I2t [A2s] of bands at the currents the checks read.

    Built with one vectorised call per distinct band over all the currents its circuits need
    (identical devices in many circuits share the call); a current not asked for in advance is
    evaluated on its own, so the values never depend on what was gathered.
    """

    def __init__(self, wanted: Mapping[Band, Iterable[float]]) -> None:
        self._values: dict[Band, dict[float, tuple[float, float]]] = {}
        for band, currents in wanted.items():
            i = np.array(sorted({c for c in currents if c > 0}), dtype=np.float64)
            if i.size == 0:
                continue
            t = np.asarray(band.t_max(i), dtype=np.float64).tolist()
            energy = np.asarray(band.i2t_let_through(i), dtype=np.float64).tolist()
            self._values[band] = dict(zip(i.tolist(), zip(t, energy, strict=True), strict=True))

    @classmethod
    def for_nodes(cls, items: Iterable[tuple[Band, Any]]) -> _Edges:
        """The edges of each (band, fault-level node) pair at the node's fault currents."""
        wanted: dict[Band, set[float]] = {}
        for band, node in items:
            currents = wanted.setdefault(band, set())
            for name in _NODE_CURRENTS:
                try:
                    value = _get(node, name)
                except (TypeError, ValueError):
                    continue
                if value is not None and math.isfinite(value):
                    currents.add(value)
        return cls(wanted)

    def _pair(self, band: Band, i: float) -> tuple[float, float] | None:
        values = self._values.get(band)
        return None if values is None else values.get(i)

    def t_max(self, band: Band, i: float) -> float:
        """Upper edge at ``i`` [s]; ``inf`` for no current."""
        if not i > 0:
            return math.inf
        pair = self._pair(band, i)
        return float(band.t_max(i)) if pair is None else pair[0]

    def residual_time(self, band: Any, i: float) -> float:
        """An RCD's maximum break time at an earth fault of ``i`` [s] (its upper edge there,
        :func:`coordination.residual.break_time_s`)."""
        return break_time_s(band, i)

    def values_of(self, band: Band) -> Mapping[float, tuple[float, float]]:
        """The band's (upper edge [s], maximum let-through [A2s]) by current [A], as gathered
        (may be empty; :func:`_edge_and_energy` evaluates a current not in it)."""
        return self._values.get(band, _NOTHING)


def _edge_and_energy(band: Band, i: float) -> tuple[float, float]:
    """Upper edge [s] and maximum let-through I2t [A2s] of a band at one current, evaluated."""
    return float(band.t_max(i)), float(band.i2t_let_through(i))


def _never(band: Band, i: float) -> str:
    """Words for a current the band's upper edge never reaches: it is never cleared."""
    pickup = float(band.pickup_max_a)
    where = (f"below its pickup, {a_text(pickup)}" if math.isfinite(pickup) and i < pickup
             else "below its pickup")
    return f"{a_text(i)} is never cleared by {band.name} ({where})"


def _takes(band: Band, i: float, t: float) -> str:
    """``"160 A may take 12 s"``, or the words for never."""
    return f"{a_text(i)} may take {s_text(t)}" if math.isfinite(t) else _never(band, i)
