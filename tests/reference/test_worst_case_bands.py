"""The worst case (envelope) never clears faster than the standards guarantee.

IEC 60898-1 (MCB time-current table, tests c, d, e), EN 60898-1 Annex ZA (energy-limiting classes),
IEC 60947-2 (conventional currents, instantaneous tolerance), BS 7671:2018 Table 41.3 (maximum Zs
of MCBs for 0.4 s and 5 s) and IEC 60364-4-41 Table 41.1 / 411.3.2.3 (disconnection times).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from coordination import checks, faults, study
from coordination.report import register_settings
from coordination.text import format_current, format_seconds
from curves.breaker import thermal_magnetic_band
from curves.errors import InputError
from curves.mcb import MCB_RATINGS_A, mcb_band
from curves.spec import band_from_spec

BASES = ("typical", "envelope")
# IEC 60898-1, instantaneous tripping ranges (lower, upper multiple of In); confirmed
INSTANTANEOUS_X = {"B": (3.0, 5.0), "C": (5.0, 10.0), "D": (10.0, 20.0)}
# BS 7671:2018 Table 41.3 prints Zs with two decimals: half a unit of the last digit, plus a hair
TABLE_ATOL_OHM = 0.005 + 1e-9


# BS 7671:2018 Table 41.3 (U0 230 V, Cmin 0.95): Zs = 0.95 x 230 / Ia with Ia = 5/10/20 In for
# types B/C/D, the same value for 0.4 s and for 5 s (IEC 60898-1 guarantees only the 2.55 In
# time below the upper instantaneous multiple); every rating 6-125 A, on the envelope
@pytest.mark.parametrize("t_s", [0.4, 5.0])
@pytest.mark.parametrize("curve", ["B", "C", "D"])
@pytest.mark.parametrize("rating_a", MCB_RATINGS_A)
def test_bs7671_table_41_3_for_0_4_s_and_5_s(curve: str, rating_a: float, t_s: float) -> None:
    band = mcb_band(curve, rating_a, basis="envelope")
    expected = round(0.95 * 230.0 / (INSTANTANEOUS_X[curve][1] * rating_a), 2)
    got = checks.max_zs_ohm(band, 230.0, t_s, c_min=0.95)
    assert got == pytest.approx(expected, rel=0, abs=TABLE_ATOL_OHM)


# BS 7671:2018 Table 41.3 as printed (firm): B32 1.37, C16 1.37, D16 0.68, D63 0.17 ohm, for
# 0.4 s and 5 s alike
@pytest.mark.parametrize("t_s", [0.4, 5.0])
@pytest.mark.parametrize(("curve", "rating_a", "printed_ohm"), [
    ("B", 32, 1.37), ("C", 16, 1.37), ("D", 16, 0.68), ("D", 63, 0.17),
])
def test_bs7671_table_41_3_printed(curve: str, rating_a: float, printed_ohm: float,
                                   t_s: float) -> None:
    band = mcb_band(curve, rating_a, basis="envelope")
    assert checks.max_zs_ohm(band, 230.0, t_s) == pytest.approx(printed_ohm, rel=0,
                                                                abs=TABLE_ATOL_OHM)


# IEC 60898-1, test c (2.55 In: 1..60 s up to 32 A, 1..120 s above) and test e (upper multiple:
# under 0.1 s): between the two the standard guarantees only the 2.55 In time, so the worst case
# holds it there and never promises faster
@pytest.mark.parametrize("curve", ["B", "C", "D"])
@pytest.mark.parametrize("rating_a", MCB_RATINGS_A)
def test_envelope_upper_edge_holds_the_2_55_in_time_up_to_the_upper_multiple(
    curve: str, rating_a: float
) -> None:
    band = mcb_band(curve, rating_a, basis="envelope")
    t_test = 60.0 if rating_a <= 32 else 120.0
    upper_x = INSTANTANEOUS_X[curve][1]
    between = np.geomspace(2.55, upper_x * (1 - 1e-9), 40) * rating_a
    np.testing.assert_allclose(band.t_max(between), t_test, rtol=1e-12)
    assert float(band.t_max(upper_x * rating_a)) <= 0.1


# IEC 60898-1 Table 7, test d: at B 3 In, C 5 In, D 10 In no tripping in under 0.1 s, at the
# point itself; both bases, every rating
@pytest.mark.parametrize("basis", BASES)
@pytest.mark.parametrize("curve", ["B", "C", "D"])
@pytest.mark.parametrize("rating_a", MCB_RATINGS_A)
def test_no_trip_within_0_1_s_at_the_lower_multiple_itself(curve: str, rating_a: float,
                                                           basis: str) -> None:
    band = mcb_band(curve, rating_a, basis=basis)
    lower_x = INSTANTANEOUS_X[curve][0]
    assert float(band.t_min(lower_x * rating_a)) >= 0.1
    assert float(band.t_min(lower_x * rating_a * (1 + 1e-9))) < 0.1  # the release may act above


def _distribution_study(ze_ohm: float) -> str:
    """An invented workshop: a D16 sub-main on a short cable feeding a small board (a
    distribution circuit, so 5 s in TN) on a TN-S supply of the given Ze."""
    return f"""
[supply]
u0_v = 230
phases = 1
earthing = "TN-S"
ze_ohm = {ze_ohm}
[[circuit]]
id = "sub-main"
from = "supply"
device = "D16"
phases = 1
[circuit.cable]
length_m = 0.1
csa_mm2 = 10
cpc_mm2 = 10
[[circuit]]
id = "lamp"
from = "sub-main"
device = "B6"
phases = 1
[circuit.cable]
length_m = 1
csa_mm2 = 1.5
cpc_mm2 = 1.5
"""


def _disconnection(text: str, cid: str) -> checks.CheckResult:
    s = study.loads(text)
    (found,) = [r for r in checks.run(s, faults.compute(s))
                if r.check == "disconnection" and r.circuit == cid]
    return found


# IEC 60364-4-41 411.3.2.3 (distribution circuits in TN: 5 s) and BS 7671 Table 41.3 (D16:
# 0.68 ohm for 5 s as for 0.4 s): a D16 distribution circuit at Zs about 1.0 ohm fails, at about
# 0.6 ohm passes
@pytest.mark.parametrize(("ze_ohm", "ok"), [(1.0, False), (0.6, True)])
def test_d16_distribution_circuit_disconnection(ze_ohm: float, ok: bool) -> None:
    r = _disconnection(_distribution_study(ze_ohm), "sub-main")
    assert r.details["zs_ohm"] == pytest.approx(ze_ohm, abs=0.01)
    assert r.details["zs_max_ohm"] == pytest.approx(0.68, abs=TABLE_ATOL_OHM)
    assert "distribution circuit" in r.details["circuit_class"]
    assert r.ok is ok


# EN 60898-1 Annex ZA gives the let-through from 3 kA up; below it the typical band lets it grow
# with the prospective current (our modelling choice), while the envelope holds the 3 kA value
# (the let-through never falls as the prospective current rises, so that bounds it)
@pytest.mark.parametrize(("curve", "rating_a"), [("B", 6), ("B", 16), ("C", 16), ("C", 32)])
def test_let_through_below_3_ka(curve: str, rating_a: float) -> None:
    typical = mcb_band(curve, rating_a, basis="typical")
    envelope = mcb_band(curve, rating_a, basis="envelope")
    currents = np.geomspace(INSTANTANEOUS_X[curve][1] * rating_a * 2, 3000.0, 12)
    lt = typical.let_through(currents)
    assert np.all(np.diff(lt) > 0)
    below = currents[currents < 3000.0 * (1 - 1e-9)]
    # held at the 3 kA value, within the 0.1 s the upper multiple guarantees (IEC 60898-1)
    np.testing.assert_allclose(envelope.let_through(below),
                               np.minimum(envelope.let_through(3000.0), below**2 * 0.1),
                               rtol=1e-12)
    assert np.all(lt <= envelope.let_through(currents) * (1 + 1e-12))


# EN 60898-1 Annex ZA covers types B and C up to 32 A only: a class elsewhere is refused, and the
# maker's let-through (invented points here, as a user would give them) is used on both bases
def test_class_refused_where_annex_za_has_none_and_user_points_used() -> None:
    with pytest.raises(InputError) as caught:
        band_from_spec({"family": "mcb", "type": "B", "In_a": 40, "energy_class": 3})
    assert caught.value.key == "energy_class"
    points = [[3000, 40_000], [10_000, 250_000]]
    spec = {"family": "mcb", "type": "D", "In_a": 32, "let_through_a2s": points}
    for basis in BASES:
        band = band_from_spec(spec, basis=basis)
        assert band.let_through is not None
        np.testing.assert_allclose(band.let_through([3000.0, 10_000.0]), [40_000, 250_000],
                                   rtol=1e-9)
        assert any("maker's" in note for note in band.notes)
    with pytest.raises(InputError) as caught:
        band_from_spec({**spec, "let_through_a2s": [[3000, 40_000], [2000, 50_000]]})
    assert caught.value.key == "let_through_a2s"


# EN 60898-1 Annex ZA: no class exists for a C40, so the register must not print one
def test_register_prints_no_class_for_c40() -> None:
    assert "class" not in register_settings(mcb_band("C", 40).settings)
    assert "class 3" in register_settings(mcb_band("C", 16).settings)


# IEC 60947-2 Table 6 (1.30 Ir within the conventional time) and 7.2.1.2.4 a) (magnetic pickup
# +/-20 %, from memory): between them the standard guarantees only the conventional time, so the
# worst case clears within 5 s only from 1.2 Ii, and Zs for 5 s is Cmin U0 / (1.2 Ii)
def test_thermal_magnetic_worst_case_needs_the_magnetic_release() -> None:
    band = thermal_magnetic_band(In_a=250, Ir_x=0.8, Ii_x=5, basis="envelope")
    ii = 5 * 250.0
    between = np.geomspace(1.3 * 200.0, 1.2 * ii * (1 - 1e-9), 30)
    np.testing.assert_allclose(band.t_max(between), 7200.0, rtol=0)
    assert checks.operating_current_a(band, 5.0) == pytest.approx(1.2 * ii, rel=1e-9)
    assert checks.max_zs_ohm(band, 230.0, 5.0) == pytest.approx(0.95 * 230 / (1.2 * ii),
                                                                rel=1e-9)


# common practice: times and currents for people never in exponent notation
@pytest.mark.parametrize("t_s", [0.99989, 1234.5, 0.0001, 9999.6, 54321.0])
def test_times_never_in_exponent_notation(t_s: float) -> None:
    assert "e" not in format_seconds(t_s).split()[0]
    assert math.isclose(float(format_seconds(t_s).split()[0]) *
                        (1e-3 if format_seconds(t_s).endswith("ms") else 1.0), t_s, rel_tol=1e-3)


@pytest.mark.parametrize("i_a", [999.96, 12_345_678.0, 0.5])
def test_currents_never_in_exponent_notation(i_a: float) -> None:
    assert "e" not in format_current(i_a).split()[0]
