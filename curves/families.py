"""The device families, in one registry: what a study's ``family`` key may name, the keys each
family takes, how its band is built, its rating series and the groups the chooser searches.

Adding a family means one :class:`Family` entry in :data:`REGISTRY` and its curves module (and,
for the chooser to search it, its series in ``coordination.choose.candidates``).

References
----------
IEC 60898-1 (MCB types B, C, D and ratings), IEC 60269-1 and -2 (gG and aM fuse-links),
IEC 60947-2 (circuit-breakers: thermal-magnetic and electronic releases); datasheet points: the
user's.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

from curves.band import Band
from curves.errors import InputError
from curves.validate import in_series, positive_number


@dataclass(frozen=True)
class ChooserGroup:
    """A set of candidates the chooser searches as one (``--family`` takes the code)."""

    code: str  # "B", "gG", "tm" ...
    noun: str  # what a candidate is called: "type B MCB"
    words: str  # with its article, in a remedy: "a type B MCB"


@dataclass(frozen=True)
class Family:
    """One device family.

    Parameters
    ----------
    name : str
        The ``family`` value of an inline table (``"mcb"``).
    band_family : str
        ``Band.family`` of the bands it builds (``"breaker-tm"``).
    aliases : tuple of str
        Other names accepted for ``family`` (compared in lower case).
    keys : tuple of str
        The keys an inline table takes besides ``family``.
    required : tuple of str
        Keys that must be given.
    not_numbers : frozenset of str
        Keys whose values are not plain positive numbers (checked by the builder).
    build : callable
        ``build(table, basis) -> Band``.
    ratings_at : str
        ``"module:NAME"`` of the rating series [A] (empty: none).
    groups : tuple of ChooserGroup
        What the chooser searches in this family (none: not searchable).
    defaults : mapping
        Values the shorthand and the chooser assume when a key is not given.
    standard : bool
        Built from a standard (basis ``typical`` or ``envelope``); else from datasheet points.
    adjustable : bool
        An adjustable breaker: a coordination time interval applies over it (common practice).
    """

    name: str
    band_family: str
    aliases: tuple[str, ...]
    keys: tuple[str, ...]
    required: tuple[str, ...]
    not_numbers: frozenset[str]
    build: Callable[[Mapping[str, Any], str], Band]
    ratings_at: str = ""
    groups: tuple[ChooserGroup, ...] = ()
    defaults: Mapping[str, Any] = field(default_factory=lambda: MappingProxyType({}))
    standard: bool = True
    adjustable: bool = False

    def ratings(self) -> tuple[float, ...]:
        """The family's rating series [A] (imported on first use)."""
        if not self.ratings_at:
            return ()
        module, name = self.ratings_at.split(":")
        return tuple(float(r) for r in getattr(importlib.import_module(module), name))

    def group_of(self, band: Band) -> str | None:
        """The chooser group of one of this family's bands (an MCB's by its type)."""
        if not self.groups:
            return None
        if len(self.groups) == 1:
            return self.groups[0].code
        code = str(band.settings.get("type", "")).upper()
        return code if any(g.code == code for g in self.groups) else None


# ---------------------------------------------------------------------------------------------
# builders: a checked inline table (or the shorthand's values) to a band
#: Icn of an MCB when none is given [A] (6 kA, a common IEC 60898-1 rated value; from memory).
MCB_DEFAULT_ICN_A = 6000.0


def mcb(curve_type: Any, rating: Any, basis: str, energy_class: Any = None,
        icn_a: Any = MCB_DEFAULT_ICN_A, let_through_a2s: Any = None) -> Band:
    """An IEC 60898-1 MCB's band from checked values (see ``curves.mcb.mcb_band``)."""
    from curves.mcb import MCB_RATINGS_A, mcb_band

    if not isinstance(curve_type, str) or curve_type.strip().upper() not in ("B", "C", "D"):
        raise InputError(f"MCB type must be \"B\", \"C\" or \"D\", not {curve_type!r}",
                         key="type")
    rating_a = in_series(positive_number("In_a", rating), MCB_RATINGS_A, key="In_a",
                         what="rating", standard="MCB")
    if energy_class is not None and (isinstance(energy_class, bool)
                                     or energy_class not in (1, 2, 3)):
        raise InputError(f"energy_class must be 1, 2 or 3, not {energy_class!r}",
                         key="energy_class")
    return mcb_band(curve_type.strip().upper(), rating_a, basis=basis,
                    energy_class=None if energy_class is None else int(energy_class),
                    icn_a=positive_number("icn_a", icn_a), let_through_a2s=let_through_a2s)


def gg(rating: Any, basis: str, breaking_capacity_a: Any = None) -> Band:
    """An IEC 60269 gG fuse-link's band from checked values (see ``curves.fuse.gg_band``)."""
    from curves.fuse import GG_RATINGS_A, gg_band

    rating_a = in_series(positive_number("In_a", rating), GG_RATINGS_A, key="In_a",
                         what="rating", standard="gG fuse-link")
    cap = None if breaking_capacity_a is None else positive_number("breaking_capacity_a",
                                                                   breaking_capacity_a)
    return gg_band(rating_a, basis=basis, breaking_capacity_a=cap)


def am(rating: Any, basis: str, breaking_capacity_a: Any = None) -> Band:
    """An IEC 60269-2 aM fuse-link's band from checked values (see ``curves.fuse_am.am_band``).

    Short-circuit protection only: a circuit with an aM fuse-link needs an overload device (a
    motor's overload relay, IEC 60947-4-1).
    """
    from curves.fuse_am import AM_RATINGS_A, am_band

    rating_a = in_series(positive_number("In_a", rating), AM_RATINGS_A, key="In_a",
                         what="rating", standard="aM fuse-link")
    cap = None if breaking_capacity_a is None else positive_number("breaking_capacity_a",
                                                                   breaking_capacity_a)
    return am_band(rating_a, basis=basis, breaking_capacity_a=cap)


def _mcb_table(t: Mapping[str, Any], basis: str) -> Band:
    return mcb(t["type"], t["In_a"], basis, t.get("energy_class"),
               t.get("icn_a", MCB_DEFAULT_ICN_A), t.get("let_through_a2s"))


def _gg_table(t: Mapping[str, Any], basis: str) -> Band:
    return gg(t["In_a"], basis, t.get("breaking_capacity_a"))


def _am_table(t: Mapping[str, Any], basis: str) -> Band:
    return am(t["In_a"], basis, t.get("breaking_capacity_a"))


def _tm_table(t: Mapping[str, Any], basis: str) -> Band:
    from curves.breaker import thermal_magnetic_band

    return thermal_magnetic_band(basis=basis, **t)


def _electronic_table(t: Mapping[str, Any], basis: str) -> Band:
    from curves.breaker import electronic_band

    return electronic_band(basis=basis, **t)


def _datasheet_table(t: Mapping[str, Any], basis: str) -> Band:
    from curves.tabulated import datasheet_band

    return datasheet_band(**t)


def _mcb_groups() -> tuple[ChooserGroup, ...]:
    return tuple(ChooserGroup(t, f"type {t} MCB", f"a type {t} MCB") for t in ("B", "C", "D"))


#: Every family, in the order they are listed to the user.
REGISTRY: tuple[Family, ...] = (
    Family("mcb", "mcb", (), ("type", "In_a", "energy_class", "icn_a", "let_through_a2s"),
           ("type", "In_a"), frozenset({"type", "let_through_a2s"}), _mcb_table,
           "curves.mcb:MCB_RATINGS_A", _mcb_groups(),
           MappingProxyType({"icn_a": MCB_DEFAULT_ICN_A, "energy_class": 3})),
    Family("gG", "gG", (), ("In_a", "breaking_capacity_a"), ("In_a",), frozenset(), _gg_table,
           "curves.fuse:GG_RATINGS_A", (ChooserGroup("gG", "gG fuse-link", "a gG fuse-link"),)),
    Family("aM", "aM", (), ("In_a", "breaking_capacity_a"), ("In_a",), frozenset(), _am_table,
           "curves.fuse_am:AM_RATINGS_A",
           (ChooserGroup("aM", "aM fuse-link (with the motor's overload relay)",
                         "an aM fuse-link with the motor's overload relay"),)),
    Family("tm", "breaker-tm", ("breaker-tm",),
           ("In_a", "Ir_a", "Ir_x", "Ii_a", "Ii_x", "icu_a", "ics_a"), ("In_a",),
           frozenset({"Ii_x"}),
           _tm_table, "curves.breaker:BREAKER_RATINGS_A",
           (ChooserGroup("tm", "thermal-magnetic breaker", "a thermal-magnetic breaker"),),
           adjustable=True),
    Family("electronic", "breaker-electronic", ("breaker-electronic",),
           ("In_a", "Ir_a", "Ir_x", "tr_s", "Isd_a", "Isd_x", "tsd_s", "sd_i2t", "Ii_a", "Ii_x",
            "icu_a", "ics_a"), ("In_a",), frozenset({"sd_i2t", "Ii_x"}), _electronic_table,
           "curves.breaker:BREAKER_RATINGS_A",
           (ChooserGroup("electronic", "electronic breaker",
                         "an electronic breaker with a short-time delay"),), adjustable=True),
    Family("datasheet", "datasheet", (),
           ("name", "In_a", "lower", "upper", "let_through", "instantaneous_a",
            "breaking_capacity_a", "pre_arcing_i2t_min_a2s"), ("In_a", "lower", "upper"),
           frozenset({"name", "lower", "upper", "let_through"}), _datasheet_table,
           standard=False),
)

#: Family by its name.
BY_NAME: Mapping[str, Family] = MappingProxyType({f.name: f for f in REGISTRY})
#: Family by any name it is known by, in lower case.
BY_ALIAS: Mapping[str, Family] = MappingProxyType(
    {alias.lower(): f for f in REGISTRY for alias in (f.name, *f.aliases)})
#: Family by the band family of what it builds.
BY_BAND_FAMILY: Mapping[str, Family] = MappingProxyType({f.band_family: f for f in REGISTRY})
#: Family by chooser group code.
BY_GROUP: Mapping[str, Family] = MappingProxyType(
    {g.code: f for f in REGISTRY for g in f.groups})
#: Every chooser group, in order.
GROUPS: tuple[ChooserGroup, ...] = tuple(g for f in REGISTRY for g in f.groups)


def group_of(band: Band) -> str | None:
    """The chooser group a band belongs to (``"C"``, ``"gG"``, ``"tm"``...), or None.

    Examples
    --------
    >>> from curves.fuse import gg_band
    >>> print(group_of(gg_band(100.0)))
    gG
    """
    family = BY_BAND_FAMILY.get(band.family)
    return None if family is None else family.group_of(band)
