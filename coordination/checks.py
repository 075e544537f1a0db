"""Protection checks beside selectivity: disconnection, overload, fault energy, breaking capacity.

A selective design that leaves a cable unprotected or an earth fault uncleared is no design. For
every circuit of a study, with the fault levels of :func:`coordination.faults.compute`, this module
runs four checks a designer documents beside selectivity:

``disconnection``
    The device's latest operating time at the minimum earth-fault current at the circuit's far
    end against IEC 60364-4-41 Table 41.1 (final circuits) or the 5 s / 1 s of distribution
    circuits; the maximum loop impedance Zs for that device is shown beside the circuit's Zs.
``overload``
    Ib <= In <= Iz and I2 <= 1.45 Iz (IEC 60364-4-43, 433.1), where the study gives Ib or Iz.
``fault-energy``
    The adiabatic rule S >= sqrt(I2t) / k (IEC 60364-4-43, 434.5.2; IEC 60364-5-54, 543.1.2) for
    the line conductors and the protective conductor.
``breaking-capacity``
    The device's rated short-circuit breaking capacity against the largest fault at its board
    (IEC 60364-4-43, 434.5.1).

These are safety checks: they always take the worst case that a device complying with its
standard allows (the band's envelope basis: the upper edge, the maximum let-through energy),
whatever basis the study chose for selectivity. For MCBs this reproduces BS 7671 Table 41.3: the
0.4 s of Table 41.1 is met only in the instantaneous region, so Ia is the upper instantaneous
multiple times In.

Every result reads the same way: it passes when ``value <= limit`` (a time, a current or a
cross-section in ``unit``), and its ``reason`` is one line a designer can act on.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from types import MappingProxyType
from typing import Any

import numpy as np

from coordination.faults import FaultLevels
from coordination.frozen import quick_init
from coordination.model import Study
from curves.band import Band
from curves.errors import InputError

#: Check names, in the order they are run and printed.
CHECK_NAMES = ("disconnection", "overload", "fault-energy", "breaking-capacity")

#: The adiabatic rule holds for faults cleared within this time [s] (IEC 60364-4-43, 434.5.2).
ADIABATIC_LIMIT_S = 5.0

#: Final circuits within the scope of Table 41.1 carry at most this current [A]
#: (IEC 60364-4-41:2005, 411.3.2.2; larger final circuits take the 5 s / 1 s of 411.3.2.3 (TN)
#: / 411.3.2.4 (TT)). BS 7671 raises it to 63 A for socket-outlet circuits (from memory).
FINAL_CIRCUIT_SCOPE_A = 32.0

#: IEC 60364-4-41:2005 Table 41.1, maximum disconnection times of final circuits, a.c. [s]:
#: (U0 above [V], U0 up to [V], TN [s], TT [s]).
#: Rows 120 < U0 <= 230 V and 230 < U0 <= 400 V: confirmed;
#: rows 50 < U0 <= 120 V and U0 > 400 V: from memory.
TABLE_41_1 = (
    (50.0, 120.0, 0.8, 0.3),  # from memory
    (120.0, 230.0, 0.4, 0.2),  # confirmed
    (230.0, 400.0, 0.2, 0.07),  # confirmed
    (400.0, math.inf, 0.1, 0.04),  # from memory
)
TABLE_41_1_SOURCE = "IEC 60364-4-41 Table 41.1"

#: Distribution circuits (and final circuits beyond the scope of Table 41.1) [s]:
#: TN 5 s (IEC 60364-4-41, 411.3.2.3), TT 1 s (411.3.2.4). Confirmed.
DISTRIBUTION_TIME_S = {"TN": 5.0, "TT": 1.0}

#: The earthing systems the checks know, and the row of Table 41.1 they read.
EARTHING_KIND = {"TN-S": "TN", "TN-C-S": "TN", "TN-C": "TN", "TN": "TN", "TT": "TT"}

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

#: The fastest overcurrent device a circuit can have operates within 0.1 s at 5 In (an IEC
#: 60898-1 type B MCB's upper instantaneous multiple): below 5 Ib no overcurrent device able to
#: carry the load disconnects fast enough, and only an RCD can (common practice).
FASTEST_OVERCURRENT_MULTIPLE = 5.0

#: Study-file keys of a device table that state its breaking capacity.
CAPACITY_KEYS = ("icn_a", "icu_a", "ics_a", "breaking_capacity_a")


# -------------------------------------------------------------------------------------------
# the result
@quick_init
@dataclass(frozen=True, init=False)
class CheckResult:
    """One protection check of one circuit.

    Parameters
    ----------
    circuit : str
        Circuit id.
    check : str
        One of :data:`CHECK_NAMES`.
    ok : bool
        The check passes (``value <= limit`` and nothing else stands against it).
    value : float
        What the installation has or needs, in ``unit`` (operating time [s], current [A],
        required cross-section [mm2]); ``inf`` for never.
    limit : float
        What it must not exceed, in ``unit``.
    unit : str
        ``"s"``, ``"A"`` or ``"mm2"``.
    reason : str
        One line a designer can act on.
    basis : str
        Basis of the band used (``"envelope"``, or ``"datasheet"`` for a device given by points).
    details : mapping
        Further numbers with units in their keys (``zs_ohm``, ``zs_max_ohm``, ``current_a``,
        ``source`` ...), for the JSON output and the report.
    """

    circuit: str
    check: str
    ok: bool
    value: float
    limit: float
    unit: str
    reason: str
    basis: str
    details: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if self.details.__class__ is not MappingProxyType:  # a read-only view is kept as given
            object.__setattr__(self, "details", MappingProxyType(dict(self.details)))

    def to_json(self) -> dict[str, Any]:
        """The contract keys (circuit, check, ok, value, limit, unit) and more; ``None`` for
        never (:meth:`json_record` with every number finite or ``None``)."""
        out = self.json_record()
        finite = math.isfinite
        for key, val in out.items():  # values replaced in place: the keys stay as they are
            cls = val.__class__
            if cls is float:  # the common case first
                if not finite(val):
                    out[key] = None
            elif cls is str or cls is bool or val is None:
                continue
            elif isinstance(val, float | int) and not isinstance(val, bool):
                out[key] = _finite(val)
        return out

    def json_record(self) -> dict[str, Any]:
        """The contract keys and the details, with numbers left as they are: for the encoder,
        since ``coordination.cli.json_bytes`` writes inf and NaN as null (the same JSON as
        :meth:`to_json`, built in one merge, without a pass over the details: a building's
        check has 8,183 results)."""
        value, limit = self.value, self.limit
        head = {
            "circuit": self.circuit,
            "check": self.check,
            "ok": bool(self.ok),
            "value": None if value is None else float(value),
            "limit": None if limit is None else float(limit),
            "unit": self.unit,
            "reason": self.reason,
            "basis": self.basis,
        }
        out = {**head, **self.details}
        if len(out) < len(head) + len(self.details):  # a detail named like a contract key
            out.update(head)  # the contract's value, as in to_json
        return out


def _result(cid: str, check: str, ok: bool, value: float, limit: float, unit: str, reason: str,
            band: Band, details: dict[str, Any]) -> CheckResult:
    """A check's result over a details dict made for it alone (kept as a read-only view of that
    dict rather than copied: 8,183 copies in a building's check)."""
    return CheckResult(cid, check, ok, value, limit, unit, reason, band.basis,
                       MappingProxyType(details))


def _finite(x: Any) -> Any:
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


# -------------------------------------------------------------------------------------------
# pure physics and tables
def disconnection_time_s(u0_v: float, earthing: str, final: bool) -> float:
    """Maximum disconnection time for fault protection by automatic disconnection [s].

    Parameters
    ----------
    u0_v : float
        Nominal a.c. line-to-earth voltage U0 [V], above 50 V.
    earthing : str
        ``"TN-S"``, ``"TN-C-S"``, ``"TN-C"`` or ``"TT"``.
    final : bool
        ``True`` for a final circuit within the scope of Table 41.1; ``False`` for a
        distribution circuit (or a final circuit beyond that scope).

    Returns
    -------
    float
        The time [s].

    Raises
    ------
    InputError
        For U0 of 50 V or less, or an earthing system not in the list.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2.2 and Table 41.1 (final circuits); 411.3.2.3 (TN distribution
    circuits, 5 s); 411.3.2.4 (TT distribution circuits, 1 s).

    Examples
    --------
    >>> print(disconnection_time_s(230.0, "TN-C-S", True))
    0.4
    """
    kind = EARTHING_KIND.get(str(earthing).upper())
    if kind is None:
        allowed = ", ".join(k for k in EARTHING_KIND if k != "TN")
        raise InputError(f"earthing {earthing!r} is not covered by the checks; allowed: {allowed}",
                         key="supply.earthing")
    if not (math.isfinite(u0_v) and u0_v > 50.0):
        raise InputError(f"U0 {u0_v:g} V is outside Table 41.1 of IEC 60364-4-41; give U0 above "
                         "50 V a.c.", key="supply.u0_v")
    if not final:
        return DISTRIBUTION_TIME_S[kind]
    for above, up_to, tn, tt in TABLE_41_1:
        if above < u0_v <= up_to:
            return tn if kind == "TN" else tt
    raise AssertionError("Table 41.1 covers every U0 above 50 V")  # pragma: no cover


def operating_current_a(band: Band, t_s: float) -> float:
    """Least current at which the band's upper edge is at or below ``t_s`` [A].

    The worst case a device of this band allows: at this current and above, it has cleared by
    ``t_s``. Found by a vectorised scan in log current followed by bisection on the upper edge
    (which never rises with current), so a step in the edge (an instantaneous release) is found
    exactly.

    Parameters
    ----------
    band : Band
        The device (use the envelope basis for a safety check).
    t_s : float
        Operating time [s], positive.

    Returns
    -------
    float
        Ia [A]; ``inf`` when the device may never operate that fast.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4 (Ia, the current causing automatic operation within the time).

    Examples
    --------
    >>> from curves.mcb import mcb_band
    >>> print(round(operating_current_a(mcb_band("B", 32, basis="envelope"), 0.4), 6))
    160.0
    """
    return _operating_current_a(band, float(t_s))


@lru_cache(maxsize=4096)
def _operating_current_a(band: Band, t_s: float) -> float:
    # bands are hashable by their key and shared through coordination.devices' cache
    lo = max(float(band.pickup_min_a), 1e-6)
    hi = max(float(band.rating_a), lo) * 1e6
    grid = np.geomspace(lo, hi, 4001)
    fast = band.t_max(grid) <= t_s
    if not fast.any():
        return math.inf
    k = int(np.argmax(fast))
    if k == 0:
        return float(grid[0])
    a, b = math.log(grid[k - 1]), math.log(grid[k])  # t_max(e^a) > t_s >= t_max(e^b)
    for _ in range(60):
        mid = 0.5 * (a + b)
        if float(band.t_max(math.exp(mid))) <= t_s:
            b = mid
        else:
            a = mid
        if b - a < 1e-13:
            break
    return math.exp(b)


def max_zs_ohm(band: Band, u0_v: float, t_s: float, c_min: float = 0.95) -> float:
    """Largest earth-fault loop impedance with which the device disconnects within ``t_s`` [ohm].

    ``Zs_max = c_min * U0 / Ia`` with Ia the current at which the band's upper edge reaches
    ``t_s`` (:func:`operating_current_a`). For an MCB on its envelope, 0.4 s is reached only in
    the instantaneous region, so Ia is the upper instantaneous multiple times In (5, 10, 20 In for
    types B, C, D) and the result is BS 7671 Table 41.3.

    Parameters
    ----------
    band : Band
        The device, on the envelope basis for a safety check.
    u0_v : float
        Nominal line-to-earth voltage U0 [V].
    t_s : float
        Required disconnection time [s].
    c_min : float
        Voltage factor for minimum fault currents [-] (0.95, IEC 60909-0 Table 1; BS 7671 Cmin).

    Returns
    -------
    float
        Zs_max [ohm]; 0 when the device never operates that fast.

    References
    ----------
    IEC 60364-4-41:2005, 411.4.4 (Zs x Ia <= U0); BS 7671:2018 Table 41.3 and Appendix 3
    (Cmin = 0.95).

    Examples
    --------
    >>> from curves.mcb import mcb_band
    >>> print(round(max_zs_ohm(mcb_band("B", 32, basis="envelope"), 230.0, 0.4), 2))
    1.37
    """
    ia = operating_current_a(band, t_s)
    return c_min * u0_v / ia if math.isfinite(ia) else 0.0


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


@quick_init
@dataclass(frozen=True, init=False)
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
    """

    line_mm2: float
    k_line: float
    cpc_mm2: float
    k_cpc: float
    cpc_each_mm2: float


def conductor_sizes(cable: Any) -> ConductorSizes:
    """The cross-sections and k factors the adiabatic rule reads for a cable.

    The line conductors count ``csa_mm2 x parallel``; the protective conductor
    ``cpc_mm2 x cpc_parallel`` (``cpc_mm2`` defaults to ``csa_mm2``, ``cpc_parallel`` to
    ``parallel``). Each k comes from the conductor's own material (``cpc_material`` for the
    protective conductor, by default the cable's), the cable's insulation and the size of one
    conductor (PVC changes above 300 mm2). The protective conductor is taken as a core of the
    cable (Table A.54.3); a separate one has a higher k, so this is on the safe side.

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
    that is not; not used here).

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
    return ConductorSizes(
        line_mm2=csa * parallel,
        k_line=k_factor(material, cable.insulation, csa),
        cpc_mm2=cpc_each * cpc_parallel,
        k_cpc=k_factor(cpc_material, cable.insulation, cpc_each),
        cpc_each_mm2=cpc_each,
    )


@lru_cache(maxsize=4096)
def _sizes(cable: Any) -> ConductorSizes:
    """:func:`conductor_sizes`, once per distinct cable (a study repeats its cables)."""
    return conductor_sizes(cable)


def overload_conditions(ib_a: float | None, in_a: float, iz_a: float | None,
                        i2_a: float) -> tuple[tuple[str, float, float], ...]:
    """The overload conditions that the given data allow, as (name, value [A], limit [A]).

    ``Ib <= In`` when Ib is given; ``In <= Iz`` and ``I2 <= 1.45 Iz`` when Iz is given. Each
    holds when value <= limit.

    Parameters
    ----------
    ib_a : float or None
        Design current Ib [A].
    in_a : float
        Rated current or current setting of the device In (Ir) [A].
    iz_a : float or None
        Current-carrying capacity of the cable after derating Iz [A].
    i2_a : float
        Current ensuring the device operates within the conventional time I2 [A].

    References
    ----------
    IEC 60364-4-43:2008, 433.1, equations (1) and (2).

    Examples
    --------
    >>> print(overload_conditions(None, 32.0, 34.0, 1.6 * 32.0)[-1])
    ('I2 <= 1.45 Iz', 51.2, 49.3)
    """
    terms: list[tuple[str, float, float]] = []
    if ib_a is not None:
        terms.append(("Ib <= In", float(ib_a), float(in_a)))
    if iz_a is not None:
        terms.append(("In <= Iz", float(in_a), float(iz_a)))
        terms.append(("I2 <= 1.45 Iz", float(i2_a), round(1.45 * float(iz_a), 12)))
    return tuple(terms)


def overload_ok(ib_a: float | None, in_a: float, iz_a: float | None, i2_a: float) -> bool:
    """Whether Ib <= In <= Iz and I2 <= 1.45 Iz hold (those the data allow).

    References
    ----------
    IEC 60364-4-43:2008, 433.1.

    Examples
    --------
    >>> print(overload_ok(20.0, 32.0, 34.0, 1.45 * 32.0))
    True
    """
    return all(v <= lim for _, v, lim in overload_conditions(ib_a, in_a, iz_a, i2_a))


# -------------------------------------------------------------------------------------------
# formatting helpers (our own wording), cached: a building's reasons format 38,000 numbers, most
# of them again and again (a board's fault level for each of its circuits, the usual ratings)
@lru_cache(maxsize=4096)
def _a(i: float) -> str:
    if not math.isfinite(i):
        return "-"
    return f"{i / 1000:.3g} kA" if i >= 1000 else f"{i:.3g} A"


@lru_cache(maxsize=4096)
def _s(t: float) -> str:
    if not math.isfinite(t):
        return "never"
    return f"{t * 1000:.3g} ms" if t < 0.1 else f"{t:.3g} s"


@lru_cache(maxsize=4096)
def _ohm(z: float) -> str:
    return f"{z:.3g} ohm" if z < 0.1 else f"{z:.2f} ohm"


@lru_cache(maxsize=4096)
def _mm2(s: float) -> str:
    return "-" if not math.isfinite(s) else f"{s:.3g} mm2"


def _in_a(band: Band) -> float:
    """The device's current setting: Ir for adjustable breakers, else In [A]."""
    return float(band.settings.get("Ir_a", band.rating_a) or band.rating_a)


def _get(node: Any, name: str, default: float | None = None) -> float | None:
    value = getattr(node, name, None)
    return default if value is None else float(value)


#: Fault currents of a node [A] at which the checks read its device's edges.
_NODE_CURRENTS = ("ief_min_a", "ik_max_a", "ik3_max_a", "ik1_max_a", "ik_min_end_a",
                  "ief_max_board_a")


_NOTHING: Mapping[float, tuple[float, float]] = MappingProxyType({})


class _Edges:
    """Upper edge [s] and maximum let-through I2t [A2s] of bands at the currents the checks read.

    Built with one vectorised call per distinct band over all the currents its circuits need
    (identical devices in many circuits share the call); a current not asked for in advance is
    evaluated on its own, so the values never depend on what was gathered.
    """

    def __init__(self, wanted: Mapping[Band, Iterable[float]]) -> None:
        self._values: dict[Band, dict[float, tuple[float, float]]] = {}
        for band, currents in wanted.items():
            i = np.array(sorted({c for c in currents if c > 0}), dtype=np.float64)
            if i.size == 0:
                continue
            t = np.asarray(band.t_max(i), dtype=np.float64).tolist()
            energy = np.asarray(band.i2t_let_through(i), dtype=np.float64).tolist()
            self._values[band] = dict(zip(i.tolist(), zip(t, energy, strict=True), strict=True))

    @classmethod
    def for_nodes(cls, items: Iterable[tuple[Band, Any]]) -> _Edges:
        """The edges of each (band, fault-level node) pair at the node's fault currents."""
        wanted: dict[Band, set[float]] = {}
        for band, node in items:
            currents = wanted.setdefault(band, set())
            for name in _NODE_CURRENTS:
                try:
                    value = _get(node, name)
                except (TypeError, ValueError):
                    continue
                if value is not None and math.isfinite(value):
                    currents.add(value)
        return cls(wanted)

    def _pair(self, band: Band, i: float) -> tuple[float, float] | None:
        values = self._values.get(band)
        return None if values is None else values.get(i)

    def t_max(self, band: Band, i: float) -> float:
        """Upper edge at ``i`` [s]; ``inf`` for no current."""
        if not i > 0:
            return math.inf
        pair = self._pair(band, i)
        return float(band.t_max(i)) if pair is None else pair[0]

    def values_of(self, band: Band) -> Mapping[float, tuple[float, float]]:
        """The band's (upper edge [s], maximum let-through [A2s]) by current [A], as gathered
        (may be empty; :func:`_edge_and_energy` evaluates a current not in it)."""
        return self._values.get(band, _NOTHING)


def _edge_and_energy(band: Band, i: float) -> tuple[float, float]:
    """Upper edge [s] and maximum let-through I2t [A2s] of a band at one current, evaluated."""
    return float(band.t_max(i)), float(band.i2t_let_through(i))


def _never(band: Band, i: float) -> str:
    """Words for a current the band's upper edge never reaches: it is never cleared."""
    pickup = float(band.pickup_max_a)
    where = (f"below its pickup, {_a(pickup)}" if math.isfinite(pickup) and i < pickup
             else "below its pickup")
    return f"{_a(i)} is never cleared by {band.name} ({where})"


def _takes(band: Band, i: float, t: float) -> str:
    """``"160 A may take 12 s"``, or the words for never."""
    return f"{_a(i)} may take {_s(t)}" if math.isfinite(t) else _never(band, i)


def _disconnection_limit(study: Study, cid: str, band: Band) -> tuple[float, str, str, bool]:
    """Required time [s], the circuit's class in words, its source, and whether it is final."""
    final = study.is_final(cid)
    in_scope = final and _in_a(band) <= FINAL_CIRCUIT_SCOPE_A
    return (*_limit_and_class(study.supply.u0_v, study.supply.earthing, final, in_scope), final)


@lru_cache(maxsize=256)
def _limit_and_class(u0_v: float, earthing: str, final: bool,
                     in_scope: bool) -> tuple[float, str, str]:
    """:func:`_disconnection_limit` for a class of circuit (the same for most of a study's)."""
    kind = EARTHING_KIND.get(str(earthing).upper(), "TN")
    limit = disconnection_time_s(u0_v, earthing, in_scope)
    if in_scope:
        return limit, f"final circuit, {kind}", TABLE_41_1_SOURCE
    what = (f"final circuit above {FINAL_CIRCUIT_SCOPE_A:g} A, {kind}" if final
            else f"distribution circuit, {kind}")
    return limit, what, f"IEC 60364-4-41 411.3.2.{3 if kind == 'TN' else 4}"


def _carried_a(study: Study, cid: str, band: Band) -> float:
    """The current the circuit's device must carry: Ib where given, else In [A]."""
    ib = study.by_id[cid].load_a
    return float(ib) if ib else _in_a(band)


def _rcd_needed(study: Study, cid: str, band: Band, node: Any, edges: _Edges) -> bool:
    """TT and the earth fault too small for any overcurrent device able to carry the load:
    the disconnection check fails and asks for an RCD."""
    if EARTHING_KIND.get(str(study.supply.earthing).upper(), "TN") != "TT":
        return False
    ief = _get(node, "ief_min_a", 0.0) or 0.0
    limit = _disconnection_limit(study, cid, band)[0]
    carry = _carried_a(study, cid, band)
    return edges.t_max(band, ief) > limit and ief < FASTEST_OVERCURRENT_MULTIPLE * carry


# -------------------------------------------------------------------------------------------
# the four checks of one circuit
def _disconnection(study: Study, cid: str, band: Band, node: Any, edges: _Edges) -> CheckResult:
    supply = study.supply
    kind = EARTHING_KIND.get(str(supply.earthing).upper(), "TN")
    limit, what, source, final = _disconnection_limit(study, cid, band)
    ief = _get(node, "ief_min_a", 0.0) or 0.0
    zs = _get(node, "zs_ohm", math.nan)
    zs = math.nan if zs is None else zs
    t = edges.t_max(band, ief)
    ia = operating_current_a(band, limit)
    zs_max = supply.c_min * supply.u0_v / ia if math.isfinite(ia) else 0.0
    ok = t <= limit
    details = {"current_a": ief, "zs_ohm": zs, "zs_max_ohm": zs_max, "ia_a": ia,
               "final": final, "circuit_class": what, "source": source}
    zs_text = f"Zs {_ohm(zs)}" if math.isfinite(zs) else "Zs"
    times = f"{_takes(band, ief, t)}, limit {_s(limit)} ({what})"
    if ok:
        reason = (f"{zs_text} within {_ohm(zs_max)} for {band.name}: {_a(ief)} cleared within "
                  f"{_s(t)}, limit {_s(limit)} ({what})")
    else:
        carry = _carried_a(study, cid, band)
        head = f"{zs_text} exceeds {_ohm(zs_max)} for {band.name}"
        if kind == "TT" and ief < FASTEST_OVERCURRENT_MULTIPLE * carry:
            reason = (f"{head}: {times}; too high for any overcurrent device carrying "
                      f"{_a(carry)} (a type B needs {_a(FASTEST_OVERCURRENT_MULTIPLE * carry)}): "
                      "an RCD is needed")
        else:
            reason = (f"{head}: {times}; shorten the run, enlarge the conductors, choose a "
                      "faster device or use an RCD")
    return _result(cid, "disconnection", ok, t, limit, "s", reason, band, details)


def _series(band: Band) -> tuple[float, ...] | None:
    """The standard ratings of the band's family, where it has a fixed series."""
    if band.family == "mcb":
        from curves.mcb import MCB_RATINGS_A
        return tuple(float(r) for r in MCB_RATINGS_A)
    if band.family == "gG":
        from curves.fuse import GG_RATINGS_A
        return tuple(float(r) for r in GG_RATINGS_A)
    return None


def _next_device(band: Band, ib_a: float) -> tuple[str, float, float, bool] | None:
    """The smallest device of the band's family that carries ``ib_a``: (name, In [A], I2 [A],
    exact). ``exact`` is False where I2 is scaled from the present device (adjustable breakers,
    datasheet devices: a rating or setting of at least Ib); None where the series ends below Ib.
    """
    series = _series(band)
    if series is None:
        ratio = float(band.pickup_max_a) / _in_a(band)
        in_new = math.ceil(ib_a * 10.0 - 1e-9) / 10.0
        return f"a rating or setting of at least {in_new:g} A", in_new, ratio * in_new, False
    fits = [r for r in series if r >= ib_a]
    if not fits:
        return None
    new = _family_member(band, fits[0])
    return new.name, float(new.rating_a), float(new.pickup_max_a), True


def _family_member(band: Band, rating: float) -> Band:
    """Another rating of an MCB's or a gG fuse-link's family, on the same basis and settings."""
    if band.family == "mcb":
        from curves.mcb import class_applies, mcb_band
        st = band.settings
        curve = str(st.get("type", band.name[0]))
        cls = st.get("energy_class")  # a class kept where EN 60898-1 Annex ZA has one
        return mcb_band(curve, rating, basis=band.basis,
                        energy_class=cls if cls and class_applies(curve, rating, cls) else None,
                        icn_a=float(st.get("icn_a", 6000.0)))
    from curves.fuse import gg_band
    return gg_band(rating, basis=band.basis)


def _smaller_device(band: Band, ib_a: float | None, iz_a: float) -> str | None:
    """A smaller device of the band's family that meets every overload condition with this
    cable (the largest such rating), or a lower setting for adjustable devices; None if none."""
    series = _series(band)
    if series is None:
        if band.family not in ("breaker-tm", "breaker-electronic"):
            return None  # a datasheet device has no setting and no series here
        from curves.breaker import ELECTRONIC_IR_FRACTIONS, TM_IR_FRACTIONS

        fractions = TM_IR_FRACTIONS if band.family == "breaker-tm" else ELECTRONIC_IR_FRACTIONS
        lowest = min(fractions) * float(band.rating_a)  # the unit's lowest Ir [A]
        ratio = float(band.pickup_max_a) / _in_a(band)  # I2 scales with the setting
        highest = min(iz_a, 1.45 * iz_a / ratio)
        if (highest >= _in_a(band) or highest < lowest
                or (ib_a is not None and ib_a > highest)):
            return None
        return f"a lower setting, Ir <= {math.floor(highest * 10.0 + 1e-9) / 10.0:g} A"
    for rating in sorted((r for r in series if r < _in_a(band)), reverse=True):
        if ib_a is not None and rating < ib_a:
            return None
        member = _family_member(band, rating)
        if overload_ok(ib_a, rating, iz_a, float(member.pickup_max_a)):
            return member.name
    return None


def _iz_needed_a(in_a: float, i2_a: float) -> float:
    """Least Iz with In <= Iz and I2 <= 1.45 Iz, rounded up to 0.1 A (never too small) [A]."""
    need = max(in_a, i2_a / 1.45)
    return math.ceil(need * 10.0 - 1e-9) / 10.0


def _overload(study: Study, cid: str, band: Band) -> CheckResult | None:
    circuit = study.by_id[cid]
    ib = circuit.load_a
    iz = circuit.cable.iz_a if circuit.cable is not None else None
    if ib is None and iz is None:
        return None
    ok, value, limit, reason, details = _overload_verdict(band, ib, iz)
    return CheckResult(cid, "overload", ok, value, limit, "A", reason, band.basis, details)


@lru_cache(maxsize=4096)
def _overload_verdict(band: Band, ib: float | None,
                      iz: float | None) -> tuple[bool, float, float, str, Mapping[str, Any]]:
    """The overload check of a device with its load and cable: ok, value [A], limit [A], the
    reason and the details (a read-only view, shared by the circuits that repeat the three, as
    many of a building's do)."""
    in_a = _in_a(band)
    i2 = float(band.pickup_max_a)
    terms = overload_conditions(ib, in_a, iz, i2)
    name, value, limit = max(terms, key=lambda t: t[1] / t[2] if t[2] > 0 else math.inf)
    ok = all(v <= lim for _, v, lim in terms)
    details: dict[str, Any] = {"ib_a": ib, "in_a": in_a, "iz_a": iz, "i2_a": i2,
                               "binding": name, "source": "IEC 60364-4-43 433.1"}
    if ok:
        have = ", ".join(f"{n} ({_a(v)} <= {_a(lim)})" for n, v, lim in terms)
        reason = f"{band.name} protects against overload: {have}"
    else:
        failing = [f"{n.replace(' <= ', ' > ')} ({_a(v)} > {_a(lim)})"
                   for n, v, lim in terms if v > lim]
        if ib is not None and float(ib) > in_a:
            # the device cannot carry the load: only a larger one helps, with the cable it needs
            nxt = _next_device(band, float(ib))
            if nxt is None:
                fix = (f"no {band.family} rating carries Ib {_a(float(ib))}: choose another "
                       "family")
            else:
                new_name, new_in, new_i2, exact = nxt
                need = _iz_needed_a(new_in, new_i2)
                details.update({"next_device": new_name, "next_in_a": new_in,
                                "next_i2_a": new_i2, "next_iz_needed_a": need})
                i2_text = f"I2 {_a(new_i2)}" if exact else f"I2 about {_a(new_i2)}"
                needs = (f"it needs Iz >= {need:g} A (In <= Iz, {i2_text} <= 1.45 Iz)")
                if iz is None:
                    cable = "; check the cable's Iz"
                elif float(iz) >= need:
                    cable = f"; the cable's Iz {_a(float(iz))} is enough"
                else:
                    cable = f", so also a cable with Iz >= {need:g} A (now {_a(float(iz))})"
                fix = f"{new_name}, which carries Ib {_a(float(ib))}: {needs}{cable}"
            reason = f"{band.name} (I2 {_a(i2)}): {'; '.join(failing)}: choose {fix}"
        else:  # the device carries the load; the cable is what it fails to protect
            assert iz is not None  # only In <= Iz and I2 <= 1.45 Iz are left to fail
            need = _iz_needed_a(in_a, i2)
            fixes = [f"a cable with Iz >= {need:g} A"]
            if ib is not None and float(ib) > float(iz):
                fixes[0] += (f" (Ib {_a(float(ib))} exceeds Iz {_a(float(iz))}: the cable is "
                             "too small for the load, whatever the device)")
            else:
                smaller = _smaller_device(band, None if ib is None else float(ib), float(iz))
                if smaller is not None:
                    carries = "" if ib is None else f"carries Ib {_a(float(ib))} and "
                    fixes.append(f"{smaller}, which {carries}protects this cable")
                    details["smaller_device"] = smaller
            reason = (f"{band.name} (I2 {_a(i2)}): {'; '.join(failing)}: choose "
                      f"{' or '.join(fixes)}")
    return ok, value, limit, reason, MappingProxyType(details)


def _fault_energy(study: Study, cid: str, band: Band, node: Any, overload_protected: bool,
                  edges: _Edges) -> CheckResult | None:
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
    ik_max = _get(node, "ik_max_a")
    ik3 = _get(node, "ik3_max_a", ik_max)
    ik1 = _get(node, "ik1_max_a", ik_max)
    if circuit.phases == 3:
        i_max = max(x for x in (ik3, ik1, ik_max) if x is not None)
    else:
        i_max = ik1 if ik1 is not None else ik_max
    ief_max = _get(node, "ief_max_board_a")
    if ief_max is not None and not (ief_max > 0 and math.isfinite(ief_max)):
        ief_max = None
    if ief_max is not None and (i_max is None or ief_max > i_max):
        i_max = ief_max  # an earth fault flows in a line conductor too
    cases = [("maximum fault at the board", "line", i_max, one_line, k_line)]
    ik_min = _get(node, "ik_min_end_a")
    if ik_min is not None and ik_min > 0:
        cases.append(("minimum fault at the far end", "line", ik_min, s_line, k_line))
    rcd = _rcd_needed(study, cid, band, node, edges)
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
        need = adiabatic_min_csa_mm2(energy, k) if finite(energy) else math.inf
        if t > ADIABATIC_LIMIT_S:
            if conductor == "line" and overload_protected:
                continue  # IEC 60364-4-43 435.1: overload protection also protects the conductor
            at = f"the {what} ({_a(i)})"
            if rcd and "earth fault" in what:
                if not any("must be cleared by an RCD" in text for text in problems):
                    problems.append(  # one message for the line and the protective conductors
                        f"{at} must be cleared by an RCD (too small for any overcurrent device, "
                        "see disconnection): the adiabatic check of the protective conductor "
                        "(and of the line conductors) then depends on the RCD's clearing time "
                        f"and is not decided by {band.name}")
            elif finite(t):
                problems.append(f"{band.name} may take {_s(t)} at {at}: beyond "
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
            worst, worst_key = (need, s, what, conductor, i, energy, k), key
        fits = fits and need <= s
        checked.append({"case": what, "conductor": conductor,
                        "current_a": i if finite(i) else None,
                        "t_max_s": t if finite(t) else None,
                        "i2t_a2s": energy if finite(energy) else None, "k": k,
                        "need_mm2": need if finite(need) else None, "have_mm2": s})
    if worst is None:
        return None
    need, s, what, conductor, i, energy, k = worst
    ok = not problems and fits
    checked = tuple(checked)
    details = {"current_a": i, "i2t_a2s": energy, "k": k, "conductor": conductor,
               "governing_case": what, "cases": checked,
               "line_mm2": s_line, "cpc_mm2": s_cpc, "k_line": k_line, "k_cpc": k_cpc,
               "source": K_TABLE_SOURCE,
               "assumption": f"governed by the {what}; protective conductor checked at the "
                             "minimum earth fault at the far end and the maximum earth fault "
                             "at the board (a current-limiting device lets through the most "
                             "energy at the largest fault), taken as a core of the same cable "
                             "(Table A.54.3); a separate cpc has a higher k"}
    if problems:
        reason = problems[0]
    elif ok:
        reason = (f"{conductor} conductor {_mm2(s)} withstands the {what} ({_a(i)}, "
                  f"I2t {energy:.3g} A2s, k {k:g}): needs {_mm2(need)}")
    else:
        part = "protective conductor" if conductor == "protective" else "line conductors"
        reason = (f"{part} {_mm2(s)} too small for the {what} ({_a(i)}): {band.name} may "
                  f"let through up to {energy:.3g} A2s (the most its standard allows), needing "
                  f"{_mm2(need)} at k {k:g}; enlarge the "
                  f"{'cpc' if conductor == 'protective' else 'conductors'}, choose a device "
                  "that lets through less energy, or show from the maker's let-through data "
                  f"that it stays within k2S2 = {(k * s) ** 2:.3g} A2s")
    return _result(cid, "fault-energy", ok, need, s, "mm2", reason, band, details)


def _breaking_capacity(study: Study, cid: str, band: Band, node: Any) -> CheckResult:
    circuit = study.by_id[cid]
    ik_max = _get(node, "ik_max_a")
    ik3 = _get(node, "ik3_max_a", ik_max)
    ik1 = _get(node, "ik1_max_a", ik_max)
    if circuit.phases == 3:
        options = [(x, n) for x, n in ((ik3, "three-phase"), (ik1, "line-neutral"))
                   if x is not None]
        fault, kind = max(options) if options else (ik_max or 0.0, "maximum")
    else:
        fault, kind = (ik1, "line-neutral") if ik1 is not None else (ik_max or 0.0, "maximum")
    ief_max = _get(node, "ief_max_board_a")
    if ief_max is not None and math.isfinite(ief_max) and ief_max > fault:
        fault, kind = ief_max, "earth"  # the device must break the largest fault it can see
    device = circuit.device
    stated = isinstance(device, Mapping) and any(k in device for k in CAPACITY_KEYS)
    if circuit.breaking_capacity_a is not None:
        capacity, origin = float(circuit.breaking_capacity_a), "given in the study"
    elif band.breaking_capacity_a is not None:
        capacity = float(band.breaking_capacity_a)
        origin = "given in the study" if stated else f"assumed: the {band.family} family default"
    else:
        capacity, origin = math.nan, "unknown"
    details = {"current_a": fault, "fault": kind, "capacity_origin": origin,
               "source": "IEC 60364-4-43 434.5.1"}
    if not math.isfinite(capacity):
        reason = (f"breaking capacity of {band.name} unknown; give the circuit's "
                  "breaking_capacity_a")
        return _result(cid, "breaking-capacity", False, fault, math.nan, "A", reason, band,
                       details)
    ok = fault <= capacity
    if ok:
        reason = (f"{band.name} breaks {_a(capacity)} ({origin}) >= {kind} fault {_a(fault)} "
                  "at its board")
    else:
        reason = (f"{kind} fault {_a(fault)} at the board exceeds the {_a(capacity)} of "
                  f"{band.name} ({origin}): choose a device rated for at least {_a(fault)}, or "
                  "back-up protection proven by the maker's tests")
    return _result(cid, "breaking-capacity", ok, fault, capacity, "A", reason, band, details)


# -------------------------------------------------------------------------------------------
# public entry points
def check_device(study: Study, levels: FaultLevels, circuit_id: str,
                 band: Band) -> tuple[CheckResult, ...]:
    """The protection checks of one circuit with a given device.

    Used by :func:`run` with the circuit's own device, and by the chooser on candidate devices.

    Parameters
    ----------
    study : Study
        The installation.
    levels : FaultLevels
        Fault levels of the study (``levels.by_circuit[circuit_id]`` with ``ik3_max_a``,
        ``ik1_max_a``, ``ik_max_a`` at the circuit's board, ``ief_min_a``, ``zs_ohm``,
        ``ik_min_end_a`` at its far end) [A], [ohm].
    circuit_id : str
        The circuit.
    band : Band
        The device, on the envelope basis (the worst case a compliant device allows).

    Returns
    -------
    tuple of CheckResult
        In the order of :data:`CHECK_NAMES`; a check the study gives no data for (overload
        without Ib and Iz, fault energy without a cable) is left out.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2 and Table 41.1; IEC 60364-4-43:2008, 433.1, 434.5.1, 434.5.2;
    IEC 60364-5-54:2011, 543.1.2.

    Examples
    --------
    >>> from coordination import faults, study
    >>> s = study.loads('''
    ... [supply]
    ... u0_v = 230
    ... phases = 1
    ... earthing = "TN-C-S"
    ... pfc_a = 6000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "lights"
    ... from = "supply"
    ... device = "B6"
    ... phases = 1
    ... ''')
    >>> from coordination.devices import band_for
    >>> r = check_device(s, faults.compute(s), "lights", band_for(s, "lights", "envelope"))
    >>> print(r[0].check, r[0].limit)
    disconnection 0.4
    """
    if circuit_id not in study.by_id:
        raise InputError(f"no circuit {circuit_id!r} in the study", key="circuit")
    node = levels.by_circuit[circuit_id]
    return _check_device(study, circuit_id, band, node, _Edges.for_nodes([(band, node)]))


def _check_device(study: Study, circuit_id: str, band: Band, node: Any,
                  edges: _Edges) -> tuple[CheckResult, ...]:
    """:func:`check_device` with the band's edges at the node's currents already evaluated."""
    try:
        results: list[CheckResult | None] = [_disconnection(study, circuit_id, band, node, edges)]
        overload = _overload(study, circuit_id, band)
        results.append(overload)
        circuit = study.by_id[circuit_id]
        protected = (overload is not None and overload.ok and circuit.cable is not None
                     and circuit.cable.iz_a is not None)
        results.append(_fault_energy(study, circuit_id, band, node, protected, edges))
        results.append(_breaking_capacity(study, circuit_id, band, node))
    except InputError as error:
        if error.key is not None and error.key.startswith("supply"):
            raise
        raise error.within(circuit=circuit_id) from None
    return tuple(r for r in results if r is not None)


def run(study: Study, levels: FaultLevels) -> tuple[CheckResult, ...]:
    """Every protection check of every circuit, on the envelope basis.

    Parameters
    ----------
    study : Study
        The installation.
    levels : FaultLevels
        Its fault levels (:func:`coordination.faults.compute`).

    Returns
    -------
    tuple of CheckResult
        Circuit by circuit in study order, checks in the order of :data:`CHECK_NAMES`.

    References
    ----------
    IEC 60364-4-41:2005 Table 41.1; IEC 60364-4-43:2008, 433 and 434; IEC 60364-5-54:2011, 543.

    Examples
    --------
    >>> from coordination import faults, study
    >>> s = study.loads('''
    ... [supply]
    ... u0_v = 230
    ... phases = 1
    ... earthing = "TN-C-S"
    ... pfc_a = 6000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "lights"
    ... from = "supply"
    ... device = "B6"
    ... phases = 1
    ... ''')
    >>> print(all(r.ok for r in run(s, faults.compute(s))))
    True
    """
    from coordination.devices import band_for

    # every band's edges at all its circuits' fault currents in one vectorised call per band
    bands = [band_for(study, circuit.id, basis="envelope") for circuit in study.circuits]
    by_circuit = levels.by_circuit
    edges = _Edges.for_nodes((band, by_circuit[circuit.id])
                             for band, circuit in zip(bands, study.circuits, strict=True)
                             if circuit.id in by_circuit)
    out: list[CheckResult] = []
    for band, circuit in zip(bands, study.circuits, strict=True):
        out.extend(_check_device(study, circuit.id, band, by_circuit[circuit.id], edges))
    return tuple(out)


def _value_text(value: float, unit: str) -> str:
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "-"
    if unit == "s":
        return _s(value)
    if unit == "A":
        return _a(value)
    if unit == "mm2":
        return _mm2(value)
    return f"{value:.3g} {unit}"


def format_table(results: Sequence[CheckResult] | Iterable[CheckResult]) -> str:
    """The protection checks as a plain-text table, circuit by circuit, failures marked.

    Parameters
    ----------
    results : sequence of CheckResult
        From :func:`run`.

    Returns
    -------
    str
        A heading, one row per check (``FAIL`` rows marked with ``!``), the checks that the
        study gave no data for, and a summary line.

    Examples
    --------
    >>> r = CheckResult("c1", "overload", True, 32.0, 34.0, "A", "fine", "envelope")
    >>> print(format_table([r]).splitlines()[-1])
    protection checks: 1 run on 1 circuit, all pass
    """
    from coordination.text import table

    results = list(results)
    heading = ("Protection checks (worst case a compliant device allows: envelope upper edge, "
               "maximum let-through; each passes when value <= limit)")
    grouped: dict[str, list[CheckResult]] = defaultdict(list)
    for r in results:
        grouped[r.circuit].append(r)
    order = list(grouped)
    rows = []
    missing = []
    for cid in order:
        mine = grouped[cid]
        for i, r in enumerate(mine):
            rows.append([cid if i == 0 else "", r.check, "ok" if r.ok else "! FAIL",
                         _value_text(r.value, r.unit), _value_text(r.limit, r.unit), r.reason])
        present = {r.check for r in mine}
        absent = [c for c in CHECK_NAMES if c not in present]
        if absent:
            missing.append(f"{cid} ({', '.join(absent)})")
    body = table(["circuit", "check", "result", "value", "limit", "why / what to do"], rows,
                 "lllrrl") if rows else "(no circuits)"
    failed = [r for r in results if not r.ok]
    n_circ = len(order)
    summary = (f"protection checks: {len(results)} run on {n_circ} "
               f"circuit{'s' if n_circ != 1 else ''}, ")
    if failed:
        names = ", ".join(f"{r.circuit} {r.check}" for r in failed)
        summary += f"{len(failed)} FAIL: {names}"
    else:
        summary += "all pass"
    lines = [heading, body]
    if missing:
        lines.append("not checked (the study gives no load_a / cable.iz_a or no cable): "
                     + "; ".join(missing))
    lines.append(summary)
    return "\n".join(lines)
