"""Protection checks, hand-worked cases that pass and fail, and the exit code of `check`.

Unit cases feed the checks fault levels written by hand (a small stand-in with the fields of
``coordination.faults.NodeFaults`` that the checks read), so each expectation follows from the
standard's numbers alone. The last tests run end to end through ``study.loads`` and
``faults.compute`` and the command line. Every installation here is invented.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from pathlib import Path

import pytest

from coordination import checks, faults, study, tables
from coordination.devices import band_for
from coordination.model import Cable, Circuit, Study, Supply
from curves.band import Band
from curves.mcb import mcb_band

U0 = 230.0
C_MIN = 0.95
EXAMPLE_STUDY = Path(__file__).resolve().parents[1] / "examples" / "small-shop.toml"


@dataclass(frozen=True)
class Node:
    """Stand-in for coordination.faults.NodeFaults: only the fields the checks read."""

    circuit: str
    ik3_max_a: float
    ik1_max_a: float
    ik_max_a: float
    ief_min_a: float
    zs_ohm: float
    ik_min_end_a: float
    ief_max_board_a: float | None = None


@dataclass(frozen=True)
class Levels:
    by_circuit: dict


def node(cid: str = "c1", *, zs_ohm: float = 1.0, ik1_a: float = 3000.0, ik3_a: float = 3000.0,
         ik_min_end_a: float | None = None, ief_min_a: float | None = None,
         ief_max_board_a: float | None = None) -> Node:
    """Fault levels by hand: Ief = Cmin * U0 / Zs (BS 7671 Appendix 3, Cmin 0.95)."""
    ief = C_MIN * U0 / zs_ohm if ief_min_a is None else ief_min_a
    end = ief if ik_min_end_a is None else ik_min_end_a
    return Node(cid, ik3_a, ik1_a, ik1_a, ief, zs_ohm, end, ief_max_board_a)


def one_circuit(device: str | dict = "B32", *, earthing: str = "TN-C-S", phases: int = 1,
                load_a: float | None = None, cable: Cable | None = None,
                final: bool | None = None, breaking_capacity_a: float | None = None) -> Study:
    c = Circuit(id="c1", parent="supply", device=device, phases=phases, load_a=load_a,
                cable=cable, final=final, breaking_capacity_a=breaking_capacity_a)
    return Study(title="invented", supply=Supply(u0_v=U0, phases=3, earthing=earthing,
                                                 pfc_a=6000.0, c_min=C_MIN), circuits=(c,))


def only(results: tuple[checks.CheckResult, ...], name: str) -> checks.CheckResult:
    found = [r for r in results if r.check == name]
    assert len(found) == 1, [r.check for r in results]
    return found[0]


def run_one(s: Study, n: Node, band: Band | None = None) -> tuple[checks.CheckResult, ...]:
    band = band or band_for(s, "c1", basis="envelope")
    return checks.check_device(s, Levels({"c1": n}), "c1", band)


# -- disconnection ---------------------------------------------------------------------------
# IEC 60364-4-41 Table 41.1 with IEC 60898-1 (B: trip under 0.1 s from 5 In): a final B32 at
# 230 V TN needs Ief >= 5 x 32 = 160 A, i.e. Zs <= 0.95 * 230 / 160 = 1.37 ohm (BS 7671
# Table 41.3). Zs 1.30 ohm gives 168 A: instantaneous, within 0.1 s.
def test_disconnection_passes_inside_the_instantaneous_region() -> None:
    r = only(run_one(one_circuit(), node(zs_ohm=1.30)), "disconnection")
    assert r.ok
    assert r.limit == pytest.approx(0.4, rel=1e-12)
    assert r.value <= 0.1
    assert r.unit == "s"
    assert r.details["zs_max_ohm"] == pytest.approx(0.95 * 230.0 / 160.0, rel=1e-6)


# Same circuit, Zs 1.52 ohm: Ief = 0.95 * 230 / 1.52 = 144 A = 4.5 In, below the 5 In from which
# IEC 60898-1 obliges a type B to trip within 0.1 s; in the thermal region the standard allows far
# longer than 0.4 s, so the worst-case device fails.
def test_disconnection_fails_below_the_instantaneous_region() -> None:
    r = only(run_one(one_circuit(), node(zs_ohm=1.52)), "disconnection")
    assert not r.ok
    assert r.value > 0.4
    assert "1.52 ohm exceeds 1.37 ohm for B32" in r.reason
    assert "RCD" in r.reason
    assert "\n" not in r.reason


# IEC 60364-4-41 411.3.2.3: a distribution circuit (it feeds a board) in TN has 5 s.
def test_distribution_circuit_has_five_seconds() -> None:
    r = only(run_one(one_circuit(final=False), node(zs_ohm=1.30)), "disconnection")
    assert r.ok
    assert r.limit == pytest.approx(5.0, rel=1e-12)


# IEC 60364-4-41 411.3.2.2: Table 41.1 covers final circuits up to 32 A; a final C40 takes the
# 5 s of 411.3.2.3.
def test_final_circuit_above_32_a_has_five_seconds() -> None:
    r = only(run_one(one_circuit("C40", final=True), node(zs_ohm=0.5)), "disconnection")
    assert r.limit == pytest.approx(5.0, rel=1e-12)


# IEC 60364-4-41 Table 41.1 TT 0.2 s and 411.5: an electrode loop of 21 ohm gives
# 0.95 * 230 / 21 = 10.4 A, less than the 5 x 32 = 160 A even a type B MCB needs: only an RCD can
# disconnect in time (common practice).
def test_tt_loop_too_high_asks_for_an_rcd() -> None:
    r = only(run_one(one_circuit(earthing="TT"), node(zs_ohm=21.0)), "disconnection")
    assert not r.ok
    assert r.limit == pytest.approx(0.2, rel=1e-12)
    assert "RCD is needed" in r.reason


# Same TT case (IEC 60364-4-41 411.5; common practice: below 5 Ib no overcurrent device can
# disconnect): the protective conductor's adiabatic check (IEC 60364-5-54 543.1.2) then rests on
# the RCD's clearing, so the fault-energy reason says that and asks for no other overcurrent
# device. The earth fault at the board (1.05 x 230 / 21 = 11.5 A, c_max) reads the same way.
@pytest.mark.parametrize("ief_max_board_a", [None, 1.05 * 230.0 / 21.0])
def test_tt_fault_energy_defers_to_the_rcd(ief_max_board_a: float | None) -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5)
    n = node(zs_ohm=21.0, ik_min_end_a=600.0, ief_max_board_a=ief_max_board_a)
    results = run_one(one_circuit(earthing="TT", cable=cable), n)
    assert "RCD is needed" in only(results, "disconnection").reason
    r = only(results, "fault-energy")
    assert not r.ok
    assert "must be cleared by an RCD" in r.reason
    assert "not decided by B32" in r.reason
    assert "faster or smaller device" not in r.reason


# In TN (IEC 60364-4-41 411.4) the same slow earth fault is the overcurrent device's to clear,
# so there the reason still asks for a faster device (IEC 60364-5-54 543.1.2, 5 s).
def test_tn_fault_energy_asks_for_a_faster_device() -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5)
    r = only(run_one(one_circuit(cable=cable), node(zs_ohm=3.64, ik_min_end_a=600.0)),
             "fault-energy")
    assert "faster or smaller device" in r.reason
    assert "RCD" not in r.reason


# IEC 60898-1: below 1.13 In an MCB need never trip; a 30 A earth fault on a B32 is never cleared.
def test_disconnection_never_below_pickup() -> None:
    r = only(run_one(one_circuit(), node(zs_ohm=7.0, ief_min_a=30.0)), "disconnection")
    assert not r.ok
    assert math.isinf(r.value)
    assert r.to_json()["value"] is None
    # the reason says so in words (IEC 60898-1: I2 = 1.45 x 32 = 46.4 A), never "may take never"
    assert "30 A is never cleared by B32 (below its pickup, 46.4 A)" in r.reason
    assert "may take never" not in r.reason


# IEC 60898-1 (no trip guaranteed below 1.45 In = 46.4 A for a B32) and IEC 60364-5-54 543.1.2
# (the adiabatic rule needs clearing within 5 s): a 30 A earth fault is never cleared; the
# fault-energy reason says so in words.
def test_fault_energy_never_cleared_is_said_in_words() -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5)
    n = node(zs_ohm=7.0, ief_min_a=30.0, ik_min_end_a=600.0)
    r = only(run_one(one_circuit(cable=cable), n), "fault-energy")
    assert not r.ok
    assert "30 A is never cleared by B32 (below its pickup, 46.4 A)" in r.reason
    assert "may take never" not in r.reason
    json.dumps(r.to_json(), allow_nan=False)


# -- overload ---------------------------------------------------------------------------------
# IEC 60364-4-43 433.1 with IEC 60898-1 (I2 = 1.45 In): B32, Ib 25 A, Iz 34 A:
# 25 <= 32 <= 34 and 46.4 <= 49.3 A.
def test_overload_passes() -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5, iz_a=34.0)
    r = only(run_one(one_circuit(load_a=25.0, cable=cable), node()), "overload")
    assert r.ok
    assert r.unit == "A"
    assert r.value <= r.limit


# IEC 60364-4-43 433.1: In 32 A > Iz 30 A fails.
def test_overload_fails_when_in_exceeds_iz() -> None:
    cable = Cable(length_m=10, csa_mm2=4, cpc_mm2=1.5, iz_a=30.0)
    r = only(run_one(one_circuit(cable=cable), node()), "overload")
    assert not r.ok
    assert r.value == pytest.approx(32.0, rel=1e-9)
    assert r.limit == pytest.approx(30.0, rel=1e-9)
    assert "In > Iz" in r.reason


# IEC 60364-4-43 433.1: Ib 40 A > In 32 A fails.
def test_overload_fails_when_ib_exceeds_in() -> None:
    r = only(run_one(one_circuit(load_a=40.0), node()), "overload")
    assert not r.ok
    assert r.value == pytest.approx(40.0, rel=1e-9)


# IEC 60364-4-43 433.1 with IEC 60898-1 (I2 = 1.45 In; ratings 32, 40 A: common practice):
# Ib 38 A > In 32 A and In 32 A > Iz 30 A both fail. A smaller device cannot carry Ib; the next
# rating that does is B40, which needs Iz >= max(40, 1.45 x 40 / 1.45) = 40 A, so the cable too.
def test_overload_with_ib_above_in_suggests_the_next_device_and_its_iz() -> None:
    cable = Cable(length_m=10, csa_mm2=4, cpc_mm2=1.5, iz_a=30.0)
    r = only(run_one(one_circuit(load_a=38.0, cable=cable), node()), "overload")
    assert not r.ok
    assert "Ib > In" in r.reason and "In > Iz" in r.reason
    assert "smaller device" not in r.reason
    assert "choose B40" in r.reason
    assert "Iz >= 40 A" in r.reason
    assert r.details["next_device"] == "B40"
    assert r.details["next_iz_needed_a"] == pytest.approx(40.0, rel=1e-12)


# IEC 60364-4-43 433.1 with IEC 60269-1 (gG In >= 16 A: I2 = 1.6 In, from memory) and the gG
# ratings 32, 40 A (IEC 60269 series): Ib 35 A on a gG32 fails; gG40 carries it and needs
# I2 64 A <= 1.45 Iz, Iz >= 44.14 A, rounded up to 44.2 A; the cable's Iz 50 A is enough.
def test_overload_next_gg_fuse_and_the_iz_it_needs() -> None:
    cable = Cable(length_m=10, csa_mm2=10, cpc_mm2=4, iz_a=50.0)
    r = only(run_one(one_circuit("gG32", load_a=35.0, cable=cable), node()), "overload")
    assert not r.ok
    assert "choose gG40" in r.reason
    assert "Iz >= 44.2 A" in r.reason
    assert "is enough" in r.reason


# IEC 60364-4-43 433.1 with IEC 60947-2 (I2 = 1.30 Ir): an adjustable breaker set to Ir 200 A
# under Ib 210 A needs a rating or setting of at least 210 A, and then Iz >= max(210,
# 1.30 x 210 / 1.45 = 188.3) = 210 A.
def test_overload_adjustable_breaker_below_ib_suggests_a_setting() -> None:
    device = {"family": "tm", "In_a": 250, "Ir_x": 0.8, "Ii_x": 10, "icu_a": 36000}
    cable = Cable(length_m=30, csa_mm2=95, cpc_mm2=50, iz_a=180.0)
    s = one_circuit(device, phases=3, load_a=210.0, cable=cable, final=False)
    r = only(run_one(s, node(zs_ohm=0.05)), "overload")
    assert not r.ok
    assert "a rating or setting of at least 210 A" in r.reason
    assert "Iz >= 210 A" in r.reason
    assert "smaller device" not in r.reason


# IEC 60364-4-43 433.1 with IEC 60898-1 (I2 = 1.45 In): with Ib 20 A <= In 32 A but In > Iz
# 30 A, B25 carries Ib and protects the cable (25 <= 30 A, 36.25 <= 43.5 A), a remedy beside a
# larger cable (Iz >= 32 A). Hand-worked.
def test_overload_in_above_iz_offers_a_smaller_device_that_carries_ib() -> None:
    cable = Cable(length_m=10, csa_mm2=4, cpc_mm2=1.5, iz_a=30.0)
    r = only(run_one(one_circuit(load_a=20.0, cable=cable), node()), "overload")
    assert not r.ok
    assert "Iz >= 32 A" in r.reason
    assert "B25, which carries Ib 20 A and protects this cable" in r.reason
    assert r.details["smaller_device"] == "B25"


# IEC 60364-4-43 433.1 with IEC 60947-2 (I2 = 1.30 Ir; thermal setting 0.7..1.0 In, common
# practice): a TM250 at Ir 0.8 In = 200 A on Iz 100 A would need Ir <= 100 A, below its lowest
# setting 0.7 x 250 = 175 A, so no lower setting is offered; on Iz 180 A,
# Ir <= min(180, 1.45 x 180 / 1.30) = 180 A >= 175 A: offered. Hand-worked.
@pytest.mark.parametrize(("iz_a", "offered"), [(100.0, False), (180.0, True)])
def test_overload_lower_setting_only_within_the_units_range(iz_a: float, offered: bool) -> None:
    device = {"family": "tm", "In_a": 250, "Ir_x": 0.8, "Ii_x": 10, "icu_a": 36000}
    cable = Cable(length_m=30, csa_mm2=95, cpc_mm2=50, iz_a=iz_a)
    s = one_circuit(device, phases=3, cable=cable, final=False)
    r = only(run_one(s, node(zs_ohm=0.05)), "overload")
    assert not r.ok
    assert ("a lower setting, Ir <= 180 A" in r.reason) is offered
    assert ("smaller_device" in r.details) is offered


# IEC 60364-4-41 411.5 (TT: only an RCD clears an earth fault this small, common practice): the
# fault-energy reason speaks of the protective conductor and gives its size, not the line's.
def test_tt_rcd_reason_is_about_the_protective_conductor() -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5)
    n = node(zs_ohm=21.0, ik_min_end_a=600.0)
    r = only(run_one(one_circuit(earthing="TT", cable=cable), n), "fault-energy")
    assert "protective conductor" in r.reason
    assert r.limit == pytest.approx(2.5, rel=1e-12)
    assert r.reason.count("must be cleared by an RCD") == 1  # one message for both conductors
    # the line conductors' case at the same earth fault is kept (IEC 60364-4-43 434.5.2)
    assert {c["conductor"] for c in r.details["cases"] if "earth fault" in c["case"]} == {
        "line", "protective"}


# IEC 60364-4-43 433.1 with IEC 60269-1 (gG, In >= 16 A: I2 = 1.6 In, from memory), hand-worked:
# gG32 with Ib 20 A on Iz 22 A: gG25 has In 25 > 22 A and gG20 I2 32 A > 1.45 x 22 = 31.9 A,
# so no smaller fuse-link protects this cable while carrying Ib: only a larger cable is offered.
def test_overload_offers_no_smaller_device_that_would_fail_too() -> None:
    cable = Cable(length_m=10, csa_mm2=4, cpc_mm2=1.5, iz_a=22.0)
    r = only(run_one(one_circuit("gG32", load_a=20.0, cable=cable), node()), "overload")
    assert not r.ok
    assert "smaller" not in r.reason and "gG20" not in r.reason and "gG25" not in r.reason
    assert "smaller_device" not in r.details


# IEC 60364-4-43 433.1: Ib <= In <= Iz cannot hold when Ib 20 A exceeds Iz 15 A, whatever the
# device: the reason says the cable is too small for the load (common practice).
def test_overload_with_ib_above_iz_says_the_cable_is_too_small() -> None:
    cable = Cable(length_m=10, csa_mm2=1.5, cpc_mm2=1.5, iz_a=15.0)
    r = only(run_one(one_circuit(load_a=20.0, cable=cable), node()), "overload")
    assert not r.ok
    assert "too small for the load" in r.reason
    assert "smaller_device" not in r.details


# IEC 60364-4-43 433.1 with IEC 60269-1 (gG, In >= 16 A: conventional fusing current 1.6 In,
# from memory): gG32 on Iz 34 A: In <= Iz holds but I2 = 51.2 A > 1.45 * 34 = 49.3 A: fails;
# Iz 36 A: 1.45 * 36 = 52.2 A >= 51.2 A: passes. Hand-worked.
@pytest.mark.parametrize(("iz_a", "ok"), [(34.0, False), (36.0, True)])
def test_overload_of_a_gg_fuse(iz_a: float, ok: bool) -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5, iz_a=iz_a)
    s = one_circuit("gG32", cable=cable)
    r = only(run_one(s, node()), "overload")
    assert r.ok is ok
    if not ok:
        assert r.value == pytest.approx(1.6 * 32.0, rel=1e-6)
        assert r.limit == pytest.approx(1.45 * 34.0, rel=1e-9)
        assert "I2" in r.reason
        # the cable it needs: 51.2 / 1.45 = 35.31 A, rounded up to 35.4 A
        assert "Iz >= 35.4 A" in r.reason


# IEC 60364-4-43 433.1 with IEC 60947-2 (conventional tripping current 1.30 Ir): an adjustable
# breaker In 250 A set to Ir = 0.8 x 250 = 200 A is judged by Ir. Iz 180 A: Ir > Iz, fails;
# Iz 210 A: 200 <= 210 A and 1.30 x 200 = 260 <= 1.45 x 210 = 304.5 A, passes. Hand-worked.
@pytest.mark.parametrize(("iz_a", "ok"), [(180.0, False), (210.0, True)])
def test_overload_of_an_adjustable_breaker_uses_ir(iz_a: float, ok: bool) -> None:
    device = {"family": "tm", "In_a": 250, "Ir_x": 0.8, "Ii_x": 10, "icu_a": 36000}
    cable = Cable(length_m=30, csa_mm2=95, cpc_mm2=50, iz_a=iz_a)
    s = one_circuit(device, phases=3, cable=cable, final=False)
    r = only(run_one(s, node(zs_ohm=0.05)), "overload")
    assert r.ok is ok
    assert r.details["in_a"] == pytest.approx(200.0, rel=1e-12)
    assert r.details["i2_a"] == pytest.approx(1.30 * 200.0, rel=1e-9)


def test_overload_left_out_without_ib_or_iz() -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5)
    assert "overload" not in {r.check for r in run_one(one_circuit(cable=cable), node())}


# -- fault energy -----------------------------------------------------------------------------
# IEC 60364-4-43 434.5.2 with EN 60898-1 Annex ZA (class 3, type B, 16 < In <= 32 A: 90 000 A2s
# at 10 kA, confirmed): S >= sqrt(90 000) / k = 300 / 115 = 2.61 mm2 for copper PVC, so 2.5 mm2
# fails; with XLPE (k 143) 300 / 143 = 2.10 mm2, so 2.5 mm2 passes.
@pytest.mark.parametrize(("insulation", "ok", "need_mm2"),
                         [("pvc", False, 300.0 / 115.0), ("xlpe", True, 300.0 / 143.0)])
def test_fault_energy_line_conductors_at_maximum_fault(insulation: str, ok: bool,
                                                       need_mm2: float) -> None:
    cable = Cable(length_m=10, csa_mm2=2.5, cpc_mm2=2.5, insulation=insulation)
    n = node(ik1_a=10_000.0, ik3_a=10_000.0, zs_ohm=0.5, ik_min_end_a=2000.0)
    r = only(run_one(one_circuit(cable=cable), n), "fault-energy")
    assert r.ok is ok
    assert r.unit == "mm2"
    assert r.value == pytest.approx(need_mm2, rel=1e-3)
    assert r.limit == pytest.approx(2.5, rel=1e-12)


# IEC 60364-5-54 543.1.2 and IEC 60898-1 (a B32 may take up to 60 s at 2.55 In, so longer than
# 5 s at a 60 A earth fault): the adiabatic rule does not hold; the check fails and says so.
def test_fault_energy_fails_beyond_five_seconds() -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5)
    r = only(run_one(one_circuit(cable=cable), node(zs_ohm=3.64, ik_min_end_a=600.0)),
             "fault-energy")
    assert not r.ok
    assert "5 s" in r.reason


# IEC 60364-4-43 435.1: where the device protects the cable against overload, a slow minimum
# line fault (60 A on a B32, beyond 5 s) is covered; the earth fault (Zs 1.0 ohm, 218 A,
# instantaneous) is fine, so the check passes. Without Iz the same fault fails.
@pytest.mark.parametrize(("iz_a", "ok"), [(34.0, True), (None, False)])
def test_fault_energy_minimum_line_fault_with_overload_protection(iz_a: float | None,
                                                                  ok: bool) -> None:
    cable = Cable(length_m=10, csa_mm2=6, cpc_mm2=2.5, iz_a=iz_a)
    r = only(run_one(one_circuit(cable=cable), node(zs_ohm=1.0, ik_min_end_a=60.0)),
             "fault-energy")
    assert r.ok is ok


# EN 60898-1 Annex ZA class 3, type B, 16 < In <= 32 A (45 000 A2s at 6 kA, from memory)
# and IEC 60364-5-54 543.1.2 / Table A.54.3 (k 115): an earth fault of 6 kA at the board
# needs sqrt(45 000) / 115 = 1.845 mm2 of protective conductor, so 1.5 mm2 fails, although the
# 218 A at the far end (Zs 1.0 ohm) needs only sqrt(18 000) / 115 = 1.167 mm2; 2.5 mm2 passes.
@pytest.mark.parametrize(("cpc_mm2", "ok"), [(1.5, False), (2.5, True)])
def test_fault_energy_protective_conductor_at_the_largest_earth_fault(cpc_mm2: float,
                                                                      ok: bool) -> None:
    cable = Cable(length_m=10, csa_mm2=4, cpc_mm2=cpc_mm2)
    n = node(zs_ohm=1.0, ik1_a=1000.0, ik3_a=1000.0, ik_min_end_a=600.0,
             ief_max_board_a=6000.0)
    r = only(run_one(one_circuit(cable=cable), n), "fault-energy")
    assert r.ok is ok
    assert r.details["governing_case"] == "maximum earth fault at the board"
    assert r.value == pytest.approx(math.sqrt(45_000.0) / 115.0, rel=1e-6)
    assert r.limit == pytest.approx(cpc_mm2, rel=1e-12)


# IEC 60364-4-43 434 (parallel conductors: a fault in one of them, from memory) with IEC
# 60947-2 (a thermal-magnetic release has cleared by its 30 ms clearing time above its magnetic
# pickup, common practice) and IEC 60364-5-54 Table A.54.3 (k 143, copper XLPE core), by hand: a
# TM400 (Ii 10 In) on two parallel 120/25 mm2 cables, 26 kA earth fault just past the board: that
# cable's own 25 mm2 cpc carries it, needing sqrt(26 000^2 x 0.03) / 143 = 31.49 mm2 > 25 mm2:
# fails, although the two cpcs together (50 mm2) would pass.
def test_board_end_fault_in_parallel_cables_takes_one_conductor() -> None:
    device = {"family": "tm", "In_a": 400, "Ii_x": 10, "icu_a": 50000}
    cable = Cable(length_m=40, csa_mm2=120, cpc_mm2=25, insulation="xlpe", parallel=2)
    n = node(zs_ohm=0.035, ik1_a=20000.0, ik3_a=20000.0, ik_min_end_a=8000.0,
             ief_max_board_a=26000.0)  # far end 0.95 x 230 / 0.035 = 6.2 kA: magnetic region
    r = only(run_one(one_circuit(device, phases=3, cable=cable, final=False), n), "fault-energy")
    assert not r.ok
    assert r.details["governing_case"] == "maximum earth fault at the board"
    assert r.limit == pytest.approx(25.0, rel=1e-12)
    assert r.value == pytest.approx(math.sqrt(26_000.0**2 * 0.03) / 143.0, rel=1e-6)


# IEC 60364-4-43 434.5.2 (every conductor that carries the fault, from memory) with the class-3
# table above: an earth fault flows in a line conductor too, so the largest fault at the board
# for the line conductors is the 6 kA earth fault where it exceeds the 3 kA short circuits:
# sqrt(45 000) / 115 = 1.845 mm2 of line conductor. Hand-worked.
def test_line_conductors_see_the_largest_earth_fault() -> None:
    cable = Cable(length_m=10, csa_mm2=4, cpc_mm2=4)
    n = node(zs_ohm=1.0, ik1_a=3000.0, ik3_a=3000.0, ief_max_board_a=6000.0)
    r = only(run_one(one_circuit(cable=cable), n), "fault-energy")
    line = [c for c in r.details["cases"] if c["case"] == "maximum fault at the board"]
    assert line[0]["current_a"] == pytest.approx(6000.0, rel=1e-12)
    assert line[0]["need_mm2"] == pytest.approx(math.sqrt(45_000.0) / 115.0, rel=1e-6)


# IEC 60364-4-43 434.5.1: the device must break the largest fault where it is installed, an
# earth fault included (common practice): a 6 kA B32 where the earth fault reaches 7 kA fails.
def test_breaking_capacity_counts_the_largest_earth_fault() -> None:
    n = node(zs_ohm=1.0, ik1_a=5000.0, ik3_a=5000.0, ief_max_board_a=7000.0)
    r = only(run_one(one_circuit(), n), "breaking-capacity")
    assert not r.ok
    assert r.value == pytest.approx(7000.0, rel=1e-12)
    assert r.details["fault"] == "earth"


# IEC 60364-4-43 Table 43A and IEC 60364-5-54 Table A.54.3 (confirmed): copper
# XLPE 143, aluminium XLPE 94, copper PVC 115 (103 above 300 mm2). Sizes by hand: two 240 mm2
# per phase = 480 mm2; a 120 mm2 aluminium cpc in each cable = 240 mm2, or 120 mm2 when the
# study says one cpc (cpc_parallel = 1).
@pytest.mark.parametrize(
    ("cable", "expected"),
    [
        (Cable(length_m=50, csa_mm2=240, cpc_mm2=120, cpc_material="aluminium",
               insulation="xlpe", parallel=2), (480.0, 143.0, 240.0, 94.0, 120.0)),
        (Cable(length_m=50, csa_mm2=240, cpc_mm2=120, cpc_material="aluminium",
               insulation="xlpe", parallel=2, cpc_parallel=1), (480.0, 143.0, 120.0, 94.0, 120.0)),
        (Cable(length_m=20, csa_mm2=400, cpc_mm2=185, parallel=1), (400.0, 103.0, 185.0, 115.0,
                                                                    185.0)),
        (Cable(length_m=20, csa_mm2=2.5), (2.5, 115.0, 2.5, 115.0, 2.5)),
    ],
)
def test_conductor_sizes(cable: Cable, expected: tuple[float, ...]) -> None:
    got = checks.conductor_sizes(cable)
    assert (got.line_mm2, got.k_line, got.cpc_mm2, got.k_cpc, got.cpc_each_mm2) == pytest.approx(
        expected, rel=1e-12)


def test_fault_energy_left_out_without_a_cable() -> None:
    assert "fault-energy" not in {r.check for r in run_one(one_circuit(), node())}


# -- breaking capacity ------------------------------------------------------------------------
# IEC 60364-4-43 434.5.1; an MCB given by shorthand takes the family's default Icn (6 kA) and
# says it assumed it: 5 kA passes, 8 kA fails; a 10 kA rating given in the study passes 8 kA.
@pytest.mark.parametrize(("fault_a", "given_a", "ok"),
                         [(5000.0, None, True), (8000.0, None, False), (8000.0, 10_000.0, True)])
def test_breaking_capacity(fault_a: float, given_a: float | None, ok: bool) -> None:
    s = one_circuit(breaking_capacity_a=given_a)
    r = only(run_one(s, node(ik1_a=fault_a, ik3_a=fault_a)), "breaking-capacity")
    assert r.ok is ok
    assert r.value == pytest.approx(fault_a, rel=1e-12)
    assert r.limit == pytest.approx(given_a or 6000.0, rel=1e-12)
    assert ("assumed" in r.reason) is (given_a is None)


# IEC 60364-4-43 434.5.1: a breaker whose Icu the study does not give cannot be shown to break
# the fault; the check fails and asks for the value.
def test_breaking_capacity_unknown_fails_and_asks() -> None:
    device = {"family": "tm", "In_a": 250, "Ir_x": 0.8, "Ii_x": 10}
    s = one_circuit(device, phases=3, final=False)
    r = only(run_one(s, node(zs_ohm=0.05, ik1_a=9000.0, ik3_a=10_000.0)), "breaking-capacity")
    assert not r.ok
    assert "breaking_capacity_a" in r.reason


# IEC 60364-4-43 434.5.1: a three-phase device must break the larger of the faults it can see.
def test_breaking_capacity_three_phase_takes_the_larger_fault() -> None:
    s = one_circuit(phases=3)
    r = only(run_one(s, node(ik1_a=7000.0, ik3_a=5500.0)), "breaking-capacity")
    assert not r.ok
    assert r.value == pytest.approx(7000.0, rel=1e-12)


# -- results, table ---------------------------------------------------------------------------
def test_result_json_has_the_contract_keys() -> None:
    r = run_one(one_circuit(), node())[0]
    assert {"circuit", "check", "ok", "value", "limit", "unit"} <= set(r.to_json())
    json.dumps(r.to_json())


def test_format_table_marks_failures_and_sums_up() -> None:
    results = run_one(one_circuit(), node(zs_ohm=1.52))
    text = tables.check_table(results)
    assert "FAIL" in text
    assert text.splitlines()[-1].startswith("protection checks:")
    assert "c1 disconnection" in text.splitlines()[-1]


def test_safety_checks_use_the_envelope_whatever_the_study_basis() -> None:
    # Our modelling choice: safety checks take the worst case a compliant device allows (the
    # envelope), whatever basis the study chose for selectivity.
    s = Study(title="invented", supply=Supply(u0_v=U0, earthing="TN-C-S", pfc_a=6000.0),
              circuits=(Circuit(id="c1", parent="supply", device="B32", phases=1),),
              basis="typical")
    r = only(checks.run(s, Levels({"c1": node(zs_ohm=1.52)})), "disconnection")
    envelope = mcb_band("B", 32, basis="envelope")
    assert r.value == pytest.approx(float(envelope.t_max(C_MIN * U0 / 1.52)), rel=1e-12)
    assert r.basis == "envelope"


# -- end to end ------------------------------------------------------------------------------
FAILING = """
[study]
title = "Invented workshop, long final circuit"
[supply]
u0_v = 230
phases = 1
earthing = "TN-S"
pfc_a = 3000
ze_ohm = 0.8
[[circuit]]
id = "far-sockets"
from = "supply"
device = "B32"
phases = 1
[circuit.cable]
length_m = 50
csa_mm2 = 2.5
cpc_mm2 = 1.5
"""

PASSING = """
[study]
title = "Invented kiosk, short lighting circuit"
[supply]
u0_v = 230
phases = 1
earthing = "TN-C-S"
pfc_a = 3000
ze_ohm = 0.35
[[circuit]]
id = "lights"
from = "supply"
device = "B6"
phases = 1
[circuit.cable]
length_m = 10
csa_mm2 = 2.5
cpc_mm2 = 1.5
"""


# IEC 60364-4-41 Table 41.1 / BS 7671 Table 41.3, hand-worked: 50 m of 2.5/1.5 mm2 copper has
# R1 + R2 = (7.41 + 12.1) mOhm/m x 50 m = 0.98 ohm at 20 degC (IEC 60228), so Zs >= 0.8 + 0.98 =
# 1.78 ohm > 1.37 ohm for a B32: it fails. 10 m of the same under a B6 with Ze 0.35 ohm: Zs about
# 0.35 + 0.2 x 1.2 = 0.6 ohm, far below 7.28 ohm: it passes.
@pytest.mark.parametrize(("text", "cid", "ok"), [(FAILING, "far-sockets", False),
                                                 (PASSING, "lights", True)])
def test_end_to_end_disconnection(text: str, cid: str, ok: bool) -> None:
    s = study.loads(text)
    levels = faults.compute(s)
    r = only(checks.run(s, levels), "disconnection")
    assert r.circuit == cid
    assert r.ok is ok
    n = levels.by_circuit[cid]
    assert (n.zs_ohm <= r.details["zs_max_ohm"]) is ok


@pytest.mark.parametrize(("text", "code"), [(FAILING, 1), (PASSING, 0)])
def test_check_command_exit_code(cli, tmp_path, text: str, code: int) -> None:
    path = tmp_path / "installation.toml"
    path.write_text(text, encoding="utf-8")
    result = cli("check", str(path), "--json")
    assert result.exit_code == code, result.output
    payload = json.loads(result.stdout)
    names = {c["check"] for c in payload["checks"]}
    assert {"disconnection", "fault-energy", "breaking-capacity"} <= names
    assert all(c["ok"] for c in payload["checks"]) is (code == 0)


# -- JSON -------------------------------------------------------------------------------------
# common practice (JSON has no inf or NaN): the command line writes each result through
# json_record() and the encoder, the Python API's to_json() writes None itself; the two agree.
def test_json_record_writes_what_to_json_gives() -> None:
    from coordination.cli import json_bytes

    never = checks.CheckResult("c1", "disconnection", False, math.inf, 0.4, "s", "never",
                               "envelope", {"ia_a": math.inf, "zs_ohm": math.nan, "final": True,
                                "source": "IEC 60364-4-41", "value": 123.0,
                                "cases": ({"t_max_s": None},)})
    results = [never, *run_one(one_circuit(), node(zs_ohm=7.0, ief_min_a=30.0))]
    text = EXAMPLE_STUDY.read_text(encoding="utf-8")
    for earthing in ("TN-C-S", "TT"):  # TT: earth faults too small for any overcurrent device
        s = study.loads(text.replace('earthing = "TN-C-S"', f'earthing = "{earthing}"'))
        results += checks.run(s, faults.compute(s))
    assert any(not math.isfinite(v) for r in results for v in r.details.values()
               if isinstance(v, float))
    for r in results:  # the same bytes: keys, order, numbers, null for never
        assert json_bytes(r.json_record()) == json_bytes(r.to_json())
    # a detail named like a contract key never replaces the contract's value
    assert json.loads(json_bytes(never.json_record()))["value"] is None
