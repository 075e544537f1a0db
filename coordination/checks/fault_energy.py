"""Fault energy: the adiabatic rule S >= sqrt(I2t) / k for the line and protective conductors,
with the conductors' cross-sections and k."""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from coordination import cables
from coordination.checks.common import (
    _edge_and_energy,
    _Edges,
    _get,
    _never,
    a2s_text,
    a_text,
    mm2_text,
    s_text,
)
from coordination.checks.disconnection import _rcd_needed
from coordination.checks.results import CheckResult, _result
from coordination.criterion import breaking_duty
from coordination.model import Study
from coordination.residual import RcdPath, rcds_breaking, rcds_on_path
from curves.band import Band
from curves.errors import InputError

#: The adiabatic rule holds for faults cleared within this time [s] (IEC 60364-4-43, 434.5.2).
ADIABATIC_LIMIT_S = 5.0

#: k for the adiabatic rule [A s^0.5 / mm2]: (material, insulation) -> (k up to 300 mm2,
#: k above 300 mm2). IEC 60364-4-43 Table 43A (line conductors) and IEC 60364-5-54 Table A.54.3
#: (a protective conductor that is a core of the cable). Copper PVC 115 / 103, copper XLPE/EPR
#: 143, aluminium PVC 76, aluminium XLPE 94: confirmed; aluminium PVC above
#: 300 mm2 (68): from memory.
K_TABLE = {
    ("copper", "pvc"): (115.0, 103.0),
    ("copper", "xlpe"): (143.0, 143.0),
    ("aluminium", "pvc"): (76.0, 68.0),  # 68 above 300 mm2: from memory
    ("aluminium", "xlpe"): (94.0, 94.0),
}
K_TABLE_SOURCE = "IEC 60364-4-43 Table 43A / IEC 60364-5-54 Table A.54.3"
#: Other spellings accepted for the table's keys.
MATERIAL_ALIASES = {"cu": "copper", "copper": "copper", "al": "aluminium",
                    "aluminium": "aluminium", "aluminum": "aluminium"}
INSULATION_ALIASES = {"pvc": "pvc", "xlpe": "xlpe", "epr": "xlpe", "xlpe/epr": "xlpe"}


def withstand_time(current_a: Any, k: float, csa_mm2: float) -> np.ndarray:
    """Adiabatic withstand time of a conductor, ``t = k^2 S^2 / I^2`` [s].

    Parameters
    ----------
    current_a : array_like
        Fault current [A].
    k : float
        Material factor [A s^0.5 / mm^2] (``coordination.checks.k_factor``).
    csa_mm2 : float
        Conductor cross-section [mm^2] (sum of parallel conductors).

    References
    ----------
    IEC 60364-4-43:2008, 434.5.2, equation t = (k S / I)^2, valid up to 5 s.

    Examples
    --------
    >>> print(round(float(withstand_time(1000.0, 115.0, 2.5)), 4))
    0.0827
    """
    i = np.asarray(current_a, dtype=np.float64)
    return (k * csa_mm2) ** 2 / (i * i)


def adiabatic_min_csa_mm2(i2t_a2s: Any, k: float) -> Any:
    """Least conductor cross-section that withstands a fault's energy adiabatically [mm2].

    ``S = sqrt(I2t) / k``, valid for faults cleared within 5 s.

    Parameters
    ----------
    i2t_a2s : float or array_like
        Energy let through by the protective device, I^2 t [A^2 s].
    k : float
        Factor of the conductor material and insulation [A s^0.5 / mm2] (:func:`k_factor`).

    Returns
    -------
    float or ndarray
        S [mm2].

    References
    ----------
    IEC 60364-4-43:2008, 434.5.2 (line conductors); IEC 60364-5-54:2011, 543.1.2 (protective
    conductors).

    Examples
    --------
    >>> print(round(adiabatic_min_csa_mm2(460.0**2 * 0.1, 115.0), 2))
    1.26
    """
    if i2t_a2s.__class__ is float:  # one value: the checks' case, without numpy's overhead
        return math.sqrt(i2t_a2s) / float(k) if i2t_a2s >= 0.0 else math.nan
    out = np.sqrt(np.asarray(i2t_a2s, dtype=np.float64)) / float(k)
    return float(out) if out.ndim == 0 else out


def k_factor(material: str, insulation: str, csa_mm2: float) -> float:
    """The adiabatic factor k of a conductor [A s^0.5 / mm2].

    Parameters
    ----------
    material : str
        ``"copper"`` or ``"aluminium"``.
    insulation : str
        ``"pvc"`` (70 degC) or ``"xlpe"`` (90 degC; ``"epr"`` is the same).
    csa_mm2 : float
        Cross-section of one conductor [mm2] (PVC changes above 300 mm2).

    Returns
    -------
    float
        k [A s^0.5 / mm2].

    Raises
    ------
    InputError
        For a material or insulation not in the table.

    References
    ----------
    IEC 60364-4-43:2008 Table 43A (line conductors); IEC 60364-5-54:2011 Table A.54.3 (a
    protective conductor that is a core of a multicore cable).

    Examples
    --------
    >>> print(k_factor("copper", "pvc", 2.5))
    115.0
    """
    mat = MATERIAL_ALIASES.get(str(material).lower())
    ins = INSULATION_ALIASES.get(str(insulation).lower())
    if mat is None:
        raise InputError(f"conductor material {material!r} has no k; allowed: copper, aluminium",
                         key="cable.material")
    if ins is None:
        raise InputError(f"insulation {insulation!r} has no k; allowed: pvc, xlpe, epr",
                         key="cable.insulation")
    small, large = K_TABLE[(mat, ins)]
    return small if csa_mm2 <= 300.0 else large


@dataclass(frozen=True)
class ConductorSizes:
    """Cross-sections and adiabatic factors of a cable's conductors.

    Attributes
    ----------
    line_mm2 : float
        Line conductor cross-section, all parallel conductors of one phase together [mm2].
    k_line : float
        k of the line conductors [A s^0.5 / mm2].
    cpc_mm2 : float
        Protective conductor cross-section, all parallel protective conductors together [mm2].
    k_cpc : float
        k of the protective conductor, from its own material and size [A s^0.5 / mm2].
    cpc_each_mm2 : float
        Cross-section of one protective conductor [mm2].
    cpc_kind : str
        ``"core"`` (a core of the cable, Table A.54.3), ``"separate"`` (installed apart,
        Table A.54.2) or ``"armour"`` (the cable's steel-wire armour, Table A.54.4).
    k_cpc_source : str
        Where ``k_cpc`` comes from.
    """

    line_mm2: float
    k_line: float
    cpc_mm2: float
    k_cpc: float
    cpc_each_mm2: float
    cpc_kind: str = "core"
    k_cpc_source: str = "IEC 60364-5-54 Table A.54.3"


def conductor_sizes(cable: Any) -> ConductorSizes:
    """The cross-sections and k factors the adiabatic rule reads for a cable.

    The line conductors count ``csa_mm2 x parallel``; the protective conductor
    ``cpc_mm2 x cpc_parallel`` (``cpc_mm2`` defaults to ``csa_mm2``, ``cpc_parallel`` to
    ``parallel``). Each k comes from the conductor's own material (``cpc_material`` for the
    protective conductor, by default the cable's), the cable's insulation and the size of one
    conductor (PVC changes above 300 mm2). The protective conductor is a core of the cable
    (Table A.54.3) unless the study says it is installed separately (``cpc_separate``: Table
    A.54.2, e.g. copper PVC 143 rather than 115) or that the armour is the protective conductor
    (``cpc_armour``: ``armour_mm2`` and steel's k, Table A.54.4, from memory).

    Parameters
    ----------
    cable : coordination.model.Cable
        The circuit's cable.

    Returns
    -------
    ConductorSizes
        Sizes [mm2] and k [A s^0.5 / mm2].

    Raises
    ------
    InputError
        For a material or insulation without a k (:func:`k_factor`).

    References
    ----------
    IEC 60364-4-43:2008 Table 43A (k of line conductors); IEC 60364-5-54:2011 Table A.54.3
    (k of a protective conductor that is a core of a multicore cable), Table A.54.2 (one
    that is not), Table A.54.4 (steel armour, from memory).

    Examples
    --------
    >>> from coordination.model import Cable
    >>> sizes = conductor_sizes(Cable(length_m=20, csa_mm2=2.5, cpc_mm2=1.5))
    >>> print(sizes.cpc_mm2, sizes.k_cpc)
    1.5 115.0
    """
    parallel = max(int(getattr(cable, "parallel", None) or 1), 1)
    csa = float(cable.csa_mm2)
    cpc_each = float(cable.cpc_mm2 if cable.cpc_mm2 is not None else csa)
    cpc_parallel = max(int(getattr(cable, "cpc_parallel", None) or parallel), 1)
    material = cable.material
    cpc_material = getattr(cable, "cpc_material", None) or material
    k_line = k_factor(material, cable.insulation, csa)
    if getattr(cable, "cpc_armour", False):
        armour = float(cable.armour_mm2)
        return ConductorSizes(line_mm2=csa * parallel, k_line=k_line, cpc_mm2=armour,
                              k_cpc=cables.armour_k(cable.insulation), cpc_each_mm2=armour,
                              cpc_kind="armour", k_cpc_source=cables.K_STEEL_ARMOUR_SOURCE)
    if getattr(cable, "cpc_separate", False):
        k_cpc = cables.separate_cpc_k(cpc_material, cable.insulation, cpc_each)
        kind, source = "separate", cables.K_SEPARATE_CPC_SOURCE
    else:
        k_cpc = k_factor(cpc_material, cable.insulation, cpc_each)
        kind, source = "core", "IEC 60364-5-54 Table A.54.3"
    return ConductorSizes(
        line_mm2=csa * parallel,
        k_line=k_line,
        cpc_mm2=cpc_each * cpc_parallel,
        k_cpc=k_cpc,
        cpc_each_mm2=cpc_each,
        cpc_kind=kind,
        k_cpc_source=source,
    )


#: What the fault-energy check says of the protective conductor it took.
_CPC_WORDS = {
    "core": "taken as a core of the same cable (Table A.54.3); a separate cpc has a higher k "
            "(give cpc_separate = true)",
    "separate": "installed separately (cpc_separate; Table A.54.2), its resistance taken at "
                "the cable's operating temperature (on the safe side for Zs)",
    "armour": "the cable's steel-wire armour (cpc_armour; k and resistivity from memory: "
              "verify with the maker's armour resistance, armour_ohm_per_m)",
}
_RING_WORDS = ("; a ring's conductors are taken one at a time at both ends (the mid-point "
               "fault's current shared by the two legs is not counted: on the safe side)")


@lru_cache(maxsize=4096)
def _sizes(cable: Any) -> ConductorSizes:
    """:func:`conductor_sizes`, once per distinct cable (a study repeats its cables)."""
    return conductor_sizes(cable)


def _fault_energy(study: Study, cid: str, band: Band, node: Any, overload_protected: bool,
                  edges: _Edges, *, duty: tuple[float, str] | None = None,
                  limit_s: float | None = None,
                  rcds: RcdPath | None = None) -> CheckResult | None:
    """The fault-energy check of one circuit; None without a cable.

    ``duty`` is the circuit's :func:`~coordination.criterion.breaking_duty`, ``limit_s`` its
    disconnection limit [s] and ``rcds`` the RCDs on its path
    (:func:`~coordination.residual.rcds_on_path`), where the caller has them already (else they
    are found here).
    """
    circuit = study.by_id[cid]
    cable = circuit.cable
    if cable is None:
        return None
    sizes = _sizes(cable)
    s_line, k_line, s_cpc, k_cpc = sizes.line_mm2, sizes.k_line, sizes.cpc_mm2, sizes.k_cpc
    # a fault just past the board in one of several parallel cables is carried by that cable's
    # own conductors; one at the far end is shared by all of them
    one_line, one_cpc = float(cable.csa_mm2), sizes.cpc_each_mm2

    # (what, conductor, current [A], installed S [mm2], k)
    if duty is None:
        duty = breaking_duty(node, circuit.phases)
    i_max = duty[0]  # the largest, earth faults included
    ief_max = _get(node, "ief_max_board_a")
    if ief_max is not None and not (ief_max > 0 and math.isfinite(ief_max)):
        ief_max = None
    cases = [("maximum fault at the board", "line", i_max, one_line, k_line)]
    ik_min = _get(node, "ik_min_end_a")
    if ik_min is not None and ik_min > 0:
        cases.append(("minimum fault at the far end", "line", ik_min, s_line, k_line))
    if rcds is None:
        rcds = rcds_on_path(study, cid)
    rcd = _rcd_needed(study, cid, band, node, edges, limit_s, rcds)
    ief = _get(node, "ief_min_a")
    if ief is not None and ief > 0:
        if ik_min is None or ief < ik_min:  # the smallest fault in the line conductors
            cases.append(("minimum earth fault at the far end", "line", ief, s_line, k_line))
        cases.append(("minimum earth fault at the far end", "protective", ief, s_cpc, k_cpc))
    if ief_max is not None:
        # a current-limiting device lets the most energy through at the largest earth fault
        cases.append(("maximum earth fault at the board", "protective", ief_max, one_cpc, k_cpc))

    finite = math.isfinite
    computed = edges.values_of(band)
    checked = []  # each case's numbers, for the JSON and the report
    problems = []
    worst = worst_key = None
    fits = True  # every conductor at least as large as its case needs
    for what, conductor, i, s, k in cases:
        if i is None or not (i > 0):
            continue
        t, energy = computed.get(i) or _edge_and_energy(band, i)
        cleared_by = None
        breaking = rcds_breaking(study, cid, i, rcds) if rcds and "earth fault" in what else ()
        if breaking:  # an earth fault is a residual current
            t_rcd, name = min((edges.residual_time(b, i), b.name) for _, b in breaking)
            if t_rcd < t:  # the RCD clears first: I2t is at most I^2 x its break time
                t, energy, cleared_by = t_rcd, i * i * t_rcd, name
        need = adiabatic_min_csa_mm2(energy, k) if finite(energy) else math.inf
        if t > ADIABATIC_LIMIT_S:
            if conductor == "line" and overload_protected:
                continue  # IEC 60364-4-43 435.1: overload protection also protects the conductor
            at = f"the {what} ({a_text(i)})"
            if rcd and "earth fault" in what:
                if not any("must be cleared by an RCD" in text for text in problems):
                    problems.append(  # one message for the line and the protective conductors
                        f"{at} must be cleared by an RCD (too small for any overcurrent device, "
                        "see disconnection): the adiabatic check of the protective conductor "
                        "(and of the line conductors) then depends on the RCD's clearing time "
                        f"and is not decided by {band.name}")
            elif finite(t):
                problems.append(f"{band.name} may take {s_text(t)} at {at}: beyond "
                                f"{ADIABATIC_LIMIT_S:g} s the adiabatic rule does not hold; "
                                "choose a faster or smaller device")
            else:
                problems.append(f"{_never(band, i)} at the {what}: the adiabatic rule needs "
                                f"clearing within {ADIABATIC_LIMIT_S:g} s; choose a faster or "
                                "smaller device")
            ratio = math.inf
        else:
            ratio = need / s
        key = (ratio, conductor == "protective")  # the largest ratio governs; ties: the cpc
        if worst_key is None or key > worst_key:
            worst, worst_key = (need, s, what, conductor, i, energy, k, cleared_by), key
        fits = fits and need <= s
        row = {"case": what, "conductor": conductor, "current_a": i if finite(i) else None,
               "t_max_s": t if finite(t) else None,
               "i2t_a2s": energy if finite(energy) else None, "k": k,
               "need_mm2": need if finite(need) else None, "have_mm2": s}
        if cleared_by:
            row["cleared_by"] = cleared_by
        checked.append(row)
    if worst is None:
        return None
    need, s, what, conductor, i, energy, k, cleared_by = worst
    ok = not problems and fits
    checked = tuple(checked)
    details = {"current_a": i, "i2t_a2s": energy, "k": k, "conductor": conductor,
               "governing_case": what, "cases": checked,
               "line_mm2": s_line, "cpc_mm2": s_cpc, "k_line": k_line, "k_cpc": k_cpc,
               "source": f"IEC 60364-4-43 Table 43A / {sizes.k_cpc_source}",
               "cpc_kind": sizes.cpc_kind,
               "assumption": f"governed by the {what}; protective conductor checked at the "
                             "minimum earth fault at the far end and the maximum earth fault "
                             "at the board (a current-limiting device lets through the most "
                             f"energy at the largest fault), {_CPC_WORDS[sizes.cpc_kind]}"
                             + (_RING_WORDS if circuit.ring else "")}
    if problems:
        reason = problems[0]
    elif ok:
        reason = (f"{conductor} conductor {mm2_text(s)} withstands the {what} ({a_text(i)}, "
                  f"I2t {a2s_text(energy)}, k {k:g}): needs {mm2_text(need)}")
        if cleared_by:
            reason += f" ({cleared_by} clears it first: I2t taken as I^2 x its break time)"
    else:
        part = "protective conductor" if conductor == "protective" else "line conductors"
        reason = (f"{part} {mm2_text(s)} too small for the {what} ({a_text(i)}): {band.name} may "
                  f"let through up to {a2s_text(energy)} (the most its standard "
                  "allows), needing "
                  f"{mm2_text(need)} at k {k:g}; enlarge the "
                  f"{'cpc' if conductor == 'protective' else 'conductors'}, choose a device "
                  "that lets through less energy, or show from the maker's let-through data "
                  f"that it stays within k2S2 = {a2s_text((k * s) ** 2)}")
    return _result(cid, "fault-energy", ok, need, s, "mm2", reason, band, details,
                   study.rule_set)
