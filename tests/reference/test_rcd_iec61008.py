"""Residual-current bands against IEC 61008-1 / 61009-1, IEC 60364-4-41 and IEC 60364-5-53.

The limits are typed in here from the standards, not read from ``curves.rcd``, so a wrong constant
in the code fails these tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from curves.errors import InputError
from curves.rcd import RCD_IDN_MA, leakage_ok, rcd_band, residual_selective, touch_voltage_ok

#: Residual currents from 1 mA to 1 kA for dense checks [A].
GRID_A = np.logspace(-3, 3, 4001)

# IEC 61008-1 / 61009-1, limit values of break time, general type: (multiple of IΔn, max [s])
GENERAL_MAX = [(1.0, 0.3), (2.0, 0.15), (5.0, 0.04)]
# IEC 61008-1 / 61009-1, type S: (multiple of IΔn, minimum non-actuating [s], max break [s])
S_LIMITS = [(1.0, 0.13, 0.5), (2.0, 0.06, 0.2), (5.0, 0.05, 0.15)]


# IEC 61008-1 / 61009-1, general type: maximum break time at IΔn, 2 IΔn, 5 IΔn
@pytest.mark.parametrize("idn_ma", [100, 300, 500])
@pytest.mark.parametrize(("x", "t_max_s"), GENERAL_MAX)
def test_general_type_clears_within_the_standard_limit(idn_ma: int, x: float,
                                                       t_max_s: float) -> None:
    band = rcd_band(idn_ma)
    t = float(band.t_max(x * idn_ma / 1000))
    assert t <= t_max_s
    # the worst case claims no faster clearing than the standard guarantees
    assert math.isclose(t, t_max_s)


# IEC 61008-1 / 61009-1, general type: times at 2 IΔn hold for a 30 mA device
@pytest.mark.parametrize(("x", "t_max_s"), GENERAL_MAX[:2])
def test_30ma_general_type_points(x: float, t_max_s: float) -> None:
    assert math.isclose(float(rcd_band(30).t_max(x * 0.03)), t_max_s)


# IEC 61008-1, general type with IΔn <= 30 mA: 0.25 A may replace 5 IΔn for the 0.04 s test
# (from memory); 5 IΔn then is held to the 2 IΔn limit, the safe side
def test_30ma_general_type_fast_limit_from_0_25_a() -> None:
    band = rcd_band(30)
    assert math.isclose(float(band.t_max(0.25)), 0.04)
    assert 0.04 <= float(band.t_max(5 * 0.03)) <= 0.15


# IEC 61008-1 / 61009-1, type S: minimum non-actuating and maximum break times
@pytest.mark.parametrize("idn_ma", [100, 300, 1000])
@pytest.mark.parametrize(("x", "t_min_s", "t_max_s"), S_LIMITS)
def test_type_s_limits(idn_ma: int, x: float, t_min_s: float, t_max_s: float) -> None:
    band = rcd_band(idn_ma, selective=True)
    i = x * idn_ma / 1000
    assert math.isclose(float(band.t_min(i)), t_min_s)
    assert math.isclose(float(band.t_max(i)), t_max_s)


# IEC 61008-1 / 61009-1: the maximum break time between two test points is the lower point's
# (a device is only guaranteed to clear by then); above 5 IΔn the 5 IΔn value holds
@pytest.mark.parametrize("selective", [False, True])
def test_staircase_between_points(selective: bool) -> None:
    band = rcd_band(300, selective=selective)
    limits = [0.5, 0.2, 0.15] if selective else [0.3, 0.15, 0.04]
    for lo, hi, t in [(1.0, 2.0, limits[0]), (2.0, 5.0, limits[1]), (5.0, 200.0, limits[2])]:
        x = np.linspace(lo, hi, 50, endpoint=False)
        assert np.allclose(band.t_max(x * 0.3), t)


# IEC 61008-1 / 61009-1: rated residual non-operating current 0.5 IΔn (no operation at or below)
@pytest.mark.parametrize("kw", [{}, {"selective": True}, {"delay_s": 0.3}])
def test_no_operation_at_half_idn(kw: dict) -> None:
    band = rcd_band(300, **kw)
    x = np.linspace(0.01, 0.5, 30)
    assert np.all(np.isinf(band.t_min(x * 0.3)))
    assert np.all(np.isinf(band.t_max(x * 0.3)))
    assert np.isfinite(band.t_min(0.51 * 0.3))


# IEC 60947-2 Annex M (from memory): a delayed relay does not operate before its set delay
def test_delayed_relay_waits_for_its_delay() -> None:
    band = rcd_band(1000, delay_s=0.5)
    i = np.array([0.6, 1.0, 3.0, 100.0])
    assert np.all(band.t_min(i) >= 0.5)
    assert np.all(band.t_max(i) > band.t_min(i))


# IEC 60364-4-41, 411.5.3: RA x IΔn <= 50 V
@pytest.mark.parametrize(
    ("ra_ohm", "idn_a", "ok", "volts"),
    [(1666.0, 0.03, True, 49.98), (500.0, 0.1, True, 50.0), (200.0, 0.3, False, 60.0),
     (100.0, 1.0, False, 100.0)],
)
def test_touch_voltage(ra_ohm: float, idn_a: float, ok: bool, volts: float) -> None:
    result, value = touch_voltage_ok(ra_ohm, idn_a)
    assert result is ok
    assert math.isclose(value, volts)


# common practice (BS 7671 531.3.2, from memory): standing leakage at most 30 % of IΔn
@pytest.mark.parametrize(("leak_ma", "idn_ma", "ok"),
                         [(9.0, 30, True), (9.1, 30, False), (0.0, 30, True), (30.0, 100, True)])
def test_leakage(leak_ma: float, idn_ma: float, ok: bool) -> None:
    result, limit = leakage_ok(leak_ma, idn_ma)
    assert result is ok
    assert math.isclose(limit, 0.3 * idn_ma)


def _independent_selective(up, down) -> bool:
    """The time criterion on a dense grid, computed here apart from the function under test."""
    t_up, t_down = up.t_min(GRID_A), down.t_max(GRID_A)
    return bool(np.all(np.isinf(t_up) | (t_up > t_down)))


# IEC 60364-5-53 (from memory): upstream type S or delayed, IΔn ratio >= 3, and its non-actuating
# time above the downstream's break time; IEC 61008-1 limits for the times
def test_rcbo_30ma_under_a_general_30ma_is_not_selective() -> None:
    result = residual_selective(rcd_band(30), rcd_band(30))
    assert result.verdict == "none"
    assert "general type" in result.reason


# IEC 60364-5-53 (from memory): a 100 mA type S over a 30 mA RCBO meets the rule (type S, ratio
# 3.3), so the pair is selective, decided by the rule; the IEC 61008-1 limits alone leave a gap
# (a 30 mA general type may take 0.3 s at 50..60 mA where a 100 mA type S may act after 0.13 s),
# which the reason names, asking for the makers' data
def test_rcbo_30ma_under_100ma_type_s_is_total_by_the_rule() -> None:
    up, down = rcd_band(100, selective=True), rcd_band(30)
    result = residual_selective(up, down)
    assert result.verdict == "total"
    assert result.decided_by == "rule"
    assert "50 mA" in result.reason and "makers' data" in result.reason
    assert not _independent_selective(up, down)
    i = 0.055  # 1.83 IΔn of the 30 mA, 0.55 IΔn of the 100 mA
    assert float(up.t_min(i)) < float(down.t_max(i))


# IEC 60364-5-53 (from memory) and IEC 61008-1 limits: a 500 mA type S or a 100 mA relay
# delayed 0.5 s waits longer than a 30 mA general type takes to clear
@pytest.mark.parametrize("up", [rcd_band(500, selective=True), rcd_band(100, delay_s=0.5)])
def test_rcbo_30ma_under_a_delayed_device_is_selective(up) -> None:
    down = rcd_band(30)
    result = residual_selective(up, down)
    assert result.verdict == "total"
    assert result.decided_by == "limits"
    assert _independent_selective(up, down)


# IEC 60364-5-53 (from memory): IΔn ratio below 3 is not selective even when the times are
@pytest.mark.parametrize(("up", "down"), [(rcd_band(500, selective=True), rcd_band(300)),
                                          (rcd_band(1000, delay_s=1.0), rcd_band(500))])
def test_ratio_below_three_is_not_selective(up, down) -> None:
    result = residual_selective(up, down)
    assert result.verdict == "none"
    assert "ratio" in result.reason


@pytest.mark.parametrize(
    ("kw", "key"),
    [({"idn_ma": 25}, "idn_ma"), ({"idn_ma": -30}, "idn_ma"), ({"idn_ma": "30"}, "idn_ma"),
     ({"idn_ma": 30, "waveform": "DC"}, "waveform"),
     ({"idn_ma": 30, "selective": True}, "selective"),
     ({"idn_ma": 100, "selective": 1}, "selective"), ({"idn_ma": 100, "delay_s": -0.1}, "delay_s"),
     ({"idn_ma": 100, "delay_s": math.inf}, "delay_s"),
     ({"idn_ma": 100, "delay_s": 0.2, "selective": True}, "delay_s")],
)
def test_bad_input_names_the_key(kw: dict, key: str) -> None:
    with pytest.raises(InputError) as err:
        rcd_band(**kw)
    assert err.value.key == key
    assert "allowed" in str(err.value) or "give" in str(err.value)


# -- properties (common practice: an edge never rises with current, lower <= upper, a larger
# setting never sits left of a smaller one) --------------------------------------------------------
def _valid(idn_ma: int, selective: bool, delay_s: float) -> bool:
    return not (selective and (idn_ma <= 30 or delay_s > 0))


devices = st.tuples(st.sampled_from(RCD_IDN_MA), st.booleans(),
                    st.sampled_from((0.0, 0.06, 0.15, 0.3, 1.0))).filter(lambda d: _valid(*d))
currents = st.lists(st.floats(min_value=1e-4, max_value=1e4, allow_nan=False),
                    min_size=2, max_size=40).map(lambda xs: np.sort(np.array(xs)))


@settings(max_examples=30, deadline=None)
@given(device=devices, current=currents)
def test_edges_monotone_and_ordered(device: tuple, current: np.ndarray) -> None:
    idn, selective, delay = device
    band = rcd_band(idn, selective=selective, delay_s=delay)
    i = np.sort(np.concatenate([current, GRID_A]))
    lo, hi = band.t_min(i), band.t_max(i)
    assert np.all(lo[1:] <= lo[:-1]) and np.all(hi[1:] <= hi[:-1])
    assert np.all(lo <= hi) and np.all(lo > 0)


@settings(max_examples=30, deadline=None)
@given(device=devices, step=st.integers(min_value=1, max_value=len(RCD_IDN_MA) - 1),
       more_delay=st.sampled_from((0.0, 0.1, 0.5)))
def test_larger_setting_never_left(device: tuple, step: int, more_delay: float) -> None:
    idn, selective, delay = device
    k = RCD_IDN_MA.index(idn)
    bigger = RCD_IDN_MA[min(k + step, len(RCD_IDN_MA) - 1)]
    small = rcd_band(idn, selective=selective, delay_s=delay)
    large = rcd_band(bigger, selective=selective,
                     delay_s=delay + more_delay if delay > 0 else delay)
    assert np.all(large.t_min(GRID_A) >= small.t_min(GRID_A))
    assert np.all(large.t_max(GRID_A) >= small.t_max(GRID_A))
