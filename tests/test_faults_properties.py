"""Properties of fault levels on random invented trees: the fault level never rises going away
from the supply, Zs never falls, minimum currents never exceed maximum ones (common practice:
adding impedance in series never raises a fault current; IEC 60909-0 c_min < c_max)."""

from __future__ import annotations

from typing import Any

from hypothesis import given, settings
from hypothesis import strategies as st

from coordination import faults
from coordination.study import from_dict

SIZES = (1.5, 2.5, 4, 6, 10, 16, 25, 35, 50, 70, 95, 120, 185, 240)
AL_SIZES = tuple(s for s in SIZES if s >= 16)
SLACK = 1 + 1e-12


@st.composite
def supplies(draw: Any) -> dict[str, Any]:
    kind = draw(st.sampled_from(["pfc", "pfc1", "ze", "transformer"]))
    x_r = draw(st.floats(0.0, 15.0))
    if kind == "pfc":
        # a declared fault level at least the earth fault its Ze implies at 230 V (within the
        # loader's stated tolerance of 2, study.ZE_PFC_TOLERANCE): others are refused at load
        ze_ohm = draw(st.floats(0.01, 2.0))
        return {"pfc_a": draw(st.floats(max(500.0, 230.0 / ze_ohm / 2.0), 80000)),
                "ze_ohm": ze_ohm, "x_r": x_r}
    if kind == "pfc1":
        return {"phases": 1, "pfc_a": draw(st.floats(500, 25000)), "x_r": x_r}
    if kind == "ze":
        return {"ze_ohm": draw(st.floats(0.01, 2.0)), "x_r": x_r}
    t: dict[str, Any] = {"rating_kva": draw(st.sampled_from([100, 250, 630, 1000, 2500])),
                         "impedance_pct": draw(st.floats(3.0, 8.0)), "x_r": x_r}
    if draw(st.booleans()):
        t["upstream_pfc_a"] = draw(st.floats(20000, 500000))
    return {"transformer": t}


@st.composite
def cables(draw: Any, phases: int) -> dict[str, Any] | None:
    if draw(st.integers(0, 5)) == 0:
        return None
    material = draw(st.sampled_from(["copper", "aluminium"]))
    csa = draw(st.sampled_from(AL_SIZES if material == "aluminium" else SIZES))
    sizes = AL_SIZES if material == "aluminium" else SIZES
    cable: dict[str, Any] = {
        "length_m": draw(st.floats(0.1, 400.0)),
        "csa_mm2": csa,
        "cpc_mm2": draw(st.sampled_from([s for s in sizes if s <= csa])),
        "material": material,
        "insulation": draw(st.sampled_from(["pvc", "xlpe"])),
        "parallel": draw(st.integers(1, 3)),
    }
    if draw(st.booleans()):
        cable["x_ohm_per_m"] = draw(st.floats(0.0, 0.3e-3))
    if phases == 3 and draw(st.integers(0, 4)) == 0:
        cable["neutral_mm2"] = 0
    return cable


@st.composite
def trees(draw: Any) -> dict[str, Any]:
    supply = draw(supplies())
    supply_phases = supply.get("phases", 3)
    n = draw(st.integers(1, 25))
    phases = {"supply": supply_phases}
    neutral = {"supply": True}
    circuits = []
    for i in range(n):
        parent = draw(st.sampled_from(["supply", *(c["id"] for c in circuits)]))
        choices = [1, 3] if phases[parent] == 3 else [1]
        if not neutral[parent]:
            choices = [3]
        ph = draw(st.sampled_from(choices))
        cid = f"c{i}"
        c: dict[str, Any] = {"id": cid, "from": parent, "device": "gG100", "phases": ph}
        cable = draw(cables(ph))
        if cable is not None:
            c["cable"] = cable
        phases[cid] = ph
        neutral[cid] = neutral[parent] and not (cable and cable.get("neutral_mm2") == 0)
        circuits.append(c)
    return {"supply": supply, "circuit": circuits}


def _le(a: float | None, b: float | None) -> bool:
    return a is None or b is None or a <= b * SLACK


@settings(max_examples=50, deadline=None)
@given(trees())
def test_fault_level_never_rises_away_from_the_supply(doc: dict[str, Any]) -> None:
    s = from_dict(doc)
    levels = faults.compute(s)
    by = levels.by_circuit
    for c in s.circuits:
        node = by[c.id]
        # along its own cable
        assert _le(node.ik3_max_end_a, node.ik3_max_a)
        assert _le(node.ik1_max_end_a, node.ik1_max_a)
        if c.parent == "supply":
            assert _le(node.ik3_max_a, levels.origin_ik3_a)
            assert _le(node.ik1_max_a, levels.origin_ik1_a)
            continue
        up = by[c.parent]
        # from board to board
        assert _le(node.ik3_max_a, up.ik3_max_a)
        assert _le(node.ik1_max_a, up.ik1_max_a)
        assert _le(node.ik_max_a, max(v for v in (up.ik3_max_a, up.ik1_max_a) if v))
        assert _le(node.ief_min_a, up.ief_min_board_a)
        # a circuit's board is its parent's far end
        assert _le(node.ik3_max_a, up.ik3_max_end_a) and _le(up.ik3_max_end_a, node.ik3_max_a)


@settings(max_examples=50, deadline=None)
@given(trees())
def test_zs_never_falls_and_minimum_below_maximum(doc: dict[str, Any]) -> None:
    s = from_dict(doc)
    levels = faults.compute(s)
    by = levels.by_circuit
    for c in s.circuits:
        node = by[c.id]
        assert node.zs_board_ohm <= node.zs_ohm * SLACK
        assert levels.ze_ohm <= node.zs_board_ohm * SLACK
        assert node.ief_min_a <= node.ief_min_board_a * SLACK
        if c.parent != "supply":
            up = by[c.parent]
            assert up.zs_ohm <= node.zs_ohm * SLACK
            assert node.zs_board_ohm == up.zs_ohm
        # minimum (hot conductors, c_min, no K_T) never above the maximum at the same point
        if node.ik_min_end_kind == "line-neutral":
            assert node.ik_min_end_a <= node.ik1_max_end_a * SLACK
        else:
            assert node.ik_min_end_a <= node.ik3_max_end_a * SLACK


@settings(max_examples=50, deadline=None)
@given(trees())
def test_maximum_earth_fault_never_rises_and_bounds_the_minimum(doc: dict[str, Any]) -> None:
    s = from_dict(doc)
    levels = faults.compute(s)
    by = levels.by_circuit
    origin = [by[c.id].ief_max_board_a for c in s.circuits if c.parent == "supply"]
    for c in s.circuits:
        node = by[c.id]
        # the largest earth fault at a board is never below the smallest there
        assert node.ief_min_board_a <= node.ief_max_board_a * SLACK
        # and the minimum at the far end is below both
        assert node.ief_min_a <= node.ief_max_board_a * SLACK
        if c.parent == "supply":
            # every circuit fed from the supply sits on the same board: the origin
            assert node.ief_max_board_a == origin[0]
            continue
        up = by[c.parent]
        # from board to board it never rises
        assert _le(node.ief_max_board_a, up.ief_max_board_a)
