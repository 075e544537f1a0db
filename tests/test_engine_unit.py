"""Unit tests of the overlap engine on invented bands with closed-form crossings.

The bands here are invented power laws (not any device); each expected limit is the closed-form
solution of the invented edges, worked in the test, not read from the code.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest

from coordination import engine
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
    assert r.limit_a == pytest.approx(200.0)


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
    # edges themselves would still be selective (common practice; DESIGN.md)
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
    assert js["pairs"][1]["basis"] == "time-current"
    assert set(js["pairs"][0]) >= {"upstream", "downstream", "verdict", "limit_a", "window_a",
                                   "basis", "band_basis", "required_a", "ok"}


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
    text = engine.format_table(s, lv, a)
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
