"""Boards named as the outputs print them: ``--board`` takes the name or the feeder's id.

The installation is invented.
"""

from __future__ import annotations

import pytest

from coordination import choose, study
from coordination.boards import ORIGIN, board_name, board_names, feeder_of
from coordination.model import SUPPLY_ID
from curves.errors import InputError

STUDY = """
[study]
title = "Invented bakery"
[supply]
pfc_a = 6000
ze_ohm = 0.2
[[circuit]]
id = "sub-main"
from = "supply"
device = "gG63"
board = "bakehouse board"
[circuit.cable]
length_m = 10
csa_mm2 = 16
[[circuit]]
id = "ovens"
from = "sub-main"
device = "C32"
[[circuit]]
id = "lights"
from = "sub-main"
device = "B10"
phases = 1
"""


def test_names_match_what_the_tables_print():
    s = study.loads(STUDY)
    assert board_names(s) == {"sub-main": "bakehouse board"}
    for c in s.circuits:  # Study.board_name prints the board a circuit sits on
        assert s.board_name(c.id) == board_name(s, c.parent)
    assert board_name(s, SUPPLY_ID) == ORIGIN


def test_a_board_by_name_or_feeder_id():
    s = study.loads(STUDY)
    assert feeder_of(s, "bakehouse board") == feeder_of(s, "sub-main") == "sub-main"
    assert feeder_of(s, "origin") == feeder_of(s, "supply") == SUPPLY_ID
    with pytest.raises(InputError, match=r"key '--board'.*'ovens' feeds no board.*bakehouse"):
        feeder_of(s, "ovens")
    with pytest.raises(InputError, match=r"no circuit or board 'DB-9'.*origin, bakehouse board"):
        feeder_of(s, "DB-9")


def test_choose_board_takes_the_printed_name():
    s = study.loads(STUDY)
    by_name = choose.choose_board(s, "bakehouse board")
    by_id = choose.choose_board(s, "sub-main")
    assert [c.to_json() for c in by_name] == [c.to_json() for c in by_id]
    assert [c.circuit for c in by_name] == ["sub-main"]


def test_cli_choose_board_by_name(cli, tmp_path):
    path = tmp_path / "bakery.toml"
    path.write_text(STUDY, encoding="utf-8")
    result = cli("choose", str(path), "--board", "bakehouse board")
    assert result.exit_code in (0, 1), result.output
    assert "sub-main" in result.stdout
    result = cli("choose", str(path), "--board", "nowhere")
    assert result.exit_code == 2
    assert "nowhere" in result.output and "Traceback" not in result.output
