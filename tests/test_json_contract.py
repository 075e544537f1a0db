"""The JSON every pair carries: ``basis`` (the bands' basis) and ``decided_by`` (the region).

The contract (DEVELOPERS.md, "Contracts"): every pair has ``basis`` in typical | envelope |
datasheet | tested and ``decided_by`` in time-current | energy | tested. The installations are
the invented examples and an invented two-device study.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
BASES = {"typical", "envelope", "datasheet", "tested"}
REGIONS = {"time-current", "energy", "tested"}

TWO = """
[study]
title = "Invented pump house"
basis = "{basis}"
[supply]
pfc_a = 10000
ze_ohm = 0.2
[[circuit]]
id = "main"
from = "supply"
device = {main}
[[circuit]]
id = "pump"
from = "main"
device = "gG32"
{tested}
"""

DATASHEET = ('{ family = "datasheet", name = "invented fuse", In_a = 100, '
             'lower = [[200, 100], [1000, 0.5], [10000, 0.01]], '
             'upper = [[300, 100], [1500, 0.5], [12000, 0.01]] }')


@pytest.mark.parametrize("example", ["small-shop.toml", "office-building.toml"])
@pytest.mark.parametrize("basis", ["typical", "envelope"])
def test_every_pair_of_the_examples_has_basis_and_decided_by(cli, example, basis):
    result = cli("check", str(EXAMPLES / example), "--json", "--basis", basis)
    assert result.exit_code in (0, 1), result.output
    pairs = json.loads(result.stdout)["pairs"]
    assert pairs
    for p in pairs:
        assert p["decided_by"] in REGIONS
        assert p["basis"] == ("tested" if p["decided_by"] == "tested" else basis)
        assert p["band_basis"] == {"upstream": basis, "downstream": basis}


def _pair(cli, tmp_path, *, basis="typical", main='"gG100"', tested=""):
    path = tmp_path / "two.toml"
    path.write_text(TWO.format(basis=basis, main=main, tested=tested), encoding="utf-8")
    result = cli("check", str(path), "--json")
    assert result.exit_code in (0, 1), result.output
    (pair,) = json.loads(result.stdout)["pairs"]
    return pair


def test_a_tested_limit_is_both_basis_and_region(cli, tmp_path):
    pair = _pair(cli, tmp_path, tested="[circuit.tested_limits_a]\nmain = 3000")
    assert (pair["basis"], pair["decided_by"]) == ("tested", "tested")


def test_a_datasheet_device_over_a_standard_one_keeps_the_standard_basis(cli, tmp_path):
    # Our contract: "datasheet" only when both devices are given by points; a pair with one
    # device from the standard rests on that device's basis
    pair = _pair(cli, tmp_path, basis="envelope", main=DATASHEET)
    assert pair["band_basis"] == {"upstream": "datasheet", "downstream": "envelope"}
    assert pair["basis"] == "envelope"
    assert pair["decided_by"] in REGIONS - {"tested"}


@pytest.mark.parametrize(("up", "down", "region", "expected"), [
    ("datasheet", "datasheet", "energy", "datasheet"),
    ("typical", "envelope", "time-current", "envelope"),
    ("datasheet", "typical", "time-current", "typical"),
    ("typical", "typical", "tested", "tested"),
])
def test_pair_basis_rule(up, down, region, expected):
    from coordination.engine import PairResult

    p = PairResult("u", "d", "partial", 500.0, (10.0, 1e4), region, up, down, None, False)
    assert p.basis == expected
    assert p.to_json()["basis"] == expected and p.to_json()["decided_by"] == region
