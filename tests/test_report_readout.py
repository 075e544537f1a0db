"""The report as a designer files it: the title block, the installation diagram's pages, tables
whose numbers never wrap and whose failing cells alone are red.

Pages are checked through their text layer (pypdf) and their artists (texts, gids), never
pixels. The installations are the invented examples.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from pypdf import PdfReader

from coordination import diagram, study
from coordination.pipeline import assess
from coordination.report import build_pages, write_report
from coordination.report.content import _check_failures, _check_matrix, _pair_table
from coordination.report.layout import FAIL_INK, _column_chars, _row_lines

UNITS = {"A", "kA", "s", "ms", "mm2", "\u03a9", "ohm", "%", "left", "over"}
EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
OFFICE = EXAMPLES / "office-building.toml"


@pytest.fixture(scope="module")
def office():
    s = study.load(OFFICE)
    return s, assess(s)


@pytest.fixture(scope="module")
def office_pdf(office, tmp_path_factory):
    s, result = office
    path = tmp_path_factory.mktemp("report") / "office.pdf"
    write_report(s, path, assessment=result)
    return PdfReader(path)


def _squeeze(text: str) -> str:
    return " ".join(text.split())


def test_the_title_block_is_on_the_cover_and_every_footer(office, office_pdf):
    s, _ = office
    assert s.title_block  # the office example gives every key
    pages = [_squeeze(p.extract_text()) for p in office_pdf.pages]
    for key, value in s.title_block:
        assert f"{key}: {value}" in pages[0]
    client = dict(s.title_block)["client"]
    for n, text in enumerate(pages, start=1):
        assert f"client: {client}" in text, n
        assert f"{n} of {len(pages)}" in text, n


def test_the_diagram_follows_the_cover(office, office_pdf):
    s, _ = office
    sheets = diagram.plan(s)
    texts = [_squeeze(p.extract_text()) for p in office_pdf.pages]
    for k, sheet in enumerate(sheets, start=1):
        assert f"installation diagram, {sheet.title}" in texts[k]
    # a marked circuit of the boards' sheet has its note, in the text layer too
    assert "FAIL 1 1-tenant-board: selective with sm-first only to 2.3 kA" in texts[1]
    assert "installation diagram" not in texts[len(sheets) + 1]


def _texts(fig):
    from matplotlib.text import Text

    return [t for t in fig.findobj(Text) if t.get_text()]


def test_only_failing_cells_are_red(office):
    s, result = office
    pages = build_pages(s, result)
    red_cells, red_other = [], []
    for number, build in enumerate(pages, start=1):
        fig = build(number, len(pages))
        texts = _texts(fig)
        pair_page = any(t.get_text().startswith("Selectivity of every pair") for t in texts)
        for t in texts:
            if t.get_color() != FAIL_INK or t.get_text() == "Caution":
                continue
            failing_cell = (t.get_gid() or "").startswith("failing-cell:")
            if not failing_cell:
                red_other.append(t.get_text())
            elif pair_page:
                red_cells.append(t.get_text())
    assert not red_other  # no whole row, no table line in the failure ink
    unmet = sum(1 for p in result.analysis.pairs if not p.ok)
    # each unmet pair: its Is and its NO, nothing else of the row
    assert sorted(red_cells).count("NO") == unmet
    assert len(red_cells) == 2 * unmet


def test_failing_cells_of_the_tables():
    s = study.load(EXAMPLES / "small-shop.toml")
    result = assess(s)
    pairs = _pair_table(s, result.analysis)
    for row, cells, p in zip(pairs.rows, pairs.failing, result.analysis.pairs, strict=True):
        assert cells == (() if p.ok else (4, 9))
        assert row[9] == ("yes" if p.ok else "NO")
    matrix = _check_matrix(s, result.checks)
    assert all(not cells for cells in matrix.failing) == all(r.ok for r in result.checks)


def test_a_failing_check_colours_its_own_cell_only():
    from coordination.checks import CheckResult

    bad = CheckResult("oven", "breaking-capacity", False, 7000.0, 6000.0, "A", "too small",
                      "envelope")
    good = CheckResult("oven", "overload", True, 40.0, 50.0, "A", "fine", "envelope",
                       {"binding": "I2 <= 1.45 Iz"})
    s = study.loads('[supply]\npfc_a = 6000\n[[circuit]]\nid = "oven"\nfrom = "supply"\n'
                    'device = "C32"\n')
    matrix = _check_matrix(s, [good, bad])
    assert matrix.failing == ((4,),)
    assert matrix.rows[0][2].startswith("ok I2")
    assert matrix.rows[0][4].startswith("FAIL")
    failures = _check_failures([good, bad])
    assert failures.rows[0][:3] == ("oven", "breaking-capacity", "FAIL")
    assert failures.failing == ((2, 3),)


@pytest.mark.parametrize("table", ["pairs", "checks", "failures"])
def test_numbers_never_wrap(office, table):
    s, result = office
    spec = {"pairs": lambda: _pair_table(s, result.analysis),
            "checks": lambda: _check_matrix(s, result.checks),
            "failures": lambda: _check_failures(result.checks)}[table]()
    chars = _column_chars(spec)
    for row in spec.rows:
        cells = _row_lines(spec, row, chars)
        for j in spec.whole:  # a number's column: one line, whole
            assert cells[j] == [str(row[j])]
        for j, lines in enumerate(cells):  # a number keeps its unit: "6.05 kA" on one line
            if j in spec.whole or len(lines) < 2:
                continue
            for line in lines:
                words = line.split()
                assert words[0] not in UNITS, (row, line)
                assert not re.fullmatch(r"[-\d.]+", words[-1]), (row, line)


# common practice: a page's content never runs into its footer (the footer rule at 0.045 of the
# page height, the caution line and the title block under it)
@pytest.mark.parametrize("example", sorted(p.name for p in EXAMPLES.glob("*.toml")))
def test_the_cover_stays_above_the_footer(example):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    s = study.load(EXAMPLES / example)
    cover = build_pages(s, assess(s))[0](1, 2)
    canvas = FigureCanvasAgg(cover)
    canvas.draw()  # places the caution's box
    renderer = canvas.get_renderer()
    footer_top = 0.05 * cover.bbox.height  # in display units, from the bottom
    for text in cover.texts:
        box = text.get_window_extent(renderer)
        if text.get_position()[1] > 0.045:  # the footer's own texts sit below its rule
            assert box.y0 > footer_top, (example, text.get_text()[:40])
        patch = text.get_bbox_patch()
        if patch is not None:
            assert patch.get_window_extent(renderer).y0 > footer_top, (example, "caution box")
