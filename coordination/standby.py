"""Supply cases: the normal supply, and each standby generator on the board it feeds.

A standby source (``[[supply.standby]]``, :class:`coordination.generator.StandbySource`) takes
over one board through a changeover: the board that its ``feeds`` circuit supplies (by default
the incomer's board; the origin where several circuits leave it). Every circuit below that board
is then fed by the generator alone, whose fault current decays (:mod:`coordination.generator`).
For each such source this module gives one case:

* fault levels (:func:`case_levels`): each fed circuit's :class:`~coordination.faults.NodeFaults`
  with the faults' initial (subtransient) currents, and the decrements behind them
  (:class:`CaseNode`): the maximum faults at the circuit's board (c_max, K_G, conductors at
  20 degC) and the minimum faults at its far end (c_min, conductors at their maximum operating
  temperature), as :mod:`coordination.faults` takes them for the normal supply;
* selectivity (:func:`case_pairs`): every fed circuit under every fed circuit above it, by
  :func:`coordination.decay.compare_decaying` over the decaying faults at and beyond its board;
* protection checks (:func:`case_checks`): disconnection (the envelope's clearing time under the
  decaying minimum earth fault at the far end, against IEC 60364-4-41 Table 41.1), fault energy
  (the energy of the decaying current up to the envelope's clearing time) and breaking capacity
  (the initial current). Overload does not depend on the source and is checked once, on the
  normal supply.

Assumptions (each in the case's convention, which every output carries):

* The generator's connection to the changeover is not included: its impedance would lower every
  current (give the generator's cable as part of the circuit it feeds where it matters).
* The generator's star point is earthed at the installation's main earthing terminal (TN): the
  earth-fault loop is the generator's symmetrical-components loop plus the installation's line
  and protective conductors; under a TT supply the supply's Ze is added as the earth path.

References
----------
IEC 60909-0:2016, 6.6.1, 7.1.2, 7.2.2, 7.2.4; IEC 60364-4-41:2005, 411.3.2 and Table 41.1;
IEC 60364-4-43:2008, 434.5.1 and 434.5.2; IEC 60947-2:2016, Annex A.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, replace
from types import MappingProxyType
from typing import Any

import numpy as np

from coordination import criterion, decay, generator
from coordination.checks.breaking_capacity import _breaking_capacity
from coordination.checks.common import _Edges, a_text, s_text
from coordination.checks.disconnection import _disconnection_limit
from coordination.checks.fault_energy import _fault_energy
from coordination.checks.residual_checks import rcd_earth_fault_a, rcd_reason
from coordination.checks.results import CheckResult, _result
from coordination.decay import FaultFamily
from coordination.faults import (
    NODE_FIELDS,
    FaultLevels,
    NodeFaults,
    _own,
    path_sums,
    split_impedance,
)
from coordination.generator import Decrement, StandbySource
from coordination.model import SUPPLY_ID, Study
from coordination.residual import RcdClearing, rcds_breaking
from curves.band import Band
from curves.errors import InputError

#: The case of the normal supply.
NORMAL = "normal"
#: The checks run under a standby case (overload does not depend on the source).
CASE_CHECKS = ("disconnection", "fault-energy", "breaking-capacity")


# -- which circuits a source feeds ---------------------------------------------------------------
def feeding_point(study: Study, source: StandbySource) -> str:
    """The circuit whose board the source supplies, or ``"supply"`` for the origin.

    ``feeds`` when given; else the incomer (the one circuit fed from the supply), or the origin
    where several circuits leave it.

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=16000.0), (Circuit("in", "supply", "gG200"),
    ...                                        Circuit("a", "in", "B16")))
    >>> g = StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3, 5)
    >>> print(feeding_point(s, g))
    in
    """
    if source.feeds is not None:
        if source.feeds != SUPPLY_ID and source.feeds not in study.by_id:
            raise InputError(f"no circuit {source.feeds!r} to feed; give a circuit id or "
                             f"'{SUPPLY_ID}'", key=f"supply.standby.{source.name}.feeds")
        return source.feeds
    roots = study.children.get(SUPPLY_ID, ())
    return roots[0] if len(roots) == 1 else SUPPLY_ID


def fed_circuits(study: Study, source: StandbySource) -> tuple[str, ...]:
    """Ids of the circuits the source feeds (every circuit below its board), in study order."""
    point = feeding_point(study, source)
    if point == SUPPLY_ID:
        return tuple(c.id for c in study.circuits)
    return tuple(study.descendants(point))


# -- fault levels --------------------------------------------------------------------------------
@dataclass(frozen=True)
class CaseNode:
    """The decaying faults of one circuit under a standby source.

    Attributes
    ----------
    circuit : str
    window : FaultFamily
        The maximum faults at and beyond the circuit's board (three-phase for a three-phase
        circuit, line-neutral for a single-phase one): its selectivity window.
    three_phase_board, loop_board, earth_board : Decrement
        The maximum three-phase, line-neutral and earth faults at the circuit's board.
    earth_end, short_end : Decrement
        The minimum earth fault and the minimum short circuit at its far end.
    short_end_kind : str
        ``"line-neutral"`` or ``"line-line"`` (a three-phase cable without neutral).
    """

    circuit: str
    window: FaultFamily
    three_phase_board: Decrement
    loop_board: Decrement
    earth_board: Decrement
    earth_end: Decrement
    short_end: Decrement
    short_end_kind: str


@dataclass(frozen=True)
class SupplyCase:
    """One standby source's case: what it feeds and its fault levels.

    Attributes
    ----------
    name : str
        The source's name (the ``case`` of its results).
    source : StandbySource
    feeds : str
        The circuit whose board it supplies, or ``"supply"`` (the origin).
    circuits : tuple of str
        The circuits it feeds, in study order.
    levels : FaultLevels
        Their fault levels, initial (subtransient) currents.
    nodes : mapping
        :class:`CaseNode` by circuit id.
    """

    name: str
    source: StandbySource
    feeds: str
    circuits: tuple[str, ...]
    levels: FaultLevels
    nodes: Mapping[str, CaseNode]

    def to_json(self) -> dict[str, Any]:
        """The case's fault levels: ``case``, ``feeds``, the source's data, nodes (each with
        ``case`` and the transient and sustained currents of its decaying faults)."""
        src = self.source
        nodes = []
        for node in self.levels.nodes:
            row = {"case": self.name, **node.to_json()}
            deca = self.nodes[node.circuit]
            for key, d in (("ik_max", window_decrement(deca)), ("ief_min", deca.earth_end),
                           ("ief_max_board", deca.earth_board)):
                row[f"{key}_transient_a"] = float(np.asarray(d.i_trans_a))
                row[f"{key}_sustained_a"] = float(np.asarray(d.i_sust_a))
            nodes.append(row)
        return {"case": self.name, "feeds": self.feeds,
                "source": {"name": src.name, "rating_kva": src.rating_kva, "u0_v": src.u0_v,
                           "xd2_pct": src.xd2_pct, "xd1_pct": src.xd1_pct, "td2_s": src.td2_s,
                           "td1_s": src.td1_s, "x0_pct": src.x0_pct,
                           "sustained_x": src.sustained_x,
                           "rated_current_a": src.rated_current_a},
                "nodes": nodes, "origin": self.levels.origin_json(),
                "convention": self.levels.convention}


def window_decrement(node: CaseNode) -> Decrement:
    """The bolted fault at the circuit's board, the top of its window, as it decays."""
    return node.window.at_initial_a(node.window.bolted_a)


def _finite(value: Any) -> float | None:
    """A current, or None where it does not exist (no line-neutral loop beyond a cable without
    neutral), as :func:`coordination.faults.compute` gives it."""
    value = float(value)
    return value if math.isfinite(value) else None


def case_convention(study: Study, source: StandbySource) -> str:
    """The conventions of a standby case, in words (printed with every table and in the JSON).

    Examples
    --------
    >>> from coordination.model import Supply
    >>> s = Study("t", Supply(pfc_a=16000.0), ())
    >>> print("T''d" in case_convention(s, StandbySource("g", 500, 230, 12, 25, 0.02, 0.3, 5)))
    True
    """
    supply = study.supply
    support = (f"sustained current {source.sustained_x:g} x rated current (excitation support)"
               if source.sustained_x > 0 else
               "no sustained current (no excitation support: the current decays to zero)")
    return (
        f"standby source {source.name!r}: {source.rating_kva:g} kVA, x''d {source.xd2_pct:g} %, "
        f"x'd {source.xd1_pct:g} %, x0 {source.x0_pct:g} %, T''d {source.td2_s:g} s, "
        f"T'd {source.td1_s:g} s, {support}. IEC 60909-0: Z_G = R_G + jX''d with "
        f"R_G = {generator.R_G_FRACTION:g} X''d, K_G = (Un/UrG) c_max / (1 + x''d sin phi) "
        f"(cos phi {math.sqrt(1 - generator.SIN_PHI_RATED ** 2):g}) on maximum currents; "
        "earth and line-neutral faults through (Z1 + Z2 + Z0)/3 with Z2 = Z1 (symmetrical "
        "components). Currents shown are initial (subtransient) values; each decays as "
        "I(t) = (I'' - I') e^(-t/T''d) + (I' - Ik) e^(-t/T'd) + Ik with the terminal time "
        "constants (an outside impedance slows the decay: the fastest decay is taken). "
        f"Maximum currents at each circuit's board: c_max = {supply.c_max:g}, conductors at "
        f"20 degC; minimum currents at its far end: c_min = {supply.c_min:g}, conductors at "
        "maximum operating temperature. Operating times are read where the decaying current "
        "meets a device's edge (common practice); a device whose edge it never meets does not "
        "operate. Not included: the generator's connection to the changeover (it would lower "
        "every current)."
    )


def case_levels(study: Study, source: StandbySource) -> SupplyCase:
    """The fault levels of the circuits a standby source feeds.

    Parameters
    ----------
    study : Study
        The installation (a three-phase supply).
    source : StandbySource
        The generator.

    Returns
    -------
    SupplyCase

    References
    ----------
    IEC 60909-0:2016, 6.6.1 (generator impedances, K_G), 7.1.2, 7.2.2, 7.2.4; IEC 60228:2004
    Table 2 (conductors, as :func:`coordination.faults.compute`).

    Examples
    --------
    >>> from coordination.model import Cable, Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=16000.0), (
    ...     Circuit("in", "supply", "gG200"),
    ...     Circuit("a", "in", "B16", phases=1, cable=Cable(20, 2.5, 1.5))))
    >>> case = case_levels(s, StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3, 5))
    >>> print(case.circuits, round(case.levels.by_circuit["a"].ief_min_a))
    ('a',) 439
    """
    supply = study.supply
    if supply.phases != 3:
        raise InputError("a standby generator needs a three-phase supply (phases = 3)",
                         key=f"supply.standby.{source.name}")
    point = feeding_point(study, source)
    fed = fed_circuits(study, source)
    circuits = study.circuits
    n = len(circuits)
    index = {c.id: i for i, c in enumerate(circuits)}
    parent = np.array([index.get(c.parent, n) for c in circuits] + [n], dtype=np.intp)
    own = np.zeros((6, n + 1), dtype=complex)
    for i, c in enumerate(circuits):
        own[:, i] = _own(c.cable, c.ring)[:6]
    total = path_sums(own, parent)
    origin = np.zeros(6, dtype=complex) if point == SUPPLY_ID else total[:, index[point]]
    rows = np.array([index[c] for c in fed], dtype=np.intp)
    at_end = total[:, rows] - origin[:, np.newaxis]
    at_board = total[:, parent[rows]] - origin[:, np.newaxis]
    u0, c_max, c_min = supply.u0_v, supply.c_max, supply.c_min
    z_max = generator.generator_impedances(source, u_n0_v=u0, c=c_max, maximum=True,
                                           c_max=c_max)
    z_min = generator.generator_impedances(source, u_n0_v=u0, c=c_min, maximum=False,
                                           c_max=c_max)
    three_max = generator.stage_loops(z_max, "three-phase")
    loop_max = generator.stage_loops(z_max, "loop")
    loop_min = generator.stage_loops(z_min, "loop")
    ll_min = generator.stage_loops(z_min, "line-line")
    tt = str(supply.earthing).upper().startswith("TT")
    earth_extra = (split_impedance(float(supply.ze_ohm), supply.x_r)
                   if tt and supply.ze_ohm is not None else 0j)
    v_max, v_min = c_max * u0, c_min * u0
    v_ll = generator.driving_voltage_v(u0, c_min, "line-line")
    td2, td1 = source.td2_s, source.td1_s

    def decrement(loops: tuple, path: Any, voltage: float, arithmetic: bool = False
                  ) -> Decrement:
        return Decrement(*generator.stage_currents_a(loops, path, voltage,
                                                     arithmetic=arithmetic), td2, td1)

    with np.errstate(invalid="ignore", divide="ignore"):
        three_board = decrement(three_max, at_board[0], v_max)
        loop_board = decrement(loop_max, at_board[1], v_max)
        earth_board = decrement(loop_max, at_board[5] + earth_extra, v_max)
        # the minimum earth loop as the normal supply's: Zs = Ze + |R1 + R2 + j(X1 + X2)|
        earth_end = decrement(loop_min, np.abs(at_end[4]) + abs(earth_extra), v_min,
                              arithmetic=True)
        ln_end = decrement(loop_min, at_end[3], v_min)
        ll_end = decrement(ll_min, 2 * at_end[2], v_ll)
        three_end = generator.stage_currents_a(three_max, at_end[0], v_max)[0]
        loop_end = generator.stage_currents_a(loop_max, at_end[1], v_max)[0]
        zs_end = abs(loop_min[0]) + abs(earth_extra) + np.abs(at_end[4])
        zs_board = abs(loop_min[0]) + abs(earth_extra) + np.abs(at_board[4])
        z_ln_end = np.abs(loop_min[0] + at_end[3])
    has_ln = np.isfinite(np.asarray(ln_end.i_sub_a)) & (np.asarray(ln_end.i_sub_a) > 0)

    nodes: list[NodeFaults] = []
    decrements: dict[str, CaseNode] = {}
    for k, cid in enumerate(fed):
        circuit = study.by_id[cid]
        three = circuit.phases == 3

        def pick(d: Decrement, k: int = k) -> Decrement:
            return Decrement(*(float(np.asarray(x)[k]) for x in (d.i_sub_a, d.i_trans_a,
                                                                 d.i_sust_a)), td2, td1)

        short = pick(ln_end) if has_ln[k] else pick(ll_end)
        window = FaultFamily(three_max if three else loop_max,
                             complex(at_board[0 if three else 1][k]), v_max, td2, td1)
        case_node = CaseNode(cid, window, pick(three_board), pick(loop_board),
                             pick(earth_board), pick(earth_end), short,
                             "line-neutral" if has_ln[k] else "line-line")
        decrements[cid] = case_node
        ik3 = float(case_node.three_phase_board.i_sub_a)
        ik1 = float(case_node.loop_board.i_sub_a)
        ief_min_board = v_min / float(zs_board[k])
        values = {
            "circuit": cid, "board": study.board_name(cid), "phases": circuit.phases,
            "ik3_max_a": ik3, "ik1_max_a": _finite(ik1), "ik_max_a": ik3 if three else ik1,
            "ief_min_a": float(case_node.earth_end.i_sub_a), "zs_ohm": float(zs_end[k]),
            "ik_min_end_a": float(short.i_sub_a), "ik_min_end_kind": case_node.short_end_kind,
            "ik3_max_end_a": float(three_end[k]), "ik1_max_end_a": _finite(loop_end[k]),
            "ik_max_end_a": float(three_end[k] if three else loop_end[k]),
            "zs_board_ohm": float(zs_board[k]), "ief_min_board_a": ief_min_board,
            "r1_r2_ohm": _own(circuit.cable, circuit.ring)[6],
            "z_ln_end_ohm": float(z_ln_end[k]) if has_ln[k] else None,
            "ief_max_board_a": max(float(case_node.earth_board.i_sub_a), ief_min_board),
        }
        nodes.append(NodeFaults(*(values[name] for name in NODE_FIELDS)))
    z_terminal = generator.stage_currents_a(three_max, 0j, v_max)[0]
    levels = FaultLevels(
        nodes=tuple(nodes), origin_ik3_a=float(z_terminal),
        origin_ik1_a=float(generator.stage_currents_a(loop_max, 0j, v_max)[0]),
        ze_ohm=float(abs(loop_min[0] + earth_extra)),
        convention=case_convention(study, source), u0_v=u0, c_max=c_max, c_min=c_min,
        source=(f"standby generator {source.name!r} {source.rating_kva:g} kVA on the board of "
                f"{'the origin' if point == SUPPLY_ID else repr(point)}"),
        k_t=None)
    return SupplyCase(source.name, source, point, fed, levels, MappingProxyType(decrements))


# -- protection checks ---------------------------------------------------------------------------
def _stages_text(d: Decrement) -> str:
    """``"2.1 kA at first, 1.9 kA transient, 0 A sustained"``."""
    return (f"{a_text(float(d.i_sub_a))} at first, {a_text(float(d.i_trans_a))} transient, "
            f"{a_text(float(d.i_sust_a))} sustained")


def _energies_a2s(band: Band, d: Decrement, t_s: np.ndarray) -> np.ndarray:
    """The energy a device lets through decaying faults cleared by ``t_s`` [A2s]: each
    decrement's ``integral of I^2 dt`` up to then, and no more than the device's let-through at
    the initial current where it limits current (the current never exceeds it); ``inf`` for a
    fault never cleared."""
    with np.errstate(invalid="ignore", over="ignore"):
        energy = np.where(np.isfinite(t_s), d.i2t_a2s(np.where(np.isfinite(t_s), t_s, 0.0)),
                          np.inf)
    if band.let_through is not None:
        energy = np.minimum(energy, np.asarray(band.let_through(np.asarray(d.i_sub_a)),
                                               dtype=float))
    return energy


#: The constant-current words for a fault a device never clears (checks.common._never).
_NEVER_WORDS = re.compile(r" \(below its pickup[^)]*\)")


class _DecayEdges(_Edges):
    """The checks' edges read under a case: at each of a node's initial currents, the clearing
    time and energy of the decaying fault behind it (``inf``, never, for a current not given)."""

    def __init__(self, values: Mapping[Band, Mapping[float, tuple[float, float]]],
                 decrements: Mapping[float, Sequence[Decrement]]) -> None:
        self._values = {band: dict(v) for band, v in values.items()}
        self._decrements = {i: tuple(d) for i, d in decrements.items()}

    def t_max(self, band: Band, i: float) -> float:
        pair = self._pair(band, i)
        return math.inf if pair is None else pair[0]

    def residual_time(self, band: Any, i: float) -> float:
        """An RCD's break time under the decaying fault of initial current ``i`` [s]: where the
        decrement meets its upper edge (the latest of the faults with that initial current;
        ``inf`` for a current not given)."""
        faults = self._decrements.get(i, ())
        return max((float(decay.operating_time_s(band.t_max, d)[0]) for d in faults),
                   default=math.inf)


def _node_decrements(case_node: CaseNode, node: NodeFaults) -> list[tuple[float, Decrement]]:
    """Each initial current the checks read at a node, with its decrement."""
    items = [(node.ik3_max_a, case_node.three_phase_board), (node.ik1_max_a, case_node.loop_board),
             (node.ik_max_a, window_decrement(case_node)),
             (node.ief_max_board_a, case_node.earth_board),
             (node.ief_min_a, case_node.earth_end), (node.ik_min_end_a, case_node.short_end)]
    return [(float(i), d) for i, d in items if i is not None and math.isfinite(i) and i > 0]


def case_edges(case: SupplyCase, items: Iterable[tuple[str, Band]]) -> _DecayEdges:
    """The clearing times and energies of devices under the case's faults of their circuits:
    ``(circuit id, band)`` items, one vectorised search per distinct band."""
    wanted: dict[Band, list[tuple[float, Decrement]]] = {}
    decrements: dict[float, list[Decrement]] = {}
    for cid, band in items:
        node = case.levels.by_circuit[cid]
        rows = _node_decrements(case.nodes[cid], node)
        wanted.setdefault(band, []).extend(rows)
        for i, d in rows:
            decrements.setdefault(i, []).append(d)
    values: dict[Band, dict[float, tuple[float, float]]] = {}
    for band, rows in wanted.items():
        d = Decrement(*(np.array([float(getattr(r, name)) for _, r in rows])
                        for name in ("i_sub_a", "i_trans_a", "i_sust_a")),
                      rows[0][1].td2_s, rows[0][1].td1_s)
        t = decay.clearing_time_s(band, d)
        energy = _energies_a2s(band, d, t)
        mine = values.setdefault(band, {})
        for (i, _), t_k, e_k in zip(rows, t.tolist(), energy.tolist(), strict=True):
            # two faults with one initial current: the later clearing and the larger energy
            old = mine.get(i)
            mine[i] = (t_k, e_k) if old is None else (max(old[0], t_k), max(old[1], e_k))
    return _DecayEdges(values, decrements)


def _disconnection(study: Study, case: SupplyCase, cid: str, band: Band,
                   edges: _DecayEdges) -> CheckResult:
    limit, what, source, final = _disconnection_limit(study, cid, band)
    node = case.levels.by_circuit[cid]
    d = case.nodes[cid].earth_end
    ief = float(node.ief_min_a)
    t = edges.t_max(band, ief)
    ok = t <= limit
    fault = f"the minimum earth fault at the far end ({_stages_text(d)})"
    if ok:
        reason = (f"{band.name} clears {fault} within {s_text(t)}, limit {s_text(limit)} "
                  f"({what})")
    elif math.isfinite(t):
        reason = (f"{band.name} may take {s_text(t)} to clear {fault}, limit {s_text(limit)} "
                  f"({what}); choose a faster or smaller device, enlarge the conductors, use "
                  "an RCD, or a generator with excitation support")
    else:
        reason = (f"{band.name} never clears {fault}: the current falls below what the device "
                  f"needs before it operates, limit {s_text(limit)} ({what}); choose a faster "
                  "or smaller device, enlarge the conductors, use an RCD, or a generator with "
                  "excitation support")
    details = {"current_a": ief, "transient_a": float(d.i_trans_a),
               "sustained_a": float(d.i_sust_a), "zs_ohm": float(node.zs_ohm), "final": final,
               "circuit_class": what, "source": source,
               "assumption": "operating time read where the decaying current meets the "
                             "envelope's upper edge (common practice)"}
    relied = None if ok else _rcd_clearing(study, cid, d, limit)
    if relied is not None:  # IEC 60364-4-41 411.4.5 (TN), 411.5 (TT)
        ok, t = True, relied.t_s
        reason = rcd_reason(relied, cid, f"{band.name} alone would not: {reason}")
        details.update({"rcd_circuit": relied.circuit, "rcd_device": relied.band.name,
                        "rcd_current_a": relied.current_a})
    return replace(_result(cid, "disconnection", ok, t, limit, "s", reason, band, details,
                           study.rule_set), case=case.name)


def _rcd_clearing(study: Study, cid: str, d: Decrement, limit_s: float) -> Any:
    """The nearest RCD on the circuit's path that clears its decaying minimum earth fault in
    time (its upper edge met by the decrement, as for an overcurrent device), else None."""
    i0 = float(d.i_sub_a)
    if not i0 > 0:
        return None
    current = rcd_earth_fault_a(study, i0)  # in TT at most c_min U0 / RA
    scale = current / i0
    residual = Decrement(i0 * scale, float(d.i_trans_a) * scale, float(d.i_sust_a) * scale,
                         d.td2_s, d.td1_s)
    for rcd_cid, rcd_band in rcds_breaking(study, cid, current):
        t = float(decay.operating_time_s(rcd_band.t_max, residual)[0])
        if t <= limit_s:
            return RcdClearing(rcd_cid, rcd_band, current, t, limit_s, True)
    return None


def case_checks(study: Study, case: SupplyCase, circuit_id: str, band: Band,
                edges: _DecayEdges | None = None) -> tuple[CheckResult, ...]:
    """The protection checks of one fed circuit under a standby case.

    Parameters
    ----------
    study : Study
    case : SupplyCase
        From :func:`case_levels`.
    circuit_id : str
        A circuit the source feeds.
    band : Band
        Its device, on the envelope basis.
    edges : optional
        :func:`case_edges` of the case's devices, when the caller has them (:func:`run_checks`
        finds them for every circuit at once).

    Returns
    -------
    tuple of CheckResult
        Disconnection, fault energy (where the circuit has a cable) and breaking capacity, each
        with ``case`` the source's name.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2 and Table 41.1; IEC 60364-4-43:2008, 434.5.1, 434.5.2;
    IEC 60364-5-54:2011, 543.1.2.
    """
    node = case.levels.by_circuit[circuit_id]
    try:
        if edges is None:
            edges = case_edges(case, [(circuit_id, band)])
        out: list[CheckResult] = [_disconnection(study, case, circuit_id, band, edges)]
        energy = _fault_energy(study, circuit_id, band, node, _overload_protected(study,
                                                                                 circuit_id,
                                                                                 band), edges)
        if energy is not None:
            # "never cleared" means here that the decaying current falls away first
            out.append(replace(energy, reason=_NEVER_WORDS.sub(
                " (the decaying current falls away before it operates)", energy.reason)))
        if study.by_id[circuit_id].device is not None:  # an RCCB breaks no fault current
            out.append(_breaking_capacity(study, circuit_id, band, node))
    except InputError as error:
        if error.key is not None and error.key.startswith("supply"):
            raise
        raise error.within(circuit=circuit_id) from None
    return tuple(r if r.case == case.name else replace(r, case=case.name) for r in out)


def _overload_protected(study: Study, circuit_id: str, band: Band) -> bool:
    """The line conductors are protected against overload (IEC 60364-4-43, 435.1), as the
    normal checks read it."""
    from coordination.checks.overload import _overload

    circuit = study.by_id[circuit_id]
    result = _overload(study, circuit_id, band)
    return (result is not None and result.ok and circuit.cable is not None
            and circuit.cable.iz_a is not None)


def run_checks(study: Study, case: SupplyCase) -> tuple[CheckResult, ...]:
    """Every fed circuit's checks under a case, in study order, on the envelope basis."""
    from coordination.devices import band_for

    bands = {cid: band_for(study, cid, basis="envelope") for cid in case.circuits}
    edges = case_edges(case, bands.items())
    out: list[CheckResult] = []
    for cid, band in bands.items():
        out.extend(case_checks(study, case, cid, band, edges))
    return tuple(out)


# -- selectivity -----------------------------------------------------------------------------------
def case_pairs(study: Study, case: SupplyCase, *, basis: str | None = None) -> tuple[Any, ...]:
    """Every fed circuit under every fed circuit above it, under a standby case.

    Parameters
    ----------
    study : Study
    case : SupplyCase
    basis : str, optional
        As :func:`coordination.engine.analyse`.

    Returns
    -------
    tuple of PairResult
        One per pair (no runs of alike ancestors), with ``case`` the source's name; the limit
        and window in initial (subtransient) currents.

    References
    ----------
    IEC 60947-2:2016, Annex A; the decrement's crossing with the bands: common practice.
    """
    from coordination.devices import band_for
    from coordination.engine import PairResult

    fed = set(case.circuits)
    bands = {cid: band_for(study, cid, basis) for cid in case.circuits}
    memo: dict[tuple, decay.DecayingSelectivity] = {}
    out: list[PairResult] = []
    for cid in case.circuits:
        circuit = study.by_id[cid]
        if circuit.device is None:  # an RCCB has no overcurrent band (as engine.analyse)
            continue
        down = bands[cid]
        margin, interval, required = study.pair_settings(cid)
        family = case.nodes[cid].window
        top = family.bolted_a
        need = top if required is None else min(float(required), top)
        for up_id in study.ancestors(cid):
            if up_id not in fed:
                break
            if study.by_id[up_id].device is None:
                continue
            up = bands[up_id]
            tested = circuit.tested_limits_a.get(up_id)
            key = (up, down, family, float(margin), float(interval), tested)
            sel = memo.get(key)
            if sel is None:
                sel = decay.compare_decaying(up, down, family, margin=float(margin),
                                             interval_s=float(interval), tested_limit_a=tested)
                memo[key] = sel
            ok = criterion.requirement_met(sel.verdict, sel.limit_a, need)
            out.append(PairResult(
                upstream=up_id, downstream=cid, verdict=sel.verdict, limit_a=sel.limit_a,
                window_a=sel.window_a, decided_by=sel.decided_by, upstream_basis=up.basis,
                downstream_basis=down.basis, required_a=required, ok=ok,
                upstream_device=up.name, downstream_device=down.name, note=sel.note,
                time_s=sel.time_s, margin=float(margin), interval_s=float(interval),
                tested_limit_a=tested, upstream_last=up_id, upstream_count=1, case=case.name))
    return tuple(out)


# -- one case's assessment -------------------------------------------------------------------------
@dataclass(frozen=True)
class CaseAssessment:
    """What a study comes to on one standby source.

    Attributes
    ----------
    case : SupplyCase
        The source, what it feeds and its fault levels.
    analysis : Analysis
        The selectivity of every fed pair under it (``case`` on every pair).
    checks : tuple of CheckResult
        Disconnection, fault energy and breaking capacity of every fed circuit under it.
    ok : bool
        Every requirement met on this source.
    """

    case: SupplyCase
    analysis: Any
    checks: tuple[CheckResult, ...]
    ok: bool

    @property
    def name(self) -> str:
        """The case's name (the source's)."""
        return self.case.name


def assess_case(study: Study, source: StandbySource, basis: str | None = None) -> CaseAssessment:
    """Fault levels, selectivity and protection checks on one standby source.

    Parameters
    ----------
    study : Study
    source : StandbySource
        One of ``study.supply.standby``.
    basis : str, optional
        As :func:`coordination.engine.analyse` (the checks always take the envelope).

    Returns
    -------
    CaseAssessment

    References
    ----------
    IEC 60909-0:2016, 6.6.1; IEC 60947-2:2016, Annex A; IEC 60364-4-41:2005, Table 41.1;
    IEC 60364-4-43:2008, 434.5.

    Examples
    --------
    >>> from coordination.model import Cable, Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=16000.0), (
    ...     Circuit("in", "supply", "gG200"), Circuit("sub", "in", "gG63", cable=Cable(30, 16)),
    ...     Circuit("a", "sub", "B16", phases=1, cable=Cable(20, 2.5, 1.5))))
    >>> result = assess_case(s, StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3, 5))
    >>> print(result.name, len(result.analysis.pairs), result.analysis.pairs[0].case)
    gen 1 gen
    """
    from coordination.engine import Analysis

    case = case_levels(study, source)
    pairs = case_pairs(study, case, basis=basis)
    results = run_checks(study, case)
    by_down: dict[str, tuple[Any, ...]] = {}
    for p in pairs:
        by_down[p.downstream] = (*by_down.get(p.downstream, ()), p)
    analysis = Analysis(pairs, all(p.ok for p in pairs), basis, by_down)
    ok = bool(analysis.ok and all(r.ok for r in results))
    return CaseAssessment(case, analysis, results, ok)
