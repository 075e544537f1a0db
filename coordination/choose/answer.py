"""The chooser's answer: :func:`choose` for one circuit, :func:`choose_board` for a board from the
bottom up, and the printout.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

from coordination.choose.candidates import (
    FAMILY_NOUNS,
    Candidate,
    candidate_groups,
    num,
    spec_text,
)
from coordination.choose.exact import exact_failure
from coordination.choose.explain import why_nothing_fits
from coordination.choose.problem import Problem, build_problem, substitute, with_circuits
from coordination.choose.search import search_groups
from coordination.model import SUPPLY_ID, Study
from curves.errors import InputError


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


def _setting_bindings(problem: Problem, winner: Candidate) -> dict[str, str]:
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
        trial = {**spec, key: num(lower)}  # type: ignore[dict-item]
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
    problem, current = build_problem(study, levels, circuit_id, family, frozenset(skip_above))
    stated = study.by_id[circuit_id].breaking_capacity_a is not None
    groups = candidate_groups(problem.family, current, 0.0 if stated else problem.ik_break_a)
    previous = spec_text(study.by_id[circuit_id].device)
    winner, band, binding, failures = search_groups(problem, groups)
    if winner is None or band is None:
        reason, suggestions, insufficient = why_nothing_fits(problem, failures, groups, current)
        rcd_help = rcd_suggestion(study, levels, circuit_id, family, skip_above)
        if rcd_help is not None:
            suggestions = (*suggestions, rcd_help)
        return Choice(circuit_id, False, None, None, MappingProxyType({}), None, reason,
                      problem.family, None, suggestions, problem.state.searched, previous,
                      insufficient=insufficient)
    if binding is None:
        reason = f"{band.name} is the smallest {FAMILY_NOUNS[problem.family]} candidate and " \
                 f"meets every requirement"
    else:
        reason = f"{band.name} meets every requirement; the next smaller candidate " \
                 f"({binding.device}) fails {binding.text}"
    per_setting = _setting_bindings(problem, winner)
    own = band.settings.get("short_circuit", band.settings) \
        if band.family == "motor-circuit" else band.settings  # the device, not its relay
    rating = float(winner.rating_a) if band.family == "motor-circuit" else float(band.rating_a)
    return Choice(circuit_id, True, winner.spec, rating, MappingProxyType(dict(own)),
                  binding.text if binding is not None else None, reason, problem.family,
                  band.name, (), problem.state.searched, previous,
                  MappingProxyType(per_setting))


def choose_board(study: Study, board_id: str, *, family: str | None = None) -> tuple[Choice, ...]:
    """Choose every circuit that feeds a board, at or below ``board_id``, from the bottom up.

    Each choice sees the ones made before it: the chosen device is substituted into the study
    before the next, shallower circuit is chosen. Selectivity with a device above that is still
    to be chosen is left to that device's own choice. Where nothing fits, the present device
    stays.

    Parameters
    ----------
    board_id : str
        A board's name as printed, or the id of the circuit that feeds it (that circuit and
        every board below it); ``"supply"`` or ``"origin"`` for the whole study.

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
    from coordination.boards import feeder_of

    board_id = feeder_of(study, board_id)
    levels = faults.compute(study)
    inside = (set(study.by_id) if board_id == SUPPLY_ID
              else {board_id, *study.descendants(board_id)})
    feeders = [c.id for c in study.circuits
               if study.children.get(c.id) and c.id in inside and c.device is not None]
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


def rcd_suggestion(study: Study, levels: Any, circuit_id: str, family: str | None,
                   skip_above: Iterable[str] = ()) -> str | None:
    """An RCD for a circuit whose earth faults no device of its own disconnects in time.

    Only where the circuit has no RCD of its own and its present device fails
    ``disconnection``: the smallest IΔn that meets disconnection, touch voltage (TT),
    additional protection, leakage and RCD selectivity with the RCDs above and below
    (:func:`coordination.residual.propose_rcd`), checked by searching again with it on the
    circuit; the text names the ``rcd`` table and the device that then meets every requirement.
    """
    from coordination import checks
    from coordination.checks.disconnection import _disconnection_limit
    from coordination.checks.residual_checks import rcd_earth_fault_a
    from coordination.devices import band_for
    from coordination.residual import (
        leakage_below_ma,
        needs_additional_protection,
        propose_rcd,
        rcd_of,
        rcds_on_path,
    )

    circuit = study.by_id[circuit_id]
    if circuit.rcd is not None:
        return None
    band = band_for(study, circuit_id, "envelope")
    present = checks.check_device(study, levels, circuit_id, band)
    if all(r.ok for r in present if r.check == "disconnection"):
        return None
    limit = _disconnection_limit(study, circuit_id, band)[0]
    node = levels.by_circuit[circuit_id]
    fault = rcd_earth_fault_a(study, float(node.ief_min_a))
    in_a = float(band.settings.get("Ir_a", band.rating_a) or band.rating_a)
    below = [b for d in study.descendants(circuit_id) if (b := rcd_of(study, d)) is not None]
    proposal = propose_rcd(
        earth_fault_a=fault, limit_s=limit, ra_ohm=study.supply.ra_ohm,
        tt=str(study.supply.earthing).upper() == "TT",
        sockets=needs_additional_protection(circuit.sockets, in_a),
        above=[b for _, b in rcds_on_path(study, circuit_id)], below=below,
        leakage_ma=leakage_below_ma(study, circuit_id) or 0.0)
    if proposal.rcd is None:
        return None
    table = ", ".join(f"{k} = {str(v).lower() if isinstance(v, bool) else v}"
                      for k, v in proposal.rcd.items())
    trial = with_circuits(study, {circuit_id: {"rcd": dict(proposal.rcd)}})
    again = choose(trial, circuit_id, family=family, levels=levels, skip_above=skip_above)
    if not again.found:
        return None
    return (f"an RCD on this circuit, rcd = {{ {table} }}: {proposal.reason}; with it "
            f"{again.name} meets every requirement")
