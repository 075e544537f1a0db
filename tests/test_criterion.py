"""The one selectivity criterion: the engine and the chooser's screen give the same verdict.

Sources: IEC 60947-2:2016, Annex A (selectivity by comparison of the time-current bands: D's
upper edge below U's lower edge, none above U's instantaneous release); IEC 60269-1:2006, 5.7.1
(at equal values selective); margin and interval: common practice. IEC 60364-4-43:2008,
434.5.1 (breaking capacity against the largest fault where the device sits).
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from coordination import criterion, engine
from coordination.choose.screening import clamped_lower, meets, need_of
from curves.spec import band_from_spec

DOWN = ["B6", "B16", "C10", "C20", "C32", "D16", "gG16", "gG32", "gG63"]
UP = ["gG63", "gG100", "gG160", "C63", "D63",
      {"family": "tm", "In_a": 160, "Ir_x": 0.8, "Ii_x": 10},
      {"family": "tm", "In_a": 250, "Ir_x": 1, "Ii_x": 5},
      {"family": "electronic", "In_a": 250, "Ir_x": 0.8, "Isd_x": 4, "tsd_s": 0.2, "Ii_x": 12},
      {"family": "electronic", "In_a": 400, "Ir_x": 1, "Isd_x": 6, "tsd_s": 0.1,
       "Ii_x": "off"}]


def _pair(up_spec, down_spec, basis):
    return band_from_spec(up_spec, basis), band_from_spec(down_spec, basis)


# IEC 60947-2 Annex A: the chooser's screen applies the engine's criterion on its own grid. Where
# the engine finds the pair total, the screen must find no failing current (it never refuses what
# the engine accepts); where the screen finds a clear failure (1 % beyond its tolerance) at a
# current, the engine's limit is at or below that current.
@settings(max_examples=40, deadline=None, derandomize=True)
@given(up=st.sampled_from(UP), down=st.sampled_from(DOWN),
       basis=st.sampled_from(["typical", "envelope"]),
       margin=st.sampled_from([1.0, 1.2, 1.5, 2.0]),
       interval=st.sampled_from([0.0, 0.1, 0.2]),
       top=st.floats(min_value=500.0, max_value=50_000.0))
def test_engine_and_screen_give_the_same_verdict(up, down, basis, margin, interval, top):
    up_band, down_band = _pair(up, down, basis)
    lo = float(down_band.pickup_min_a)
    sel = engine.compare(up_band, down_band, (lo, top), margin=margin, interval_s=interval)
    grid = np.geomspace(lo, top, 400)[:-1]
    adjustable = up_band.family in criterion.ADJUSTABLE_FAMILIES
    need = need_of(np.asarray(down_band.t_max(grid), dtype=float), margin, interval, adjustable)
    t_up = clamped_lower(up_band, grid)
    ok = meets(need, t_up)
    if sel.verdict == "total":
        assert ok.all(), grid[~ok][:3]
    clear_failure = need > t_up * 1.01
    if clear_failure.any():
        first = float(grid[np.argmax(clear_failure)])
        assert sel.verdict != "total"
        assert sel.limit_a is not None and sel.limit_a <= first * (1 + 1e-9)


# IEC 60947-2 Annex A as read by both: a requirement is met by a total verdict or a limit that
# reaches it, equal within the engine's tolerance counting as met.
@pytest.mark.parametrize(("verdict", "limit", "required", "met"), [
    ("total", None, 6000.0, True),
    ("partial", 6000.0, 6000.0, True),
    ("partial", 6000.0 * (1 - 1e-12), 6000.0, True),
    ("partial", 5990.0, 6000.0, False),
    ("none", None, 100.0, False),
])
def test_requirement_met(verdict, limit, required, met):
    assert criterion.requirement_met(verdict, limit, required) is met


# IEC 60364-4-43 434.5.1: the device breaks the largest fault at its board; an earth fault
# larger than the short-circuit values governs (it flows in a line conductor too).
@pytest.mark.parametrize(("node", "phases", "expected"), [
    (dict(ik_max_a=9000.0, ik3_max_a=9000.0, ik1_max_a=6000.0, ief_max_board_a=5000.0), 3,
     (9000.0, "three-phase")),
    (dict(ik_max_a=6000.0, ik3_max_a=9000.0, ik1_max_a=6000.0, ief_max_board_a=5000.0), 1,
     (6000.0, "line-neutral")),
    (dict(ik_max_a=6000.0, ik3_max_a=None, ik1_max_a=6000.0, ief_max_board_a=6500.0), 1,
     (6500.0, "earth")),
    (dict(ik_max_a=4000.0, ik3_max_a=None, ik1_max_a=None, ief_max_board_a=None), 3,
     (4000.0, "three-phase")),
])
def test_breaking_duty(node, phases, expected):
    assert criterion.breaking_duty(SimpleNamespace(**node), phases) == expected
