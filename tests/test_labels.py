"""Device labels are the standards' designations or words of our own, never a letter code glued
to a rating (issue: labels of adjustable breakers built from the trade's own words).

MCBs and fuse-links keep their standard designations: IEC 60898-1 types B, C, D with the rated
current ("B32"), IEC 60269-1 utilisation category gG with the rated current ("gG100"). Every
other printed device label starts with a word (the kind of device) and names its settings as IEC
60947-2 does (Ir, tr, Isd, tsd, Ii). The examples are invented installations.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from coordination import choose, engine, faults, study, tables
from coordination.cli import app
from coordination.devices import band_for, compact_labels
from coordination.plot import plot_circuit
from coordination.report import _column_chars, _device_table, _pair_table, _row_lines
from curves.breaker import (
    BREAKER_RATINGS_A,
    ELECTRONIC_II_X,
    ELECTRONIC_IR_FRACTIONS,
    II_X,
    ISD_X,
    TM_IR_FRACTIONS,
    TR_S,
    TSD_S,
    breaker_label,
    electronic_band,
    thermal_magnetic_band,
)
from curves.spec import band_from_spec, device_label

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
NAMES = ("small-shop.toml", "office-building.toml")

#: The standards' own designations (IEC 60898-1 types B/C/D; IEC 60269-1 gG), which stay.
STANDARD_DESIGNATION = re.compile(r"^(?:[BCD]|gG|aM)\d+(?:\.\d+)?$")
#: A bare letter code followed by a rating, as a maker's catalogue might write it ("X250 ...").
LETTER_CODE_AND_RATING = re.compile(r"^[A-Za-z]{1,3}\s?\d")


def assert_our_own(label: str) -> None:
    """A standard designation, or a label that does not start with a letter code and a rating."""
    assert label, "an empty device label"
    if STANDARD_DESIGNATION.match(label):
        return
    assert not LETTER_CODE_AND_RATING.match(label), label


def test_the_pattern_catches_letter_codes_and_passes_standard_designations():
    # the test's own tool must be able to fail
    for bad in ("TM250 Ir=200A Ii=10In", "E1600 Ir=1440A", "XY 630", "Q16"):
        with pytest.raises(AssertionError):
            assert_our_own(bad)
    for good in ("B32", "C16", "D10", "gG100", "thermal-magnetic 250 A, Ir 200 A",
                 "electronic 1600 A, Ir 1440 A", "datasheet 630 A"):
        assert_our_own(good)


@pytest.fixture(scope="module", params=NAMES)
def example(request):
    s = study.load(EXAMPLES / request.param)
    levels = faults.compute(s)
    return request.param, s, levels, engine.analyse(s, levels)


def _printed_labels(s, levels, analysis) -> list[str]:
    """Every device label that the tables, the JSON, the report and the text print."""
    labels = [band_for(s, c.id).name for c in s.circuits]
    labels += list(compact_labels(s).values())
    pairs = analysis.to_json()["pairs"]
    labels += [p[k] for p in pairs for k in ("upstream_device", "downstream_device")]
    register = _device_table(s, None)
    labels += [row[2] for row in register.rows]
    for row in _pair_table(s, analysis).rows:
        labels += row[2].split(" / ")
    return labels


def test_no_printed_device_label_of_the_examples_starts_with_a_letter_code(example):
    _, s, levels, analysis = example
    labels = _printed_labels(s, levels, analysis)
    assert len(labels) > 4 * len(s.circuits)
    for label in labels:
        assert_our_own(label)


def test_the_terminal_table_shows_the_compact_labels(example):
    _, s, levels, analysis = example
    text = tables.pair_table(s, levels, analysis)
    compact = compact_labels(s)
    # the device column: each circuit's compact label follows its id on its first row
    for c in s.circuits:
        if analysis.for_circuit(c.id):
            assert re.search(rf"^{re.escape(c.id)}\s+{re.escape(compact[c.id])}\s", text,
                             re.MULTILINE), c.id
    # no cell of the device or upstream columns reads like a catalogue code
    for inner in re.findall(r"\(([^()]*)\)", text):
        device = inner.split(" x ", 1)[-1]  # "7 x gG100" for a run of alike devices
        assert_our_own(device)


def test_the_office_breakers_read_as_their_settings():
    # office-building.toml: an electronic incomer In 1600 A, Ir 0.9 In, tr 12 s, Isd 4 Ir,
    # tsd 0.3 s, instantaneous release off; a thermal-magnetic 250 A plant-room breaker at
    # Ir 0.8 In with Ii 10 In. The labels spell the kind and IEC 60947-2's setting names.
    s = study.load(EXAMPLES / "office-building.toml")
    incomer = band_for(s, "incomer")
    assert incomer.name == "electronic 1600 A, Ir 1440 A, tr 12 s, Isd 4 Ir, tsd 0.3 s"
    assert device_label(incomer, compact=True) == "electronic 1600 A, Ir 1440 A"
    plant = band_for(s, "sm-plant")
    assert plant.name == "thermal-magnetic 250 A, Ir 200 A, Ii 10 In"
    assert compact_labels(s)["sm-plant"] == "thermal-magnetic 250 A, Ir 200 A"


def test_the_plot_key_names_the_breakers_in_words():
    s = study.load(EXAMPLES / "office-building.toml")
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    below_plant = s.children["sm-plant"][0]
    fig = plot_circuit(s, levels, analysis, below_plant)
    texts = [t.get_text() for t in fig.axes[0].get_legend().get_texts()]
    keys = [t.split(": ", 1)[1].rsplit(" (", 1)[0] for t in texts if t.startswith(
        (below_plant, "sm-plant", "incomer"))]
    assert "thermal-magnetic 250 A, Ir 200 A, Ii 10 In" in keys
    for key in keys:
        assert_our_own(key)


@pytest.mark.parametrize(("circuit", "kind"), [("incomer", "electronic"),
                                               ("sm-plant", "thermal-magnetic")])
def test_the_chooser_answers_in_words(circuit, kind):
    s = study.load(EXAMPLES / "office-building.toml")
    result = choose.choose(s, circuit)
    if result.found:
        assert (result.name or "").startswith(f"{kind} ")
        assert_our_own(result.name or "")
    text = choose.format_results([result])
    # every breaker it names (the answer, candidates given as examples, alternatives) in words
    assert kind in text
    assert not re.search(r"\b(?:TM|E)\d", text), text
    for named in re.findall(r"\(e\.g\. ([^)]*)\)", text):
        assert_our_own(named)


def test_times_json_names_the_device_in_words():
    spec = ("{family = 'electronic', In_a = 630, Ir_x = 0.8, tr_s = 8, Isd_x = 6, tsd_s = 0.2, "
            "sd_i2t = true, Ii_x = 12}")
    result = CliRunner().invoke(app, ["times", spec, "--current", "5000", "--json"])
    assert result.exit_code == 0, result.output
    device = json.loads(result.stdout)["device"]
    assert device == "electronic 630 A, Ir 504 A, tr 8 s, Isd 6 Ir, tsd 0.2 s, I2t ramp, Ii 12 In"


def test_standard_designations_are_kept():
    # IEC 60898-1 types and IEC 60269-1 gG: the trade's shorthand is the standards' own
    for spec in ("B32", "C16", "D10", "gG100"):
        band = band_from_spec(spec)
        assert band.name == spec
        assert device_label(band, compact=True) == spec


def test_an_electronic_unit_without_short_time_or_instantaneous_says_only_what_it_has():
    band = electronic_band(In_a=400, Ir_x=1.0, tr_s=4, Ii_x="off")
    assert band.name == "electronic 400 A, Ir 400 A, tr 4 s"
    assert "Isd" not in band.name and "Ii" not in band.name


@settings(max_examples=40, deadline=None)
@given(rating=st.sampled_from(BREAKER_RATINGS_A), ir_x=st.sampled_from(TM_IR_FRACTIONS),
       ii_x=st.sampled_from(II_X))
def test_thermal_magnetic_label_for_any_setting(rating, ir_x, ii_x):
    band = thermal_magnetic_band(In_a=rating, Ir_x=ir_x, Ii_x=ii_x)
    compact = device_label(band, compact=True)
    assert band.name.startswith(compact + ", ")
    assert compact == f"thermal-magnetic {rating:g} A, Ir {ir_x * rating:g} A"
    assert band.name.endswith(f", Ii {ii_x:g} In")
    assert_our_own(band.name)


@settings(max_examples=40, deadline=None)
@given(rating=st.sampled_from(BREAKER_RATINGS_A), ir_x=st.sampled_from(ELECTRONIC_IR_FRACTIONS),
       tr=st.sampled_from(TR_S), isd_x=st.sampled_from(ISD_X), tsd=st.sampled_from(TSD_S),
       ramp=st.booleans(), ii_x=st.sampled_from((*ELECTRONIC_II_X, "off")))
def test_electronic_label_for_any_setting(rating, ir_x, tr, isd_x, tsd, ramp, ii_x):
    ir = ir_x * rating
    if ii_x != "off" and isd_x * ir > ii_x * rating:
        ii_x = "off"  # Isd above Ii is refused; the unit then has no instantaneous release
    band = electronic_band(In_a=rating, Ir_x=ir_x, tr_s=tr, Isd_x=isd_x, tsd_s=tsd,
                           sd_i2t=ramp, Ii_x=ii_x)
    expected = [f"electronic {rating:g} A", f"Ir {ir:g} A", f"tr {tr:g} s", f"Isd {isd_x:g} Ir",
                f"tsd {tsd:g} s"] + (["I2t ramp"] if ramp else []) + (
                   [] if ii_x == "off" else [f"Ii {ii_x:g} In"])
    assert band.name.split(", ") == expected
    assert breaker_label(band.family, band.settings, compact=True) == ", ".join(expected[:2])
    assert_our_own(band.name)


def test_the_examples_readme_quotes_the_labels_as_printed():
    s = study.load(EXAMPLES / "office-building.toml")
    readme = " ".join((EXAMPLES / "README.md").read_text(encoding="utf-8").split())
    compact = compact_labels(s)
    for circuit in ("incomer", "sm-plant"):
        assert f"`{band_for(s, circuit).name}`" in readme
        assert f"`{compact[circuit]}`" in readme


def test_the_report_pair_table_shows_each_compact_label_whole():
    # the devices cell wraps rather than cut a label short; a number keeps its unit on its line
    s = study.load(EXAMPLES / "office-building.toml")
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    spec = _pair_table(s, analysis)
    chars = _column_chars(spec)
    compact = compact_labels(s)
    assert len(spec.rows) == len(analysis.pairs)
    for row, pair in zip(spec.rows, analysis.pairs, strict=True):
        lines = _row_lines(spec, row, chars)[2]
        assert all(len(line) <= chars[2] and "\u2026" not in line for line in lines)
        shown = " ".join(lines).replace("\u00a0", " ")
        assert shown == f"{compact[pair.downstream]} / {compact[pair.upstream]}"
        assert not any(re.match(r"^(?:A|s)\b", line) for line in lines[1:]), lines
