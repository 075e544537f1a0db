"""`curves.validate`: every family refuses what is not a number, naming the key.

Booleans count as numbers in Python (``True == 1``); a study that writes ``In_a = true`` means
something else, so every check refuses them (common practice for input validation). The
families are called directly, below the study layer's own checks.
"""

from __future__ import annotations

import pytest

from curves.breaker import electronic_band, thermal_magnetic_band
from curves.errors import InputError
from curves.fuse import gg_band
from curves.mcb import mcb_band
from curves.tabulated import datasheet_band
from curves.validate import curve_points, in_series, known_basis, on_grid, positive_number, real

LOWER = [[120, 3600], [1000, 1]]
UPPER = [[150, 7200], [1500, 2]]

CALLS = [
    (lambda v: mcb_band("B", v), "In_a"),
    (lambda v: mcb_band("B", 16, icn_a=v), "icn_a"),
    (lambda v: mcb_band("D", 32, let_through_a2s=[[3000, v], [10000, 250000]]),
     "let_through_a2s[0]"),
    (lambda v: gg_band(v), "In_a"),
    (lambda v: gg_band(100, breaking_capacity_a=v), "breaking_capacity_a"),
    (lambda v: thermal_magnetic_band(In_a=v), "In_a"),
    (lambda v: thermal_magnetic_band(In_a=250, Ir_x=v), "Ir_x"),
    (lambda v: thermal_magnetic_band(In_a=250, Ii_a=v), "Ii_a"),
    (lambda v: thermal_magnetic_band(In_a=250, icu_a=v), "icu_a"),
    (lambda v: electronic_band(In_a=400, tr_s=v), "tr_s"),
    (lambda v: electronic_band(In_a=400, Isd_x=4, tsd_s=v), "tsd_s"),
    (lambda v: datasheet_band(In_a=v, lower=LOWER, upper=UPPER), "In_a"),
    (lambda v: datasheet_band(In_a=100, lower=[[120, v], [1000, 1]], upper=UPPER), "lower[0]"),
    (lambda v: datasheet_band(In_a=100, lower=LOWER, upper=UPPER, instantaneous_a=v),
     "instantaneous_a"),
]


@pytest.mark.parametrize("value", [True, False, "16", float("nan"), float("inf"), 10**400],
                         ids=["true", "false", "text", "nan", "inf", "huge"])
@pytest.mark.parametrize(("call", "key"), CALLS, ids=[key for _, key in CALLS])
def test_every_family_refuses_what_is_not_a_finite_number(call, key, value):
    with pytest.raises(InputError) as caught:
        call(value)
    assert caught.value.key == key
    assert "\n" not in str(caught.value)


def test_real_refuses_booleans_and_text():
    assert real(True) is None and real("1") is None and real(None) is None
    assert real(2) == 2.0 and real(-(10**400)) == float("-inf")


def test_positive_number_says_what_is_allowed():
    assert positive_number("interval_s", 0, allow_zero=True) == 0.0
    with pytest.raises(InputError, match="finite positive number"):
        positive_number("In_a", 0)
    with pytest.raises(InputError, match=">= 0"):
        positive_number("interval_s", -1, allow_zero=True)


def test_series_and_grid_return_the_listed_value_and_list_the_allowed_ones():
    assert in_series(32.000000001, (16, 32), key="In_a", what="rated current",
                     standard="MCB") == 32.0
    with pytest.raises(InputError, match="allowed: 16, 32 A") as caught:
        in_series(33, (16, 32), key="In_a", what="rated current", standard="MCB")
    assert caught.value.key == "In_a"
    assert on_grid("tsd_s", 0.2000001, (0.1, 0.2), "(s)") == 0.2
    with pytest.raises(InputError, match=r"allowed: 0\.1, 0\.2"):
        on_grid("tsd_s", 0.25, (0.1, 0.2), "(s)")
    with pytest.raises(InputError, match="allowed: typical, envelope"):
        known_basis("datasheet", ("typical", "envelope"))


@pytest.mark.parametrize(("value", "rising", "where"), [
    ([[100, 10.0]], False, "at least two"),
    ([[100, 10.0], [100, 1.0]], False, "strictly increase"),
    ([[100, 10.0], [200, 20.0]], False, "never rise"),
    ([[100, 10.0], [200, 5.0]], True, "never fall"),
    ([[100, 10.0], [200]], False, "pair"),
    ("100, 10", False, "list of"),
])
def test_curve_points_refuses_malformed_curves(value, rising, where):
    with pytest.raises(InputError, match=where):
        curve_points("lower", value, rising=rising)
