"""The bundled example installations (invented) load, check, plot and report as they are."""

from __future__ import annotations

from pathlib import Path

import pytest

from coordination import checks, engine, faults, study
from coordination.devices import band_for
from coordination.plot import plot_circuit

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
#: The examples that show a crossover zone on purpose (README: "Examples"); the others pass.
SELECTIVITY_DEMOS = ("small-shop.toml", "office-building.toml", "standby-generator.toml")
#: Every bundled example.
NAMES = (*SELECTIVITY_DEMOS, "orchard-cottage-tt.toml", "cycle-shop-bs7671.toml",
         "plant-room.toml")


def _assessed(name):
    s = study.load(EXAMPLES / name)
    levels = faults.compute(s)
    return name, s, levels, engine.analyse(s, levels), checks.run(s, levels)


@pytest.fixture(scope="module", params=NAMES)
def example(request):
    return _assessed(request.param)


@pytest.fixture(scope="module", params=SELECTIVITY_DEMOS)
def selectivity_demo(request):
    return _assessed(request.param)


def test_every_example_is_listed_in_the_readme():
    readme = (EXAMPLES / "README.md").read_text(encoding="utf-8")
    found = sorted(p.name for p in EXAMPLES.glob("*.toml"))
    assert found == sorted(NAMES)
    for name in found:
        assert f"`{name}`" in readme


def test_example_checks_every_circuit(example):
    _, s, levels, analysis, results = example
    assert set(levels.by_circuit) == {c.id for c in s.circuits}
    # every circuit with an overcurrent device is paired with every such circuit above it
    # (a residual-current switch, rcd without device, has none)
    def devices_above(cid):
        return [a for a in s.ancestors(cid) if s.by_id[a].device is not None]

    assert len(analysis.pairs) == sum(len(devices_above(c.id)) for c in s.circuits
                                      if c.device is not None)
    assert {r.circuit for r in results} == {c.id for c in s.circuits}


def test_example_has_a_shaded_non_selective_pair(selectivity_demo):
    _, s, levels, analysis, _ = selectivity_demo
    open_pairs = [p for p in analysis.pairs if p.verdict != "total"]
    assert open_pairs
    # at least one of them has a crossover zone with area inside its window, which the plot hatches
    assert any(engine.overlap(s, levels, p).area > 0 for p in open_pairs)


RANK = {"none": 0, "partial": 1, "total": 2}


def test_example_plots_its_worst_circuit(selectivity_demo):
    _, s, levels, analysis, _ = selectivity_demo
    # the worst pair: the weakest verdict, then the smallest selective share of its window
    worst = min(analysis.pairs, key=lambda p: (RANK[p.verdict], (p.limit_a or 0.0) / p.window_a[1]))
    assert worst.verdict != "total"
    ax = plot_circuit(s, levels, analysis, worst.downstream).axes[0]
    gids = {a.get_gid() for a in [*ax.collections, *ax.patches]}
    assert f"band:{worst.downstream}" in gids and f"band:{worst.upstream}" in gids


def test_small_shop_is_one_board_of_about_fifteen_circuits():
    s = study.load(EXAMPLES / "small-shop.toml")
    boards = [c.id for c in s.circuits if s.children.get(c.id)]
    assert len(boards) == 1
    assert 12 <= len(s.circuits) <= 18


def test_office_building_has_sub_mains_and_an_electronic_incomer():
    s = study.load(EXAMPLES / "office-building.toml")
    incomers = s.children["supply"]
    assert len(incomers) == 1
    assert band_for(s, incomers[0]).family == "breaker-electronic"
    sub_mains = s.children[incomers[0]]
    assert 3 <= len(sub_mains) <= 4
    boards = [c.id for c in s.circuits if s.children.get(c.id)]
    assert len(boards) >= 5  # the main switchboard, the floor boards, the tenant board
    assert 50 <= len(s.circuits) <= 70


def test_small_shop_matches_its_description():
    # the README: total selectivity for the type B MCBs up to 16 A, partial (decided by energy)
    # for the B20 and B32 socket circuits and every type C MCB; the C63 oven partial too
    s = study.load(EXAMPLES / "small-shop.toml")
    levels = faults.compute(s)
    for p in engine.analyse(s, levels).pairs:
        band = band_for(s, p.downstream)
        kind = band.settings.get("type")
        if kind == "B" and band.rating_a <= 16:
            assert p.verdict == "total", p
        else:
            assert p.verdict == "partial", p
            if band.rating_a < 63:
                assert p.decided_by == "energy", p


def _verdicts(s):
    results = checks.run(s, faults.compute(s))
    return {(r.circuit, r.check): r for r in results}


def test_cycle_shop_passes_under_bs7671_and_differs_under_iec_as_its_readme_says():
    # examples/README.md's table: under IEC 60364 the tails fail overload (I2 = 1.6 In > 1.45 Iz,
    # IEC 60364-4-43 433.1), the compressor socket circuit gets 5 s rather than 0.4 s
    # (IEC 60364-4-41:2005 411.3.2.2/411.3.2.3 against BS 7671:2018 411.3.2.2, from memory)
    import dataclasses

    bs = study.load(EXAMPLES / "cycle-shop-bs7671.toml")
    assert bs.rules == "bs7671"
    assert engine.analyse(bs, faults.compute(bs)).ok
    under_bs = _verdicts(bs)
    assert all(r.ok for r in under_bs.values())
    under_iec = _verdicts(dataclasses.replace(bs, rules="iec"))
    failed = sorted(key for key, r in under_iec.items() if not r.ok)
    assert failed == [("tails", "overload")]
    assert under_bs[("compressor-socket", "disconnection")].limit == 0.4
    assert under_iec[("compressor-socket", "disconnection")].limit == 5.0
    # the consumer unit's MCBs pass on the declared conditional rating, not on their own
    ring = under_bs[("shop-ring", "breaking-capacity")]
    assert ring.value > 3000.0 and "declared back-up by tails" in ring.reason


def test_the_tt_example_passes_every_check_with_its_rcds():
    # IEC 60364-4-41 Table 41.1 (TT 0.2 s / 1 s), 411.5.3 (RA x IΔn <= 50 V), 411.3.3; the
    # residual pairs by IEC 60364-5-53 (from memory)
    s = study.load(EXAMPLES / "orchard-cottage-tt.toml")
    assert s.supply.earthing == "TT"
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)
    results = checks.run(s, levels)
    assert analysis.ok and all(r.ok for r in results), [r for r in results if not r.ok]
    names = {r.check for r in results}
    assert {"touch-voltage", "additional-protection", "leakage"} <= names
    assert all("RCD" in r.reason for r in results if r.check == "disconnection")
    assert analysis.residual and all(p.protection == "residual" for p in analysis.residual)
    assert any(s.by_id[c.id].device is None for c in s.circuits)  # an RCCB
