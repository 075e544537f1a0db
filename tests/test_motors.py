"""coordination.motors: the start profile, the starting verdict and the motor's tables (properties
and bad input). Values against the standards are in tests/reference/test_motor_starting.py."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from coordination.motors import (
    PEAK_FACTOR,
    ChainDevice,
    Motor,
    inrush_from_table,
    motor_from_table,
    motor_start,
    starting_verdict,
    with_relay,
)
from curves.errors import InputError
from curves.spec import band_from_spec

DEVICES = ("D32", "C32", "gG40", "aM40", "D63", "gG100")


@settings(max_examples=60, deadline=None)
@given(device=st.sampled_from(DEVICES), flc=st.floats(2.0, 40.0), start_x=st.floats(1.0, 10.0),
       t1=st.floats(0.05, 100.0), t2=st.floats(0.05, 100.0), running=st.floats(0.0, 50.0))
def test_a_longer_start_or_more_running_load_never_helps(device, flc, start_x, t1, t2, running):
    band = band_from_spec(device)
    short, long = sorted((t1, t2))
    a = starting_verdict(motor_start(Motor(flc, start_x, long)),
                         [ChainDevice("m", band, running)])
    b = starting_verdict(motor_start(Motor(flc, start_x, short)), [ChainDevice("m", band)])
    assert not (a.ok and not b.ok)


@settings(max_examples=40, deadline=None)
@given(flc=st.floats(2.0, 40.0), start_x=st.floats(1.0, 10.0), start_s=st.floats(0.05, 60.0))
def test_ok_means_every_device_holds_and_the_peak_is_twice_the_current(flc, start_x, start_s):
    chain = [ChainDevice("m", band_from_spec("D40")), ChainDevice("f", band_from_spec("gG100"),
                                                                  30.0)]
    v = starting_verdict(motor_start(Motor(flc, start_x, start_s)), chain)
    assert v.ok == all(d.holds for d in v.devices)
    assert v.devices[1].current_a == pytest.approx(v.devices[0].current_a + 30.0)
    assert v.profile.peak_a == pytest.approx(PEAK_FACTOR * flc * start_x)
    assert (v.binding in v.devices) and (v.ok or not v.binding.holds)


def test_the_issue_d32_with_a_6_s_start_fails_on_its_own_thermal_band():
    # invented motor: FLC 22 A, 7 FLC for 6 s (154 A, 4.8 In of a D32)
    v = starting_verdict(motor_start(Motor(22.0, 7.0, 6.0)),
                         [ChainDevice("pump", band_from_spec("D32"))])
    assert not v.ok and not v.binding.holds_time
    assert 1.0 < v.binding.t_min_s < 2.0
    assert "before the start ends" in v.reason()


def test_a_pass_on_the_typical_basis_names_the_envelope_time():
    # invented motor: FLC 11 A, 6 FLC for 6 s on a D32 (2.06 In)
    chain = [ChainDevice("pump", band_from_spec("D32"), 0.0, band_from_spec("D32", "envelope"))]
    v = starting_verdict(motor_start(Motor(11.0, 6.0, 6.0)), chain)
    assert v.ok and "envelope basis" in v.reason()
    assert math.isfinite(v.binding.t_min_envelope_s)


def test_with_relay_keeps_a_device_without_relay_and_joins_one_with_it():
    band = band_from_spec("aM25")
    assert with_relay(band, Motor(20.0, 6.0, 3.0)) is band
    joined = with_relay(band, Motor(20.0, 6.0, 3.0, relay_class="10", relay_ir_a=20.0))
    assert joined.family == "motor-circuit" and joined.rating_a == 20.0


@pytest.mark.parametrize(("table", "key"), [
    ({"flc_a": 20, "start_x": 6}, "start_s"),
    ({"flc_a": 20, "start_x": 60, "start_s": 3}, "start_x"),
    ({"flc_a": 20, "start_x": 6, "start_s": True}, "start_s"),
    ({"flc_a": -2, "start_x": 6, "start_s": 3}, "flc_a"),
    ({"flc_a": 20, "start_x": 6, "start_s": 3, "starting": "wye"}, "starting"),
    ({"flc_a": 20, "start_x": 6, "start_s": 3, "relay_class": 15}, "relay_class"),
    ({"flc_a": 20, "start_x": 6, "start_s": 3, "relay_ir_a": 20}, "relay_ir_a"),
    ({"flc_a": 20, "start_x": 6, "start_s": 3, "flc": 20}, "flc"),
])
def test_bad_motor_tables_name_the_key(table, key):
    with pytest.raises(InputError) as error:
        motor_from_table(table)
    assert error.value.key == key


@pytest.mark.parametrize(("table", "key"), [({"x": 12}, "s"), ({"x": 0.5, "s": 0.1}, "x"),
                                            ({"x": 12, "s": 0.1, "t": 1}, "t")])
def test_bad_inrush_tables_name_the_key(table, key):
    with pytest.raises(InputError) as error:
        inrush_from_table(table)
    assert error.value.key == key
