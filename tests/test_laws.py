"""`curves.laws`: the shared laws meet the points they are fitted to and invert each other.

Reference: the thermal law t = tau * ln(x^2 / (x^2 - x0^2)) of a first-order heated element
(common practice) and the IEC 60898-1 test points 1.13 In (no trip), 1.45 In (trip within the
conventional time) and 2.55 In (1 s .. 60 s for In <= 32 A).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from curves.laws import (
    equivalent_time,
    fit_thermal_law,
    i2t_time,
    loglog_interpolate,
    thermal_tau,
    thermal_time,
)


# IEC 60898-1: the no-trip law through 1 s at 2.55 In never trips at or below 1.13 In
def test_thermal_law_through_one_point():
    tau = thermal_tau(1.13, 2.55, 1.0)
    assert float(thermal_time(2.55, 1.13, tau)) == pytest.approx(1.0, rel=1e-12)
    assert np.all(np.isinf(thermal_time([0.5, 1.0, 1.13], 1.13, tau)))


# IEC 60898-1: 1.45 In within the conventional time (1 h), 2.55 In within 60 s (In <= 32 A)
def test_widest_thermal_law_through_two_points():
    x0, tau = fit_thermal_law(1.45, 3600.0, 2.55, 60.0)
    assert x0 < 1.45
    assert float(thermal_time(1.45, x0, tau)) <= 3600.0
    assert float(thermal_time(1.45, x0, tau)) == pytest.approx(3600.0, rel=1e-5)
    assert float(thermal_time(2.55, x0, tau)) == pytest.approx(60.0, rel=1e-12)
    with pytest.raises(ValueError):
        fit_thermal_law(1.45, 10.0, 2.55, 60.0)  # a time that rises with current


# common practice: tr is the time at 6 Ir of an I2t = constant law; its energy is constant
@settings(max_examples=50, deadline=None)
@given(st.floats(0.5, 100.0), st.floats(0.1, 30.0))
def test_i2t_law_keeps_the_energy(x, tr_s):
    t = float(i2t_time(x, tr_s, 6.0))
    assert x * x * t == pytest.approx(36.0 * tr_s, rel=1e-12)
    assert float(equivalent_time(36.0 * tr_s, x)) == pytest.approx(t, rel=1e-12)


# common practice: a straight line on log-log axes is a power law, read both ways
@settings(max_examples=50, deadline=None)
@given(st.floats(-3.0, -0.5), st.floats(1.0, 5.0), st.floats(0.05, 0.95))
def test_loglog_line_is_a_power_law_and_reads_back(slope, decades, where):
    i = np.array([10.0, 10.0 * 10**decades])
    t = 1e3 * (i / i[0]) ** slope
    ln_i, ln_t = np.log(i), np.log(t)
    current = float(i[0] * 10 ** (where * decades))
    time = float(loglog_interpolate(current, ln_i, ln_t))
    assert time == pytest.approx(1e3 * (current / i[0]) ** slope, rel=1e-9)
    back = float(loglog_interpolate(time, ln_t, ln_i, descending=True))
    assert math.isclose(back, current, rel_tol=1e-9)


# numpy's own np.unique (a general-purpose reference library) is the reference for the merged
# grid of currents that replaces it on the engine's and the RCD bands' paths
@settings(max_examples=60, deadline=None)
@given(st.lists(st.lists(st.floats(min_value=1e-3, max_value=1e6, allow_nan=False),
                         max_size=40), min_size=1, max_size=4))
def test_merged_grid_is_numpys_unique(grids):
    from curves.band import merged_grid

    got = merged_grid(*grids)
    want = np.unique(np.concatenate([np.asarray(g, dtype=float) for g in grids]))
    assert got.dtype == want.dtype
    np.testing.assert_array_equal(got, want)
