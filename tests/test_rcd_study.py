"""RCDs in a study: the keys, RCCBs, and the checks that read them (invented installations)."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from coordination import checks, faults, study
from coordination.devices import band_for
from curves.errors import InputError

TT_SUPPLY = """
[supply]
u0_v = 230
phases = 1
earthing = "TT"
pfc_a = 2000
ze_ohm = 21
{ra}
"""

HEAD = """
[[circuit]]
id = "main"
from = "supply"
device = "gG63"
{main_rcd}
"""

FINAL = """
[[circuit]]
id = "{cid}"
from = "{parent}"
{device}
{extra}
[circuit.cable]
length_m = 20
csa_mm2 = 2.5
cpc_mm2 = 1.5
iz_a = 27
"""


def tt_study(*finals: str, ra: str = "ra_ohm = 20", main_rcd: str = "") -> study.Study:
    text = TT_SUPPLY.format(ra=ra) + HEAD.format(main_rcd=main_rcd) + "".join(finals)
    return study.loads(text, source="tt.toml")


def final(cid: str, device: str = 'device = "B20"', extra: str = "",
          parent: str = "main") -> str:
    return FINAL.format(cid=cid, device=device, extra=extra, parent=parent)


def results(s: study.Study) -> dict[tuple[str, str], checks.CheckResult]:
    return {(r.circuit, r.check): r for r in checks.run(s, faults.compute(s))}


def test_a_tt_circuit_without_an_rcd_asks_for_one():
    r = results(tt_study(final("f")))[("f", "disconnection")]
    assert not r.ok and "an RCD is needed" in r.reason


def test_an_rcbo_disconnects_a_tt_earth_fault_and_is_named():
    r = results(tt_study(final("f", extra="rcd = { idn_ma = 30 }")))
    d = r[("f", "disconnection")]
    assert d.ok and "RCD 30 mA" in d.reason and "on this circuit" in d.reason
    assert d.details["rcd_circuit"] == "f"
    assert d.value <= d.limit
    # the earth fault's energy is that of the RCD's clearing, not the MCB's never
    assert r[("f", "fault-energy")].ok


def test_an_rcd_above_disconnects_and_is_named():
    s = tt_study(final("f"), main_rcd="rcd = { idn_ma = 30 }")
    d = results(s)[("f", "disconnection")]
    assert d.ok and "on main" in d.reason


def test_a_slow_rcd_is_said_to_be_too_slow():
    # a 3 A relay delayed 0.5 s cannot clear within the 0.2 s of Table 41.1 (TT, final)
    s = tt_study(final("f", extra="rcd = { idn_ma = 3000, delay_s = 0.5 }"))
    d = results(s)[("f", "disconnection")]
    assert not d.ok and "RCD 3000 mA" in d.reason


def test_touch_voltage_needs_ra_and_fails_above_50_v():
    s = tt_study(final("f", extra="rcd = { idn_ma = 300 }"), ra="ra_ohm = 200")
    r = results(s)[("f", "touch-voltage")]
    assert not r.ok and r.value == pytest.approx(60.0) and r.unit == "V"
    s = tt_study(final("f", extra="rcd = { idn_ma = 30 }"), ra="")
    r = results(s)[("f", "touch-voltage")]
    assert not r.ok and "ra_ohm" in r.reason


def test_additional_protection_of_socket_circuits():
    s = tt_study(final("bare", extra="sockets = true"),
                 final("rcbo", extra="sockets = true\nrcd = { idn_ma = 30 }"),
                 final("coarse", extra="sockets = true\nrcd = { idn_ma = 100 }"),
                 final("big", device='device = "B40"', extra="sockets = true"))
    r = results(s)
    assert not r[("bare", "additional-protection")].ok
    assert r[("rcbo", "additional-protection")].ok
    assert not r[("coarse", "additional-protection")].ok
    assert ("big", "additional-protection") not in r  # above 32 A: outside 411.3.3


def test_leakage_sums_the_circuits_below_an_rcd():
    s = tt_study(final("a", extra="leakage_ma = 4"), final("b", extra="leakage_ma = 5.5"),
                 main_rcd="rcd = { idn_ma = 30 }")
    r = results(s)[("main", "leakage")]
    assert r.value == pytest.approx(9.5) and r.limit == pytest.approx(9.0) and not r.ok


def test_a_tn_study_without_rcds_gets_no_residual_rows():
    s = study.loads("""
[supply]
pfc_a = 6000
ze_ohm = 0.35
phases = 1
[[circuit]]
id = "f"
from = "supply"
device = "B16"
""")
    assert {r.check for r in checks.run(s, faults.compute(s))} <= set(checks.CHECK_NAMES[:4])


def test_an_rcd_saves_a_tn_circuit_whose_loop_is_too_high():
    # IEC 60364-4-41 411.4.5: an RCD may give fault protection in TN
    text = """
[supply]
pfc_a = 6000
ze_ohm = 0.8
phases = 1
[[circuit]]
id = "long"
from = "supply"
device = "B32"
{rcd}
[circuit.cable]
length_m = 120
csa_mm2 = 2.5
cpc_mm2 = 1.5
"""
    plain = study.loads(text.format(rcd=""))
    assert not results(plain)[("long", "disconnection")].ok
    saved = study.loads(text.format(rcd="rcd = { idn_ma = 30 }"))
    d = results(saved)[("long", "disconnection")]
    assert d.ok and "411.4.5" in d.details["source"]


def test_an_rccb_is_protected_by_the_device_above():
    s = tt_study(final("rccb", device="", extra="rcd = { idn_ma = 30 }"),
                 final("f", parent="rccb"))
    assert s.by_id["rccb"].device is None
    assert band_for(s, "rccb").name == band_for(s, "main").name
    r = results(s)
    assert ("rccb", "breaking-capacity") not in r
    assert r[("f", "disconnection")].ok and "on rccb" in r[("f", "disconnection")].reason


@pytest.mark.parametrize(
    ("text", "circuit", "key"),
    [
        (final("x", device="", extra="rcd = { idn_ma = 30 }", parent="supply"), "x", "device"),
        (final("x", extra="rcd = { idn_ma = 25 }"), "x", "rcd.idn_ma"),
        (final("x", extra="rcd = { idn = 30 }"), "x", "rcd.idn"),
        (final("x", extra="rcd = 30"), "x", "rcd"),
        (final("x", extra='sockets = "yes"'), "x", "sockets"),
        (final("x", extra="leakage_ma = -1"), "x", "leakage_ma"),
        (final("x", device="", extra="rcd = { idn_ma = 30 }\nbreaking_capacity_a = 6000"), "x",
         "breaking_capacity_a"),
    ],
)
def test_bad_rcd_input_is_one_line_naming_circuit_and_key(text, circuit, key):
    with pytest.raises(InputError) as err:
        tt_study(text)
    assert err.value.circuit == circuit and err.value.key == key
    assert "\n" not in str(err.value)


def test_ra_ohm_only_in_tt():
    with pytest.raises(InputError) as err:
        study.loads('[supply]\npfc_a = 6000\nze_ohm = 0.35\nra_ohm = 20\n[[circuit]]\nid = "a"\n'
                    'from = "supply"\ndevice = "B16"\n')
    assert err.value.key == "supply.ra_ohm"


def test_choose_proposes_an_rcd_where_disconnection_fails():
    from coordination.choose import choose

    s = tt_study(final("f", extra="load_a = 16\nsockets = true"))
    c = choose(s, "f")
    assert not c.found
    proposed = [t for t in c.suggestions if t.startswith("an RCD on this circuit")]
    # IEC 60364-4-41 411.3.3: socket-outlets up to 32 A get at most 30 mA
    assert proposed and "idn_ma = 30" in proposed[0] and "meets every requirement" in proposed[0]


def test_choose_refuses_an_rccb_and_skips_it_below():
    from coordination.choose import choose

    s = tt_study(final("rccb", device="", extra="rcd = { idn_ma = 30 }"),
                 final("f", parent="rccb", extra="load_a = 10"))
    with pytest.raises(InputError) as err:
        choose(s, "rccb")
    assert err.value.key == "--circuit" and "main" in str(err.value)
    assert choose(s, "main").circuit == "main"


# IEC 60364-5-53 (from memory) with IEC 61008-1 limits: an RCBO of 30 mA under a 100 mA type S
# is selective (by the rule), under a 30 mA general type it is not
@pytest.mark.parametrize(("main_rcd", "verdict", "ok"),
                         [("rcd = { idn_ma = 100, selective = true }", "total", True),
                          ("rcd = { idn_ma = 30 }", "none", False)])
def test_residual_pairs_in_the_analysis_and_its_json(main_rcd, verdict, ok):
    from coordination import engine

    s = tt_study(final("f", extra="rcd = { idn_ma = 30 }"), main_rcd=main_rcd)
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    (pair,) = analysis.residual
    assert (pair.upstream, pair.downstream, pair.verdict, pair.ok) == ("main", "f", verdict, ok)
    assert analysis.ok is (ok and all(p.ok for p in analysis.pairs))
    rows = analysis.to_json()["pairs"]
    assert [r["protection"] for r in rows] == ["overcurrent", "residual"]
    assert rows[1]["verdict"] == verdict and rows[1]["limit_a"] is None
    assert analysis.summary()["pairs"] == 2


def test_an_rccb_is_left_out_of_the_overcurrent_pairs():
    from coordination import engine

    s = tt_study(final("rccb", device="", extra="rcd = { idn_ma = 30 }"),
                 final("f", parent="rccb", extra="rcd = { idn_ma = 10 }"))
    analysis = engine.analyse(s, faults.compute(s))
    assert [(p.upstream, p.downstream) for p in analysis.pairs] == [("main", "f")]
    # but it is an RCD on the path: a 10 mA general type under a 30 mA general type
    assert [(p.upstream, p.downstream, p.verdict) for p in analysis.residual] == [
        ("rccb", "f", "none")]


EXAMPLE_TT = Path(__file__).resolve().parents[1] / "examples" / "orchard-cottage-tt.toml"


def test_check_json_lists_residual_pairs_after_the_overcurrent_ones(cli):
    out = cli("check", str(EXAMPLE_TT), "--json")
    assert out.exit_code == 0
    rows = json.loads(out.stdout)["pairs"]
    kinds = [r["protection"] for r in rows]
    assert set(kinds) == {"overcurrent", "residual"}
    assert kinds == sorted(kinds)  # "overcurrent" rows first
    assert {r["verdict"] for r in rows if r["protection"] == "residual"} == {"total"}


def test_plot_of_an_rccb_is_its_residual_plot(cli, tmp_path):
    out = cli("plot", str(EXAMPLE_TT), "--circuit", "workshop-rccb", "-o",
              str(tmp_path / "rccb.png"))
    assert out.exit_code == 0 and (tmp_path / "rccb.png").stat().st_size > 0


def test_report_of_the_tt_example_has_the_rcds(tmp_path):
    import pypdf

    from coordination.report import write_report

    target = tmp_path / "tt.pdf"
    write_report(study.load(EXAMPLE_TT), target, csv=True)
    text = "\n".join(page.extract_text() for page in pypdf.PdfReader(target).pages)
    assert "residual current" in text and "IEC 61008-1" in text
    assert re.search(r"RCCB 30\s", text)  # the register (its device cell may wrap)
    assert "touch voltage" in text and "IEC 60364-5-53" in text
    pairs_csv = (tmp_path / "tt-pairs.csv").read_text(encoding="utf-8")
    assert pairs_csv.count(",residual") == 4


def test_an_rccb_is_not_credited_with_breaking_a_large_earth_fault():
    # IEC 61008-1 (from memory): an RCCB's rated residual making and breaking capacity IΔm is
    # at least 500 A; above it the overcurrent device must clear the fault (the safe side)
    from coordination.residual import rcds_breaking

    s = tt_study(final("rccb", device="", extra="rcd = { idn_ma = 30 }"),
                 final("f", parent="rccb", extra="rcd = { idn_ma = 10 }"))
    assert [c for c, _ in rcds_breaking(s, "f", 400.0)] == ["f", "rccb"]
    assert [c for c, _ in rcds_breaking(s, "f", 2000.0)] == ["f"]  # the RCBO breaks with its MCB
