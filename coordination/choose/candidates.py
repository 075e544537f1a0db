"""The chooser's candidates: each family's series in lowness order, and the settings grids of
adjustable breakers (evaluated as whole arrays, never built one by one for the screen).

References
----------
IEC 60898-1 (MCB ratings and Icn), IEC 60269-1 (gG and aM ratings), IEC 60947-2 (breakers, their
settings); the setting grids of ``curves.breaker`` (common practice).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType
from typing import Any

import numpy as np

from curves import families
from curves.band import Band
from curves.errors import InputError

#: Families the chooser can search, as given to ``--family``: the chooser groups of the device
#: family registry (MCB types, gG and aM fuse-links, thermal-magnetic and electronic breakers).
FAMILIES = tuple(g.code for g in families.GROUPS)


#: Rated short-circuit capacities Icn of MCBs [A] (IEC 60898-1 preferred values; from memory).
#: Used only to raise a candidate MCB's Icn to the board's fault level.
MCB_ICN_SERIES_A = (1500.0, 3000.0, 4500.0, 6000.0, 10000.0, 15000.0, 20000.0, 25000.0)


#: Ultimate breaking capacities Icu offered for breakers [A] (common practice). A chosen breaker
#: states the smallest that reaches the fault where the study gives none.
BREAKER_ICU_SERIES_A = (10000.0, 16000.0, 25000.0, 36000.0, 50000.0, 70000.0, 100000.0,
                        150000.0)


#: Default Icn of an MCB written in shorthand ("B32") [A] (the registry's).
MCB_DEFAULT_ICN_A = float(families.BY_NAME["mcb"].defaults["icn_a"])
#: Default energy-limiting class of an MCB written in shorthand (the registry's).
MCB_DEFAULT_CLASS = int(families.BY_NAME["mcb"].defaults["energy_class"])

#: What a family is called in a remedy.
FAMILY_WORDS = MappingProxyType({g.code: g.words for g in families.GROUPS})
#: What a candidate of a family is called in the chooser's answers (``--family`` takes the codes).
FAMILY_NOUNS = MappingProxyType({g.code: g.noun for g in families.GROUPS})


@dataclass(frozen=True)
class Candidate:
    """One point of the search: a device spec in lowness order."""

    spec: str | Mapping[str, Any]
    rating_a: float  # rated current In (frame) [A]
    setting_a: float  # the current that carries the load: Ir for breakers, else In [A]
    order: tuple[float, ...]


def mcb_spec(curve: str, rating: float, energy_class: int, icn_a: float) -> str | dict:
    from curves.mcb import class_applies

    if not class_applies(curve, rating, energy_class):
        energy_class = MCB_DEFAULT_CLASS  # EN 60898-1 Annex ZA has none here: the shorthand's
    if energy_class == MCB_DEFAULT_CLASS and icn_a == MCB_DEFAULT_ICN_A:
        return f"{curve}{rating:g}"
    if energy_class == MCB_DEFAULT_CLASS and (icn_a / 1000).is_integer():
        return f"{curve}{rating:g} {icn_a / 1000:g}kA"
    return {"family": "mcb", "type": curve, "In_a": num(rating),
            "energy_class": int(energy_class), "icn_a": num(icn_a)}


def _fuse_spec(family: str, rating: float, breaking_capacity_a: float | None) -> str | dict:
    """A fuse-link's spec, ``"gG100"``, ``"aM32/80kA"`` or an inline table."""
    if breaking_capacity_a is None:
        return f"{family}{rating:g}"
    if (breaking_capacity_a / 1000).is_integer():
        return f"{family}{rating:g}/{breaking_capacity_a / 1000:g}kA"
    return {"family": family, "In_a": num(rating),
            "breaking_capacity_a": num(breaking_capacity_a)}


def num(x: float) -> float | int:
    """An integer when the value is whole (study files read better)."""
    x = float(x)
    return int(x) if x.is_integer() else x


def spec_text(spec: str | Mapping[str, Any] | None) -> str:
    """A device spec as study-file text: ``"gG125"`` or an inline TOML table.

    Examples
    --------
    >>> print(spec_text({"family": "gG", "In_a": 125}))
    {family = "gG", In_a = 125}
    """
    if spec is None:
        return "-"
    if isinstance(spec, str):
        return f'"{spec}"'

    def value(v: Any) -> str:
        if isinstance(v, bool):
            return "true" if v else "false"
        if isinstance(v, str):
            return f'"{v}"'
        if isinstance(v, Mapping):
            return "{" + ", ".join(f"{k} = {value(x)}" for k, x in v.items()) + "}"
        if isinstance(v, list | tuple):
            return "[" + ", ".join(value(x) for x in v) + "]"
        return f"{v:g}" if isinstance(v, float) else str(v)

    return value(spec)


def family_of(band: Band) -> str | None:
    """The chooser family of a band (``"B"``, ``"gG"``, ``"tm"`` ...), or None for datasheets.

    Examples
    --------
    >>> from curves.spec import band_from_spec
    >>> print(family_of(band_from_spec("C16")), family_of(band_from_spec("gG100")))
    C gG
    """
    return families.group_of(band)


def normalise_family(family: str) -> str:
    for f in FAMILIES:
        if family.strip().lower() == f.lower():
            return f
    raise InputError(f"unknown family {family!r}; allowed: {', '.join(FAMILIES)}",
                     key="--family")


def _mcb_series(curve: str, current: Band, ik_board_a: float) -> list[Candidate]:
    same = current.family == "mcb"
    energy_class = int(current.settings.get("energy_class", MCB_DEFAULT_CLASS)) if same \
        else MCB_DEFAULT_CLASS
    icn = float(current.settings.get("icn_a", MCB_DEFAULT_ICN_A)) if same else MCB_DEFAULT_ICN_A
    if icn < ik_board_a:  # raise Icn to the fault level where a standard value reaches it
        icn = next((x for x in MCB_ICN_SERIES_A if x >= ik_board_a), icn)
    return [Candidate(mcb_spec(curve, r, energy_class, icn), float(r), float(r), (float(r),))
            for r in families.BY_NAME["mcb"].ratings()]


def _fuse_series(family: str, current: Band) -> list[Candidate]:
    """A fuse-link family's ratings (``"gG"`` or ``"aM"``), keeping a breaking capacity the
    study states for its present fuse-link of that family."""
    from curves.fuse import DEFAULT_BREAKING_CAPACITY_A

    given = None
    if current.family == family and current.breaking_capacity_a is not None and \
            not math.isclose(current.breaking_capacity_a, DEFAULT_BREAKING_CAPACITY_A):
        given = float(current.breaking_capacity_a)
    return [Candidate(_fuse_spec(family, r, given), float(r), float(r), (float(r),))
            for r in families.BY_NAME[family].ratings()]


def _capacity(series: Sequence[float], given: float | None, fault_a: float) -> float:
    """A breaking capacity that reaches the fault: the one given when it does, else the
    smallest value of the series that does (or the fault itself above the series) [A]."""
    if given is not None and given >= fault_a:
        return float(given)
    return float(next((x for x in series if x >= fault_a), math.ceil(fault_a / 1000) * 1000))


@dataclass(frozen=True)
class SettingsGrid:
    """An electronic unit at one rated current and long-time setting Ir: the grid of its other
    settings (Isd, tsd, tr, Ii), axes in lowness order; ``Ii`` NaN stands for "off".

    The grid's candidates are never built one by one for the screen: :func:`electronic_edges`
    evaluates all of them at once.
    """

    rating_a: float
    ir_x: float
    isd_x: np.ndarray
    tsd_s: np.ndarray
    tr_s: np.ndarray
    ii_x: np.ndarray
    extra: Mapping[str, Any]

    @property
    def ir_a(self) -> float:
        return self.rating_a * self.ir_x

    @property
    def shape(self) -> tuple[int, int, int, int]:
        return (self.isd_x.size, self.tsd_s.size, self.tr_s.size, self.ii_x.size)

    def valid(self) -> np.ndarray:
        """Settings a unit accepts: Isd at or below Ii (or Ii off), shape :attr:`shape`."""
        isd_a = self.isd_x * self.ir_a
        ii_a = np.where(np.isnan(self.ii_x), np.inf, self.ii_x * self.rating_a)
        ok = isd_a[:, None] <= ii_a[None, :] * (1 + 1e-9)
        return np.broadcast_to(ok[:, None, None, :], self.shape)

    def candidate(self, index: Sequence[int]) -> Candidate:
        a, b, c, d = (int(k) for k in index)
        ii = float(self.ii_x[d])
        spec = {"family": "electronic", "In_a": num(self.rating_a), "Ir_x": num(self.ir_x),
                "tr_s": num(self.tr_s[c]), "Isd_x": num(self.isd_x[a]),
                "tsd_s": num(self.tsd_s[b]), "Ii_x": "off" if math.isnan(ii) else num(ii),
                **self.extra}
        order = (self.rating_a, self.ir_a, float(self.isd_x[a]), float(self.tsd_s[b]),
                 float(self.tr_s[c]), math.inf if math.isnan(ii) else ii)
        return Candidate(spec, self.rating_a, self.ir_a, order)


def electronic_parts(current_a: np.ndarray, grid: SettingsGrid, basis: str) -> tuple[
        tuple[np.ndarray, np.ndarray, np.ndarray], tuple[np.ndarray, np.ndarray, np.ndarray]]:
    """The elements of every setting of a grid, apart: long-time, short-time, instantaneous.

    The model of ``curves.breaker.electronic_band`` itself (its
    :func:`curves.breaker.electronic_elements`, broadcast over the grid's axes): each element
    depends on only some of the settings, so it is evaluated once per value of those. The
    long-time part depends on Isd as well as tr, since the long-time law gives way to the
    short-time delay above the short-time pickup.

    Parameters
    ----------
    current_a : ndarray
        Prospective currents, shape (n,) [A].
    grid : SettingsGrid
    basis : str
        ``"typical"`` or ``"envelope"``.

    Returns
    -------
    lower, upper : tuple of ndarray
        Each ``(long_time, short_time, instantaneous)`` of shapes ``(n_isd, n_tr, n)``,
        ``(n_isd, n_tsd, n)`` and ``(n_ii, n)`` [s]; ``inf`` where the element does not act.
        A setting's edge is the element-wise minimum of its three parts.

    References
    ----------
    IEC 60947-2, 7.2.1.2.4 and Table 6 (via ``curves.breaker``).

    Examples
    --------
    >>> g = SettingsGrid(400.0, 0.8, np.array([4.0, 6.0]), np.array([0.1, 0.2]),
    ...                  np.array([8.0]), np.array([10.0, np.nan]), {})
    >>> lower, upper = electronic_parts(np.array([500.0, 5000.0]), g, "typical")
    >>> print([part.shape for part in lower])
    [(2, 1, 2), (2, 2, 2), (2, 2)]
    """
    from curves import breaker as b

    i = np.asarray(current_a, dtype=float)
    settings = {
        "rating_a": grid.rating_a,
        "ir_a": grid.ir_a,
        "tr_s": grid.tr_s[None, :, None],  # (1, tr, 1)
        "isd_a": (grid.isd_x * grid.ir_a)[:, None, None],  # (isd, 1, 1)
        "tsd_s": grid.tsd_s[None, :, None],  # (1, tsd, 1)
        "ii_a": np.where(np.isnan(grid.ii_x), np.inf, grid.ii_x * grid.rating_a)[:, None],
        "sd_i2t": bool(grid.extra.get("sd_i2t", False)),
        "basis": basis,
    }
    lower = b.electronic_elements(i, "lower", **settings)
    upper = b.electronic_elements(i, "upper", **settings)
    n = i.shape[-1]
    n_isd, n_tsd, n_tr, n_ii = grid.shape
    shapes = ((n_isd, n_tr, n), (n_isd, n_tsd, n), (n_ii, n))

    def full(parts: tuple[np.ndarray, ...]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        lt, st, inst = (np.broadcast_to(part, shape) for part, shape in
                        zip(parts, shapes, strict=True))
        return lt, st, inst

    return full(lower), full(upper)


def combine_parts(parts: tuple[np.ndarray, np.ndarray, np.ndarray]) -> np.ndarray:
    lt, st, inst = parts
    return np.minimum(np.minimum(lt[:, None, :, None, :], st[:, :, None, None, :]),
                      inst[None, None, None, :, :])


def electronic_edges(current_a: np.ndarray, grid: SettingsGrid, basis: str) -> tuple[
        np.ndarray, np.ndarray]:
    """Lower and upper edges of every setting of a grid at once [s].

    The device trips on the first element that acts, so each edge is the element-wise minimum
    of the parts of :func:`electronic_parts`, broadcast over the setting axes.

    Parameters
    ----------
    current_a : ndarray
        Prospective currents, shape (n,) [A].
    grid : SettingsGrid
    basis : str
        ``"typical"`` or ``"envelope"``.

    Returns
    -------
    lower, upper : ndarray
        Shape ``grid.shape + (n,)`` [s]; ``inf`` where the unit never (may never) operates.

    References
    ----------
    IEC 60947-2, 7.2.1.2.4 and Table 6 (via ``curves.breaker``).

    Examples
    --------
    >>> g = SettingsGrid(400.0, 0.8, np.array([6.0]), np.array([0.2]), np.array([8.0]),
    ...                  np.array([10.0]), {})
    >>> lo, hi = electronic_edges(np.array([10 * 320.0]), g, "envelope")
    >>> print(round(float(hi[0, 0, 0, 0, 0]), 3))
    0.25
    """
    lower, upper = electronic_parts(current_a, grid, basis)
    return combine_parts(lower), combine_parts(upper)


def _breaker_groups(family: str, current: Band, fault_a: float) -> list[Any]:
    """Adjustable breakers: one group per (In, Ir) in lowness order. Thermal-magnetic groups
    are lists of candidates (Ii ascending); electronic groups are :class:`SettingsGrid`."""
    from curves import breaker

    same = current.family == families.BY_GROUP[family].band_family
    given = current.settings.get("icu_a") if same else None
    extra: dict[str, Any] = {}
    if fault_a > 0 or given is not None:  # 0: the study gives the circuit's breaking capacity
        icu = _capacity(BREAKER_ICU_SERIES_A, float(given) if given is not None else None,
                        fault_a)
        extra["icu_a"] = num(icu)
    groups: list[Any] = []
    if family == "tm":
        for rating in families.BY_GROUP[family].ratings():
            for fr in sorted(breaker.TM_IR_FRACTIONS):
                ir = float(rating) * float(fr)
                groups.append([Candidate({"family": "tm", "In_a": num(rating), "Ir_x": num(fr),
                                          "Ii_x": num(x), **extra},
                                         float(rating), ir, (float(rating), ir, float(x)))
                               for x in sorted(breaker.II_X)])
        return groups
    ii = np.array([*sorted(float(x) for x in breaker.ELECTRONIC_II_X), np.nan])
    for rating in families.BY_GROUP[family].ratings():
        for fr in sorted(breaker.ELECTRONIC_IR_FRACTIONS):
            groups.append(SettingsGrid(float(rating), float(fr),
                                       np.array(sorted(breaker.ISD_X), dtype=float),
                                       np.array(sorted(breaker.TSD_S), dtype=float),
                                       np.array(sorted(breaker.TR_S), dtype=float), ii,
                                       MappingProxyType(extra)))
    return groups


def candidate_groups(family: str, current: Band, fault_a: float) -> list[Any]:
    """The family's candidates in lowness order, in groups sharing In and the load setting.

    Parameters
    ----------
    family : str
        One of :data:`FAMILIES`.
    current : Band
        The circuit's present device (its energy class, Icn or Icu are kept where the family is
        the same and they reach the fault).
    fault_a : float
        Largest fault current the device must break [A] (an MCB's Icn or a breaker's Icu is
        raised to reach it); 0 where the study gives the circuit's breaking capacity.

    Returns
    -------
    list
        Lists of :class:`Candidate` (MCB, gG, aM: one per rating; thermal-magnetic: Ii
        ascending)
        or :class:`SettingsGrid` (electronic).

    References
    ----------
    IEC 60898-1 (MCB ratings), IEC 60269-1 (gG and aM ratings), IEC 60947-2 (breakers); the
    setting grids of ``curves.breaker`` (common practice).

    Examples
    --------
    >>> from curves.spec import band_from_spec
    >>> groups = candidate_groups("gG", band_from_spec("gG100"), 10000.0)
    >>> print(len(groups), groups[0][0].spec, groups[-1][0].rating_a)
    26 gG2 1250.0
    """
    kind = families.BY_GROUP[family].name
    if kind == "mcb":
        return [[c] for c in _mcb_series(family, current, fault_a)]
    if kind in ("gG", "aM"):
        return [[c] for c in _fuse_series(kind, current)]
    return _breaker_groups(family, current, fault_a)
