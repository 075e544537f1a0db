"""Device specs: shorthand and inline tables to bands, and the errors a user sees."""

from __future__ import annotations

import pytest

from curves.errors import InputError
from curves.spec import FAMILY_KEYS, band_from_spec, parse_inline

TM = {"family": "tm", "In_a": 250, "Ir_x": 0.8, "Ii_x": 10}
ELECTRONIC = {"family": "electronic", "In_a": 630, "Ir_x": 0.8, "tr_s": 8, "Isd_x": 6,
              "tsd_s": 0.2, "Ii_x": 12}
# Invented datasheet curve.
DATASHEET = {"family": "datasheet", "name": "invented feeder", "In_a": 630,
             "lower": [[700, 3000], [6000, 0.05]], "upper": [[820, 7200], [7000, 0.08]]}


# -- parse_inline ------------------------------------------------------------------------------
# Our design: text starting with "{" is an inline TOML table, else trade shorthand.
@pytest.mark.parametrize(("text", "expected"), [
    ("B32", "B32"),
    ("  gG100 \n", "gG100"),
    ("{family = 'tm', In_a = 250, Ir_x = 0.8}", {"family": "tm", "In_a": 250, "Ir_x": 0.8}),
    (" {family = \"datasheet\", In_a = 10, lower = [[1, 2], [3, 1]]} ",
     {"family": "datasheet", "In_a": 10, "lower": [[1, 2], [3, 1]]}),
])
def test_parse_inline(text, expected):
    assert parse_inline(text) == expected


# Our design: empty text and broken TOML tables are refused on one line.
@pytest.mark.parametrize("text", ["", "   ", "{family = 'tm', In_a = }", "{family = 'tm'",
                                  "{family = 'tm' In_a = 250}"])
def test_parse_inline_refuses_bad_text(text):
    with pytest.raises(InputError) as info:
        parse_inline(text)
    assert "\n" not in str(info.value)


# -- shorthand ---------------------------------------------------------------------------------
# IEC 60898-1, instantaneous bands (confirmed): the lower instantaneous multiple is B 3 In,
# C 5 In, D 10 In; shorthand MCBs are class 3, Icn 6 kA (our default).
@pytest.mark.parametrize(("text", "curve_type", "rating", "inst_x"), [
    ("B32", "B", 32, 3), ("C16", "C", 16, 5), ("D10", "D", 10, 10), ("c6", "C", 6, 5),
])
def test_mcb_shorthand(text, curve_type, rating, inst_x):
    band = band_from_spec(text)
    assert band.family == "mcb"
    assert band.rating_a == rating
    assert band.instantaneous_a == pytest.approx(inst_x * rating, rel=1e-12)
    assert band.breaking_capacity_a == pytest.approx(6000.0, rel=1e-12)
    assert band.basis == "typical"


# Common practice: trade shorthand with the breaking capacity in kA; the values are IEC 60898-1
# standard values of Icn (from memory).
@pytest.mark.parametrize(("text", "capacity_a"), [("C16 10kA", 10000.0), ("B32/4.5kA", 4500.0),
                                                  ("D10, 15kA", 15000.0), ("B6 25kA", 25000.0)])
def test_mcb_shorthand_with_breaking_capacity(text, capacity_a):
    assert band_from_spec(text).breaking_capacity_a == pytest.approx(capacity_a, rel=1e-12)


# IEC 60898-1 standard values of rated short-circuit capacity Icn: 1500, 3000, 4500, 6000,
# 10 000, 15 000, 20 000, 25 000 A (from memory); any other value is refused with key icn_a.
@pytest.mark.parametrize("spec", [
    {"family": "mcb", "type": "B", "In_a": 32, "icn_a": 7000},
    {"family": "mcb", "type": "C", "In_a": 16, "icn_a": 50000},
    {"family": "mcb", "type": "C", "In_a": 10, "energy_class": 2, "icn_a": 12500},
    "B32 7kA",
    "C16/5kA",
])
def test_non_standard_icn_is_refused(spec):
    with pytest.raises(InputError) as info:
        band_from_spec(spec)
    assert info.value.key == "icn_a"
    message = str(info.value)
    assert "\n" not in message
    assert "allowed: 1500, 3000, 4500, 6000, 10000, 15000, 20000, 25000 A" in message


def test_gg_shorthand():
    band = band_from_spec("gG100", basis="envelope")
    assert (band.family, band.rating_a, band.basis) == ("gG", 100, "envelope")
    assert band_from_spec("gG100/80kA").breaking_capacity_a == pytest.approx(80000.0, rel=1e-12)


def test_shorthand_and_table_give_the_same_band():
    table = {"family": "mcb", "type": "C", "In_a": 16, "energy_class": 3, "icn_a": 6000}
    assert band_from_spec(table) == band_from_spec("C16")
    assert band_from_spec({"family": "gG", "In_a": 63}) == band_from_spec("gG63")


# Common practice: trade shorthand; ratings outside the series and unknown letters are refused.
@pytest.mark.parametrize(("text", "key"), [
    ("B33", "In_a"),  # not in the MCB series (IEC 60898-1 ratings, common practice)
    ("gG99", "In_a"),
    ("X32", None),
    ("B", None),
    ("32", None),
    ("B32 kA", None),
])
def test_bad_shorthand(text, key):
    with pytest.raises(InputError) as info:
        band_from_spec(text)
    assert info.value.key == key
    assert "allowed" in str(info.value) or "give" in str(info.value)


# -- inline tables -----------------------------------------------------------------------------
# Our design: inline tables for IEC 60947-2 breakers, with the trade terms for settings.
@pytest.mark.parametrize(("spec", "family"), [
    (TM, "breaker-tm"), (ELECTRONIC, "breaker-electronic"),
    ({**TM, "family": "breaker-tm"}, "breaker-tm"),
    ({"family": "electronic", "In_a": 400, "Ii_x": "off"}, "breaker-electronic"),
])
def test_breaker_tables(spec, family):
    band = band_from_spec(spec, basis="envelope")
    assert (band.family, band.basis) == (family, "envelope")


def test_breaker_settings_round_trip():
    # the settings a band reports are keys its family takes, and rebuild the same band
    for spec in (TM, ELECTRONIC, {**ELECTRONIC, "sd_i2t": True, "icu_a": 50000}):
        band = band_from_spec(spec)
        assert set(band.settings) <= set(FAMILY_KEYS[spec["family"]])
        assert band_from_spec({"family": spec["family"], **band.settings}) == band


def test_inline_text_is_accepted_by_band_from_spec():
    text = "{family = 'tm', In_a = 250, Ir_x = 0.8, Ii_x = 10}"
    assert band_from_spec(text) == band_from_spec(TM)


# Our design: a datasheet device has its own basis, whatever the study asks.
@pytest.mark.parametrize("basis", ["typical", "envelope", "datasheet"])
def test_datasheet_basis_whatever_is_asked(basis):
    band = band_from_spec(DATASHEET, basis=basis)
    assert (band.family, band.basis, band.name) == ("datasheet", "datasheet", "invented feeder")


# Our design: bad tables name the key and what is allowed; the grids and series are
# IEC 60947-2 / IEC 60898-1 / IEC 60269 values or common practice, as in curves/.
@pytest.mark.parametrize(("spec", "key", "words"), [
    ({"In_a": 250}, "family", ["allowed", "tm"]),
    ({"family": "tmm", "In_a": 250}, "family", ["did you mean 'tm'"]),
    ({"family": "electronics", "In_a": 250}, "family", ["did you mean 'electronic'"]),
    ({"family": 3, "In_a": 250}, "family", ["string"]),
    ({**TM, "Ir": 0.8}, "Ir", ["did you mean 'Ir_x'", "allowed"]),
    ({**ELECTRONIC, "tsd": 0.2}, "tsd", ["did you mean 'tsd_s'"]),
    ({**ELECTRONIC, "isd_x": 6}, "isd_x", ["did you mean 'Isd_x'"]),
    ({**DATASHEET, "lowr": [[1, 2], [2, 1]]}, "lowr", ["did you mean 'lower'"]),
    ({"family": "tm"}, "In_a", ["needs"]),
    ({"family": "datasheet", "In_a": 10, "lower": [[1, 2], [3, 1]]}, "upper", ["needs"]),
    ({**TM, "In_a": "250"}, "In_a", ["number"]),
    ({**TM, "In_a": True}, "In_a", ["number"]),
    ({**TM, "Ir_x": float("nan")}, "Ir_x", ["finite positive"]),
    ({**TM, "icu_a": float("inf")}, "icu_a", ["finite positive"]),
    ({**TM, "In_a": -250}, "In_a", ["finite positive"]),
    ({**TM, "In_a": 251}, "In_a", ["allowed", "1600"]),
    ({**TM, "Ir_x": 0.73}, "Ir_x", ["allowed", "0.75"]),
    ({**ELECTRONIC, "Ir_a": 700}, "Ir_a", ["allowed", "630"]),
    ({**ELECTRONIC, "tr_s": 9}, "tr_s", ["allowed", "24"]),
    ({**ELECTRONIC, "Isd_x": 10, "Ii_x": 5}, "Isd_x", ["Ii"]),
    ({**ELECTRONIC, "sd_i2t": "yes"}, "sd_i2t", ["true or false"]),
    ({"family": "mcb", "type": "K", "In_a": 16}, "type", ["B", "C", "D"]),
    ({"family": "mcb", "type": "C", "In_a": 16, "energy_class": 4}, "energy_class", ["1, 2"]),
    ({"family": "mcb", "type": "C", "In_a": 17}, "In_a", ["allowed"]),
    ({"family": "mcb", "type": "C", "In_a": 16, "icn": 6000}, "icn", ["did you mean 'icn_a'"]),
    ({"family": "gG", "In_a": 100, "breaking_capacity_a": 0}, "breaking_capacity_a",
     ["finite positive"]),
    ({**DATASHEET, "upper": [[820, 7200], [7000, 0.01]]}, "lower", ["above the upper"]),
])
def test_table_errors_name_key_and_what_is_allowed(spec, key, words):
    with pytest.raises(InputError) as info:
        band_from_spec(spec)
    assert info.value.key == key
    message = str(info.value)
    assert "\n" not in message
    for word in words:
        assert word in message


# Our design: the two bases are "typical" and "envelope", spelled so.
@pytest.mark.parametrize("basis", ["nominal", "", None, "Typical"])
def test_unknown_basis(basis):
    with pytest.raises(InputError, match="typical, envelope"):
        band_from_spec(TM, basis=basis)


def test_datasheet_basis_refused_for_standard_devices():
    with pytest.raises(InputError, match="datasheet"):
        band_from_spec(TM, basis="datasheet")


# Our design: a spec is text or a table, nothing else.
@pytest.mark.parametrize("spec", [32, None, ["B32"]])
def test_spec_of_the_wrong_type(spec):
    with pytest.raises(InputError, match="text or a table"):
        band_from_spec(spec)


def test_error_keys_take_the_study_prefix():
    # the study layer prefixes "device"; our key is relative to the device table
    with pytest.raises(InputError) as info:
        band_from_spec({**TM, "Ir_x": 0.73})
    assert str(info.value.within(circuit="c1", key="device")).startswith(
        "circuit 'c1', key 'device.Ir_x'")
