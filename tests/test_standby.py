"""Standby sources end to end: the study file's [[supply.standby]], one case per source in every
command, "case" on every pair and check, the example's verdicts, the chooser, plots and report.

The installations are invented (examples/standby-generator.toml and the small ones below).
"""

from __future__ import annotations

import copy
import json
import math
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest
import rtoml
from hypothesis import given, settings
from hypothesis import strategies as st
from typer.testing import Result

from coordination import choose, standby, study
from coordination.generator import StandbySource
from coordination.pipeline import assess
from curves.errors import InputError

Cli = Callable[..., Result]
EXAMPLE = Path(__file__).resolve().parents[1] / "examples" / "standby-generator.toml"
RAW = rtoml.load(EXAMPLE)


def variant(**source: object) -> dict:
    data = copy.deepcopy(RAW)
    data["supply"]["standby"][0].update(source)
    return data


def by_check(results, circuit: str) -> dict:
    return {r.check: r for r in results if r.circuit == circuit}


# -- the example's verdicts ----------------------------------------------------------------------
@pytest.fixture(scope="module")
def example():
    s = study.load(EXAMPLE)
    return s, assess(s)


def test_the_gg_sub_main_disconnects_on_the_transformer_but_not_on_the_generator(example):
    _, result = example
    normal = by_check(result.checks, "sm-east")["disconnection"]
    (case,) = result.cases
    on_gen = by_check(case.checks, "sm-east")["disconnection"]
    assert normal.ok and normal.case == "normal"
    assert not on_gen.ok and on_gen.case == "genset" and on_gen.value == math.inf
    assert "never clears" in on_gen.reason
    assert not result.ok and not case.ok


@pytest.mark.parametrize("circuit", ["east-lights", "east-sockets", "east-servers",
                                     "east-kitchen"])
def test_mcb_final_circuits_disconnect_on_both_supplies(example, circuit):
    _, result = example
    for results in (result.checks, result.cases[0].checks):
        r = by_check(results, circuit)["disconnection"]
        assert r.ok and r.value <= r.limit == 0.4


def test_excitation_support_makes_the_sub_main_disconnect():
    result = assess(study.from_dict(variant(sustained_x=3)))
    r = by_check(result.cases[0].checks, "sm-east")["disconnection"]
    assert r.ok and r.value < 5.0


def test_the_case_feeds_the_board_of_its_circuit_only(example):
    s, result = example
    case = result.cases[0]
    assert case.case.feeds == "incomer"
    assert case.case.circuits == tuple(s.descendants("incomer"))
    assert {r.circuit for r in case.checks} == set(s.descendants("incomer"))
    assert {p.upstream for p in case.analysis.pairs} == {"sm-east"}  # never the incomer
    assert all(p.case == "genset" for p in case.analysis.pairs)


def test_a_source_at_the_origin_feeds_every_circuit(example):
    s = study.from_dict(variant(feeds="supply"))
    case = standby.case_levels(s, s.supply.standby[0])
    assert case.circuits == tuple(c.id for c in s.circuits)


def test_the_generator_fault_levels_are_below_the_transformer_s(example):
    _, result = example
    for node in result.cases[0].case.levels.nodes:
        normal = result.levels.by_circuit[node.circuit]
        assert node.ik_max_a < normal.ik_max_a
        assert node.ief_min_a < normal.ief_min_a


# -- the command line ----------------------------------------------------------------------------
def test_check_json_carries_the_case_on_every_row(cli: Cli):
    out = cli("check", EXAMPLE, "--json")
    assert out.exit_code == 1
    data = json.loads(out.stdout)
    assert {p["case"] for p in data["pairs"]} == {"normal", "genset"}
    assert {r["case"] for r in data["checks"]} == {"normal", "genset"}
    failed = [(r["case"], r["circuit"], r["check"]) for r in data["checks"] if not r["ok"]]
    assert ("genset", "sm-east", "disconnection") in failed
    assert not any(case == "normal" for case, _, _ in failed)
    assert data["cases"]["genset"]["ok"] is False
    never = next(r for r in data["checks"] if r["case"] == "genset"
                 and r["circuit"] == "sm-east" and r["check"] == "disconnection")
    assert never["value"] is None and never["unit"] == "s"


def test_check_text_has_a_section_per_case(cli: Cli):
    out = cli("check", EXAMPLE)
    assert out.exit_code == 1
    assert "Case 'genset': standby generator 500 kVA on board main switchboard" in out.stdout
    assert "Design aid" in out.stdout


def test_faults_json_and_text_give_every_case(cli: Cli):
    data = json.loads(cli("faults", EXAMPLE, "--json").stdout)
    (case,) = data["cases"]
    assert case["case"] == "genset" and case["feeds"] == "incomer"
    assert {n["case"] for n in case["nodes"]} == {"genset"}
    assert all(n["ief_min_sustained_a"] == 0 for n in case["nodes"])
    assert all(n["ief_min_transient_a"] <= n["ief_min_a"] for n in case["nodes"])
    assert "case" not in data["nodes"][0]  # the normal supply's nodes as before
    text = cli("faults", EXAMPLE).stdout
    assert "Case 'genset'" in text and "terminals: I''k3 max" in text


def test_a_study_without_a_standby_source_has_no_cases(cli: Cli):
    small = Path(__file__).resolve().parents[1] / "examples" / "small-shop.toml"
    data = json.loads(cli("check", small, "--json").stdout)
    assert "cases" not in data
    assert {p["case"] for p in data["pairs"]} == {"normal"}
    assert "cases" not in json.loads(cli("faults", small, "--json").stdout)


# -- bad input -----------------------------------------------------------------------------------
@pytest.mark.parametrize(("change", "key", "fragment"), [
    ({"name": "normal"}, "supply.standby[1].name", "other than 'normal'"),
    ({"xd1_pct": 8}, "supply.standby.genset.xd1_pct", "at least 12"),
    ({"td1_s": 0.01}, "supply.standby.genset.td1_s", "more than 0.02"),
    ({"sustained_x": 5}, "supply.standby.genset.sustained_x", "at most 4"),
    ({"feeds": "sm-eats"}, "supply.standby.genset.feeds", "did you mean 'sm-east'"),
    ({"feeds": "east-lights"}, "supply.standby.genset.feeds", "feeds no board"),
    ({"xd2": 12}, "supply.standby[1].xd2", "xd2_pct"),
])
def test_bad_standby_keys_are_refused_with_the_key(change, key, fragment):
    with pytest.raises(InputError) as caught:
        study.from_dict(variant(**change))
    assert caught.value.key == key
    assert fragment in str(caught.value)


def test_missing_machine_data_and_a_table_instead_of_an_array():
    data = copy.deepcopy(RAW)
    del data["supply"]["standby"][0]["x0_pct"]
    with pytest.raises(InputError, match="missing key 'x0_pct'"):
        study.from_dict(data)
    data = copy.deepcopy(RAW)
    data["supply"]["standby"] = data["supply"]["standby"][0]
    with pytest.raises(InputError, match=r"write \[\[supply.standby\]\]"):
        study.from_dict(data)


def test_two_sources_of_one_name_are_refused():
    data = copy.deepcopy(RAW)
    data["supply"]["standby"].append(dict(data["supply"]["standby"][0]))
    with pytest.raises(InputError, match="two standby sources are named 'genset'"):
        study.from_dict(data)


def test_bad_input_on_the_command_line_is_one_line_and_exit_2(cli: Cli, tmp_path: Path):
    bad = tmp_path / "bad.toml"
    bad.write_text(EXAMPLE.read_text().replace("xd1_pct = 25", "xd1_pct = -1"))
    out = cli("check", bad)
    assert out.exit_code == 2
    assert "supply.standby.genset.xd1_pct" in out.stderr
    assert len(out.stderr.strip().splitlines()) == 1


# -- the chooser, plots and report ---------------------------------------------------------------
def test_the_chooser_meets_the_standby_case_too():
    s = study.load(EXAMPLE)
    result = choose.choose(s, "sm-east")
    assert not result.found  # every gG that passes the normal supply fails on the generator
    assert "disconnection on standby 'genset'" in json.dumps(result.to_json())
    supported = study.from_dict(variant(sustained_x=3))  # excitation support: it disconnects
    assert "on standby" not in json.dumps(choose.choose(supported, "sm-east").to_json())
    assert choose.choose(supported, "east-sockets").found


def test_plots_draw_the_decaying_faults_on_fed_circuits(example):
    from coordination.plot import plot_circuit

    s, result = example
    cases = [c.case for c in result.cases]
    fed = plot_circuit(s, result.levels, result.analysis, "east-lights", cases=cases).axes[0]
    gids = {line.get_gid() for line in fed.lines}
    assert {"decrement:genset:max-fault", "decrement:genset:min-earth-fault"} <= gids
    line = next(x for x in fed.lines if x.get_gid() == "decrement:genset:min-earth-fault")
    current, time = (np.asarray(v) for v in line.get_data())
    assert np.all(np.diff(current) <= 0) and np.all(np.diff(time) > 0)
    top = plot_circuit(s, result.levels, result.analysis, "incomer", cases=cases).axes[0]
    assert not any((x.get_gid() or "").startswith("decrement:") for x in top.lines)


def test_the_report_has_a_section_per_case(tmp_path: Path):
    from pypdf import PdfReader

    from coordination.report import write_report

    s = study.load(EXAMPLE)
    summary = write_report(s, tmp_path / "r.pdf", csv=True)
    assert not summary.ok
    text = "\n".join(p.extract_text() for p in PdfReader(summary.path).pages)
    assert "Standby source 'genset' on board main switchboard: fault levels" in text
    for part in ("selectivity", "protection checks", "checks that fail or are near their limit"):
        assert f"Standby source 'genset': {part}" in text
    assert "Standby source 'genset' (500 kVA, 5 circuits)" in text  # the cover
    checks_csv = (tmp_path / "r-checks.csv").read_text()
    assert "genset,sm-east,disconnection,False" in checks_csv


# -- properties ----------------------------------------------------------------------------------
@settings(max_examples=25, deadline=None)
@given(rating=st.floats(50, 2000), xd2=st.floats(8, 20), extra=st.floats(1.0, 3.0),
       x0=st.floats(2, 15), sustained=st.floats(0, 3))
def test_case_currents_fall_along_the_tree_and_never_rise_in_time(rating, xd2, extra, x0,
                                                                   sustained):
    s = study.load(EXAMPLE)
    source = StandbySource("g", rating, 230.0, xd2, xd2 * extra, 0.02, 0.3, x0,
                           min(sustained, 100 / (xd2 * extra)))
    case = standby.case_levels(s, source)
    levels = case.levels
    for node in levels.nodes:
        parent = s.by_id[node.circuit].parent
        if parent in levels.by_circuit:  # a fault further out is smaller
            above = levels.by_circuit[parent]
            assert node.ik3_max_a <= above.ik3_max_end_a * (1 + 1e-9)
            assert node.ik1_max_a <= above.ik1_max_end_a * (1 + 1e-9)
        assert node.ik3_max_a <= levels.origin_ik3_a * (1 + 1e-9)
        d = case.nodes[node.circuit].earth_end
        t = np.logspace(-4, 2, 50)
        assert np.all(np.diff(d.current_a(t)) <= 1e-9)


def test_an_rcd_disconnects_the_decaying_earth_fault_on_the_generator():
    """TT (invented electrode values): no overcurrent device clears the earth faults, on either
    supply; a 300 mA type S RCD on the sub-main and 30 mA RCDs on the finals do, on both."""
    data = copy.deepcopy(RAW)
    data["supply"].update(earthing="TT", ze_ohm=21.0, ra_ohm=20.0)
    data["circuit"][1]["rcd"] = {"idn_ma": 300, "selective": True}
    for c in data["circuit"][2:]:
        c["rcd"] = {"idn_ma": 30}
    result = assess(study.from_dict(data))
    (case,) = result.cases
    for r in case.checks:
        if r.check == "disconnection":
            assert r.ok and r.details["rcd_circuit"] == r.circuit, r.reason
            assert "alone would not" in r.reason
    assert case.ok


def test_a_sub_main_without_neutral_gives_line_line_minima_on_the_generator():
    data = copy.deepcopy(RAW)
    data["circuit"][1]["cable"]["neutral_mm2"] = 0
    data["circuit"] = [c for c in data["circuit"] if c.get("phases", 3) == 3]
    case = assess(study.from_dict(data)).cases[0]
    below = [n for n in case.case.levels.nodes if n.circuit != "sm-east"]
    assert below and all(n.ik1_max_a is None and n.ik_min_end_kind == "line-line"
                         for n in below)
    assert all(math.isfinite(r.value) or r.check != "breaking-capacity" for r in case.checks)
