"""What a designer reads in the terminal and files: check's summary and --all, the diagram
command, the title block.

The installations are the invented examples.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from coordination import CAUTION, study
from coordination.text import TERMINAL_COLUMNS

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
OFFICE = EXAMPLES / "office-building.toml"
SHOP = EXAMPLES / "small-shop.toml"


def test_office_check_is_a_summary_under_150_lines(cli):
    result = cli("check", str(OFFICE))
    assert result.exit_code == 1  # the office has pairs below their required selectivity
    lines = result.stdout.splitlines()
    assert len(lines) < 150
    assert max(map(len, lines)) <= TERMINAL_COLUMNS
    assert " ".join(result.stdout.split()).endswith(" ".join(CAUTION.split()))
    data = json.loads(cli("check", str(OFFICE), "--json").stdout)
    # a circuit has a row marked NO exactly when one of its pairs is below its requirement
    unmet: dict[str, bool] = {}
    for p in data["pairs"]:
        unmet[p["downstream"]] = unmet.get(p["downstream"], False) or not p["ok"]
    for circuit, missing in unmet.items():
        rows = [line for line in lines if line.startswith(circuit + " ")]
        assert any("  NO  " in r for r in rows) == missing, circuit
    no_rows = sum(1 for line in lines if "  NO  " in line)
    assert no_rows == sum(1 for p in data["pairs"] if not p["ok"])
    assert f"coordination check {OFFICE} --all" in result.stdout


@pytest.mark.parametrize("path", [OFFICE, SHOP])
def test_check_all_prints_every_pair_and_check(cli, path):
    summary = cli("check", str(path)).stdout
    every = cli("check", str(path), "--all")
    assert every.exit_code in (0, 1)
    lines = every.stdout.splitlines()
    assert max(map(len, lines)) <= TERMINAL_COLUMNS
    assert len(lines) > len(summary.splitlines())
    data = json.loads(cli("check", str(path), "--json").stdout)
    start = next(i for i, line in enumerate(lines) if line.startswith("Protection checks"))
    results = sum(1 for line in lines[start:]
                  if any(f"  {word}  " in line for word in ("ok", "near limit", "FAIL")))
    assert results == len(data["checks"])
    for c in {c["circuit"] for c in data["checks"]}:
        assert any(line.startswith(c + " ") for line in lines)


def test_diagram_command_writes_each_format(cli, tmp_path):
    for suffix in ("png", "svg", "pdf"):
        out = tmp_path / f"office.{suffix}"
        result = cli("diagram", str(OFFICE), "-o", str(out))
        assert result.exit_code == 1, result.output  # the office misses requirements
        assert out.stat().st_size > 0
        assert f"wrote {out}" in result.stdout
        assert " ".join(CAUTION.split()) in " ".join(result.stdout.split())
    out = tmp_path / "db-g.png"
    result = cli("diagram", str(OFFICE), "-o", str(out), "--board", "DB-G")
    assert result.exit_code == 1 and out.exists()


def test_diagram_command_refuses_in_one_line_and_writes_nothing(cli, tmp_path):
    out = tmp_path / "x.png"
    result = cli("diagram", str(OFFICE), "-o", str(out), "--board", "DB-9")
    assert result.exit_code == 2
    assert "DB-9" in result.output and "Traceback" not in result.output
    result = cli("diagram", str(OFFICE), "-o", str(tmp_path / "x.jpg"))
    assert result.exit_code == 2 and "jpg" in result.output
    assert list(tmp_path.iterdir()) == []
    # an existing file is left as it was when the command is refused
    keep = tmp_path / "keep.png"
    keep.write_bytes(b"mine")
    assert cli("diagram", str(OFFICE), "-o", str(keep), "--board", "nowhere").exit_code == 2
    assert keep.read_bytes() == b"mine"


def test_the_title_block_keys_load_in_order():
    text = SHOP.read_text(encoding="utf-8").replace(
        '[study]\n', '[study]\ndate = 2026-11-30\nclient = "Invented Estates"\nrevision = "C"\n',
        1)
    s = study.loads(text)
    assert s.title_block == (("client", "Invented Estates"), ("revision", "C"),
                             ("date", "2026-11-30"))
    office = study.load(OFFICE)
    assert [key for key, _ in office.title_block] == [
        "client", "project", "reference", "revision", "designer", "checker", "date"]


@pytest.mark.parametrize(("line", "fragment"), [
    ('client = ""', "client must be a line of text"),
    ("checker = 7", "checker must be a line of text"),
    ('project = "' + "x" * 81 + '"', "at most 80 characters"),
    ('designer = "two\\nlines"', "on several lines"),
])
def test_a_bad_title_block_key_is_one_line_exit_2(cli, tmp_path, line, fragment):
    path = tmp_path / "study.toml"
    shutil.copy(SHOP, path)
    path.write_text(path.read_text(encoding="utf-8").replace("[study]\n", f"[study]\n{line}\n",
                                                             1), encoding="utf-8")
    result = cli("check", str(path))
    assert result.exit_code == 2
    assert fragment in result.output and "study." in result.output
    assert len(result.output.strip().splitlines()) == 1
