"""Operating times and selectivity under a decaying current: properties, and agreement with the
constant-current engine when the current does not decay."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from coordination import decay, engine
from coordination.decay import FaultFamily
from coordination.generator import Decrement
from curves.band import Band
from curves.breaker import thermal_magnetic_band
from curves.fuse import gg_band
from curves.mcb import mcb_band

BANDS = {
    "B16": mcb_band("B", 16, basis="envelope"),
    "C32": mcb_band("C", 32, basis="envelope"),
    "gG63": gg_band(63, basis="envelope"),
    "gG200": gg_band(200, basis="envelope"),
    "tm250": thermal_magnetic_band(In_a=250, Ir_x=0.8, Ii_x=10, basis="envelope"),
}


@settings(max_examples=40, deadline=None)
@given(name=st.sampled_from(sorted(BANDS)), multiple=st.floats(1.0, 60.0))
def test_a_current_that_does_not_decay_gives_the_edge_itself(name: str, multiple: float) -> None:
    band = BANDS[name]
    current = band.rating_a * multiple
    for edge in (band.t_min, band.t_max):
        expected = float(edge(current))
        got = decay.operating_time_s(edge, Decrement(current, current, current, 0.02, 0.3))[0]
        if math.isfinite(expected) and expected <= decay.T_END_S:
            assert got == pytest.approx(max(expected, decay.T_START_S), rel=1e-5)
        else:
            assert got == math.inf


@settings(max_examples=40, deadline=None)
@given(name=st.sampled_from(sorted(BANDS)), multiple=st.floats(2.0, 80.0),
       transient=st.floats(0.2, 1.0), sustained=st.floats(0.0, 1.0))
def test_a_decaying_current_never_operates_a_device_sooner(name: str, multiple: float,
                                                            transient: float,
                                                            sustained: float) -> None:
    """No sooner than under the initial current held, no later than under the sustained one;
    more sustained current never makes it later."""
    band = BANDS[name]
    i0 = band.rating_a * multiple
    i1 = i0 * transient
    ik = i1 * sustained
    t = decay.operating_time_s(band.t_max, Decrement(i0, i1, ik, 0.02, 0.3))[0]
    held = decay.operating_time_s(band.t_max, Decrement(i0, i0, i0, 0.02, 0.3))[0]
    assert t >= held * (1 - 1e-9)
    if ik > 0:
        floor = decay.operating_time_s(band.t_max, Decrement(ik, ik, ik, 0.02, 0.3))[0]
        assert t <= floor * (1 + 1e-9)
    more = decay.operating_time_s(band.t_max, Decrement(i0, i1, min(i1, ik * 1.5 + 1.0),
                                                        0.02, 0.3))[0]
    assert more <= t * (1 + 1e-9)


def test_many_faults_at_once_equal_one_at_a_time() -> None:
    band = BANDS["gG63"]
    d = Decrement(np.array([3000.0, 1200.0, 600.0]), np.array([2000.0, 1000.0, 550.0]),
                  np.array([0.0, 500.0, 500.0]), 0.02, 0.3)
    together = decay.operating_time_s(band.t_max, d)
    for k in range(3):
        one = Decrement(d.i_sub_a[k], d.i_trans_a[k], d.i_sust_a[k], 0.02, 0.3)
        assert decay.operating_time_s(band.t_max, one)[0] == together[k]


def test_a_meeting_between_two_samples_is_found() -> None:
    """A definite-time edge met only for an instant between two grid samples (the current
    falls below the pickup 0.01 % later, far inside one step of the finer grid): found at its
    own time by the probe."""
    t_grid = decay._GRID
    t_meet = math.sqrt(t_grid[100] * t_grid[101])  # between two samples
    # the current falls through 1000 A at 1.0001 t_meet
    i0 = 1000.0 * math.exp(t_meet * 1.0001 / 0.3)
    d = Decrement(i0, i0, 0.0, 0.02, 0.3)

    def edge(i: np.ndarray) -> np.ndarray:
        return np.where(np.asarray(i) >= 1000.0, t_meet, np.inf)

    assert decay.operating_time_s(edge, d)[0] == pytest.approx(t_meet, rel=1e-5)


FLAT = FaultFamily((0.02 + 0.03j, 0.02 + 0.03j, 0.02 + 0.03j), 0.01 + 0.005j, 230.0, 0.02, 0.3)


@pytest.mark.parametrize(("up", "down"), [
    ("gG200", "B16"), ("gG200", "gG63"), ("C32", "B16"), ("tm250", "gG63"), ("gG63", "C32")])
def test_without_decay_the_pair_agrees_with_the_engine(up: str, down: str) -> None:
    u, d = BANDS[up], BANDS[down]
    got = decay.compare_decaying(u, d, FLAT)
    want = engine.compare(u, d, got.window_a)
    assert got.verdict == want.verdict
    if want.limit_a is None:
        assert got.limit_a is None
    else:
        assert got.limit_a == pytest.approx(want.limit_a, rel=5e-4)  # decay._LIMIT_XTOL


def test_a_decaying_fault_that_the_upstream_never_sees_is_selective() -> None:
    """Under an unsupported generator a gG200 never operates on a final circuit's fault that
    an MCB clears: selective, and the MCB's time is finite."""
    faults = FaultFamily((0.0057 + 0.038j, 0.0057 + 0.079j, None), 0.3 + 0.01j, 230.0, 0.02, 0.3)
    r = decay.compare_decaying(BANDS["gG200"], BANDS["B16"], faults)
    assert r.verdict == "total"
    t = decay.clearing_time_s(BANDS["B16"], faults.at_initial_a(faults.bolted_a))
    assert t[0] <= 0.1


def test_a_tested_limit_overrides_the_curves() -> None:
    r = decay.compare_decaying(BANDS["C32"], BANDS["B16"], FLAT, tested_limit_a=500.0)
    assert (r.verdict, r.limit_a, r.decided_by) == ("partial", 500.0, "tested")
    hi = decay.compare_decaying(BANDS["C32"], BANDS["B16"], FLAT, tested_limit_a=1e6)
    assert (hi.verdict, hi.limit_a) == ("total", None)


def test_fault_family_initial_currents() -> None:
    faults = FaultFamily((0.0057 + 0.038j, 0.0057 + 0.079j, None), 0.05 + 0.01j, 230.0, 0.02,
                         0.3)
    want = np.array([100.0, 1000.0, faults.bolted_a])
    got = faults.at_initial_a(want)
    np.testing.assert_allclose(got.i_sub_a, want, rtol=1e-12)
    assert np.all(got.i_trans_a <= got.i_sub_a) and np.all(got.i_sust_a == 0)



def test_the_limit_under_a_definite_time_upstream_is_where_its_pickup_is_still_carried():
    """U operates at 0.3 s from 700 A, D clears at 0.05 s from 100 A, margin 10 (D's time
    0.5 s): the pair stops being selective at the fault whose decaying current still carries
    700 A at 0.3 s, found here by scipy's Brent method (a general-purpose library)."""
    from scipy import optimize

    def edges(pickup: float, t: float, name: str) -> Band:
        def edge(i: np.ndarray) -> np.ndarray:
            return np.where(np.asarray(i) >= pickup, t, np.inf)

        return Band(name, "datasheet", "datasheet", pickup, pickup, pickup, 3600.0,
                    lower=edge, upper=edge, key=(name,))

    faults = FaultFamily((0.0057 + 0.038j, 0.0057 + 0.079j, None), 0.02 + 0.01j, 230.0, 0.02,
                         0.3)
    got = decay.compare_decaying(edges(700.0, 0.3, "U"), edges(100.0, 0.05, "D"), faults,
                                 margin=10.0)

    def carried(i0: float) -> float:
        return float(np.ravel(faults.at_initial_a(i0).current_a(0.3))[0]) - 700.0

    want = optimize.brentq(carried, 700.0, faults.bolted_a, xtol=1e-9)
    assert got.verdict == "partial"
    assert got.limit_a == pytest.approx(want, rel=5e-4)  # decay._LIMIT_XTOL
