"""Why nothing fits, and the remedies: each one checked by searching again with it assumed.

References
----------
IEC 60947-2:2016, Annex A (tested selectivity limits); EN 60898-1 Annex ZA (energy-limiting
classes); IEC 60364-4-43:2008, 433.1 and 434.5.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterable, Mapping, Sequence
from typing import Any

import numpy as np

from coordination import rules
from coordination.choose.candidates import (
    FAMILY_NOUNS,
    FAMILY_WORDS,
    MCB_DEFAULT_CLASS,
    MCB_DEFAULT_ICN_A,
    Candidate,
    SettingsGrid,
    candidate_groups,
    mcb_spec,
)
from coordination.choose.exact import (
    at_instantaneous,
    cheap_failure,
    exact_failure,
    is_present,
    limit_text,
    pair_above,
    pair_below,
    pair_ok,
)
from coordination.choose.problem import (
    Failure,
    Pair,
    Problem,
    SearchState,
    build_problem,
    has_relay,
    rebuilt,
    substitute,
    with_circuits,
)
from coordination.choose.search import search_groups
from coordination.devices import device_band
from curves.band import Band

#: Runs of like failures named in the explanation when nothing fits.
MAX_SEGMENTS = 4


#: Screened settings of one grid confirmed exactly at most in a remedy's search (a remedy names
#: a device that then meets every requirement; it need not be the very smallest).
REMEDY_CONFIRM = 12


#: Runs of like failures named in a remedy that would not be enough.
REMEDY_SEGMENTS = 2


#: Settings grids of another family whose failure is explained (each costs two exact checks).
REMEDY_EXPLAINED_GRIDS = 8


#: Pairs named one by one in a remedy (the rest are counted).
REMEDY_PAIRS = 4


def _ceil_sig(x: float, digits: int = 4) -> float:
    """``x`` rounded up to ``digits`` significant figures (a stated need is never short)."""
    if not x > 0 or not math.isfinite(x):
        return x
    exponent = math.floor(math.log10(x)) - digits + 1
    return round(math.ceil(x / 10.0**exponent * (1 - 1e-12)) * 10.0**exponent, max(0, -exponent))


def _named(problem: Problem, failures: Iterable[tuple[Candidate, Failure]]) -> list[Failure]:
    """The failures past the load stage, each with its candidate's name."""
    return [f if f.device else dataclasses.replace(f, device=problem.band(c.spec,
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


def _summary(problem: Problem, failures: Iterable[tuple[Candidate, Failure]], *,
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


def _groups_where(problem: Problem, groups: list[Any], stages: set[str | None]) -> list[Any]:
    """The groups whose least capable candidate's cheap failure (None: none) is in ``stages``
    (Ib, In, Iz, I2 and the breaking capacity are the same across a group)."""
    out = []
    for group in groups:
        cand = _first(group)
        if cand is None:
            continue
        failure = cheap_failure(problem, cand, problem.band(cand.spec, problem.basis))
        if (failure.stage if failure is not None else None) in stages:
            out.append(group)
    return out


def _search_variant(problem: Problem, variant: Problem, groups: list[Any]) -> tuple[
        Candidate | None, Band | None, list[tuple[Candidate, Failure]]]:
    """The search of a remedy: the same search on a changed problem, with fewer exact
    confirmations per settings grid and fewer grids explained."""
    state = variant.state
    run = SearchState(energy_limits=state.energy_limits,  # the circuit's: shared
                      explain_budget=min(state.explain_budget, REMEDY_EXPLAINED_GRIDS),
                      max_confirm=min(state.max_confirm, REMEDY_CONFIRM))
    winner, band, _, failures = search_groups(dataclasses.replace(variant, state=run), groups)
    problem.state.searched += run.searched
    return winner, band, failures


def _iz_needed(problem: Problem, cand: Candidate) -> float:
    """Iz that In <= Iz and I2 <= 1.45 Iz need [A] (I2 of the worst compliant device; with a
    motor's overload relay, its Ir and 1.2 Ir; In <= Iz alone where the study's rule set holds
    it enough, :func:`coordination.rules.i2_implied`)."""
    envelope = problem.band(cand.spec, "envelope")
    setting = envelope.rating_a if envelope.family == "motor-circuit" else cand.setting_a
    if rules.i2_implied(problem.study.rule_set, envelope.family):
        return setting
    return max(setting, float(envelope.pickup_max_a) / 1.45)


def _remedy_cable(problem: Problem, groups: list[Any]) -> tuple[bool, str] | None:
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
    need = _iz_needed(problem, winner)
    for _ in range(3):  # confirm with the cable's Iz raised to the need, as `check` would see it
        need = _ceil_sig(need)
        cable = dataclasses.replace(problem.study.by_id[problem.circuit_id].cable, iz_a=need)
        study = with_circuits(problem.study, {problem.circuit_id: {"cable": cable}})
        failure = exact_failure(rebuilt(problem, study)[0], winner)
        if failure is None:
            return True, (f"a larger cable: Iz of at least {need:g} A (now {iz:g} A); then "
                          f"{band.name} would do")
        if failure.stage != "overload" or failure.need_a is None or failure.need_a <= need:
            break
        need = failure.need_a
    return False, f"a larger cable alone would not be enough: {failure.device} still fails " \
                  f"{failure.text}"


def _remedy_relaxed(problem: Problem, groups: list[Any], stage: str,
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


def _pairs_text(items: Sequence[tuple[Pair, Any]], what: str) -> str:
    parts = []
    for p, sel in items[:REMEDY_PAIRS]:
        alike = f" and {len(p.twins)} alike" if p.twins else ""
        parts.append(f"{p.other!r} ({p.band.name}{alike}) to {p.required_a / 1000:.3g} kA "
                     f"({what} {limit_text(sel).replace('selective only to ', '')})")
    more = len(items) - REMEDY_PAIRS
    return ", ".join(parts) + (f" and {more} more device{'s' if more > 1 else ''}"
                               if more > 0 else "")


def _ids_text(items: Sequence[tuple[Pair, Any]]) -> str:
    ids = [d for p, _ in items for d in (p.other, *p.twins)]
    more = len(ids) - REMEDY_PAIRS
    return ", ".join(repr(d) for d in ids[:REMEDY_PAIRS]) + (
        f" and {more} more circuit{'s' if more > 1 else ''}" if more > 0 else "")


def _remedies_below(problem: Problem, groups: list[Any],
                    current: Band) -> list[tuple[bool, str]]:
    """Remedies for selectivity with the devices below: a tested limit, a partial requirement,
    a downstream device with a lower let-through; each checked by the search."""
    tried = _groups_where(problem, groups, {None})
    variant = dataclasses.replace(problem, below=(), need=np.full_like(problem.need, -np.inf))
    winner, band, failures = _search_variant(problem, variant, tried)
    if winner is None or band is None:
        return [(False, "a tested limit or a partial requirement below alone would not be "
                        "enough: without any selectivity requirement below, " +
                 _summary(problem, failures, limit=REMEDY_SEGMENTS, still=True))]
    same = is_present(problem, winner.spec)
    failing = [(p, sel) for p in problem.below
               if not pair_ok(sel := pair_below(band, p, same), p.required_a)]
    if not failing:
        return []
    out = [_remedy_tested(problem, tried)]
    out.append(_remedy_partial(problem, winner, band, failing))
    lower = _remedy_let_through(problem, groups, band, failing)
    if lower is not None:
        out.append(lower)
    return out


def _remedy_tested(problem: Problem, tried: list[Any]) -> tuple[bool, str]:
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
    same = is_present(problem, winner.spec)
    failing = [(p, sel) for p in problem.below
               if not pair_ok(sel := pair_below(band, p, same), p.required_a)]
    study = substitute(problem.study, cid, winner.spec)
    changes = {}
    for p, _ in failing:
        tested = float(math.ceil(p.required_a))
        for d in (p.other, *p.twins):
            limits = {**study.by_id[d].tested_limits_a, cid: tested}
            changes[d] = {"tested_limits_a": limits}
    failure = exact_failure(rebuilt(problem, with_circuits(study, changes))[0], winner)
    if failure is not None:  # not expected: the search above set aside exactly these pairs
        return False, (f"a tested limit alone would not be enough: {band.name} still fails "
                       f"{failure.text}")
    return True, (f"a tested limit from the makers' tables: {band.name} would do if tested "
                  f"selective over {_pairs_text(failing, 'the bands give')}; give "
                  f"tested_limits_a = {{{cid!r} = ...}} on {_ids_text(failing)}")


def _remedy_partial(problem: Problem, winner: Candidate, band: Band,
                    failing: list[tuple[Pair, Any]]) -> tuple[bool, str]:
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
    study = with_circuits(problem.study, changes)
    failure = exact_failure(rebuilt(problem, study)[0], winner)
    if failure is not None:
        return False, (f"a partial requirement alone would not be enough: {band.name} still "
                       f"fails {failure.text}")
    parts = ", ".join(f"{math.floor(sel.limit_a):g} on {p.other!r}"
                      f"{' and alike' if p.twins else ''}" for p, sel in failing[:REMEDY_PAIRS])
    more = len(failing) - REMEDY_PAIRS
    parts += f" and on {more} more device{'s' if more > 1 else ''}" if more > 0 else ""
    return True, (f"a partial requirement, if total selectivity is not needed: "
                  f"{band.name} would do with selective_to_a = {parts}")


def _lower_let_through(problem: Problem, p: Pair) -> tuple[str | Mapping[str, Any], Band] | None:
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
        swapped = with_circuits(problem.study, {d: {"device": spec} for d in circuits})
        return [{r.check for r in checks.check_device(swapped, problem.levels, d, envelope)
                 if r.ok} for d in circuits]

    before: list[set[str]] | None = None
    best: tuple[float, str | Mapping[str, Any], Band] | None = None
    for curve in ("B", "C", "D"):
        spec = mcb_spec(curve, float(p.band.rating_a), MCB_DEFAULT_CLASS, icn)
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


def _remedy_let_through(problem: Problem, groups: list[Any], band: Band,
                        failing: list[tuple[Pair, Any]]) -> tuple[bool, str] | None:
    """Downstream devices with a lower let-through, only where the limit is not the
    candidate's own instantaneous release (which no downstream device can lift)."""
    if any(at_instantaneous(sel, band) for _, sel in failing):
        return None
    swaps = {}
    for p, _ in failing:
        alt = _lower_let_through(problem, p)
        if alt is not None:
            swaps[p] = alt
    if not swaps:
        return None
    study = with_circuits(problem.study, {d: {"device": spec} for p, (spec, _) in swaps.items()
                                           for d in (p.other, *p.twins)})
    variant = rebuilt(problem, study)[0]
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


def _remedy_family(problem: Problem, family: str, current: Band) -> tuple[bool, str]:
    """Another family, searched as a whole."""
    variant, _ = rebuilt(problem, problem.study, family)
    stated = problem.study.by_id[problem.circuit_id].breaking_capacity_a is not None
    groups = candidate_groups(family, current, 0.0 if stated else variant.ik_break_a)
    winner, band, failures = _search_variant(problem, variant, groups)
    label = f"{FAMILY_WORDS[family]} (--family {family})"
    if winner is None or band is None:
        return False, f"{label} would not be enough: " + _summary(
            variant, failures, limit=REMEDY_SEGMENTS)
    return True, f"{label}: {band.name} would do"


def _remedies_above(problem: Problem, groups: list[Any]) -> list[tuple[bool, str] | None]:
    """Remedies for selectivity with the devices above: a tested limit or a partial requirement
    on this circuit, a larger device above; each checked by the search."""
    tried = _groups_where(problem, groups, {None})
    variant = dataclasses.replace(problem, above=(), above_tmin=problem.above_tmin[:0],
                                  above_adjustable=problem.above_adjustable[:0])
    aside = _search_variant(problem, variant, tried)
    return [_remedy_tested_above(problem, tried), _remedy_partial_above(problem, aside),
            _remedy_above(problem, aside)]


def _failing_above(problem: Problem, winner: Candidate, band: Band) -> list[tuple[Pair, Any]]:
    same = is_present(problem, winner.spec)
    return [(p, sel) for p in problem.above
            if not pair_ok(sel := pair_above(band, p, same), p.required_a)]


def _remedy_tested_above(problem: Problem, tried: list[Any]) -> tuple[bool, str] | None:
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
    study = with_circuits(study, {cid: {"tested_limits_a": limits}})
    failure = exact_failure(rebuilt(problem, study)[0], winner)
    if failure is not None:
        return False, (f"a tested limit with the devices above alone would not be enough: "
                       f"{band.name} still fails {failure.text}")
    ids = ", ".join(f"{p.other!r} = ..." for p, _ in failing)
    return True, (f"a tested limit from the makers' tables: {band.name} would do if tested "
                  f"selective under {_pairs_text(failing, 'the bands give')}; give "
                  f"tested_limits_a = {{{ids}}} on {cid!r}")


def _remedy_partial_above(problem: Problem, aside: tuple[Any, Any, Any]) -> tuple[
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
    study = with_circuits(problem.study, {problem.circuit_id: {"selective_to_a": limit}})
    failure = exact_failure(rebuilt(problem, study)[0], winner)
    if failure is not None:
        return False, (f"a partial requirement alone would not be enough: {band.name} still "
                       f"fails {failure.text}")
    return True, (f"a partial requirement, if total selectivity is not needed: {band.name} "
                  f"would do with selective_to_a = {limit:g} on {problem.circuit_id!r}")


def _remedy_above(problem: Problem, aside: tuple[Any, Any, Any]) -> tuple[bool, str] | None:
    """A larger device above: the smallest candidate that passes with the devices above set
    aside (``aside``: that search), then the nearest failing one chosen over it."""
    winner, band, failures = aside
    if winner is None or band is None:
        return False, ("a larger device above alone would not be enough: without selectivity "
                       "above, " + _summary(problem, failures, limit=REMEDY_SEGMENTS,
                                            still=True))
    same = is_present(problem, winner.spec)
    failing = [p.other for p in problem.above
               if not pair_ok(pair_above(band, p, same), p.required_a)]
    if not failing:
        return None
    nearest, later = failing[0], frozenset(failing[1:]) | problem.skip_above
    study = substitute(problem.study, problem.circuit_id, winner.spec)
    upper, up_current = build_problem(study, problem.levels, nearest, None, later)
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


def why_nothing_fits(problem: Problem, failures: list[tuple[Candidate, Failure]], groups: list[Any],
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
        for other in _other_families(problem, ("tm", "electronic")):
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
        for other in _other_families(problem, ("gG", "electronic")):
            if other != family:
                add(_remedy_family(problem, other, current))
    if "selectivity-above" in stages:
        for result in _remedies_above(problem, groups):
            add(result)
    if "starting" in stages:  # a fuse-link's band lies later at a motor's start current
        for other in _other_families(problem, ("aM", "gG")):
            if other != family:
                add(_remedy_family(problem, other, current))
    return reason, tuple(helps), tuple(short)


def _other_families(problem: Problem, families: tuple[str, ...]) -> tuple[str, ...]:
    """The families a remedy may try on this circuit: an aM fuse-link only with a motor's
    overload relay (it gives no overload protection), no electronic grid with one."""
    relay = has_relay(problem.study, problem.circuit_id)
    return tuple(f for f in families if (f != "aM" or relay) and (f != "electronic" or not relay))
