"""The starting check against the standards' limits: IEC 60947-4-1 (overload relay trip classes),
IEC 60269-2 (aM fuse-links), IEC 60898-1 (type D MCBs); the start's first peak and star-delta
ratio are common practice.

Each case puts a start where the standard decides it for every compliant device: a start shorter
than the least time the standard allows passes on both bases, one longer than the greatest time
it allows fails on both. The limits are typed in here, not read from the code.
"""

from __future__ import annotations

import pytest

from coordination.motors import (
    ChainDevice,
    Inrush,
    Motor,
    inrush_start,
    motor_start,
    start_current_a,
    starting_verdict,
    with_relay,
)
from curves.fuse_am import am_band
from curves.mcb import mcb_band
from curves.spec import band_from_spec

BASES = ("typical", "envelope")


def verdict(band, motor: Motor, basis: str, running_a: float = 0.0):
    envelope = band_from_spec(band, "envelope") if isinstance(band, str) else None
    own = band_from_spec(band, basis) if isinstance(band, str) else band
    return starting_verdict(motor_start(motor), [ChainDevice("m", own, running_a, envelope)])


# IEC 60947-4-1, table of trip classes: at 7.2 Ir the relay trips after Tp with
# Tp_min < Tp <= Tp_max: 10A 2..10 s, 10 4..10 s, 20 6..20 s, 30 9..30 s
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("cls", "tp_min_s", "tp_max_s"),
                         [("10A", 2, 10), ("10", 4, 10), ("20", 6, 20), ("30", 9, 30)])
def test_relay_with_am_fuse_carries_a_start_shorter_than_tp_min(basis, cls, tp_min_s, tp_max_s):
    # a start of 7.2 FLC with Ir = FLC = 20 A; the aM32 takes the faults (IEC 60269-2)
    short = Motor(flc_a=20, start_x=7.2, start_s=tp_min_s * 0.95, relay_class=cls,
                  relay_ir_a=20)
    long = Motor(flc_a=20, start_x=7.2, start_s=tp_max_s * 1.05, relay_class=cls,
                 relay_ir_a=20)
    band = with_relay(am_band(32, basis=basis), short)
    assert verdict(band, short, basis).ok
    assert not verdict(band, long, basis).ok


# IEC 60947-4-1, class 10: 4 s < Tp <= 10 s at 7.2 Ir, so a 3 s start of 7.2 FLC passes and a
# 12 s one fails; IEC 60269-2 (from memory): the aM25 does not melt within 60 s at 4 In and,
# log-log to 0.5 s at 8 In, not within 3 s at 5.76 In (144 A)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("start_s", "ok"), [(3.0, True), (12.0, False)])
def test_am_fuse_with_class_10_relay_three_and_twelve_second_starts(basis, start_s, ok):
    motor = Motor(flc_a=20, start_x=7.2, start_s=start_s, relay_class="10", relay_ir_a=20)
    band = with_relay(am_band(25, basis=basis), motor)
    result = verdict(band, motor, basis)
    assert result.ok is ok
    if not ok:
        assert not result.binding.holds_time


# IEC 60269-2, aM gates (from memory): no melting within 60 s at 4 In; melting within 60 s at
# 6.3 In. An aM fuse-link alone carries a 4 In start of 59 s and not a 6.3 In start of 61 s
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("start_x", "start_s", "ok"), [(4.0, 59.0, True), (6.3, 61.0, False)])
def test_am_fuse_alone_at_its_60_s_gates(basis, start_x, start_s, ok):
    motor = Motor(flc_a=63, start_x=start_x, start_s=start_s)
    assert verdict(am_band(63, basis=basis), motor, basis).ok is ok


# IEC 60898-1, Table 7: a type D MCB up to 32 A trips within 60 s at 2.55 In (test c), so a
# 70 s start at 2.55 In fails on any basis; no trip within 1 h at 1.13 In (test a), so a
# 600 s start at 1.13 In passes
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("start_x", "start_s", "ok"), [(2.55, 70.0, False), (1.13, 600.0, True)])
def test_type_d_mcb_thermal_limits(basis, start_x, start_s, ok):
    motor = Motor(flc_a=32, start_x=start_x, start_s=start_s)
    assert verdict("D32", motor, basis).ok is ok


# IEC 60898-1, Table 7 test d: a type D MCB does not trip within 0.1 s below 10 In; its
# instantaneous release may act above 10 In. First peak 2.0 x the r.m.s. start current (common
# practice, the safe end of 1.7-2): a 0.05 s start of 5 In (peak 10 In) passes, one of 5.1 In
# (peak 10.2 In) fails on the peak
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("start_x", "ok"), [(5.0, True), (5.1, False)])
def test_type_d_mcb_first_peak_against_10_in(basis, start_x, ok):
    motor = Motor(flc_a=32, start_x=start_x, start_s=0.05)
    result = verdict("D32", motor, basis)
    assert result.ok is ok
    assert result.binding.holds_time
    assert result.profile.peak_a == pytest.approx(2.0 * start_x * 32, rel=1e-12)


# Star-delta: the line current in star is a third of the direct-on-line value (common practice)
@pytest.mark.parametrize("start_x", [5.0, 7.5])
def test_star_delta_is_a_third_of_dol(start_x):
    dol = start_current_a(40.0, start_x, "dol")
    assert start_current_a(40.0, start_x, "star-delta") == pytest.approx(dol / 3, rel=1e-12)
    assert start_current_a(40.0, start_x, "soft") == pytest.approx(dol, rel=1e-12)


# IEC 60898-1 Table 7 test d (no trip within 0.1 s below 10 In for type D) and the inrush given
# as its first peak (peak factor 1): a 9.5 Ib inrush of 0.05 s on a D32 with Ib = In holds, a
# 10.5 Ib one reaches the instantaneous release
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("x", "ok"), [(9.5, True), (10.5, False)])
def test_inrush_against_type_d_instantaneous(basis, x, ok):
    profile = inrush_start(Inrush(x=x, s=0.05), 32.0)
    chain = [ChainDevice("tx", mcb_band("D", 32, basis=basis), 0.0,
                         mcb_band("D", 32, basis="envelope"))]
    assert starting_verdict(profile, chain).ok is ok
