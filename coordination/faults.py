"""Fault levels at every board and every circuit's far end (IEC 60909-0 style, low voltage).

Conventions (also carried in :attr:`FaultLevels.convention` and printed with every table):

* **Maximum currents** at a circuit's board (its origin): conductors at 20 degC, voltage factor
  ``c_max`` (1.05 by default), transformer impedance corrected by ``K_T``.
  ``I_k3 = c_max U0 / |Z_phase|`` and ``I_k1 = c_max U0 / |Z_loop|`` where ``Z_loop`` is the
  line-neutral loop: source loop plus line and neutral conductors. The window of a circuit's
  device ends at its board's three-phase value (three-phase circuit) or line-neutral value
  (single-phase circuit): ``NodeFaults.ik_max_a``.
* **Minimum currents** at a circuit's far end: conductors at their maximum operating temperature
  (PVC 70 degC, XLPE 90 degC), ``c_min`` (0.95), no ``K_T``. Earth fault:
  ``Zs = Ze + |sum of (R1 + R2) + j (X1 + X2)|`` along the path from the origin and
  ``Ief = c_min U0 / Zs`` (with no reactance this is BS 7671's ``Zs = Ze + R1 + R2``).
  Short circuit: line-neutral, or line-line (``c_min sqrt(3) U0 / |2 Z_phase|``) beyond a
  three-phase cable that has no neutral.
* **Maximum earth fault** at a circuit's board (``ief_max_board_a``): a line-to-protective-
  conductor fault of negligible impedance there, ``c_max``, conductors at 20 degC:
  ``Ief_max = c_max U0 / |Ze + sum of (R1 + R2) + j (X1 + X2)|`` along the path to the board,
  Ze split by the supply's X/R and added as a complex impedance, like the line-neutral maximum.
  Where Ze is not given the source's earth loop is unknown, and its line-neutral loop for
  maximum currents (the one that gives ``ik1_max_a`` at the origin, with K_T) is taken instead,
  as a conservative bound (where neutral and protective conductor are one PEN conductor the two
  loops are the same; a separate protective conductor is no better: common practice). A circuit
  without a cable adds nothing (the largest current). Never below ``ief_min_board_a``. This is
  the fault at which a current-limiting device (MCB, fuse in its energy region) lets the most
  energy into the protective conductor. In TN a transformer's computed line-neutral loop is
  taken (the earth loop includes it; a Ze below it cannot be); a declared Ze and a declared
  fault level are both limits the real supply stays within, so the smaller of the two loops is
  taken (with a PEN conductor they are one loop). In TT the earth path is Ze's alone.
* **Source.** ``pfc_a`` is the line-neutral value of a single-phase supply and the three-phase
  symmetrical value of a three-phase one. A three-phase supply's line-neutral loop is
  ``pfc_ln_a``'s when given; else it is bounded: it lies between the phase impedance (the
  terminals of a Dyn transformer, Z_0 = Z_1) and twice it (a service cable with a full neutral;
  common practice: the three-phase current is about twice the line-neutral one), so maximum
  currents take ``Ik1 = pfc_a`` and minimum currents a loop of twice the phase impedance. From
  ``ze_ohm`` alone the line-neutral loop is taken equal to Ze, and a three-phase supply's phase
  impedance is bounded by Ze/2 (maximum currents) and Ze (minimum currents). A transformer
  (IEC 60909-0 clause 6.3): ``Z_T = u_k U_rT^2 / S_r`` with ``U_rT`` its rated low-voltage
  ``u_lv_v`` (default ``sqrt(3) U0``), split by its
  X/R, and ``K_T = 0.95 c_max / (1 + 0.6 x_T)`` on maximum currents only; an upstream network
  referred to the low-voltage side ``Z_Q = c_max U0 / I_kQ``; a Dyn transformer's zero-sequence
  impedance equals its positive one, so the line-neutral loop at its terminals is
  ``Z_T + 2/3 Z_Q``. Ze, when not given, is the source's line-neutral loop for minimum currents
  (TN systems; a TT supply must give it).

Accumulation down the tree is vectorised: impedances of all cables are summed along every path
at once by pointer jumping (log2 of the depth numpy steps), so deep chains need no recursion.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, fields
from functools import cached_property, lru_cache
from types import MappingProxyType
from typing import Any

import numpy as np

from coordination import cables
from coordination.model import Cable, Study, Supply

SQRT3 = math.sqrt(3.0)


# -- pure functions, one per model ------------------------------------------------------------
def split_impedance(z_ohm: float, x_r: float) -> complex:
    """A complex impedance of magnitude ``z_ohm`` [ohm] with reactance/resistance ratio ``x_r``.

    Examples
    --------
    >>> print(f"{split_impedance(1.0, 1.0).real:.4f}")
    0.7071
    """
    r = z_ohm / math.sqrt(1.0 + x_r * x_r)
    return complex(r, r * x_r)


def transformer_impedance_ohm(rating_kva: float, impedance_pct: float, x_r: float,
                              u_r_v: float) -> complex:
    """Short-circuit impedance of a transformer referred to its low-voltage side [ohm].

    ``Z_T = u_k / 100 * U_r^2 / S_r``, split into R_T and X_T by ``x_r``.

    Parameters
    ----------
    rating_kva : float
        Rated apparent power S_r [kVA].
    impedance_pct : float
        Rated short-circuit voltage u_k [%].
    x_r : float
        X_T / R_T [-].
    u_r_v : float
        Rated (line-to-line) voltage on the low-voltage side U_r [V].

    References
    ----------
    IEC 60909-0:2016, clause 6.3.1, equation (7).

    Examples
    --------
    >>> print(f"{abs(transformer_impedance_ohm(1000, 6.0, 6.0, 400.0)) * 1000:.2f}")
    9.60
    """
    z = impedance_pct / 100.0 * u_r_v**2 / (rating_kva * 1000.0)
    return split_impedance(z, x_r)


def transformer_correction(impedance_pct: float, x_r: float, c_max: float = 1.05) -> float:
    """Impedance correction factor K_T of a network transformer [-].

    ``K_T = 0.95 c_max / (1 + 0.6 x_T)`` with ``x_T`` the relative reactance
    ``u_k / 100 * x_r / sqrt(1 + x_r^2)``.

    References
    ----------
    IEC 60909-0:2016, clause 6.3.3, equation (12a).

    Examples
    --------
    >>> print(f"{transformer_correction(6.0, 6.0, 1.05):.4f}")
    0.9633
    """
    x_t = impedance_pct / 100.0 * x_r / math.sqrt(1.0 + x_r * x_r)
    return 0.95 * c_max / (1.0 + 0.6 * x_t)


def network_impedance_ohm(pfc_a: float, u0_v: float, c: float, x_r: float) -> complex:
    """Impedance behind a known prospective fault current [ohm]: ``Z = c U0 / I_k``.

    For a three-phase value this is the per-phase impedance (``c U_n / (sqrt(3) I_k)`` with
    ``U_n = sqrt(3) U0``); for a line-neutral value the whole loop.

    References
    ----------
    IEC 60909-0:2016, clause 6.2, equation (5).

    Examples
    --------
    >>> print(f"{abs(network_impedance_ohm(16000, 230, 1.05, 1.0)):.5f}")
    0.01509
    """
    return split_impedance(c * u0_v / pfc_a, x_r)


def three_phase_current_a(z_phase_ohm: Any, u0_v: float, c: float) -> Any:
    """Symmetrical three-phase short-circuit current ``c U0 / |Z|`` [A].

    References
    ----------
    IEC 60909-0:2016, clause 7.1.2, equation (29) (``c U_n / (sqrt(3) |Z_k|)``).

    Examples
    --------
    >>> print(f"{three_phase_current_a(0.0096, 400 / 3 ** 0.5, 1.05):.0f}")
    25259
    """
    return c * u0_v / abs(z_phase_ohm)


def loop_current_a(z_loop_ohm: Any, u0_v: float, c: float = 1.0) -> Any:
    """Current in a fault loop (line-neutral or line-earth) ``c U0 / |Z_loop|`` [A] (Ohm's law).

    References
    ----------
    IEC 60364-4-41, clause 411.4.4 (``Zs x Ia <= U0``); BS 7671 Regulation 411.4.4 with Cmin.

    Examples
    --------
    >>> print(f"{loop_current_a(1.0, 230.0, 0.95):.1f}")
    218.5
    """
    return c * u0_v / abs(z_loop_ohm)


def line_line_current_a(z_phase_ohm: Any, u0_v: float, c: float) -> Any:
    """Line-to-line short-circuit current ``c sqrt(3) U0 / |2 Z_phase|`` [A].

    References
    ----------
    IEC 60909-0:2016, clause 7.2.2, equation (44) (``c U_n / |Z_(1) + Z_(2)|``, Z_(2) = Z_(1)).

    Examples
    --------
    >>> print(f"{line_line_current_a(0.1, 230.0, 0.95):.0f}")
    1892
    """
    return c * SQRT3 * u0_v / abs(2 * z_phase_ohm)


def earth_loop_ohm(ze_ohm: float, r1_r2_ohm: Any) -> Any:
    """Earth-fault loop impedance at a circuit's end ``Zs = Ze + (R1 + R2)`` [ohm].

    References
    ----------
    BS 7671, Regulation 411.4 and Appendix 3 (``Zs = Ze + (R1 + R2)``).

    Examples
    --------
    >>> print(f"{earth_loop_ohm(0.35, 0.7):.2f}")
    1.05
    """
    return ze_ohm + r1_r2_ohm


@dataclass(frozen=True)
class Source:
    """Source impedances at the origin [ohm]: ``*_max`` for maximum currents (with K_T),
    ``*_min`` for minimum currents. ``z_phase_*`` is None for a single-phase supply."""

    z_phase_max: complex | None
    z_phase_min: complex | None
    z_loop_max: complex
    z_loop_min: complex
    ze_ohm: float
    ze_given: bool
    k_t: float | None
    description: str
    z_earth_max: complex = 0j  # the source's earth loop for maximum earth faults
    earth_max_route: str = ""  # that loop in words, for the convention and the description


def source_impedances(supply: Supply) -> Source:
    """The supply's impedances at the origin, by the conventions of this module.

    References
    ----------
    IEC 60909-0:2016, clauses 6.2 (network feeder), 6.3 (transformers, K_T).

    Examples
    --------
    >>> from coordination.model import Supply
    >>> src = source_impedances(Supply(pfc_a=16000, phases=1, ze_ohm=0.35))
    >>> print(f"{abs(src.z_loop_max):.5f}")
    0.01509
    """
    u0, c_max = supply.u0_v, supply.c_max
    k_t: float | None = None
    t = supply.transformer
    if t is not None:
        u_rt = t.u_lv_v if t.u_lv_v is not None else SQRT3 * u0
        ur_text = "Ur = sqrt(3) U0" if t.u_lv_v is None else f"Ur = u_lv_v {u_rt:g} V"
        z_t = transformer_impedance_ohm(t.rating_kva, t.impedance_pct, t.x_r, u_rt)
        k_t = transformer_correction(t.impedance_pct, t.x_r, c_max)
        z_q = (network_impedance_ohm(t.upstream_pfc_a, u0, c_max, t.upstream_x_r)
               if t.upstream_pfc_a else 0j)
        z_ph_max, z_ph_min = k_t * z_t + z_q, z_t + z_q
        z_loop_max, z_loop_min = k_t * z_t + z_q * 2 / 3, z_t + z_q * 2 / 3
        upstream = (f", upstream network {t.upstream_pfc_a / 1000:g} kA (X/R {t.upstream_x_r:g})"
                    if t.upstream_pfc_a else ", infinite upstream network")
        text = (f"transformer {t.rating_kva:g} kVA, uk {t.impedance_pct:g} %, X/R {t.x_r:g}: "
                f"Z_T = uk Ur^2/Sr = {abs(z_t) * 1000:.3g} mohm ({ur_text}), "
                f"K_T = {k_t:.4f} on maximum currents{upstream}; line-neutral loop at its "
                "terminals Z_T + 2/3 Z_Q (Dyn)")
    elif supply.pfc_a is not None:
        if supply.phases == 1:
            z_loop_max = network_impedance_ohm(supply.pfc_a, u0, c_max, supply.x_r)
            z_ph_max = z_ph_min = None
            z_loop_min = z_loop_max
            text = (f"pfc_a {supply.pfc_a / 1000:g} kA taken as the line-neutral value at the "
                    f"origin (single-phase supply), X/R {supply.x_r:g}")
        else:
            z_ph_max = z_ph_min = network_impedance_ohm(supply.pfc_a, u0, c_max, supply.x_r)
            if supply.pfc_ln_a is not None:
                z_loop_max = z_loop_min = network_impedance_ohm(supply.pfc_ln_a, u0, c_max,
                                                                supply.x_r)
                ln = f"line-neutral from pfc_ln_a {supply.pfc_ln_a / 1000:g} kA"
            else:
                # bounds: the source's line-neutral loop lies between the phase impedance (a
                # Dyn transformer's terminals, Z_0 = Z_1) and twice it (a service cable with a
                # full neutral); maximum currents take the first, minimum currents the second
                z_loop_max, z_loop_min = z_ph_max, 2 * z_ph_max
                ln = ("line-neutral loop bounded: equal to the phase impedance for maximum "
                      "currents (Ik1 = pfc_a), twice it for minimum currents (give pfc_ln_a "
                      "when known)")
            text = (f"pfc_a {supply.pfc_a / 1000:g} kA taken as the three-phase symmetrical "
                    f"value at the origin, {ln}, X/R {supply.x_r:g}")
    else:
        ze = float(supply.ze_ohm)  # type: ignore[arg-type]
        z_loop_max = z_loop_min = split_impedance(ze, supply.x_r)
        if supply.phases == 3:
            # bounds: the phase impedance lies between half the line-neutral loop and all of it
            z_ph_max, z_ph_min = z_loop_max / 2, z_loop_max
        else:
            z_ph_max = z_ph_min = None
        three = (", phase impedance bounded by Ze/2 (maximum currents) and Ze (minimum)"
                 if supply.phases == 3 else "")
        text = (f"from ze_ohm only: line-neutral loop at the origin taken equal to Ze "
                f"{ze:g} ohm{three}; the real fault level may be higher (give pfc_a)")
    ze_given = supply.ze_ohm is not None
    ze_ohm = float(supply.ze_ohm) if ze_given else abs(z_loop_min)  # type: ignore[arg-type]
    tt = str(supply.earthing).upper().startswith("TT")
    if ze_given and t is not None and not tt and ze_ohm < abs(z_loop_min):
        # in TN the earth loop runs through the transformer, so Ze cannot be below its loop
        text += (f"; Ze {ze_ohm:g} ohm given is below the transformer's own loop: taken as "
                 f"{abs(z_loop_min):.4g} ohm")
        ze_ohm = abs(z_loop_min)
    # the earth loop for maximum earth faults: in TT the earth path is Ze's alone; in TN a
    # transformer's computed loop bounds it, and a declared Ze and a declared fault level are
    # both limits the supply stays within, so the smaller loop (the larger current) is taken
    xr_source = t.x_r if t is not None else supply.x_r
    ze_loop = split_impedance(ze_ohm, xr_source) if ze_given else None
    if tt and ze_loop is not None:
        z_earth_max, how = ze_loop, f"Ze (X/R {xr_source:g})"
    elif t is not None and not tt:
        # a transformer's loop is computed, not declared: the earth loop includes it, so no
        # earth fault exceeds the line-neutral maximum there (a smaller Ze cannot be)
        z_earth_max, how = z_loop_max, ("the transformer's line-neutral loop for maximum "
                                        "currents (TN: the earth loop includes it)")
    elif ze_loop is None:
        z_earth_max, how = z_loop_max, ("the source's line-neutral loop for maximum currents "
                                        "(Ze not given: a conservative bound)")
    elif abs(ze_loop) <= abs(z_loop_max):
        z_earth_max = ze_loop
        how = f"Ze (X/R {xr_source:g}), smaller than the declared fault level's loop"
    else:
        z_earth_max, how = z_loop_max, ("the declared fault level's line-neutral loop, smaller "
                                        "than Ze (TN: a declared Ze and a declared fault level "
                                        "both bound the earth fault; the larger current is "
                                        "taken)")
    text += "; Ze " + ("given" if ze_given else "= the source's line-neutral loop")
    text += "; maximum earth fault through " + how
    return Source(z_phase_max=z_ph_max, z_phase_min=z_ph_min, z_loop_max=z_loop_max,
                  z_loop_min=z_loop_min, ze_ohm=ze_ohm, ze_given=ze_given, k_t=k_t,
                  description=text, z_earth_max=z_earth_max, earth_max_route=how)


def path_sums(own: np.ndarray, parent: np.ndarray) -> np.ndarray:
    """Sum of ``own`` over every node's path to the root, for all nodes at once.

    Parameters
    ----------
    own : numpy.ndarray, shape (k, n + 1)
        Quantities per node; column ``n`` is the root and must be zero.
    parent : numpy.ndarray of int, shape (n + 1,)
        Parent index of every node; the root (index ``n``) is its own parent.

    Returns
    -------
    numpy.ndarray, shape (k, n + 1)
        ``out[:, i]`` = sum of ``own[:, j]`` for j on the path from i up to the root.

    Notes
    -----
    Pointer jumping: after step s each node holds the sum over its nearest 2^s ancestors-or-self
    and points 2^s levels up; ceil(log2(depth)) vectorised steps in all.

    Examples
    --------
    >>> print(path_sums(np.array([[1.0, 2.0, 4.0, 0.0]]), np.array([3, 0, 1, 3]))[0, 2])
    7.0
    """
    total = own.copy()
    up = parent.copy()
    root = len(parent) - 1
    while np.any(up != root):
        total = total + total[:, up]
        up = up[up]
    return total


# -- results -----------------------------------------------------------------------------------
@dataclass(frozen=True)
class NodeFaults:
    """Fault levels of one circuit [A, ohm].

    ``ik3_max_a``, ``ik1_max_a``, ``ik_max_a`` and ``ief_max_board_a`` are at the circuit's
    ORIGIN (the board its device sits on); ``ik_max_a`` is the window's end (three-phase value
    for a three-phase circuit, line-neutral for a single-phase one); ``ief_max_board_a`` is the
    largest earth fault there (line to protective conductor, c_max, 20 degC; never below
    ``ief_min_board_a``). ``ief_min_a``, ``zs_ohm``, ``ik_min_end_a``
    are at its FAR END; ``ik_min_end_kind`` says "line-neutral" or "line-line" (a three-phase
    cable without neutral). ``None`` where a value does not exist (no three-phase value under
    a single-phase supply, no line-neutral value beyond a cable without neutral).
    """

    circuit: str
    board: str
    phases: int
    ik3_max_a: float | None
    ik1_max_a: float | None
    ik_max_a: float
    ief_min_a: float
    zs_ohm: float
    ik_min_end_a: float
    ik_min_end_kind: str
    ik3_max_end_a: float | None
    ik1_max_end_a: float | None
    ik_max_end_a: float
    zs_board_ohm: float  # Zs at the circuit's origin (its board)
    ief_min_board_a: float
    r1_r2_ohm: float  # this circuit's own cable, R1 + R2 at maximum operating temperature
    z_ln_end_ohm: float | None  # line-neutral loop at the far end, hot conductors, c_min case
    ief_max_board_a: float  # maximum earth fault at the circuit's origin (its board)

    def to_json(self) -> dict[str, Any]:
        """Every field by name (all plain numbers, text or None)."""
        return {name: getattr(self, name) for name in NODE_FIELDS}


#: NodeFaults' fields, in order.
NODE_FIELDS = tuple(f.name for f in fields(NodeFaults))


@dataclass(frozen=True)
class FaultLevels:
    """Fault levels of a whole study, one :class:`NodeFaults` per circuit (study order).

    What :func:`compute` returns, and what the engine, the checks, the plots and the report
    take as ``levels``.

    Attributes
    ----------
    nodes : tuple of NodeFaults
        One per circuit, in study order (:attr:`by_circuit` finds one by its id).
    origin_ik3_a : float or None
        Three-phase maximum current at the origin [A]; ``None`` under a single-phase supply.
    origin_ik1_a : float
        Line-neutral maximum current at the origin [A].
    ze_ohm : float
        External earth-fault loop impedance Ze [ohm], given or taken from the source.
    convention : str
        The conventions used, in words (:func:`convention_text`).
    u0_v, c_max, c_min : float
        Nominal voltage to earth [V] and the voltage factors of IEC 60909-0 Table 1.
    source : str
        The source and how its impedance was found, in words.
    k_t : float or None
        The transformer's impedance correction factor K_T (IEC 60909-0, 6.3), if any.
    """

    nodes: tuple[NodeFaults, ...]
    origin_ik3_a: float | None
    origin_ik1_a: float
    ze_ohm: float
    convention: str
    u0_v: float = 230.0
    c_max: float = 1.05
    c_min: float = 0.95
    source: str = ""
    k_t: float | None = None

    @cached_property
    def by_circuit(self) -> Mapping[str, NodeFaults]:
        """The nodes by circuit id (read-only)."""
        return MappingProxyType({n.circuit: n for n in self.nodes})

    def to_json(self) -> dict[str, Any]:
        """The contract's JSON: ``{"nodes": [...], "origin": {...}, "convention": str}``."""
        return {"nodes": [n.to_json() for n in self.nodes], "origin": self.origin_json(),
                "convention": self.convention}

    def origin_json(self) -> dict[str, Any]:
        """The ``origin`` of :meth:`to_json`: the supply's fault levels and factors."""
        return {"ik3_max_a": self.origin_ik3_a, "ik1_max_a": self.origin_ik1_a,
                "ze_ohm": self.ze_ohm, "u0_v": self.u0_v, "c_max": self.c_max,
                "c_min": self.c_min, "k_t": self.k_t, "source": self.source}


def convention_text(supply: Supply) -> str:
    """The conventions used, in words (printed with every table and in the JSON).

    References
    ----------
    IEC 60909-0:2016 Table 1 (c_max, c_min); BS 7671 Regulation 411.4 (Zs = Ze + R1 + R2).

    Examples
    --------
    >>> from coordination.model import Supply
    >>> print(convention_text(Supply(pfc_a=16000)).count("c_min = 0.95"))
    1
    """
    return (
        f"maximum currents at each circuit's board: conductors at 20 degC, c_max = "
        f"{supply.c_max:g}{', K_T on the transformer' if supply.transformer else ''}; a "
        "circuit's window ends at its board's three-phase value (three-phase circuit) or "
        "line-neutral value (single-phase circuit). Minimum currents at each circuit's far end: "
        f"conductors at maximum operating temperature (PVC 70 degC, XLPE 90 degC), c_min = "
        f"{supply.c_min:g}; Zs = Ze + |sum of (R1 + R2) + j(X1 + X2)| along the path, "
        "Ief = c_min U0 / Zs; Ik min end is line-neutral (line-line beyond a cable without "
        "neutral). Maximum earth fault at each circuit's board: line to protective conductor, "
        f"c_max = {supply.c_max:g}, conductors at 20 degC, through "
        f"{source_impedances(supply).earth_max_route}, never below the minimum there. "
        "IEC 60909-0 style, simplified for low voltage."
    )


# -- computation --------------------------------------------------------------------------------
@lru_cache(maxsize=4096)
def _own(cable: Cable | None, ring: bool = False) -> tuple[complex, complex, complex, complex,
                                                           complex, complex, float]:
    """One cable's contributions: z3_20, zln_20, z3_hot, zln_hot, zpe_hot, zpe_20, R1+R2 hot
    (a ring's seen from its mid-point, :func:`coordination.cables.run_impedances`)."""
    if cable is None:
        return 0j, 0j, 0j, 0j, 0j, 0j, 0.0
    run = cables.run_impedances(cable, ring=ring)
    return (complex(run.r_line_20, run.x_line),
            complex(run.r_line_20 + run.r_neutral_20, run.x_line + run.x_neutral),
            complex(run.r_line_hot, run.x_line),
            complex(run.r_line_hot + run.r_neutral_hot, run.x_line + run.x_neutral),
            complex(run.r1_r2_hot, run.x_line + run.x_cpc),
            complex(run.r_line_20 + run.r_cpc_20, run.x_line + run.x_cpc),
            run.r1_r2_hot)


def _values(a: np.ndarray) -> list[float | None]:
    return [v if math.isfinite(v) else None for v in a.tolist()]


def compute(study: Study) -> FaultLevels:
    """Fault levels at every board and circuit end of a study.

    Parameters
    ----------
    study : Study
        A loaded study (circuits parents first).

    Returns
    -------
    FaultLevels
        One :class:`NodeFaults` per circuit, in study order, and the origin's values.

    References
    ----------
    IEC 60909-0:2016 clauses 6.2, 6.3, 7.1 (voltage factors c_max/c_min, K_T, three-phase and
    line-to-earth currents); IEC 60228:2004 Table 2 and Annex B; BS 7671 Regulation 411.4
    (Zs = Ze + R1 + R2, Cmin 0.95).

    Examples
    --------
    >>> from coordination.study import from_dict
    >>> s = from_dict({"supply": {"pfc_a": 16000, "ze_ohm": 0.35, "phases": 1},
    ...                "circuit": [{"id": "a", "from": "supply", "device": "gG63"}]})
    >>> print(round(compute(s).by_circuit["a"].ik_max_a))
    16000
    """
    supply = study.supply
    src = source_impedances(supply)
    circuits = study.circuits
    n = len(circuits)
    index = {c.id: i for i, c in enumerate(circuits)}
    parent = np.array([index.get(c.parent, n) for c in circuits] + [n], dtype=np.intp)
    own = np.zeros((6, n + 1), dtype=complex)
    r1r2 = np.zeros(n)
    for i, c in enumerate(circuits):
        *z, rr = _own(c.cable, c.ring)
        own[:, i] = z
        r1r2[i] = rr
    total = path_sums(own, parent)
    at_end, at_board = total[:, :n], total[:, parent[:n]]
    u0, c_max, c_min = supply.u0_v, supply.c_max, supply.c_min
    three = supply.phases == 3
    with np.errstate(invalid="ignore", divide="ignore"):
        if three:
            ik3_board = three_phase_current_a(src.z_phase_max + at_board[0], u0, c_max)
            ik3_end = three_phase_current_a(src.z_phase_max + at_end[0], u0, c_max)
            ill_min = line_line_current_a(src.z_phase_min + at_end[2], u0, c_min)
        else:
            ik3_board = ik3_end = ill_min = np.full(n, np.nan)
        ik1_board = loop_current_a(src.z_loop_max + at_board[1], u0, c_max)
        ik1_end = loop_current_a(src.z_loop_max + at_end[1], u0, c_max)
        z_ln_end = np.abs(src.z_loop_min + at_end[3])
        iln_min = loop_current_a(z_ln_end, u0, c_min)
        zs_end = earth_loop_ohm(src.ze_ohm, np.abs(at_end[4]))
        zs_board = earth_loop_ohm(src.ze_ohm, np.abs(at_board[4]))
        ief_max_board = loop_current_a(src.z_earth_max + at_board[5], u0, c_max)
    has_ln = np.isfinite(iln_min)
    ik_min_end = np.where(has_ln, iln_min, ill_min)
    phases = np.array([c.phases for c in circuits])
    ik_max = np.where(phases == 3, ik3_board, ik1_board)
    ik_max_end = np.where(phases == 3, ik3_end, ik1_end)
    ief_end = loop_current_a(zs_end, u0, c_min)
    ief_board = loop_current_a(zs_board, u0, c_min)
    ief_max_board = np.maximum(ief_max_board, ief_board)

    columns: dict[str, list[Any]] = {
        "circuit": [c.id for c in circuits],
        "board": [study.board_name(c.id) for c in circuits],
        "phases": phases.tolist(),
        "ik3_max_a": _values(ik3_board),
        "ik1_max_a": _values(ik1_board),
        "ik_max_a": ik_max.tolist(),
        "ief_min_a": ief_end.tolist(),
        "zs_ohm": zs_end.tolist(),
        "ik_min_end_a": ik_min_end.tolist(),
        "ik_min_end_kind": ["line-neutral" if h else "line-line" for h in has_ln.tolist()],
        "ik3_max_end_a": _values(ik3_end),
        "ik1_max_end_a": _values(ik1_end),
        "ik_max_end_a": ik_max_end.tolist(),
        "zs_board_ohm": zs_board.tolist(),
        "ief_min_board_a": ief_board.tolist(),
        "r1_r2_ohm": r1r2.tolist(),
        "z_ln_end_ohm": _values(z_ln_end),
        "ief_max_board_a": ief_max_board.tolist(),
    }
    # the columns in NodeFaults' field order, so that each row builds a node positionally
    ordered = [columns[name] for name in NODE_FIELDS]
    nodes = tuple(NodeFaults(*row) for row in zip(*ordered, strict=True))
    return FaultLevels(
        nodes=nodes,
        origin_ik3_a=three_phase_current_a(src.z_phase_max, u0, c_max) if three else None,
        origin_ik1_a=loop_current_a(src.z_loop_max, u0, c_max),
        ze_ohm=src.ze_ohm,
        convention=convention_text(supply),
        u0_v=u0, c_max=c_max, c_min=c_min, source=src.description, k_t=src.k_t,
    )
