"""The chooser's vectorised selectivity screen: many candidates, or a whole settings grid, against
the devices below and above on one current grid, with the rule of :mod:`coordination.criterion`.

Lenient by construction (it samples a grid and compares with a looser tolerance); survivors are
confirmed exactly (:mod:`coordination.choose.exact`).

References
----------
IEC 60947-2:2016, Annex A (time-current comparison); IEC 60269-1:2006, 5.7.1 (energy);
IEC 60364-4-41:2005, Table 41.1 (disconnection times).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

import numpy as np

from coordination import criterion, rules
from coordination.choose.candidates import SettingsGrid, combine_parts, electronic_parts
from coordination.criterion import ADJUSTABLE_FAMILIES, EQUAL_RTOL
from curves.band import TIME_CEILING_S, Band

if TYPE_CHECKING:
    from coordination.choose.problem import Problem


#: Band families that are adjustable breakers (a coordination interval applies over them).
ADJUSTABLE = tuple(sorted(ADJUSTABLE_FAMILIES))


#: Where the downstream device operates within this time at the limit current [s], the bands
#: bound it only as "within 0.1 s" (IEC 60898-1 instantaneous region, the short-circuit
#: regions of IEC 60947-2), and a tested limit from the makers (IEC 60947-2 Annex A) can show
#: more; a crossing at longer times is one of time-current curves, which a test does not move.
TESTABLE_S = 0.1

#: The screen's tolerance on the criterion (looser than the engine's ``EQUAL_RTOL``: the screen
#: must never refuse by rounding what the engine accepts).
SCREEN_RTOL = 1e-6


def short_of(current_a: np.ndarray, required_a: float) -> np.ndarray:
    """The currents the screen tests a requirement at: strictly below ``required_a`` by more
    than the engine's tolerance [A].

    The engine meets a requirement with a limit equal to it (``limit >= required (1 -
    EQUAL_RTOL)``), and a limit set by an instantaneous pickup equals that pickup; so a
    requirement equal to an upstream pickup is met although the upstream withstands nothing at
    the required current itself. Testing the required current would refuse such a device; the
    screen only tests where a failure makes the engine's limit short of the requirement.
    """
    return np.asarray(current_a) < required_a * (1 - EQUAL_RTOL)


def clamped_lower(band: Band, grid: np.ndarray) -> np.ndarray:
    """A device's time as the device above (:func:`coordination.criterion.upstream_time`) on
    the grid, at most ``TIME_CEILING_S`` [s]."""
    t = criterion.upstream_time(band.t_min(grid), grid, band.instantaneous_a)
    return np.minimum(t, TIME_CEILING_S)


def need_of(t_max: np.ndarray, margin: float, interval_s: float, adjustable: bool) -> np.ndarray:
    """What the device above must stay at or above (:func:`coordination.criterion.
    downstream_time`), at most ``TIME_CEILING_S`` [s]."""
    return np.minimum(criterion.downstream_time(t_max, margin, interval_s, adjustable),
                      TIME_CEILING_S)


def meets(need_s: np.ndarray, t_up_s: np.ndarray) -> np.ndarray:
    """Where the screen finds a pair selective: the criterion with :data:`SCREEN_RTOL`."""
    return ~criterion.not_selective(need_s, t_up_s, SCREEN_RTOL)


def distinct_above(problem: Problem) -> list[int]:
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


def screen(problem: Problem, bands: Sequence[Band]) -> np.ndarray:
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
        t_min = np.minimum(criterion.upstream_time(t_min, grid[None, :], inst[:, None]),
                           TIME_CEILING_S)
        adjustable = np.array([b.family in ADJUSTABLE for b in bands])
        need = problem.need[adjustable.astype(int)]  # (n, n_grid)
        ok = np.all(meets(need, t_min), axis=1)
        out[~ok] = 1
    if problem.above:
        t_max = np.array([np.asarray(b.t_max(grid), dtype=float) for b in bands])
        lo = np.array([b.pickup_min_a for b in bands])
        p0 = problem.above[0]
        inside = (grid[None, :] >= lo[:, None]) & short_of(grid, p0.required_a)[None, :]
        for k in distinct_above(problem):  # tested pairs by their curves, as above
            p = problem.above[k]
            need = need_of(t_max, p.margin, p.interval_s, bool(problem.above_adjustable[k]))
            bad = inside & ~meets(need, problem.above_tmin[k][None, :])
            if problem.testable_above:  # a remedy's search: only where a test cannot decide
                bad &= t_max > TESTABLE_S * (1 + 1e-9)
            fail = np.any(bad, axis=1) & (out == 0)
            out[fail] = 2
    return out


def screen_grid(problem: Problem, grid: SettingsGrid) -> np.ndarray:
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
            need = problem.need[1]
            lt, st, inst = (np.all(meets(need, np.minimum(part, TIME_CEILING_S)), axis=-1)
                            for part in lower)
            ok &= st[:, :, None, None] & lt[:, None, :, None] & inst[None, None, None, :]
        if problem.above and ok.any():  # (a grid ruled out below needs no test above)
            pickup = b.tolerance(*b.CONVENTIONAL_X, problem.basis)[0] * grid.ir_a
            for k in distinct_above(problem):  # tested pairs by their curves, as above
                p = problem.above[k]
                inside = (currents >= pickup) & short_of(currents, p.required_a)
                t_up = problem.above_tmin[k][inside]
                adjustable = bool(problem.above_adjustable[k])
                lt, st, inst = (meets(need_of(part[..., inside], p.margin, p.interval_s,
                                              adjustable), t_up)
                                | (problem.testable_above and part[..., inside]
                                   <= TESTABLE_S * (1 + 1e-9)) for part in upper)
                # only the currents where some setting may fail matter (exactly the same test)
                keep = ~(lt.all(axis=(0, 1)) | st.all(axis=(0, 1)) | inst.all(axis=0))
                lt, st, inst = lt[..., keep], st[..., keep], inst[..., keep]
                clear = (st[:, :, None, None, :] | lt[:, None, :, None, :]
                         | inst[None, None, None, :, :])
                ok &= clear.all(axis=-1)
    limits = problem.state.energy_limits
    if limits and "fault-energy" not in problem.relaxed:
        # fault-energy cases already failed by a candidate: I2t = I^2 t_max (no current
        # limiting in these units) against k2 S2, only where t_max is within the adiabatic time
        from coordination.checks import ADIABATIC_LIMIT_S

        at = np.array([c for c, _ in limits])
        most = np.array([e for _, e in limits])
        t_env = combine_parts(electronic_parts(at, grid, "envelope")[1])
        bad = (t_env <= ADIABATIC_LIMIT_S) & (at * at * t_env > most * (1 + 1e-6))
        ok &= ~bad.any(axis=-1)
    if "disconnection" in problem.relaxed:
        return ok
    study = problem.study
    node = problem.levels.by_circuit[problem.circuit_id]
    ief = float(getattr(node, "ief_min_a", 0.0) or 0.0)
    if ief <= 0:
        return np.zeros_like(ok)
    circuit = study.by_id[problem.circuit_id]
    in_scope = rules.in_final_scope(study.rule_set, study.is_final(circuit.id),
                                    circuit.sockets, grid.ir_a)
    limit = checks.disconnection_time_s(study.supply.u0_v, study.supply.earthing, in_scope)
    lt, st, inst = electronic_parts(np.array([ief]), grid, "envelope")[1]
    t_env = np.minimum(np.minimum(lt[:, None, :, None, 0], st[:, :, None, None, 0]),
                       inst[None, None, None, :, 0])
    ok &= t_env.reshape(n_isd, n_tsd, n_tr, n_ii) <= limit
    return ok
