"""Residual-current time plots: RCDs on a residual-current axis in mA (invented installation)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from coordination import faults, study
from coordination.plot_residual import plot_residual, residual_boards

EXAMPLE = Path(__file__).resolve().parents[1] / "examples" / "orchard-cottage-tt.toml"


@pytest.fixture(scope="module")
def cottage():
    s = study.load(EXAMPLE)
    return s, faults.compute(s)


def test_every_board_with_rcds_is_found(cottage):
    s, _ = cottage
    boards = residual_boards(s)
    assert boards == {"supply": ("incomer",),
                      "incomer": ("kitchen-sockets", "lighting", "heat-pump", "workshop-rccb")}


def test_a_board_plot_draws_each_kind_of_rcd_once_on_a_milliampere_axis(cottage):
    s, levels = cottage
    ax = plot_residual(s, "incomer", levels=levels).axes[0]
    bands = sorted(c.get_gid() for c in ax.collections if (c.get_gid() or "").startswith("rcd-"))
    # 30 mA type A (three circuits share it), 30 mA type F, and the 100 mA type S above
    assert bands == ["rcd-band:heat-pump", "rcd-band:incomer", "rcd-band:kitchen-sockets"]
    assert ax.get_xlabel() == "residual current [mA]" and ax.get_xscale() == "log"
    lo, hi = ax.get_xlim()
    assert lo <= 15.0 and hi >= 1000.0  # from below 0.5 IΔn of 30 mA past 5 IΔn of 100 mA
    assert any(line.get_gid() == "marker:earth-fault" for line in ax.lines)


def test_the_drawn_edges_are_the_standard_limits(cottage):
    # IEC 61008-1 / 61009-1: general type cleared by 0.3 s from IΔn, 0.15 s from 2 IΔn
    s, _ = cottage
    ax = plot_residual(s, "kitchen-sockets").axes[0]
    upper = [ln for ln in ax.lines if ln.get_gid() == "rcd-edge:kitchen-sockets"][1]
    x, y = (np.asarray(v, dtype=float) for v in upper.get_data())
    assert y[np.searchsorted(x, 40.0)] == pytest.approx(0.3)
    assert y[np.searchsorted(x, 100.0)] == pytest.approx(0.15)
