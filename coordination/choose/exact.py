"""The chooser's exact check of one candidate: the same engine and checks as ``coordination check``.

References
----------
IEC 60364-4-43:2008, 433.1; IEC 60947-2:2016, Annex A (via :func:`coordination.engine.compare`).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping
from typing import Any

import numpy as np

from coordination import backup, criterion, rules
from coordination.choose.candidates import Candidate
from coordination.choose.problem import STAGES, Failure, Pair, Problem, substitute
from coordination.choose.screening import TESTABLE_S
from coordination.model import SUPPLY_ID
from curves.band import Band
from curves.errors import InputError


def cheap_failure(problem: Problem, cand: Candidate, band: Band) -> Failure | None:
    """Load, cable overload and breaking capacity for one candidate (no engine needed)."""
    ib, iz = problem.ib_a, problem.iz_a
    setting = cand.setting_a
    if ib is not None and setting < ib * (1 - 1e-9):
        adjustable = isinstance(cand.spec, Mapping) and cand.spec.get("family") in (
            "tm", "electronic")
        return Failure("load", f"load: Ib {ib:g} A > {'Ir' if adjustable else 'In'} "
                               f"{setting:g} A")
    if band.family == "aM" and "overload" not in problem.relaxed:  # no relay on this circuit
        from coordination.checks.overload import AM_NO_OVERLOAD

        return Failure("overload", f"overload: {band.name} {AM_NO_OVERLOAD}")
    if iz is not None and "overload" not in problem.relaxed:
        # I2 of the worst compliant device, as coordination.checks takes it; a motor's overload
        # relay protects the cable where there is one (its Ir and 1.2 Ir, IEC 60947-4-1)
        envelope = problem.band(cand.spec, "envelope")
        i2 = float(envelope.pickup_max_a)
        if envelope.family == "motor-circuit":
            setting = float(envelope.rating_a)
        if setting > iz * (1 + 1e-9):
            return Failure("overload", f"cable: In {setting:g} A > Iz {iz:g} A (Ib <= In <= Iz)",
                           need_a=setting)
        implied = rules.i2_implied(problem.study.rule_set, band.family)
        if i2 > 1.45 * iz * (1 + 1e-9) and not implied:  # as the rule set reads 433.1
            return Failure("overload", f"cable: I2 {i2:.4g} A > 1.45 Iz {1.45 * iz:.4g} A",
                           need_a=i2 / 1.45)
    study = problem.study
    circuit = study.by_id[problem.circuit_id]
    capacity = circuit.breaking_capacity_a or band.breaking_capacity_a
    feeder = None if circuit.parent == SUPPLY_ID else study.by_id[circuit.parent]
    backed = backup.covering(problem.ik_break_a, backup.declared_backups(circuit, feeder))
    if capacity is not None and capacity < problem.ik_break_a * (1 - 1e-9) \
            and backed is None and "breaking-capacity" not in problem.relaxed:
        return Failure("breaking-capacity",
                       f"breaking capacity {capacity / 1000:.3g} kA < "
                       f"{problem.ik_break_a / 1000:.3g} kA at the board")
    return None


def pair_ok(sel: Any, required_a: float) -> bool:
    """The engine's own rule (:func:`coordination.criterion.requirement_met`)."""
    return criterion.requirement_met(sel.verdict, sel.limit_a, required_a)


def limit_text(sel: Any) -> str:
    limit = getattr(sel, "limit_a", None)
    if getattr(sel, "verdict", None) == "none" or limit is None:
        return "not selective even in overload"
    return f"selective only to {float(limit) / 1000:.3g} kA"


def exact_failure(problem: Problem, cand: Candidate) -> Failure | None:
    """The first requirement a candidate fails, decided exactly (None: it meets every one).

    The checks are those of ``coordination check``: the requirements on Ib, In, Iz and I2, then
    :func:`coordination.checks.check_device` on the envelope band, then
    :func:`coordination.engine.compare` with every device below and above, with the windows,
    margins, intervals and requirements that :func:`coordination.engine.analyse` uses.
    """
    failure = _exact_failure(problem, cand)
    if failure is None:
        return None
    return dataclasses.replace(failure, device=problem.band(cand.spec, problem.basis).name)


def _exact_failure(problem: Problem, cand: Candidate) -> Failure | None:
    from coordination import checks

    problem.state.searched += 1
    band = problem.band(cand.spec, problem.basis)
    cheap = cheap_failure(problem, cand, band)
    if cheap is not None:
        return cheap
    envelope = problem.band(cand.spec, "envelope")
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
                    if in_a is not None and r.details.get("i2_condition") == "implied":
                        need = float(in_a)  # the rule set holds In <= Iz enough
                    elif i2 is not None and in_a is not None:
                        need = max(float(in_a), float(i2) / 1.45)
                if stage == "fault-energy":
                    _learn_energy_limits(problem, r.details)
                return Failure(stage, f"{stage}: {r.reason}", need_a=need)
    for r in results:  # any further check a later version adds
        if not r.ok and r.check not in problem.relaxed and r.check not in STAGES:
            return Failure(r.check, f"{r.check}: {r.reason}")
    same = is_present(problem, cand.spec)
    for p in problem.below:
        sel = pair_below(band, p, same)
        if not pair_ok(sel, p.required_a):
            if problem.testable_below and testable(sel, p.band):
                continue  # a remedy's search: a tested limit is assumed for this pair
            return selectivity_failure("selectivity-below", p, sel, band)
    for p in problem.above:
        sel = pair_above(band, p, same)
        if not pair_ok(sel, p.required_a):
            if problem.testable_above and testable(sel, band):
                continue  # a remedy's search: a tested limit is assumed for this pair
            return selectivity_failure("selectivity-above", p, sel, p.band)
    for case in problem.cases:
        failure = case_failure(problem, case, study, band, envelope, same)
        if failure is not None:
            return failure
    return None


def case_failure(problem: Problem, case: Any, study: Any, band: Band, envelope: Band,
                 same: bool) -> Failure | None:
    """The first requirement a candidate fails on one standby source (None: it meets them):
    the case's checks (:func:`coordination.standby.case_checks`), then its pairs below and
    above under the decaying faults (:func:`coordination.decay.compare_decaying`), as
    ``coordination check`` runs them."""
    from coordination import decay, standby

    cid = problem.circuit_id
    fed = set(case.circuits)
    if cid not in fed:
        return None
    named = f"on standby {case.name!r}"
    for r in standby.case_checks(study, case, cid, envelope):
        if not r.ok and r.check not in problem.relaxed:
            return Failure(r.check, f"{r.check} {named}: {r.reason}")
    stage = "selectivity-below"
    for p in problem.below if stage not in problem.relaxed else ():
        for other in (p.other, *p.twins):
            if other not in fed:
                continue
            family = case.nodes[other].window
            sel = decay.compare_decaying(band, p.band, family, margin=p.margin,
                                         interval_s=p.interval_s,
                                         tested_limit_a=p.tested_limit_a if same else None)
            need = _case_need(study, other, family.bolted_a)
            if not pair_ok(sel, need) and not (problem.testable_below and testable(sel, p.band)):
                return _case_selectivity(stage, named, p, sel, need, band)
    stage = "selectivity-above"
    family = case.nodes[cid].window
    need = _case_need(study, cid, family.bolted_a)
    for p in problem.above if stage not in problem.relaxed else ():
        if p.other not in fed:
            continue
        sel = decay.compare_decaying(p.band, band, family, margin=p.margin,
                                     interval_s=p.interval_s,
                                     tested_limit_a=p.tested_limit_a if same else None)
        if not pair_ok(sel, need) and not (problem.testable_above and testable(sel, band)):
            return _case_selectivity(stage, named, p, sel, need, p.band)
    return None


def _case_need(study: Any, downstream: str, top_a: float) -> float:
    """The current a pair must be selective to on a standby source: the downstream circuit's
    ``selective_to_a``, at most the source's largest fault at its board [A]."""
    required = study.pair_settings(downstream)[2]
    return top_a if required is None else min(float(required), top_a)


def _case_selectivity(stage: str, named: str, p: Pair, sel: Any, need: float,
                      upstream: Band) -> Failure:
    failure = selectivity_failure(stage, dataclasses.replace(p, required_a=need), sel, upstream)
    return dataclasses.replace(failure, text=f"{failure.text} ({named})")


def _learn_energy_limits(problem: Problem, details: Mapping[str, Any]) -> None:
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
            if limit not in problem.state.energy_limits:
                problem.state.energy_limits.append(limit)


def pair_below(band: Band, p: Pair, same: bool) -> Any:
    """The engine's result for the candidate over one device below."""
    from coordination import engine

    return engine.compare(band, p.band, p.window_a, margin=p.margin, interval_s=p.interval_s,
                          tested_limit_a=p.tested_limit_a if same else None)


def pair_above(band: Band, p: Pair, same: bool) -> Any:
    """The engine's result for the candidate under one device above."""
    from coordination import engine

    window = (float(band.pickup_min_a), p.window_a[1])
    return engine.compare(p.band, band, window, margin=p.margin, interval_s=p.interval_s,
                          tested_limit_a=p.tested_limit_a if same else None)


def selectivity_failure(stage: str, p: Pair, sel: Any, upstream: Band) -> Failure:
    word = "with" if stage == "selectivity-below" else "under"
    limit = None if sel.verdict == "none" or sel.limit_a is None else float(sel.limit_a)
    instantaneous = at_instantaneous(sel, upstream)
    return Failure(stage, f"selectivity {word} {p.other!r} ({p.band.name}) up to "
                          f"{p.required_a / 1000:.3g} kA: {limit_text(sel)}", other=p.other,
                   limit_a=limit, required_a=p.required_a, instantaneous=instantaneous)


def at_instantaneous(sel: Any, upstream: Band) -> bool:
    """The engine's limit is the upstream device's instantaneous pickup (not a crossing of the
    bands below it, which a faster device below could lift)."""
    inst = upstream.instantaneous_a
    if sel.decided_by == "tested" or sel.limit_a is None or inst is None:
        return False
    return "instantaneous pickup" in (sel.note or "") or math.isclose(
        float(sel.limit_a), float(inst), rel_tol=1e-8)


def _present_key(problem: Problem) -> tuple:
    """The identity of the circuit's present device (its band's key: the spec as built, so
    "gG100", "GG100" and an inline table of it, or a unit with its defaults written out or
    left out, are one device); the only candidate its tested limits apply to."""
    from coordination.devices import band_for

    return band_for(problem.study, problem.circuit_id, problem.basis).key


def is_present(problem: Problem, spec: Any) -> bool:
    """Whether a candidate is the circuit's present device (see :func:`_present_key`)."""
    try:
        return problem.band(spec, problem.basis).key == _present_key(problem)
    except InputError:
        return False


def testable(sel: Any, down: Band) -> bool:
    """A selectivity limit that a tested limit could raise (see :data:`TESTABLE_S`)."""
    if sel.verdict != "partial" or sel.limit_a is None:
        return False
    t = float(np.asarray(down.t_max(float(sel.limit_a) * (1 - 1e-9))))
    return t <= TESTABLE_S * (1 + 1e-9)
