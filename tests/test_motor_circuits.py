"""Motor circuits through the whole tool: the study file's motor and inrush tables, the starting
check, the overload check from the relay, the chooser, the plot and the report. The plant-room
example and the studies here are invented installations."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from coordination import checks, faults, study
from coordination.choose import choose
from coordination.devices import band_for
from coordination.pipeline import assess
from coordination.plot import plot_circuit

PLANT = Path(__file__).resolve().parents[1] / "examples" / "plant-room.toml"

HEAD = """
[supply]
u0_v = 230
phases = 3
earthing = "TN-C-S"
pfc_a = 9000
ze_ohm = 0.12

[[circuit]]
id = "main"
from = "supply"
device = "gG125"
load_a = 90
"""


def one_motor(device: str, motor: str, cable: str = "") -> study.Study:
    return study.loads(HEAD + f"""
[[circuit]]
id = "m"
from = "main"
device = {device}
motor = {motor}
{cable}""")


@pytest.fixture(scope="module")
def plant():
    s = study.load(PLANT)
    return s, assess(s)


def starting_of(results, cid):
    found = [r for r in results if r.circuit == cid and r.check == "starting"]
    assert len(found) == 1
    return found[0]


# the cases, in the invented plant room: a D32 that fails a 6 s start and one that
# carries a smaller motor's; an aM25 with a class 10 relay that passes a 3 s start and fails a
# 12 s one (IEC 60947-4-1: 4 s < Tp <= 10 s at 7.2 Ir)
@pytest.mark.parametrize(("cid", "ok"), [("dust-extractor", False), ("saw-fan", True),
                                         ("planer", True), ("chipper", False),
                                         ("compressor", True), ("tool-tx", True)])
def test_plant_room_starts(plant, cid, ok):
    _, result = plant
    r = starting_of(result.checks, cid)
    assert r.ok is ok
    assert r.basis == "typical"
    assert (r.value <= r.limit) is ok


def test_the_relay_binds_the_twelve_second_start_and_says_which_class_to_take(plant):
    _, result = plant
    r = starting_of(result.checks, "chipper")
    assert r.details["binding_circuit"] == "chipper"
    assert "higher trip class" in r.reason


def test_circuits_without_a_motor_have_no_starting_check(plant):
    _, result = plant
    assert not [r for r in result.checks if r.circuit == "plant-main" and r.check == "starting"]


def test_the_start_passes_through_the_devices_above_with_their_load():
    s = one_motor('"gG63"', '{ flc_a = 40, start_x = 7, start_s = 10, '
                  'starting = "star-delta" }')
    r = starting_of(checks.run(s, faults.compute(s)), "m")
    assert r.ok
    # the whole start through a gG125 already carrying its board's 90 A
    chain = checks.starting_chain(s, "m")
    assert [c.circuit for c in chain] == ["m", "main"] and chain[1].running_a == 90.0


def test_an_upstream_device_that_trips_on_the_start_fails_the_circuit():
    s = study.loads(HEAD.replace('"gG125"', '"D32"').replace("load_a = 90", "load_a = 10") + """
[[circuit]]
id = "m"
from = "main"
device = "gG63"
motor = { flc_a = 25, start_x = 7, start_s = 8 }
""")
    r = starting_of(checks.run(s, faults.compute(s)), "m")
    assert not r.ok and r.details["binding_circuit"] == "main"


def test_motor_flc_is_the_design_current_when_load_a_is_absent():
    s = one_motor('"aM25"', '{ flc_a = 20, start_x = 6, start_s = 3, relay_class = "10" }')
    assert s.by_id["m"].load_a == 20.0
    assert s.by_id["m"].motor.relay_ir_a == 20.0


# IEC 60947-4-1: trip within 2 h at 1.2 Ir, so the relay's I2 is 1.2 Ir, and its In is Ir
# (IEC 60364-4-43, 433.1: Ib <= In <= Iz, I2 <= 1.45 Iz)
def test_overload_is_taken_from_the_relay():
    cable = "[circuit.cable]\nlength_m = 10\ncsa_mm2 = 4\niz_a = 19"
    s = one_motor('"aM25"', '{ flc_a = 18, start_x = 6, start_s = 3, relay_class = "10", '
                  'relay_ir_a = 18 }', cable)
    r = [x for x in checks.run(s, faults.compute(s)) if x.circuit == "m" and x.check == "overload"]
    assert r[0].ok
    assert r[0].details["in_a"] == 18.0 and r[0].details["i2_a"] == pytest.approx(1.2 * 18.0)
    assert "1.2 Ir" in r[0].reason


def test_an_am_fuse_link_alone_is_no_overload_protection():
    s = study.loads(HEAD + '\n[[circuit]]\nid = "m"\nfrom = "main"\ndevice = "aM25"\n')
    r = [x for x in checks.run(s, faults.compute(s)) if x.circuit == "m" and x.check == "overload"]
    assert len(r) == 1 and not r[0].ok and "no overload protection" in r[0].reason


def test_the_motor_circuit_is_paired_with_the_relay_and_its_device():
    s = one_motor('"aM25"', '{ flc_a = 20, start_x = 6, start_s = 3, relay_class = "10" }')
    band = band_for(s, "m")
    assert band.family == "motor-circuit" and "aM25" in band.name
    pair = next(p for p in assess(s).analysis.pairs if p.downstream == "m")
    assert pair.upstream == "main"


def test_the_chooser_picks_an_am_fuse_link_with_the_relay_and_honours_the_start():
    s = one_motor('"aM63"', '{ flc_a = 20, start_x = 7.2, start_s = 3, relay_class = "10" }',
                  "[circuit.cable]\nlength_m = 10\ncsa_mm2 = 4\niz_a = 32")
    c = choose(s, "m")
    assert c.found and c.family == "aM"
    assert isinstance(c.device, str) and c.device.startswith("aM")
    assert c.rating_a >= 20.0  # the fuse-link's In, not the relay's Ir
    # the start itself still holds with the chosen fuse-link
    chosen = study.loads(HEAD + f"""
[[circuit]]
id = "m"
from = "main"
device = "{c.device}"
motor = {{ flc_a = 20, start_x = 7.2, start_s = 3, relay_class = "10" }}
""")
    assert starting_of(checks.run(chosen, faults.compute(chosen)), "m").ok


def test_the_chooser_refuses_a_smaller_fuse_link_that_melts_during_an_inrush(plant):
    s, _ = plant
    c = choose(s, "tool-tx")
    assert c.found and c.binding is not None and c.binding.startswith("starting")


def test_the_plot_draws_the_start_and_its_first_peak(plant):
    s, result = plant
    ax = plot_circuit(s, result.levels, result.analysis, "chipper").axes[0]
    gids = {line.get_gid() for line in ax.lines}
    assert {"starting:line", "starting:peak"} <= gids
    peak = next(line for line in ax.lines if line.get_gid() == "starting:peak")
    assert float(peak.get_xdata()[0]) == pytest.approx(2.0 * 144.0)


def test_check_json_carries_the_starting_rows(cli):
    out = cli("check", str(PLANT), "--json")
    assert out.exit_code == 1
    rows = [r for r in json.loads(out.stdout)["checks"] if r["check"] == "starting"]
    assert {r["circuit"] for r in rows} == {"dust-extractor", "saw-fan", "planer", "chipper",
                                            "compressor", "tool-tx"}
    for r in rows:
        assert r["unit"] in ("s", "A")
        assert r["peak_x"] in (1.0, 2.0)
        assert math.isclose(r["peak_a"], r["peak_x"] * r["start_current_a"])


def test_the_report_lists_the_starts(tmp_path, cli):
    pypdf = pytest.importorskip("pypdf")
    out = tmp_path / "plant.pdf"
    assert cli("report", str(PLANT), "-o", str(out)).exit_code == 1
    text = "\n".join(page.extract_text() for page in pypdf.PdfReader(out).pages)
    assert "Motor starts and inrush" in text and "IEC 60947-4-1" in text
    assert "chipper" in text and "2.0 times the r.m.s. start current" in text


@pytest.mark.parametrize(("motor", "key"), [
    ("{ flc_a = 20, start_x = 6 }", "motor.start_s"),
    ("{ flc_a = 20, start_x = 0.5, start_s = 3 }", "motor.start_x"),
    ('{ flc_a = 20, start_x = 6, start_s = 3, relay_class = "15" }', "motor.relay_class"),
    ('{ flc_a = 20, start_x = 6, start_s = 3, starting = "wye" }', "motor.starting"),
])
def test_a_bad_motor_table_is_one_line_naming_circuit_and_key(cli_process, tmp_path, motor, key):
    path = tmp_path / "bad.toml"
    path.write_text(HEAD + f'\n[[circuit]]\nid = "m"\nfrom = "main"\ndevice = "aM25"\n'
                           f"motor = {motor}\n", encoding="utf-8")
    done = cli_process("check", path, text=True)
    assert done.returncode == 2 and done.stdout == ""
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and "circuit 'm'" in lines[0] and f"key '{key}'" in lines[0]


def test_an_inrush_needs_the_load_it_multiplies():
    with pytest.raises(Exception) as error:
        study.loads(HEAD + '\n[[circuit]]\nid = "t"\nfrom = "main"\ndevice = "gG40"\n'
                           "inrush = { x = 12, s = 0.1 }\n")
    assert "load_a" in str(error.value) and "'inrush'" in str(error.value)
