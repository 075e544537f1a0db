"""aM fuse-link bands against the IEC 60269-2 aM gates.

Every gate here is from memory (recalled, not seen in a public copy); they are typed in here, not
read from ``curves/data/am_gates_iec60269.csv``, so a wrong data file fails these tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from curves.errors import InputError
from curves.fuse_am import AM_RATINGS_A, am_band

BASES = ("envelope", "typical")
REL = 1e-9
#: A dense current grid [A], 0.5 A to 2 MA.
GRID_A = np.logspace(math.log10(0.5), math.log10(2e6), 4001)


# IEC 60269-2, aM gates (from memory): no melting within 60 s at 4 In
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("rating", [10, 63, 100, 400])
def test_no_melting_within_60s_at_4_in(basis: str, rating: int) -> None:
    band = am_band(rating, basis=basis)
    x = np.linspace(0.2, 4.0, 40) * rating
    assert np.all(band.t_min(x) >= 60.0 * (1 - REL))


# IEC 60269-2, aM gates (from memory): melting within 60 s at 6.3 In
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("rating", [10, 63, 100, 400])
def test_melting_within_60s_at_6_3_in(basis: str, rating: int) -> None:
    assert float(am_band(rating, basis=basis).t_max(6.3 * rating)) <= 60.0 * (1 + REL)


# IEC 60269-2, aM gates at short times (from memory, less sure): not below 0.5 s at 8 In and
# 0.1 s at 12.5 In; not above 0.1 s at 19 In
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize(("x", "t_s", "edge"), [(8.0, 0.5, "min"), (12.5, 0.1, "min"),
                                                (19.0, 0.1, "max")])
def test_short_time_gates(basis: str, x: float, t_s: float, edge: str) -> None:
    band = am_band(100, basis=basis)
    if edge == "min":
        assert float(band.t_min(x * 100)) >= t_s * (1 - REL)
    else:
        assert float(band.t_max(x * 100)) <= t_s * (1 + REL)


# IEC 60269-2 aM (from memory): the envelope is the widest zone, so it sits on the gates
@pytest.mark.parametrize(("x", "t_s", "edge"), [(4.0, 60.0, "min"), (6.3, 60.0, "max"),
                                                (8.0, 0.5, "min"), (19.0, 0.1, "max")])
def test_envelope_sits_on_the_gates(x: float, t_s: float, edge: str) -> None:
    band = am_band(63, basis="envelope")
    t = band.t_min(x * 63) if edge == "min" else band.t_max(x * 63)
    assert math.isclose(float(t), t_s, rel_tol=1e-9)


# IEC 60269-1, category "a" (common practice): no overload protection; no operation promised
# below 4 In on either basis, nor below the 6.3 In gate on the worst case; the band says so
@pytest.mark.parametrize("basis", BASES)
def test_no_overload_protection(basis: str) -> None:
    band = am_band(32, basis=basis)
    below = 6.29 if basis == "envelope" else 4.0
    assert np.all(np.isinf(band.t_max(np.linspace(1.0, below, 30) * 32)))
    assert any("no overload protection" in note for note in band.notes)
    assert band.pickup_max_a >= 4.0 * 32


# common practice: the typical band lies inside the envelope
@pytest.mark.parametrize("rating", AM_RATINGS_A)
def test_typical_inside_envelope(rating: float) -> None:
    env, typ = am_band(rating, basis="envelope"), am_band(rating, basis="typical")
    assert np.all(typ.t_min(GRID_A) >= env.t_min(GRID_A) * (1 - REL))
    assert np.all(typ.t_max(GRID_A) <= env.t_max(GRID_A) * (1 + REL))


@pytest.mark.parametrize(("kw", "key"), [({"rating_a": 33}, "In_a"),
                                         ({"rating_a": 32, "basis": "nominal"}, "basis"),
                                         ({"rating_a": 32, "breaking_capacity_a": -1},
                                          "breaking_capacity_a")])
def test_bad_input_names_the_key(kw: dict, key: str) -> None:
    with pytest.raises(InputError) as err:
        am_band(**kw)
    assert err.value.key == key


# -- properties (common practice) -----------------------------------------------------------------
bands = st.builds(am_band, st.sampled_from(AM_RATINGS_A), basis=st.sampled_from(BASES))
currents = st.lists(st.floats(min_value=0.1, max_value=1e6, allow_nan=False), min_size=2,
                    max_size=40).map(lambda xs: np.sort(np.array(xs)))


@settings(max_examples=30, deadline=None)
@given(band=bands, current=currents)
def test_edges_monotone_and_ordered(band, current: np.ndarray) -> None:
    i = np.sort(np.concatenate([current, GRID_A]))
    lo, hi = band.t_min(i), band.t_max(i)
    assert np.all(lo[1:] <= lo[:-1] * (1 + 1e-12)) and np.all(hi[1:] <= hi[:-1] * (1 + 1e-12))
    assert np.all(lo <= hi) and np.all(lo > 0)


@settings(max_examples=30, deadline=None)
@given(k=st.integers(min_value=0, max_value=len(AM_RATINGS_A) - 2),
       step=st.integers(min_value=1, max_value=5), basis=st.sampled_from(BASES))
def test_larger_rating_never_left(k: int, step: int, basis: str) -> None:
    small = am_band(AM_RATINGS_A[k], basis=basis)
    large = am_band(AM_RATINGS_A[min(k + step, len(AM_RATINGS_A) - 1)], basis=basis)
    assert np.all(large.t_min(GRID_A) >= small.t_min(GRID_A) * (1 - REL))
    assert np.all(large.t_max(GRID_A) >= small.t_max(GRID_A) * (1 - REL))
