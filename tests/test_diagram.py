"""Structure of the installation diagram: the plan of sheets, the marks, the drawn artists.

The installations are the invented examples and small invented trees; tests find artists by
their gids and texts, never by colour or pixels.
"""

from __future__ import annotations

import itertools
from collections import Counter
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from coordination import checks, diagram, engine, faults, study
from coordination.boards import board_names
from coordination.devices import compact_labels
from coordination.model import Circuit, Study, Supply
from curves.errors import InputError

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def _assess(s: Study):
    levels = faults.compute(s)
    return levels, engine.analyse(s, levels), checks.run(s, levels)


@pytest.fixture(scope="module", params=sorted(p.name for p in EXAMPLES.glob("*.toml")))
def example(request):
    s = study.load(EXAMPLES / request.param)
    return (s, *_assess(s))


def _by_gid(fig) -> dict[str, list]:
    found: dict[str, list] = {}
    for artist in fig.findobj():
        gid = artist.get_gid()
        if gid:
            found.setdefault(gid, []).append(artist)
    return found


def _sheets(s, levels, analysis, results, **kwargs):
    return list(diagram.figures(s, levels, analysis, results, **kwargs))


# -- the plan ----------------------------------------------------------------------------------
def test_small_shop_is_one_sheet_with_every_circuit():
    s = study.load(EXAMPLES / "small-shop.toml")
    sheets = diagram.plan(s)
    assert [sheet.view for sheet in sheets] == ["installation"]
    assert Counter(d.key for d in sheets[0].drops) == Counter(c.id for c in s.circuits)


def test_office_is_boards_then_one_sheet_per_board():
    s = study.load(EXAMPLES / "office-building.toml")
    sheets = diagram.plan(s)
    assert sheets[0].view == "boards"
    boards = [sheet.board for sheet in sheets[1:]]
    assert boards == ["origin", *board_names(s).values()]
    # every circuit hangs from its own board on exactly one board sheet
    hanging = Counter(d.key for sheet in sheets[1:] for d in sheet.drops if d.level == 1)
    assert hanging == Counter(c.id for c in s.circuits)
    # the boards sheet: every feeder once, every final circuit in exactly one group
    top = sheets[0]
    feeders = {d.key for d in top.drops if d.kind == "circuit"}
    assert feeders == set(board_names(s))
    members = Counter(m for d in top.drops if d.kind == "group" for m in d.members)
    assert members == Counter(c.id for c in s.circuits if not s.children.get(c.id))


def test_a_long_board_takes_several_sheets():
    s = study.load(EXAMPLES / "small-shop.toml")
    sheets = diagram.plan(s, max_columns=5)
    board = [sheet for sheet in sheets if sheet.board == "shop board"]
    assert [sheet.part for sheet in board] == [(1, 3), (2, 3), (3, 3)]
    assert sum(1 for sheet in board for d in sheet.drops if d.level == 1) == 14
    assert all(sheet.columns >= 5 or sheet.part[0] == 3 for sheet in board)


def test_board_accepts_the_printed_name_or_the_feeder_id():
    s = study.load(EXAMPLES / "office-building.toml")
    by_name = diagram.plan(s, board="DB-G")
    by_id = diagram.plan(s, board="sm-ground")
    assert by_name == by_id and by_name[0].board == "DB-G"
    assert diagram.plan(s, board="origin")[0].board == "origin"
    with pytest.raises(InputError, match=r"--board.*no circuit or board 'DB-9'.*DB-G"):
        diagram.plan(s, board="DB-9")
    with pytest.raises(InputError, match=r"g-light-lobby.*feeds no board"):
        diagram.plan(s, board="g-light-lobby")


@st.composite
def trees(draw) -> Study:
    """An invented tree of up to 25 circuits, each fed by the supply or an earlier circuit."""
    n = draw(st.integers(1, 25))
    circuits = []
    for i in range(n):
        parent = draw(st.sampled_from(["supply", *(c.id for c in circuits)]))
        circuits.append(Circuit(f"c{i}", parent, "B6", phases=1))
    return Study("invented", Supply(pfc_a=6000.0, phases=1), tuple(circuits))


@settings(max_examples=60, deadline=None)
@given(trees(), st.integers(2, 30))
def test_every_sheet_keeps_drops_apart_and_under_their_busbar(s, max_columns):
    for sheet in diagram.plan(s, max_columns=max_columns):
        at_level = Counter((d.level, d.x) for d in sheet.drops)
        assert max(at_level.values()) == 1  # no two drops on one spot
        bars = {b.level: [] for b in sheet.busbars}
        for b in sheet.busbars:
            bars[b.level].append(b)
        for d in sheet.drops:  # each drop hangs from a busbar of its level
            assert any(b.x0 - 1e-9 <= d.x <= b.x1 + 1e-9 for b in bars[d.level])
        for row in bars.values():  # boards of one level never overlap
            row.sort(key=lambda b: b.x0)
            for left, right in itertools.pairwise(row):
                assert left.x1 < right.x0
        assert all(0 <= d.x < sheet.columns for d in sheet.drops)
        if sheet.view == "installation":
            assert Counter(d.key for d in sheet.drops) == Counter(c.id for c in s.circuits)


# -- marks -------------------------------------------------------------------------------------
def test_problems_name_unmet_pairs_and_failed_checks(example):
    _, _, analysis, results = example
    found = diagram.problems(analysis, results)
    unmet = {p.downstream for p in analysis.all_pairs if not p.ok}
    failed = {r.circuit for r in results if not r.ok}
    assert set(found.by_circuit) == unmet | failed
    for r in results:
        if not r.ok:
            assert any(text.startswith(f"{r.check} fails") for text in found.by_circuit[r.circuit])


def test_failing_circuits_are_marked_by_shape_and_word_not_colour_alone(example):
    s, levels, analysis, results = example
    found = diagram.problems(analysis, results)
    for sheet, fig in zip(diagram.plan(s), _sheets(s, levels, analysis, results), strict=True):
        gids = _by_gid(fig)
        notes = [t.get_text() for key, arts in gids.items() if key.startswith("note:")
                 for t in arts]
        for d in sheet.drops:
            key = d.key if d.kind == "circuit" else f"group:{d.key}"
            failing = (bool(found.of(d.members)) if d.kind == "group"
                       else d.key in found.by_circuit)
            assert (f"mark:{key}" in gids) == failing
            box = gids[f"device:{d.key}" if d.kind == "circuit" else key][0]
            dashed = box.get_linestyle() not in ("-", "solid")
            assert dashed == failing  # the shape differs, not only the colour
            if failing:
                mark = gids[f"mark:{key}"][0].get_text()
                assert mark.startswith("FAIL ")
                number = mark.split()[1]
                assert any(n.startswith(f"FAIL {number}  ") for n in notes)
        if not any(_failing(d, found) for d in sheet.drops):
            assert not notes


def _failing(drop, found) -> bool:
    return bool(found.of(drop.members)) if drop.kind == "group" else drop.key in found.by_circuit


def test_a_note_says_what_fails():
    s = study.load(EXAMPLES / "small-shop.toml")
    levels, analysis, results = _assess(s)
    fig = _sheets(s, levels, analysis, results)[0]
    gids = _by_gid(fig)
    oven = next(p for p in analysis.for_circuit("bakery-oven") if not p.ok)
    note = gids["note:bakery-oven"][0].get_text()
    # Is to three significant figures, the upstream named
    assert f"selective with {oven.upstream} only to " in note
    assert diagram._amperes(oven.limit_a) in note


# -- what is drawn -----------------------------------------------------------------------------
def test_each_board_shows_its_name_and_largest_fault(example):
    s, levels, analysis, results = example
    for sheet, fig in zip(diagram.plan(s), _sheets(s, levels, analysis, results), strict=True):
        gids = _by_gid(fig)
        for bar in sheet.busbars:
            if bar.stub:
                assert f"incoming:{bar.name}" in gids
                continue
            assert gids[f"board:{bar.name}"][0].get_text() == bar.name
            if bar.feeder is None:
                ik3, ik1 = levels.origin_ik3_a, levels.origin_ik1_a
            else:
                node = levels.by_circuit[bar.feeder]
                ik3, ik1 = node.ik3_max_end_a, node.ik1_max_end_a
            text = gids[f"fault-level:{bar.name}"][0].get_text()
            # three-phase where there is a three-phase value, else line-neutral
            expected = f"Ik3 {diagram._amperes(ik3)}" if ik3 else f"Ik1 {diagram._amperes(ik1)}"
            assert text == expected


def test_each_circuit_shows_its_id_device_and_cable(example):
    s, levels, analysis, results = example
    device = compact_labels(s)
    for sheet, fig in zip(diagram.plan(s), _sheets(s, levels, analysis, results), strict=True):
        gids = _by_gid(fig)
        for d in sheet.drops:
            if d.kind != "circuit":
                continue
            lines = gids[f"label:{d.key}"][0].get_text().splitlines()
            assert lines[:3] == [d.key, device[d.key],
                                 diagram.cable_text(s.by_id[d.key].cable)]


def test_title_block_caution_and_sheet_numbers(example):
    s, levels, analysis, results = example
    block = [("client", "Invented Holdings"), ("revision", "B")]
    figs = _sheets(s, levels, analysis, results, title_block=block)
    for n, fig in enumerate(figs, start=1):
        gids = _by_gid(fig)
        assert gids["title-block:study"][0].get_text() == s.title
        assert gids["title-block:client"][0].get_text() == "client: Invented Holdings"
        assert gids["title-block:sheet"][0].get_text() == f"sheet: {n} of {len(figs)}"
        caution = " ".join(gids["caution"][0].get_text().split())
        assert "verify every result against the manufacturers' data" in caution


def test_no_two_texts_overlap(example):
    """Every label, board name, note and the title block stand clear of each other."""
    s, levels, analysis, results = example
    for fig in _sheets(s, levels, analysis, results, title_block=[("client", "X")]):
        from matplotlib.backends.backend_agg import FigureCanvasAgg

        canvas = FigureCanvasAgg(fig)
        canvas.draw()
        renderer = canvas.get_renderer()
        boxes = [(t.get_gid(), t.get_window_extent(renderer)) for t in fig.findobj()
                 if t.get_gid() and hasattr(t, "get_text") and t.get_text()]
        for (a, box_a), (b, box_b) in itertools.combinations(boxes, 2):
            assert not box_a.overlaps(box_b), (a, b)


def test_dollar_signs_are_drawn_as_written():
    s = study.loads('''
[study]
title = "Cost $5 and $6 (invented)"
[supply]
pfc_a = 6000
phases = 1
[[circuit]]
id = "a$b"
from = "supply"
device = "B6"
phases = 1
''')
    fig = _sheets(s, *_assess(s))[0]
    assert _by_gid(fig)["label:a$b"][0].get_text().startswith("a$b")


# -- files -------------------------------------------------------------------------------------
@pytest.mark.parametrize("suffix", ["png", "svg"])
def test_an_image_holds_the_first_view(tmp_path, suffix):
    s = study.load(EXAMPLES / "office-building.toml")
    target = tmp_path / f"office.{suffix}"
    assert diagram.write_diagram(s, *_assess(s), target) == 1
    assert target.stat().st_size > 0


def test_a_pdf_holds_every_sheet(tmp_path):
    pypdf = pytest.importorskip("pypdf")
    s = study.load(EXAMPLES / "office-building.toml")
    target = tmp_path / "office.pdf"
    count = diagram.write_diagram(s, *_assess(s), target, title_block=[("client", "Inv")])
    reader = pypdf.PdfReader(target)
    assert count == len(reader.pages) == len(diagram.plan(s))
    first = reader.pages[0].extract_text()
    assert "the boards" in first and "DB-1T" in first and "FAIL 1" in first


def test_bad_format_or_board_writes_nothing(tmp_path):
    s = study.load(EXAMPLES / "small-shop.toml")
    with pytest.raises(InputError, match="unknown diagram format 'jpg'"):
        diagram.write_diagram(s, *_assess(s), tmp_path / "x.jpg")
    with pytest.raises(InputError, match="no circuit or board"):
        diagram.write_diagram(s, *_assess(s), tmp_path / "x.png", board="nowhere")
    assert list(tmp_path.iterdir()) == []
