"""Unit tests of the overlap engine on invented bands with closed-form crossings.

Most bands here are invented power laws (not any device); each expected limit is the closed-form
solution of the invented edges, worked in the test, not read from the code. The tests of the
crossover zone and of the command line also use the standard families on invented installations,
checking that the zone and the exit code agree with the engine's own verdicts.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest

from coordination import engine, tables
from coordination.devices import band_for
from coordination.model import Circuit, Study, Supply
from curves.band import ENERGY_REGION_S, TIME_FLOOR_S, Band
from curves.errors import InputError


def power_band(name: str, *, k_lo: float, k_hi: float, pickup_min: float, pickup_max: float,
               family: str = "datasheet", exponent: float = 2.0, add_s: float = 0.0,
               instantaneous_a: float | None = None, floor_above: float | None = None) -> Band:
    """An invented band: t = k / I**exponent (+ add_s) above its pickups, inf below.

    ``floor_above``: both edges drop to TIME_FLOOR_S at and above that current (a step).
    """

    def edge(k: float, pickup: float):
        def f(i: np.ndarray) -> np.ndarray:
            t = np.where(i > pickup, k / i**exponent + add_s, np.inf)
            if floor_above is not None:
                t = np.where(i >= floor_above, TIME_FLOOR_S, t)
            return t

        return f

    return Band(name, family, "datasheet", pickup_min, pickup_min, pickup_max, 3600.0,
                lower=edge(k_lo, pickup_min), upper=edge(k_hi, pickup_max),
                instantaneous_a=instantaneous_a, key=("test", name, k_lo, k_hi, pickup_min,
                                                      pickup_max, family, exponent, add_s,
                                                      instantaneous_a, floor_above))


# A downstream band with a fixed clearing time added: t_D = 5e5 / I^2 + 0.01 s (upper edge).
DOWN = power_band("down", k_lo=2e5, k_hi=5e5, pickup_min=21.0, pickup_max=26.0, add_s=0.01)
# An upstream band t_U = 4e6 / I^2 (lower edge).
UP = power_band("up", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0)


def test_continuous_crossing_found_exactly():
    # closed form: 5e5/I^2 + 0.01 = 4e6/I^2  ->  I = sqrt(3.5e6 / 0.01)
    expected = math.sqrt(3.5e6 / 0.01)
    r = engine.compare(UP, DOWN, (21.0, 50_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(expected, rel=1e-9)
    assert r.decided_by == "time-current"
    # the time where they meet: 4e6 / I^2
    assert r.time_s == pytest.approx(4e6 / expected**2, rel=1e-6)


def test_window_below_crossing_is_total():
    r = engine.compare(UP, DOWN, (21.0, 15_000.0))
    assert r.verdict == "total"
    assert r.limit_a is None
    assert r.window_a == (21.0, 15_000.0)


def test_margin_moves_the_limit():
    # closed form with margin m = 2: 2 (5e5/I^2 + 0.01) = 4e6/I^2  ->  I = sqrt(3e6 / 0.02)
    r = engine.compare(UP, DOWN, (21.0, 50_000.0), margin=2.0)
    assert r.limit_a == pytest.approx(math.sqrt(3e6 / 0.02), rel=1e-9)


def test_equal_edges_are_selective():
    # IEC 60269-1 I2t criterion: at equal values the pair is selective
    down = power_band("eq-down", k_lo=1e4, k_hi=4e6, pickup_min=21.0, pickup_max=26.0)
    up = power_band("eq-up", k_lo=4e6, k_hi=9e6, pickup_min=105.0, pickup_max=130.0)
    r = engine.compare(up, down, (21.0, 100_000.0))
    assert r.verdict == "total"


def test_slightly_above_is_not_selective_in_energy_region():
    # D's let-through 1 % above U's minimum energy: not selective; the edges are parallel so the
    # first non-selective current is where U starts to operate at all (its pickup_min, 105 A)
    down = power_band("en-down", k_lo=1e4, k_hi=4.04e6, pickup_min=21.0, pickup_max=26.0)
    up = power_band("en-up", k_lo=4e6, k_hi=9e6, pickup_min=105.0, pickup_max=130.0)
    r = engine.compare(up, down, (21.0, 100_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(105.0, rel=1e-6)


def test_energy_region_decides_below_10_ms():
    # D: t = 5e4/I^2 + 1e-3 (upper); U: t = 4e5/I^2. Meet at I = sqrt(3.5e5/1e-3) = 18.7 kA,
    # t = 4e5/I^2 = 1.14 ms < ENERGY_REGION_S
    down = power_band("e-down", k_lo=1e4, k_hi=5e4, pickup_min=21.0, pickup_max=26.0,
                      add_s=1e-3)
    up = power_band("e-up", k_lo=4e5, k_hi=1e6, pickup_min=105.0, pickup_max=130.0)
    r = engine.compare(up, down, (21.0, 50_000.0))
    expected = math.sqrt(3.5e5 / 1e-3)
    assert r.limit_a == pytest.approx(expected, rel=1e-9)
    assert r.time_s < ENERGY_REGION_S
    assert r.decided_by == "energy"


def test_overload_overlap_is_none():
    # U picks up (105 A) below D's conventional tripping current (110 A): D may never operate
    # there while U can: not selective at the first current U operates
    down = power_band("ol-down", k_lo=1e3, k_hi=1e4, pickup_min=90.0, pickup_max=110.0)
    up = power_band("ol-up", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0)
    r = engine.compare(up, down, (90.0, 10_000.0))
    assert r.verdict == "none"
    assert r.limit_a == pytest.approx(105.0, rel=1e-6)


def test_window_low_end_already_not_selective():
    down = power_band("lo-down", k_lo=1e3, k_hi=1e4, pickup_min=200.0, pickup_max=250.0)
    r = engine.compare(UP, down, (200.0, 10_000.0))
    assert r.verdict == "none"
    assert r.limit_a == pytest.approx(200.0, rel=1e-12)


def test_both_never_operate_is_selective():
    # below both pickups both edges are inf: nothing operates, nothing to discriminate
    down = power_band("inf-down", k_lo=1.0, k_hi=2.0, pickup_min=21.0, pickup_max=26.0)
    up = power_band("inf-up", k_lo=4e6, k_hi=1e7, pickup_min=1000.0, pickup_max=1200.0)
    r = engine.compare(up, down, (21.0, 900.0))
    assert r.verdict == "total"


def test_step_in_upstream_edge_is_converged_to():
    # U's edges drop to the floor at 3,000 A (an instantaneous release not declared as such)
    up = power_band("step-up", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0,
                    floor_above=3000.0)
    r = engine.compare(up, DOWN, (21.0, 50_000.0))
    assert r.limit_a == pytest.approx(3000.0, rel=1e-9)


def test_declared_instantaneous_caps_the_limit():
    # an upstream instantaneous release withstands no energy above its pickup, even where the
    # edges themselves would still be selective (common practice; our modelling choice)
    up = power_band("inst-up", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0,
                    instantaneous_a=2500.0)
    r = engine.compare(up, DOWN, (21.0, 50_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(2500.0, rel=1e-9)
    assert "instantaneous" in r.note


def test_instantaneous_above_window_does_not_limit():
    up = power_band("inst-hi", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0,
                    instantaneous_a=20_000.0)
    assert engine.compare(up, DOWN, (21.0, 15_000.0)).verdict == "total"


@pytest.mark.parametrize(("tested", "verdict"), [(60_000.0, "total"), (8_000.0, "partial"),
                                                  (30_000.0, "partial")])
def test_tested_limit_overrides(tested, verdict):
    r = engine.compare(UP, DOWN, (21.0, 50_000.0), tested_limit_a=tested)
    assert r.decided_by == "tested"
    assert r.verdict == verdict
    if verdict == "total":
        assert r.limit_a is None
    else:
        assert r.limit_a == tested
    assert r.curves_limit_a == pytest.approx(math.sqrt(3.5e6 / 0.01), rel=1e-9)


def test_interval_applies_over_adjustable_breakers_only():
    # U: t = max(4e6/I^2, 0.3 s) (a long-time law over a definite-time floor); D: t = 2e3/I.
    # Without the interval they meet where 2e3/I = 4e6/I^2, I = 2,000 A; with 0.25 s added to D
    # (D >= 10 ms everywhere here) where 2e3/I + 0.25 = 4e6/I^2, i.e. 0.25 I^2 + 2e3 I - 4e6 = 0.
    def lower(i):
        return np.where(i > 105, np.maximum(4e6 / i**2, 0.3), np.inf)

    def upper(i):
        return np.where(i > 130, np.maximum(1e7 / i**2, 0.35), np.inf)

    def d_upper(i):
        return np.where(i > 26, 2e3 / i, np.inf)

    def d_lower(i):
        return np.where(i > 21, 1e3 / i, np.inf)

    down = Band("sd-down", "datasheet", "datasheet", 20.0, 21.0, 26.0, 3600.0,
                lower=d_lower, upper=d_upper, key=("sd-down",))
    with_interval = (-2e3 + math.sqrt(2e3**2 + 4 * 0.25 * 4e6)) / (2 * 0.25)
    for family, expected in (("breaker-electronic", with_interval), ("datasheet", 2000.0)):
        up = Band(f"sd-{family}", family, "datasheet", 100.0, 105.0, 130.0, 3600.0,
                  lower=lower, upper=upper, key=("sd", family))
        r = engine.compare(up, down, (21.0, 50_000.0), interval_s=0.25)
        assert r.limit_a == pytest.approx(expected, rel=1e-9)
    # and with no interval over the breaker, the plain crossing
    up = Band("sd-b0", "breaker-electronic", "datasheet", 100.0, 105.0, 130.0, 3600.0,
              lower=lower, upper=upper, key=("sd", "b0"))
    assert engine.compare(up, down, (21.0, 50_000.0)).limit_a == pytest.approx(2000.0, rel=1e-9)


def test_empty_window_is_total():
    r = engine.compare(UP, DOWN, (21.0, 15.0))
    assert r.verdict == "total"
    assert "overload" in r.note


@pytest.mark.parametrize(("kwargs", "key"), [
    ({"margin": 0.0}, "margin"), ({"margin": float("nan")}, "margin"),
    ({"interval_s": -0.1}, "interval_s"), ({"tested_limit_a": -5.0}, "tested_limits_a"),
])
def test_bad_parameters_raise_input_error(kwargs, key):
    with pytest.raises(InputError) as err:
        engine.compare(UP, DOWN, (21.0, 1000.0), **kwargs)
    assert err.value.key == key


def test_bad_window_raises_input_error():
    with pytest.raises(InputError):
        engine.compare(UP, DOWN, (0.0, 1000.0))
    with pytest.raises(InputError):
        engine.compare(UP, DOWN, (21.0, float("inf")))


def test_identical_pairs_are_computed_once():
    calls = {"n": 0}

    def counted(i):
        calls["n"] += 1
        return np.where(i > 105, 4e6 / i**2, np.inf)

    up = Band("count-up", "datasheet", "datasheet", 100.0, 105.0, 130.0, 3600.0, lower=counted,
              upper=lambda i: np.where(i > 130, 1e7 / i**2, np.inf), key=("count-up",))
    first = engine.compare(up, DOWN, (21.0, 50_000.0))
    n = calls["n"]
    second = engine.compare(up, DOWN, (21.0, 50_000.0))
    assert second == first
    assert calls["n"] == n
    # another window top over the same pair reuses the crossing search
    engine.compare(up, DOWN, (21.0, 40_000.0))
    assert calls["n"] <= n + 2


# ---------------------------------------------------------------------------------------------
# analyse() on an invented tree, with invented bands patched in place of the device families
BANDS = {
    "A": power_band("A", k_lo=4e8, k_hi=1e9, pickup_min=1050.0, pickup_max=1300.0),
    "B": power_band("B", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0),
    "C": DOWN,
}


def tree_study(**c_kwargs) -> Study:
    circuits = (
        Circuit("top", "supply", "A"),
        Circuit("mid", "top", "B", board="DB-1"),
        Circuit("leaf", "mid", "C", **c_kwargs),
        Circuit("leaf2", "top", "C"),
    )
    return Study("invented", Supply(pfc_a=16_000.0), circuits)


def levels_for(study: Study, top_a: dict[str, float]) -> SimpleNamespace:
    # invented fault levels: a stand-in with the one field the engine reads
    return SimpleNamespace(
        by_circuit={cid: SimpleNamespace(ik_max_a=v) for cid, v in top_a.items()})


@pytest.fixture
def patched(monkeypatch):
    monkeypatch.setattr(engine, "band_for",
                        lambda study, cid, basis=None: BANDS[study.by_id[cid].device])


def test_analyse_pairs_every_ancestor(patched):
    s = tree_study()
    lv = levels_for(s, {"top": 16_000.0, "mid": 12_000.0, "leaf": 30_000.0, "leaf2": 10_000.0})
    a = engine.analyse(s, lv)
    pairs = [(p.upstream, p.downstream) for p in a.pairs]
    assert pairs == [("top", "mid"), ("mid", "leaf"), ("top", "leaf"), ("top", "leaf2")]
    leaf_mid = a.for_circuit("leaf")[0]
    # leaf under mid: the closed-form crossing sqrt(3.5e8) = 18.7 kA is inside 30 kA
    assert leaf_mid.verdict == "partial"
    assert leaf_mid.limit_a == pytest.approx(math.sqrt(3.5e8), rel=1e-9)
    assert leaf_mid.window_a == (21.0, 30_000.0)
    assert not leaf_mid.ok
    assert not a.ok
    js = a.to_json()
    assert js["summary"]["pairs"] == 4
    assert js["pairs"][1]["limit_a"] == pytest.approx(math.sqrt(3.5e8), rel=1e-9)
    assert js["pairs"][0]["limit_a"] is None
    # the contract: basis is the bands' basis, decided_by the region that decided
    assert js["pairs"][1]["decided_by"] == "time-current"
    assert js["pairs"][1]["basis"] == leaf_mid.basis == leaf_mid.downstream_basis
    assert set(js["pairs"][0]) >= {"upstream", "downstream", "verdict", "limit_a", "window_a",
                                   "basis", "decided_by", "band_basis", "required_a", "ok"}


def test_requirement_below_limit_is_met(patched):
    s = tree_study(selective_to_a=10_000.0)
    lv = levels_for(s, {"top": 16_000.0, "mid": 12_000.0, "leaf": 30_000.0, "leaf2": 10_000.0})
    a = engine.analyse(s, lv)
    leaf_mid = a.for_circuit("leaf")[0]
    assert leaf_mid.verdict == "partial"
    assert leaf_mid.ok
    assert leaf_mid.required_a == 10_000.0


def test_tested_limit_from_the_study(patched):
    s = tree_study(tested_limits_a={"mid": 40_000.0})
    lv = levels_for(s, {"top": 16_000.0, "mid": 12_000.0, "leaf": 30_000.0, "leaf2": 10_000.0})
    leaf_mid = engine.analyse(s, lv).for_circuit("leaf")[0]
    assert leaf_mid.verdict == "total"
    assert leaf_mid.decided_by == "tested"
    assert leaf_mid.ok


def test_format_table_groups_by_board(patched):
    s = tree_study()
    lv = levels_for(s, {"top": 16_000.0, "mid": 12_000.0, "leaf": 30_000.0, "leaf2": 10_000.0})
    a = engine.analyse(s, lv)
    text = tables.pair_table(s, lv, a)
    assert "board origin" not in text  # 'top' has no upstream pair
    assert "board DB-1" in text
    assert "board top" in text  # mid and leaf2 sit on top's board (named by its id)
    assert text.splitlines()[-1].startswith("selectivity: 4 pairs")
    assert "NO" in text


def test_overlap_geometry_is_lazy_and_nonempty_when_partial(patched):
    s = tree_study()
    lv = levels_for(s, {"top": 16_000.0, "mid": 12_000.0, "leaf": 30_000.0, "leaf2": 10_000.0})
    a = engine.analyse(s, lv)
    leaf_mid = a.for_circuit("leaf")[0]
    zone = engine.overlap(s, lv, leaf_mid)
    assert zone.area > 0
    # the crossover lies above the selectivity limit, within the window
    assert zone.bounds[0] >= math.log10(leaf_mid.limit_a) - 0.02
    assert zone.bounds[2] <= math.log10(30_000.0) + 1e-9


@pytest.mark.parametrize(("k_down", "add_s", "k_up", "decided"), [
    # closest approach at the window's top (15 kA): U's time 4e6 / 15e3^2 = 17.8 ms
    (5e5, 0.01, 4e6, "time-current"),
    # closest approach at 15 kA: U's time 4e5 / 15e3^2 = 1.78 ms, below ENERGY_REGION_S
    (5e4, 1e-3, 4e5, "energy"),
])
def test_total_is_decided_where_the_edges_come_closest(k_down, add_s, k_up, decided):
    down = power_band(f"cl-down-{k_down}", k_lo=k_down / 4, k_hi=k_down, pickup_min=21.0,
                      pickup_max=26.0, add_s=add_s)
    up = power_band(f"cl-up-{k_up}", k_lo=k_up, k_hi=k_up * 2, pickup_min=105.0,
                    pickup_max=130.0)
    r = engine.compare(up, down, (21.0, 15_000.0))
    assert r.verdict == "total"
    assert r.decided_by == decided
    assert r.time_s == pytest.approx(k_up / 15_000.0**2, rel=1e-6)


# ---------------------------------------------------------------------------------------------
# a limit set by the upstream's instantaneous release is decided by its current pickup
# D: t = 5e4/I^2 + 1e-3 s, at 5,000 A 3 ms (below ENERGY_REGION_S); DOWN at 5,000 A: 30 ms
FAST_DOWN = power_band("fast-down", k_lo=1e4, k_hi=5e4, pickup_min=21.0, pickup_max=26.0,
                       add_s=1e-3)


@pytest.mark.parametrize(("down", "t_down_s"), [
    (DOWN, 5e5 / 5000.0**2 + 0.01),  # 30 ms: at or above ENERGY_REGION_S
    (FAST_DOWN, 5e4 / 5000.0**2 + 1e-3),  # 3 ms: below it
])
def test_instantaneous_limit_is_time_current_whatever_the_downstream_time(down, t_down_s):
    # Our modelling choice: above an upstream instantaneous release no energy is withstood, so the
    # limit is its pickup (5,000 A), where U's edge 4e6/I^2 = 0.16 s is still above D's: the
    # release's current pickup decides, not a comparison of energies
    up = power_band("inst-5k", k_lo=4e6, k_hi=1e7, pickup_min=105.0, pickup_max=130.0,
                    instantaneous_a=5000.0)
    assert float(down.t_max(5000.0)) == pytest.approx(t_down_s, rel=1e-12)
    assert float(down.t_max(5000.0)) < 4e6 / 5000.0**2
    r = engine.compare(up, down, (21.0, 50_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(5000.0, rel=1e-9)
    assert "instantaneous" in r.note
    assert r.decided_by == "time-current"


def test_office_example_plant_pairs_are_labelled_alike():
    # the invented office example: a C63 and a C32 on the plant board, both limited by the
    # moulded-case breaker's magnetic release; the C32 has cleared in under 10 ms there, the C63
    # not, and both rows must still say the same thing
    from pathlib import Path

    from coordination import faults, study

    s = study.load(Path(__file__).resolve().parents[1] / "examples" / "office-building.toml")
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    rows = {p.downstream: p for p in analysis.pairs
            if p.upstream == "sm-plant" and p.downstream in ("p-chiller", "p-ahu-1")}
    assert set(rows) == {"p-chiller", "p-ahu-1"}
    limits = {p.limit_a for p in rows.values()}
    assert len(limits) == 1
    times = {cid: float(band_for(s, cid).t_max(p.limit_a * (1 - 1e-9)))
             for cid, p in rows.items()}
    assert times["p-ahu-1"] < ENERGY_REGION_S <= times["p-chiller"]
    for p in rows.values():
        assert "instantaneous" in p.note
        assert p.decided_by == "time-current"


# ---------------------------------------------------------------------------------------------
# overlap(): the zone starts at Is as compare() finds it
def zone_left_a(zone) -> float:
    """The smallest current of a zone [A]."""
    return 10.0 ** zone.bounds[0]


@pytest.mark.parametrize(("study_kwargs", "up_kwargs", "expected"), [
    # closed form with margin 2: 2 (5e5/I^2 + 0.01) = 4e6/I^2  ->  I = sqrt(3e6 / 0.02)
    ({"margin": 2.0}, {}, math.sqrt(3e6 / 0.02)),
    # an instantaneous release at 2,500 A ends selectivity below the edges' own crossing
    ({}, {"instantaneous_a": 2500.0}, 2500.0),
])
def test_overlap_starts_at_the_limit_on_invented_bands(monkeypatch, study_kwargs, up_kwargs,
                                                       expected):
    bands = {**BANDS, "B": power_band("B-zone", k_lo=4e6, k_hi=1e7, pickup_min=105.0,
                                      pickup_max=130.0, **up_kwargs)}
    monkeypatch.setattr(engine, "band_for",
                        lambda study, cid, basis=None: bands[study.by_id[cid].device])
    base = tree_study()
    s = Study(base.title, base.supply, base.circuits, **study_kwargs)
    lv = levels_for(s, {"top": 16_000.0, "mid": 12_000.0, "leaf": 30_000.0, "leaf2": 10_000.0})
    leaf_mid = engine.analyse(s, lv).for_circuit("leaf")[0]
    assert leaf_mid.limit_a == pytest.approx(expected, rel=1e-9)
    for pair in (leaf_mid, ("mid", "leaf")):
        zone = engine.overlap(s, lv, pair)
        assert zone.area > 0
        assert zone_left_a(zone) == pytest.approx(expected, rel=1e-6)
        assert zone.bounds[2] <= math.log10(30_000.0) + 1e-12


# Invented plant: breakers, fuses and MCBs under study-wide margin 1.2 and interval 0.1 s
SETTINGS_STUDY = Study("invented plant room", Supply(pfc_a=16_000.0), (
    Circuit("inc", "supply", {"family": "electronic", "In_a": 400, "Ir_x": 1.0, "tr_s": 2,
                              "Isd_x": 10, "tsd_s": 0.1, "Ii_x": "off"}),
    Circuit("tm", "inc", {"family": "tm", "In_a": 100, "Ir_x": 0.9, "Ii_x": 10}),
    Circuit("pump", "tm", "gG50"),
    Circuit("el", "inc", {"family": "electronic", "In_a": 250, "Ir_x": 0.8, "tr_s": 4,
                          "Isd_x": 6, "tsd_s": 0.1, "Ii_x": "off"}),
    Circuit("fan", "el", "gG63"),
    Circuit("mcb", "inc", "C63"),
    Circuit("light", "mcb", "B16"),
    Circuit("fuse", "inc", "gG100"),
    Circuit("socket", "fuse", "gG40"),
), margin=1.2, interval_s=0.1)


@pytest.fixture(scope="module")
def settings_analysis():
    ids = [c.id for c in SETTINGS_STUDY.circuits]
    lv = levels_for(SETTINGS_STUDY, dict.fromkeys(ids, 10_000.0))
    return lv, engine.analyse(SETTINGS_STUDY, lv)


def pair_of(analysis, upstream: str, downstream: str):
    return next(p for p in analysis.pairs if (p.upstream, p.downstream) == (upstream, downstream))


def test_settings_study_has_the_cases(settings_analysis):
    _, a = settings_analysis
    # margin 1.2 and 0.1 s over the thermal-magnetic breaker move Is into its thermal region,
    # well below its magnetic pickup (0.9 x 10 x 100 A on the typical basis)
    tm = pair_of(a, "tm", "pump")
    plain = engine.compare(band_for(SETTINGS_STUDY, "tm"),
                           band_for(SETTINGS_STUDY, "pump"), tm.window_a)
    assert tm.verdict == "partial" and plain.verdict == "partial"
    assert tm.limit_a < 0.5 * plain.limit_a
    # over the electronic unit the interval turns a total pair into a partial one
    el = pair_of(a, "el", "fan")
    assert el.verdict == "partial"
    assert engine.compare(band_for(SETTINGS_STUDY, "el"),
                          band_for(SETTINGS_STUDY, "fan"), el.window_a).verdict == "total"
    # IEC 60898-1, instantaneous bands: B16 under C63 ends at 5 x 63 A (no interval over MCBs)
    mcb = pair_of(a, "mcb", "light")
    assert mcb.verdict == "partial"
    assert mcb.limit_a == pytest.approx(5 * 63, rel=1e-6)
    # IEC 60269-1 / common practice: gG 1.6:1 and more is selective
    assert pair_of(a, "fuse", "socket").verdict == "total"


@pytest.mark.parametrize("basis", [None, "envelope"])
def test_overlap_zone_agrees_with_compare_for_every_pair(settings_analysis, basis):
    lv, a = settings_analysis
    if basis is not None:
        a = engine.analyse(SETTINGS_STUDY, lv, basis=basis)
    assert {p.verdict for p in a.pairs} >= {"total", "partial"}
    for p in a.pairs:
        zone = engine.overlap(SETTINGS_STUDY, lv, p, basis)
        by_ids = engine.overlap(SETTINGS_STUDY, lv, (p.upstream, p.downstream), basis)
        for z in (zone, by_ids):
            if p.verdict == "total":
                assert z.is_empty, (p.upstream, p.downstream)
            else:
                assert z.area > 0, (p.upstream, p.downstream)
                assert zone_left_a(z) == pytest.approx(p.limit_a, rel=1e-6), (
                    p.upstream, p.downstream)
                assert z.bounds[2] <= math.log10(p.window_a[1]) + 1e-12


# ---------------------------------------------------------------------------------------------
# `coordination check`: a selectivity shortfall alone exits 1, with the caution
TWO_EQUAL_FUSES = """[study]
title = "Invented workshop: two equal fuse-links in series"

[supply]
u0_v = 230
phases = 3
earthing = "TN-C-S"
pfc_a = 10000
ze_ohm = 0.2

[[circuit]]
id = "feeder"
from = "supply"
device = "gG63"
board = "workshop board"
load_a = 40
[circuit.cable]
length_m = 10
csa_mm2 = 25
cpc_mm2 = 16
insulation = "xlpe"
iz_a = 110

[[circuit]]
id = "press"
from = "feeder"
device = "gG63"
load_a = 40
[circuit.cable]
length_m = 10
csa_mm2 = 25
cpc_mm2 = 16
insulation = "xlpe"
iz_a = 110
"""


def test_check_exits_1_on_a_selectivity_shortfall_alone(cli, tmp_path):
    import json

    import coordination
    from coordination import checks, faults, study

    s = study.loads(TWO_EQUAL_FUSES)
    levels = faults.compute(s)
    # every protection check passes: only selectivity falls short
    results = checks.run(s, levels)
    assert results and all(r.ok for r in results)
    # common practice (IEC 60269 I2t criterion): two equal gG fuse-links are not selective
    assert not engine.analyse(s, levels).ok
    path = tmp_path / "workshop.toml"
    path.write_text(TWO_EQUAL_FUSES, encoding="utf-8")
    out = cli("check", str(path))
    assert out.exit_code == 1, out.output
    assert " ".join(coordination.CAUTION.split()) in " ".join(out.output.split())
    assert "Traceback" not in out.output
    js = cli("check", str(path), "--json")
    assert js.exit_code == 1
    data = json.loads(js.output)
    assert data["ok"] is False
    assert all(c["ok"] for c in data["checks"])
    assert [p["verdict"] for p in data["pairs"]] == ["none"]
