"""The overlap engine against published selectivity rules and hand checks from published gates.

Every expected value is worked here from the published numbers (IEC 60269, IEC 60898-1 and
EN 60898-1 Annex ZA, IEC 60947-2, each with its status), never read from the code.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from coordination import engine
from curves.band import ENERGY_REGION_S
from curves.breaker import electronic_band, thermal_magnetic_band
from curves.fuse import gg_band
from curves.mcb import mcb_band
from curves.spec import band_from_spec

# IEC 60269-2 gG I2t table (from memory): (In, min pre-arcing I2t, max operating I2t)
GG_I2T_A2S = {
    16: (300, 1_000), 25: (1_000, 3_000), 40: (3_000, 9_000), 63: (9_000, 27_000),
    80: (16_000, 46_000), 100: (27_000, 86_000), 160: (86_000, 250_000),
    250: (250_000, 760_000), 400: (760_000, 2_250_000), 630: (2_250_000, 7_500_000),
}
#: IEC 60898-1, instantaneous tripping ranges: lower multiple of In (no trip within 0.1 s).
MCB_LOWER_INSTANTANEOUS_X = {"B": 3, "C": 5, "D": 10}


# IEC 60269-1/-2: gG fuse-links whose rated currents are in the ratio 1.6:1 are selective (the
# minor's maximum operating I2t does not exceed the major's minimum pre-arcing I2t)
@pytest.mark.parametrize(("major", "minor"), [
    (100, 63), (63, 40), (40, 25), (25, 16), (160, 100), (250, 160), (400, 250), (630, 400),
])
def test_gg_ratio_1_6_is_selective_at_every_current(major, minor):
    # the table itself satisfies the I2t criterion (at equal I2t the pair is selective)
    assert GG_I2T_A2S[minor][1] <= GG_I2T_A2S[major][0]
    up, down = gg_band(major), gg_band(minor)
    window = (down.pickup_min_a, 100_000.0)
    r = engine.compare(up, down, window)
    assert r.verdict == "total"
    assert r.limit_a is None
    # every current of the window: the minor has cleared before the major can melt
    i = np.logspace(math.log10(window[0]), math.log10(window[1]), 2000)
    t_down, t_up = down.t_max(i), up.t_min(i)
    both_never = np.isinf(t_down) & np.isinf(t_up)
    assert np.all(both_never | (t_down <= t_up * (1 + 1e-9)))


# common practice (IEC 60269 I2t criterion): two gG fuse-links of equal rating are not selective
@pytest.mark.parametrize("rating", [25, 63, 100, 250])
def test_equal_gg_ratings_are_not_selective(rating):
    down = gg_band(rating)
    r = engine.compare(gg_band(rating), down, (down.pickup_min_a, 50_000.0))
    assert r.verdict == "none"
    assert r.limit_a <= down.pickup_max_a


# IEC 60269 I2t criterion with the gG I2t table above (from memory): adjacent ratings whose minor
# maximum operating I2t exceeds the major minimum pre-arcing I2t cannot be selective at high fault
@pytest.mark.parametrize(("major", "minor"), [(100, 80), (80, 63)])
def test_gg_adjacent_ratings_fail_the_i2t_criterion(major, minor):
    assert GG_I2T_A2S[minor][1] > GG_I2T_A2S[major][0]
    down = gg_band(minor)
    r = engine.compare(gg_band(major), down, (down.pickup_min_a, 100_000.0))
    assert r.verdict in ("partial", "none")


# IEC 60269-2 gates (Imax(5 s) for 16..100 A confirmed, the rest from memory):
# (In, Imin(10 s), Imax(5 s)) [A], and the conventional times (from memory) [s]
GG_GATES_A = {
    16: (33, 65), 25: (52, 110), 40: (95, 190), 63: (160, 320), 80: (215, 425),
    100: (290, 580), 125: (355, 715), 160: (465, 950), 200: (610, 1_250), 250: (750, 1_650),
    315: (1_050, 2_200), 400: (1_420, 2_840), 630: (2_200, 5_100),
}


# IEC 60269-1 / 60269-2: gG fuse-links in the ratio 1.6:1 are selective (from memory). On the
# envelope the gates alone would not show it (the major's 10 s gate lies below the minor's 5 s
# gate), so the envelope holds the major's pre-arcing edge at or above the minor's operating edge,
# as every compliant pair must be; and its edge passes through the conventional non-fusing point
# (1.25 In, the conventional time) with no jump. Every such pair is selective on both bases,
# decided over the whole window.
@pytest.mark.parametrize(("major", "minor"), [
    (100, 63), (125, 80), (160, 100), (200, 125), (250, 160), (315, 200), (400, 250),
    (63, 40), (40, 25), (25, 16), (630, 400),
])
@pytest.mark.parametrize("basis", ["typical", "envelope"])
def test_gg_ratio_1_6_is_total_on_both_bases(major, minor, basis):
    # the hand check that the gates alone would not do it on the envelope
    assert GG_GATES_A[major][0] < GG_GATES_A[minor][1]
    down = gg_band(minor, basis=basis)
    r = engine.compare(gg_band(major, basis=basis), down, (down.pickup_min_a, 100_000.0))
    assert r.verdict == "total"
    assert r.limit_a is None


# IEC 60269-2 I2t at 0.01 s (from memory): one step apart (315/250 A, 630/500 A) the minor's
# maximum operating I2t exceeds the major's minimum pre-arcing I2t, so on the typical basis the pair
# is partial where the fuses melt in under 0.01 s: decided by energy, not at the major's pickup
@pytest.mark.parametrize(("major", "minor"), [(315, 250), (630, 500)])
def test_gg_one_step_apart_is_decided_by_energy(major, minor):
    down = gg_band(minor)
    up = gg_band(major)
    assert down.let_through(1e5) > up.pre_arcing_i2t_min_a2s
    r = engine.compare(up, down, (down.pickup_min_a, 100_000.0))
    assert r.verdict == "partial"
    assert r.decided_by == "energy"
    assert r.limit_a > 10 * up.pickup_max_a  # far above the major's overload region


# IEC 60947-2 (magnetic release tolerance +/-20 %, from memory): a thermal-magnetic breaker with
# Ii = 10 x 250 A may act from 0.8 x 2500 = 2000 A on the envelope, so a C32 and a C16 under it are
# both limited there, whichever region the MCB has reached: the release's current pickup decides
@pytest.mark.parametrize("rating", [32, 16])
def test_mcb_under_magnetic_release_is_limited_at_its_pickup(rating):
    up = thermal_magnetic_band(In_a=250, Ir_x=0.8, Ii_x=10, basis="envelope")
    down = mcb_band("C", rating, basis="envelope")
    r = engine.compare(up, down, (down.pickup_min_a, 12_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(0.8 * 10 * 250, rel=1e-9)
    assert "instantaneous" in r.note
    assert r.decided_by == "time-current"


# IEC 60898-1: above 32 A only 120 s is guaranteed at 2.55 In and nothing faster below 10 In for
# type C; the worst-case C63 therefore meets the thermal-magnetic breaker's lower edge in overload
# (at 120 s), long before the magnetic release: on the envelope the pair is partial there
def test_c63_worst_case_meets_a_thermal_release_at_its_2_55_in_time():
    up = thermal_magnetic_band(In_a=250, Ir_x=0.8, Ii_x=10, basis="envelope")
    down = mcb_band("C", 63, basis="envelope")
    r = engine.compare(up, down, (down.pickup_min_a, 12_000.0))
    assert r.verdict == "partial"
    assert 2.55 * 63 < r.limit_a < 10 * 63
    assert r.time_s == pytest.approx(120.0, rel=1e-9)


# IEC 60898-1, instantaneous tripping ranges (B 3-5 In, C 5-10 In, D 10-20 In): an MCB under an
# MCB is selective only up to the upstream's lower instantaneous threshold (typical bands)
@pytest.mark.parametrize(("down", "up_type", "up_rating"), [
    (("B", 16), "C", 63), (("B", 16), "C", 32), (("B", 6), "B", 32), (("B", 10), "D", 40),
    (("C", 10), "C", 63),
])
def test_mcb_under_mcb_limited_at_upstream_lower_instantaneous(down, up_type, up_rating):
    expected = MCB_LOWER_INSTANTANEOUS_X[up_type] * up_rating
    d = mcb_band(*down)
    r = engine.compare(mcb_band(up_type, up_rating), d, (d.pickup_min_a, 6_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(expected, rel=1e-6)
    # and on the envelope (any compliant pair) never beyond it
    d_env = mcb_band(*down, basis="envelope")
    env = engine.compare(mcb_band(up_type, up_rating, basis="envelope"), d_env,
                         (d_env.pickup_min_a, 6_000.0))
    assert env.verdict in ("partial", "none")
    assert env.limit_a <= expected * (1 + 1e-9)


# IEC 60898-1 (B16 under C63): Is = 5 x 63 A = 315 A, through the shorthand too
def test_b16_under_c63_via_shorthand():
    d = band_from_spec("B16")
    r = engine.compare(band_from_spec("C63"), d, (d.pickup_min_a, 6_000.0))
    assert r.limit_a == pytest.approx(5 * 63, rel=1e-6)


def loglog(i_a: float, points: tuple[tuple[float, float], ...]) -> float:
    """I2t at a current, log-log between the two table points that bracket it."""
    (i1, e1), (i2, e2) = points
    return e1 * (i_a / i1) ** (math.log(e2 / e1) / math.log(i2 / i1))


def current_at_energy(energy: float, points: tuple[tuple[float, float], ...]) -> float:
    """The current where the log-log line through two table points reaches ``energy``."""
    (i1, e1), (i2, e2) = points
    return i1 * (energy / e1) ** (math.log(i2 / i1) / math.log(e2 / e1))


# EN 60898-1 Annex ZA energy-limiting class 3 (from memory), the two table points
# that bracket the fuse's minimum pre-arcing I2t, and IEC 60269 gG minimum pre-arcing I2t
# (from memory): the MCB is selective with the fuse while its let-through stays at or below it
@pytest.mark.parametrize(("mcb", "fuse", "bracket"), [
    (("B", 16), 100, ((4_500.0, 25_000.0), (6_000.0, 35_000.0))),
    (("C", 16), 100, ((3_000.0, 18_000.0), (4_500.0, 30_000.0))),
    (("B", 32), 100, ((3_000.0, 18_000.0), (4_500.0, 32_000.0))),
])
def test_mcb_under_gg_decided_by_energy(mcb, fuse, bracket):
    pre_arcing_min = GG_I2T_A2S[fuse][0]
    # worked by hand: for B16, I = 4500 * (27/25) ** (ln(6/4.5) / ln(35/25)) = 4.81 kA
    expected = current_at_energy(pre_arcing_min, bracket)
    assert bracket[0][0] < expected < bracket[1][0]
    assert loglog(expected, bracket) == pytest.approx(pre_arcing_min, rel=1e-12)
    d = mcb_band(*mcb, basis="envelope", icn_a=10_000.0)
    r = engine.compare(gg_band(fuse, basis="envelope"), d, (d.pickup_min_a, 10_000.0))
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(expected, rel=1e-6)
    assert r.decided_by == "energy"
    assert r.time_s < ENERGY_REGION_S
    # the equivalent time where they meet is the fuse's minimum pre-arcing I2t over I^2
    assert r.time_s == pytest.approx(pre_arcing_min / expected**2, rel=1e-5)


def test_b16_under_gg100_is_4_81_ka():
    # EN 60898-1 Annex ZA class 3, In <= 16 A, type B (from memory): 25,000 A2s at 4.5 kA and
    # 35,000 A2s at 6 kA; IEC 60269 gG100 minimum pre-arcing I2t 27,000 A2s (from memory)
    expected = 4500.0 * (27 / 25) ** (math.log(6 / 4.5) / math.log(35 / 25))
    assert expected == pytest.approx(4810.0, rel=2e-3)
    d = mcb_band("B", 16, basis="envelope")
    r = engine.compare(gg_band(100, basis="envelope"), d, (d.pickup_min_a, 6_000.0))
    assert r.limit_a == pytest.approx(expected, rel=1e-6)
    assert r.decided_by == "energy"


# EN 60898-1 Annex ZA class 3 at 10 kA (confirmed column): B16 lets through at most 70,000 A2s,
# below gG160's minimum pre-arcing I2t 86,000 A2s (IEC 60269, from memory): selective to 10 kA
def test_b16_under_gg160_total_to_10_ka():
    assert 70_000 <= GG_I2T_A2S[160][0]
    d = mcb_band("B", 16, basis="envelope", icn_a=10_000.0)
    r = engine.compare(gg_band(160, basis="envelope"), d, (d.pickup_min_a, 10_000.0))
    assert r.verdict == "total"


# IEC 60947-2 (conventional non-tripping 1.05 Ir; electronic tolerances from memory: long-time
# delay -20 % of tr at 6 Ir with I2t = constant, Isd -10 %, tsd -20 ms) over IEC 60269 gG100
# gates (Imax(5 s) = 580 A confirmed; Imax(0.1 s) = 1450 A from memory)
def test_electronic_over_gg100_selective_by_hand_check():
    ir, tr, isd_x, tsd = 630.0, 8.0, 6, 0.2
    up = electronic_band(In_a=630, Ir_x=1.0, tr_s=tr, Isd_x=isd_x, tsd_s=tsd, Ii_x="off",
                         basis="envelope")
    down = gg_band(100, basis="envelope")
    # hand check. Breaker, earliest: never below 1.05 Ir = 661.5 A; long-time at least
    # 0.8 tr (6 Ir / I)^2; short-time from 0.9 Isd = 3402 A at no less than tsd - 20 ms = 0.18 s.
    pickup = 1.05 * ir
    isd_lo = 0.9 * isd_x * ir
    lt_at_isd = 0.8 * tr * (6 * ir / isd_lo) ** 2  # the least long-time time below Isd
    # Fuse, latest: cleared within 5 s from 580 A, its pre-arcing done within 0.1 s from 1450 A.
    assert pickup > 580.0  # wherever the breaker can trip, the fuse is within its 5 s gate
    assert lt_at_isd > 5.0  # below Isd the breaker waits longer than 5 s
    assert tsd - 0.02 > 0.1  # above Isd it waits longer than the fuse's 0.1 s gate
    r = engine.compare(up, down, (down.pickup_min_a, 50_000.0))
    assert r.verdict == "total"
    # the band model agrees with the gates the hand check used
    assert float(down.t_max(580.0)) <= 5.0
    assert float(down.t_max(isd_lo)) <= tsd - 0.02


# Same sources: a low short-time pickup at 2 Ir, tsd 0.1 s. From 0.9 x 800 = 720 A the breaker
# may trip after 0.1 - 0.02 = 0.08 s, while gG100 needs at least 0.1 s to melt at up to 820 A
# (Imin(0.1 s) = 820 A, from memory): not selective from 720 A at the latest
def test_electronic_low_short_time_over_gg100_not_selective_by_hand_check():
    ir = 400.0
    up = electronic_band(In_a=400, Ir_x=1.0, tr_s=8, Isd_x=2, tsd_s=0.1, Ii_x="off",
                         basis="envelope")
    down = gg_band(100, basis="envelope")
    isd_lo = 0.9 * 2 * ir
    assert isd_lo < 820.0 and 0.1 - 0.02 < 0.1
    r = engine.compare(up, down, (down.pickup_min_a, 20_000.0))
    assert r.verdict in ("partial", "none")
    assert r.limit_a <= isd_lo * (1 + 1e-6)


# IEC 60947-2 and our modelling choice: over a breaker with an instantaneous release,
# selectivity ends at its instantaneous pickup (lower tolerance, -10 % electronic, from memory)
# unless a tested limit
def test_instantaneous_upstream_breaker_limits_unless_tested():
    up = electronic_band(In_a=630, Ir_x=1.0, tr_s=8, Isd_x=6, tsd_s=0.2, Ii_x=12,
                         basis="envelope")
    down = gg_band(100, basis="envelope")
    window = (down.pickup_min_a, 50_000.0)
    r = engine.compare(up, down, window)
    assert r.verdict == "partial"
    assert r.limit_a == pytest.approx(0.9 * 12 * 630, rel=1e-6)
    tested = engine.compare(up, down, window, tested_limit_a=25_000.0)
    assert tested.decided_by == "tested"
    assert tested.limit_a == 25_000.0
