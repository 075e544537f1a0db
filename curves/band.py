"""The Band: one protective device, with its settings, as a region of the time-current plane.

Every family (MCB, gG fuse, breakers, datasheet devices) builds a :class:`Band`; everything above
this layer (fault windows, the overlap engine, the chooser, plots, the report) only ever sees
Bands. A band has two edges:

* ``t_min(I)``: the lower edge. The device will not operate before this time (no-trip time,
  minimum pre-arcing time). ``inf`` where it never operates.
* ``t_max(I)``: the upper edge. The device will have cleared the current by this time (maximum
  operating time, total clearing time). ``inf`` where it may never operate.

Both edges are vectorised over numpy arrays of prospective current in amperes, never rise with
current, and ``t_min <= t_max`` everywhere.

Below about 10 ms a time-current picture stops meaning anything. There the families express
energy as an equivalent time ``t = I2t / I**2`` (an MCB's upper edge from its let-through I2t, a
fuse's lower edge from its minimum pre-arcing I2t and its upper edge from its maximum operating
I2t), so that one geometric comparison covers everything from overload to the largest fault.

Geometry lives in (log10 I, log10 t) space: that is where bands have sane shapes and where
"within 10 %" is a distance.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:  # shapely is imported lazily: `times` never needs it
    from shapely.geometry import Polygon

#: Bottom of the time axis for geometry and plots [s] (0.1 ms).
TIME_FLOOR_S = 1e-4
#: Top of the time axis for geometry and plots [s] (10^4 s, about 2.8 h).
TIME_CEILING_S = 1e4
#: Below this time an edge is taken from energy (t = I2t / I^2) [s].
ENERGY_REGION_S = 0.01

#: The bases a band can have. ``typical`` and ``envelope`` come from a standard; ``datasheet``
#: from points the user gave.
BASES = ("typical", "envelope", "datasheet")

EdgeFunction = Callable[[np.ndarray], np.ndarray]


def as_current(current_a: Any) -> np.ndarray:
    """Prospective current(s) as a float64 array [A] (no copy when already one)."""
    return np.asarray(current_a, dtype=np.float64)


def merged_grid(*grids: Any) -> np.ndarray:
    """The distinct values of one or more grids of currents, ascending [A].

    The same array as ``np.unique(np.concatenate(grids))`` for finite values, found by a sort
    and a comparison of neighbours: numpy's ``unique`` imports ``numpy.ma`` on its first call in
    a process, 0.01 s of a whole ``check`` (docs/performance.md).

    Parameters
    ----------
    grids : array_like
        Finite currents [A], each grid in any order.

    Returns
    -------
    numpy.ndarray
        Every distinct value once, ascending.

    Examples
    --------
    >>> print(merged_grid([10.0, 1.0], [1.0, 5.0]))
    [ 1.  5. 10.]
    """
    values = np.sort(np.concatenate([np.ravel(as_current(g)) for g in grids]))
    first = np.ones(values.shape, dtype=bool)  # each value that differs from the one before it
    np.not_equal(values[1:], values[:-1], out=first[1:])
    return values[first]


@dataclass(frozen=True, eq=False)
class Band:
    """A protective device with its settings, as a band between two edges.

    Parameters
    ----------
    name : str
        What a person reads, e.g. ``"B32"``, ``"gG100"``,
        ``"thermal-magnetic 250 A, Ir 200 A, Ii 10 In"`` (an adjustable breaker's label,
        :func:`curves.breaker.breaker_label`).
    family : str
        ``"mcb"``, ``"gG"``, ``"breaker-tm"``, ``"breaker-electronic"`` or ``"datasheet"``.
    basis : str
        ``"typical"``, ``"envelope"`` or ``"datasheet"`` (see module docstring).
    rating_a : float
        Rated current In [A].
    pickup_min_a : float
        Conventional non-tripping (non-fusing) current [A]: below it the device never operates.
    pickup_max_a : float
        Conventional tripping (fusing) current I2 [A]: above it the device always operates within
        the conventional time.
    conventional_time_s : float
        Conventional time of the standard [s].
    lower : callable
        ``t_min(I)`` over a float array [A] -> [s]; ``inf`` where it never operates.
    upper : callable
        ``t_max(I)`` over a float array [A] -> [s]; ``inf`` where it may never operate.
    let_through : callable, optional
        Maximum let-through I2t [A^2 s] versus prospective current [A], for current-limiting
        devices (MCBs by energy-limiting class, fuses by maximum operating I2t). ``None``: the
        device does not limit; its energy is ``I^2 t_max(I)``.
    pre_arcing_i2t_min_a2s : float, optional
        A fuse's minimum pre-arcing I2t [A^2 s]: the least energy that can make it operate.
    instantaneous_a : float, optional
        Lowest current at which an instantaneous (magnetic) release may act [A]. Above it the
        device withstands no energy, so as an upstream device it is selective only below this
        current unless a tested limit is given.
    breaking_capacity_a : float, optional
        Rated short-circuit breaking capacity (Icn, Icu or the fuse's rated breaking capacity)
        [A], when known.
    settings : mapping
        The settings that define the band, with units in their keys (``{"In_a": 32}``); shown in
        results and used by the chooser.
    key : tuple
        A hashable identity: two bands with equal keys are the same band (used for caching).
    notes : tuple of str
        Assumptions a designer should read (e.g. "Icn not given: 6 kA assumed").
    """

    name: str
    family: str
    basis: str
    rating_a: float
    pickup_min_a: float
    pickup_max_a: float
    conventional_time_s: float
    lower: EdgeFunction = field(repr=False)
    upper: EdgeFunction = field(repr=False)
    let_through: EdgeFunction | None = field(default=None, repr=False)
    pre_arcing_i2t_min_a2s: float | None = None
    instantaneous_a: float | None = None
    breaking_capacity_a: float | None = None
    settings: Mapping[str, Any] = field(default_factory=dict)
    key: tuple = ()
    notes: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        if self.basis not in BASES:
            raise ValueError(f"basis must be one of {BASES}, not {self.basis!r}")
        object.__setattr__(self, "settings", MappingProxyType(dict(self.settings)))
        if not self.key:
            object.__setattr__(self, "key", (self.family, self.name, self.basis))
        # bands key every cache of the engine and the checks: hash the key once
        object.__setattr__(self, "_hash", hash(self.key))

    # Identity is the key: equal keys mean the same characteristic (used by caches).
    def __eq__(self, other: object) -> bool:
        return self is other or (isinstance(other, Band) and self.key == other.key)

    def __hash__(self) -> int:
        return self._hash  # type: ignore[attr-defined]

    # -- edges ---------------------------------------------------------------------------------
    def t_min(self, current_a: Any) -> np.ndarray:
        """Lower edge [s]: the device will not operate before this time; ``inf`` for never."""
        return self.lower(as_current(current_a))

    def t_max(self, current_a: Any) -> np.ndarray:
        """Upper edge [s]: the device will have cleared by this time; ``inf`` for maybe never."""
        return self.upper(as_current(current_a))

    def i2t_let_through(self, current_a: Any) -> np.ndarray:
        """Maximum energy the device lets through at a prospective current [A^2 s].

        The let-through table where the device limits current, else ``I^2 t_max(I)``
        (``inf`` where it may never operate).
        """
        i = as_current(current_a)
        energy = i * i * self.upper(i)
        if self.let_through is not None:
            energy = np.minimum(energy, self.let_through(i))
        return energy

    # -- geometry ------------------------------------------------------------------------------
    def edges(self, current_a: Any) -> tuple[np.ndarray, np.ndarray]:
        """Both edges clipped to the time window [s], for plots and polygons."""
        i = as_current(current_a)
        lo = np.clip(self.lower(i), TIME_FLOOR_S, TIME_CEILING_S)
        hi = np.clip(self.upper(i), TIME_FLOOR_S, TIME_CEILING_S)
        return lo, hi

    def polygon(self, i_lo_a: float, i_hi_a: float, points: int = 400) -> Polygon:
        """The band between ``i_lo_a`` and ``i_hi_a`` as a shapely Polygon in log-log space.

        x is ``log10(I / 1 A)``, y is ``log10(t / 1 s)``; both edges are clipped to
        [``TIME_FLOOR_S``, ``TIME_CEILING_S``]. Where the band lies wholly at the ceiling (below
        the device's pickup) it has no area and adds nothing.
        """
        from shapely.geometry import Polygon
        from shapely.validation import make_valid

        lo_a = max(float(i_lo_a), float(self.pickup_min_a) * (1 + 1e-9))
        hi_a = float(i_hi_a)
        if not hi_a > lo_a:
            return Polygon()
        x = np.linspace(np.log10(lo_a), np.log10(hi_a), points)
        t_lo, t_hi = self.edges(10.0**x)
        ring = np.concatenate(
            [np.column_stack([x, np.log10(t_hi)]), np.column_stack([x[::-1], np.log10(t_lo[::-1])])]
        )
        poly = make_valid(Polygon(ring))
        if poly.geom_type not in ("Polygon", "MultiPolygon"):
            polys = [g for g in getattr(poly, "geoms", []) if g.geom_type == "Polygon"]
            from shapely.geometry import MultiPolygon

            poly = MultiPolygon(polys) if polys else Polygon()
        return poly

    def describe(self) -> str:
        """One line: name, basis and the settings that define it."""
        settings = ", ".join(
            f"{k}={v:g}" if isinstance(v, int | float) and not isinstance(v, bool) else f"{k}={v}"
            for k, v in self.settings.items()
        )
        return f"{self.name} ({self.basis}{'; ' + settings if settings else ''})"
