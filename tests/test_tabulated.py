"""Datasheet devices: points checked, log-log interpolation, the band's invariants.

Every curve here is invented for the test (no manufacturer or product data).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from curves.band import TIME_FLOOR_S
from curves.errors import InputError
from curves.tabulated import datasheet_band, datasheet_curve

# Invented device: a 100 A breaker-like curve.
LOWER = [[120.0, 3600.0], [300.0, 60.0], [1000.0, 0.5], [2000.0, 0.02]]
UPPER = [[150.0, 7200.0], [400.0, 100.0], [1200.0, 2.0], [3000.0, 0.03]]


def make(**kw):
    args = {"In_a": 100, "lower": LOWER, "upper": UPPER, "name": "test device"} | kw
    return datasheet_band(**args)


def test_basis_family_and_pickups():
    band = make()
    assert (band.family, band.basis, band.name) == ("datasheet", "datasheet", "test device")
    assert band.pickup_min_a == 120.0
    assert band.pickup_max_a == 150.0
    assert band.rating_a == 100.0


# The points themselves come back exactly.
@pytest.mark.parametrize(("i", "t"), LOWER)
def test_lower_points_are_exact(i, t):
    assert make().t_min(i) == pytest.approx(t, rel=1e-12)


@pytest.mark.parametrize(("i", "t"), UPPER)
def test_upper_points_are_exact(i, t):
    assert make().t_max(i) == pytest.approx(t, rel=1e-12)


# Common practice: straight lines on log-log axes, so at the geometric mean of two currents the
# time is the geometric mean of their times.
@pytest.mark.parametrize("n", range(len(LOWER) - 1))
def test_loglog_midpoint(n):
    (i1, t1), (i2, t2) = LOWER[n], LOWER[n + 1]
    assert make().t_min(math.sqrt(i1 * i2)) == pytest.approx(math.sqrt(t1 * t2), rel=1e-9)


def test_datasheet_curve_power_law():
    # A power law t = k / I^2 is a straight line in log-log: interpolation reproduces it.
    xp = np.array([10.0, 1000.0])
    fp = 5e4 / xp**2
    i = np.geomspace(10, 1000, 7)
    assert datasheet_curve(i, xp, fp, below=np.inf) == pytest.approx(5e4 / i**2, rel=1e-9)


def test_never_below_first_point_and_hold_after_last():
    band = make()
    assert np.isinf(band.t_min(119.9))
    assert np.isinf(band.t_max(149.9))
    # our design: above the last point each curve holds its last time
    assert band.t_min(1e6) == pytest.approx(0.02, rel=1e-12)
    assert band.t_max(1e6) == pytest.approx(0.03, rel=1e-12)
    assert any("hold" in n for n in band.notes)


def test_instantaneous_floor():
    band = make(instantaneous_a=1500.0)
    assert band.instantaneous_a == 1500.0
    assert band.t_min(1500.0) == TIME_FLOOR_S
    assert band.t_min(1499.0) > 0.02


def test_let_through_interpolated_and_unknown_outside():
    band = make(let_through=[[5000.0, 1e5], [20000.0, 4e5]])
    assert band.let_through(np.array(10000.0)) == pytest.approx(2e5, rel=1e-9)
    assert np.isinf(band.let_through(np.array(30000.0)))
    # outside its range the band falls back on I^2 t_max
    assert band.i2t_let_through(30000.0) == pytest.approx(30000.0**2 * 0.03, rel=1e-12)


def test_equal_specs_share_a_key_different_points_do_not():
    assert make() == make()
    other = make(upper=[[150.0, 7200.0], [400.0, 100.0], [1200.0, 2.0], [3000.0, 0.04]])
    assert make() != other


# -- rejected points ---------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("kw", "key"),
    [
        ({"lower": [[120, 3600]]}, "lower"),  # one point
        ({"lower": "120, 3600"}, "lower"),
        ({"lower": [[120, 3600], [100, 60]]}, "lower"),  # currents fall
        ({"lower": [[120, 3600], [120, 60]]}, "lower"),  # currents repeat
        ({"lower": [[120, 60], [300, 3600]]}, "lower"),  # times rise
        ({"upper": [[150, 7200], [400, float("inf")]]}, "upper[1]"),
        ({"upper": [[150, 7200], [400, float("nan")]]}, "upper[1]"),
        ({"upper": [[-150, 7200], [400, 100]]}, "upper[0]"),
        ({"upper": [[150, 7200], [400, 0]]}, "upper[1]"),
        ({"upper": [[150, 7200, 1], [400, 100]]}, "upper"),
        ({"upper": [[150, "7200"], [400, 100]]}, "upper[0]"),
        ({"lower": [[200, 3600], [300, 60]]}, "lower"),  # starts above the upper curve's start
        ({"lower": [[120, 3600], [300, 200]]}, "lower"),  # above upper at 300 A
        ({"lower": [[120, 3600], [300, 60], [1000, 0.5], [5000, 0.1]]}, "lower"),  # hold region
        ({"let_through": [[5000, 2e5], [20000, 1e5]]}, "let_through"),  # energy falls
        ({"In_a": 0}, "In_a"),
        ({"instantaneous_a": -5}, "instantaneous_a"),
        ({"breaking_capacity_a": float("inf")}, "breaking_capacity_a"),
        ({"name": ""}, "name"),
    ],
)
def test_bad_points_are_refused(kw, key):
    with pytest.raises(InputError) as info:
        make(**kw)
    assert info.value.key == key
    assert "\n" not in str(info.value)


# -- properties over random valid curves -------------------------------------------------------
@st.composite
def curves(draw):
    """Random valid lower/upper curves: upper = lower shifted right in current and up in time."""
    n = draw(st.integers(min_value=2, max_value=8))
    steps_i = draw(st.lists(st.floats(0.05, 1.0), min_size=n - 1, max_size=n - 1))
    steps_t = draw(st.lists(st.floats(0.0, 2.0), min_size=n - 1, max_size=n - 1))
    i0 = draw(st.floats(1.0, 1000.0))
    t0 = draw(st.floats(10.0, 1e4))
    log_i = np.log10(i0) + np.concatenate([[0.0], np.cumsum(steps_i)])
    log_t = np.log10(t0) - np.concatenate([[0.0], np.cumsum(steps_t)])
    shift_i = draw(st.floats(0.0, 0.3))
    shift_t = draw(st.floats(0.0, 0.5))
    lower = np.column_stack([10**log_i, 10**log_t]).tolist()
    upper = np.column_stack([10 ** (log_i + shift_i), 10 ** (log_t + shift_t)]).tolist()
    return lower, upper


# Common practice: a datasheet band's edges never rise with current and lower <= upper.
@settings(max_examples=50, deadline=None)
@given(curves(), st.lists(st.floats(0.1, 1e7), min_size=2, max_size=50))
def test_datasheet_edges_monotone_and_ordered(pair, currents):
    lower, upper = pair
    band = datasheet_band(In_a=1.0, lower=lower, upper=upper)
    i = np.sort(np.asarray(currents))
    lo, hi = band.t_min(i), band.t_max(i)
    assert np.all(lo[1:] <= lo[:-1])
    assert np.all(hi[1:] <= hi[:-1])
    assert np.all(lo <= hi * (1 + 1e-9))
