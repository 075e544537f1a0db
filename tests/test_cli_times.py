"""`coordination times`: the readable table, the JSON contract, and one-line errors."""

from __future__ import annotations

import json
import math

import pytest

TM = "{family = 'tm', In_a = 250, Ir_x = 0.8, Ii_x = 10}"
ELECTRONIC = ("{family = 'electronic', In_a = 400, Ir_x = 0.8, tr_s = 4, Isd_x = 5, "
              "tsd_s = 0.2, Ii_x = 12}")
# Invented datasheet curve.
DATASHEET = ("{family = 'datasheet', name = 'invented', In_a = 100, "
             "lower = [[120, 3600], [1000, 0.5]], upper = [[150, 7200], [1500, 1.0]]}")


def currents(*values: float) -> list[str]:
    out = []
    for v in values:
        out += ["--current", f"{v:g}"]
    return out


def test_json_contract_and_null_for_never(cli):
    # below 1.05 Ir (IEC 60947-2, Table 6) the breaker never trips: null in JSON
    result = cli("times", TM, *currents(150, 1000, 5000), "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["device"] == "thermal-magnetic 250 A, Ir 200 A, Ii 10 In"
    assert [p["current_a"] for p in data["points"]] == [150, 1000, 5000]
    assert set(data["points"][0]) >= {"current_a", "t_min_s", "t_max_s"}
    assert data["points"][0]["t_min_s"] is None
    assert data["points"][0]["t_max_s"] is None
    # 5000 A is 2 Ii: instantaneous (IEC 60947-2 magnetic tolerance +/-20 %, from memory)
    assert data["points"][2]["t_max_s"] <= 0.03
    for p in data["points"][1:]:
        assert p["t_min_s"] <= p["t_max_s"]


# Our design (the command line's JSON output): the JSON carries the band's own edges.
@pytest.mark.parametrize("spec", [TM, ELECTRONIC, DATASHEET, "B32"])
def test_json_matches_the_band(cli, spec):
    from curves.spec import band_from_spec, parse_inline

    band = band_from_spec(parse_inline(spec), basis="envelope")
    values = (40, 200, 700, 2500, 9000)
    result = cli("times", spec, *currents(*values), "--json", "--basis", "envelope")
    assert result.exit_code == 0, result.output
    points = json.loads(result.stdout)["points"]
    for p, i in zip(points, values, strict=True):
        for key, edge in (("t_min_s", band.t_min), ("t_max_s", band.t_max)):
            expected = float(edge(i))
            if math.isfinite(expected):
                assert p[key] == pytest.approx(expected, rel=1e-12)
            else:
                assert p[key] is None


def test_datasheet_basis_in_json(cli):
    result = cli("times", DATASHEET, *currents(500), "--json", "--basis", "envelope")
    assert result.exit_code == 0, result.output
    assert json.loads(result.stdout)["basis"] == "datasheet"


def test_readable_table(cli):
    result = cli("times", ELECTRONIC, *currents(300, 2000, 7000))
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    assert lines[0].startswith("electronic 400 A, Ir 320 A") and "typical" in lines[0]
    assert "t_min" in lines[1] and "t_max" in lines[1]
    body = lines[3:6]
    assert len(body) == 3
    assert "never" in body[0]  # 300 A is below the long-time pickup of Ir = 320 A
    assert "2 kA" in body[1]
    assert "Traceback" not in result.output


# Our design: bad input gets one line and exit code 2; the series and grids
# are IEC 60898-1 / IEC 60947-2 values or common practice, the Icn values IEC 60898-1 standard
# values (from memory).
@pytest.mark.parametrize(("args", "words"), [
    (["X32", *currents(100)], ["unknown device"]),
    (["B33", *currents(100)], ["allowed"]),
    (["{family = 'tm', In_a = 251}", *currents(100)], ["In_a", "allowed"]),
    (["{family = 'tm', In_a = 250, Ir_x = 0.73}", *currents(100)], ["Ir_x", "allowed"]),
    (["{family = 'electronic', In_a = 400, Isd_x = 10, Ii_x = 5}", *currents(100)], ["Isd_x"]),
    (["{family = 'tmm', In_a = 250}", *currents(100)], ["did you mean 'tm'"]),
    (["{family = 'tm', In_a = 250, Ir = 0.8}", *currents(100)], ["did you mean 'Ir_x'"]),
    (["{family = 'tm', In_a = ", *currents(100)], ["TOML"]),
    ([TM, "--current", "nan"], ["--current", "finite positive"]),
    ([TM, "--current", "inf"], ["--current"]),
    ([TM, "--current", "-5"], ["--current"]),
    ([TM, "--current", "0"], ["--current"]),
    ([TM, *currents(100), "--basis", "nominal"], ["--basis", "typical, envelope"]),
    (["{family = 'mcb', type = 'B', In_a = 32, icn_a = 7000}", "-i", "100"],
     ["icn_a", "allowed", "1500", "25000"]),
    (["B32 7kA", "-i", "100"], ["icn_a", "allowed"]),
])
def test_bad_input_one_line_exit_2(cli, args, words):
    result = cli("times", *args)
    assert result.exit_code == 2
    assert result.stdout == ""
    err = result.stderr.strip()
    assert err.startswith("error: ")
    assert "\n" not in err
    assert "Traceback" not in result.output
    for word in words:
        assert word in err


# IEC 60898-1 standard values of rated short-circuit capacity Icn (from memory): the module
# entry point refuses 7000 A on one line with exit code 2.
def test_non_standard_icn_through_python_m(cli_process):
    proc = cli_process("times", '{family="mcb", type="B", In_a=32, icn_a=7000}', "-i", "100",
                       text=True)
    assert proc.returncode == 2
    assert proc.stdout == ""
    err = proc.stderr.strip()
    assert "\n" not in err and "Traceback" not in err
    assert "icn_a" in err and "allowed: 1500, 3000, 4500, 6000, 10000, 15000, 20000, 25000" in err
