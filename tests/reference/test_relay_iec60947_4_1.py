"""Overload-relay bands against IEC 60947-4-1: limits of operation and the table of trip classes.

The limits are typed in here from IEC 60947-4-1, not read from ``curves.relay``, so a wrong
constant in the code fails these tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from curves.errors import InputError
from curves.fuse_am import am_band
from curves.mcb import mcb_band
from curves.relay import combined_band, relay_band

BASES = ("envelope", "typical")
REL = 1e-9
#: IEC 60947-4-1, table of trip classes: class, trip within [s] at 1.5 Ir, Tp window at 7.2 Ir
#: (Tp_min < Tp <= Tp_max) [s]
TRIP_CLASS_TABLE = [
    ("10A", 2 * 60, 2, 10),
    ("10", 4 * 60, 4, 10),
    ("20", 8 * 60, 6, 20),
    ("30", 12 * 60, 9, 30),
]
#: x = I / Ir, 0.5 .. 1000
GRID_X = np.logspace(math.log10(0.5), 3, 3001)


# IEC 60947-4-1, limits of operation: 1.05 Ir no trip within 2 h
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("row", TRIP_CLASS_TABLE)
def test_no_trip_within_2h_at_1_05_ir(basis: str, row: tuple) -> None:
    band = relay_band(row[0], 10.0, basis=basis)
    assert np.all(band.t_min(np.linspace(0.1, 1.05, 20) * 10.0) >= 7200.0)


# IEC 60947-4-1, limits of operation: 1.2 Ir trip within 2 h
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("row", TRIP_CLASS_TABLE)
def test_trip_within_2h_at_1_2_ir(basis: str, row: tuple) -> None:
    assert float(relay_band(row[0], 10.0, basis=basis).t_max(1.2 * 10.0)) <= 7200.0 * (1 + REL)


# IEC 60947-4-1, table of trip classes: 1.5 Ir trip within 2 / 4 / 8 / 12 min
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("row", TRIP_CLASS_TABLE)
def test_class_time_at_1_5_ir(basis: str, row: tuple) -> None:
    name, t15, _, _ = row
    assert float(relay_band(name, 25.0, basis=basis).t_max(1.5 * 25.0)) <= t15 * (1 + REL)


# IEC 60947-4-1, table of trip classes: Tp_min < Tp <= Tp_max at 7.2 Ir
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("row", TRIP_CLASS_TABLE)
def test_tp_window_at_7_2_ir(basis: str, row: tuple) -> None:
    name, _, tp_min, tp_max = row
    band = relay_band(name, 25.0, basis=basis)
    assert float(band.t_min(7.2 * 25.0)) >= tp_min
    assert float(band.t_max(7.2 * 25.0)) <= tp_max * (1 + REL)


# IEC 60947-4-1: the envelope is the widest band, each stated time held up to the next point
# (never clearing faster than guaranteed)
@pytest.mark.parametrize("row", TRIP_CLASS_TABLE)
def test_envelope_is_the_staircase(row: tuple) -> None:
    name, t15, tp_min, tp_max = row
    band = relay_band(name, 1.0, basis="envelope")
    assert np.all(np.isinf(band.t_max(np.linspace(0.5, 1.199, 20))))
    assert np.allclose(band.t_max(np.linspace(1.2, 1.499, 20)), 7200.0)
    assert np.allclose(band.t_max(np.linspace(1.5, 7.19, 20)), t15)
    assert np.allclose(band.t_max(np.linspace(7.2, 100.0, 20)), tp_max)
    assert np.allclose(band.t_min(np.linspace(1.051, 7.2, 20)), tp_min)


# common practice: the typical band lies inside the envelope
@pytest.mark.parametrize("row", TRIP_CLASS_TABLE)
def test_typical_inside_envelope(row: tuple) -> None:
    env, typ = relay_band(row[0], 7.0, basis="envelope"), relay_band(row[0], 7.0)
    i = GRID_X * 7.0
    assert np.all(typ.t_min(i) >= env.t_min(i)) and np.all(typ.t_max(i) <= env.t_max(i))
    # and it is a curve, not the envelope again: strictly narrower at 3 Ir
    assert float(typ.t_max(21.0)) < float(env.t_max(21.0))


# combined with a short-circuit device: the earlier device clears, the relay only up to the
# contactor's breaking capacity, 8 Ie in AC-3 (IEC 60947-4-1, from memory); IEC 60947-4-1 relay
# with IEC 60269-2 aM (from memory) or IEC 60898-1 type D
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("sc", ["aM", "mcb"])
def test_combined_is_the_earlier_device(basis: str, sc: str) -> None:
    relay = relay_band("10", 14.0, basis=basis)
    fault = am_band(16, basis=basis) if sc == "aM" else mcb_band("D", 16, basis=basis)
    both = combined_band(relay, fault)
    i = GRID_X * 14.0
    assert np.array_equal(both.t_min(i), np.minimum(relay.t_min(i), fault.t_min(i)))
    t_max, relay_max, fault_max = both.t_max(i), relay.t_max(i), fault.t_max(i)
    # never later than either device where the contactor can break, never sooner than allowed
    within = i <= 8 * 14.0
    assert np.all(t_max >= np.minimum(relay_max, fault_max))
    assert np.all(t_max[within] <= fault_max[within])
    # above the contactor's breaking capacity only the short-circuit device clears
    assert np.array_equal(t_max[~within], fault_max[~within])
    # overload (1.5 Ir): the relay decides
    assert float(both.t_max(1.5 * 14.0)) == float(relay.t_max(1.5 * 14.0))
    assert both.breaking_capacity_a == fault.breaking_capacity_a
    assert float(both.i2t_let_through(5000.0)) == float(fault.i2t_let_through(5000.0))


# IEC 60947-4-1 (from memory): a contactor breaks 8 Ie in AC-3; a fault above that is the
# short-circuit device's even where the relay's own time is shorter
def test_relay_does_not_clear_above_the_contactor() -> None:
    relay = relay_band("10A", 10.0)
    both = combined_band(relay, am_band(16), contactor_breaking_a=60.0)
    i = 70.0  # 7 Ir, 4.4 In of the aM16: the relay is faster, but the contactor cannot break
    assert float(relay.t_max(i)) < float(am_band(16).t_max(i))
    assert float(both.t_max(i)) == float(am_band(16).t_max(i))
    # an aM fuse-link too large leaves a gap the band shows, and says so
    gap = combined_band(relay, am_band(32), contactor_breaking_a=100.0)
    assert np.isinf(gap.t_max(150.0)) and np.isinf(gap.t_max(15.0))
    assert any(note.startswith("GAP") for note in gap.notes)


def test_combined_refuses_wrong_pairs() -> None:
    relay, fuse = relay_band("20", 30.0), am_band(32)
    with pytest.raises(InputError) as err:
        combined_band(fuse, relay)
    assert err.value.key == "relay"
    with pytest.raises(InputError) as err:
        combined_band(relay, relay_band("10", 30.0))
    assert err.value.key == "short_circuit"
    with pytest.raises(InputError) as err:
        combined_band(relay, am_band(32, basis="envelope"))
    assert err.value.key == "basis"


@pytest.mark.parametrize(("args", "key"), [(("15", 10.0), "trip_class"),
                                           ((True, 10.0), "trip_class"),
                                           (("10", -1.0), "Ir_a"), (("10", math.nan), "Ir_a")])
def test_bad_input_names_the_key(args: tuple, key: str) -> None:
    with pytest.raises(InputError) as err:
        relay_band(*args)
    assert err.value.key == key


# -- properties (common practice) -----------------------------------------------------------------
classes = st.sampled_from([row[0] for row in TRIP_CLASS_TABLE])
settings_a = st.floats(min_value=0.1, max_value=800.0, allow_nan=False)


@settings(max_examples=30, deadline=None)
@given(name=classes, ir=settings_a, basis=st.sampled_from(BASES), with_fuse=st.booleans())
def test_edges_monotone_and_ordered(name: str, ir: float, basis: str, with_fuse: bool) -> None:
    band = relay_band(name, ir, basis=basis)
    if with_fuse:
        band = combined_band(band, am_band(32, basis=basis))
    i = GRID_X * ir
    lo, hi = band.t_min(i), band.t_max(i)
    assert np.all(lo[1:] <= lo[:-1] * (1 + 1e-12)) and np.all(hi[1:] <= hi[:-1] * (1 + 1e-12))
    assert np.all(lo <= hi) and np.all(lo > 0)


@settings(max_examples=30, deadline=None)
@given(name=classes, ir=settings_a, factor=st.floats(min_value=1.0, max_value=5.0),
       basis=st.sampled_from(BASES))
def test_larger_setting_never_left(name: str, ir: float, factor: float, basis: str) -> None:
    small, large = relay_band(name, ir, basis=basis), relay_band(name, ir * factor, basis=basis)
    i = GRID_X * ir
    assert np.all(large.t_min(i) >= small.t_min(i) * (1 - REL))
    assert np.all(large.t_max(i) >= small.t_max(i) * (1 - REL))
