"""MCB bands against the published IEC 60898-1 test points and EN 60898-1 energy classes.

The check values are typed in here from IEC 60898-1 and EN 60898-1 Annex ZA with each value's
status beside it, not read from the code's data files, so a wrong data file fails these tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from curves.errors import InputError
from curves.mcb import class_applies, mcb_band

#: Allowance for floating-point rounding in the inequalities below (relative).
REL = 1e-9

TYPES = ("B", "C", "D")
BASES = ("envelope", "typical")
#: A spread of ratings over every row of the standard's table (<= 32 A, 40..63 A, > 63 A).
RATINGS_A = (6, 10, 16, 25, 32, 40, 63, 80, 125)
CASES = [(t, r, b) for t in TYPES for r in RATINGS_A for b in BASES]

# IEC 60898-1, time-current operating characteristics (confirmed)
NON_TRIPPING_X = 1.13
TRIPPING_X = 1.45
TEST_X = 2.55
INSTANTANEOUS_X = {"B": (3, 5), "C": (5, 10), "D": (10, 20)}


def conventional_time_s(rating_a: float) -> float:
    """IEC 60898-1 conventional time: 1 h for In <= 63 A, 2 h above (confirmed)."""
    return 3600.0 if rating_a <= 63 else 7200.0


def window_max_s(rating_a: float) -> float:
    """IEC 60898-1, 2.55 In: trip within 60 s (In <= 32 A) or 120 s (In > 32 A) (confirmed)."""
    return 60.0 if rating_a <= 32 else 120.0


# IEC 60898-1, test a: 1.13 In (cold), no trip within the conventional time (confirmed)
@pytest.mark.parametrize(("curve_type", "rating_a", "basis"), CASES)
def test_no_trip_at_1_13_in(curve_type: str, rating_a: float, basis: str) -> None:
    band = mcb_band(curve_type, rating_a, basis=basis)
    current = NON_TRIPPING_X * rating_a
    assert band.t_min(current) >= conventional_time_s(rating_a)
    # and nothing below it either
    assert np.all(band.t_min(np.linspace(0.1, 1.0, 10) * current) >= conventional_time_s(rating_a))


# IEC 60898-1, test b: 1.45 In, trip within the conventional time (confirmed)
@pytest.mark.parametrize(("curve_type", "rating_a", "basis"), CASES)
def test_trip_at_1_45_in(curve_type: str, rating_a: float, basis: str) -> None:
    band = mcb_band(curve_type, rating_a, basis=basis)
    assert band.t_max(TRIPPING_X * rating_a) <= conventional_time_s(rating_a) * (1 + REL)
    assert band.pickup_max_a <= TRIPPING_X * rating_a * (1 + REL)
    assert band.conventional_time_s == conventional_time_s(rating_a)


# IEC 60898-1, test c: 2.55 In (cold), trip between 1 s and 60 s (In <= 32 A) or 120 s (confirmed)
@pytest.mark.parametrize(("curve_type", "rating_a", "basis"), CASES)
def test_trip_window_at_2_55_in(curve_type: str, rating_a: float, basis: str) -> None:
    band = mcb_band(curve_type, rating_a, basis=basis)
    current = TEST_X * rating_a
    assert band.t_min(current) >= 1.0 * (1 - REL)
    assert band.t_max(current) <= window_max_s(rating_a) * (1 + REL)


# IEC 60898-1, 2.55 In: the envelope is the widest band, so it sits on both ends of the window
@pytest.mark.parametrize("rating_a", RATINGS_A)
def test_envelope_touches_the_2_55_in_window(rating_a: float) -> None:
    band = mcb_band("C", rating_a, basis="envelope")
    current = TEST_X * rating_a
    np.testing.assert_allclose(band.t_min(current), 1.0, rtol=1e-9)
    np.testing.assert_allclose(band.t_max(current), window_max_s(rating_a), rtol=1e-9)
    np.testing.assert_allclose(band.pickup_min_a, NON_TRIPPING_X * rating_a, rtol=1e-12)
    np.testing.assert_allclose(band.pickup_max_a, TRIPPING_X * rating_a, rtol=1e-12)


# IEC 60898-1, tests d: lower instantaneous multiple (B 3, C 5, D 10 In), no trip within 0.1 s
@pytest.mark.parametrize(("curve_type", "rating_a", "basis"), CASES)
def test_no_trip_below_the_lower_instantaneous_multiple(
    curve_type: str, rating_a: float, basis: str
) -> None:
    band = mcb_band(curve_type, rating_a, basis=basis)
    lower_x = INSTANTANEOUS_X[curve_type][0]
    just_below = lower_x * rating_a * (1 - 1e-6)
    assert band.t_min(just_below) >= 0.1
    assert np.all(band.t_min(np.linspace(1.0, lower_x * (1 - 1e-6), 50) * rating_a) >= 0.1)
    # from the lower multiple the magnetic release may act: no energy withstand
    np.testing.assert_allclose(band.instantaneous_a, lower_x * rating_a, rtol=1e-12)


# IEC 60898-1, tests e: upper instantaneous multiple (B 5, C 10, D 20 In), trip within 0.1 s
# (with every energy-limiting class EN 60898-1 Annex ZA gives for the type and rating)
@pytest.mark.parametrize(("curve_type", "rating_a", "basis", "energy_class"), [
    (t, r, b, c) for t, r, b in CASES for c in (None, 1, 2, 3)
    if c is None or class_applies(t, r, c)
])
def test_trip_at_the_upper_instantaneous_multiple(
    curve_type: str, rating_a: float, basis: str, energy_class: int | None
) -> None:
    band = mcb_band(curve_type, rating_a, basis=basis, energy_class=energy_class)
    upper_x = INSTANTANEOUS_X[curve_type][1]
    currents = upper_x * rating_a * np.array([1.0, 1.5, 3.0, 10.0, 100.0])
    assert np.all(band.t_max(currents) <= 0.1)


# EN 60898-1 Annex ZA, energy-limiting classes: max let-through I2t [A2s] at 3, 4.5, 6, 10 kA
# (the 10 kA column confirmed, the other columns from memory)
CLASS_TABLE = [
    # (ratings it applies to, class, type, (I2t at 3 kA, 4.5 kA, 6 kA, 10 kA))
    ((6, 10, 16), 2, "B", (31_000, 60_000, 100_000, 240_000)),
    ((6, 10, 16), 2, "C", (37_000, 75_000, 120_000, 290_000)),
    ((6, 10, 16), 3, "B", (15_000, 25_000, 35_000, 70_000)),
    ((6, 10, 16), 3, "C", (18_000, 30_000, 42_000, 84_000)),
    ((20, 25, 32), 2, "B", (40_000, 80_000, 130_000, 310_000)),
    ((20, 25, 32), 2, "C", (50_000, 100_000, 160_000, 370_000)),
    ((20, 25, 32), 3, "B", (18_000, 32_000, 45_000, 90_000)),
    ((20, 25, 32), 3, "C", (22_000, 39_000, 55_000, 110_000)),
]
CLASS_CURRENTS_A = (3_000.0, 4_500.0, 6_000.0, 10_000.0)
CLASS_CASES = [
    (rating, cls, typ, values)
    for ratings, cls, typ, values in CLASS_TABLE
    for rating in ratings
]


# EN 60898-1 Annex ZA, energy-limiting classes (10 kA confirmed, 3..6 kA from memory)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("rating_a", "energy_class", "curve_type", "values"), CLASS_CASES)
def test_class_let_through_at_the_table_points(
    rating_a: float, energy_class: int, curve_type: str, values: tuple, basis: str
) -> None:
    band = mcb_band(curve_type, rating_a, basis=basis, energy_class=energy_class)
    currents = np.array(CLASS_CURRENTS_A)
    np.testing.assert_allclose(band.let_through(currents), values, rtol=1e-9)
    # the band's own energy figure and its upper edge say the same
    np.testing.assert_allclose(band.i2t_let_through(currents), values, rtol=1e-9)
    np.testing.assert_allclose(band.t_max(currents), np.array(values) / currents**2, rtol=1e-9)


# EN 60898-1 Annex ZA: log-log interpolation between table points, checked at the geometric
# middle of each segment (the geometric mean of the two I2t values)
@pytest.mark.parametrize(("rating_a", "energy_class", "curve_type", "values"), CLASS_CASES)
def test_class_let_through_is_log_log_between_points(
    rating_a: float, energy_class: int, curve_type: str, values: tuple
) -> None:
    band = mcb_band(curve_type, rating_a, basis="envelope", energy_class=energy_class)
    middles = np.sqrt(np.array(CLASS_CURRENTS_A[:-1]) * np.array(CLASS_CURRENTS_A[1:]))
    expected = np.sqrt(np.array(values[:-1], float) * np.array(values[1:], float))
    np.testing.assert_allclose(band.let_through(middles), expected, rtol=1e-9)


# EN 60898-1 Annex ZA class 3, B16 (4.5 kA 25 000 A2s, 6 kA 35 000 A2s; from memory) against the
# minimum pre-arcing I2t of a gG 100 A fuse-link, 27 000 A2s (IEC 60269-2, from memory): hand check,
# log-log between the two points gives Is = 4.5 kA * (27/25)^(1/slope), about 4.81 kA
def test_hand_check_b16_class_3_let_through_reaches_27000_a2s_near_4_81_ka() -> None:
    slope = math.log(35_000 / 25_000) / math.log(6_000 / 4_500)
    limit_a = 4_500.0 * (27_000 / 25_000) ** (1 / slope)
    np.testing.assert_allclose(limit_a, 4_810.0, rtol=2e-3)
    band = mcb_band("B", 16, basis="typical", energy_class=3)
    np.testing.assert_allclose(band.let_through(limit_a), 27_000.0, rtol=1e-9)
    np.testing.assert_allclose(band.t_max(limit_a) * limit_a**2, 27_000.0, rtol=1e-9)


# EN 60898-1 Annex ZA: class 1 has no let-through limit; 0.1 s in the instantaneous region
# (IEC 60898-1, test e)
@pytest.mark.parametrize("curve_type", TYPES)
def test_class_1_has_no_let_through_limit(curve_type: str) -> None:
    band = mcb_band(curve_type, 16, basis="envelope", energy_class=1)
    assert band.let_through is None
    upper_x = INSTANTANEOUS_X[curve_type][1]
    np.testing.assert_allclose(band.t_max(upper_x * 16 * np.array([1.0, 50.0])), 0.1, rtol=0)


# EN 60898-1 Annex ZA gives class values for types B and C up to 32 A only (confirmed):
# no class limit is applied to type D nor above 32 A
@pytest.mark.parametrize(("curve_type", "rating_a"), [("D", 16), ("D", 32), ("B", 40), ("C", 63)])
def test_no_class_values_outside_annex_za(curve_type: str, rating_a: float) -> None:
    band = mcb_band(curve_type, rating_a, basis="envelope")
    assert band.let_through is None
    assert "energy_class" not in band.settings
    assert any("Annex ZA" in note for note in band.notes)
    np.testing.assert_allclose(band.t_max(30 * rating_a), 0.1, rtol=0)
    # a class the annex does not give is refused, not silently ignored
    with pytest.raises(InputError) as caught:
        mcb_band(curve_type, rating_a, basis="envelope", energy_class=3)
    assert caught.value.key == "energy_class"


# IEC 60898-1 standard values of rated short-circuit capacity Icn: 1500, 3000, 4500, 6000,
# 10 000 A and, above 10 000 A, 15 000, 20 000, 25 000 A (from memory)
ICN_STANDARD_A = (1_500.0, 3_000.0, 4_500.0, 6_000.0, 10_000.0, 15_000.0, 20_000.0, 25_000.0)


# IEC 60898-1 standard values of rated short-circuit capacity Icn (from memory)
@pytest.mark.parametrize("icn_a", ICN_STANDARD_A)
def test_breaking_capacity_and_settings(icn_a: float) -> None:
    band = mcb_band("C", 32, icn_a=icn_a)
    assert band.breaking_capacity_a == icn_a
    assert band.family == "mcb"
    assert band.name == "C32"
    assert dict(band.settings) == {"type": "C", "In_a": 32, "energy_class": 3, "icn_a": icn_a}


# IEC 60898-1 standard values of Icn (from memory): any other value is refused, naming the key
# and listing the allowed values
@pytest.mark.parametrize("icn_a", (1_000.0, 2_000.0, 5_000.0, 7_000.0, 12_500.0, 30_000.0,
                                   50_000.0))
def test_non_standard_icn_is_refused(icn_a: float) -> None:
    with pytest.raises(InputError) as caught:
        mcb_band("C", 32, icn_a=icn_a)
    assert caught.value.key == "icn_a"
    message = str(caught.value)
    assert "allowed" in message and "\n" not in message
    for value in ICN_STANDARD_A:
        assert f"{value:g}" in message


# IEC 60898-1 ratings (common practice) and types; bad input names the key
@pytest.mark.parametrize(
    ("kwargs", "key"),
    [
        ({"curve_type": "E", "rating_a": 16}, "type"),
        ({"curve_type": "B", "rating_a": 33}, "In_a"),
        ({"curve_type": "B", "rating_a": 16, "energy_class": 4}, "energy_class"),
        ({"curve_type": "B", "rating_a": 16, "icn_a": -6000.0}, "icn_a"),
        ({"curve_type": "B", "rating_a": 16, "icn_a": math.inf}, "icn_a"),
        ({"curve_type": "B", "rating_a": 16, "basis": "datasheet"}, "basis"),
    ],
)
def test_bad_input_names_the_key(kwargs: dict, key: str) -> None:
    with pytest.raises(InputError) as caught:
        mcb_band(**kwargs)
    assert caught.value.key == key
    assert "allowed" in str(caught.value) or "must be" in str(caught.value)
