"""Every bad input is refused cleanly: one line, exit code 2, nothing written, input untouched.

The installations here are invented. The fuzz test builds random and broken study documents and
asserts that no exception other than our own input error escapes any command.
"""

from __future__ import annotations

import copy
import json
import math
import random
from collections.abc import Callable
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import Result

from benchmarks.generate import chain, to_toml, wide

#: The ``cli`` fixture (tests/conftest.py): runs a command in this process.
Cli = Callable[..., Result]

BASE = {
    "study": {"title": "Invented corner shop"},
    "supply": {"u0_v": 230, "phases": 3, "earthing": "TN-C-S", "pfc_a": 10000, "ze_ohm": 0.35},
    "circuit": [
        {"id": "incomer", "from": "supply", "device": "gG100",
         "cable": {"length_m": 10, "csa_mm2": 35, "cpc_mm2": 16, "insulation": "xlpe"}},
        {"id": "lights", "from": "incomer", "device": "B10", "phases": 1, "load_a": 6,
         "cable": {"length_m": 20, "csa_mm2": 1.5, "cpc_mm2": 1.0, "iz_a": 17.5}},
        {"id": "sockets", "from": "incomer", "device": "B32", "phases": 1, "load_a": 20,
         "cable": {"length_m": 25, "csa_mm2": 4, "cpc_mm2": 1.5, "iz_a": 32}},
        {"id": "oven", "from": "incomer", "device": "C20", "phases": 3, "load_a": 16,
         "cable": {"length_m": 15, "csa_mm2": 4, "cpc_mm2": 2.5, "iz_a": 32}},
    ],
}


def write(tmp_path: Path, doc: dict | str, name: str = "study.toml") -> Path:
    path = tmp_path / name
    path.write_text(doc if isinstance(doc, str) else to_toml(doc), encoding="utf-8")
    return path


def assert_refused(result, *fragments: str) -> str:
    """Exit code 2, one line on stderr, no traceback, every fragment named."""
    assert result.exit_code == 2, (result.exit_code, result.output, result.exception)
    assert result.exception is None or isinstance(result.exception, SystemExit)
    message = result.stderr.strip()
    assert message.count("\n") == 0, message
    assert message.startswith("error: ")
    assert "Traceback" not in result.output
    for fragment in fragments:
        assert fragment in message, (fragment, message)
    return message


def mutated(change) -> dict:
    doc = copy.deepcopy(BASE)
    change(doc)
    return doc


def test_base_study_is_valid(cli, tmp_path):
    # common practice: the reference installation must itself pass the loader
    result = cli("faults", write(tmp_path, BASE))
    assert result.exit_code == 0, result.output


BAD_DOCUMENTS = [
    # (label, document or text, fragments the one-line message must contain)
    ("empty file", "", ["study"]),
    ("not TOML", "this is = = not toml [", ["TOML"]),
    ("missing supply", mutated(lambda d: d.pop("supply")), ["supply"]),
    ("unknown family", mutated(lambda d: d["circuit"][1].update(device="Q32")),
     ["lights", "device"]),
    ("rating not in series", mutated(lambda d: d["circuit"][1].update(device="B33")),
     ["lights", "device"]),
    ("wrong type", mutated(lambda d: d["circuit"][2]["cable"].update(length_m="ten")),
     ["sockets", "length_m"]),
    ("negative length", mutated(lambda d: d["circuit"][2]["cable"].update(length_m=-5.0)),
     ["sockets", "length_m"]),
    ("zero section", mutated(lambda d: d["circuit"][2]["cable"].update(csa_mm2=0)),
     ["sockets", "csa_mm2"]),
    ("NaN load", mutated(lambda d: d["circuit"][3].update(load_a=math.nan)), ["oven", "load_a"]),
    ("infinite length", mutated(lambda d: d["circuit"][3]["cable"].update(length_m=math.inf)),
     ["oven", "length_m"]),
    ("absurd length", mutated(lambda d: d["circuit"][3]["cable"].update(length_m=1e12)),
     ["oven", "length_m"]),
    ("absurd fault level", mutated(lambda d: d["supply"].update(pfc_a=1e15)), ["pfc_a"]),
    ("unknown parent", mutated(lambda d: d["circuit"][1].update({"from": "nowhere"})),
     ["lights", "from"]),
    ("cycle", mutated(lambda d: (d["circuit"][0].update({"from": "oven"}))),
     ["from"]),
    ("duplicate id", mutated(lambda d: d["circuit"].append(copy.deepcopy(d["circuit"][1]))),
     ["lights", "id"]),
    ("misspelt circuit key", mutated(lambda d: d["circuit"][1].update(lod_a=6)),
     ["lights", "lod_a", "load_a"]),
    ("misspelt cable key",
     mutated(lambda d: d["circuit"][1]["cable"].update(lenght_m=d["circuit"][1]["cable"]
                                                       .pop("length_m"))),
     ["lights", "lenght_m", "length_m"]),
    ("unknown material", mutated(lambda d: d["circuit"][1]["cable"].update(material="gold")),
     ["lights", "material", "copper"]),
    ("unknown earthing", mutated(lambda d: d["supply"].update(earthing="IT-X")),
     ["earthing", "TN-S"]),
    ("unknown basis", mutated(lambda d: d["study"].update(basis="optimistic")),
     ["basis", "typical"]),
]


@pytest.mark.parametrize(("label", "doc", "fragments"), BAD_DOCUMENTS,
                         ids=[b[0] for b in BAD_DOCUMENTS])
@pytest.mark.parametrize("command", ["faults", "check"])
def test_bad_study_is_refused_in_one_line(cli, tmp_path, label, doc, fragments, command):
    path = write(tmp_path, doc)
    before = path.read_bytes()
    assert_refused(cli(command, path), *fragments)
    assert path.read_bytes() == before  # the input is never modified


def test_missing_file_is_refused(cli, tmp_path):
    assert_refused(cli("check", tmp_path / "absent.toml"), "absent.toml")


def test_output_path_in_missing_folder_is_refused(cli, tmp_path):
    path = write(tmp_path, BASE)
    target = tmp_path / "no-such-folder" / "plot.png"
    assert_refused(cli("plot", path, "--circuit", "lights", "-o", target), "no-such-folder")
    assert not target.exists()


@pytest.mark.parametrize("command", ["plot", "report"])
def test_output_path_equal_to_input_is_refused(cli, tmp_path, command):
    path = write(tmp_path, BASE, name="study.pdf")
    before = path.read_bytes()
    extra = ["--circuit", "lights"] if command == "plot" else []
    assert_refused(cli(command, path, *extra, "-o", path), "input")
    assert path.read_bytes() == before


def test_bad_study_leaves_existing_report_untouched(cli, tmp_path):
    bad = write(tmp_path, mutated(lambda d: d["circuit"][1].update(device="B33")))
    report = tmp_path / "report.pdf"
    report.write_bytes(b"%PDF-1.4 the designer's earlier report")
    assert_refused(cli("report", bad, "-o", report), "lights")
    assert report.read_bytes() == b"%PDF-1.4 the designer's earlier report"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report.pdf", "study.toml"]


def test_unknown_circuit_for_choose_and_plot(cli, tmp_path):
    path = write(tmp_path, BASE)
    assert_refused(cli("choose", path, "--circuit", "attic"), "attic")
    assert_refused(cli("plot", path, "--circuit", "attic", "-o", tmp_path / "p.png"), "attic")
    assert not (tmp_path / "p.png").exists()


# -- fuzzing -------------------------------------------------------------------------------------
ODD_VALUES = [None, "", "x", -1, 0, 0.0, -0.0, 1e300, math.nan, math.inf, -math.inf, True,
              [1, 2], {"a": 1}, "B32", "gG100", "supply", "lights", 3, 1, 230, 16000, 2.5]


def _paths(doc: dict) -> list[tuple]:
    """Every (container, key) pair in the document, for mutation."""
    found = []
    stack = [doc]
    while stack:
        node = stack.pop()
        items = node.items() if isinstance(node, dict) else enumerate(node)
        for key, value in items:
            found.append((node, key))
            if isinstance(value, dict | list):
                stack.append(value)
    return found


@st.composite
def broken_documents(draw) -> dict:
    doc = copy.deepcopy(BASE)
    rng = random.Random(draw(st.integers(0, 2**32 - 1)))
    for _ in range(draw(st.integers(1, 4))):
        paths = _paths(doc)
        if not paths:  # earlier mutations emptied the document
            break
        node, key = rng.choice(paths)
        action = rng.randrange(4)
        if action == 0 and isinstance(node, dict):
            node.pop(key, None)
        elif action == 1 and isinstance(node, dict):
            node[str(key) + rng.choice(["_x", "s", ""])[:2]] = node.pop(key, None)
        else:
            node[key] = rng.choice(ODD_VALUES)
    return doc


def _clean(doc):
    """TOML has no null: drop None values so the document can be written."""
    if isinstance(doc, dict):
        return {k: _clean(v) for k, v in doc.items() if v is not None}
    if isinstance(doc, list):
        return [_clean(v) for v in doc if v is not None]
    return doc


def _invoke_quietly(cli: Cli, tmp_path: Path, doc: dict, command: list[str]):
    try:
        text = to_toml(_clean(doc))
    except TypeError:
        return None
    path = tmp_path / "fuzz.toml"
    path.write_text(text, encoding="utf-8")
    return cli(command[0], path, *command[1:])


FIXTURE_OK = [HealthCheck.function_scoped_fixture]


def assert_no_crash(result):
    """Only our own exits: 0, 1 or 2, never an exception of another kind."""
    assert result.exception is None or isinstance(result.exception, SystemExit), (
        result.exception, result.output)
    assert result.exit_code in (0, 1, 2)


@settings(max_examples=60, deadline=None, suppress_health_check=FIXTURE_OK)
@given(doc=broken_documents(), command=st.sampled_from(
    [["faults"], ["check"], ["faults", "--json"], ["check", "--json"],
     ["choose", "--circuit", "sockets"], ["choose", "--circuit", "incomer"]]))
def test_fuzz_text_commands_raise_only_input_errors(cli, tmp_path, doc, command):
    result = _invoke_quietly(cli, tmp_path, doc, command)
    if result is None:
        return
    assert_no_crash(result)
    if result.exit_code == 2:
        assert result.stderr.strip().count("\n") == 0


@settings(max_examples=8, deadline=None, suppress_health_check=FIXTURE_OK)
@given(doc=broken_documents(), command=st.sampled_from(["plot", "report"]))
def test_fuzz_output_commands_raise_only_input_errors(cli, tmp_path, doc, command):
    out = tmp_path / ("fuzz.png" if command == "plot" else "fuzz.pdf")
    out.unlink(missing_ok=True)
    extra = ["--circuit", "sockets"] if command == "plot" else []
    result = _invoke_quietly(cli, tmp_path, doc, [command, *extra, "-o", str(out)])
    if result is None:
        return
    assert_no_crash(result)
    if result.exit_code == 2:
        assert not out.exists()


# -- properties across the pipeline ----------------------------------------------------------------
def _pairs_json(cli: Cli, path: Path) -> list[dict]:
    result = cli("check", path, "--json")
    assert result.exit_code in (0, 1), result.output
    return json.loads(result.stdout)["pairs"]


@settings(max_examples=10, deadline=None, suppress_health_check=FIXTURE_OK)
@given(order=st.permutations(range(len(BASE["circuit"]))))
def test_verdicts_stable_when_circuits_are_reordered(cli, tmp_path, order):
    reordered = copy.deepcopy(BASE)
    reordered["circuit"] = [reordered["circuit"][i] for i in order]

    def key(p):
        return (p["upstream"], p["downstream"])

    original = sorted(_pairs_json(cli, write(tmp_path, BASE, "a.toml")), key=key)
    shuffled = sorted(_pairs_json(cli, write(tmp_path, reordered, "b.toml")), key=key)
    assert shuffled == original


def test_python_api_and_json_agree(cli, tmp_path):
    from coordination import engine, faults, study
    from coordination.cli import to_json

    path = write(tmp_path, BASE)
    s = study.load(path)
    levels = faults.compute(s)
    api_pairs = json.loads(to_json(engine.analyse(s, levels).to_json()))["pairs"]
    assert _pairs_json(cli, path) == api_pairs
    api_nodes = json.loads(to_json(levels.to_json()))["nodes"]
    cli_nodes = json.loads(cli("faults", path, "--json").stdout)["nodes"]
    assert cli_nodes == api_nodes


def test_json_writes_never_as_null_and_plain_values_of_any_kind():
    # Our JSON output: a time that does not exist ("never") is null
    from types import MappingProxyType

    import numpy as np

    from coordination.cli import to_json

    value = {"t_s": math.inf, "x": math.nan, "i_a": np.float64(12.5), "n": np.int64(3),
             "edges_s": np.array([1.0, np.inf]), "details": MappingProxyType({"k": 115.0}),
             "window_a": (18.5, 7890.0), 4: "int key"}
    assert json.loads(to_json(value)) == {
        "t_s": None, "x": None, "i_a": 12.5, "n": 3, "edges_s": [1.0, None],
        "details": {"k": 115.0}, "window_a": [18.5, 7890.0], "4": "int key"}


# -- scale: deep and wide trees never recurse ------------------------------------------------------
def test_deep_chain_of_5000_loads_and_computes_faults(tmp_path):
    from coordination import faults, study

    s = study.load(write(tmp_path, chain(5000)))
    levels = faults.compute(s)
    assert len(levels.nodes) == 5000
    assert len(s.ancestors("n4999")) == 4999


def test_wide_board_of_5000_checks(cli, tmp_path):
    result = cli("check", write(tmp_path, wide(5000)), "--json")
    assert result.exit_code in (0, 1), result.output
    assert len(json.loads(result.stdout)["pairs"]) == 5000


def test_deep_chain_of_5000_alike_devices_checks_in_one_row_per_circuit(cli, tmp_path,
                                                                         monkeypatch):
    # every ancestor is paired (our modelling choice): n (n - 1) / 2 pairs in a chain of n. Alike
    # devices in a row give alike results, so the engine decides one pair per circuit and lists one
    # row standing for the run: work and output linear in the chain's length
    from coordination import engine

    depth = 5000
    decided = []
    compare = engine.decide  # what analyse() calls for each pair it decides
    monkeypatch.setattr(engine, "decide", lambda *a, **k: decided.append(1) or compare(*a, **k))
    result = cli("check", write(tmp_path, chain(depth)), "--json")
    assert result.exit_code in (0, 1), result.output
    out = json.loads(result.stdout)
    assert len(out["pairs"]) == depth - 1
    assert len(decided) == depth - 1
    assert sum(p["upstream_count"] for p in out["pairs"]) == depth * (depth - 1) // 2
    assert out["summary"]["pairs"] == depth * (depth - 1) // 2
    deepest = out["pairs"][-1]
    assert (deepest["downstream"], deepest["upstream"], deepest["upstream_last"],
            deepest["upstream_count"]) == ("n4999", "n4998", "n0", 4999)


def test_the_table_names_both_ends_of_a_run_and_counts_every_pair(cli, tmp_path):
    # our design (README, What the tool assumes): one row for a run of alike ancestors
    result = cli("check", write(tmp_path, chain(4)))
    assert result.exit_code in (0, 1), result.output
    assert "n2 to n0 (3 x gG100)" in result.stdout
    assert "selectivity: 6 pairs" in result.stdout  # 1 + 2 + 3, in three rows


def test_chain_of_differing_devices_lists_every_pair(cli, tmp_path):
    # Our modelling choice: every ancestor is paired; no two devices in a row alike, so one row per
    # pair
    depth = 40
    result = cli("check", write(tmp_path, chain(depth, ("gG160", "gG125"))), "--json")
    assert result.exit_code in (0, 1), result.output
    pairs = json.loads(result.stdout)["pairs"]
    assert len(pairs) == depth * (depth - 1) // 2
    assert {p["upstream_count"] for p in pairs} == {1}


def test_a_tested_limit_splits_a_run_of_alike_devices(cli, tmp_path):
    # Our modelling choice: a tested limit belongs to one pair and overrides the curves for it alone
    text = chain(8) + '\n[circuit.tested_limits_a]\nn3 = 2500\n'  # for n7, under n6 .. n0
    result = cli("check", write(tmp_path, text), "--json")
    assert result.exit_code in (0, 1), result.output
    rows = [(p["upstream"], p["upstream_last"], p["upstream_count"], p["decided_by"],
             p["basis"]) for p in json.loads(result.stdout)["pairs"] if p["downstream"] == "n7"]
    assert rows == [("n6", "n4", 3, "time-current", "typical"), ("n3", "n3", 1, "tested", "tested"),
                    ("n2", "n0", 3, "time-current", "typical")]


def test_a_tree_too_deep_to_list_is_refused_in_one_line(cli, tmp_path):
    # our design (README): more than 500,000 rows are refused in one line, not left to exhaust
    # memory; 1,100 circuits in a chain of alternating devices need 604,450
    result = cli("check", write(tmp_path, chain(1100, ("gG160", "gG125"))), "--json")
    assert_refused(result, "n1099", "from", "500,000")
