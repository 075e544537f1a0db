"""`coordination faults STUDY`: the readable table, the contract's JSON, file-level errors."""

from __future__ import annotations

import json
import math
from collections.abc import Callable
from pathlib import Path

import pytest
from typer.testing import Result

from coordination import faults, study

#: The ``cli`` fixture (tests/conftest.py): runs a command in this process.
Cli = Callable[..., Result]

STUDY = """[study]
title = "Invented bakery"

[supply]
u0_v = 230
phases = 3
earthing = "TN-C-S"
pfc_a = 16000
ze_ohm = 0.35

[[circuit]]
id = "incomer"
from = "supply"
device = "gG100"
board = "main board"
[circuit.cable]
length_m = 15
csa_mm2 = 35
cpc_mm2 = 16
insulation = "xlpe"

[[circuit]]
id = "ovens"
from = "incomer"
device = "C32"
phases = 3
[circuit.cable]
length_m = 20
csa_mm2 = 6
cpc_mm2 = 2.5

[[circuit]]
id = "sockets"
from = "incomer"
device = "B20"
phases = 1
[circuit.cable]
length_m = 25
csa_mm2 = 2.5
cpc_mm2 = 1.5
"""


@pytest.fixture()
def study_file(tmp_path: Path) -> Path:
    path = tmp_path / "bakery.toml"
    path.write_text(STUDY, encoding="utf-8")
    return path


def test_table(cli: Cli, study_file: Path) -> None:
    result = cli("faults", str(study_file))
    assert result.exit_code == 0, result.stderr
    out = result.stdout
    assert "Fault levels: Invented bakery" in out
    for cid in ("incomer", "ovens", "sockets"):
        assert cid in out
    assert "kA" in out and "ohm" in out
    assert "convention:" in out
    # the origin: pfc_a 16 kA is the three-phase value, and bounds the line-neutral one
    assert "Ik3 max 16.000 kA, Ik1 (line-neutral) max 16.000 kA" in out
    # boards by name
    assert "main board" in out
    assert all(len(line) <= 100 for line in out.splitlines())


def test_json_matches_the_api(cli: Cli, study_file: Path) -> None:
    result = cli("faults", str(study_file), "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    levels = faults.compute(study.load(study_file))
    assert [n["circuit"] for n in data["nodes"]] == ["incomer", "ovens", "sockets"]
    for node in data["nodes"]:
        for key in ("circuit", "ik_max_a", "ief_min_a", "zs_ohm"):
            assert key in node
        want = levels.by_circuit[node["circuit"]]
        assert node["ik_max_a"] == pytest.approx(want.ik_max_a, rel=1e-12)
        assert node["zs_ohm"] == pytest.approx(want.zs_ohm, rel=1e-12)
        assert node["ief_min_a"] == pytest.approx(want.ief_min_a, rel=1e-12)
        # the largest earth fault at the circuit's board, beside the smallest there
        assert node["ief_max_board_a"] == pytest.approx(want.ief_max_board_a, rel=1e-12)
        assert node["ief_min_board_a"] <= node["ief_max_board_a"]
    assert "line-neutral" in data["convention"]
    assert data["origin"]["ik3_max_a"] == pytest.approx(16000, rel=1e-12)
    # a three-phase circuit's window ends at its board's three-phase value, a single-phase
    # circuit's at the line-neutral value (the contract's convention)
    by_id = {n["circuit"]: n for n in data["nodes"]}
    assert by_id["ovens"]["ik_max_a"] == pytest.approx(by_id["ovens"]["ik3_max_a"], rel=1e-12)
    assert by_id["sockets"]["ik_max_a"] == pytest.approx(by_id["sockets"]["ik1_max_a"],
                                                         rel=1e-12)
    # IEC 60909-0 Table 1 (c_max 1.05) and Ohm's law, by hand: in TN the declared fault level
    # bounds the largest earth fault at the origin as the declared Ze does, and the smaller loop
    # governs: the source's line-neutral loop for maximum currents (Ik1 = pfc_a = 16 kA, the
    # bound coordination.faults takes for a three-phase supply without pfc_ln_a) rather than
    # Ze's 690 A
    assert by_id["incomer"]["ief_max_board_a"] == pytest.approx(16000.0, rel=1e-9)


def test_json_has_null_for_values_that_do_not_exist(cli: Cli, tmp_path: Path) -> None:
    path = tmp_path / "flat.toml"
    path.write_text('[supply]\nphases = 1\npfc_a = 6000\nze_ohm = 0.8\nearthing = "TN-S"\n'
                    '[[circuit]]\nid = "a"\nfrom = "supply"\ndevice = "B32"\n')
    data = json.loads(cli("faults", str(path), "--json").stdout)
    assert data["nodes"][0]["ik3_max_a"] is None
    assert data["origin"]["ik3_max_a"] is None
    assert all(v is None or not isinstance(v, float) or math.isfinite(v)
               for v in data["nodes"][0].values())


@pytest.mark.parametrize(("content", "fragment"), [
    (None, "does not exist"),
    (b"", "is empty"),
    (b"[supply\npfc_a = 1\n", "not valid TOML"),
    (b"[supply]\npfc_a = 16000 # \xe9t\xe9\n", "not UTF-8"),
])
def test_file_level_errors(cli: Cli, content: bytes | None, fragment: str, tmp_path: Path) -> None:
    path = tmp_path / "the-study.toml"
    if content is not None:
        path.write_bytes(content)
    result = cli("faults", str(path))
    assert result.exit_code == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ")
    assert fragment in lines[0] and "the-study.toml" in lines[0]
    assert "Traceback" not in result.stderr and result.stdout == ""


def test_folder_instead_of_a_file(cli: Cli, tmp_path: Path) -> None:
    result = cli("faults", str(tmp_path))
    assert result.exit_code == 2
    assert "is a folder" in result.stderr
