"""The chooser's problem for one circuit: the study, the fault levels, the circuit, the pairs
below and above it, the fault it must break, and the screen's precomputed needs (frozen); and the
state of one search over it (mutable, apart).

References
----------
IEC 60364-4-43:2008, 433.1 and 434.5.1; IEC 60947-2:2016, Annex A.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from coordination.choose.candidates import FAMILIES, family_of, normalise_family
from coordination.choose.screening import ADJUSTABLE, TESTABLE_S, clamped_lower, need_of, short_of
from coordination.criterion import breaking_duty
from coordination.model import Study
from curves.band import Band, merged_grid
from curves.errors import InputError

#: Points on the common current grid of the vectorised selectivity screen.
GRID_POINTS = 480


#: Relative offset of the grid point just below each required current (the screen tests
#: strictly below a requirement, see :func:`short_of`).
SCREEN_EDGE = 1e-6


#: Screened settings of one grid confirmed exactly at most (the screen uses the same model,
#: so the first one nearly always passes).
MAX_CONFIRM = 200


#: The order in which requirements are tried; the first one a candidate fails is its reason.
STAGES = ("load", "overload", "breaking-capacity", "disconnection", "fault-energy",
          "selectivity-below", "selectivity-above")


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
class Pair:
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
class SearchState:
    """What one search over a :class:`Problem` has spent and learnt (the problem itself is
    frozen). A remedy's search runs on a state of its own that shares ``energy_limits``."""

    searched: int = 0  # candidates ruled in or out
    # fault-energy cases a candidate failed: (current [A], largest I2t the conductor takes
    # [A2s]); they belong to the circuit, so the screen applies them to every later setting
    energy_limits: list[tuple[float, float]] = field(default_factory=list)
    explain_budget: int = 1 << 30  # settings grids whose failure is explained when none passes
    max_confirm: int = MAX_CONFIRM  # screened settings of one grid confirmed exactly at most


@dataclass(frozen=True)
class Problem:
    """One circuit's choice: the study, its fault levels, the circuit, the pairs below and above
    it, the fault it must break, and the screen's needs on one current grid. A remedy's search
    runs on a copy (``dataclasses.replace``) with requirements relaxed or pairs set aside."""

    study: Study
    levels: Any
    circuit_id: str
    family: str
    basis: str
    ib_a: float | None
    iz_a: float | None
    ik_board_a: float
    ik_break_a: float  # the fault the device must break (criterion.breaking_duty) [A]
    below: tuple[Pair, ...]
    above: tuple[Pair, ...]
    grid: np.ndarray
    need: np.ndarray  # (2, n_grid): the devices below need t_min_U >= this (non-adj, adjustable)
    above_tmin: np.ndarray  # (n_above, n_grid): the devices above, lower edges clamped
    above_adjustable: np.ndarray  # (n_above,) bool
    below_names: Mapping[str, str] = field(default_factory=dict)
    skip_above: frozenset[str] = frozenset()
    relaxed: frozenset[str] = frozenset()  # requirements set aside to test a remedy (STAGES)
    testable_below: bool = False  # pairs below that only a test could decide count as met
    testable_above: bool = False  # pairs above that only a test could decide count as met
    # the need of the devices below only where a tested limit could not help (see TESTABLE_S)
    need_untestable: np.ndarray | None = None
    state: SearchState = field(default_factory=SearchState, compare=False)
    # the standby sources' cases (coordination.standby.SupplyCase): every candidate must meet
    # the requirements on each source that feeds the circuit too
    cases: tuple[Any, ...] = ()

    def band(self, spec: str | Mapping[str, Any], basis: str) -> Band:
        """A candidate's band as the circuit uses it: on a motor circuit with an overload
        relay, joined with the relay (:func:`coordination.devices.circuit_band`)."""
        from coordination.devices import circuit_band

        return circuit_band(self.study.by_id[self.circuit_id], spec, basis)


def build_problem(study: Study, levels: Any, circuit_id: str, family: str | None,
                  skip_above: frozenset[str] = frozenset()) -> tuple[Problem, Band]:
    """One circuit's problem, and its present device's band (the device alone: a motor's
    overload relay is joined to each candidate by :meth:`Problem.band`).

    Raises
    ------
    InputError
        No such circuit, an unknown family, or a datasheet device with no family given.
    """
    if circuit_id not in study.by_id:
        raise InputError(f"no circuit {circuit_id!r} in the study; circuits: "
                         f"{', '.join(list(study.by_id)[:12])}", key="--circuit")
    from coordination.devices import band_for, device_band

    circuit = study.by_id[circuit_id]
    if circuit.device is None:
        from coordination.devices import overcurrent_owner

        raise InputError(f"circuit {circuit_id!r} is a residual-current switch (rcd without "
                         "device): it has no overcurrent device to choose; its protection is "
                         f"the device of {overcurrent_owner(study, circuit_id)!r}",
                         circuit=circuit_id, key="--circuit")
    basis = study.basis_of(circuit_id)
    band_for(study, circuit_id, basis)  # the circuit's device checked, its circuit named
    current = device_band(circuit.device, basis)  # the device itself, a motor's relay aside
    if family is None:
        fam = family_of(current)
        if fam is None:
            raise InputError(f"the device {current.name!r} is given as datasheet points, so it "
                             f"has no series to search; give --family (allowed: "
                             f"{', '.join(FAMILIES)})", circuit=circuit_id, key="--family")
    else:
        fam = normalise_family(family)
    if fam == "electronic" and has_relay(study, circuit_id):
        raise InputError("electronic breakers are not searched for a motor circuit with an "
                         "overload relay (their settings grid is screened without the relay); "
                         "give --family tm, aM, gG, B, C or D", circuit=circuit_id,
                         key="--family")
    nodes = levels.by_circuit
    node = nodes[circuit_id]
    ik_board = float(node.ik_max_a)
    ik_break = breaking_duty(node, circuit.phases)[0]
    iz = circuit.cable.iz_a if circuit.cable is not None else None

    below: list[Pair] = []
    seen: dict[tuple, int] = {}
    for d in study.descendants(circuit_id):
        if study.by_id[d].device is None:
            continue  # an RCCB: no overcurrent device to be selective with
        band = band_for(study, d)
        margin, interval, selective_to = study.pair_settings(d)
        margin, interval = float(margin), float(interval)
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
        below.append(Pair(d, band, window, required, margin, interval,
                           float(tested) if tested is not None else None))

    above: list[Pair] = []
    margin_c, interval_c, selective_to_c = study.pair_settings(circuit_id)
    margin_c, interval_c = float(margin_c), float(interval_c)
    required_c = min(ik_board, float(selective_to_c)) if selective_to_c is not None else ik_board
    for a in study.ancestors(circuit_id):
        if a in skip_above or study.by_id[a].device is None:  # to be chosen afterwards,
            continue  # seeing this choice; or an RCCB, with no overcurrent device
        tested = circuit.tested_limits_a.get(a)
        above.append(Pair(a, band_for(study, a), (0.0, ik_board), required_c, margin_c,
                           interval_c, float(tested) if tested is not None else None))

    lows = [p.window_a[0] for p in below] + [max(1.0, (circuit.load_a or 1.0))]
    highs = [p.window_a[1] for p in below] + [ik_board, 10.0]
    grid = np.geomspace(max(min(lows) * 0.9, 0.5), max(highs), GRID_POINTS)
    tops = np.asarray([p.required_a for p in below] + [required_c], dtype=float)
    extra = np.concatenate([[p.window_a[0] for p in below], tops, tops * (1 - SCREEN_EDGE)])
    grid = merged_grid(grid, extra)

    need = np.full((2, grid.size), -np.inf)
    need_untestable = need.copy()
    for p in below:
        inside = (grid >= p.window_a[0]) & short_of(grid, p.required_a)
        # a tested limit applies to the present device only (exact_failure); every other
        # candidate is judged by the curves, so the screen is too, and the present device is
        # let through the screen on its own (present_in)
        t_max = np.asarray(p.band.t_max(grid), dtype=float)
        # where the device below may take longer than TESTABLE_S a crossing is one of
        # time-current curves (upper edges fall with the current, so a crossing at or below
        # such a current is too), which no tested limit moves
        untestable = inside & (t_max > TESTABLE_S * (1 + 1e-9))
        for row, adjustable in enumerate((False, True)):
            n = need_of(t_max, p.margin, p.interval_s, adjustable)
            need[row] = np.where(inside, np.maximum(need[row], n), need[row])
            need_untestable[row] = np.where(untestable, np.maximum(need_untestable[row], n),
                                            need_untestable[row])
    above_tmin = np.array([clamped_lower(p.band, grid) for p in above]).reshape(len(above),
                                                                                grid.size)
    above_adj = np.array([p.band.family in ADJUSTABLE for p in above], dtype=bool)
    problem = Problem(study, levels, circuit_id, fam, basis,
                      float(circuit.load_a) if circuit.load_a is not None else None,
                      float(iz) if iz is not None else None, ik_board, ik_break, tuple(below),
                      tuple(above), grid, need, above_tmin, above_adj,
                      below_names={p.other: p.band.name for p in below},
                      skip_above=skip_above, need_untestable=need_untestable,
                      cases=_cases(study))
    return problem, current


def has_relay(study: Study, circuit_id: str) -> bool:
    """The circuit feeds a motor with an overload relay (IEC 60947-4-1)."""
    motor = study.by_id[circuit_id].motor
    return motor is not None and motor.relay_class is not None


def _cases(study: Study) -> tuple[Any, ...]:
    """The fault levels of every standby source of the study (none without one)."""
    if not study.supply.standby:
        return ()
    from coordination.standby import case_levels

    return tuple(case_levels(study, source) for source in study.supply.standby)


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


def with_circuits(study: Study, changes: Mapping[str, Mapping[str, Any]]) -> Study:
    """A copy of the study with some circuits' fields replaced."""
    circuits = tuple(dataclasses.replace(c, **changes[c.id]) if c.id in changes else c
                     for c in study.circuits)
    return dataclasses.replace(study, circuits=circuits)


def rebuilt(problem: Problem, study: Study, family: str | None = None) -> tuple[
        Problem, Band]:
    """The same circuit's problem in a changed study (or for another family)."""
    return build_problem(study, problem.levels, problem.circuit_id,
                         family if family is not None else problem.family, problem.skip_above)
