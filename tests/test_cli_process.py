"""The command as a whole process: what ``main`` adds around the commands.

``main`` flushes the streams itself before the interpreter exits (a closed pipe, a full disk);
these tests make sure nothing written is lost and that exit codes survive it.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from coordination import CAUTION
from coordination.cli import BLAS_THREADS

ROOT = Path(__file__).resolve().parents[1]
OFFICE = ROOT / "examples" / "office-building.toml"


def test_check_json_complete_through_the_process(cli_process, cli) -> None:
    # the whole JSON reaches stdout, the same as in process, with the same exit code
    proc = cli_process("check", str(OFFICE), "--json")
    inside = cli("check", str(OFFICE), "--json")
    assert proc.stderr == b""
    assert proc.returncode == inside.exit_code
    assert proc.returncode in (0, 1)
    out = json.loads(proc.stdout)
    assert out == json.loads(inside.stdout)
    assert out["ok"] is (proc.returncode == 0)
    assert len(out["pairs"]) > 10 and len(out["checks"]) > 10


def test_check_table_complete_through_the_process(cli_process) -> None:
    proc = cli_process("check", str(OFFICE))
    text = proc.stdout.decode("utf-8")
    assert proc.returncode in (0, 1)
    # the caution is the last thing written (on two lines to fit the terminal); a lost buffer
    # would cut it
    assert " ".join(text.split()).endswith(" ".join(CAUTION.split()))


def test_bare_command_prints_its_help_once(cli_process) -> None:
    proc = cli_process()
    assert proc.returncode == 0
    assert proc.stdout.decode("utf-8").count("Usage") == 1


def test_unknown_command_is_one_line_exit_2(cli_process) -> None:
    proc = cli_process("bogus")
    assert proc.returncode == 2
    assert proc.stdout == b""
    err = proc.stderr.decode("utf-8").strip()
    assert err.startswith("error: ") and "\n" not in err and "bogus" in err


def test_bad_study_is_one_line_exit_2(cli_process, tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text("[supply]\npfc_a = \n", encoding="utf-8")
    proc = cli_process("faults", str(bad), "--json")
    assert proc.returncode == 2
    assert proc.stdout == b""
    err = proc.stderr.decode("utf-8").strip()
    assert err.startswith("error: ") and "\n" not in err and "not valid TOML" in err
    assert "line 2" in err


def test_json_bytes_writes_what_the_standard_library_would():
    import math

    import numpy as np

    from coordination.cli import json_bytes

    value = {"never_s": math.inf, "nan": math.nan, "scalar": np.float64(2.5),
             "limits_a": {100: 1.5, "b": (1, 2)}, "set": {"y", "x"}}
    out = json.loads(json_bytes(value))
    # the contract's null for never; keys that are not text become text, as json.dumps does
    assert out == {"never_s": None, "nan": None, "scalar": 2.5,
                   "limits_a": {"100": 1.5, "b": [1, 2]}, "set": ["x", "y"]}


def test_one_blas_thread_unless_the_environment_says_otherwise():
    import os

    code = ("import os; from coordination import cli; "
            "cli._run = lambda: print(os.environ.get('OPENBLAS_NUM_THREADS')) or 0; cli.main()")
    env = {k: v for k, v in os.environ.items() if k not in BLAS_THREADS}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env,
                         cwd=ROOT, timeout=60, check=True)
    assert out.stdout.strip() == "1"
    env["OPENBLAS_NUM_THREADS"] = "3"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env,
                         cwd=ROOT, timeout=60, check=True)
    assert out.stdout.strip() == "3"


@pytest.mark.skipif(not Path("/dev/full").exists(), reason="needs /dev/full (Linux)")
def test_output_that_cannot_be_written_is_one_line_exit_2():
    with open("/dev/full", "wb") as full:
        proc = subprocess.run([sys.executable, "-m", "coordination", "check", str(OFFICE),
                               "--json"], stdout=full, stderr=subprocess.PIPE, cwd=ROOT,
                              timeout=120, check=False)
    err = proc.stderr.decode("utf-8").strip()
    assert proc.returncode == 2
    assert err.startswith("error: ") and "\n" not in err and "Traceback" not in err


@pytest.mark.parametrize("block", [1, 2, 7, 500, 100_000])
def test_json_written_a_block_at_a_time_is_the_whole(cli, block, monkeypatch):
    # the same bytes as the payload built whole and encoded at once, whatever the block size
    from coordination import checks, engine, faults, study
    from coordination import cli as module

    monkeypatch.setattr(module, "JSON_BLOCK", block)
    streamed = cli("check", str(OFFICE), "--json").stdout_bytes
    s = study.load(OFFICE)
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    results = checks.run(s, levels)
    from coordination import rules

    whole = {**analysis.to_json(), "checks": [r.to_json() for r in results],
             "rules": rules.json_rules(rules.rule_set(s.rules)),
             "ok": analysis.ok and all(r.ok for r in results), "caution": module.CAUTION}
    assert streamed == module.json_bytes(whole) + b"\n"


def test_empty_records_are_an_empty_list(capsys):
    from coordination.cli import Records, echo_json, json_bytes

    echo_json({"a": Records([], str), "b": 1, "c": Records([1.5, 2], lambda x: {"x": x})})
    out = capsys.readouterr().out
    assert out == json_bytes({"a": [], "b": 1, "c": [{"x": 1.5}, {"x": 2}]}).decode() + "\n"


@pytest.mark.parametrize("block", [1, 500])
def test_faults_json_written_a_block_at_a_time_is_the_whole(cli, block, monkeypatch):
    from coordination import cli as module
    from coordination import faults, study

    monkeypatch.setattr(module, "JSON_BLOCK", block)
    streamed = cli("faults", str(OFFICE), "--json").stdout_bytes
    whole = faults.compute(study.load(OFFICE)).to_json()
    assert streamed == module.json_bytes(whole) + b"\n"


@pytest.mark.skipif(sys.platform == "win32", reason="closes a descriptor before the start")
def test_a_closed_stdout_is_no_traceback():
    import os

    # a command started with its stdout closed (`>&-`): Python sets sys.stdout to None
    proc = subprocess.run([sys.executable, "-m", "coordination", "check", str(OFFICE), "--json"],
                          stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, cwd=ROOT,
                          timeout=120, check=False, preexec_fn=lambda: os.close(1))
    assert proc.returncode in (0, 1)
    assert b"Traceback" not in proc.stderr
