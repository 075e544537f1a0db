"""Ring final circuits, separate protective conductors and steel-wire armour, by hand.

Resistances from IEC 60228:2004 Table 2 (typed here, independently of the data file), the ring's
mid-point rule (common practice; BS 7671 Guidance Note 3's method, from memory), k of a
separate protective conductor from IEC 60364-5-54 Table A.54.2, k of steel armour from
IEC 60364-5-54 Table A.54.4 (from memory), steel's resistivity from IEC 60287-1-1 Table 1 (from
memory).
"""

from __future__ import annotations

import dataclasses
import math

import pytest

from coordination import cables
from coordination.model import Cable
from curves.errors import InputError

# IEC 60228:2004 Table 2, class 2 copper at 20 degC [ohm/km] (confirmed)
R20_OHM_PER_KM = {1.5: 12.1, 2.5: 7.41, 4.0: 4.61, 6.0: 3.08}

# (ring length [m], line mm2, cpc mm2)
RINGS = [(60.0, 2.5, 1.5), (45.0, 4.0, 1.5), (90.0, 2.5, 1.5), (30.0, 6.0, 2.5)]


# Ring mid-point: (R1 + R2) = (r1 + r2) / 4 with r1, r2 end to end (common practice, BS 7671
# Guidance Note 3, from memory); r from IEC 60228:2004 Table 2.
@pytest.mark.parametrize(("length_m", "line_mm2", "cpc_mm2"), RINGS)
def test_ring_midpoint_r1_r2_is_a_quarter_of_end_to_end(length_m, line_mm2, cpc_mm2) -> None:
    r1 = R20_OHM_PER_KM[line_mm2] / 1000.0 * length_m
    r2 = {1.5: 12.1, 2.5: 7.41}[cpc_mm2] / 1000.0 * length_m
    run = cables.run_impedances(Cable(length_m=length_m, csa_mm2=line_mm2, cpc_mm2=cpc_mm2),
                                ring=True)
    assert run.r_line_20 + run.r_cpc_20 == pytest.approx((r1 + r2) / 4.0, rel=1e-12)
    assert cables.ring_r1_r2_ohm(r1, r2) == pytest.approx((r1 + r2) / 4.0, rel=1e-12)


# Common practice: a ring seen from its mid-point is two legs of half its length in parallel,
# so every conductor (line, neutral, protective) and its reactance are a quarter of a radial
# run of the ring's whole length.
@pytest.mark.parametrize(("length_m", "line_mm2", "cpc_mm2"), RINGS)
def test_ring_is_a_quarter_of_a_radial_of_its_length(length_m, line_mm2, cpc_mm2) -> None:
    cable = Cable(length_m=length_m, csa_mm2=line_mm2, cpc_mm2=cpc_mm2)
    radial = cables.run_impedances(cable)
    ring = cables.run_impedances(cable, ring=True)
    for name in ("r_line_20", "r_neutral_20", "r_cpc_20", "r_line_hot", "r_cpc_hot", "x_line",
                 "x_cpc"):
        assert getattr(ring, name) == pytest.approx(getattr(radial, name) / 4.0, rel=1e-12)


# IEC 60364-5-54:2011 Table A.54.2: insulated protective conductor not incorporated in a cable,
# copper: PVC 143, XLPE/EPR 176 (confirmed); as a core of a cable (Table A.54.3) 115 / 143.
SEPARATE_K = [("copper", "pvc", 2.5, 143.0), ("copper", "xlpe", 16.0, 176.0),
              ("copper", "epr", 50.0, 176.0)]


# IEC 60364-5-54:2011 Table A.54.2 (copper, confirmed)
@pytest.mark.parametrize(("material", "insulation", "csa_mm2", "k"), SEPARATE_K)
def test_separate_cpc_k(material: str, insulation: str, csa_mm2: float, k: float) -> None:
    assert cables.separate_cpc_k(material, insulation, csa_mm2) == pytest.approx(k, abs=0)


# IEC 60364-5-54:2011 Table A.54.2 against Table A.54.3: a separate conductor starts cooler, so
# its k is never below that of the same conductor as a core of the cable (copper PVC 143 > 115,
# XLPE 176 > 143).
@pytest.mark.parametrize(("insulation", "core_k"), [("pvc", 115.0), ("xlpe", 143.0)])
def test_separate_cpc_k_above_core_k(insulation: str, core_k: float) -> None:
    assert cables.separate_cpc_k("copper", insulation, 10.0) > core_k


# IEC 60364-5-54:2011 Table A.54.4, steel armour (from memory): PVC 51, XLPE 46.
@pytest.mark.parametrize(("insulation", "k"), [("pvc", 51.0), ("xlpe", 46.0)])
def test_steel_armour_k(insulation: str, k: float) -> None:
    assert cables.armour_k(insulation) == pytest.approx(k, abs=0)


# IEC 60287-1-1 Table 1 (from memory): steel 13.8e-8 ohm m at 20 degC, alpha 4.5e-3 /K;
# R = rho / A, R_t = R_20 (1 + alpha (t - 20)).
@pytest.mark.parametrize("armour_mm2", [16.0, 36.0, 68.0])
@pytest.mark.parametrize("hot_c", [70.0, 90.0])
def test_armour_resistance_from_steel(armour_mm2: float, hot_c: float) -> None:
    r20 = 13.8e-8 / (armour_mm2 * 1e-6)
    assert cables.armour_r20_ohm_per_m(armour_mm2) == pytest.approx(r20, rel=1e-12)
    cable = Cable(length_m=50.0, csa_mm2=4.0, cpc_mm2=None,
                  insulation="pvc" if hot_c == 70.0 else "xlpe")
    run = cables.run_impedances(_armoured(cable, armour_mm2, None))
    assert run.r_cpc_20 == pytest.approx(r20 * 50.0, rel=1e-12)
    assert run.r_cpc_hot == pytest.approx(r20 * 50.0 * (1 + 4.5e-3 * (hot_c - 20.0)), rel=1e-12)


def test_armour_resistance_given_wins() -> None:
    # the study's figure at 20 degC (invented here) replaces rho / A
    run = cables.run_impedances(_armoured(Cable(length_m=10.0, csa_mm2=4.0), 36.0, 0.005))
    assert run.r_cpc_20 == pytest.approx(0.05, rel=1e-12)


def test_unknown_insulation_is_refused() -> None:
    with pytest.raises(InputError, match="allowed: pvc, xlpe"):
        cables.armour_k("paper")
    assert math.isfinite(cables.separate_cpc_k("aluminium", "pvc", 400.0))


def _armoured(cable: Cable, armour_mm2: float, ohm_per_m: float | None) -> Cable:
    """The cable with its armour as the protective conductor."""
    return dataclasses.replace(cable, cpc_armour=True, armour_mm2=armour_mm2,
                               armour_ohm_per_m=ohm_per_m)
