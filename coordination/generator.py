"""Standby generators as fault sources: impedances after IEC 60909-0 and the decrement I(t).

A generator's short-circuit current is not a constant prospective value: it starts at the
subtransient current, falls through the transient current and settles at the sustained current
(about 3 times rated with excitation support, nothing without it). This module gives, as pure
functions over numbers and numpy arrays:

* the generator's sequence impedances at its terminals (:func:`generator_impedances`): the
  subtransient and transient reactances ``X = x U_rG^2 / S_rG`` (IEC 60909-0:2016, 6.6.1,
  equation (17)), a resistance ``R_Gf = 0.15 X''d`` (the same clause, generators with
  ``U_rG <= 1 kV``, from memory), the negative-sequence impedance taken equal to the
  subtransient one (``X_(2) = X''d``, from memory: the standard takes the mean of ``X''d`` and
  ``X''q``) and the zero-sequence reactance ``X_(0)``;
* the correction factor ``K_G = (U_n / U_rG) c_max / (1 + x''d sin phi_rG)`` for maximum
  currents (IEC 60909-0:2016, 6.6.1, equation (18); rated power factor 0.8, common practice
  for low-voltage generating sets);
* the source's part of each fault loop at each stage (:func:`stage_loops`): for a three-phase
  fault the positive-sequence impedance; for a line-neutral or line-earth fault the
  symmetrical-components loop ``(Z_(1) + Z_(2) + Z_(0)) / 3``, so that
  ``I_k1 = 3 c U0 / |Z_(1) + Z_(2) + Z_(0)| = sqrt(3) c U_n / |2 Z_(1) + Z_(0)|`` at the
  terminals (IEC 60909-0:2016, 7.2.4, equation (52)), with the installation's loop added in
  series; for a line-line fault ``2 Z_(1)`` with ``sqrt(3) c U0`` (equation (44));
* the decrement (:func:`decrement_current_a`, common practice)::

      I(t) = (I''k - I'k) exp(-t / T''d) + (I'k - Ik) exp(-t / T'd) + Ik

  with ``I''k`` and ``I'k`` the currents through the subtransient and transient loops and
  ``Ik`` the sustained current, and its energy ``integral of I(t)^2 dt``
  (:func:`decrement_i2t_a2s`, in closed form).

Simplifications, each on the side that gives the smaller current where a device must operate:

* The sustained current is a declared figure at the terminals, ``sustained_x`` times the rated
  current; it is represented by a reactance that gives exactly that current on a bolted
  three-phase fault at the terminals, so a fault further away gets less (an excitation system
  would force more). ``sustained_x = 0`` (no excitation support): the current decays to zero.
* The time constants are the terminal three-phase ones for every fault. An impedance outside
  the machine lengthens them (``T'd = T'd0 (X'd + X_e) / (X_d + X_e)``, from memory), and so do
  the larger loops of unsymmetrical faults; the terminal values let the current fall fastest.
* Minimum currents take ``c_min U0`` and the uncorrected impedances; maximum currents
  ``c_max U0`` with ``K_G`` on the subtransient, transient, negative- and zero-sequence
  impedances (the sustained current is the declared one in both).
* The decrement never rises: each stage's current is held at or below the one before.

References
----------
IEC 60909-0:2016, Short-circuit currents in three-phase a.c. systems, clauses 6.6.1
(generators: X''d, R_Gf, K_G), 7.1.2 (three-phase), 7.2.2 (line-line), 7.2.4 (line-earth) and
clause 4.2 (far-from-generator and near-to-generator faults: the decaying a.c. component).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

SQRT3 = math.sqrt(3.0)
#: sin phi_rG of a low-voltage generating set rated at power factor 0.8 (common practice).
SIN_PHI_RATED = 0.6
#: R_Gf / X''d for generators with U_rG <= 1 kV (IEC 60909-0:2016, 6.6.1, from memory).
R_G_FRACTION = 0.15

FaultKind = Literal["three-phase", "loop", "line-line"]
#: The fault loops a source is asked for: three-phase (per phase), a single-phase loop
#: (line-neutral or line-earth) and line-line.
FAULT_KINDS: tuple[FaultKind, ...] = ("three-phase", "loop", "line-line")


@dataclass(frozen=True)
class StandbySource:
    """A standby generator that takes over a board through a changeover.

    Parameters
    ----------
    name : str
        The source's name: the ``case`` of every result it gives.
    rating_kva : float
        Rated apparent power S_rG [kVA].
    u0_v : float
        Rated line-to-earth voltage U_rG / sqrt(3) [V].
    xd2_pct, xd1_pct : float
        Subtransient and transient reactances x''d, x'd [% of the rated impedance].
    td2_s, td1_s : float
        Subtransient and transient short-circuit time constants T''d, T'd [s].
    x0_pct : float
        Zero-sequence reactance x_(0) [%].
    sustained_x : float
        Sustained short-circuit current in multiples of the rated current [-] (about 3 with
        excitation support, 0 without).
    feeds : str or None
        The circuit whose board the source supplies (``None``: the incomer's board).
    """

    name: str
    rating_kva: float
    u0_v: float
    xd2_pct: float
    xd1_pct: float
    td2_s: float
    td1_s: float
    x0_pct: float
    sustained_x: float = 0.0
    feeds: str | None = None

    @property
    def rated_current_a(self) -> float:
        """Rated current I_rG [A]."""
        return rated_current_a(self.rating_kva, self.u0_v)


# -- pure functions, one per model ---------------------------------------------------------------
def rated_current_a(rating_kva: float, u0_v: float) -> float:
    """Rated current of a three-phase machine ``I_r = S_r / (3 U0)`` [A].

    Parameters
    ----------
    rating_kva : float
        Rated apparent power [kVA].
    u0_v : float
        Rated line-to-earth voltage [V].

    References
    ----------
    IEC 60909-0:2016, 6.6.1 (``S_rG = sqrt(3) U_rG I_rG``).

    Examples
    --------
    >>> print(f"{rated_current_a(500, 230):.1f}")
    724.6
    """
    return rating_kva * 1000.0 / (3.0 * u0_v)


def reactance_ohm(x_pct: float, rating_kva: float, u0_v: float) -> float:
    """A machine reactance in ohm from its per-unit value: ``X = x U_rG^2 / S_rG`` [ohm].

    Parameters
    ----------
    x_pct : float
        Reactance [% of the rated impedance].
    rating_kva : float
        Rated apparent power S_rG [kVA].
    u0_v : float
        Rated line-to-earth voltage [V] (``U_rG = sqrt(3) U0``).

    References
    ----------
    IEC 60909-0:2016, 6.6.1, equation (17).

    Examples
    --------
    >>> print(f"{reactance_ohm(12, 500, 230):.5f}")
    0.03809
    """
    return x_pct / 100.0 * 3.0 * u0_v**2 / (rating_kva * 1000.0)


def generator_correction(xd2_pct: float, c_max: float = 1.05, *, u_n_v: float | None = None,
                         u_rg_v: float | None = None, sin_phi: float = SIN_PHI_RATED) -> float:
    """Correction factor K_G of a generator's impedances for maximum currents [-].

    ``K_G = (U_n / U_rG) c_max / (1 + x''d sin phi_rG)``.

    Parameters
    ----------
    xd2_pct : float
        Subtransient reactance x''d [%].
    c_max : float
        Voltage factor for maximum currents [-].
    u_n_v, u_rg_v : float, optional
        The system's nominal voltage and the generator's rated voltage [V] (same kind: both
        line-to-line or both line-to-earth); omitted, their ratio is 1.
    sin_phi : float
        sin phi_rG at the rated power factor [-] (0.6: cos phi 0.8, common practice).

    References
    ----------
    IEC 60909-0:2016, 6.6.1, equation (18).

    Examples
    --------
    >>> print(f"{generator_correction(12.0, 1.05):.4f}")
    0.9795
    """
    ratio = 1.0 if u_n_v is None or u_rg_v is None else u_n_v / u_rg_v
    return ratio * c_max / (1.0 + xd2_pct / 100.0 * sin_phi)


@dataclass(frozen=True)
class SequenceImpedances:
    """A generator's impedances at its terminals [ohm].

    ``z1_sub`` and ``z1_trans`` are the positive-sequence impedances of the subtransient and
    transient stages, ``z1_sust`` the one that gives the sustained current (``None`` without
    one), ``z2`` and ``z0`` the negative- and zero-sequence impedances.
    """

    z1_sub: complex
    z1_trans: complex
    z1_sust: complex | None
    z2: complex
    z0: complex


def generator_impedances(source: StandbySource, *, u_n0_v: float, c: float,
                         maximum: bool, c_max: float = 1.05) -> SequenceImpedances:
    """The generator's sequence impedances for maximum or minimum currents [ohm].

    Parameters
    ----------
    source : StandbySource
        The machine.
    u_n0_v : float
        The installation's nominal line-to-earth voltage U0 [V] (``U_n = sqrt(3) U0``).
    c : float
        The voltage factor of the case (``c_max`` or ``c_min``) [-]: the sustained stage's
        reactance is set so that ``c U0`` drives exactly ``sustained_x I_rG`` through it.
    maximum : bool
        Apply ``K_G`` (maximum currents) or not (minimum currents).
    c_max : float
        The voltage factor in ``K_G`` [-].

    Returns
    -------
    SequenceImpedances

    References
    ----------
    IEC 60909-0:2016, 6.6.1 (Z_G = R_G + j X''d, R_Gf, K_G; negative- and zero-sequence
    impedances corrected by the same K_G).

    Examples
    --------
    >>> g = StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3, 5, 3.0)
    >>> z = generator_impedances(g, u_n0_v=230, c=0.95, maximum=False)
    >>> print(f"{z.z1_sub.imag:.5f} {z.z1_sub.real:.5f} {abs(z.z1_sust):.5f}")
    0.03809 0.00571 0.10051
    """
    s, u0 = source.rating_kva, source.u0_v
    x_sub = reactance_ohm(source.xd2_pct, s, u0)
    x_trans = reactance_ohm(source.xd1_pct, s, u0)
    x_zero = reactance_ohm(source.x0_pct, s, u0)
    r_g = R_G_FRACTION * x_sub
    k = (generator_correction(source.xd2_pct, c_max, u_n_v=u_n0_v, u_rg_v=u0)
         if maximum else 1.0)
    z_sub = k * complex(r_g, x_sub)
    z_trans = k * complex(r_g, x_trans)
    z_sust: complex | None = None
    if source.sustained_x > 0:
        z_mag = c * u_n0_v / (source.sustained_x * source.rated_current_a)
        r = min(z_sub.real, z_mag)
        z_sust = complex(r, math.sqrt(z_mag * z_mag - r * r))
    return SequenceImpedances(z1_sub=z_sub, z1_trans=z_trans, z1_sust=z_sust, z2=z_sub,
                              z0=k * complex(0.0, x_zero))


def stage_loops(z: SequenceImpedances, kind: FaultKind) -> tuple[complex, complex,
                                                                 complex | None]:
    """The source's part of a fault loop at each stage (subtransient, transient, sustained)
    [ohm], to which the installation's loop of the same kind is added.

    ``three-phase``: ``Z_(1)`` (driven by ``c U0``); ``loop`` (line-neutral, line-earth):
    ``(Z_(1) + Z_(2) + Z_(0)) / 3`` (driven by ``c U0``); ``line-line``: ``2 Z_(1)`` (driven by
    ``sqrt(3) c U0``). ``None`` for a sustained stage that carries no current.

    References
    ----------
    IEC 60909-0:2016, 7.1.2 equation (29), 7.2.2 equation (44), 7.2.4 equation (52).

    Examples
    --------
    >>> z = SequenceImpedances(0.03j, 0.06j, None, 0.03j, 0.015j)
    >>> print([round(abs(x), 4) if x is not None else None for x in stage_loops(z, "loop")])
    [0.025, 0.035, None]
    """
    ones = (z.z1_sub, z.z1_trans, z.z1_sust)
    if kind == "three-phase":
        return ones  # type: ignore[return-value]
    if kind == "line-line":
        return tuple(None if x is None else 2 * x for x in ones)  # type: ignore[return-value]
    if kind == "loop":
        return tuple(None if x is None else (x + z.z2 + z.z0) / 3  # type: ignore[return-value]
                     for x in ones)
    raise ValueError(f"fault kind must be one of {FAULT_KINDS}, not {kind!r}")


def driving_voltage_v(u0_v: float, c: float, kind: FaultKind) -> float:
    """The voltage that drives a fault loop of a kind: ``c U0``, or ``sqrt(3) c U0`` line-line
    [V].

    References
    ----------
    IEC 60909-0:2016, 7.1.2 and 7.2.2 (equivalent voltage source ``c U_n / sqrt(3)``).

    Examples
    --------
    >>> print(round(driving_voltage_v(230, 0.95, "line-line"), 2))
    378.45
    """
    return c * u0_v * (SQRT3 if kind == "line-line" else 1.0)


def stage_currents_a(loops: tuple[complex, complex, complex | None], path_ohm: Any,
                     voltage_v: float, *, arithmetic: bool = False) -> tuple[
                         np.ndarray, np.ndarray, np.ndarray]:
    """The currents of the three stages through a path added to the source's loops [A].

    Parameters
    ----------
    loops : tuple
        :func:`stage_loops` [ohm].
    path_ohm : complex or array_like of complex
        The installation's loop of the same kind, from the source's terminals to the fault
        [ohm].
    voltage_v : float
        :func:`driving_voltage_v` [V].
    arithmetic : bool
        Add the magnitudes of the source's loop and the path instead of the complex
        impedances (``Zs = Ze + |R1 + R2 + jX|``, BS 7671 Regulation 411.4 practice: never
        less than the complex sum, so the current is never more).

    Returns
    -------
    i_sub, i_trans, i_sust : numpy.ndarray
        Subtransient, transient and sustained currents [A]; each held at or below the one
        before (the decrement never rises), the sustained one 0 without a sustained stage.

    Examples
    --------
    >>> i = stage_currents_a((0.03j, 0.06j, None), 0.1, 230.0)
    >>> print([round(float(x)) for x in i])
    [2203, 1972, 0]
    """
    path = np.asarray(path_ohm, dtype=complex)

    def loop(z: complex) -> np.ndarray:
        return abs(z) + np.abs(path) if arithmetic else np.abs(z + path)

    i_sub = voltage_v / loop(loops[0])
    i_trans = np.minimum(voltage_v / loop(loops[1]), i_sub)
    if loops[2] is None:
        i_sust = np.zeros_like(i_sub)
    else:
        i_sust = np.minimum(voltage_v / loop(loops[2]), i_trans)
    return i_sub, i_trans, i_sust


def decrement_current_a(t_s: Any, i_sub_a: Any, i_trans_a: Any, i_sust_a: Any, td2_s: float,
                        td1_s: float) -> np.ndarray:
    """The symmetrical short-circuit current of a generator at time t [A r.m.s.].

    ``I(t) = (I''k - I'k) exp(-t/T''d) + (I'k - Ik) exp(-t/T'd) + Ik``.

    Parameters
    ----------
    t_s : array_like
        Time since the fault began [s].
    i_sub_a, i_trans_a, i_sust_a : array_like
        Subtransient I''k, transient I'k and sustained Ik currents [A] (broadcast with ``t_s``).
    td2_s, td1_s : float
        Short-circuit time constants T''d and T'd [s].

    Returns
    -------
    numpy.ndarray
        I(t) [A].

    References
    ----------
    Common practice (the a.c. component of a near-to-generator short circuit, IEC 60909-0:2016
    clause 4.2 and Figure 2, with the time constants of the machine).

    Examples
    --------
    >>> print(round(float(decrement_current_a(0.3, 10000, 5000, 2000, 0.02, 0.3)), 1))
    3103.6
    """
    t = np.asarray(t_s, dtype=float)
    i2, i1, ik = (np.asarray(x, dtype=float) for x in (i_sub_a, i_trans_a, i_sust_a))
    return (i2 - i1) * np.exp(-t / td2_s) + (i1 - ik) * np.exp(-t / td1_s) + ik


def decrement_i2t_a2s(t_s: Any, i_sub_a: Any, i_trans_a: Any, i_sust_a: Any, td2_s: float,
                      td1_s: float) -> np.ndarray:
    """The energy of the decaying current from the fault's start to time t:
    ``integral of I(t)^2 dt`` [A^2 s], in closed form.

    With ``a = I''k - I'k``, ``b = I'k - Ik``, ``c = Ik`` and ``E(k) = (1 - exp(-k t)) / k``:
    ``a^2 E(2/T''d) + b^2 E(2/T'd) + c^2 t + 2ab E(1/T''d + 1/T'd) + 2ac E(1/T''d)
    + 2bc E(1/T'd)``. ``inf`` for an infinite time with a sustained current.

    Parameters
    ----------
    t_s : array_like
        Duration [s] (``inf`` allowed).
    i_sub_a, i_trans_a, i_sust_a : array_like
        I''k, I'k, Ik [A].
    td2_s, td1_s : float
        T''d, T'd [s].

    Returns
    -------
    numpy.ndarray
        [A^2 s].

    References
    ----------
    The adiabatic energy of IEC 60364-4-43:2008, 434.5.2 (``integral i^2 dt`` up to
    disconnection), for the decrement of :func:`decrement_current_a`.

    Examples
    --------
    >>> print(round(float(decrement_i2t_a2s(1.0, 1000, 1000, 1000, 0.02, 0.3))))
    1000000
    """
    t = np.asarray(t_s, dtype=float)
    i2, i1, ik = (np.asarray(x, dtype=float) for x in (i_sub_a, i_trans_a, i_sust_a))
    a, b, c = i2 - i1, i1 - ik, ik

    def e(rate: float) -> np.ndarray:
        return -np.expm1(-rate * t) / rate

    r2, r1 = 1.0 / td2_s, 1.0 / td1_s
    with np.errstate(invalid="ignore"):
        steady = np.where(c > 0, c * c * t, 0.0)
    return (a * a * e(2 * r2) + b * b * e(2 * r1) + steady + 2 * a * b * e(r2 + r1)
            + 2 * a * c * e(r2) + 2 * b * c * e(r1))


@dataclass(frozen=True)
class Decrement:
    """The decaying current of one fault (or of many faults: array fields) [A, s].

    ``current_a(t)`` and ``i2t_a2s(t)`` broadcast the fields against ``t``: for many faults at
    once give the fields as column arrays (shape ``(n, 1)``) and ``t`` as a row.
    """

    i_sub_a: Any
    i_trans_a: Any
    i_sust_a: Any
    td2_s: float
    td1_s: float

    def current_a(self, t_s: Any) -> np.ndarray:
        """I(t) [A] (:func:`decrement_current_a`)."""
        return decrement_current_a(t_s, self.i_sub_a, self.i_trans_a, self.i_sust_a,
                                   self.td2_s, self.td1_s)

    def i2t_a2s(self, t_s: Any) -> np.ndarray:
        """``integral of I^2 dt`` from 0 to t [A^2 s] (:func:`decrement_i2t_a2s`)."""
        return decrement_i2t_a2s(t_s, self.i_sub_a, self.i_trans_a, self.i_sust_a,
                                 self.td2_s, self.td1_s)


def fault_decrement(source: StandbySource, kind: FaultKind, path_ohm: Any, *, u_n0_v: float,
                    c: float, maximum: bool, c_max: float = 1.05) -> Decrement:
    """The decrement of a fault of a kind, through a path from the source's terminals.

    Parameters
    ----------
    source : StandbySource
        The generator.
    kind : {"three-phase", "loop", "line-line"}
        The fault (see :func:`stage_loops`).
    path_ohm : complex or array_like of complex
        The installation's part of the loop, from the terminals to the fault [ohm].
    u_n0_v : float
        The installation's nominal line-to-earth voltage [V].
    c : float
        Voltage factor [-] (``c_max`` with ``maximum``, else ``c_min``).
    maximum : bool
        Maximum currents (``K_G``) or minimum currents.
    c_max : float
        The voltage factor in ``K_G`` [-].

    Returns
    -------
    Decrement

    References
    ----------
    IEC 60909-0:2016, 6.6.1, 7.1.2, 7.2.2, 7.2.4; the decrement: common practice.

    Examples
    --------
    >>> g = StandbySource("gen", 500, 230, 12, 25, 0.02, 0.3, 5, 0.0)
    >>> d = fault_decrement(g, "three-phase", 0j, u_n0_v=230, c=0.95, maximum=False)
    >>> print(round(float(d.i_sub_a)), round(float(d.i_trans_a)), round(float(d.i_sust_a)))
    5673 2747 0
    """
    z = generator_impedances(source, u_n0_v=u_n0_v, c=c, maximum=maximum, c_max=c_max)
    voltage = driving_voltage_v(u_n0_v, c, kind)
    i_sub, i_trans, i_sust = stage_currents_a(stage_loops(z, kind), path_ohm, voltage)
    return Decrement(i_sub, i_trans, i_sust, source.td2_s, source.td1_s)


def decrement_curve(decrement: Decrement, *, t_from_s: float = 1e-3, t_to_s: float = 1e4,
                    points: int = 300, floor_a: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """The decrement as a curve on the time-current plane: currents [A] and times [s].

    Parameters
    ----------
    decrement : Decrement
        One fault's decaying current (scalar fields).
    t_from_s, t_to_s : float
        The times drawn, log-spaced [s].
    points : int
        Samples.
    floor_a : float
        The curve stops where the current falls below this [A] (the plot's left edge).

    Returns
    -------
    current_a, time_s : numpy.ndarray
        The curve ``(I(t), t)``, current falling as time grows.

    Examples
    --------
    >>> i, t = decrement_curve(Decrement(6000.0, 3000.0, 0.0, 0.02, 0.3), floor_a=100.0)
    >>> print(bool(i[0] > 5000 and i[-1] >= 100 and t[-1] < 2))
    True
    """
    t = np.logspace(math.log10(t_from_s), math.log10(t_to_s), points)
    i = decrement.current_a(t)
    keep = i >= floor_a
    return i[keep], t[keep]
