"""Properties every MCB and gG band must have, whatever the rating, type, class or basis.

Bounded hypothesis runs (max_examples <= 50, no deadline) plus dense-grid checks over all pairs.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from curves.band import Band
from curves.errors import InputError
from curves.fuse import GG_RATINGS_A, gg_band
from curves.mcb import MCB_INSTANTANEOUS, MCB_RATINGS_A, class_applies, mcb_band

BASES = ("typical", "envelope")
#: IEC 60898-1 standard values of rated short-circuit capacity Icn [A] (from memory).
ICN_STANDARD_A = (1500.0, 3000.0, 4500.0, 6000.0, 10000.0, 15000.0, 20000.0, 25000.0)
#: Relative floating-point rounding allowed where an edge is compared with itself.
ROUNDING = 1e-12
#: A dense current grid from 0.3 A to 300 kA (log-spaced).
GRID_A = np.logspace(math.log10(0.3), math.log10(3e5), 6001)

# EN 60898-1 Annex ZA: classes 2 and 3 exist for types B and C up to 32 A only (None: the default)
mcb_kwargs = st.fixed_dictionaries(
    {
        "curve_type": st.sampled_from(sorted(MCB_INSTANTANEOUS)),
        "rating_a": st.sampled_from(MCB_RATINGS_A),
        "energy_class": st.sampled_from((None, 1, 2, 3)),
        "basis": st.sampled_from(BASES),
    }
).filter(lambda kw: kw["energy_class"] is None
         or class_applies(kw["curve_type"], kw["rating_a"], kw["energy_class"]))
any_band = st.one_of(
    mcb_kwargs.map(lambda kw: mcb_band(**kw)),
    st.builds(gg_band, st.sampled_from(GG_RATINGS_A), basis=st.sampled_from(BASES)),
)
currents = st.lists(
    st.floats(min_value=0.1, max_value=1e6, allow_nan=False), min_size=2, max_size=60
).map(lambda xs: np.sort(np.array(xs)))


def edges_on(band: Band, current: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return band.t_min(current), band.t_max(current)


# common practice: a protective device operates no later at a larger current
@settings(max_examples=50, deadline=None)
@given(band=any_band, current=currents)
@example(band=mcb_band("B", 6, energy_class=2, basis="typical"), current=np.array([1.0, 3e3]))
def test_edges_never_rise_with_current(band: Band, current: np.ndarray) -> None:
    merged = np.sort(np.concatenate([current, GRID_A]))
    for edge in edges_on(band, merged):
        # at a table point the held and the interpolated let-through may differ in the last
        # bits (3e-15 relative was seen at 3 kA): rounding, not a rise
        assert np.all(edge[1:] <= edge[:-1] * (1 + ROUNDING)), (band.name, band.basis,
                                                                  dict(band.settings))


# common practice: the no-operation edge never lies above the clearing edge
@settings(max_examples=50, deadline=None)
@given(band=any_band, current=currents)
def test_lower_edge_never_above_upper_edge(band: Band, current: np.ndarray) -> None:
    for i in (current, GRID_A):
        t_min, t_max = edges_on(band, i)
        assert np.all(t_min <= t_max), (band.name, band.basis, dict(band.settings))
        assert np.all(t_min > 0)


# common practice: a larger rating of the same family never sits left of a smaller one
@settings(max_examples=50, deadline=None)
@given(
    kw=mcb_kwargs,
    step=st.integers(min_value=1, max_value=len(MCB_RATINGS_A) - 1),
)
def test_larger_mcb_rating_never_left(kw: dict, step: int) -> None:
    index = MCB_RATINGS_A.index(kw["rating_a"])
    if index + step >= len(MCB_RATINGS_A):
        step = len(MCB_RATINGS_A) - 1 - index
    small = mcb_band(**kw)
    large_a = MCB_RATINGS_A[index + step]
    cls = kw["energy_class"]  # a larger rating outside Annex ZA has no class (no energy limit)
    cls = cls if cls is not None and class_applies(kw["curve_type"], large_a, cls) else None
    large = mcb_band(**{**kw, "rating_a": large_a, "energy_class": cls})
    assert np.all(large.t_min(GRID_A) >= small.t_min(GRID_A))
    assert np.all(large.t_max(GRID_A) >= small.t_max(GRID_A))


# common practice: a larger gG rating never sits left of a smaller one (both edges)
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("index", range(len(GG_RATINGS_A) - 1))
def test_larger_gg_rating_never_left(index: int, basis: str) -> None:
    small = gg_band(GG_RATINGS_A[index], basis=basis)
    large = gg_band(GG_RATINGS_A[index + 1], basis=basis)
    assert np.all(large.t_min(GRID_A) >= small.t_min(GRID_A))
    assert np.all(large.t_max(GRID_A) >= small.t_max(GRID_A))


# Our modelling choice: the envelope (widest band the standard allows) contains the typical band
@settings(max_examples=50, deadline=None)
@given(kw=mcb_kwargs, current=currents)
def test_mcb_envelope_contains_typical(kw: dict, current: np.ndarray) -> None:
    typical = mcb_band(**{**kw, "basis": "typical"})
    envelope = mcb_band(**{**kw, "basis": "envelope"})
    for i in (current, GRID_A):
        assert np.all(envelope.t_min(i) <= typical.t_min(i))
        assert np.all(typical.t_max(i) <= envelope.t_max(i))
    assert envelope.pickup_min_a <= typical.pickup_min_a
    assert typical.pickup_max_a <= envelope.pickup_max_a


# Our modelling choice: the envelope contains the typical band (every gG rating, dense grid)
@pytest.mark.parametrize("rating_a", GG_RATINGS_A)
def test_gg_envelope_contains_typical(rating_a: float) -> None:
    typical = gg_band(rating_a, basis="typical")
    envelope = gg_band(rating_a, basis="envelope")
    assert np.all(envelope.t_min(GRID_A) <= typical.t_min(GRID_A))
    assert np.all(typical.t_max(GRID_A) <= envelope.t_max(GRID_A))
    assert envelope.pickup_min_a <= typical.pickup_min_a
    assert typical.pickup_max_a <= envelope.pickup_max_a


GG_PAIRS = [
    (GG_RATINGS_A[i], GG_RATINGS_A[j])
    for i in range(len(GG_RATINGS_A))
    for j in range(i + 1, len(GG_RATINGS_A))
    if j - i >= 2 or GG_RATINGS_A[j] / GG_RATINGS_A[i] >= 1.6
]


# IEC 60269-1: gG fuse-links in the ratio 1.6:1 or more (two steps apart in the series) are
# selective (common practice): on the typical basis the minor's upper edge never rises above the
# major's lower edge, at any current (equal values count as selective)
@pytest.mark.parametrize(("minor_a", "major_a"), GG_PAIRS)
def test_gg_two_steps_apart_never_overlap_on_typical(minor_a: float, major_a: float) -> None:
    minor = gg_band(minor_a, basis="typical")
    major = gg_band(major_a, basis="typical")
    assert np.all(minor.t_max(GRID_A) <= major.t_min(GRID_A))


# common practice: a fuse is never selective with another of the same rating
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("rating_a", GG_RATINGS_A)
def test_gg_equal_ratings_overlap(rating_a: float, basis: str) -> None:
    band = gg_band(rating_a, basis=basis)
    assert np.any(band.t_max(GRID_A) > band.t_min(GRID_A))


# common practice: the envelope (worst case) of 1.6:1 gG pairs is not selective everywhere for
# every pair, which is why the typical basis exists; at least one pair overlaps
def test_gg_envelope_is_wider_than_typical_for_some_pairs() -> None:
    overlapping = [
        (a, b)
        for a, b in GG_PAIRS
        if np.any(gg_band(a, basis="envelope").t_max(GRID_A)
                  > gg_band(b, basis="envelope").t_min(GRID_A))
    ]
    assert overlapping


bad_mcb = st.one_of(
    st.tuples(
        st.just("type"),
        st.fixed_dictionaries(
            {"curve_type": st.text(max_size=3).filter(
                lambda s: s.strip().upper() not in MCB_INSTANTANEOUS), "rating_a": st.just(16)}
        ),
    ),
    st.tuples(
        st.just("In_a"),
        st.fixed_dictionaries(
            {
                "curve_type": st.just("B"),
                "rating_a": st.floats(allow_nan=True, allow_infinity=True).filter(
                    lambda x: not any(abs(x - r) <= 1e-9 * r for r in MCB_RATINGS_A)
                ),
            }
        ),
    ),
    st.tuples(
        st.just("energy_class"),
        st.fixed_dictionaries(
            {
                "curve_type": st.just("C"),
                "rating_a": st.just(16),
                "energy_class": st.integers().filter(lambda c: c not in (1, 2, 3)),
            }
        ),
    ),
    st.tuples(
        st.just("icn_a"),
        st.fixed_dictionaries(
            {
                "curve_type": st.just("D"),
                "rating_a": st.just(16),
                "icn_a": st.one_of(
                    st.floats(max_value=0.0),
                    st.just(math.inf),
                    st.just(math.nan),
                    # IEC 60898-1 standard values of Icn only (from memory)
                    st.floats(min_value=1.0, max_value=1e6).filter(
                        lambda x: not any(abs(x - v) <= 1e-9 * v for v in ICN_STANDARD_A)
                    ),
                ),
            }
        ),
    ),
    st.tuples(
        st.just("basis"),
        st.fixed_dictionaries(
            {
                "curve_type": st.just("B"),
                "rating_a": st.just(16),
                "basis": st.text(max_size=10).filter(lambda s: s not in BASES),
            }
        ),
    ),
)


# common practice: bad input is refused with the key it came from and what is allowed
@settings(max_examples=50, deadline=None)
@given(case=bad_mcb)
def test_bad_mcb_input_raises_input_error_with_key(case: tuple[str, dict]) -> None:
    key, kwargs = case
    with pytest.raises(InputError) as caught:
        mcb_band(**kwargs)
    assert caught.value.key == key
    assert "\n" not in str(caught.value)


bad_gg = st.one_of(
    st.tuples(
        st.just("In_a"),
        st.fixed_dictionaries(
            {
                "rating_a": st.floats(allow_nan=True, allow_infinity=True).filter(
                    lambda x: not any(abs(x - r) <= 1e-9 * r for r in GG_RATINGS_A)
                )
            }
        ),
    ),
    st.tuples(
        st.just("breaking_capacity_a"),
        st.fixed_dictionaries(
            {
                "rating_a": st.just(100),
                "breaking_capacity_a": st.one_of(
                    st.floats(max_value=0.0), st.just(-math.inf), st.just(math.nan)
                ),
            }
        ),
    ),
    st.tuples(
        st.just("basis"),
        st.fixed_dictionaries(
            {
                "rating_a": st.just(100),
                "basis": st.text(max_size=10).filter(lambda s: s not in BASES),
            }
        ),
    ),
)


# common practice: bad input is refused with the key it came from and what is allowed
@settings(max_examples=50, deadline=None)
@given(case=bad_gg)
def test_bad_gg_input_raises_input_error_with_key(case: tuple[str, dict]) -> None:
    key, kwargs = case
    with pytest.raises(InputError) as caught:
        gg_band(**kwargs)
    assert caught.value.key == key
    assert "\n" not in str(caught.value)


def _pickup_grid(band: Band) -> np.ndarray:
    """A dense grid with every pickup and instantaneous current exactly and one ulp either side."""
    marks = [band.pickup_min_a, band.pickup_max_a, band.instantaneous_a]
    marks += [band.rating_a * x for x in (1.13, 1.25, 1.45, 1.6, 2.55, 3, 5, 10, 20)]
    exact = np.array([m for m in marks if m is not None and math.isfinite(m)], dtype=float)
    ulps = np.concatenate([np.nextafter(exact, 0.0), exact, np.nextafter(exact, np.inf)])
    return np.sort(np.concatenate([GRID_A, ulps]))


ALL_STANDARD_BANDS = [
    *[("mcb", t, r, b) for t in sorted(MCB_INSTANTANEOUS) for r in MCB_RATINGS_A for b in BASES],
    *[("gG", "", r, b) for r in GG_RATINGS_A for b in BASES],
]


# common practice: edges never rise with current, checked on a dense grid that holds every pickup
# exactly and one ulp either side (every MCB type and rating, every gG rating, both bases)
@pytest.mark.parametrize(("family", "curve_type", "rating_a", "basis"), ALL_STANDARD_BANDS)
def test_edges_never_rise_across_the_pickups(family: str, curve_type: str, rating_a: float,
                                              basis: str) -> None:
    band = (mcb_band(curve_type, rating_a, basis=basis) if family == "mcb"
            else gg_band(rating_a, basis=basis))
    grid = _pickup_grid(band)
    for edge in edges_on(band, grid):
        rises = edge[1:] > edge[:-1] * (1 + ROUNDING)
        assert not rises.any(), (band.name, basis, grid[1:][rises][:3])
