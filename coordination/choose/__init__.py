"""The chooser: the smallest rating, or the lowest settings, that meet every requirement.

A designer does not only check a design: they must pick the upstream device (the sub-main fuse
that will not operate before any final-circuit breaker on its board) and the settings of
adjustable breakers. :func:`choose` searches one circuit's device family in "lowness" order
(rated current first; for adjustable breakers then Ir, Isd, tsd, tr, Ii on the unit's own setting
grid) and returns the first candidate that meets every requirement at once:

* carries the load and protects its cable (IEC 60364-4-43 clause 433.1): Ib <= In <= Iz and
  I2 <= 1.45 Iz, where In is the current setting Ir for an adjustable device;
* breaks the largest fault where it sits (breaking capacity);
* disconnects earth faults in time and limits the fault energy in its cable (the checks of
  :mod:`coordination.checks`, on the envelope basis);
* is selective as required with every device below it, up to each one's board fault level, and
  with every device above it (the overlap engine, :func:`coordination.engine.compare`).

Cheap requirements (Ib, Iz, I2, breaking capacity) rule out whole groups of candidates first.
Selectivity is then screened vectorised on one current grid: the need of the devices below
(the largest of their upper edges times their margins, plus the interval over an adjustable
breaker) is computed once, and the edges of a whole grid of candidate settings are compared with
it and with the lower edges of the devices above, as arrays (:func:`screen_grid`: about a
million electronic settings in a fraction of a second). Survivors are confirmed in lowness order
by the same engine and checks that ``coordination check`` runs, so the answer is what the check
would say.

When nothing fits, each remedy is checked before it is offered, by searching again with it
assumed: a larger cable (Iz relaxed to what the smallest otherwise passing candidate needs, then
confirmed with that Iz), a tested limit (only for pairs whose bands meet where the device below
operates within 0.1 s, the region a makers' test decides), a partial requirement, a downstream
MCB with a lower let-through (never where the limit is the candidate's own instantaneous
release), another family, a larger device above, a higher breaking capacity, earth faults or
fault energy dealt with by other means. A remedy is offered only with the device that then meets
every requirement; otherwise the choice says that it alone would not be enough and what stays
binding (:attr:`Choice.insufficient`).

References
----------
IEC 60364-4-43:2008, 433.1 (Ib <= In <= Iz, I2 <= 1.45 Iz); IEC 60364-4-41:2005, 411.3.2 and
Table 41.1 (disconnection times); IEC 60364-5-53:2019, 536.4 (selectivity); IEC 60947-2:2016,
Annex A (selectivity limit current); EN 60898-1 Annex ZA and IEC 60269-2 (let-through and
pre-arcing I2t).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

import numpy as np

from coordination.devices import device_band
from coordination.criterion import ADJUSTABLE_FAMILIES, EQUAL_RTOL
from coordination.model import SUPPLY_ID, Study
from curves.band import ENERGY_REGION_S, TIME_CEILING_S, TIME_FLOOR_S, Band, sorted_unique
from curves.errors import InputError
from curves.mcb import DEFAULT_ICN_A

#: Families the chooser can search, as given to ``--family``: MCB types, gG fuse-links,
#: thermal-magnetic and electronic breakers.
FAMILIES = ("B", "C", "D", "gG", "tm", "electronic")

#: Rated short-circuit capacities Icn of MCBs [A] (IEC 60898-1 preferred values; from memory).
#: Used only to raise a candidate MCB's Icn to the board's fault level.
MCB_ICN_SERIES_A = (1500.0, 3000.0, 4500.0, 6000.0, 10000.0, 15000.0, 20000.0, 25000.0)

#: Ultimate breaking capacities Icu offered for breakers [A] (common practice). A chosen breaker
#: states the smallest that reaches the fault where the study gives none.
BREAKER_ICU_SERIES_A = (10000.0, 16000.0, 25000.0, 36000.0, 50000.0, 70000.0, 100000.0,
                        150000.0)

#: Default Icn of an MCB written in shorthand ("B32") [A] (the curves.mcb default).
MCB_DEFAULT_ICN_A = float(DEFAULT_ICN_A)
#: Default energy-limiting class of an MCB written in shorthand.
MCB_DEFAULT_CLASS = 3

#: Band families that are adjustable breakers (a coordination interval applies over them).
ADJUSTABLE = tuple(sorted(ADJUSTABLE_FAMILIES))

#: Points on the common current grid of the vectorised selectivity screen.
GRID_POINTS = 480

#: Relative offset of the grid point just below each required current (the screen tests
#: strictly below a requirement, see :func:`_short_of`).
SCREEN_EDGE = 1e-6

#: Groups up to this size are decided candidate by candidate (no screen).
SMALL_GROUP = 4
#: Exact failures kept per settings group for the explanation.
MAX_RECORDED = 20
#: Screened settings of one grid confirmed exactly at most (the screen uses the same model,
#: so the first one nearly always passes).
MAX_CONFIRM = 200

#: Runs of like failures named in the explanation when nothing fits.
MAX_SEGMENTS = 4

#: Where the downstream device operates within this time at the limit current [s], the bands
#: bound it only as "within 0.1 s" (IEC 60898-1 instantaneous region, the short-circuit
#: regions of IEC 60947-2), and a tested limit from the makers (IEC 60947-2 Annex A) can show
#: more; a crossing at longer times is one of time-current curves, which a test does not move.
TESTABLE_S = 0.1

#: Screened settings of one grid confirmed exactly at most in a remedy's search (a remedy names
#: a device that then meets every requirement; it need not be the very smallest).
REMEDY_CONFIRM = 12

#: The order in which requirements are tried; the first one a candidate fails is its reason.
STAGES = ("load", "overload", "breaking-capacity", "disconnection", "fault-energy",
          "selectivity-below", "selectivity-above")


# ---------------------------------------------------------------------------------------------
# results
@dataclass(frozen=True)
class Choice:
    """The chooser's answer for one circuit.

    Parameters
    ----------
    circuit : str
        Circuit id.
    found : bool
        A candidate met every requirement.
    device : str or mapping or None
        The chosen device as a study-file ``device`` value (shorthand such as ``"gG125"`` or an
        inline table for breakers); round-trips through ``curves.spec.band_from_spec``.
    rating_a : float or None
        Rated current In of the chosen device [A].
    settings : mapping
        The chosen device's settings (``Band.settings``; units in the keys).
    binding : str or None
        The requirement that ruled out the next smaller candidate (``None`` when the smallest
        candidate of the family fits, or nothing fits).
    reason : str
        One or two sentences: why this device, or why nothing fits.
    family : str
        The family searched (one of :data:`FAMILIES`).
    name : str or None
        The chosen band's name (``"gG125"``).
    suggestions : tuple of str
        When nothing fits: what would help, each on its own (a larger cable, a downstream
        device with a lower let-through, a tested limit, a partial requirement, another
        family...). Each was checked by searching again with it assumed, and names the device
        that then meets every requirement.
    searched : int
        Candidates looked at (screened or confirmed).
    previous : str
        The circuit's device before the choice, as written in the study.
    setting_bindings : mapping
        Adjustable breakers: for each setting, what rules out its next lower value on the unit's
        grid with the other settings as chosen (key: the setting's key, e.g. ``"tsd_s"``).
    insufficient : tuple of str
        When nothing fits: remedies that were tried and would not be enough on their own, each
        with what stays binding.
    """

    circuit: str
    found: bool
    device: str | Mapping[str, Any] | None
    rating_a: float | None
    settings: Mapping[str, Any]
    binding: str | None
    reason: str
    family: str
    name: str | None = None
    suggestions: tuple[str, ...] = ()
    searched: int = 0
    previous: str = ""
    setting_bindings: Mapping[str, str] = field(default_factory=dict)
    insufficient: tuple[str, ...] = ()

    def to_json(self) -> dict[str, Any]:
        """The contract's keys: circuit, device, rating_a, settings, binding, reason, found."""
        device = self.device if isinstance(self.device, str) or self.device is None \
            else dict(self.device)
        return {
            "circuit": self.circuit,
            "found": self.found,
            "device": device,
            "name": self.name,
            "family": self.family,
            "rating_a": self.rating_a,
            "settings": dict(self.settings),
            "binding": self.binding,
            "reason": self.reason,
            "suggestions": list(self.suggestions),
            "not_enough": list(self.insufficient),
            "candidates_searched": self.searched,
            "previous_device": self.previous,
            "setting_bindings": dict(self.setting_bindings),
        }


@dataclass(frozen=True)
class Failure:
    """Why one candidate is ruled out: the stage (see :data:`STAGES`) and a sentence."""

    stage: str
    text: str
    other: str | None = None  # the other circuit of a selectivity pair
    device: str = ""  # the candidate's name
    need_a: float | None = None  # for cable stages: the Iz that would do [A]
    limit_a: float | None = None  # for selectivity stages: the limit reached (None: none) [A]
    required_a: float | None = None  # for selectivity stages: the current required [A]
    instantaneous: bool = False  # selectivity limited by the upstream instantaneous release


@dataclass(frozen=True)
class Candidate:
    """One point of the search: a device spec in lowness order."""

    spec: str | Mapping[str, Any]
    rating_a: float  # rated current In (frame) [A]
    setting_a: float  # the current that carries the load: Ir for breakers, else In [A]
    order: tuple[float, ...]


# ---------------------------------------------------------------------------------------------
# specs
def _mcb_spec(curve: str, rating: float, energy_class: int, icn_a: float) -> str | dict:
    from curves.mcb import class_applies

    if not class_applies(curve, rating, energy_class):
        energy_class = MCB_DEFAULT_CLASS  # EN 60898-1 Annex ZA has none here: the shorthand's
    if energy_class == MCB_DEFAULT_CLASS and icn_a == MCB_DEFAULT_ICN_A:
        return f"{curve}{rating:g}"
    if energy_class == MCB_DEFAULT_CLASS and (icn_a / 1000).is_integer():
        return f"{curve}{rating:g} {icn_a / 1000:g}kA"
    return {"family": "mcb", "type": curve, "In_a": _num(rating),
            "energy_class": int(energy_class), "icn_a": _num(icn_a)}


def _gg_spec(rating: float, breaking_capacity_a: float | None) -> str | dict:
    if breaking_capacity_a is None:
        return f"gG{rating:g}"
    if (breaking_capacity_a / 1000).is_integer():
        return f"gG{rating:g}/{breaking_capacity_a / 1000:g}kA"
    return {"family": "gG", "In_a": _num(rating), "breaking_capacity_a": _num(breaking_capacity_a)}


def _num(x: float) -> float | int:
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


# ---------------------------------------------------------------------------------------------
# the family and its candidates
def family_of(band: Band) -> str | None:
    """The chooser family of a band (``"B"``, ``"gG"``, ``"tm"`` ...), or None for datasheets.

    Examples
    --------
    >>> from curves.spec import band_from_spec
    >>> print(family_of(band_from_spec("C16")), family_of(band_from_spec("gG100")))
    C gG
    """
    if band.family == "mcb":
        return str(band.settings.get("type", "")).upper() or None
    if band.family == "gG":
        return "gG"
    if band.family == "breaker-tm":
        return "tm"
    if band.family == "breaker-electronic":
        return "electronic"
    return None


def _normalise_family(family: str) -> str:
    for f in FAMILIES:
        if family.strip().lower() == f.lower():
            return f
    raise InputError(f"unknown family {family!r}; allowed: {', '.join(FAMILIES)}",
                     key="--family")


def _mcb_series(curve: str, current: Band, ik_board_a: float) -> list[Candidate]:
    from curves.mcb import MCB_RATINGS_A

    same = current.family == "mcb"
    energy_class = int(current.settings.get("energy_class", MCB_DEFAULT_CLASS)) if same \
        else MCB_DEFAULT_CLASS
    icn = float(current.settings.get("icn_a", MCB_DEFAULT_ICN_A)) if same else MCB_DEFAULT_ICN_A
    if icn < ik_board_a:  # raise Icn to the fault level where a standard value reaches it
        icn = next((x for x in MCB_ICN_SERIES_A if x >= ik_board_a), icn)
    return [Candidate(_mcb_spec(curve, r, energy_class, icn), float(r), float(r), (float(r),))
            for r in MCB_RATINGS_A]


def _gg_series(current: Band) -> list[Candidate]:
    from curves.fuse import GG_RATINGS_A, gg_band

    given = None  # a breaking capacity the study states for its fuse-link is kept
    if current.family == "gG" and current.breaking_capacity_a is not None:
        default = gg_band(current.rating_a).breaking_capacity_a
        if default is None or not math.isclose(current.breaking_capacity_a, default):
            given = float(current.breaking_capacity_a)
    return [Candidate(_gg_spec(r, given), float(r), float(r), (float(r),)) for r in GG_RATINGS_A]


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
        spec = {"family": "electronic", "In_a": _num(self.rating_a), "Ir_x": _num(self.ir_x),
                "tr_s": _num(self.tr_s[c]), "Isd_x": _num(self.isd_x[a]),
                "tsd_s": _num(self.tsd_s[b]), "Ii_x": "off" if math.isnan(ii) else _num(ii),
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


def _combine(parts: tuple[np.ndarray, np.ndarray, np.ndarray]) -> np.ndarray:
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
    return _combine(lower), _combine(upper)


def _breaker_groups(family: str, current: Band, fault_a: float) -> list[Any]:
    """Adjustable breakers: one group per (In, Ir) in lowness order. Thermal-magnetic groups
    are lists of candidates (Ii ascending); electronic groups are :class:`SettingsGrid`."""
    from curves import breaker

    same = current.family == ("breaker-tm" if family == "tm" else "breaker-electronic")
    given = current.settings.get("icu_a") if same else None
    extra: dict[str, Any] = {}
    if fault_a > 0 or given is not None:  # 0: the study gives the circuit's breaking capacity
        icu = _capacity(BREAKER_ICU_SERIES_A, float(given) if given is not None else None,
                        fault_a)
        extra["icu_a"] = _num(icu)
    groups: list[Any] = []
    if family == "tm":
        for rating in breaker.BREAKER_RATINGS_A:
            for fr in sorted(breaker.TM_IR_FRACTIONS):
                ir = float(rating) * float(fr)
                groups.append([Candidate({"family": "tm", "In_a": _num(rating), "Ir_x": _num(fr),
                                          "Ii_x": _num(x), **extra},
                                         float(rating), ir, (float(rating), ir, float(x)))
                               for x in sorted(breaker.II_X)])
        return groups
    ii = np.array([*sorted(float(x) for x in breaker.ELECTRONIC_II_X), np.nan])
    for rating in breaker.BREAKER_RATINGS_A:
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
        Lists of :class:`Candidate` (MCB, gG: one per rating; thermal-magnetic: Ii ascending)
        or :class:`SettingsGrid` (electronic).

    References
    ----------
    IEC 60898-1 (MCB ratings), IEC 60269-1 (gG ratings), IEC 60947-2 (breakers); the setting
    grids of ``curves.breaker`` (common practice).

    Examples
    --------
    >>> from curves.spec import band_from_spec
    >>> groups = candidate_groups("gG", band_from_spec("gG100"), 10000.0)
    >>> print(len(groups), groups[0][0].spec, groups[-1][0].rating_a)
    26 gG2 1250.0
    """
    if family in ("B", "C", "D"):
        return [[c] for c in _mcb_series(family, current, fault_a)]
    if family == "gG":
        return [[c] for c in _gg_series(current)]
    return _breaker_groups(family, current, fault_a)


# ---------------------------------------------------------------------------------------------
# the problem of one circuit
@dataclass(frozen=True)
class _Pair:
    """One selectivity requirement between the circuit and another device."""

    other: str  # the other circuit id
    band: Band  # the other device's band (selectivity basis)
    window_a: tuple[float, float]  # for pairs below: the other device's window; above: hi only
    required_a: float  # selective up to this current [A]
    margin: float
    interval_s: float
    tested_limit_a: float | None
    twins: tuple[str, ...] = ()  # other circuits below with exactly the same pair


@dataclass
class _Problem:
    study: Study
    levels: Any
    circuit_id: str
    family: str
    basis: str
    ib_a: float | None
    iz_a: float | None
    ik_board_a: float
    ik_break_a: float  # the fault the device must break (as coordination.checks takes it) [A]
    below: list[_Pair]
    above: list[_Pair]
    grid: np.ndarray
    need: np.ndarray  # (2, n_grid): the devices below need t_min_U >= this (non-adj, adjustable)
    above_tmin: np.ndarray  # (n_above, n_grid): the devices above, lower edges clamped
    above_adjustable: np.ndarray  # (n_above,) bool
    below_names: dict[str, str] = field(default_factory=dict)
    searched: int = 0
    skip_above: frozenset[str] = frozenset()
    relaxed: frozenset[str] = frozenset()  # requirements set aside to test a remedy (STAGES)
    # fault-energy cases a candidate failed: (current [A], largest I2t the conductor takes
    # [A2s]); they belong to the circuit, so the screen applies them to every later setting
    energy_limits: list[tuple[float, float]] = field(default_factory=list)
    explain_budget: int = 1 << 30  # settings grids whose failure is explained when none passes
    testable_below: bool = False  # pairs below that only a test could decide count as met
    testable_above: bool = False  # pairs above that only a test could decide count as met
    max_confirm: int = MAX_CONFIRM  # screened settings of one grid confirmed exactly at most
    # the need of the devices below only where a tested limit could not help (see TESTABLE_S)
    need_untestable: np.ndarray | None = None


def _pair_settings(study: Study, downstream_id: str) -> tuple[float, float, float | None]:
    c = study.by_id[downstream_id]
    margin = c.margin if c.margin is not None else study.margin
    interval = c.interval_s if c.interval_s is not None else study.interval_s
    return float(margin), float(interval), c.selective_to_a




def _short_of(current_a: np.ndarray, required_a: float) -> np.ndarray:
    """The currents the screen tests a requirement at: strictly below ``required_a`` by more
    than the engine's tolerance [A].

    The engine meets a requirement with a limit equal to it (``limit >= required (1 -
    EQUAL_RTOL)``), and a limit set by an instantaneous pickup equals that pickup; so a
    requirement equal to an upstream pickup is met although the upstream withstands nothing at
    the required current itself. Testing the required current would refuse such a device; the
    screen only tests where a failure makes the engine's limit short of the requirement.
    """
    return np.asarray(current_a) < required_a * (1 - EQUAL_RTOL)


def _clamped_lower(band: Band, grid: np.ndarray) -> np.ndarray:
    """Lower edge on the grid, with no withstand above an instantaneous release."""
    t = np.asarray(band.t_min(grid), dtype=float)
    if band.instantaneous_a is not None:
        t = np.where(grid >= band.instantaneous_a, TIME_FLOOR_S, t)
    return np.minimum(t, TIME_CEILING_S)


def _need_of(t_max: np.ndarray, margin: float, interval_s: float, adjustable: bool) -> np.ndarray:
    """What the device above must stay at or above [s], given a device's upper edge."""
    need = t_max * margin
    if adjustable and interval_s > 0:
        need = np.where(need >= ENERGY_REGION_S, need + interval_s, need)
    return np.minimum(need, TIME_CEILING_S)


def _problem(study: Study, levels: Any, circuit_id: str, family: str | None,
             skip_above: frozenset[str] = frozenset()) -> tuple[_Problem, Band]:
    if circuit_id not in study.by_id:
        raise InputError(f"no circuit {circuit_id!r} in the study; circuits: "
                         f"{', '.join(list(study.by_id)[:12])}", key="--circuit")
    from coordination.devices import band_for

    circuit = study.by_id[circuit_id]
    basis = study.basis_of(circuit_id)
    current = band_for(study, circuit_id, basis)
    if family is None:
        fam = family_of(current)
        if fam is None:
            raise InputError(f"the device {current.name!r} is given as datasheet points, so it "
                             f"has no series to search; give --family (allowed: "
                             f"{', '.join(FAMILIES)})", circuit=circuit_id, key="--family")
    else:
        fam = _normalise_family(family)
    nodes = levels.by_circuit
    node = nodes[circuit_id]
    ik_board = float(node.ik_max_a)
    ik1 = getattr(node, "ik1_max_a", None)
    if circuit.phases == 3:
        ik_break = max(float(x) for x in (getattr(node, "ik3_max_a", None), ik1, ik_board)
                       if x is not None)
    else:
        ik_break = float(ik1) if ik1 is not None else ik_board
    iz = circuit.cable.iz_a if circuit.cable is not None else None

    below: list[_Pair] = []
    seen: dict[tuple, int] = {}
    for d in study.descendants(circuit_id):
        band = band_for(study, d)
        margin, interval, selective_to = _pair_settings(study, d)
        hi = float(nodes[d].ik_max_a)
        window = (float(band.pickup_min_a), hi)
        required = min(hi, float(selective_to)) if selective_to is not None else hi
        tested = study.by_id[d].tested_limits_a.get(circuit_id)
        key = (band.key, window, required, margin, interval, tested)
        if key in seen:
            first = below[seen[key]]
            below[seen[key]] = dataclasses.replace(first, twins=(*first.twins, d))
            continue
        seen[key] = len(below)
        below.append(_Pair(d, band, window, required, margin, interval,
                           float(tested) if tested is not None else None))

    above: list[_Pair] = []
    margin_c, interval_c, selective_to_c = _pair_settings(study, circuit_id)
    required_c = min(ik_board, float(selective_to_c)) if selective_to_c is not None else ik_board
    for a in study.ancestors(circuit_id):
        if a in skip_above:  # to be chosen afterwards, seeing this choice
            continue
        tested = circuit.tested_limits_a.get(a)
        above.append(_Pair(a, band_for(study, a), (0.0, ik_board), required_c, margin_c,
                           interval_c, float(tested) if tested is not None else None))

    lows = [p.window_a[0] for p in below] + [max(1.0, (circuit.load_a or 1.0))]
    highs = [p.window_a[1] for p in below] + [ik_board, 10.0]
    grid = np.geomspace(max(min(lows) * 0.9, 0.5), max(highs), GRID_POINTS)
    tops = np.asarray([p.required_a for p in below] + [required_c], dtype=float)
    extra = np.concatenate([[p.window_a[0] for p in below], tops, tops * (1 - SCREEN_EDGE)])
    grid = sorted_unique(np.concatenate([grid, extra]))

    need = np.full((2, grid.size), -np.inf)
    need_untestable = need.copy()
    for p in below:
        inside = (grid >= p.window_a[0]) & _short_of(grid, p.required_a)
        # a tested limit applies to the present device only (exact_failure); every other
        # candidate is judged by the curves, so the screen is too, and the present device is
        # let through the screen on its own (_present_in)
        t_max = np.asarray(p.band.t_max(grid), dtype=float)
        # where the device below may take longer than TESTABLE_S a crossing is one of
        # time-current curves (upper edges fall with the current, so a crossing at or below
        # such a current is too), which no tested limit moves
        untestable = inside & (t_max > TESTABLE_S * (1 + 1e-9))
        for row, adjustable in enumerate((False, True)):
            n = _need_of(t_max, p.margin, p.interval_s, adjustable)
            need[row] = np.where(inside, np.maximum(need[row], n), need[row])
            need_untestable[row] = np.where(untestable, np.maximum(need_untestable[row], n),
                                            need_untestable[row])
    above_tmin = np.array([_clamped_lower(p.band, grid) for p in above]).reshape(len(above),
                                                                                grid.size)
    above_adj = np.array([p.band.family in ADJUSTABLE for p in above], dtype=bool)
    problem = _Problem(study, levels, circuit_id, fam, basis,
                       float(circuit.load_a) if circuit.load_a is not None else None,
                       float(iz) if iz is not None else None, ik_board, ik_break, below,
                       above, grid, need, above_tmin, above_adj,
                       below_names={p.other: p.band.name for p in below},
                       skip_above=skip_above, need_untestable=need_untestable)
    return problem, current


# ---------------------------------------------------------------------------------------------
# cheap requirements (masks) and the vectorised selectivity screen
def _cheap_failure(problem: _Problem, cand: Candidate, band: Band) -> Failure | None:
    """Load, cable overload and breaking capacity for one candidate (no engine needed)."""
    ib, iz = problem.ib_a, problem.iz_a
    setting = cand.setting_a
    if ib is not None and setting < ib * (1 - 1e-9):
        adjustable = isinstance(cand.spec, Mapping) and cand.spec.get("family") in (
            "tm", "electronic")
        return Failure("load", f"load: Ib {ib:g} A > {'Ir' if adjustable else 'In'} "
                               f"{setting:g} A")
    if iz is not None and "overload" not in problem.relaxed:
        # I2 of the worst compliant device, as coordination.checks takes it
        i2 = float(device_band(cand.spec, "envelope").pickup_max_a)
        if setting > iz * (1 + 1e-9):
            return Failure("overload", f"cable: In {setting:g} A > Iz {iz:g} A (Ib <= In <= Iz)",
                           need_a=setting)
        if i2 > 1.45 * iz * (1 + 1e-9):
            return Failure("overload", f"cable: I2 {i2:.4g} A > 1.45 Iz {1.45 * iz:.4g} A",
                           need_a=i2 / 1.45)
    circuit = problem.study.by_id[problem.circuit_id]
    capacity = circuit.breaking_capacity_a or band.breaking_capacity_a
    if capacity is not None and capacity < problem.ik_break_a * (1 - 1e-9) \
            and "breaking-capacity" not in problem.relaxed:
        return Failure("breaking-capacity",
                       f"breaking capacity {capacity / 1000:.3g} kA < "
                       f"{problem.ik_break_a / 1000:.3g} kA at the board")
    return None


def _distinct_above(problem: _Problem) -> list[int]:
    """Indices of the pairs above that the screens must test: the first of each set of alike
    pairs (one band, requirement, margin, interval, adjustability). The screens judge tested
    pairs by their curves, so alike ancestors give the same answer; a chain of n alike devices
    is one test, not n (screening every ancestor cost choose on a 200-deep chain over a
    minute)."""
    seen: set[tuple] = set()
    keep = []
    for k, p in enumerate(problem.above):
        key = (p.band.key, p.required_a, p.margin, p.interval_s,
               bool(problem.above_adjustable[k]))
        if key not in seen:
            seen.add(key)
            keep.append(k)
    return keep


def screen(problem: _Problem, bands: Sequence[Band]) -> np.ndarray:
    """Vectorised selectivity screen of many candidate bands at once.

    Evaluates every candidate's lower edge on the common current grid as a 2-D array and
    compares it with what the devices below need (precomputed once), and every candidate's
    upper edge with the lower edges of the devices above. Lenient by construction (it samples a
    grid); survivors are confirmed exactly by the engine.

    Returns
    -------
    numpy.ndarray of int
        Per candidate: 0 passes, 1 fails selectivity below, 2 fails selectivity above.
    """
    grid = problem.grid
    n = len(bands)
    out = np.zeros(n, dtype=np.int8)
    if n == 0:
        return out
    if problem.below:
        t_min = np.array([np.asarray(b.t_min(grid), dtype=float) for b in bands])
        inst = np.array([b.instantaneous_a if b.instantaneous_a is not None else np.inf
                         for b in bands])
        t_min = np.where(grid[None, :] >= inst[:, None], TIME_FLOOR_S, t_min)
        t_min = np.minimum(t_min, TIME_CEILING_S)
        adjustable = np.array([b.family in ADJUSTABLE for b in bands])
        need = problem.need[adjustable.astype(int)]  # (n, n_grid)
        ok = np.all(t_min >= need * (1 - 1e-6), axis=1)
        out[~ok] = 1
    if problem.above:
        t_max = np.array([np.asarray(b.t_max(grid), dtype=float) for b in bands])
        lo = np.array([b.pickup_min_a for b in bands])
        p0 = problem.above[0]
        inside = (grid[None, :] >= lo[:, None]) & _short_of(grid, p0.required_a)[None, :]
        for k in _distinct_above(problem):  # tested pairs by their curves, as above
            p = problem.above[k]
            need = _need_of(t_max, p.margin, p.interval_s, bool(problem.above_adjustable[k]))
            bad = inside & (problem.above_tmin[k][None, :] < need * (1 - 1e-6))
            if problem.testable_above:  # a remedy's search: only where a test cannot decide
                bad &= t_max > TESTABLE_S * (1 + 1e-9)
            fail = np.any(bad, axis=1) & (out == 0)
            out[fail] = 2
    return out


# ---------------------------------------------------------------------------------------------
# exact confirmation: the same engine and checks as `coordination check`
def _pair_ok(sel: Any, required_a: float) -> bool:
    """The engine's own rule (``engine.analyse``): total, or a limit reaching the requirement."""
    from coordination.engine import EQUAL_RTOL

    if sel.verdict == "total":
        return True
    return sel.limit_a is not None and float(sel.limit_a) >= required_a * (1 - EQUAL_RTOL)


def _limit_text(sel: Any) -> str:
    limit = getattr(sel, "limit_a", None)
    if getattr(sel, "verdict", None) == "none" or limit is None:
        return "not selective even in overload"
    return f"selective only to {float(limit) / 1000:.3g} kA"


def exact_failure(problem: _Problem, cand: Candidate) -> Failure | None:
    """The first requirement a candidate fails, decided exactly (None: it meets every one).

    The checks are those of ``coordination check``: the requirements on Ib, In, Iz and I2, then
    :func:`coordination.checks.check_device` on the envelope band, then
    :func:`coordination.engine.compare` with every device below and above, with the windows,
    margins, intervals and requirements that :func:`coordination.engine.analyse` uses.
    """
    failure = _exact_failure(problem, cand)
    if failure is None:
        return None
    return dataclasses.replace(failure, device=device_band(cand.spec, problem.basis).name)


def _exact_failure(problem: _Problem, cand: Candidate) -> Failure | None:
    from coordination import checks

    problem.searched += 1
    band = device_band(cand.spec, problem.basis)
    cheap = _cheap_failure(problem, cand, band)
    if cheap is not None:
        return cheap
    envelope = device_band(cand.spec, "envelope")
    study = substitute(problem.study, problem.circuit_id, cand.spec)
    results = checks.check_device(study, problem.levels, problem.circuit_id, envelope)
    for stage in ("overload", "breaking-capacity", "disconnection", "fault-energy"):
        if stage in problem.relaxed:
            continue
        for r in results:
            if r.check == stage and not r.ok:
                need = None
                if stage == "overload":
                    i2, in_a = r.details.get("i2_a"), r.details.get("in_a")
                    if i2 is not None and in_a is not None:
                        need = max(float(in_a), float(i2) / 1.45)
                if stage == "fault-energy":
                    _learn_energy_limits(problem, r.details)
                return Failure(stage, f"{stage}: {r.reason}", need_a=need)
    for r in results:  # any further check a later version adds
        if not r.ok and r.check not in problem.relaxed and r.check not in STAGES:
            return Failure(r.check, f"{r.check}: {r.reason}")
    same = _is_present(problem, cand.spec)
    for p in problem.below:
        sel = _pair_below(band, p, same)
        if not _pair_ok(sel, p.required_a):
            if problem.testable_below and _testable(sel, p.band):
                continue  # a remedy's search: a tested limit is assumed for this pair
            return _selectivity_failure("selectivity-below", p, sel, band)
    for p in problem.above:
        sel = _pair_above(band, p, same)
        if not _pair_ok(sel, p.required_a):
            if problem.testable_above and _testable(sel, band):
                continue  # a remedy's search: a tested limit is assumed for this pair
            return _selectivity_failure("selectivity-above", p, sel, p.band)
    return None


def _learn_energy_limits(problem: _Problem, details: Mapping[str, Any]) -> None:
    """Keep the fault-energy cases a candidate failed (within the adiabatic time, where the
    criterion is I2t <= k2 S2 whatever the device) for the screen of later settings."""
    from coordination.checks import ADIABATIC_LIMIT_S

    for case in details.get("cases", ()) or ():
        try:
            current, t, k, have = (float(case[key]) for key in
                                   ("current_a", "t_max_s", "k", "have_mm2"))
            need = float(case["need_mm2"])
        except (KeyError, TypeError, ValueError):
            continue
        if current > 0 and t <= ADIABATIC_LIMIT_S and need > have:
            limit = (current, (k * have) ** 2)
            if limit not in problem.energy_limits:
                problem.energy_limits.append(limit)


def _pair_below(band: Band, p: _Pair, same: bool) -> Any:
    """The engine's result for the candidate over one device below."""
    from coordination import engine

    return engine.compare(band, p.band, p.window_a, margin=p.margin, interval_s=p.interval_s,
                          tested_limit_a=p.tested_limit_a if same else None)


def _pair_above(band: Band, p: _Pair, same: bool) -> Any:
    """The engine's result for the candidate under one device above."""
    from coordination import engine

    window = (float(band.pickup_min_a), p.window_a[1])
    return engine.compare(p.band, band, window, margin=p.margin, interval_s=p.interval_s,
                          tested_limit_a=p.tested_limit_a if same else None)


def _selectivity_failure(stage: str, p: _Pair, sel: Any, upstream: Band) -> Failure:
    word = "with" if stage == "selectivity-below" else "under"
    limit = None if sel.verdict == "none" or sel.limit_a is None else float(sel.limit_a)
    instantaneous = _at_instantaneous(sel, upstream)
    return Failure(stage, f"selectivity {word} {p.other!r} ({p.band.name}) up to "
                          f"{p.required_a / 1000:.3g} kA: {_limit_text(sel)}", other=p.other,
                   limit_a=limit, required_a=p.required_a, instantaneous=instantaneous)


def _at_instantaneous(sel: Any, upstream: Band) -> bool:
    """The engine's limit is the upstream device's instantaneous pickup (not a crossing of the
    bands below it, which a faster device below could lift)."""
    inst = upstream.instantaneous_a
    if sel.decided_by == "tested" or sel.limit_a is None or inst is None:
        return False
    return "instantaneous pickup" in (sel.note or "") or math.isclose(
        float(sel.limit_a), float(inst), rel_tol=1e-8)


def substitute(study: Study, circuit_id: str, spec: str | Mapping[str, Any]) -> Study:
    """A copy of the study with one circuit's device replaced (nothing else changes).

    Examples
    --------
    >>> from coordination import study
    >>> s = study.loads('''
    ... [supply]
    ... pfc_a = 3000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "sockets"
    ... from = "supply"
    ... device = "B32"
    ... phases = 1
    ... load_a = 18
    ... [circuit.cable]
    ... length_m = 10
    ... csa_mm2 = 4
    ... iz_a = 27
    ... ''')
    >>> print(substitute(s, "sockets", "B20").by_id["sockets"].device)
    B20
    """
    circuits = tuple(dataclasses.replace(c, device=spec) if c.id == circuit_id else c
                     for c in study.circuits)
    return dataclasses.replace(study, circuits=circuits)


# ---------------------------------------------------------------------------------------------
# the search
def screen_grid(problem: _Problem, grid: SettingsGrid) -> np.ndarray:
    """Vectorised screen of a whole electronic settings grid (selectivity and disconnection).

    Lower edge against the devices below: a setting's lower edge is the minimum of its
    long-time, short-time and instantaneous parts, and ``min(a, b, c) >= need`` holds exactly
    when each part does, so each part is tested once per value of the settings it depends on
    and the grid's answer is the outer AND of three small boolean arrays.

    Upper edge against the devices above: the need ``margin * t (+ interval)`` rises with t, so
    a setting is clear at a current when any one part is; that is an OR of booleans over the
    grid's shape times the currents (no floating-point array of that size is built).

    Disconnection: the envelope upper edge at the minimum earth fault against the time of
    IEC 60364-4-41 (as :mod:`coordination.checks` takes it).

    Returns
    -------
    numpy.ndarray of bool
        Shape ``grid.shape``: True where a setting may pass (to be confirmed exactly by the
        engine and the checks; the screen samples a current grid, so it may be lenient between
        samples, never stricter than its own samples).
    """
    from coordination import checks
    from curves import breaker as b

    ok = grid.valid().copy()
    currents = problem.grid
    n_isd, n_tsd, n_tr, n_ii = grid.shape
    if problem.below or problem.above:
        lower, upper = electronic_parts(currents, grid, problem.basis)
        if problem.below:
            need = problem.need[1] * (1 - 1e-6)
            lt, st, inst = (np.all(np.minimum(part, TIME_CEILING_S) >= need, axis=-1)
                            for part in lower)
            ok &= st[:, :, None, None] & lt[:, None, :, None] & inst[None, None, None, :]
        if problem.above and ok.any():  # (a grid ruled out below needs no test above)
            pickup = b.tolerance(*b.CONVENTIONAL_X, problem.basis)[0] * grid.ir_a
            for k in _distinct_above(problem):  # tested pairs by their curves, as above
                p = problem.above[k]
                inside = (currents >= pickup) & _short_of(currents, p.required_a)
                t_up = problem.above_tmin[k][inside] * (1 + 1e-6)
                adjustable = bool(problem.above_adjustable[k])
                lt, st, inst = ((_need_of(part[..., inside], p.margin, p.interval_s, adjustable)
                                 <= t_up) | (problem.testable_above and part[..., inside]
                                             <= TESTABLE_S * (1 + 1e-9)) for part in upper)
                # only the currents where some setting may fail matter (exactly the same test)
                keep = ~(lt.all(axis=(0, 1)) | st.all(axis=(0, 1)) | inst.all(axis=0))
                lt, st, inst = lt[..., keep], st[..., keep], inst[..., keep]
                clear = (st[:, :, None, None, :] | lt[:, None, :, None, :]
                         | inst[None, None, None, :, :])
                ok &= clear.all(axis=-1)
    if problem.energy_limits and "fault-energy" not in problem.relaxed:
        # fault-energy cases already failed by a candidate: I2t = I^2 t_max (no current
        # limiting in these units) against k2 S2, only where t_max is within the adiabatic time
        from coordination.checks import ADIABATIC_LIMIT_S

        at = np.array([c for c, _ in problem.energy_limits])
        most = np.array([e for _, e in problem.energy_limits])
        t_env = _combine(electronic_parts(at, grid, "envelope")[1])
        bad = (t_env <= ADIABATIC_LIMIT_S) & (at * at * t_env > most * (1 + 1e-6))
        ok &= ~bad.any(axis=-1)
    if "disconnection" in problem.relaxed:
        return ok
    study = problem.study
    node = problem.levels.by_circuit[problem.circuit_id]
    ief = float(getattr(node, "ief_min_a", 0.0) or 0.0)
    if ief <= 0:
        return np.zeros_like(ok)
    in_scope = study.is_final(problem.circuit_id) and grid.ir_a <= checks.FINAL_CIRCUIT_SCOPE_A
    limit = checks.disconnection_time_s(study.supply.u0_v, study.supply.earthing, in_scope)
    lt, st, inst = electronic_parts(np.array([ief]), grid, "envelope")[1]
    t_env = np.minimum(np.minimum(lt[:, None, :, None, 0], st[:, :, None, None, 0]),
                       inst[None, None, None, :, 0])
    ok &= t_env.reshape(n_isd, n_tsd, n_tr, n_ii) <= limit
    return ok


def _present_key(problem: _Problem) -> tuple:
    """The identity of the circuit's present device (its band's key: the spec as built, so
    "gG100", "GG100" and an inline table of it, or a unit with its defaults written out or
    left out, are one device); the only candidate its tested limits apply to."""
    from coordination.devices import band_for

    return band_for(problem.study, problem.circuit_id, problem.basis).key


def _is_present(problem: _Problem, spec: Any) -> bool:
    """Whether a candidate is the circuit's present device (see :func:`_present_key`)."""
    try:
        return device_band(spec, problem.basis).key == _present_key(problem)
    except InputError:
        return False


def _present_in(problem: _Problem, grid: SettingsGrid) -> tuple[int, ...] | None:
    """Where the present device sits in a settings grid, if it is one of its settings (looked
    for only where a tested limit makes it matter), from the settings its band was built with."""
    if not any(p.tested_limit_a is not None for p in (*problem.below, *problem.above)):
        return None
    from coordination.devices import band_for

    band = band_for(problem.study, problem.circuit_id, problem.basis)
    if band.family != "breaker-electronic":
        return None
    st = band.settings
    ii = st.get("Ii_x")
    axes = (grid.isd_x, grid.tsd_s, grid.tr_s, grid.ii_x)
    wanted = (st.get("Isd_x"), st.get("tsd_s"), st.get("tr_s"), math.nan if ii is None else ii)
    index = []
    for axis, value in zip(axes, wanted, strict=True):
        if value is None:
            return None
        value = float(value)
        hits = np.flatnonzero(np.isnan(axis) if math.isnan(value)
                              else np.isclose(axis, value, rtol=1e-9, atol=0.0))
        if hits.size == 0:
            return None
        index.append(int(hits[0]))
    found = tuple(index)
    return found if _is_present(problem, grid.candidate(found).spec) else None


def _search(problem: _Problem, groups: list[Any]) -> tuple[
        Candidate | None, Band | None, Failure | None, list[tuple[Candidate, Failure]]]:
    """Candidates in lowness order; returns the winner, its band, the binding failure of the
    candidate just before it, and failures met on the way (to explain when nothing fits)."""
    failures: list[tuple[Candidate, Failure]] = []
    previous: tuple[Candidate, Failure | None] | None = None
    for group in groups:
        if isinstance(group, SettingsGrid):
            found = _search_grid(problem, group, failures, previous)
            if found[0] is not None:
                return (*found, failures)  # type: ignore[return-value]
            previous = found[2]  # type: ignore[assignment]
            continue
        if len(group) <= SMALL_GROUP:  # a plain series: decide each candidate exactly
            for i, cand in enumerate(group):
                failure = exact_failure(problem, cand)
                if failure is None:
                    binding = _binding(problem, group, i, previous)
                    return cand, device_band(cand.spec, problem.basis), binding, failures
                failures.append((cand, failure))
                previous = (cand, failure)
            continue
        # a short list of settings: cheap masks, the screen, then exact confirmation
        bands = [device_band(c.spec, problem.basis) for c in group]
        cheap = [_cheap_failure(problem, c, band) for c, band in zip(group, bands, strict=True)]
        keep = [i for i, f in enumerate(cheap) if f is None]
        problem.searched += len(group)
        if not keep:
            failures.append((group[0], cheap[0]))  # type: ignore[arg-type]
            previous = (group[-1], cheap[-1])
            continue
        codes = screen(problem, [bands[i] for i in keep])
        passing = [keep[j] for j, code in enumerate(codes)
                   if code == 0 or _is_present(problem, group[keep[j]].spec)]
        for n, i in enumerate(passing):
            failure = exact_failure(problem, group[i])
            if failure is None:
                binding = _binding(problem, group, i, previous)
                return group[i], bands[i], binding, failures
            if n < MAX_RECORDED:
                failures.append((group[i], failure))
        for i in dict.fromkeys((keep[0], keep[-1])):  # why the least and most capable fail
            if i not in passing:
                failure = exact_failure(problem, group[i])
                if failure is None:  # the screen refused what the exact checks accept (it
                    # must not; see _short_of): the lowest candidate they accept wins
                    j = next(j for j in keep if j == i or (
                        j < i and j not in passing and exact_failure(problem, group[j]) is None))
                    return group[j], bands[j], _binding(problem, group, j, previous), failures
                failures.append((group[i], failure))
        previous = (group[-1], None)
    return None, None, None, failures


def _search_grid(problem: _Problem, grid: SettingsGrid,
                 failures: list[tuple[Candidate, Failure]],
                 previous: tuple[Candidate, Failure | None] | None) -> tuple[Any, Any, Any]:
    """One electronic settings grid: (winner, band, binding) or (None, None, new previous)."""
    valid = np.argwhere(grid.valid())  # lowness order: C order over (Isd, tsd, tr, Ii)
    if valid.size == 0:
        return None, None, previous
    first, last = grid.candidate(valid[0]), grid.candidate(valid[-1])
    cheap = _cheap_failure(problem, first, device_band(first.spec, problem.basis))
    problem.searched += len(valid)
    if cheap is not None:
        if not failures or failures[-1][1].stage != cheap.stage:
            failures.append((first, cheap))
        return None, None, (last, cheap)
    mask = screen_grid(problem, grid)
    here = _present_in(problem, grid)
    if here is not None and grid.valid()[here]:
        mask = mask.copy()
        mask[here] = True  # its tested limits apply to it alone: the exact check decides
    passing = np.argwhere(mask)

    def won(index: np.ndarray) -> tuple[Any, Any, Any]:
        cand = grid.candidate(index)
        position = int(np.flatnonzero((valid == index).all(axis=1))[0])
        if position > 0:
            binding = exact_failure(problem, grid.candidate(valid[position - 1]))
        elif previous is not None:
            binding = _named_failure(problem, previous)
        else:
            binding = None
        return cand, device_band(cand.spec, problem.basis), binding

    for n, index in enumerate(passing[:problem.max_confirm]):
        failure = exact_failure(problem, grid.candidate(index))
        if failure is None:
            return won(index)
        if n < MAX_RECORDED:
            failures.append((grid.candidate(index), failure))
    if problem.explain_budget <= 0:  # enough grids explained (a remedy's search)
        return None, None, (last, None)
    problem.explain_budget -= 1
    for k, cand in ((0, first), (len(valid) - 1, last)):  # why the least and the most capable
        failure = exact_failure(problem, cand)  # settings fail
        if failure is None:  # a setting passes that the confirmations did not reach (the
            # cap) or the screen refused (it must not; see _short_of): the lowest such wins
            unconfirmed = list(passing[problem.max_confirm:])
            refused = [v for v in valid[:k] if not mask[tuple(v)]]
            ordered = sorted([*unconfirmed, *refused, valid[k]],
                             key=lambda v: tuple(int(x) for x in v))[:MAX_CONFIRM]
            return won(next((v for v in ordered if exact_failure(
                problem, grid.candidate(v)) is None), valid[k]))
        failures.append((cand, failure))
    return None, None, (last, failures[-1][1] if failures else None)


def _binding(problem: _Problem, group: list[Candidate], index: int,
             previous: tuple[Candidate, Failure | None] | None) -> Failure | None:
    """The requirement that ruled out the candidate just below the winner."""
    if index > 0:
        return exact_failure(problem, group[index - 1])
    if previous is None:
        return None
    return _named_failure(problem, previous)


def _named_failure(problem: _Problem, previous: tuple[Candidate, Failure | None]) -> Failure | None:
    """The failure of a candidate already met (decided now where it was not), with its name."""
    cand, failure = previous
    if failure is None:
        return exact_failure(problem, cand)
    if failure.device:
        return failure
    return dataclasses.replace(failure, device=device_band(cand.spec, problem.basis).name)


#: Runs of like failures named in a remedy that would not be enough.
REMEDY_SEGMENTS = 2
#: Settings grids of another family whose failure is explained (each costs two exact checks).
REMEDY_EXPLAINED_GRIDS = 8

#: What a family is called in a remedy.
FAMILY_WORDS = {"B": "a type B MCB", "C": "a type C MCB", "D": "a type D MCB",
                "gG": "a gG fuse-link", "tm": "a thermal-magnetic breaker",
                "electronic": "an electronic breaker with a short-time delay"}
#: What a candidate of a family is called in the chooser's answers (``--family`` takes the codes).
FAMILY_NOUNS = {"B": "type B MCB", "C": "type C MCB", "D": "type D MCB", "gG": "gG fuse-link",
                "tm": "thermal-magnetic breaker", "electronic": "electronic breaker"}


def _ceil_sig(x: float, digits: int = 4) -> float:
    """``x`` rounded up to ``digits`` significant figures (a stated need is never short)."""
    if not x > 0 or not math.isfinite(x):
        return x
    exponent = math.floor(math.log10(x)) - digits + 1
    return round(math.ceil(x / 10.0**exponent * (1 - 1e-12)) * 10.0**exponent, max(0, -exponent))


def _named(problem: _Problem, failures: Iterable[tuple[Candidate, Failure]]) -> list[Failure]:
    """The failures past the load stage, each with its candidate's name."""
    return [f if f.device else dataclasses.replace(f, device=device_band(c.spec,
                                                                         problem.basis).name)
            for c, f in failures if f.stage != "load"]


def _runs(failures: list[Failure]) -> list[list[Failure]]:
    """Runs of candidates (in lowness order) that fail the same way."""
    runs: list[list[Failure]] = []
    for f in failures:
        if runs and runs[-1][0].stage == f.stage and runs[-1][0].other == f.other:
            runs[-1].append(f)
        else:
            runs.append([f])
    return runs


def _run_text(run: list[Failure], still: bool = False) -> str:
    """``"gG250 to gG400 fail selectivity with ... (gG400, the closest)"``."""
    who = run[0].device if len(run) == 1 else f"{run[0].device} to {run[-1].device}"
    verb = ("still " if still else "") + ("fails" if len(run) == 1 else "fail")
    best = run[0]
    if run[0].stage.startswith("selectivity"):
        best = max(run, key=lambda f: f.limit_a or 0.0)
    text = f"{who} {verb} {best.text}"
    if len(run) > 1 and best is not run[0] and best.limit_a is not None:
        text += f" ({best.device}, the closest)"
    if best.instantaneous:
        text += (", set by its instantaneous release" if best.stage == "selectivity-below"
                 else f", set by the instantaneous release of {best.other!r}")
    return text


def _summary(problem: _Problem, failures: Iterable[tuple[Candidate, Failure]], *,
             limit: int = MAX_SEGMENTS, still: bool = False) -> str:
    """Why the candidates of a search fail, run by run (for adjustable breakers, whose
    settings are searched grid by grid, by kind of failure, each with its closest setting)."""
    named = _named(problem, failures)
    if not named:
        return f"every {FAMILY_NOUNS[problem.family]} candidate is below the design current"
    if problem.family in ("tm", "electronic"):
        kinds: dict[tuple[str, str | None], list[Failure]] = {}
        for f in named:
            kinds.setdefault((f.stage, f.other), []).append(f)
        parts = []
        for run in list(kinds.values())[:limit]:
            best = max(run, key=lambda f: f.limit_a or 0.0)
            example = "" if best.device in best.text else f" (e.g. {best.device})"
            parts.append(f"{best.text}{example}" + (
                ", set by its instantaneous release" if best.instantaneous
                and best.stage == "selectivity-below" else ""))
        left = len(kinds) - limit
        more = f"; and {left} more kind{'s' if left > 1 else ''} of failure" if left > 0 else ""
        return "settings fail " + "; or ".join(parts) + more
    runs = _runs(named)
    more = f"; and {len(runs) - limit} more" if len(runs) > limit else ""
    return "; ".join(_run_text(run, still) for run in runs[:limit]) + more


def _first(group: Any) -> Candidate | None:
    """The least capable candidate of a group."""
    if isinstance(group, SettingsGrid):
        valid = np.argwhere(group.valid())
        return group.candidate(valid[0]) if valid.size else None
    return group[0] if group else None


def _groups_where(problem: _Problem, groups: list[Any], stages: set[str | None]) -> list[Any]:
    """The groups whose least capable candidate's cheap failure (None: none) is in ``stages``
    (Ib, In, Iz, I2 and the breaking capacity are the same across a group)."""
    out = []
    for group in groups:
        cand = _first(group)
        if cand is None:
            continue
        failure = _cheap_failure(problem, cand, device_band(cand.spec, problem.basis))
        if (failure.stage if failure is not None else None) in stages:
            out.append(group)
    return out


def _search_variant(problem: _Problem, variant: _Problem, groups: list[Any]) -> tuple[
        Candidate | None, Band | None, list[tuple[Candidate, Failure]]]:
    """The search of a remedy: the same search on a changed problem, with fewer exact
    confirmations per settings grid and fewer grids explained."""
    variant.searched = 0
    variant.max_confirm = min(variant.max_confirm, REMEDY_CONFIRM)
    variant.explain_budget = min(variant.explain_budget, REMEDY_EXPLAINED_GRIDS)
    winner, band, _, failures = _search(variant, groups)
    problem.searched += variant.searched
    return winner, band, failures


def _rebuilt(problem: _Problem, study: Study, family: str | None = None) -> tuple[
        _Problem, Band]:
    """The same circuit's problem in a changed study (or for another family)."""
    return _problem(study, problem.levels, problem.circuit_id,
                    family if family is not None else problem.family, problem.skip_above)


def _with_circuits(study: Study, changes: Mapping[str, Mapping[str, Any]]) -> Study:
    """A copy of the study with some circuits' fields replaced."""
    circuits = tuple(dataclasses.replace(c, **changes[c.id]) if c.id in changes else c
                     for c in study.circuits)
    return dataclasses.replace(study, circuits=circuits)


def _iz_needed(cand: Candidate) -> float:
    """Iz that In <= Iz and I2 <= 1.45 Iz need [A] (I2 of the worst compliant device)."""
    i2 = float(device_band(cand.spec, "envelope").pickup_max_a)
    return max(cand.setting_a, i2 / 1.45)


def _remedy_cable(problem: _Problem, groups: list[Any]) -> tuple[bool, str] | None:
    """A larger cable: Iz relaxed to what the smallest otherwise passing candidate needs."""
    iz = problem.iz_a
    if iz is None:
        return None
    tried = _groups_where(problem, groups, {"overload"})
    if not tried:
        return None
    variant = dataclasses.replace(problem, relaxed=problem.relaxed | {"overload"})
    winner, band, failures = _search_variant(problem, variant, tried)
    if winner is None or band is None:
        return False, ("a larger cable alone would not be enough: " + _summary(
            problem, failures, limit=REMEDY_SEGMENTS, still=True))
    need = _iz_needed(winner)
    for _ in range(3):  # confirm with the cable's Iz raised to the need, as `check` would see it
        need = _ceil_sig(need)
        cable = dataclasses.replace(problem.study.by_id[problem.circuit_id].cable, iz_a=need)
        study = _with_circuits(problem.study, {problem.circuit_id: {"cable": cable}})
        failure = exact_failure(_rebuilt(problem, study)[0], winner)
        if failure is None:
            return True, (f"a larger cable: Iz of at least {need:g} A (now {iz:g} A); then "
                          f"{band.name} would do")
        if failure.stage != "overload" or failure.need_a is None or failure.need_a <= need:
            break
        need = failure.need_a
    return False, f"a larger cable alone would not be enough: {failure.device} still fails " \
                  f"{failure.text}"


def _remedy_relaxed(problem: _Problem, groups: list[Any], stage: str,
                    label: str, then: str) -> tuple[bool, str] | None:
    """A requirement met by other means (``label``): the smallest candidate that then passes."""
    tried = _groups_where(problem, groups, {None, stage})
    if not tried:
        return None
    variant = dataclasses.replace(problem, relaxed=problem.relaxed | {stage})
    winner, band, failures = _search_variant(problem, variant, tried)
    if winner is None or band is None:
        return False, f"{label} alone would not be enough: " + _summary(
            problem, failures, limit=REMEDY_SEGMENTS, still=True)
    return True, f"{label}; then {band.name} would do{then}"


#: Pairs named one by one in a remedy (the rest are counted).
REMEDY_PAIRS = 4

def _pairs_text(items: Sequence[tuple[_Pair, Any]], what: str) -> str:
    parts = []
    for p, sel in items[:REMEDY_PAIRS]:
        alike = f" and {len(p.twins)} alike" if p.twins else ""
        parts.append(f"{p.other!r} ({p.band.name}{alike}) to {p.required_a / 1000:.3g} kA "
                     f"({what} {_limit_text(sel).replace('selective only to ', '')})")
    more = len(items) - REMEDY_PAIRS
    return ", ".join(parts) + (f" and {more} more device{'s' if more > 1 else ''}"
                               if more > 0 else "")


def _ids_text(items: Sequence[tuple[_Pair, Any]]) -> str:
    ids = [d for p, _ in items for d in (p.other, *p.twins)]
    more = len(ids) - REMEDY_PAIRS
    return ", ".join(repr(d) for d in ids[:REMEDY_PAIRS]) + (
        f" and {more} more circuit{'s' if more > 1 else ''}" if more > 0 else "")


def _testable(sel: Any, down: Band) -> bool:
    """A selectivity limit that a tested limit could raise (see :data:`TESTABLE_S`)."""
    if sel.verdict != "partial" or sel.limit_a is None:
        return False
    t = float(np.asarray(down.t_max(float(sel.limit_a) * (1 - 1e-9))))
    return t <= TESTABLE_S * (1 + 1e-9)


def _remedies_below(problem: _Problem, groups: list[Any],
                    current: Band) -> list[tuple[bool, str]]:
    """Remedies for selectivity with the devices below: a tested limit, a partial requirement,
    a downstream device with a lower let-through; each checked by the search."""
    tried = _groups_where(problem, groups, {None})
    variant = dataclasses.replace(problem, below=[], need=np.full_like(problem.need, -np.inf))
    winner, band, failures = _search_variant(problem, variant, tried)
    if winner is None or band is None:
        return [(False, "a tested limit or a partial requirement below alone would not be "
                        "enough: without any selectivity requirement below, " +
                 _summary(problem, failures, limit=REMEDY_SEGMENTS, still=True))]
    same = _is_present(problem, winner.spec)
    failing = [(p, sel) for p in problem.below
               if not _pair_ok(sel := _pair_below(band, p, same), p.required_a)]
    if not failing:
        return []
    out = [_remedy_tested(problem, tried)]
    out.append(_remedy_partial(problem, winner, band, failing))
    lower = _remedy_let_through(problem, groups, band, failing)
    if lower is not None:
        out.append(lower)
    return out


def _remedy_tested(problem: _Problem, tried: list[Any]) -> tuple[bool, str]:
    """Tested limits: the smallest candidate whose failing pairs below all fail where only a
    test can tell (:data:`TESTABLE_S`), confirmed with those limits given."""
    variant = dataclasses.replace(problem, testable_below=True, need=problem.need_untestable
                                  if problem.need_untestable is not None
                                  else np.full_like(problem.need, -np.inf))
    winner, band, failures = _search_variant(problem, variant, tried)
    if winner is None or band is None:
        return False, ("a tested limit alone would not be enough: where the bands cross in "
                       "time-current (not short-circuit) regions a test does not help: " +
                       _summary(problem, failures, limit=REMEDY_SEGMENTS, still=True))
    cid = problem.circuit_id
    same = _is_present(problem, winner.spec)
    failing = [(p, sel) for p in problem.below
               if not _pair_ok(sel := _pair_below(band, p, same), p.required_a)]
    study = substitute(problem.study, cid, winner.spec)
    changes = {}
    for p, _ in failing:
        tested = float(math.ceil(p.required_a))
        for d in (p.other, *p.twins):
            limits = {**study.by_id[d].tested_limits_a, cid: tested}
            changes[d] = {"tested_limits_a": limits}
    failure = exact_failure(_rebuilt(problem, _with_circuits(study, changes))[0], winner)
    if failure is not None:  # not expected: the search above set aside exactly these pairs
        return False, (f"a tested limit alone would not be enough: {band.name} still fails "
                       f"{failure.text}")
    return True, (f"a tested limit from the makers' tables: {band.name} would do if tested "
                  f"selective over {_pairs_text(failing, 'the bands give')}; give "
                  f"tested_limits_a = {{{cid!r} = ...}} on {_ids_text(failing)}")


def _remedy_partial(problem: _Problem, winner: Candidate, band: Band,
                    failing: list[tuple[_Pair, Any]]) -> tuple[bool, str]:
    """Partial requirements set at the limits the smallest otherwise passing candidate
    reaches."""
    none = [p for p, sel in failing if sel.verdict == "none" or sel.limit_a is None]
    if none:
        names = ", ".join(f"{p.other!r} ({p.band.name})" for p in none[:REMEDY_PAIRS]) + (
            f" and {len(none) - REMEDY_PAIRS} more" if len(none) > REMEDY_PAIRS else "")
        return False, (f"a partial requirement alone would not be enough: {band.name}, the "
                       f"smallest that meets every other requirement, is not selective with "
                       f"{names} even in overload")
    changes = {d: {"selective_to_a": float(math.floor(sel.limit_a))}
               for p, sel in failing for d in (p.other, *p.twins)}
    study = _with_circuits(problem.study, changes)
    failure = exact_failure(_rebuilt(problem, study)[0], winner)
    if failure is not None:
        return False, (f"a partial requirement alone would not be enough: {band.name} still "
                       f"fails {failure.text}")
    parts = ", ".join(f"{math.floor(sel.limit_a):g} on {p.other!r}"
                      f"{' and alike' if p.twins else ''}" for p, sel in failing[:REMEDY_PAIRS])
    more = len(failing) - REMEDY_PAIRS
    parts += f" and on {more} more device{'s' if more > 1 else ''}" if more > 0 else ""
    return True, (f"a partial requirement, if total selectivity is not needed: "
                  f"{band.name} would do with selective_to_a = {parts}")


def _lower_let_through(problem: _Problem, p: _Pair) -> tuple[str | Mapping[str, Any], Band] | None:
    """An MCB of the same rating (another type, energy class 3) that clears the pair's top
    current faster (a lower let-through) and fails none of its own circuit's checks that the
    present device passes."""
    from coordination import checks

    if p.band.family != "mcb":
        return None
    top = np.array([p.required_a])
    now = float(p.band.t_max(top)[0])
    icn = float(p.band.settings.get("icn_a", MCB_DEFAULT_ICN_A))
    circuits = (p.other, *p.twins)

    def passed(spec: Any) -> list[set[str]]:
        envelope = device_band(spec, "envelope")
        # one copy of the study with every twin swapped, not one copy per twin: a board of n
        # alike circuits cost n copies of n circuits (quadratic) before
        swapped = _with_circuits(problem.study, {d: {"device": spec} for d in circuits})
        return [{r.check for r in checks.check_device(swapped, problem.levels, d, envelope)
                 if r.ok} for d in circuits]

    before: list[set[str]] | None = None
    best: tuple[float, str | Mapping[str, Any], Band] | None = None
    for curve in ("B", "C", "D"):
        spec = _mcb_spec(curve, float(p.band.rating_a), MCB_DEFAULT_CLASS, icn)
        alt = device_band(spec, p.band.basis)
        t = float(alt.t_max(top)[0])
        if alt.key == p.band.key or not t < now * (1 - 1e-3):
            continue
        if before is None:
            before = [{r.check for r in checks.check_device(problem.study, problem.levels, d,
                                                            device_band(problem.study.by_id[
                                                                d].device, "envelope"))
                       if r.ok} for d in circuits]
        ok = all(old <= new for old, new in zip(before, passed(spec), strict=True))
        if ok and (best is None or t < best[0]):
            best = (t, spec, alt)
    return None if best is None else (best[1], best[2])


def _energy_class_text(band: Band) -> str:
    cls = band.settings.get("energy_class")
    return "no energy-limiting class" if cls is None else f"class {cls}"


def _remedy_let_through(problem: _Problem, groups: list[Any], band: Band,
                        failing: list[tuple[_Pair, Any]]) -> tuple[bool, str] | None:
    """Downstream devices with a lower let-through, only where the limit is not the
    candidate's own instantaneous release (which no downstream device can lift)."""
    if any(_at_instantaneous(sel, band) for _, sel in failing):
        return None
    swaps = {}
    for p, _ in failing:
        alt = _lower_let_through(problem, p)
        if alt is not None:
            swaps[p] = alt
    if not swaps:
        return None
    study = _with_circuits(problem.study, {d: {"device": spec} for p, (spec, _) in swaps.items()
                                           for d in (p.other, *p.twins)})
    variant = _rebuilt(problem, study)[0]
    winner, found, failures = _search_variant(problem, variant,
                                              _groups_where(problem, groups, {None}))
    items = list(swaps.items())
    what = ", ".join(f"{alt.name} ({_energy_class_text(alt)}) for {p.other!r}"
                     f"{' and alike' if p.twins else ''} instead of {p.band.name}"
                     for p, (_, alt) in items[:REMEDY_PAIRS])
    if len(items) > REMEDY_PAIRS:
        what += f" and {len(items) - REMEDY_PAIRS} more"
    if winner is None or found is None:
        return False, (f"a downstream device with a lower let-through alone would not be "
                       f"enough: with {what}, " + _summary(problem, failures,
                                                          limit=REMEDY_SEGMENTS, still=True))
    return True, f"a downstream device with a lower let-through: {what}; then {found.name} " \
                 f"would do"


def _remedy_family(problem: _Problem, family: str, current: Band) -> tuple[bool, str]:
    """Another family, searched as a whole."""
    variant, _ = _rebuilt(problem, problem.study, family)
    variant.explain_budget = REMEDY_EXPLAINED_GRIDS
    stated = problem.study.by_id[problem.circuit_id].breaking_capacity_a is not None
    groups = candidate_groups(family, current, 0.0 if stated else variant.ik_break_a)
    winner, band, failures = _search_variant(problem, variant, groups)
    label = f"{FAMILY_WORDS[family]} (--family {family})"
    if winner is None or band is None:
        return False, f"{label} would not be enough: " + _summary(
            variant, failures, limit=REMEDY_SEGMENTS)
    return True, f"{label}: {band.name} would do"


def _remedies_above(problem: _Problem, groups: list[Any]) -> list[tuple[bool, str] | None]:
    """Remedies for selectivity with the devices above: a tested limit or a partial requirement
    on this circuit, a larger device above; each checked by the search."""
    tried = _groups_where(problem, groups, {None})
    variant = dataclasses.replace(problem, above=[], above_tmin=problem.above_tmin[:0],
                                  above_adjustable=problem.above_adjustable[:0])
    aside = _search_variant(problem, variant, tried)
    return [_remedy_tested_above(problem, tried), _remedy_partial_above(problem, aside),
            _remedy_above(problem, aside)]


def _failing_above(problem: _Problem, winner: Candidate, band: Band) -> list[tuple[_Pair, Any]]:
    same = _is_present(problem, winner.spec)
    return [(p, sel) for p in problem.above
            if not _pair_ok(sel := _pair_above(band, p, same), p.required_a)]


def _remedy_tested_above(problem: _Problem, tried: list[Any]) -> tuple[bool, str] | None:
    """Tested limits with the devices above: the smallest candidate whose failing pairs above
    all fail where only a test can tell (:data:`TESTABLE_S`), confirmed with them given."""
    variant = dataclasses.replace(problem, testable_above=True)
    winner, band, failures = _search_variant(problem, variant, tried)
    if winner is None or band is None:
        return False, ("a tested limit with the devices above alone would not be enough: " +
                       _summary(problem, failures, limit=REMEDY_SEGMENTS, still=True))
    failing = _failing_above(problem, winner, band)
    if not failing:
        return None
    cid = problem.circuit_id
    study = substitute(problem.study, cid, winner.spec)
    limits = {**study.by_id[cid].tested_limits_a,
              **{p.other: float(math.ceil(p.required_a)) for p, _ in failing}}
    study = _with_circuits(study, {cid: {"tested_limits_a": limits}})
    failure = exact_failure(_rebuilt(problem, study)[0], winner)
    if failure is not None:
        return False, (f"a tested limit with the devices above alone would not be enough: "
                       f"{band.name} still fails {failure.text}")
    ids = ", ".join(f"{p.other!r} = ..." for p, _ in failing)
    return True, (f"a tested limit from the makers' tables: {band.name} would do if tested "
                  f"selective under {_pairs_text(failing, 'the bands give')}; give "
                  f"tested_limits_a = {{{ids}}} on {cid!r}")


def _remedy_partial_above(problem: _Problem, aside: tuple[Any, Any, Any]) -> tuple[
        bool, str] | None:
    """A partial requirement on this circuit: the limit the smallest candidate that meets every
    other requirement reaches under the devices above."""
    winner, band, _ = aside
    if winner is None or band is None:
        return None  # said by the larger device above
    failing = _failing_above(problem, winner, band)
    if not failing:
        return None
    none = [p for p, sel in failing if sel.verdict == "none" or sel.limit_a is None]
    if none:
        names = ", ".join(f"{p.other!r} ({p.band.name})" for p in none[:REMEDY_PAIRS])
        return False, (f"a partial requirement alone would not be enough: {band.name}, the "
                       f"smallest that meets every other requirement, is not selective under "
                       f"{names} even in overload")
    limit = float(math.floor(min(float(sel.limit_a) for _, sel in failing)))
    study = _with_circuits(problem.study, {problem.circuit_id: {"selective_to_a": limit}})
    failure = exact_failure(_rebuilt(problem, study)[0], winner)
    if failure is not None:
        return False, (f"a partial requirement alone would not be enough: {band.name} still "
                       f"fails {failure.text}")
    return True, (f"a partial requirement, if total selectivity is not needed: {band.name} "
                  f"would do with selective_to_a = {limit:g} on {problem.circuit_id!r}")


def _remedy_above(problem: _Problem, aside: tuple[Any, Any, Any]) -> tuple[bool, str] | None:
    """A larger device above: the smallest candidate that passes with the devices above set
    aside (``aside``: that search), then the nearest failing one chosen over it."""
    winner, band, failures = aside
    if winner is None or band is None:
        return False, ("a larger device above alone would not be enough: without selectivity "
                       "above, " + _summary(problem, failures, limit=REMEDY_SEGMENTS,
                                            still=True))
    same = _is_present(problem, winner.spec)
    failing = [p.other for p in problem.above
               if not _pair_ok(_pair_above(band, p, same), p.required_a)]
    if not failing:
        return None
    nearest, later = failing[0], frozenset(failing[1:]) | problem.skip_above
    study = substitute(problem.study, problem.circuit_id, winner.spec)
    upper, up_current = _problem(study, problem.levels, nearest, None, later)
    stated = study.by_id[nearest].breaking_capacity_a is not None
    up_groups = candidate_groups(upper.family, up_current, 0.0 if stated else upper.ik_break_a)
    up_winner, up_band, up_failures = _search_variant(problem, upper, up_groups)
    if up_winner is None or up_band is None:
        return False, (f"a larger device above alone would not be enough: over {band.name}, "
                       f"no {upper.family} device for {nearest!r} fits: " +
                       _summary(upper, up_failures, limit=REMEDY_SEGMENTS))
    rest = " (and the devices above it chosen after it)" if len(failing) > 1 else ""
    return True, (f"a larger device above: {up_band.name} for {nearest!r}{rest}, with "
                  f"{band.name} here (choose them together with --board)")


def _explain(problem: _Problem, failures: list[tuple[Candidate, Failure]], groups: list[Any],
             current: Band) -> tuple[str, tuple[str, ...], tuple[str, ...]]:
    """Why nothing fits; the remedies that, each on its own, make a candidate pass (each one
    checked by searching again with it assumed); and those that would not be enough, with what
    stays binding."""
    ib, iz, family = problem.ib_a, problem.iz_a, problem.family
    helps: list[str] = []
    short: list[str] = []

    def add(result: tuple[bool, str] | None) -> None:
        if result is not None:
            (helps if result[0] else short).append(result[1])

    if ib is not None and iz is not None and ib > iz:
        reason = (f"no device can meet Ib <= In <= Iz: the design current Ib {ib:g} A exceeds "
                  f"the cable's Iz {iz:g} A")
        add(_remedy_cable(problem, groups))
        return reason, tuple(helps), tuple(short)
    past_load = _named(problem, failures)
    if not past_load:
        noun = FAMILY_NOUNS[family]
        reason = (f"every {noun} candidate is below the design current Ib {ib:g} A"
                  if ib is not None else f"no {noun} candidate could be built")
        for other in ("tm", "electronic"):
            if other != family:
                add(_remedy_family(problem, other, current))
        return reason, tuple(helps), tuple(short)
    stages = {f.stage for f in past_load}
    reason = (f"no {FAMILY_NOUNS[family]} candidate meets every requirement: "
              + _summary(problem, failures))
    if "overload" in stages:
        add(_remedy_cable(problem, groups))
    if "breaking-capacity" in stages:
        add(_remedy_relaxed(problem, groups, "breaking-capacity",
                            f"a breaking capacity of at least {problem.ik_break_a / 1000:.3g} kA "
                            f"(a device so rated, or a tested back-up combination with the "
                            f"device above)", ""))
    if "disconnection" in stages:
        add(_remedy_relaxed(problem, groups, "disconnection",
                            "earth faults disconnected in time by other means (a lower loop "
                            "impedance: a larger protective conductor or a shorter run; or an "
                            "RCD)", ""))
    if "fault-energy" in stages:
        add(_remedy_relaxed(problem, groups, "fault-energy",
                            "conductors that withstand the fault energy (a larger cross-section "
                            "of the cable or its protective conductor)", ""))
    if "selectivity-below" in stages:
        for result in _remedies_below(problem, groups, current):
            add(result)
        for other in ("gG", "electronic"):
            if other != family:
                add(_remedy_family(problem, other, current))
    if "selectivity-above" in stages:
        for result in _remedies_above(problem, groups):
            add(result)
    return reason, tuple(helps), tuple(short)


def _setting_bindings(problem: _Problem, winner: Candidate) -> dict[str, str]:
    """For each setting of an adjustable winner, why its next lower grid value is refused."""
    from curves import breaker as b

    spec = winner.spec
    family = spec.get("family") if isinstance(spec, Mapping) else None
    axes: dict[str, tuple[tuple[str, Sequence[float]], ...]] = {
        "tm": (("Ir_x", b.TM_IR_FRACTIONS), ("Ii_x", b.II_X)),
        "electronic": (("Ir_x", b.ELECTRONIC_IR_FRACTIONS), ("Isd_x", b.ISD_X),
                       ("tsd_s", b.TSD_S), ("tr_s", b.TR_S), ("Ii_x", b.ELECTRONIC_II_X)),
    }
    out: dict[str, str] = {}
    for key, values in axes.get(str(family), ()):
        value = spec.get(key)  # type: ignore[union-attr]
        if value is None:
            continue
        grid = sorted(float(v) for v in values)
        below = grid if value == "off" else [v for v in grid if v < float(value) - 1e-12]
        if not below:
            out[key] = "the lowest setting"
            continue
        lower = below[-1]
        trial = {**spec, key: _num(lower)}  # type: ignore[dict-item]
        cand = Candidate(trial, winner.rating_a, winner.rating_a * float(trial["Ir_x"]), ())
        try:
            failure = exact_failure(problem, cand)
        except InputError:
            out[key] = f"{key} = {lower:g} is not a setting the unit takes with the others"
            continue
        out[key] = f"{key} = {lower:g}: " + (
            failure.text if failure is not None else "also meets every requirement")
    return out


def choose(study: Study, circuit_id: str, *, family: str | None = None,
           levels: Any = None, skip_above: Iterable[str] = ()) -> Choice:
    """The smallest rating (and lowest settings) for one circuit's device that meet every
    requirement.

    Parameters
    ----------
    study : Study
        The installation.
    circuit_id : str
        The circuit whose device is chosen.
    family : str, optional
        One of :data:`FAMILIES`; default: the family of the circuit's present device.
    levels : FaultLevels, optional
        ``coordination.faults.compute(study)``, when already computed (devices do not change
        fault levels).
    skip_above : iterable of str, optional
        Ancestors whose selectivity with this circuit is left to their own choice (the
        whole-board mode chooses them afterwards).

    Returns
    -------
    Choice
        ``found`` with the device, its rating and settings and the binding requirement, or the
        reason nothing fits and what would.

    References
    ----------
    IEC 60364-4-43 clause 433.1 (Ib <= In <= Iz, I2 <= 1.45 Iz); IEC 60364-4-41 clause 411.3.2
    (disconnection times, Table 41.1); IEC 60947-2 Annex A and IEC 60898-1 Annex ZA
    (selectivity by time-current bands and let-through energy).

    Examples
    --------
    >>> from coordination import study
    >>> s = study.loads('''
    ... [supply]
    ... pfc_a = 3000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "sockets"
    ... from = "supply"
    ... device = "B32"
    ... phases = 1
    ... load_a = 18
    ... [circuit.cable]
    ... length_m = 10
    ... csa_mm2 = 4
    ... iz_a = 27
    ... ''')
    >>> c = choose(s, "sockets")
    >>> print(c.device, c.rating_a, c.binding)
    B20 20.0 load: Ib 18 A > In 16 A
    """
    if levels is None:
        from coordination import faults

        levels = faults.compute(study)
    problem, current = _problem(study, levels, circuit_id, family, frozenset(skip_above))
    stated = study.by_id[circuit_id].breaking_capacity_a is not None
    groups = candidate_groups(problem.family, current, 0.0 if stated else problem.ik_break_a)
    previous = spec_text(study.by_id[circuit_id].device)
    winner, band, binding, failures = _search(problem, groups)
    if winner is None or band is None:
        reason, suggestions, insufficient = _explain(problem, failures, groups, current)
        return Choice(circuit_id, False, None, None, MappingProxyType({}), None, reason,
                      problem.family, None, suggestions, problem.searched, previous,
                      insufficient=insufficient)
    if binding is None:
        reason = f"{band.name} is the smallest {FAMILY_NOUNS[problem.family]} candidate and " \
                 f"meets every requirement"
    else:
        reason = f"{band.name} meets every requirement; the next smaller candidate " \
                 f"({binding.device}) fails {binding.text}"
    per_setting = _setting_bindings(problem, winner)
    return Choice(circuit_id, True, winner.spec, float(band.rating_a),
                  MappingProxyType(dict(band.settings)),
                  binding.text if binding is not None else None, reason, problem.family,
                  band.name, (), problem.searched, previous, MappingProxyType(per_setting))


def choose_board(study: Study, board_id: str, *, family: str | None = None) -> tuple[Choice, ...]:
    """Choose every circuit that feeds a board, at or below ``board_id``, from the bottom up.

    Each choice sees the ones made before it: the chosen device is substituted into the study
    before the next, shallower circuit is chosen. Selectivity with a device above that is still
    to be chosen is left to that device's own choice. Where nothing fits, the present device
    stays.

    Parameters
    ----------
    board_id : str
        A circuit id (that circuit and every board below it), or ``"supply"`` for the whole study.

    References
    ----------
    IEC 60364-5-53 clause 536.4 (selectivity between protective devices in series).

    Examples
    --------
    >>> from coordination import study
    >>> s = study.loads('''
    ... [supply]
    ... pfc_a = 6000
    ... ze_ohm = 0.05
    ... [[circuit]]
    ... id = "sub-main"
    ... from = "supply"
    ... device = "gG63"
    ... [circuit.cable]
    ... length_m = 5
    ... csa_mm2 = 35
    ... [[circuit]]
    ... id = "lights"
    ... from = "sub-main"
    ... device = "B10"
    ... phases = 1
    ... ''')
    >>> print([(c.circuit, c.rating_a) for c in choose_board(s, "supply")])
    [('sub-main', 125.0)]
    """
    from coordination import faults

    if board_id != SUPPLY_ID and board_id not in study.by_id:
        raise InputError(f"no circuit {board_id!r} in the study; give a circuit id or "
                         f"{SUPPLY_ID!r} for the whole study", key="--board")
    if board_id != SUPPLY_ID and not study.children.get(board_id):
        raise InputError(f"circuit {board_id!r} feeds no board (it has no circuits below it); "
                         f"give a circuit that feeds a board, or {SUPPLY_ID!r} for the whole "
                         f"study", key="--board")
    levels = faults.compute(study)
    inside = (set(study.by_id) if board_id == SUPPLY_ID
              else {board_id, *study.descendants(board_id)})
    feeders = [c.id for c in study.circuits if study.children.get(c.id) and c.id in inside]
    order = sorted(feeders, key=lambda cid: -study.depth[cid])  # stable: deepest first
    choices: list[Choice] = []
    current = study
    for n, cid in enumerate(order):
        later = frozenset(order[n + 1:])
        choice = choose(current, cid, family=family, levels=levels, skip_above=later)
        choices.append(choice)
        if choice.found and choice.device is not None:
            current = substitute(current, cid, choice.device)
    return tuple(choices)


def _setting_text(key: str, value: Any) -> str:
    if isinstance(value, bool):
        return f"{key}={'true' if value else 'false'}"
    if isinstance(value, int | float):
        return f"{key}={value:g}"
    return f"{key}={value}"


def format_results(results: Iterable[Choice]) -> str:
    """The `choose` printout: one block per circuit, with the line to paste into the study.

    Examples
    --------
    >>> from coordination import study
    >>> s = study.loads('''
    ... [supply]
    ... pfc_a = 3000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "sockets"
    ... from = "supply"
    ... device = "B32"
    ... phases = 1
    ... load_a = 18
    ... [circuit.cable]
    ... length_m = 10
    ... csa_mm2 = 4
    ... iz_a = 27
    ... ''')
    >>> print(format_results([choose(s, "sockets")]).splitlines()[0])
    circuit 'sockets': B20 (In 20 A)
    """
    blocks = []
    for r in results:
        if r.found:
            settings = ", ".join(_setting_text(k, v) for k, v in r.settings.items())
            lines = [f"circuit {r.circuit!r}: {r.name} (In {r.rating_a:g} A)",
                     f"  settings: {settings}" if settings else "",
                     f"  binding:  {r.binding or 'none (smallest of the family)'}",
                     *(f"  lower {k}: {v}" for k, v in r.setting_bindings.items()),
                     f"  {r.reason}",
                     f"  was:      device = {r.previous}",
                     f"  study:    device = {spec_text(r.device)}"]
        else:
            lines = [f"circuit {r.circuit!r}: no {FAMILY_NOUNS[r.family]} fits "
                     f"(--family {r.family})",
                     f"  {r.reason}"]
            lines += [f"  would help: {s}" for s in r.suggestions]
            lines += [f"  ruled out: {s}" for s in r.insufficient]
        blocks.append("\n".join(line for line in lines if line))
    return "\n\n".join(blocks) + "\n"
