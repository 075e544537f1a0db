"""The selectivity report: its text layer, its CSV tables, atomic writing, the demo.

The installations are invented (the bundled examples and a small study below).
"""

from __future__ import annotations

import csv
import os
import re
from pathlib import Path

import pytest
from pypdf import PdfReader

from coordination import CAUTION, checks, engine, faults, study
from coordination.report import (
    DEMO_REPORT_NAME,
    STANDARDS,
    not_drawn,
    plot_plan,
    run_demo,
    write_report,
)
from curves.errors import InputError

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
SHOP = EXAMPLES / "small-shop.toml"



def squeeze(text: str) -> str:
    """Whitespace collapsed, so that text wrapped on the page still matches."""
    return " ".join(text.split())


def pdf_text(path: Path) -> str:
    return squeeze("\n".join(page.extract_text() or "" for page in PdfReader(path).pages))


@pytest.fixture(scope="module")
def shop_report(tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    s = study.load(SHOP)
    target = folder / "shop.pdf"
    summary = write_report(s, target, csv=True)
    return s, target, summary


def test_page_count_is_reported(shop_report):
    _, target, summary = shop_report
    assert len(PdfReader(target).pages) == summary.pages
    assert summary.path == target


def test_text_layer_names_every_circuit(shop_report):
    s, target, _ = shop_report
    text = pdf_text(target)
    missing = [c.id for c in s.circuits if c.id not in text]
    assert not missing


def test_text_layer_states_fault_levels_in_ka(shop_report):
    s, target, _ = shop_report
    text = pdf_text(target)
    levels = faults.compute(s)
    assert "Ik3 max kA" in text
    # every board's maximum fault appears, in kA to three significant figures
    for c in s.circuits:
        value = f"{levels.by_circuit[c.id].ik_max_a / 1000:.3g}"
        assert re.search(rf"(?<![\d.]){re.escape(value)}(?![\d])", text), (c.id, value)


def test_text_layer_carries_the_caution_and_the_standards(shop_report):
    _, target, _ = shop_report
    text = pdf_text(target)
    # project rule: the report carries the caution
    assert squeeze(CAUTION) in text
    for code, _what in STANDARDS:
        assert squeeze(code) in text
    # the caution is on every page (footer)
    for page in PdfReader(target).pages:
        assert squeeze(CAUTION) in squeeze(page.extract_text())


def test_text_layer_names_each_basis_and_verdict(shop_report):
    s, target, _ = shop_report
    text = pdf_text(target)
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    assert "typical" in text and "envelope" in text
    for verdict in {p.verdict for p in analysis.pairs}:
        assert verdict in text


def test_csv_tables_on_request(shop_report):
    s, target, summary = shop_report
    names = sorted(p.name for p in summary.extra_files)
    assert names == ["shop-checks.csv", "shop-faults.csv", "shop-pairs.csv"]
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    with (target.parent / "shop-pairs.csv").open(newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    assert len(rows) == len(analysis.pairs)
    # the contract's keys, with units in their names
    for key in ("upstream", "downstream", "verdict", "limit_a", "window_lo_a", "window_hi_a"):
        assert key in rows[0]
    with (target.parent / "shop-checks.csv").open(newline="", encoding="utf-8") as handle:
        checks_rows = list(csv.DictReader(handle))
    assert len(checks_rows) == len(checks.run(s, levels))
    with (target.parent / "shop-faults.csv").open(newline="", encoding="utf-8") as handle:
        fault_rows = list(csv.DictReader(handle))
    assert {r["circuit"] for r in fault_rows} == {c.id for c in s.circuits}
    assert "ik_max_a" in fault_rows[0]


def test_no_csv_unless_asked_and_a_progress_bar(tmp_path, capsys):
    s = study.load(SHOP)
    summary = write_report(s, tmp_path / "plain.pdf", progress=True)
    assert summary.extra_files == ()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plain.pdf"]
    err = capsys.readouterr().err
    assert f"page {summary.pages}/{summary.pages}" in err
    # common practice: a new file gets the ordinary permissions (umask applied), not the
    # private mode of a temporary file
    umask = os.umask(0)
    os.umask(umask)
    assert (tmp_path / "plain.pdf").stat().st_mode & 0o777 == 0o666 & ~umask


def test_plots_cover_every_board_and_every_non_selective_pair():
    s = study.load(EXAMPLES / "office-building.toml")
    analysis = engine.analyse(s, faults.compute(s))
    plan = plot_plan(s, analysis)
    drawn = [e.circuit for e in plan]
    covered = set(drawn) | {c for e in plan for c in e.also}
    boards = [c.id for c in s.circuits if s.children.get(c.id)]
    assert len([e for e in plan if e.kind == "board"]) == len(boards)
    for p in analysis.pairs:
        if p.verdict != "total":
            assert p.downstream in covered, p
    assert len(set(drawn)) == len(drawn)  # no circuit drawn twice
    by_downstream = {}
    for p in analysis.pairs:
        by_downstream.setdefault(p.downstream, []).append(
            (p.upstream, p.verdict, p.limit_a, tuple(p.window_a)))
    for e in plan:
        for other in e.also:
            # a shared plot stands only for circuits on the same board with the same device and
            # the same results
            assert s.by_id[other].parent == s.by_id[e.circuit].parent
            assert s.by_id[other].device == s.by_id[e.circuit].device
            assert by_downstream[other] == by_downstream[e.circuit]


@pytest.fixture(scope="module")
def office_report(tmp_path_factory):
    s = study.load(EXAMPLES / "office-building.toml")
    target = tmp_path_factory.mktemp("office") / "office.pdf"
    write_report(s, target)
    return s, target


def test_the_pdf_carries_every_planned_plot_page(office_report):
    s, target = office_report
    plan = plot_plan(s, engine.analyse(s, faults.compute(s)))
    assert {e.kind for e in plan} == {"board", "pair"}
    pages = [squeeze(page.extract_text() or "") for page in PdfReader(target).pages]
    headings = [squeeze(e.heading) for e in plan]
    for heading in headings:
        assert any(heading in page for page in pages), heading
    # one page per planned plot, in the plan's order
    found = [next(k for k, page in enumerate(pages) if h in page) for h in headings]
    assert found == sorted(found) and len(set(found)) == len(found)


def test_fault_table_keeps_board_names_whole(office_report):
    s, target = office_report
    pages = [squeeze(page.extract_text() or "") for page in PdfReader(target).pages]
    table = " ".join(p for p in pages if "Fault levels" in p and "Ik3 max kA" in p)
    # every board name reads whole in the table (wrapped, if at all, between words)
    for name in {s.board_name(c.id) for c in s.circuits}:
        for word in name.split():
            assert re.search(rf"(?<!\S){re.escape(word)}(?!\S)", table), (name, word)


def test_pair_plots_are_capped_and_the_rest_named():
    s = study.load(EXAMPLES / "office-building.toml")
    analysis = engine.analyse(s, faults.compute(s))
    plan = plot_plan(s, analysis, max_pair_plots=2)
    assert len([e for e in plan if e.kind == "pair"]) == 2
    left_out = not_drawn(analysis, plan)
    assert left_out
    covered = {e.circuit for e in plan} | {c for e in plan for c in e.also} | set(left_out)
    assert covered >= {p.downstream for p in analysis.pairs if p.verdict != "total"}


def test_failure_while_writing_leaves_the_earlier_report(tmp_path, monkeypatch):
    import coordination.plot

    s = study.load(SHOP)
    target = tmp_path / "report.pdf"
    target.write_bytes(b"%PDF-1.4 an earlier report")

    def broken(*args, **kwargs):
        raise RuntimeError("plotting failed half-way")

    monkeypatch.setattr(coordination.plot, "plot_circuit", broken)
    with pytest.raises(RuntimeError):
        write_report(s, target, csv=True)
    assert target.read_bytes() == b"%PDF-1.4 an earlier report"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report.pdf"]


BAD = """
[study]
title = "Invented, broken"
[supply]
u0_v = 230
pfc_a = 6000
ze_ohm = 0.35
[[circuit]]
id = "lights"
from = "supply"
device = "B33"
"""


def test_bad_study_leaves_no_file(cli, tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text(BAD, encoding="utf-8")
    out = tmp_path / "bad.pdf"
    result = cli("report", str(path), "-o", str(out))
    assert result.exit_code == 2
    assert "lights" in result.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad.toml"]


def test_bad_study_leaves_an_existing_report_untouched(cli, tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text(BAD, encoding="utf-8")
    out = tmp_path / "report.pdf"
    earlier = b"%PDF-1.4 an earlier report\n" + bytes(range(256))
    out.write_bytes(earlier)
    result = cli("report", str(path), "-o", str(out), "--csv")
    assert result.exit_code == 2
    assert out.read_bytes() == earlier
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad.toml", "report.pdf"]


def test_output_equal_to_input_is_refused(cli, tmp_path):
    path = tmp_path / "shop.toml"
    path.write_bytes(SHOP.read_bytes())
    result = cli("report", str(path), "-o", str(path))
    assert result.exit_code == 2
    assert path.read_bytes() == SHOP.read_bytes()
    s = study.load(path)
    with pytest.raises(InputError):
        write_report(s, path)
    assert path.read_bytes() == SHOP.read_bytes()


def test_cli_report_with_csv(cli, tmp_path):
    out = tmp_path / "shop.pdf"
    result = cli("report", str(SHOP), "-o", str(out), "--csv")
    # the shop has non-selective pairs on purpose: exit 1 (a requirement not met)
    assert result.exit_code == 1, result.output
    assert out.read_bytes().startswith(b"%PDF")
    assert "shop-pairs.csv" in result.output


def test_demo_writes_its_report_and_touches_nothing_else(tmp_path, capsys):
    folder = tmp_path / "demo"
    folder.mkdir()
    keep = folder / "notes.txt"
    keep.write_text("the user's file", encoding="utf-8")
    assert run_demo(folder) == 0
    out = capsys.readouterr().out
    report = folder / DEMO_REPORT_NAME
    assert str(report.resolve()) in out
    assert squeeze(CAUTION) in squeeze(out)
    assert report.read_bytes().startswith(b"%PDF")
    assert keep.read_text(encoding="utf-8") == "the user's file"
    assert sorted(p.name for p in folder.iterdir()) == sorted([DEMO_REPORT_NAME, "notes.txt"])


def test_demo_refuses_a_file_as_folder(cli, tmp_path):
    target = tmp_path / "not-a-folder"
    target.write_text("x", encoding="utf-8")
    result = cli("demo", "-o", str(target))
    assert result.exit_code == 2
    assert target.read_text(encoding="utf-8") == "x"


def test_cable_text_names_a_separate_protective_conductor():
    # common practice: 3x240/240 is three cables each with its own cpc; a single cpc for a
    # parallel set is written apart, as the checks count it (conductor_sizes)
    from coordination.model import Cable
    from coordination.report import _cable_text

    assert _cable_text(Cable(length_m=5, csa_mm2=240, cpc_mm2=240, parallel=3)).startswith(
        "3x240/240 ")
    assert _cable_text(Cable(length_m=5, csa_mm2=240, cpc_mm2=120, parallel=3,
                             cpc_parallel=1)).startswith("3x240 + cpc 120 ")
    assert _cable_text(Cable(length_m=5, csa_mm2=240, cpc_mm2=120, parallel=3,
                             cpc_parallel=2)).startswith("3x240 + cpc 2x120 ")


def test_cover_names_the_devices_on_another_basis():
    # issue 7, the cover gives the basis of each device: the common one by count, others by name
    from coordination import study
    from coordination.report import _basis_summary

    s = study.loads('[supply]\npfc_a = 6000\n'
                    '[[circuit]]\nid = "main"\nfrom = "supply"\ndevice = "gG100"\n'
                    '[[circuit]]\nid = "a"\nfrom = "main"\ndevice = "B16"\nbasis = "envelope"\n'
                    '[[circuit]]\nid = "b"\nfrom = "main"\ndevice = "B16"\n')
    text = _basis_summary(s, None)
    assert "typical for 2 devices" in text
    assert "envelope for a " in text
    assert "typical for every device (3)" in _basis_summary(s, "typical")
