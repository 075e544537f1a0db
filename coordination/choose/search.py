"""The chooser's search: candidates in lowness order, the cheap masks and the screen first, then
exact confirmation; the binding requirement of the candidate just below the winner.
"""

from __future__ import annotations

import dataclasses
import math
from typing import Any

import numpy as np

from coordination.choose.candidates import Candidate, SettingsGrid
from coordination.choose.exact import cheap_failure, exact_failure, is_present
from coordination.choose.problem import MAX_CONFIRM, Failure, Problem
from coordination.choose.screening import screen, screen_grid
from curves.band import Band

#: Groups up to this size are decided candidate by candidate (no screen).
SMALL_GROUP = 4


#: Exact failures kept per settings group for the explanation.
MAX_RECORDED = 20


def present_in(problem: Problem, grid: SettingsGrid) -> tuple[int, ...] | None:
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
    return found if is_present(problem, grid.candidate(found).spec) else None


def search_groups(problem: Problem, groups: list[Any]) -> tuple[
        Candidate | None, Band | None, Failure | None, list[tuple[Candidate, Failure]]]:
    """Candidates in lowness order; returns the winner, its band, the binding failure of the
    candidate just before it, and failures met on the way (to explain when nothing fits)."""
    failures: list[tuple[Candidate, Failure]] = []
    previous: tuple[Candidate, Failure | None] | None = None
    for group in groups:
        if isinstance(group, SettingsGrid):
            found = search_grid(problem, group, failures, previous)
            if found[0] is not None:
                return (*found, failures)  # type: ignore[return-value]
            previous = found[2]  # type: ignore[assignment]
            continue
        if len(group) <= SMALL_GROUP:  # a plain series: decide each candidate exactly
            for i, cand in enumerate(group):
                failure = exact_failure(problem, cand)
                if failure is None:
                    binding = binding_of(problem, group, i, previous)
                    return cand, problem.band(cand.spec, problem.basis), binding, failures
                failures.append((cand, failure))
                previous = (cand, failure)
            continue
        # a short list of settings: cheap masks, the screen, then exact confirmation
        bands = [problem.band(c.spec, problem.basis) for c in group]
        cheap = [cheap_failure(problem, c, band) for c, band in zip(group, bands, strict=True)]
        keep = [i for i, f in enumerate(cheap) if f is None]
        problem.state.searched += len(group)
        if not keep:
            failures.append((group[0], cheap[0]))  # type: ignore[arg-type]
            previous = (group[-1], cheap[-1])
            continue
        codes = screen(problem, [bands[i] for i in keep])
        passing = [keep[j] for j, code in enumerate(codes)
                   if code == 0 or is_present(problem, group[keep[j]].spec)]
        for n, i in enumerate(passing):
            failure = exact_failure(problem, group[i])
            if failure is None:
                binding = binding_of(problem, group, i, previous)
                return group[i], bands[i], binding, failures
            if n < MAX_RECORDED:
                failures.append((group[i], failure))
        for i in dict.fromkeys((keep[0], keep[-1])):  # why the least and most capable fail
            if i not in passing:
                failure = exact_failure(problem, group[i])
                if failure is None:  # the screen refused what the exact checks accept (it
                    # must not; see short_of): the lowest candidate they accept wins
                    j = next(j for j in keep if j == i or (
                        j < i and j not in passing and exact_failure(problem, group[j]) is None))
                    return group[j], bands[j], binding_of(problem, group, j, previous), failures
                failures.append((group[i], failure))
        previous = (group[-1], None)
    return None, None, None, failures


def search_grid(problem: Problem, grid: SettingsGrid,
                 failures: list[tuple[Candidate, Failure]],
                 previous: tuple[Candidate, Failure | None] | None) -> tuple[Any, Any, Any]:
    """One electronic settings grid: (winner, band, binding) or (None, None, new previous)."""
    valid = np.argwhere(grid.valid())  # lowness order: C order over (Isd, tsd, tr, Ii)
    if valid.size == 0:
        return None, None, previous
    first, last = grid.candidate(valid[0]), grid.candidate(valid[-1])
    cheap = cheap_failure(problem, first, problem.band(first.spec, problem.basis))
    problem.state.searched += len(valid)
    if cheap is not None:
        if not failures or failures[-1][1].stage != cheap.stage:
            failures.append((first, cheap))
        return None, None, (last, cheap)
    mask = screen_grid(problem, grid)
    here = present_in(problem, grid)
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
            binding = named_failure(problem, previous)
        else:
            binding = None
        return cand, problem.band(cand.spec, problem.basis), binding

    for n, index in enumerate(passing[:problem.state.max_confirm]):
        failure = exact_failure(problem, grid.candidate(index))
        if failure is None:
            return won(index)
        if n < MAX_RECORDED:
            failures.append((grid.candidate(index), failure))
    if problem.state.explain_budget <= 0:  # enough grids explained (a remedy's search)
        return None, None, (last, None)
    problem.state.explain_budget -= 1
    for k, cand in ((0, first), (len(valid) - 1, last)):  # why the least and the most capable
        failure = exact_failure(problem, cand)  # settings fail
        if failure is None:  # a setting passes that the confirmations did not reach (the
            # cap) or the screen refused (it must not; see short_of): the lowest such wins
            unconfirmed = list(passing[problem.state.max_confirm:])
            refused = [v for v in valid[:k] if not mask[tuple(v)]]
            ordered = sorted([*unconfirmed, *refused, valid[k]],
                             key=lambda v: tuple(int(x) for x in v))[:MAX_CONFIRM]
            return won(next((v for v in ordered if exact_failure(
                problem, grid.candidate(v)) is None), valid[k]))
        failures.append((cand, failure))
    return None, None, (last, failures[-1][1] if failures else None)


def binding_of(problem: Problem, group: list[Candidate], index: int,
             previous: tuple[Candidate, Failure | None] | None) -> Failure | None:
    """The requirement that ruled out the candidate just below the winner."""
    if index > 0:
        return exact_failure(problem, group[index - 1])
    if previous is None:
        return None
    return named_failure(problem, previous)


def named_failure(problem: Problem, previous: tuple[Candidate, Failure | None]) -> Failure | None:
    """The failure of a candidate already met (decided now where it was not), with its name."""
    cand, failure = previous
    if failure is None:
        return exact_failure(problem, cand)
    if failure.device:
        return failure
    return dataclasses.replace(failure, device=problem.band(cand.spec, problem.basis).name)
