"""gG fuse-link bands against the IEC 60269-1/-2 gates, conventional currents and I2t limits.

The check values are typed in here from IEC 60269-1/-2 with each value's status beside it (and,
for 2..12 A, the gates as recalled), not read from the code's data files, so a wrong data file
fails these tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from curves.band import Band
from curves.errors import InputError
from curves.fuse import GG_RATINGS_A, gg_band, gg_envelope, gg_envelope_lower

#: Allowance for floating-point rounding in the inequalities below (relative).
REL = 1e-9
BASES = ("envelope", "typical")

# IEC 60269-2, gG gates (A): In, Imin(10 s), Imax(5 s), Imin(0.1 s), Imax(0.1 s)
# (Imax(5 s) for 16..100 A confirmed, the rest from memory)
GATES = [
    (16, 33, 65, 85, 150),
    (20, 42, 85, 110, 200),
    (25, 52, 110, 150, 260),
    (32, 75, 150, 200, 350),
    (40, 95, 190, 260, 450),
    (50, 125, 250, 350, 610),
    (63, 160, 320, 450, 820),
    (80, 215, 425, 610, 1100),
    (100, 290, 580, 820, 1450),
    (125, 355, 715, 1100, 1910),
    (160, 465, 950, 1450, 2590),
    (200, 610, 1250, 1910, 3420),
    (250, 750, 1650, 2590, 4500),
    (315, 1050, 2200, 3420, 6000),
    (400, 1420, 2840, 4500, 8060),
    (500, 1780, 3800, 6000, 10600),
    (630, 2200, 5100, 8060, 14140),
    (800, 3060, 7000, 10600, 19000),
    (1000, 4000, 9500, 14140, 24000),
    (1250, 5000, 13000, 19000, 35000),
]
# IEC 60269-2, gG gates below 16 A (from memory: recalled, not found in a
# public copy; a search of published sources confirmed none of these rows)
SMALL_GATES = [
    (2, 3.7, 9.2, 6.0, 23.0),  # from memory
    (4, 7.8, 18.5, 14.0, 47.0),  # from memory
    (6, 11.0, 28.0, 26.0, 72.0),  # from memory
    # from memory; Imax(5 s) = 32 A is 4.0 In where 6 A and 10 A have about 4.6..4.7 In: recalled
    # so, unconfirmed
    (8, 16.0, 32.0, 41.6, 88.0),
    (10, 22.0, 46.0, 58.0, 111.0),  # from memory
    (12, 24.0, 55.0, 69.6, 136.0),  # from memory
]

# IEC 60269-2, gG I2t at 0.01 s (A2s): In, minimum pre-arcing, maximum operating (from memory)
I2T = [
    (16, 300, 1_000),
    (20, 500, 1_800),
    (25, 1_000, 3_000),
    (32, 1_800, 5_000),
    (40, 3_000, 9_000),
    (50, 5_000, 16_000),
    (63, 9_000, 27_000),
    (80, 16_000, 46_000),
    (100, 27_000, 86_000),
    (125, 46_000, 140_000),
    (160, 86_000, 250_000),
    (200, 140_000, 400_000),
    (250, 250_000, 760_000),
    (315, 400_000, 1_300_000),
    (400, 760_000, 2_250_000),
    (500, 1_300_000, 3_800_000),
    (630, 2_250_000, 7_500_000),
    (800, 3_800_000, 13_600_000),
    (1000, 7_840_000, 25_000_000),
    (1250, 13_700_000, 47_000_000),
]


def conventional(rating_a: float) -> tuple[float, float, float]:
    """IEC 60269-1 conventional non-fusing and fusing multiples and time [s] (currents
    from memory; times from memory within the confirmed 1..4 h range)."""
    if rating_a <= 4:
        k_nf, k_f = 1.5, 2.1
    elif rating_a < 16:
        k_nf, k_f = 1.5, 1.9
    else:
        k_nf, k_f = 1.25, 1.6
    if rating_a <= 63:
        hours = 1
    elif rating_a <= 160:
        hours = 2
    elif rating_a <= 400:
        hours = 3
    else:
        hours = 4
    return k_nf, k_f, 3600.0 * hours


def check_gates(
    band: Band, imin_10s: float, imax_5s: float, imin_0_1s: float, imax_0_1s: float
) -> None:
    assert band.t_min(imin_10s) >= 10.0 * (1 - REL)
    assert band.t_max(imax_5s) <= 5.0 * (1 + REL)
    assert band.t_min(imin_0_1s) >= 0.1 * (1 - REL)
    assert band.t_max(imax_0_1s) <= 0.1 * (1 + REL)
    # the gates hold on either side too: less current, no sooner; more current, no later
    assert np.all(band.t_min(np.linspace(0.5, 1.0, 20) * imin_10s) >= 10.0 * (1 - REL))
    assert np.all(band.t_max(np.linspace(1.0, 3.0, 20) * imax_0_1s) <= 0.1 * (1 + REL))


# IEC 60269-2, gG gates Imin(10 s), Imax(5 s), Imin(0.1 s), Imax(0.1 s)
# (Imax(5 s) for 16..100 A confirmed, the rest from memory)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("rating_a", "imin_10s", "imax_5s", "imin_0_1s", "imax_0_1s"), GATES)
def test_gates(
    rating_a: float, imin_10s: float, imax_5s: float, imin_0_1s: float, imax_0_1s: float, basis: str
) -> None:
    check_gates(gg_band(rating_a, basis=basis), imin_10s, imax_5s, imin_0_1s, imax_0_1s)


# IEC 60269-2, gG gates below 16 A (from memory)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("rating_a", "imin_10s", "imax_5s", "imin_0_1s", "imax_0_1s"), SMALL_GATES)
def test_small_gates(
    rating_a: float, imin_10s: float, imax_5s: float, imin_0_1s: float, imax_0_1s: float, basis: str
) -> None:
    check_gates(gg_band(rating_a, basis=basis), imin_10s, imax_5s, imin_0_1s, imax_0_1s)


# IEC 60269-2, the envelope is the widest band: it passes through every gate (from memory /
# confirmed as in the gate table above)
@pytest.mark.parametrize(("rating_a", "imin_10s", "imax_5s", "imin_0_1s", "imax_0_1s"), GATES)
def test_envelope_passes_through_the_gates(
    rating_a: float, imin_10s: float, imax_5s: float, imin_0_1s: float, imax_0_1s: float
) -> None:
    band = gg_band(rating_a, basis="envelope")
    env = gg_envelope(rating_a)
    times = np.concatenate(
        [gg_envelope_lower(np.array([imin_10s, imin_0_1s]), env),
         band.t_max([imax_5s, imax_0_1s])]
    )
    np.testing.assert_allclose(times, [10.0, 0.1, 5.0, 0.1], rtol=1e-9)
    # the band's lower edge is the gates' or, from 25 A, held up by the IEC 60269 1.6:1
    # selectivity requirement: never below a gate
    assert np.all(band.t_min([imin_10s, imin_0_1s]) >= np.array([10.0, 0.1]) * (1 - 1e-9))


# IEC 60269-1, conventional non-fusing current: no melting within the conventional time there;
# the envelope's pre-arcing edge passes through that point continuously (from memory)
@pytest.mark.parametrize("rating_a", GG_RATINGS_A)
def test_envelope_lower_edge_continuous_at_the_non_fusing_current(rating_a: float) -> None:
    k_nf, _, t_conv = conventional(rating_a)
    band = gg_band(rating_a, basis="envelope")
    i_nf = k_nf * rating_a
    assert band.t_min(i_nf) == pytest.approx(t_conv, rel=1e-12)
    assert band.t_min(i_nf * (1 + 1e-9)) == pytest.approx(t_conv, rel=1e-6)
    assert band.t_min(i_nf * (1 - 1e-9)) == np.inf


# IEC 60269-1, conventional non-fusing current (no operation within the conventional time) and
# fusing current (operation within it); conventional time 1..4 h (currents and times from memory,
# the 1..4 h range confirmed)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("rating_a", GG_RATINGS_A)
def test_conventional_currents(rating_a: float, basis: str) -> None:
    k_nf, k_f, t_conv = conventional(rating_a)
    band = gg_band(rating_a, basis=basis)
    assert band.conventional_time_s == t_conv
    assert band.t_min(k_nf * rating_a) >= t_conv
    assert band.t_max(k_f * rating_a) <= t_conv * (1 + REL)
    assert k_nf * rating_a <= band.pickup_min_a <= band.pickup_max_a <= k_f * rating_a


# IEC 60269-1, conventional currents: the envelope's pickups are the conventional currents
# (from memory)
@pytest.mark.parametrize("rating_a", GG_RATINGS_A)
def test_envelope_pickups_are_the_conventional_currents(rating_a: float) -> None:
    k_nf, k_f, t_conv = conventional(rating_a)
    band = gg_band(rating_a, basis="envelope")
    np.testing.assert_allclose(band.pickup_min_a, k_nf * rating_a, rtol=1e-12)
    np.testing.assert_allclose(band.pickup_max_a, k_f * rating_a, rtol=1e-12)
    np.testing.assert_allclose(band.t_max(k_f * rating_a), t_conv, rtol=1e-9)


# IEC 60269-2, gG I2t at 0.01 s: minimum pre-arcing and maximum operating (from memory)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("rating_a", "pre_min", "op_max"), I2T)
def test_i2t_limits(rating_a: float, pre_min: float, op_max: float, basis: str) -> None:
    band = gg_band(rating_a, basis=basis)
    assert band.pre_arcing_i2t_min_a2s == pre_min
    # deep in the current-limiting region the edges are the energies as equivalent times
    current = math.sqrt(op_max / 1e-3)
    np.testing.assert_allclose(band.t_min(current) * current**2, pre_min, rtol=1e-9)
    np.testing.assert_allclose(band.t_max(current) * current**2, op_max, rtol=1e-9)
    np.testing.assert_allclose(band.let_through(current), op_max, rtol=1e-9)
    # the fuse never melts on less than its minimum pre-arcing I2t, at any current
    currents = np.logspace(math.log10(rating_a), math.log10(rating_a) + 3.5, 2000)
    t_min = band.t_min(currents)
    finite = np.isfinite(t_min)
    assert np.all(t_min[finite] * currents[finite] ** 2 >= pre_min * (1 - REL))
    # and its let-through never falls below the published maximum operating I2t
    assert np.all(band.let_through(currents) >= op_max * (1 - REL))


# IEC 60269-1 selectivity of gG fuse-links in the ratio 1.6:1 (common practice): the minor's
# maximum operating I2t does not exceed the major's minimum pre-arcing I2t (table from memory)
@pytest.mark.parametrize(("minor", "major"), [(I2T[k], I2T[k + 2]) for k in range(len(I2T) - 2)])
def test_i2t_selectivity_two_steps_apart(minor: tuple, major: tuple) -> None:
    minor_band = gg_band(minor[0])
    major_band = gg_band(major[0])
    current = math.sqrt(minor[2] / 1e-3)
    assert minor_band.let_through(current) <= major_band.pre_arcing_i2t_min_a2s * (1 + REL)
    assert minor_band.t_max(current) <= major_band.t_min(current) * (1 + REL)


# IEC 60269-2 rated breaking capacity of industrial gG fuse-links, at least 50 kA (from memory)
def test_default_breaking_capacity() -> None:
    band = gg_band(63)
    assert band.breaking_capacity_a == 50_000.0
    assert any("50 kA" in note for note in band.notes)
    assert gg_band(63, breaking_capacity_a=80_000.0).breaking_capacity_a == 80_000.0
    assert band.instantaneous_a is None
    assert band.family == "gG" and band.name == "gG63"


# IEC 60269-2 gG ratings (the series of its gate table); bad input names the key
@pytest.mark.parametrize(
    ("kwargs", "key"),
    [
        ({"rating_a": 35}, "In_a"),
        ({"rating_a": "63"}, "In_a"),
        ({"rating_a": 63, "breaking_capacity_a": 0.0}, "breaking_capacity_a"),
        ({"rating_a": 63, "breaking_capacity_a": math.nan}, "breaking_capacity_a"),
        ({"rating_a": 63, "basis": "worst"}, "basis"),
    ],
)
def test_bad_input_names_the_key(kwargs: dict, key: str) -> None:
    with pytest.raises(InputError) as caught:
        gg_band(**kwargs)
    assert caught.value.key == key
