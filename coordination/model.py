"""Frozen dataclasses of a loaded study: the supply and a tree of circuits.

``coordination.study.load()`` builds these from the TOML study file and validates them; every
later step (faults, engine, checks, chooser, plot, report) reads them and never mutates them.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from functools import cached_property
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

from coordination import rules as national

if TYPE_CHECKING:  # imported where a study has them (coordination.study): most have neither
    from coordination.generator import StandbySource
    from coordination.motors import Inrush, Motor

SUPPLY_ID = "supply"


@dataclass(frozen=True)
class Transformer:
    """A supply transformer (IEC 60909-0 clause 6.3)."""

    rating_kva: float
    impedance_pct: float  # short-circuit voltage u_k [%]
    x_r: float = 6.0  # X/R of the transformer
    upstream_pfc_a: float | None = None  # the network's fault level referred to LV [A], or infinite
    upstream_x_r: float = 10.0
    u_lv_v: float | None = None  # rated voltage on the low-voltage side U_rT [V]; None: sqrt(3) U0


@dataclass(frozen=True)
class Supply:
    """The origin of the installation.

    One of ``pfc_a``, ``ze_ohm`` or ``transformer`` fixes the source impedance; ``ze_ohm`` may be
    given with ``pfc_a`` (the earth-fault loop outside the installation).
    """

    u0_v: float = 230.0  # line-to-earth nominal voltage [V]
    phases: int = 3
    earthing: str = "TN-C-S"  # "TN-S", "TN-C-S", "TN-C" or "TT"
    pfc_a: float | None = None  # prospective fault current at the origin [A]: line-neutral for a
    # single-phase supply, three-phase symmetrical for a three-phase one
    ze_ohm: float | None = None  # external earth-fault loop impedance [ohm]
    x_r: float = 1.0  # X/R of the source impedance when given by pfc_a or ze_ohm
    transformer: Transformer | None = None
    c_max: float = 1.05  # IEC 60909-0 Table 1 voltage factor for maximum currents (LV, +6 %)
    c_min: float = 0.95  # IEC 60909-0 Table 1 voltage factor for minimum currents (LV)
    pfc_ln_a: float | None = None  # line-neutral prospective fault current at the origin of a
    # three-phase supply [A]; None: bounded, pfc_a for maximum currents, a loop of twice the
    # phase impedance (half the current) for minimum currents (see coordination.faults)
    standby: tuple[StandbySource, ...] = ()  # standby generators, each a case of its own
    # (coordination.standby): a board fed by one of them through a changeover
    ra_ohm: float | None = None  # TT: earth electrode + protective conductors of the exposed
    # parts, RA [ohm] (IEC 60364-4-41, 411.5.3: RA x IΔn <= 50 V)


@dataclass(frozen=True)
class Cable:
    """The cable a circuit feeds through (from its board to its far end)."""

    length_m: float
    csa_mm2: float  # line conductor cross-section, per conductor
    cpc_mm2: float | None = None  # protective conductor; None: same as line
    material: str = "copper"  # "copper" or "aluminium"
    insulation: str = "pvc"  # "pvc" or "xlpe"
    iz_a: float | None = None  # current-carrying capacity after derating [A]
    parallel: int = 1  # conductors in parallel per phase
    neutral_mm2: float | None = None  # None: same as line; 0: no neutral (three-phase only)
    x_ohm_per_m: float | None = None  # reactance per metre per conductor; None: common practice
    cpc_material: str | None = None  # None: same as line conductors
    cpc_parallel: int | None = None  # protective conductors in parallel; None: same as parallel
    cpc_separate: bool = False  # the cpc is installed apart from the cable (IEC 60364-5-54 A.54.2)
    cpc_armour: bool = False  # the steel-wire armour is the protective conductor
    armour_mm2: float | None = None  # cross-section of the armour [mm2] (with cpc_armour)
    armour_ohm_per_m: float | None = None  # its resistance at 20 degC [ohm/m]; None: rho / A


@dataclass(frozen=True)
class Circuit:
    """One circuit: its protective device at the board, and the cable it feeds.

    ``parent`` is the circuit that feeds the board this circuit's device sits on, or ``"supply"``.
    ``device`` is the trade shorthand (``"B32"``) or an inline table (a read-only mapping); build
    its band with ``curves.spec.band_from_spec(device, basis=...)``. ``None`` only for a
    residual-current switch (RCCB): a circuit with an ``rcd`` and no overcurrent device, protected
    against overcurrent by the device above it. ``rcd`` is the circuit's residual-current device
    as written (a read-only mapping: ``idn_ma``, ``selective``, ``waveform``, ``delay_s``;
    :func:`coordination.residual.rcd_of` builds its band).
    """

    id: str
    parent: str
    device: str | Mapping[str, Any] | None
    phases: int = 3
    load_a: float | None = None  # design current Ib [A]
    cable: Cable | None = None
    basis: str | None = None  # band basis for this device; None: the study's
    final: bool | None = None  # final circuit (0.4 s class); None: a circuit with no children
    selective_to_a: float | None = None  # required selectivity up to this current; None: total
    tested_limits_a: Mapping[str, float] = field(default_factory=dict)  # upstream id -> Is [A]
    breaking_capacity_a: float | None = None  # overrides the device's own / family default
    margin: float | None = None  # time margin factor for pairs where this is downstream
    interval_s: float | None = None  # coordination time interval over adjustable breakers [s]
    board: str | None = None  # name of the board this circuit feeds (shown in printouts)
    rcd: Mapping[str, Any] | None = None  # residual-current device (IEC 61008-1 / 61009-1)
    sockets: bool = False  # supplies socket-outlets (411.3.3; BS 7671's scope of Table 41.1)
    leakage_ma: float | None = None  # standing protective-conductor current [mA]
    ring: bool = False  # a ring final circuit: the cable's length_m is the ring's whole length
    backup_a: Mapping[str, float] = field(default_factory=dict)  # upstream id -> declared [A]
    conditional_a: float | None = None  # the fed board's devices backed up by this one to [A]
    motor: Motor | None = None  # the motor it feeds: its start and overload relay
    inrush: Inrush | None = None  # an inrush load: its first peak and duration

    def __post_init__(self) -> None:
        # the tables made read-only copies; most circuits (a shorthand device, no rcd, no
        # upstream currents) have none to copy and are left as built
        device, rcd = _read_only_table(self.device), _read_only_table(self.rcd)
        limits, backup = _read_only(self.tested_limits_a), _read_only(self.backup_a)
        if device is not self.device:
            object.__setattr__(self, "device", device)
        if rcd is not self.rcd:
            object.__setattr__(self, "rcd", rcd)
        if limits is not self.tested_limits_a:
            object.__setattr__(self, "tested_limits_a", limits)
        if backup is not self.backup_a:
            object.__setattr__(self, "backup_a", backup)


def _read_only_table(value: Any) -> Any:
    """An inline table (a device's, an rcd's) as a read-only copy; a shorthand text, None or a
    read-only table as it is."""
    if value is None or isinstance(value, str | MappingProxyType):
        return value
    return MappingProxyType(dict(value)) if isinstance(value, Mapping) else value


#: The read-only empty table of upstream currents, shared by the circuits that give none.
NO_CURRENTS: Mapping[str, float] = MappingProxyType({})


def _read_only(currents: Mapping[str, float]) -> Mapping[str, float]:
    """A read-only copy of a circuit's table of upstream circuit id = current [A]."""
    if currents is NO_CURRENTS:
        return currents
    return MappingProxyType(dict(currents)) if currents else NO_CURRENTS


@dataclass(frozen=True)
class Study:
    """A whole installation: the supply and its circuits, parents listed before children."""

    title: str
    supply: Supply
    circuits: tuple[Circuit, ...]
    basis: str = "typical"  # default band basis: "typical" or "envelope"
    margin: float = 1.0  # default time margin factor: D's t_max * margin must stay below U's t_min
    interval_s: float = 0.0  # default coordination time interval over adjustable breakers [s]
    source: str | None = None  # path of the study file, when loaded from one
    title_block: tuple[tuple[str, str], ...] = ()  # (key, text) of the [study] title-block keys
    # given (client, project, reference, revision, designer, checker, date), in that order
    rules: str = "iec"  # the rule set of the protection checks: "iec" or "bs7671"

    @cached_property
    def rule_set(self) -> national.RuleSet:
        """The rule set of the protection checks (:mod:`coordination.rules`)."""
        return national.rule_set(self.rules)

    # -- navigation (computed once, iteratively: deep trees never recurse) ----------------------
    @cached_property
    def by_id(self) -> Mapping[str, Circuit]:
        return MappingProxyType({c.id: c for c in self.circuits})

    @cached_property
    def children(self) -> Mapping[str, tuple[str, ...]]:
        kids: dict[str, list[str]] = {SUPPLY_ID: []}
        for c in self.circuits:
            kids.setdefault(c.id, [])
            kids.setdefault(c.parent, []).append(c.id)
        return MappingProxyType({k: tuple(v) for k, v in kids.items()})

    @cached_property
    def rcd_circuits(self) -> frozenset[str]:
        """Ids of the circuits that have an RCD (an ``rcd`` table)."""
        return frozenset(c.id for c in self.circuits if c.rcd is not None)

    @cached_property
    def depth(self) -> Mapping[str, int]:
        """Number of circuits above each circuit (0: fed from the supply)."""
        depths: dict[str, int] = {SUPPLY_ID: -1}
        for c in self.circuits:  # parents first
            depths[c.id] = depths[c.parent] + 1
        del depths[SUPPLY_ID]
        return MappingProxyType(depths)

    def ancestors(self, circuit_id: str) -> tuple[str, ...]:
        """Ids of every circuit above this one, nearest first.

        Walked up on each call, so a deep tree never holds every circuit's chain at once.
        """
        chain: list[str] = []
        parent = self.by_id[circuit_id].parent
        while parent != SUPPLY_ID:
            chain.append(parent)
            parent = self.by_id[parent].parent
        return tuple(chain)

    def descendants(self, circuit_id: str) -> list[str]:
        """Ids of every circuit below this one, in study order."""
        below: set[str] = set()
        todo = list(self.children.get(circuit_id, ()))
        while todo:
            cid = todo.pop()
            below.add(cid)
            todo.extend(self.children.get(cid, ()))
        return [c.id for c in self.circuits if c.id in below]

    def is_final(self, circuit_id: str) -> bool:
        """A final circuit: said so in the study, or else one that feeds no board."""
        c = self.by_id[circuit_id]
        return c.final if c.final is not None else not self.children.get(circuit_id)

    def board_name(self, circuit_id: str) -> str:
        """Name of the board a circuit's device sits on (its parent's board, or the origin)."""
        parent = self.by_id[circuit_id].parent
        if parent == SUPPLY_ID:
            return "origin"
        return self.by_id[parent].board or parent

    def basis_of(self, circuit_id: str) -> str:
        """The band basis used for this circuit's device in selectivity."""
        c = self.by_id[circuit_id]
        return c.basis or self.basis

    def pair_settings(self, downstream_id: str) -> tuple[Any, Any, Any]:
        """Margin [-], interval [s] and required limit [A] of the pairs where a circuit is
        downstream: the circuit's own, else the study's (``selective_to_a`` None: total).

        As written in the study (the engine checks them, with the circuit named).

        Examples
        --------
        >>> c = Circuit("lights", "supply", "B10", margin=1.2)
        >>> s = Study("demo", Supply(pfc_a=6000.0), (c,), interval_s=0.1)
        >>> print(s.pair_settings("lights"))
        (1.2, 0.1, None)
        """
        c = self.by_id[downstream_id]
        margin = c.margin if c.margin is not None else self.margin
        interval = c.interval_s if c.interval_s is not None else self.interval_s
        return margin, interval, c.selective_to_a
