"""Conductor resistance and reactance: IEC 60228 values, temperature correction, cable runs.

The resistance table lives in ``curves/data/iec60228_resistance.csv`` (IEC 60228:2004 Table 2,
class 2 stranded conductors, maximum d.c. resistance at 20 degC), with its source in the header.
Everything here is a plain function; :func:`run_impedances` gives the impedances of one cable
run that the fault-level calculation adds up along a path.
"""

from __future__ import annotations

import csv
from collections.abc import Mapping
from dataclasses import dataclass
from functools import cache
from pathlib import Path
from types import MappingProxyType
from typing import Any

import numpy as np

import curves.data
from curves.errors import InputError

#: Conductor materials the IEC 60228 table covers.
MATERIALS = ("copper", "aluminium")
#: Spellings accepted for a material, mapped to the canonical name.
MATERIAL_ALIASES = MappingProxyType({"copper": "copper", "aluminium": "aluminium",
                                     "aluminum": "aluminium"})
#: Inferred zero-resistance temperature [degC]: R_t = R_20 (T0 + t) / (T0 + 20).
#: IEC 60228 Annex B (copper 234.5, i.e. alpha_20 = 0.00393 /K; aluminium 228, 0.00403 /K).
INFERRED_ZERO_C = MappingProxyType({"copper": 234.5, "aluminium": 228.0})
#: Maximum conductor operating temperature by insulation [degC]: IEC 60364-5-52 Table 52.1
#: (thermoplastic PVC 70 degC; thermosetting XLPE/EPR 90 degC).
MAX_OPERATING_C = MappingProxyType({"pvc": 70.0, "xlpe": 90.0})
#: Reactance per conductor of a multicore cable [ohm/m] (about 0.08 mOhm/m; common practice).
DEFAULT_X_OHM_PER_M = 0.08e-3
#: Reference temperature of the IEC 60228 table [degC].
REFERENCE_C = 20.0

#: At the mid-point of a ring final circuit the fault is fed from both ends, each leg half the
#: ring: (R1 + R2) there is a quarter of the end-to-end resistances r1 + r2 (common practice;
#: BS 7671 Guidance Note 3's method, from memory). The same holds for every conductor of the
#: ring (line, neutral, protective) and for its reactance.
RING_MIDPOINT_FACTOR = 0.25

#: k of a protective conductor installed separately (not a core of a cable, not bundled with
#: cables) [A s^0.5 / mm2], by (material, insulation): (up to 300 mm2, above 300 mm2).
#: IEC 60364-5-54:2011 Table A.54.2 (initial 30 degC): copper PVC 143, copper XLPE/EPR 176
#: confirmed; copper PVC above 300 mm2 (133) and every aluminium value from memory.
K_SEPARATE_CPC = MappingProxyType({
    ("copper", "pvc"): (143.0, 133.0),  # 133 above 300 mm2: from memory
    ("copper", "xlpe"): (176.0, 176.0),
    ("aluminium", "pvc"): (95.0, 88.0),  # from memory
    ("aluminium", "xlpe"): (116.0, 116.0),  # from memory
})
K_SEPARATE_CPC_SOURCE = "IEC 60364-5-54 Table A.54.2"

#: k of a cable's steel-wire armour used as its protective conductor [A s^0.5 / mm2], by the
#: cable's insulation. IEC 60364-5-54:2011 Table A.54.4 (a metallic layer of a cable, steel),
#: from memory: PVC (70 degC) 51, XLPE/EPR (90 degC) 46.
K_STEEL_ARMOUR = MappingProxyType({"pvc": 51.0, "xlpe": 46.0})
K_STEEL_ARMOUR_SOURCE = "IEC 60364-5-54 Table A.54.4 (from memory)"

#: Resistivity of armour steel at 20 degC [ohm m] and its temperature coefficient [1/K]:
#: IEC 60287-1-1 Table 1, from memory (13.8e-8 ohm m, 4.5e-3 /K). Used only when the study
#: does not give the armour's resistance (the maker's figure is better).
STEEL_RESISTIVITY_OHM_M = 13.8e-8
STEEL_ALPHA_PER_K = 4.5e-3

TABLE_FILE = Path(curves.data.__file__).resolve().parent / "iec60228_resistance.csv"


@cache
def resistance_table() -> Mapping[str, Mapping[float, float]]:
    """IEC 60228 class 2 maximum d.c. resistance at 20 degC [ohm/km], by material and size.

    Returns
    -------
    Mapping[str, Mapping[float, float]]
        ``table["copper"][2.5] == 7.41``.

    References
    ----------
    IEC 60228:2004, Table 2 (class 2 stranded conductors).

    Examples
    --------
    >>> print(resistance_table()["aluminium"][95])
    0.32
    """
    table: dict[str, dict[float, float]] = {m: {} for m in MATERIALS}
    with TABLE_FILE.open(encoding="utf-8") as handle:
        rows = csv.DictReader(line for line in handle if not line.startswith("#"))
        for row in rows:
            size = float(row["csa_mm2"])
            for material in MATERIALS:
                value = row[f"{material}_ohm_per_km"].strip()
                if value:
                    table[material][size] = float(value)
    return MappingProxyType({m: MappingProxyType(v) for m, v in table.items()})


def standard_sizes(material: str) -> tuple[float, ...]:
    """The nominal cross-sections [mm2] the table has for a material, ascending.

    References
    ----------
    IEC 60228:2004, Table 2.

    Examples
    --------
    >>> print(standard_sizes("aluminium")[0])
    10.0
    """
    return tuple(sorted(resistance_table()[canonical_material(material)]))


def _size_text(size: float) -> str:
    return f"{size:g}"


def canonical_material(material: Any, *, key: str = "material") -> str:
    """The canonical name of a conductor material ("copper" or "aluminium").

    Raises
    ------
    InputError
        For anything else, naming the allowed materials.

    Examples
    --------
    >>> print(canonical_material("Aluminum"), len(MATERIALS))
    aluminium 2
    """
    if isinstance(material, str) and material.strip().lower() in MATERIAL_ALIASES:
        return MATERIAL_ALIASES[material.strip().lower()]
    raise InputError(f"unknown conductor material {material!r}; allowed: copper, aluminium",
                     key=key)


def r20_ohm_per_m(csa_mm2: float, material: str = "copper", *, key: str = "csa_mm2") -> float:
    """Maximum d.c. resistance of one conductor at 20 degC [ohm/m].

    Parameters
    ----------
    csa_mm2 : float
        Nominal cross-section [mm2]; one of the table's sizes.
    material : str
        ``"copper"`` or ``"aluminium"``.

    Raises
    ------
    InputError
        When the size is not a standard size of that material (the message lists them).

    References
    ----------
    IEC 60228:2004, Table 2 (class 2 stranded conductors).

    Examples
    --------
    >>> print(f"{r20_ohm_per_m(2.5) * 1000:.2f}")
    7.41
    """
    name = canonical_material(material)
    sizes = resistance_table()[name]
    for size, value in sizes.items():
        if abs(size - float(csa_mm2)) <= 1e-9 * size:
            return value / 1000.0
    allowed = ", ".join(_size_text(s) for s in sorted(sizes))
    raise InputError(f"{_size_text(float(csa_mm2))} mm2 is not a standard {name} size in "
                     f"IEC 60228 class 2; allowed: {allowed}", key=key)


def temperature_factor(temperature_c: Any, material: Any = "copper") -> np.ndarray:
    """Ratio R_t / R_20 of a conductor's resistance at ``temperature_c`` to that at 20 degC.

    Vectorised over temperature and material (arrays broadcast).

    Parameters
    ----------
    temperature_c : array_like
        Conductor temperature [degC].
    material : str or array_like of str
        ``"copper"`` or ``"aluminium"``.

    Returns
    -------
    numpy.ndarray
        ``(T0 + t) / (T0 + 20)`` with T0 = 234.5 (copper), 228 (aluminium) [-].

    References
    ----------
    IEC 60228:2004, Annex B (temperature correction of measured resistance).

    Examples
    --------
    >>> print(f"{float(temperature_factor(70.0, 'copper')):.4f}")
    1.1965
    """
    if isinstance(material, str):
        zero = INFERRED_ZERO_C[canonical_material(material)]
    else:
        zero = np.array([INFERRED_ZERO_C[canonical_material(m)] for m in material], dtype=float)
    t = np.asarray(temperature_c, dtype=float)
    return (zero + t) / (zero + REFERENCE_C)


def resistance_ohm_per_m(csa_mm2: float, material: str = "copper",
                         temperature_c: float = REFERENCE_C) -> float:
    """Resistance of one conductor at a temperature [ohm/m]: IEC 60228 value x R_t / R_20.

    References
    ----------
    IEC 60228:2004, Table 2 and Annex B.

    Examples
    --------
    >>> print(f"{resistance_ohm_per_m(2.5, 'copper', 70.0) * 1000:.3f}")
    8.866
    """
    return r20_ohm_per_m(csa_mm2, material) * float(temperature_factor(temperature_c, material))


def max_operating_temperature_c(insulation: str) -> float:
    """Maximum conductor operating temperature for an insulation [degC] (PVC 70, XLPE 90).

    References
    ----------
    IEC 60364-5-52, Table 52.1.

    Examples
    --------
    >>> print(max_operating_temperature_c("xlpe"))
    90.0
    """
    try:
        return MAX_OPERATING_C[insulation]
    except KeyError:
        raise InputError(f"unknown insulation {insulation!r}; allowed: pvc (70 degC), "
                         "xlpe (90 degC, also for EPR)", key="insulation") from None


def ring_midpoint_ohm(end_to_end_ohm: Any) -> Any:
    """Resistance (or reactance) of a ring's conductor seen from a fault at its mid-point [ohm].

    The two legs, each half the ring, are in parallel: (r / 2) / 2 = r / 4.

    Parameters
    ----------
    end_to_end_ohm : float or array_like
        The conductor's resistance measured end to end round the whole ring, r1 (line), rn
        (neutral) or r2 (protective) [ohm].

    References
    ----------
    Common practice (BS 7671 Guidance Note 3, ring final circuit continuity, from memory).

    Examples
    --------
    >>> print(ring_midpoint_ohm(0.8))
    0.2
    """
    return end_to_end_ohm * RING_MIDPOINT_FACTOR


def ring_r1_r2_ohm(r1_ohm: float, r2_ohm: float) -> float:
    """(R1 + R2) at the mid-point of a ring final circuit: (r1 + r2) / 4 [ohm].

    Parameters
    ----------
    r1_ohm, r2_ohm : float
        End-to-end resistances of the ring's line and protective conductors [ohm].

    References
    ----------
    Common practice (BS 7671 Guidance Note 3, from memory).

    Examples
    --------
    >>> print(ring_r1_r2_ohm(0.52, 0.83))
    0.3375
    """
    return ring_midpoint_ohm(float(r1_ohm) + float(r2_ohm))


def separate_cpc_k(material: str, insulation: str, csa_mm2: float) -> float:
    """k of a protective conductor installed separately from the cable [A s^0.5 / mm2].

    A conductor that is not a core of a cable starts cooler (30 degC) than one inside it, so it
    takes more energy: copper PVC 143 rather than 115.

    Parameters
    ----------
    material : str
        ``"copper"`` or ``"aluminium"``.
    insulation : str
        Its insulation, ``"pvc"`` or ``"xlpe"`` (also ``"epr"``).
    csa_mm2 : float
        Its cross-section [mm2] (the PVC value changes above 300 mm2).

    Raises
    ------
    InputError
        For an unknown material or insulation.

    References
    ----------
    IEC 60364-5-54:2011, Table A.54.2 (copper values up to 300 mm2 confirmed; the others from
    memory).

    Examples
    --------
    >>> print(separate_cpc_k("copper", "pvc", 2.5), separate_cpc_k("copper", "xlpe", 16))
    143.0 176.0
    """
    mat = canonical_material(material, key="cpc_material")
    ins = _insulation(insulation)
    small, large = K_SEPARATE_CPC[(mat, ins)]
    return small if float(csa_mm2) <= 300.0 else large


def armour_k(insulation: str) -> float:
    """k of a cable's steel-wire armour as its protective conductor [A s^0.5 / mm2].

    References
    ----------
    IEC 60364-5-54:2011, Table A.54.4 (from memory).

    Examples
    --------
    >>> print(armour_k("pvc"), armour_k("xlpe"))
    51.0 46.0
    """
    return K_STEEL_ARMOUR[_insulation(insulation)]


def armour_r20_ohm_per_m(armour_mm2: float) -> float:
    """Resistance of steel-wire armour at 20 degC from its cross-section [ohm/m]: rho / A.

    Parameters
    ----------
    armour_mm2 : float
        Cross-section of the armour (all its wires together) [mm2].

    References
    ----------
    IEC 60287-1-1, Table 1 (steel, 13.8e-8 ohm m at 20 degC; from memory).

    Examples
    --------
    >>> print(f"{armour_r20_ohm_per_m(36.0) * 1000:.2f}")
    3.83
    """
    return STEEL_RESISTIVITY_OHM_M / (float(armour_mm2) * 1e-6)


def armour_temperature_factor(temperature_c: float) -> float:
    """Ratio R_t / R_20 of steel armour: 1 + alpha (t - 20) [-].

    References
    ----------
    IEC 60287-1-1, Table 1 (alpha 4.5e-3 /K for steel; from memory).

    Examples
    --------
    >>> print(f"{armour_temperature_factor(70.0):.3f}")
    1.225
    """
    return 1.0 + STEEL_ALPHA_PER_K * (float(temperature_c) - REFERENCE_C)


def _insulation(insulation: Any) -> str:
    name = str(insulation).strip().lower()
    name = {"epr": "xlpe", "xlpe/epr": "xlpe"}.get(name, name)
    if name not in MAX_OPERATING_C:
        raise InputError(f"unknown insulation {insulation!r}; allowed: pvc, xlpe (also epr)",
                         key="insulation")
    return name


@dataclass(frozen=True)
class RunImpedances:
    """Impedances of one cable run, whole length, all parallel conductors together [ohm].

    ``r_*_20`` at 20 degC (maximum fault currents), ``r_*_hot`` at the insulation's maximum
    operating temperature (minimum fault currents, Zs). ``*_n_*`` is ``nan`` when there is no
    neutral.
    """

    r_line_20: float
    r_neutral_20: float
    r_cpc_20: float
    r_line_hot: float
    r_neutral_hot: float
    r_cpc_hot: float
    x_line: float
    x_neutral: float
    x_cpc: float
    hot_c: float

    @property
    def r1_r2_hot(self) -> float:
        """R1 + R2 at maximum operating temperature [ohm] (line plus protective conductor)."""
        return self.r_line_hot + self.r_cpc_hot


def run_impedances(cable: Any, *, ring: bool = False) -> RunImpedances:
    """Impedances of a cable run from a :class:`coordination.model.Cable`.

    Line, neutral and protective conductor each: R = r(csa, material, t) x length / parallel,
    X = x_ohm_per_m x length / parallel (the protective conductor divides by ``cpc_parallel``,
    by default ``parallel``). The protective conductor runs at the same temperature as the line
    conductors (BS 7671 practice for a cpc in the cable; for a separate one, or the armour,
    that is on the safe side for Zs). Where the cable's steel-wire armour is the protective
    conductor (``cpc_armour``), its resistance is the study's ``armour_ohm_per_m`` at 20 degC,
    else rho / A of steel, raised to the conductors' operating temperature.

    A ring (``ring = True``, ``length_m`` the ring's whole route length) is seen from its
    mid-point: every resistance and reactance is a quarter of its end-to-end value.

    References
    ----------
    IEC 60228:2004, Table 2 and Annex B; IEC 60364-5-52, Table 52.1; reactance about
    0.08 mOhm/m per conductor (common practice); ring mid-point (r1 + r2) / 4 (common
    practice, BS 7671 Guidance Note 3, from memory); steel resistivity IEC 60287-1-1 Table 1
    (from memory).

    Examples
    --------
    >>> from coordination.model import Cable
    >>> run = run_impedances(Cable(length_m=30, csa_mm2=2.5, cpc_mm2=1.5))
    >>> print(f"{run.r1_r2_hot:.4f}")
    0.7003
    >>> ring = run_impedances(Cable(length_m=120, csa_mm2=2.5, cpc_mm2=1.5), ring=True)
    >>> print(f"{ring.r1_r2_hot:.4f}")
    0.7003
    """
    material = canonical_material(cable.material)
    hot = max_operating_temperature_c(cable.insulation)
    length = float(cable.length_m)
    if ring:
        length = ring_midpoint_ohm(length)  # every conductor: a quarter of end to end
    par = int(cable.parallel)
    cpc_par = int(getattr(cable, "cpc_parallel", None) or par)
    x = DEFAULT_X_OHM_PER_M if cable.x_ohm_per_m is None else float(cable.x_ohm_per_m)
    k_line = float(temperature_factor(hot, material))
    r_line = r20_ohm_per_m(cable.csa_mm2, material) * length / par
    neutral_mm2 = cable.csa_mm2 if cable.neutral_mm2 is None else cable.neutral_mm2
    if neutral_mm2 == 0:
        r_neutral = x_neutral = float("nan")
    else:
        r_neutral = r20_ohm_per_m(neutral_mm2, material, key="neutral_mm2") * length / par
        x_neutral = x * length / par
    if getattr(cable, "cpc_armour", False):
        given = getattr(cable, "armour_ohm_per_m", None)
        per_m = float(given) if given is not None else armour_r20_ohm_per_m(cable.armour_mm2)
        r_cpc = per_m * length
        k_cpc = armour_temperature_factor(hot)
        x_cpc = x * length
    else:
        cpc_material = canonical_material(cable.cpc_material or material, key="cpc_material")
        cpc_mm2 = cable.csa_mm2 if cable.cpc_mm2 is None else cable.cpc_mm2
        r_cpc = r20_ohm_per_m(cpc_mm2, cpc_material, key="cpc_mm2") * length / cpc_par
        k_cpc = float(temperature_factor(hot, cpc_material))
        x_cpc = x * length / cpc_par
    return RunImpedances(
        r_line_20=r_line, r_neutral_20=r_neutral, r_cpc_20=r_cpc,
        r_line_hot=r_line * k_line, r_neutral_hot=r_neutral * k_line, r_cpc_hot=r_cpc * k_cpc,
        x_line=x * length / par, x_neutral=x_neutral, x_cpc=x_cpc, hot_c=hot,
    )
