"""Robustness II: hostile inputs and hostile surroundings (issue 15).

Every installation here is invented. Each test can fail: it runs the command (in process, or as
its own process where streams, signals and file-size limits are what is tested) and looks at
what a user would see: the exit code, one line on stderr, the files left behind.
"""

from __future__ import annotations

import copy
import os
import re
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from benchmarks.generate import to_toml, wide
from coordination import study
from coordination.cli import app
from curves.errors import InputError

ROOT = Path(__file__).resolve().parents[1]
runner = CliRunner()
FIXTURE = HealthCheck.function_scoped_fixture
POSIX = pytest.mark.skipif(sys.platform == "win32", reason="POSIX streams and signals")

BASE = {
    "study": {"title": "Invented bakery"},
    "supply": {"u0_v": 230, "phases": 3, "earthing": "TN-C-S", "pfc_a": 10000, "ze_ohm": 0.35},
    "circuit": [
        {"id": "incomer", "from": "supply", "device": "gG100", "board": "main board",
         "cable": {"length_m": 10, "csa_mm2": 35, "cpc_mm2": 16, "insulation": "xlpe"}},
        {"id": "oven", "from": "incomer", "device": "C20", "phases": 3, "load_a": 16,
         "cable": {"length_m": 15, "csa_mm2": 4, "cpc_mm2": 2.5, "iz_a": 32}},
    ],
}


def write(folder: Path, doc: dict | str, name: str = "study.toml") -> Path:
    path = folder / name
    path.write_text(doc if isinstance(doc, str) else to_toml(doc), encoding="utf-8")
    return path


def refused(result, *fragments: str) -> str:
    """Exit code 2, one line on stderr naming every fragment, no traceback."""
    assert result.exit_code == 2, (result.exit_code, result.output, result.exception)
    message = result.stderr.strip()
    assert message.startswith("error: ") and "\n" not in message, message
    assert "Traceback" not in result.output
    for fragment in fragments:
        assert fragment in message, (fragment, message)
    return message


def process(*args: str, **kwargs):
    return subprocess.run([sys.executable, "-m", "coordination", *map(str, args)], cwd=ROOT,
                          timeout=120, check=False, **kwargs)


def one_line(stderr: bytes) -> str:
    text = stderr.decode("utf-8").strip()
    assert text.startswith("error: ") and "\n" not in text and "Traceback" not in text, text
    return text


# -- user text with "$" reaches the figures as written ---------------------------------------
# letters and the characters matplotlib's formula syntax gives a meaning to
MATH_TEXT = st.text(alphabet="ab1 $\\^_{}", min_size=1, max_size=12).map(
    lambda t: f"x{t}$y")  # never blank, never with edge spaces, always at least one "$"


def _dollar_doc(text: str) -> dict:
    doc = copy.deepcopy(BASE)
    doc["study"]["title"] = f"Costs {text}"
    doc["circuit"][0]["board"] = f"board {text}"
    doc["circuit"][1]["id"] = f"oven {text}"
    return doc


@settings(max_examples=8, deadline=None, suppress_health_check=[FIXTURE])
@given(text=MATH_TEXT)
def test_dollar_text_is_plotted_as_written(tmp_path, text):
    doc = _dollar_doc(text)
    out = tmp_path / "plot.svg"
    result = runner.invoke(app, ["plot", str(write(tmp_path, doc)), "--circuit",
                                 doc["circuit"][1]["id"], "-o", str(out)])
    assert result.exit_code == 0, (result.output, result.exception)
    svg = out.read_text(encoding="utf-8")  # svg.fonttype none: the text is in the file as text
    for written in (doc["study"]["title"], doc["circuit"][1]["id"]):
        assert written in svg, written


@settings(max_examples=2, deadline=None, suppress_health_check=[FIXTURE])
@given(text=MATH_TEXT)
def test_dollar_text_is_in_the_report_as_written(tmp_path, text):
    from pypdf import PdfReader

    doc = _dollar_doc(text)
    out = tmp_path / "report.pdf"
    result = runner.invoke(app, ["report", str(write(tmp_path, doc)), "-o", str(out)])
    assert result.exit_code in (0, 1), (result.output, result.exception)
    pdf = "\n".join(page.extract_text() for page in PdfReader(out).pages)
    for written in (doc["study"]["title"], doc["circuit"][0]["board"]):
        assert written in pdf, written


def test_a_balanced_pair_of_dollars_is_not_a_formula(tmp_path):
    # the issue's own example: "Costs $100 and $200" printed as "Costs 100and200"
    doc = copy.deepcopy(BASE)
    doc["study"]["title"] = "Costs $100 and $200"
    out = tmp_path / "plot.svg"
    result = runner.invoke(app, ["plot", str(write(tmp_path, doc)), "--circuit", "oven",
                                 "-o", str(out)])
    assert result.exit_code == 0, result.output
    assert "Costs $100 and $200" in out.read_text(encoding="utf-8")


# -- full disks, closed pipes, signals -----------------------------------------------------------
def _small_file_limit() -> None:
    import resource

    # writes past 16 kB fail with EFBIG, as a full disk fails them with ENOSPC (Python ignores
    # SIGXFSZ, so the write returns the error instead of the process being killed)
    resource.setrlimit(resource.RLIMIT_FSIZE, (16 * 1024, 16 * 1024))


@POSIX
@pytest.mark.parametrize("command", [
    ["report", ROOT / "examples" / "small-shop.toml"],
    ["plot", ROOT / "examples" / "small-shop.toml", "--circuit", "bakery-oven"],
])
def test_a_pdf_that_cannot_be_written_is_one_line_and_no_file(tmp_path, command):
    out = tmp_path / "out.pdf"
    proc = process(*command, "-o", out, capture_output=True, preexec_fn=_small_file_limit)
    assert proc.returncode == 2, proc.stderr
    assert "could not be written" in one_line(proc.stderr)
    assert list(tmp_path.iterdir()) == []  # no target, no hidden temporary file


@pytest.mark.skipif(not Path("/dev/full").exists(), reason="needs /dev/full (Linux)")
@pytest.mark.parametrize("args", [["--help"], ["--version"], ["check", "--help"]])
def test_help_and_version_onto_a_full_device(args):
    with open("/dev/full", "wb") as full:
        proc = process(*args, stdout=full, stderr=subprocess.PIPE)
    assert proc.returncode == 2
    assert "No space left" in one_line(proc.stderr)


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="needs /dev/zero")
def test_a_device_as_the_study_is_refused():
    refused(runner.invoke(app, ["check", "/dev/zero"]), "/dev/zero", "not a regular file")


@POSIX
def test_a_fifo_as_the_study_is_refused_without_waiting(tmp_path):
    fifo = tmp_path / "study.toml"
    os.mkfifo(fifo)
    proc = process("check", fifo, capture_output=True)  # the timeout fails a blocked open
    assert proc.returncode == 2
    assert "not a regular file" in one_line(proc.stderr)


def test_a_study_above_the_size_limit_is_refused(tmp_path, monkeypatch):
    path = write(tmp_path, BASE)
    monkeypatch.setattr(study, "MAX_STUDY_BYTES", path.stat().st_size - 1)
    refused(runner.invoke(app, ["check", str(path)]), "limit")
    monkeypatch.setattr(study, "MAX_STUDY_BYTES", path.stat().st_size)
    assert runner.invoke(app, ["check", str(path)]).exit_code in (0, 1)


@POSIX
@pytest.mark.parametrize("as_json", [False, True])
def test_a_closed_pipe_keeps_the_verdict(tmp_path, as_json):
    # a board of 1,500 circuits writes far more than a pipe holds; the reader takes one line
    path = write(tmp_path, wide(1500))
    full = process("check", path, *(["--json"] if as_json else []), capture_output=True)
    assert full.returncode == 1  # the invented board has failing checks: the verdict is 1
    cmd = [sys.executable, "-m", "coordination", "check", str(path)] + (
        ["--json"] if as_json else [])
    proc = subprocess.Popen(cmd, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    proc.stdout.read(10)
    proc.stdout.close()  # like `| head -c 10`
    err = proc.stderr.read()
    assert proc.wait(timeout=120) == full.returncode
    assert err == b""


@POSIX
def test_sigterm_during_report_leaves_no_partial_file(tmp_path):
    path = write(tmp_path, wide(400), "board.toml")
    out = tmp_path / "board.pdf"
    proc = subprocess.Popen([sys.executable, "-m", "coordination", "report", str(path), "-o",
                             str(out)], cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.monotonic() + 90
    while time.monotonic() < deadline and proc.poll() is None:
        if any(p.name.startswith(".board.pdf.") for p in tmp_path.iterdir()):
            break  # the PDF is being written
        time.sleep(0.02)
    assert proc.poll() is None, "the report ended before it could be interrupted"
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 128 + signal.SIGTERM, err
    assert "terminated" in one_line(err)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["board.toml"]


@POSIX
@pytest.mark.parametrize("command", [["report"], ["plot", "--circuit", "oven"]])
def test_an_output_that_is_a_fifo_is_refused_and_kept(tmp_path, command):
    fifo = tmp_path / "out.pdf"
    os.mkfifo(fifo)
    result = runner.invoke(app, [command[0], str(write(tmp_path, BASE)), *command[1:],
                                 "-o", str(fifo)])
    refused(result, "not a regular file")
    assert fifo.is_fifo()


# -- booleans are not numbers, whatever the order -------------------------------------------------
# (valid device, the same device with a boolean where the family means a number, or a number
# where it means true/false); True == 1 and False == 0 in Python
ALIKE_BUT_BOOLEAN = [
    ({"family": "mcb", "type": "C", "In_a": 16, "energy_class": 1}, "energy_class", True),
    ({"family": "tm", "In_a": 250, "Ir_x": 1, "Ii_x": 10}, "Ir_x", True),
    ({"family": "electronic", "In_a": 630, "Ir_x": 1, "tr_s": 8, "Isd_x": 6, "tsd_s": 0.2,
      "Ii_x": "off", "sd_i2t": False}, "sd_i2t", 0),
]


@settings(max_examples=12, deadline=None)
@given(case=st.sampled_from(ALIKE_BUT_BOOLEAN), valid_first=st.booleans(),
       with_load=st.booleans())
def test_a_boolean_for_a_number_is_refused_whatever_came_first(case, valid_first, with_load):
    device, key, swapped = case
    bad = {**device, key: swapped}
    doc = copy.deepcopy(BASE)
    doc["circuit"][0]["device"] = {"family": "gG", "In_a": 1000}
    first, second = (device, bad) if valid_first else (bad, device)
    for n, dev in enumerate((first, second)):
        entry = {"id": f"feeder-{n}", "from": "incomer", "device": dev}
        if with_load:
            entry["load_a"] = 10
        doc["circuit"].append(entry)
    bad_id = "feeder-1" if valid_first else "feeder-0"
    with pytest.raises(InputError) as caught:
        study.from_dict(doc)
    assert bad_id in str(caught.value) and key in str(caught.value)


# -- impossible supplies ----------------------------------------------------------------------
def _supply_doc(**supply) -> dict:
    doc = copy.deepcopy(BASE)
    doc["supply"] = {"u0_v": 230, "phases": 3, "earthing": "TN-C-S", **supply}
    return doc


@pytest.mark.parametrize("supply, fragments", [
    ({"pfc_a": 16, "ze_ohm": 0.35}, ("pfc_a", "ze_ohm", "kA")),  # 16 kA typed as 16 A
    ({"pfc_a": 0.001, "ze_ohm": 0.35}, ("pfc_a", "ze_ohm")),
    ({"pfc_a": 5}, ("pfc_a", "at least 10 A", "kA")),
    ({"pfc_a": 500, "ze_ohm": 0.001}, ("pfc_a", "ze_ohm")),
    ({"pfc_a": 1e-300}, ("pfc_a", "at least 10 A")),
    ({"ze_ohm": 1e-300}, ("ze_ohm", "at least")),
    ({"pfc_a": 16000, "ze_ohm": 350}, ("ze_ohm", "milliohm")),  # 350 milliohm typed as ohm
    ({"pfc_a": 16000, "ze_ohm": 0.35, "pfc_ln_a": 16}, ("pfc_ln_a", "ze_ohm")),
])
def test_impossible_supplies_are_refused(tmp_path, supply, fragments):
    refused(runner.invoke(app, ["check", str(write(tmp_path, _supply_doc(**supply)))]),
            *fragments)


@pytest.mark.parametrize("supply", [
    {"pfc_a": 16000, "ze_ohm": 0.35},  # common practice: a TN-C-S supply's declared values
    {"pfc_a": 16000, "ze_ohm": 0.8},  # common practice: a TN-S supply's declared values
    {"pfc_a": 500, "ze_ohm": 0.35},  # within the stated tolerance (U0/Ze 657 A < 2 x 500 A)
    {"earthing": "TT", "pfc_a": 3000, "ze_ohm": 200},  # TT: Ze holds the earth electrode
])
def test_plausible_supplies_load(supply):
    study.from_dict(_supply_doc(**supply))


@settings(max_examples=40, deadline=None)
@given(pfc_ka=st.floats(5, 50), ze_ohm=st.floats(0.05, 2.0),
       earthing=st.sampled_from(["TN-S", "TN-C-S", "TT"]))
def test_a_fault_level_typed_in_ka_is_refused(pfc_ka, ze_ohm, earthing):
    # a consistent supply loads; the same with pfc_a in kA where A is meant is refused, naming
    # both keys (U0/Ze >= 115 A here, above twice any fault level of 50 A or less)
    study.from_dict(_supply_doc(pfc_a=pfc_ka * 1000, ze_ohm=ze_ohm, earthing=earthing))
    with pytest.raises(InputError) as caught:
        study.from_dict(_supply_doc(pfc_a=pfc_ka, ze_ohm=ze_ohm, earthing=earthing))
    assert "pfc_a" in str(caught.value) and "ze_ohm" in str(caught.value)


# -- the tree -----------------------------------------------------------------------------------
def _with(change) -> dict:
    doc = copy.deepcopy(BASE)
    change(doc)
    return doc


def _two_boards(doc: dict, first: str | None, second: str | None) -> None:
    for n, name in enumerate((first, second)):
        feeder = {"id": f"sub-{n}", "from": "incomer", "device": "gG63"}
        if name is not None:
            feeder["board"] = name
        doc["circuit"] += [feeder, {"id": f"light-{n}", "from": f"sub-{n}", "device": "B10",
                                    "phases": 1}]


@pytest.mark.parametrize("label, change, fragments", [
    ("a tested limit over the supply",
     lambda d: d["circuit"][1].update(tested_limits_a={"supply": 5000}),
     ("tested_limits_a.supply", "oven")),
    ("a final circuit that feeds another",
     lambda d: (d["circuit"][0].update(final=True)), ("incomer", "final")),
    ("two boards of one name", lambda d: _two_boards(d, "DB-A", "DB-A"), ("DB-A", "sub-1")),
    ("a board named as another feeder's id", lambda d: _two_boards(d, None, "sub-0"),
     ("sub-0", "board")),
    ("a board named as the origin", lambda d: d["circuit"][0].update(board="origin"),
     ("origin",)),
])
def test_inconsistent_trees_are_refused(tmp_path, label, change, fragments):
    refused(runner.invoke(app, ["check", str(write(tmp_path, _with(change)))]), *fragments)


def test_distinct_board_names_and_a_final_leaf_load():
    doc = _with(lambda d: _two_boards(d, "DB-A", "DB-B"))
    doc["circuit"][1]["final"] = True
    s = study.from_dict(doc)
    assert {s.board_name("light-0"), s.board_name("light-1")} == {"DB-A", "DB-B"}


# -- the report's scale ---------------------------------------------------------------------------
@settings(max_examples=60, deadline=None)
@given(flags=st.lists(st.booleans(), max_size=60), limit=st.integers(1, 40))
def test_a_long_table_keeps_its_failing_rows_first_and_says_so(flags, limit):
    from coordination.report import TableSpec, _capped

    spec = TableSpec(("row",), (1.0,), tuple((str(i),) for i in range(len(flags))),
                     flags=tuple(flags))
    cut, note = _capped(spec, limit)
    kept = [int(r[0]) for r in cut.rows]
    assert kept == sorted(kept) and len(kept) == min(len(flags), limit)
    assert list(cut.flags) == [flags[i] for i in kept]
    failing = [i for i, f in enumerate(flags) if f]
    assert set(failing[:limit]) <= set(kept)
    if len(flags) <= limit:
        assert note is None and cut == spec
    else:
        assert f"{len(flags):,} rows" in note and "--csv" in note


def test_the_report_names_what_it_left_out(tmp_path, monkeypatch):
    from pypdf import PdfReader

    from coordination.report import layout

    monkeypatch.setattr(layout, "MAX_TABLE_ROWS", 3)
    out = tmp_path / "shop.pdf"
    result = runner.invoke(app, ["report", str(ROOT / "examples" / "small-shop.toml"),
                                 "-o", str(out)])
    assert result.exit_code in (0, 1), result.output
    text = re.sub(r"\s+", " ", "\n".join(p.extract_text() for p in PdfReader(out).pages))
    assert "to keep the report to a readable size it sets out" in text


# -- choose on a tiny study with an extreme supply ----------------------------------------------
EXTREME = st.floats(1e-300, 1e300).filter(lambda v: v > 0) | st.sampled_from(
    [1e-300, 1e-3, 16.0, 0.35, 23.0, 2000.0, 1e6, 1e300])


@settings(max_examples=25, deadline=None)
@given(pfc_a=st.none() | EXTREME, ze_ohm=st.none() | EXTREME,
       earthing=st.sampled_from(["TN-C-S", "TT"]))
def test_choose_on_an_extreme_supply_is_refused_or_gives_plausible_advice(pfc_a, ze_ohm,
                                                                          earthing):
    from coordination import choose

    supply = {k: v for k, v in (("pfc_a", pfc_a), ("ze_ohm", ze_ohm)) if v is not None}
    try:
        s = study.from_dict(_supply_doc(earthing=earthing, **supply))
    except InputError as error:
        assert "supply" in str(error)
        return
    text = choose.format_results([choose.choose(s, "oven"), choose.choose(s, "incomer")])
    # any current the advice asks for is a current a supply can have (10 A to 1 MA)
    for number, unit in re.findall(r"at least ([0-9.e+-]+) (k?A)\b", text):
        amps = float(number) * (1000 if unit == "kA" else 1)
        assert 1.0 <= amps <= 1e7, (number, unit, text)
