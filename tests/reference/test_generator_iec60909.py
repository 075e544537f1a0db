"""A standby generator as a fault source against hand calculations: IEC 60909-0 impedances and
correction factor, the symmetrical-components earth fault, the decrement I(t) and its energy,
and operating times read where the decrement meets a characteristic.

The machine of the hand calculations (invented): 500 kVA, U_rG 400 V, x''d 12 %, x'd 25 %,
x_(0) 5 %, T''d 0.02 s, T'd 0.3 s. Every expected value is worked by hand in the comment above
its parametrize.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate, optimize

from coordination import decay, generator
from coordination.generator import Decrement, StandbySource

U0 = 400 / math.sqrt(3)  # 230.94 V


def machine(sustained_x: float = 0.0) -> StandbySource:
    return StandbySource("gen", 500.0, U0, 12.0, 25.0, 0.02, 0.3, 5.0, sustained_x)


# IEC 60909-0:2016, 6.6.1 eq. (17): X = x U_rG^2 / S_rG, U_rG^2 / S_rG = 400^2 / 500e3 = 0.32 ohm:
# X''d = 0.12 x 0.32 = 0.0384, X'd = 0.25 x 0.32 = 0.08, X_(0) = 0.05 x 0.32 = 0.016 ohm;
# R_Gf = 0.15 X''d = 0.00576 ohm (the same clause, U_rG <= 1 kV, from memory)
@pytest.mark.parametrize(("x_pct", "expected_ohm"), [(12.0, 0.0384), (25.0, 0.08), (5.0, 0.016)])
def test_reactance_by_hand(x_pct: float, expected_ohm: float) -> None:
    np.testing.assert_allclose(generator.reactance_ohm(x_pct, 500.0, U0), expected_ohm,
                               rtol=1e-12)


# IEC 60909-0:2016, 6.6.1 eq. (18): K_G = (U_n / U_rG) c_max / (1 + x''d sin phi_rG);
# cos phi 0.8 (sin 0.6): 1.05 / (1 + 0.12 x 0.6) = 1.05 / 1.072 = 0.979478;
# a 400 V machine on a 380 V system: 0.95 x 0.979478 = 0.930504
@pytest.mark.parametrize(("u_n", "expected"), [(400.0, 0.979478), (380.0, 0.930504)])
def test_correction_factor_by_hand(u_n: float, expected: float) -> None:
    k = generator.generator_correction(12.0, 1.05, u_n_v=u_n, u_rg_v=400.0)
    np.testing.assert_allclose(k, expected, rtol=1e-6)


# IEC 60909-0:2016, 7.1.2 eq. (29) and 6.6.1: I''k3 = c U_n / (sqrt(3) |K_G Z_G|), Z_G =
# 0.00576 + j 0.0384, |Z_G| = 0.0388296 ohm.
# maximum: 1.05 x 400 / (sqrt(3) x 0.979478 x 0.0388296) = 6375.7 A;
# minimum (c_min 0.95, no K_G): 0.95 x 230.94 / 0.0388296 = 5650.2 A;
# transient, minimum: |0.00576 + j 0.08| = 0.0802071: 219.393 / 0.0802071 = 2735.3 A.
# IEC 60909-0:2016, 7.2.4 eq. (52): I''k1 = sqrt(3) c U_n / |2 Z_(1) + Z_(0)| (Z_(2) = Z_(1),
# from memory): |0.01152 + j 0.0928| = 0.0935123; minimum sqrt(3) x 0.95 x 400 / 0.0935123
# = 7038.4 A; maximum with K_G on every sequence impedance: sqrt(3) x 1.05 x 400 /
# (0.979478 x 0.0935123) = 7942.3 A
@pytest.mark.parametrize(("kind", "maximum", "stage", "expected_a"), [
    ("three-phase", True, "i_sub_a", 6375.7),
    ("three-phase", False, "i_sub_a", 5650.2),
    ("three-phase", False, "i_trans_a", 2735.3),
    ("loop", False, "i_sub_a", 7038.4),
    ("loop", True, "i_sub_a", 7942.3),
])
def test_terminal_fault_by_hand(kind: generator.FaultKind, maximum: bool, stage: str,
                                expected_a: float) -> None:
    d = generator.fault_decrement(machine(), kind, 0j, u_n0_v=U0, c=1.05 if maximum else 0.95,
                                  maximum=maximum)
    np.testing.assert_allclose(float(getattr(d, stage)), expected_a, rtol=2e-5)


# The sustained current (common practice): sustained_x times I_rG at the terminals,
# I_rG = 500e3 / (sqrt(3) x 400) = 721.69 A: 3 x 721.69 = 2165.06 A; none without support
@pytest.mark.parametrize(("sustained_x", "expected_a"), [(3.0, 2165.06), (0.0, 0.0)])
def test_sustained_current_by_hand(sustained_x: float, expected_a: float) -> None:
    d = generator.fault_decrement(machine(sustained_x), "three-phase", 0j, u_n0_v=U0, c=0.95,
                                  maximum=False)
    np.testing.assert_allclose(float(d.i_sust_a), expected_a, rtol=1e-5, atol=1e-9)


# The decrement (common practice): I(t) = (I'' - I') e^(-t/T''d) + (I' - Ik) e^(-t/T'd) + Ik,
# I'' 10 kA, I' 5 kA, Ik 2 kA, T''d 0.02 s, T'd 0.3 s:
# t = 0: 10 000 A; t = 0.02 s: 5000 x 0.367879 + 3000 x 0.935507 + 2000 = 6645.92 A;
# t = 0.3 s: 5000 x e^-15 + 3000 x 0.367879 + 2000 = 3103.64 A;
# t = 0.5 s: 5000 x e^-25 + 3000 x 0.188876 + 2000 = 2566.63 A; t = 60 s: 2000 A
@pytest.mark.parametrize(("t_s", "expected_a"), [
    (0.0, 10000.0), (0.02, 6645.92), (0.3, 3103.64), (0.5, 2566.63), (60.0, 2000.0)])
def test_decrement_by_hand(t_s: float, expected_a: float) -> None:
    got = generator.decrement_current_a(t_s, 10000.0, 5000.0, 2000.0, 0.02, 0.3)
    np.testing.assert_allclose(float(got), expected_a, rtol=3e-6)


# The energy integral of I(t)^2 dt (IEC 60364-4-43:2008, 434.5.2) against scipy's adaptive
# quadrature (a general-purpose reference library) of the same decrement
@pytest.mark.parametrize(("t_s", "i_sust_a"), [
    (0.005, 2000.0), (0.1, 2000.0), (0.4, 0.0), (5.0, 2000.0), (5.0, 0.0)])
def test_decrement_energy_against_quadrature(t_s: float, i_sust_a: float) -> None:
    def square(t: float) -> float:
        return float(generator.decrement_current_a(t, 10000.0, 5000.0, i_sust_a, 0.02, 0.3)) ** 2

    expected, _ = integrate.quad(square, 0.0, t_s, epsabs=1e-6, epsrel=1e-12, limit=200)
    got = generator.decrement_i2t_a2s(t_s, 10000.0, 5000.0, i_sust_a, 0.02, 0.3)
    np.testing.assert_allclose(float(got), expected, rtol=1e-9)


def definite_time(pickup_a: float, time_s: float):
    return lambda i: np.where(np.asarray(i) >= pickup_a, time_s, np.inf)


# Operating time where the decrement meets a definite-time edge (common practice): I'' 6 kA,
# I' 3 kA, no sustained current: I(0.1 s) = 3000 e^-5 + 3000 e^-0.3333 = 20.2 + 2149.6
# = 2169.8 A >= 2000 A, so a 2000 A / 0.1 s edge is met at 0.1 s; I(0.15 s) = 3000 e^-0.5 +
# 3000 e^-7.5 = 1819.6 + 1.7 A < 2000 A: a 2000 A / 0.15 s edge is never met (the current has
# fallen below the pickup first); I(0.15 s) >= 1000 A: a 1000 A / 0.15 s edge at 0.15 s
@pytest.mark.parametrize(("pickup_a", "time_s", "expected_s"), [
    (2000.0, 0.1, 0.1), (2000.0, 0.15, math.inf), (1000.0, 0.15, 0.15)])
def test_definite_time_edge_under_decay_by_hand(pickup_a: float, time_s: float,
                                                expected_s: float) -> None:
    got = decay.operating_time_s(definite_time(pickup_a, time_s),
                                 Decrement(6000.0, 3000.0, 0.0, 0.02, 0.3))
    np.testing.assert_allclose(got[0], expected_s, rtol=1e-5)  # decay._XTOL: 2.3e-6


# An I^2 t = K edge (t = K / I^2) meets the decrement where t I(t)^2 = K: solved by scipy's
# Brent method (a general-purpose reference library) on the same decrement
@pytest.mark.parametrize("k_a2s", [2.0e5, 1.0e6, 5.0e6, 2.0e7])
def test_energy_edge_under_decay_against_brent(k_a2s: float) -> None:
    d = Decrement(6000.0, 3000.0, 1000.0, 0.02, 0.3)

    def gap(t: float) -> float:
        return t * float(d.current_a(t)) ** 2 - k_a2s

    expected = optimize.brentq(gap, 1e-9, 1e4, xtol=1e-15, rtol=1e-14)
    got = decay.operating_time_s(lambda i: k_a2s / np.asarray(i) ** 2, d)
    np.testing.assert_allclose(got[0], expected, rtol=1e-5)  # decay._XTOL: 2.3e-6


# The minimum earth fault at a final circuit's far end on the generator (invented circuit:
# 500 kVA at U_rG = sqrt(3) x 230 V, x''d 12 %, x'd 25 %, x0 5 %; 20 m of 2.5 / 1.5 mm2 copper
# PVC). U_rG^2 / S_rG = 0.3174 ohm: X''d = 0.038088, R_G = 0.0057132, X'd = 0.07935,
# X0 = 0.01587 ohm. IEC 60909-0:2016, 7.2.4: the generator's loop (2 Z1 + Z0) / 3 =
# 0.0038088 + j 0.030682, |.| = 0.030918 ohm (transient: Z1 with X'd, |.| = 0.044599 ohm).
# IEC 60228 Table 2 and Annex B: R1 + R2 at 70 degC = (7.41 + 12.1) x 0.020 x 304.5 / 254.5
# = 0.46686 ohm, with 0.08 mohm/m per conductor (common practice): |path| = 0.466871 ohm.
# BS 7671 Regulation 411.4 practice, Zs = loop + |R1 + R2 + jX|: 0.497789 ohm;
# c_min U0 = 0.95 x 230 = 218.5 V: I''ef = 438.94 A; I'ef = 218.5 / 0.511470 = 427.20 A
@pytest.mark.parametrize(("stage", "expected_a"), [("i_sub_a", 438.94), ("i_trans_a", 427.20)])
def test_minimum_earth_fault_through_a_cable_by_hand(stage: str, expected_a: float) -> None:
    from coordination.model import Cable, Circuit, Study, Supply
    from coordination.standby import case_levels

    s = Study("hand", Supply(pfc_a=16000.0), (
        Circuit("in", "supply", "gG200"),
        Circuit("a", "in", "B16", phases=1, cable=Cable(20, 2.5, 1.5))))
    case = case_levels(s, StandbySource("gen", 500.0, 230.0, 12.0, 25.0, 0.02, 0.3, 5.0))
    got = float(getattr(case.nodes["a"].earth_end, stage))
    np.testing.assert_allclose(got, expected_a, rtol=2e-5)
