"""Properties of the overlap engine over the standard device series (hypothesis, bounded).

The series are the standards' rating series (IEC 60898-1 MCB ratings, IEC 60269 gG ratings, as
the families list them) and the breakers' setting grids (curves/breaker.py); the trees and fault
levels are invented.
"""

from __future__ import annotations

import math

from hypothesis import given, settings
from hypothesis import strategies as st

from coordination import engine, faults
from coordination.devices import band_for
from coordination.model import Cable, Circuit, Study, Supply
from curves.breaker import (
    BREAKER_RATINGS_A,
    ELECTRONIC_II_X,
    ELECTRONIC_IR_FRACTIONS,
    II_X,
    ISD_X,
    TM_IR_FRACTIONS,
    TR_S,
    TSD_S,
    electronic_band,
    thermal_magnetic_band,
)
from curves.fuse import GG_RATINGS_A, gg_band
from curves.mcb import MCB_RATINGS_A, mcb_band

GG_SERIES = tuple(r for r in GG_RATINGS_A if 16 <= r <= 630)
MCB_SERIES = tuple(MCB_RATINGS_A)
BASES = ("typical", "envelope")
TOPS_A = st.floats(min_value=500.0, max_value=100_000.0)


def effective_limit(result: engine.Selectivity) -> float:
    """The selectivity limit with total as infinity (total is selective at every current)."""
    return math.inf if result.verdict == "total" else float(result.limit_a)


def band(kind: str, rating: float, basis: str):
    if kind == "gG":
        return gg_band(rating, basis=basis)
    return mcb_band(kind, rating, basis=basis)


# common practice: a larger upstream device (same family, same basis) is never less selective
@settings(max_examples=40, deadline=None)
@given(down_kind=st.sampled_from(("gG", "B", "C")), data=st.data(), top=TOPS_A,
       basis=st.sampled_from(BASES))
def test_raising_upstream_gg_never_lowers_is(down_kind, data, top, basis):
    series = GG_SERIES[:-2] if down_kind == "gG" else MCB_SERIES[:9]
    d_rating = data.draw(st.sampled_from(series), label="downstream")
    above = [r for r in GG_SERIES if r > d_rating]
    u1, u2 = sorted(data.draw(st.lists(st.sampled_from(above), min_size=2, max_size=2,
                                       unique=True), label="upstreams"))
    down = band(down_kind, d_rating, basis)
    window = (down.pickup_min_a, max(top, down.pickup_min_a * 2))
    small = engine.compare(gg_band(u1, basis=basis), down, window)
    large = engine.compare(gg_band(u2, basis=basis), down, window)
    assert effective_limit(large) >= effective_limit(small) * (1 - 1e-9)


# common practice: a larger upstream MCB of the same type is never less selective
@settings(max_examples=40, deadline=None)
@given(down_kind=st.sampled_from(("B", "C")), up_kind=st.sampled_from(("B", "C", "D")),
       data=st.data(), top=TOPS_A, basis=st.sampled_from(BASES))
def test_raising_upstream_mcb_never_lowers_is(down_kind, up_kind, data, top, basis):
    d_rating = data.draw(st.sampled_from(MCB_SERIES[:8]), label="downstream")
    above = [r for r in MCB_SERIES if r > d_rating]
    u1, u2 = sorted(data.draw(st.lists(st.sampled_from(above), min_size=2, max_size=2,
                                       unique=True), label="upstreams"))
    down = mcb_band(down_kind, d_rating, basis=basis)
    window = (down.pickup_min_a, max(top, down.pickup_min_a * 2))
    small = engine.compare(mcb_band(up_kind, u1, basis=basis), down, window)
    large = engine.compare(mcb_band(up_kind, u2, basis=basis), down, window)
    assert effective_limit(large) >= effective_limit(small) * (1 - 1e-9)


# Our modelling choice: the envelope is the widest band a compliant device may have, so it is never
# more selective than the typical band of the same devices (over the same window)
@settings(max_examples=40, deadline=None)
@given(up_kind=st.sampled_from(("gG", "C", "D")), down_kind=st.sampled_from(("gG", "B", "C")),
       data=st.data(), top=TOPS_A)
def test_envelope_never_more_selective_than_typical(up_kind, down_kind, data, top):
    d_series = GG_SERIES[:8] if down_kind == "gG" else MCB_SERIES[:8]
    d_rating = data.draw(st.sampled_from(d_series), label="downstream")
    u_series = GG_SERIES if up_kind == "gG" else MCB_SERIES
    u_rating = data.draw(st.sampled_from([r for r in u_series if r >= d_rating]), label="up")
    d_env, d_typ = band(down_kind, d_rating, "envelope"), band(down_kind, d_rating, "typical")
    u_env, u_typ = band(up_kind, u_rating, "envelope"), band(up_kind, u_rating, "typical")
    window = (d_env.pickup_min_a, max(top, d_typ.pickup_max_a * 2))
    env = engine.compare(u_env, d_env, window)
    typ = engine.compare(u_typ, d_typ, window)
    assert effective_limit(env) <= effective_limit(typ) * (1 + 1e-9)


# Our modelling choice: a tested limit given for a pair overrides the curves and says so
@settings(max_examples=40, deadline=None)
@given(up_rating=st.sampled_from(GG_SERIES[6:]), d_rating=st.sampled_from(MCB_SERIES[:9]),
       d_kind=st.sampled_from(("B", "C")), tested=st.floats(min_value=200.0, max_value=50_000.0),
       top=TOPS_A, basis=st.sampled_from(BASES))
def test_tested_limit_overrides(up_rating, d_rating, d_kind, tested, top, basis):
    down = mcb_band(d_kind, d_rating, basis=basis)
    window = (down.pickup_min_a, max(top, down.pickup_max_a * 2))
    r = engine.compare(gg_band(up_rating, basis=basis), down, window, tested_limit_a=tested)
    assert r.decided_by == "tested"
    if tested >= window[1]:
        assert r.verdict == "total"
        assert r.limit_a is None
    else:
        assert r.verdict in ("partial", "none")
        assert r.limit_a == tested


# ---------------------------------------------------------------------------------------------
# adjustable breakers upstream: settings drawn from the grids real units offer (curves/breaker.py)
BREAKER_SERIES = tuple(r for r in BREAKER_RATINGS_A if r <= 1250)


@st.composite
def breaker_settings(draw, kind: str) -> dict:
    """Settings of one trip unit, on the module grids (Isd at or below Ii, as units allow)."""
    if kind == "tm":
        return {"Ir_x": draw(st.sampled_from(TM_IR_FRACTIONS)), "Ii_x": draw(st.sampled_from(II_X))}
    ir_x = draw(st.sampled_from(ELECTRONIC_IR_FRACTIONS))
    out = {"Ir_x": ir_x, "tr_s": draw(st.sampled_from(TR_S))}
    ii_x = draw(st.sampled_from((*ELECTRONIC_II_X, "off")))
    out["Ii_x"] = ii_x
    if draw(st.booleans()):
        allowed = [x for x in ISD_X if ii_x == "off" or x * ir_x <= ii_x]
        if allowed:
            out["Isd_x"] = draw(st.sampled_from(allowed))
            out["tsd_s"] = draw(st.sampled_from(TSD_S))
    return out


def breaker(kind: str, rating: float, settings_: dict, basis: str):
    if kind == "tm":
        return thermal_magnetic_band(In_a=rating, basis=basis, **settings_)
    return electronic_band(In_a=rating, basis=basis, **settings_)


def downstream_band(draw, kind: str, at_most_a: float, basis: str):
    """A gG fuse-link or an MCB of a rating not above ``at_most_a``."""
    series = GG_SERIES if kind == "gG" else MCB_SERIES
    rating = draw(st.sampled_from([r for r in series if r <= at_most_a]), label="downstream")
    return band(kind, rating, basis)


# common practice: the same trip-unit settings on a larger frame (every pickup scaled up with In)
# never make a breaker less selective over a given downstream device
@settings(max_examples=40, deadline=None)
@given(up_kind=st.sampled_from(("tm", "electronic")), down_kind=st.sampled_from(("gG", "B", "C")),
       data=st.data(), top=TOPS_A, basis=st.sampled_from(BASES))
def test_raising_upstream_breaker_never_lowers_is(up_kind, down_kind, data, top, basis):
    u1, u2 = sorted(data.draw(st.lists(st.sampled_from(BREAKER_SERIES), min_size=2, max_size=2,
                                       unique=True), label="upstreams"))
    chosen = data.draw(breaker_settings(up_kind), label="settings")
    down = downstream_band(data.draw, down_kind, u1, basis)
    window = (down.pickup_min_a, max(top, down.pickup_min_a * 2))
    small = engine.compare(breaker(up_kind, u1, chosen, basis), down, window)
    large = engine.compare(breaker(up_kind, u2, chosen, basis), down, window)
    assert effective_limit(large) >= effective_limit(small) * (1 - 1e-9)


# Our modelling choice (IEC 60947-2 tolerances): the envelope band of a breaker is the widest a
# compliant unit with those settings may have, so over the same downstream device it is never more
# selective than the typical band
@settings(max_examples=40, deadline=None)
@given(up_kind=st.sampled_from(("tm", "electronic")), down_kind=st.sampled_from(("gG", "B", "C")),
       data=st.data(), top=TOPS_A)
def test_envelope_breaker_never_more_selective_than_typical(up_kind, down_kind, data, top):
    u_rating = data.draw(st.sampled_from(BREAKER_SERIES), label="upstream")
    chosen = data.draw(breaker_settings(up_kind), label="settings")
    series = GG_SERIES if down_kind == "gG" else MCB_SERIES
    d_rating = data.draw(st.sampled_from([r for r in series if r <= u_rating]), label="down")
    d_env, d_typ = band(down_kind, d_rating, "envelope"), band(down_kind, d_rating, "typical")
    u_env = breaker(up_kind, u_rating, chosen, "envelope")
    u_typ = breaker(up_kind, u_rating, chosen, "typical")
    window = (d_env.pickup_min_a, max(top, d_typ.pickup_max_a * 2))
    env = engine.compare(u_env, d_env, window)
    typ = engine.compare(u_typ, d_typ, window)
    assert effective_limit(env) <= effective_limit(typ) * (1 + 1e-9)


# ---------------------------------------------------------------------------------------------
DEVICES = ("gG400", "gG250", "gG160", "gG100", "gG63", "C63", "C32", "B32", "B16", "B6")


@st.composite
def trees(draw):
    n = draw(st.integers(min_value=1, max_value=12))
    parents = [draw(st.integers(min_value=-1, max_value=k - 1)) for k in range(n)]
    devices = [draw(st.sampled_from(DEVICES)) for _ in range(n)]
    circuits = tuple(
        Circuit(f"c{k}", "supply" if p < 0 else f"c{p}", devices[k],
                phases=draw(st.sampled_from((1, 3))),
                cable=Cable(length_m=draw(st.floats(min_value=1.0, max_value=80.0)),
                            csa_mm2=draw(st.sampled_from((2.5, 10.0, 35.0, 95.0)))))
        for k, p in enumerate(parents))
    return Study("invented tree", Supply(pfc_a=16_000.0), circuits), parents


def walk_up(parents: list[int], k: int) -> list[int]:
    chain = []
    while parents[k] >= 0:
        k = parents[k]
        chain.append(k)
    return chain


def run_members(study, pair):
    """The ancestors one result row stands for, nearest first."""
    ids, node = [], pair.upstream
    for _ in range(pair.upstream_count):
        ids.append(node)
        node = study.by_id[node].parent
    assert ids[-1] == pair.upstream_last
    return ids


# Our modelling choice: every ancestor of a circuit is paired with it, not only its direct parent
@settings(max_examples=30, deadline=None)
@given(tree=trees(), basis=st.sampled_from((None, *BASES)))
def test_every_ancestor_pair_present(tree, basis):
    study, parents = tree
    levels = faults.compute(study)
    analysis = engine.analyse(study, levels, basis=basis)
    got = [(u, p.downstream) for p in analysis.pairs for u in run_members(study, p)]
    expected = {(f"c{a}", f"c{k}") for k in range(len(parents)) for a in walk_up(parents, k)}
    assert len(got) == len(set(got))
    assert set(got) == expected
    assert analysis.summary()["pairs"] == len(expected)
    assert analysis.ok == all(p.ok for p in analysis.pairs)
    for p in analysis.pairs:
        assert p.window_a[1] == levels.by_circuit[p.downstream].ik_max_a
        assert (p.verdict == "total") == (p.limit_a is None)


# Our design: a row standing for a run of alike ancestors says what each of those pairs, decided
# on its own by compare(), would say
@settings(max_examples=30, deadline=None)
@given(tree=trees())
def test_a_run_of_alike_ancestors_answers_for_each_of_them(tree):
    study, _ = tree
    levels = faults.compute(study)
    analysis = engine.analyse(study, levels)
    for p in analysis.pairs:
        members = run_members(study, p)
        assert len({study.by_id[u].device for u in members}) == 1
        for u in members:
            alone = engine.compare(band_for(study, u), band_for(study, p.downstream), p.window_a,
                                   margin=p.margin, interval_s=p.interval_s)
            assert (alone.verdict, alone.limit_a, alone.decided_by) == (
                p.verdict, p.limit_a, p.decided_by)
