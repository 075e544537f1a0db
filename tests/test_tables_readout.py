"""The terminal tables a designer reads: widths, near-limit results, the comparison that binds.

The installations are the invented examples and hand-made results.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from coordination import checks, engine, faults, study, tables
from coordination.checks import CheckResult
from coordination.text import TERMINAL_COLUMNS, table

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


@pytest.fixture(scope="module", params=sorted(p.name for p in EXAMPLES.glob("*.toml")))
def example(request):
    s = study.load(EXAMPLES / request.param)
    levels = faults.compute(s)
    return s, levels, engine.analyse(s, levels), checks.run(s, levels)


def _result(check: str, value: float, limit: float, ok: bool = True, **details) -> CheckResult:
    return CheckResult("c1", check, ok, value, limit, "A" if check != "fault-energy" else "mm2",
                       "the reason", "envelope", details)


def test_every_line_fits_the_terminal(example):
    s, levels, analysis, results = example
    for text in (tables.pair_table(s, levels, analysis), tables.check_table(results),
                 tables.pair_table(s, levels, analysis, unmet_only=True),
                 tables.check_table(results, attention_only=True)):
        assert max(len(line) for line in text.splitlines()) <= TERMINAL_COLUMNS


def test_numbers_never_wrap_only_the_text_column():
    rows = [["a", "a long upstream description of many words", "12.5"]]
    text = table(["circuit", "above", "Is kA"], rows, "llr", width=30, wrap=1)
    lines = text.splitlines()
    assert len(lines) > 3  # the text column wrapped
    assert lines[2].endswith("12.5") and all("12.5" not in line for line in lines[3:])
    assert all(len(line) <= 30 for line in lines)
    # between words: every word of the cell is whole on some line
    for word in rows[0][1].split():
        assert any(re.search(rf"\b{word}\b", line) for line in lines)


def test_unmet_only_lists_exactly_the_unmet_pairs(example):
    s, levels, analysis, _ = example
    text = tables.pair_table(s, levels, analysis, unmet_only=True)
    rows = [line for line in text.splitlines() if re.search(r"\s(yes|NO)\s", line)]
    assert len(rows) == sum(1 for p in analysis.pairs if not p.ok)
    assert all(" NO " in row for row in rows)
    # the summary line still counts every pair
    assert text.splitlines()[-1] == tables.pair_table(s, levels, analysis).splitlines()[-1]


def test_margin_and_near_limit():
    # the margin is the share of the limit to spare; near limit within 5 % (our own threshold)
    assert tables.check_margin(_result("breaking-capacity", 5700.0, 6000.0)) == pytest.approx(0.05)
    assert not tables.near_limit(_result("breaking-capacity", 5700.0, 6000.0))
    assert tables.near_limit(_result("breaking-capacity", 5800.0, 6000.0))
    failing = _result("breaking-capacity", 6100.0, 6000.0, ok=False)
    assert not tables.near_limit(failing)  # a failure is a failure, not near its limit
    assert tables.check_status(failing) == "FAIL"
    assert tables.check_margin(_result("breaking-capacity", 1.0, float("nan"))) is None


def test_disconnection_reads_zs_against_max_zs():
    r = CheckResult("c1", "disconnection", True, 0.1, 0.4, "s", "reason", "envelope",
                    {"zs_ohm": 1.3, "zs_max_ohm": 1.37})
    assert tables.check_cells(r) == ("Zs 1.30 ohm", "max 1.37 ohm")
    # the margin is the loop's: 1 - 1.3 / 1.37, about 5.1 %, not the time's 75 %
    assert tables.check_margin(r) == pytest.approx(1 - 1.3 / 1.37)
    assert not tables.near_limit(r)
    closer = CheckResult("c1", "disconnection", True, 0.1, 0.4, "s", "reason", "envelope",
                         {"zs_ohm": 1.33, "zs_max_ohm": 1.37})
    assert tables.near_limit(closer)


def test_overload_names_the_comparison_that_binds():
    r = _result("overload", 46.4, 59.5, binding="I2 <= 1.45 Iz")
    assert tables.check_cells(r) == ("I2 46.4 A", "1.45 Iz 59.5 A")
    r = _result("overload", 32.0, 32.0, binding="In <= Iz")
    assert tables.check_cells(r) == ("In 32 A", "Iz 32 A")


def test_attention_shows_failures_and_near_limits_with_their_reasons(example):
    _, _, _, results = example
    text = tables.check_table(results, attention_only=True)
    wanted = [r for r in results if not r.ok or tables.near_limit(r)]
    shown = [line for line in text.splitlines() if re.search(r"\s(near limit|FAIL)\s", line)]
    assert len(shown) == len(wanted)
    for r in wanted:  # each reason under its row, wrapped to the terminal
        first_words = " ".join(r.reason.split()[:4])
        assert first_words in text
    every = tables.check_table(results)
    assert len(every.splitlines()) > len(text.splitlines())
    assert every.splitlines()[-1] == text.splitlines()[-1]


def test_a_disconnection_an_rcd_makes_reads_as_its_time():
    # the circuit's overcurrent device alone would not disconnect (Zs over its max); the RCD does
    r = CheckResult("c1", "disconnection", True, 0.04, 0.2, "s", "reason", "envelope",
                    {"zs_ohm": 21.4, "zs_max_ohm": 1.37, "rcd_device": "RCD 30 mA type A"})
    assert tables.check_cells(r) == ("RCD 40 ms", "max 0.2 s")
    assert tables.check_margin(r) == pytest.approx(0.8)
    assert tables.check_status(r) == "ok"


def test_additional_protection_has_no_margin():
    # a 30 mA RCD against the 30 mA IEC 60364-4-41 411.3.3 names is met, not a near miss
    r = CheckResult("c1", "additional-protection", True, 30.0, 30.0, "mA", "reason", "envelope")
    assert tables.check_margin(r) is None
    assert tables.check_status(r) == "ok"
