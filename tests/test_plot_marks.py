"""How a time-current plot is read: the energy region, Is with the upstream named, tested limits,
the envelope when asked, and the disconnection check's operating point.

Found by gids and texts, never pixels. The installations are invented.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import numpy as np
import pytest

from coordination import checks, engine, faults, study
from coordination.devices import band_for
from coordination.plot import plot_circuit
from curves.band import ENERGY_REGION_S

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"

TESTED = """
[study]
title = "Invented laundry"
[supply]
pfc_a = 10000
ze_ohm = 0.2
[[circuit]]
id = "main"
from = "supply"
device = "C63"
board = "laundry board"
[circuit.cable]
length_m = 10
csa_mm2 = 16
[[circuit]]
id = "washer"
from = "main"
device = "B16"
phases = 1
[circuit.cable]
length_m = 15
csa_mm2 = 2.5
cpc_mm2 = 1.5
[circuit.tested_limits_a]
main = 1500
"""


def _artists(ax):
    found = {}
    for artist in [*ax.collections, *ax.patches, *ax.lines, *ax.texts]:
        gid = artist.get_gid()
        if gid:
            found.setdefault(gid, []).append(artist)
    return found


def _plot(text_or_path, circuit, basis=None):
    s = study.load(text_or_path) if isinstance(text_or_path, Path) else study.loads(text_or_path)
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels, basis=basis)
    fig = plot_circuit(s, levels, analysis, circuit)
    return s, levels, analysis, fig.axes[0]


def test_the_time_axis_says_what_a_time_below_10_ms_is():
    *_, ax = _plot(EXAMPLES / "small-shop.toml", "bakery-oven")
    assert "below 10 ms: equivalent time I\u00b2t / I\u00b2" in ax.get_ylabel()
    found = _artists(ax)
    (line,) = found["energy-region"]
    assert set(line.get_ydata()) == {ENERGY_REGION_S}
    assert "equivalent time" in found["energy-region-text"][0].get_text()


def test_each_is_mark_names_its_upstream_to_three_figures():
    _, _, analysis, ax = _plot(EXAMPLES / "office-building.toml", "1t-kettles")
    found = _artists(ax)
    marks = {g: a[0].get_text() for g, a in found.items() if g.startswith("limit:")}
    assert marks
    for gid, text in marks.items():
        upstream, downstream = gid.removeprefix("limit:").split(">")
        p = next(p for p in analysis.for_circuit(downstream) if p.upstream == upstream)
        assert text.startswith(f"{upstream}: Is ")
        number = re.search(r"Is ([\d.]+) k?A", text).group(1)
        assert len(number.replace(".", "").lstrip("0")) <= 3
        unit = 1000.0 if text.endswith("kA") else 1.0
        assert float(number) * unit == pytest.approx(p.limit_a, rel=5e-3)
    # each zone has its own hatch, so two zones on one plot never look alike
    hatches = [a[0].get_hatch() for g, a in found.items() if g.startswith("zone:")]
    assert len(hatches) == len(set(hatches)) >= 1


def test_a_tested_limit_is_marked():
    _, _, analysis, ax = _plot(TESTED, "washer")
    (line,) = _artists(ax)["tested:main>washer"]
    assert set(line.get_xdata()) == {1500.0}
    assert any("tested limit" in t.get_text() and "1.5 kA" in t.get_text()
               for t in ax.get_legend().get_texts())
    assert analysis.for_circuit("washer")[0].decided_by == "tested"


def test_envelope_draws_the_worst_case_bands():
    s, _, _, ax = _plot(EXAMPLES / "small-shop.toml", "bakery-oven", basis="envelope")
    for cid in ("bakery-oven", "main-fuse"):
        band = band_for(s, cid, "envelope")
        edges = _artists(ax)[f"edge:{cid}"]
        grid = np.asarray(edges[1].get_xdata(), dtype=float)
        upper = np.asarray(edges[1].get_ydata(), dtype=float)
        expected = band.t_max(grid)
        # the drawing holds "never" at the top of the axis, and times below it at its floor
        inside = np.isfinite(expected) & (expected < 1e4) & (expected > 1e-4)
        assert inside.sum() > 100
        assert np.allclose(upper[inside], expected[inside])
        assert any(t.get_text().endswith("(envelope)") for t in ax.get_legend().get_texts()
                   if t.get_text().startswith(cid))


@pytest.mark.parametrize("circuit", ["bakery-oven", "light-sales", "main-fuse"])
def test_the_minimum_earth_fault_marker_shows_the_checks_point(circuit):
    s, levels, _, ax = _plot(EXAMPLES / "small-shop.toml", circuit)
    result = next(r for r in checks.run(s, levels)
                  if r.circuit == circuit and r.check == "disconnection")
    found = _artists(ax)
    (point,) = found["marker:disconnection"]
    assert point.get_xdata()[0] == pytest.approx(levels.by_circuit[circuit].ief_min_a)
    assert point.get_xdata()[0] == found["marker:min-earth-fault"][0].get_xdata()[0]
    # the time the check took: the envelope's latest clearing time at that current
    assert point.get_ydata()[0] == pytest.approx(result.value)
    envelope = band_for(s, circuit, "envelope")
    assert result.value == pytest.approx(float(envelope.t_max(result.details["current_a"])))
    (bar,) = found["marker:disconnection-limit"]
    assert bar.get_ydata()[0] == pytest.approx(result.limit)
    assert math.isfinite(result.limit)
