"""Structure of the time-current plot: bands, crossover zones, markers, withstand lines, files.

The installation below is invented.
"""

from __future__ import annotations

import itertools
import math
from pathlib import Path

import numpy as np
import pytest

from coordination import engine, faults, study
from coordination.checks.fault_energy import withstand_time
from coordination.io import save_figure
from coordination.plot import MIN_ZONE_PT, PALETTE, ZONE_MARK_PT, plot_circuit
from curves.errors import InputError

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"

STUDY = """
[study]
title = "Invented workshop"

[supply]
u0_v = 230
phases = 3
earthing = "TN-C-S"
pfc_a = 10000
ze_ohm = 0.35

[[circuit]]
id = "main"
from = "supply"
device = "gG100"
board = "workshop board"
[circuit.cable]
length_m = 5
csa_mm2 = 35
cpc_mm2 = 16
insulation = "xlpe"
iz_a = 150

[[circuit]]
id = "sub"
from = "main"
device = "C63"
board = "bench board"
[circuit.cable]
length_m = 10
csa_mm2 = 16
cpc_mm2 = 16
insulation = "xlpe"
iz_a = 80

[[circuit]]
id = "final"
from = "sub"
device = "B16"
phases = 1
load_a = 10
[circuit.cable]
length_m = 20
csa_mm2 = 2.5
cpc_mm2 = 1.5
iz_a = 24

[[circuit]]
id = "fused"
from = "main"
device = "gG40"
load_a = 30
[circuit.cable]
length_m = 15
csa_mm2 = 10
cpc_mm2 = 10
iz_a = 57
"""


@pytest.fixture(scope="module")
def workshop():
    s = study.loads(STUDY, source="workshop.toml")
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    return s, levels, analysis


def artists(ax):
    """Every artist of the axes with a gid, by gid."""
    found = {}
    for artist in [*ax.collections, *ax.patches, *ax.lines, *ax.texts]:
        gid = artist.get_gid()
        if gid:
            found.setdefault(gid, []).append(artist)
    return found


def pair(analysis, upstream, downstream):
    return next(p for p in analysis.for_circuit(downstream) if p.upstream == upstream)


def test_both_axes_are_logarithmic(workshop):
    s, levels, analysis = workshop
    ax = plot_circuit(s, levels, analysis, "final").axes[0]
    # common practice: time-current characteristics are drawn on log-log axes
    assert ax.get_xscale() == "log"
    assert ax.get_yscale() == "log"


@pytest.mark.parametrize(("circuit", "chain"), [
    ("final", ("final", "sub", "main")),
    ("sub", ("sub", "main")),
    ("fused", ("fused", "main")),
    ("main", ("main",)),
])
def test_one_band_per_device_in_the_chain(workshop, circuit, chain):
    s, levels, analysis = workshop
    found = artists(plot_circuit(s, levels, analysis, circuit).axes[0])
    bands = sorted(g.split(":", 1)[1] for g in found if g.startswith("band:"))
    # common practice: a coordination plot shows the circuit's device and every device above it
    assert bands == sorted(chain)
    for cid in chain:
        assert len(found[f"band:{cid}"]) == 1
        assert len(found[f"edge:{cid}"]) == 2  # lower and upper edge


def test_a_deep_chain_of_alike_devices_draws_each_device_once():
    # our design: alike devices in a row above the circuit are one band, labelled as a run
    text = "\n".join([
        '[study]\ntitle = "invented riser of alike fuses"\n[supply]\npfc_a = 20000',
        *(f'[[circuit]]\nid = "n{k}"\nfrom = "{"supply" if k == 0 else f"n{k - 1}"}"\n'
          f'device = "{"gG63" if k == 39 else "gG160"}"' for k in range(40))])
    s = study.loads(text)
    levels = faults.compute(s)
    found = artists(plot_circuit(s, levels, engine.analyse(s, levels), "n39").axes[0])
    assert sorted(g for g in found if g.startswith("band:")) == ["band:n38", "band:n39"]
    (band,) = found["band:n38"]
    assert band.get_label().startswith("n38 to n0 (39 alike): gG160")


def test_band_lies_between_the_edges_of_the_device(workshop):
    from coordination.devices import band_for

    s, levels, analysis = workshop
    ax = plot_circuit(s, levels, analysis, "final").axes[0]
    band = band_for(s, "final")
    lower, upper = sorted(artists(ax)["edge:final"], key=lambda ln: float(np.sum(ln.get_ydata())))
    x = np.asarray(lower.get_xdata())
    t_lo, t_hi = band.edges(x)
    # the drawn edges are the band's own t_min and t_max (clipped to the time axis)
    np.testing.assert_allclose(lower.get_ydata(), t_lo, rtol=1e-12)
    np.testing.assert_allclose(upper.get_ydata(), t_hi, rtol=1e-12)


def test_known_overlap_is_shaded_from_the_upstream_instantaneous_pickup(workshop):
    s, levels, analysis = workshop
    result = pair(analysis, "sub", "final")
    # IEC 60898-1, instantaneous bands: a C63 may trip instantaneously from 5 In = 315 A, and the
    # window of a B16 at this board reaches several kA, so the pair cannot be totally selective
    assert result.verdict != "total"
    assert result.limit_a <= 315.0 * (1 + 1e-9)
    found = artists(plot_circuit(s, levels, analysis, "final").axes[0])
    zones = found.get("zone:sub>final")
    assert zones and len(zones) == 1
    vertices = zones[0].get_path().vertices
    # IEC 60898-1, instantaneous bands: below 5 In of the C63 it does not trip within 0.1 s and
    # the B16 has cleared by then (its instantaneous band ends at 5 In = 80 A), so no overlap
    assert vertices[:, 0].min() >= 315.0 * 0.98
    assert vertices[:, 0].max() <= levels.by_circuit["final"].ik_max_a * 1.02
    assert zones[0].get_hatch()  # hatched: readable in greyscale
    assert "limit:sub>final" in found
    label = found["limit:sub>final"][0].get_text()
    assert label.startswith("sub: Is ")  # the upstream named on its zone's mark


def test_selective_pair_has_no_zone(workshop):
    s, levels, analysis = workshop
    result = pair(analysis, "main", "fused")
    # IEC 60269-1 / common practice: gG fuse-links in the ratio 1.6:1 or more are selective
    # (100 / 40 = 2.5)
    assert result.verdict == "total"
    found = artists(plot_circuit(s, levels, analysis, "fused").axes[0])
    assert not [g for g in found if g.startswith(("zone:", "limit:"))]


def test_markers_sit_at_the_fault_levels_and_the_load(workshop):
    s, levels, analysis = workshop
    found = artists(plot_circuit(s, levels, analysis, "final").axes[0])
    node = levels.by_circuit["final"]
    expected = {"marker:max-fault": node.ik_max_a, "marker:min-earth-fault": node.ief_min_a,
                "marker:load": 10.0}
    for gid, current in expected.items():
        assert math.isfinite(current), gid  # NaN markers would pass the comparison below
        (line,) = found[gid]
        # a vertical marker: the same current at both ends
        np.testing.assert_allclose(line.get_xdata(), [current, current], rtol=1e-12)
    # common practice: the minimum earth fault at the far end is below the maximum fault at the
    # board, which is above the design current
    assert node.ief_min_a < node.ik_max_a


# IEC 60364-4-43, 434.5.2: t = (k S / I)^2 with k = 115 (copper, PVC), 143 (copper, XLPE),
# 76 (aluminium, PVC); values worked by hand from the equation
@pytest.mark.parametrize(("current_a", "k", "csa_mm2", "t_s"), [
    (1000.0, 115.0, 2.5, 0.08265625),
    (1000.0, 115.0, 1.5, 0.02975625),
    (5000.0, 143.0, 16.0, 0.20939776),
    (2000.0, 76.0, 25.0, 0.9025),
])
def test_adiabatic_withstand_equation(current_a, k, csa_mm2, t_s):
    assert float(withstand_time(current_a, k, csa_mm2)) == pytest.approx(t_s, rel=1e-9)


@pytest.mark.parametrize(("gid", "csa_mm2"), [("withstand:line", 2.5), ("withstand:cpc", 1.5)])
def test_withstand_lines_of_the_circuit_conductors(workshop, gid, csa_mm2):
    s, levels, analysis = workshop
    found = artists(plot_circuit(s, levels, analysis, "final").axes[0])
    (line,) = found[gid]
    x = np.log10(np.asarray(line.get_xdata(), dtype=float))
    y = np.log10(np.asarray(line.get_ydata(), dtype=float))
    t_at_1ka = 10 ** np.interp(3.0, x, y) if x[0] < x[-1] else 10 ** np.interp(3.0, x[::-1],
                                                                               y[::-1])
    # IEC 60364-4-43, 434.5.2 and Table 43A: copper PVC k = 115, t = (k S / I)^2 at 1 kA
    assert t_at_1ka == pytest.approx((115.0 * csa_mm2 / 1000.0) ** 2, rel=1e-9)
    # IEC 60364-4-43, 434.5.2: the adiabatic equation holds up to 5 s
    assert max(line.get_ydata()) <= 5.0 * (1 + 1e-12)


def test_unknown_circuit_is_refused(workshop):
    s, levels, analysis = workshop
    with pytest.raises(InputError, match="attic"):
        plot_circuit(s, levels, analysis, "attic")


MAGIC = {".png": b"\x89PNG", ".pdf": b"%PDF", ".svg": b"<?xml"}


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_save_figure_by_suffix(workshop, tmp_path, suffix):
    s, levels, analysis = workshop
    fig = plot_circuit(s, levels, analysis, "final")
    target = tmp_path / f"plot{suffix}"
    save_figure(fig, target)
    # the file format's own signature (PNG, PDF and XML specifications)
    assert target.read_bytes().startswith(MAGIC[suffix])
    assert sorted(p.name for p in tmp_path.iterdir()) == [target.name]


def test_save_figure_leaves_existing_file_on_failure(workshop, tmp_path, monkeypatch):
    s, levels, analysis = workshop
    fig = plot_circuit(s, levels, analysis, "final")
    target = tmp_path / "plot.png"
    target.write_bytes(b"an earlier plot")

    def broken(*args, **kwargs):
        raise RuntimeError("disk full")

    monkeypatch.setattr(fig, "savefig", broken)
    with pytest.raises(RuntimeError):
        save_figure(fig, target)
    assert target.read_bytes() == b"an earlier plot"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plot.png"]


def test_save_figure_refuses_unknown_format(workshop, tmp_path):
    s, levels, analysis = workshop
    fig = plot_circuit(s, levels, analysis, "final")
    with pytest.raises(InputError, match="png"):
        save_figure(fig, tmp_path / "plot.bmp")
    assert not list(tmp_path.iterdir())


def test_cli_plot_writes_the_file_and_refuses_the_study_as_output(cli, tmp_path):
    path = tmp_path / "workshop.toml"
    path.write_text(STUDY, encoding="utf-8")
    out = tmp_path / "final.svg"
    result = cli("plot", str(path), "--circuit", "final", "-o", str(out))
    assert result.exit_code == 0, result.output
    assert out.read_bytes().startswith(b"<?xml")
    before = path.read_bytes()
    result = cli("plot", str(path), "--circuit", "final", "-o", str(path))
    assert result.exit_code == 2
    assert path.read_bytes() == before


def test_the_caution_is_on_the_figure(workshop):
    from coordination import CAUTION

    s, levels, analysis = workshop
    fig = plot_circuit(s, levels, analysis, "final")
    # project rule: every verdict printout carries the caution
    assert any(t.get_text() == CAUTION for t in fig.texts)


# -- conductors in parallel: the withstand lines use the sizes the checks use at the board ------
TAILS = """
[study]
title = "Invented plant room tails"
[supply]
u0_v = 230
phases = 3
pfc_a = 30000
ze_ohm = 0.05
[[circuit]]
id = "tails"
from = "supply"
device = "gG630"
load_a = 500
[circuit.cable]
length_m = 8
{cable}
"""


# IEC 60364-4-43 Table 43A and IEC 60364-5-54 Table A.54.3: k = 143 copper XLPE, 115 copper PVC
# up to 300 mm2 and 103 above, 76 aluminium PVC; S is one conductor of several in parallel, which
# alone carries a fault just past the board (IEC 60364-4-43 434, from memory), as the checks take
@pytest.mark.parametrize(("cable", "line_s", "line_k", "cpc_s", "cpc_k"), [
    ('csa_mm2 = 240\ncpc_mm2 = 240\nparallel = 3\ninsulation = "xlpe"', 240.0, 143.0,
     240.0, 143.0),
    ('csa_mm2 = 400\ncpc_mm2 = 185\nparallel = 2\ncpc_parallel = 1', 400.0, 103.0, 185.0, 115.0),
    ('csa_mm2 = 95\ncpc_mm2 = 50\nmaterial = "aluminium"\ncpc_material = "copper"', 95.0, 76.0,
     50.0, 115.0),
])
def test_withstand_lines_take_one_conductor_of_several_in_parallel(cable, line_s, line_k, cpc_s,
                                                                   cpc_k):
    s = study.loads(TAILS.format(cable=cable))
    levels = faults.compute(s)
    found = artists(plot_circuit(s, levels, engine.analyse(s, levels), "tails").axes[0])
    for gid, size, k in (("withstand:line", line_s, line_k), ("withstand:cpc", cpc_s, cpc_k)):
        (line,) = found[gid]
        x = np.asarray(line.get_xdata(), dtype=float)
        y = np.asarray(line.get_ydata(), dtype=float)
        current = math.sqrt(x[0] * x[-1])  # the middle of the line, log scale
        t = 10 ** np.interp(math.log10(current), np.log10(x), np.log10(y))
        # IEC 60364-4-43, 434.5.2: t = k^2 S^2 / I^2
        assert t == pytest.approx((k * size / current) ** 2, rel=1e-9), gid
        assert f"{size:g} mm\u00b2" in line.get_label()


# -- labels ----------------------------------------------------------------------------------
def text_box(text, renderer):
    """The box of a label's text alone (an annotation's own extent includes its arrow)."""
    from matplotlib.text import Text

    return Text.get_window_extent(text, renderer)


def drawn(fig):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    return canvas.get_renderer()


def test_each_band_is_labelled_with_its_circuit_id_only(workshop):
    s, levels, analysis = workshop
    found = artists(plot_circuit(s, levels, analysis, "final").axes[0])
    # our design: the device and its settings are in the key; the plot names the circuit
    for cid in ("final", "sub", "main"):
        (tag,) = found[f"tag:{cid}"]
        assert tag.get_text() == cid


@pytest.mark.parametrize(("example", "circuit", "basis"), [
    ("office-building.toml", "1t-kettles", None),
    ("office-building.toml", "1t-kettles", "envelope"),
    ("office-building.toml", "p-chiller", None),
    ("small-shop.toml", "bakery-oven", "envelope"),
])
def test_labels_and_is_marks_do_not_collide(example, circuit, basis):
    from shapely.geometry import LineString, box

    s = study.load(EXAMPLES / example)
    levels = faults.compute(s)
    fig = plot_circuit(s, levels, engine.analyse(s, levels, basis=basis), circuit)
    renderer = drawn(fig)
    ax = fig.axes[0]
    found = artists(ax)
    boxes = {}
    for gid, items in found.items():
        if gid.startswith(("tag:", "limit:")):
            b = text_box(items[0], renderer)
            boxes[gid] = box(b.x0, b.y0, b.x1, b.y1)
    assert any(g.startswith("limit:") for g in boxes) and any(g.startswith("tag:") for g in boxes)
    frame = ax.get_window_extent(renderer)
    for gid, b in boxes.items():
        # every label inside the axes, and no two labels on each other
        assert frame.x0 <= b.bounds[0] and b.bounds[2] <= frame.x1, gid
        assert frame.y0 <= b.bounds[1] and b.bounds[3] <= frame.y1, gid
        for other, c in boxes.items():
            if other < gid:
                assert not b.intersects(c), (gid, other)
    # the Is marks are clear of the withstand lines
    for key in ("withstand:line", "withstand:cpc"):
        (line,) = found[key]
        path = LineString(ax.transData.transform(np.column_stack(
            [line.get_xdata(), line.get_ydata()])))
        for gid, b in boxes.items():
            if gid.startswith("limit:"):
                assert not b.intersects(path), (gid, key)


# -- greyscale -------------------------------------------------------------------------------
def lightness(colour):
    """CIE 1976 L* of an sRGB colour (IEC 61966-2-1 transfer, D65 luminance weights)."""
    from matplotlib.colors import to_rgb

    linear = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in to_rgb(colour)]
    y = 0.2126 * linear[0] + 0.7152 * linear[1] + 0.0722 * linear[2]
    return 116 * y ** (1 / 3) - 16 if y > (6 / 29) ** 3 else y * (29 / 3) ** 3


def test_palette_differs_in_lightness():
    values = sorted(lightness(c) for c in PALETTE)
    # our design: greyscale prints tell bands apart when their CIE L* differ by 6 or more, and
    # an edge drawn at L* above 70 is hard to see on white paper (CIE 1976 L*)
    assert min(b - a for a, b in itertools.pairwise(values)) >= 6.0
    assert values[-1] <= 70.0


def test_key_shows_each_band_with_its_edge_pattern(workshop):
    from matplotlib.colors import to_rgb

    s, levels, analysis = workshop
    ax = plot_circuit(s, levels, analysis, "final").axes[0]
    found = artists(ax)
    legend = ax.get_legend()
    entries = dict(zip([t.get_text() for t in legend.get_texts()], legend.legend_handles,
                       strict=True))
    styles = []
    for cid in ("final", "sub", "main"):
        (fill,) = found[f"band:{cid}"]
        handle = entries[fill.get_label()]
        edge = found[f"edge:{cid}"][0]
        # common practice: a key entry looks like what it stands for, fill and edge
        assert handle.get_facecolor()[3] > 0 and handle.get_linewidth() > 0
        np.testing.assert_allclose(handle.get_edgecolor()[:3], to_rgb(edge.get_color()),
                                   atol=1e-9)
        styles.append(str(handle.get_linestyle()))
    assert len(set(styles)) == 3


# -- small crossover zones -------------------------------------------------------------------
def test_a_crossover_zone_too_small_to_see_is_marked():
    s = study.load(EXAMPLES / "small-shop.toml")
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    result = pair(analysis, "main-fuse", "sockets-sales")
    zone = engine.overlap(s, levels, result)
    fig = plot_circuit(s, levels, analysis, "sockets-sales")
    ax = fig.axes[0]
    drawn(fig)
    x0, y0, x1, y1 = zone.bounds
    corners = ax.transData.transform([[10 ** x0, 10 ** y0], [10 ** x1, 10 ** y1]])
    width_pt = (corners[1] - corners[0]) * 72.0 / fig.dpi
    assert min(width_pt) < MIN_ZONE_PT  # the case: a zone a few pixels across
    marks = artists(ax)["zone-mark:main-fuse>sockets-sales"]
    for mark in marks:
        extent = mark.get_window_extent()
        # our design: the mark is wide enough to see and covers the zone's currents
        assert extent.width * 72.0 / fig.dpi >= ZONE_MARK_PT
        assert extent.x0 <= corners[0][0] and extent.x1 >= corners[1][0]
    # one of them reaches down to the current axis
    assert min(m.get_window_extent().y0 for m in marks) <= ax.get_window_extent().y0 + 1


def test_a_large_crossover_zone_has_no_extra_mark(workshop):
    s, levels, analysis = workshop
    found = artists(plot_circuit(s, levels, analysis, "final").axes[0])
    assert "zone:sub>final" in found
    assert "zone-mark:sub>final" not in found


def test_a_fault_level_below_every_pickup_still_spans_a_decade():
    # common practice: log axes need a span; a supply too weak to reach the pickup is drawn anyway
    import warnings

    s = study.loads('[supply]\npfc_a = 50\nze_ohm = 5.0\n[[circuit]]\nid = "main"\n'
                    'from = "supply"\ndevice = "gG400"\n')
    levels = faults.compute(s)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # matplotlib warns of a singular range
        ax = plot_circuit(s, levels, engine.analyse(s, levels), "main").axes[0]
    lo, hi = ax.get_xlim()
    assert hi >= 10.0 * lo
