"""Load and validate a study file (TOML) into the frozen dataclasses of :mod:`coordination.model`.

Every problem raises :class:`curves.errors.InputError` naming the circuit and the key and saying
what is allowed; a key written in the wrong table is told the table it belongs in, and a misspelt
key gets the nearest valid one suggested. Circuits come back ordered parents first (an iterative
depth-first walk from the supply, siblings in file order), so a 5,000-deep chain loads without
recursion.

Keys (units in every name that carries a number)::

    [study]       title, basis, margin, interval_s
    [supply]      u0_v, phases, earthing, pfc_a, pfc_ln_a, ze_ohm, x_r, c_max, c_min
    [supply.transformer]  rating_kva, impedance_pct, x_r, upstream_pfc_a, upstream_x_r
    [[circuit]]   id, from, device, load_a, phases, basis, final, board, selective_to_a,
                  tested_limits_a, breaking_capacity_a, margin, interval_s
    [circuit.cable]  length_m, csa_mm2, cpc_mm2, material, insulation, iz_a, parallel,
                  cpc_parallel, neutral_mm2, x_ohm_per_m, cpc_material
"""

from __future__ import annotations

import difflib
import math
import os
import stat
from collections.abc import Mapping, Sequence
from functools import lru_cache
from pathlib import Path
from typing import Any

import rtoml

from coordination import cables
from coordination.model import SUPPLY_ID, Cable, Circuit, Study, Supply, Transformer
from curves.errors import InputError

TOP_KEYS = ("study", "supply", "circuit")
STUDY_KEYS = ("title", "basis", "margin", "interval_s")
SUPPLY_KEYS = ("u0_v", "phases", "earthing", "pfc_a", "pfc_ln_a", "ze_ohm", "x_r", "c_max",
               "c_min", "transformer")
TRANSFORMER_KEYS = ("rating_kva", "impedance_pct", "x_r", "upstream_pfc_a", "upstream_x_r")
CIRCUIT_KEYS = ("id", "from", "device", "load_a", "phases", "basis", "final", "board",
                "selective_to_a", "tested_limits_a", "breaking_capacity_a", "margin",
                "interval_s", "cable")
CABLE_KEYS = ("length_m", "csa_mm2", "cpc_mm2", "material", "insulation", "iz_a", "parallel",
              "cpc_parallel", "neutral_mm2", "x_ohm_per_m", "cpc_material")

#: Earthing systems (IEC 60364-1 clause 312.2). IT is not covered (a second-fault study).
EARTHING_SYSTEMS = ("TN-S", "TN-C-S", "TN-C", "TT")
#: Band bases a study or a circuit may ask for.
BASES = ("typical", "envelope")
INSULATIONS = tuple(cables.MAX_OPERATING_C)

#: Bounds on quantities: beyond these a value is a typing mistake, not an installation.
MAX_CURRENT_A = 1e6  # 1 MA
MAX_LENGTH_M = 1e5  # 100 km
MAX_ZE_OHM = 2000.0  # a TT installation's earth electrode may reach a few hundred ohm
MAX_X_R = 100.0
MAX_PARALLEL = 20
MAX_ID_CHARS = 100
#: The smallest fault level a supply may declare or its Ze imply [A]: below it no supply could
#: operate the smallest protective device of the families modelled; such a value is a unit slip
#: (kA written as A), not an installation.
MIN_FAULT_A = 10.0
#: How far a supply's declared fault level and its Ze may disagree (common practice: a declared
#: Ze and a declared fault level are both limits, not measurements, so they rarely match).
#: Refused: the earth fault that Ze implies (U0 / Ze) above ZE_PFC_TOLERANCE times the declared
#: fault level (it cannot exceed the fault level), or, in TN, the declared fault level above
#: PFC_ZE_TOLERANCE times that earth fault (a TN-S cable sheath can put the earth loop at
#: several dozen times the impedance of the line loop; a thousand times is no supply).
ZE_PFC_TOLERANCE = 2.0
PFC_ZE_TOLERANCE = 1000.0


# ---------------------------------------------------------------------------------------------
def _describe(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return repr(value)
    if isinstance(value, Mapping):
        return "a table"
    if isinstance(value, list | tuple):
        return "a list"
    if isinstance(value, float):
        return f"{value:g}"
    return repr(value) if not isinstance(value, int) else str(value)


def _g(x: float) -> str:
    if math.isfinite(x) and x == int(x) and abs(x) < 1e12:
        return str(int(x))
    return f"{x:g}"


def _suggest(key: str, allowed: Sequence[str]) -> str:
    lowered = {a.lower(): a for a in allowed}
    close = difflib.get_close_matches(key.lower(), list(lowered), n=1, cutoff=0.6)
    hint = f"did you mean {lowered[close[0]]!r}? " if close else ""
    return f"unknown key {key!r}; {hint}allowed: {', '.join(allowed)}"


#: The study file's tables by dotted name ("" is the top level), with the keys each one takes.
TABLES: dict[str, tuple[str, ...]] = {
    "": TOP_KEYS,
    "study": STUDY_KEYS,
    "supply": SUPPLY_KEYS,
    "supply.transformer": TRANSFORMER_KEYS,
    "circuit": CIRCUIT_KEYS,
    "circuit.cable": CABLE_KEYS,
}
#: What a table's keys are called in messages.
_KIND = {"": "top-level", "study": "study", "supply": "supply",
         "supply.transformer": "transformer", "circuit": "circuit", "circuit.cable": "cable",
         "device": "device"}
#: Where to look for a key that is unknown in a table, nearest table first.
_ELSEWHERE = {
    "": ("study", "supply", "supply.transformer", "circuit", "circuit.cable", "device"),
    "study": ("supply", "supply.transformer", "circuit", "circuit.cable", "device"),
    "supply": ("supply.transformer", "study", "circuit", "circuit.cable", "device"),
    "supply.transformer": ("supply", "study", "circuit", "circuit.cable", "device"),
    "circuit": ("circuit.cable", "device", "study", "supply", "supply.transformer"),
    "circuit.cable": ("circuit", "device", "study", "supply", "supply.transformer"),
}


def _keys_of(table: str) -> tuple[str, ...]:
    """The keys of a study-file table, or of a device's inline table (``"device"``)."""
    if table != "device":
        return TABLES[table]
    try:
        from curves.spec import FAMILY_KEYS
    except ImportError:  # pragma: no cover - the device families are not installed yet
        return ()
    return ("family", *dict.fromkeys(k for keys in FAMILY_KEYS.values() for k in keys))


def _header(table: str) -> str:
    return "[[circuit]]" if table == "circuit" else f"[{table}]"


def _home(key: str, table: str, here: str) -> str:
    """Where ``key`` of ``table`` is written, said to someone who wrote it in ``here``."""
    if table == "device":
        whose = "this circuit's" if here in ("circuit", "circuit.cable") else "a circuit's"
        return (f"{whose} device table, as a setting of the protective device: "
                f"device = {{ family = ..., {key} = ... }}")
    sub = f"{table}.{key}"
    if sub in TABLES:  # a whole table written in the wrong place, e.g. [cable]
        if table == "circuit":
            return f"a circuit: write {_header(sub)} below that circuit's [[circuit]] keys"
        return f"{_header(table)}: write {_header(sub)} below the {_header(table)} keys"
    if here.startswith(f"{table}."):  # a parent's key written below a child table's header
        owner = "this circuit's [[circuit]] table" if table == "circuit" else _header(table)
        return (f"{owner}: move it above the {_header(here)} line, since in TOML every key "
                "below a table header belongs to that table")
    if table == "circuit":
        return "a [[circuit]] table, with the circuit's id, from and device"
    if table == "circuit.cable":
        where = "this circuit's" if here == "circuit" else "a circuit's"
        return f"{_header(table)}: write it below {where} [circuit.cable] line"
    return f"{_header(table)}: write it below the {_header(table)} line"


def _unknown(key: str, here: str, allowed: Sequence[str]) -> str:
    """The message for a key that ``here`` does not take: where it belongs, else the nearest key.

    A key that is exactly a key of another table says which table; a misspelling gets the
    nearest key of this table (difflib), else the nearest key of another table and its home.

    Examples
    --------
    >>> print(_unknown("iz_a", "circuit", ("id", "from")))  # doctest: +NORMALIZE_WHITESPACE
    'iz_a' is not a circuit key; it belongs in [circuit.cable]: write it below this circuit's
    [circuit.cable] line; allowed circuit keys: id, from
    """
    kind = _KIND[here]
    listed = f"; allowed {kind} keys: {', '.join(allowed)}"
    others = [(t, _keys_of(t)) for t in _ELSEWHERE[here]]
    for table, keys in others:
        if key in keys:
            return f"{key!r} is not a {kind} key; it belongs in {_home(key, table, here)}{listed}"
    lowered = {a.lower(): a for a in allowed}
    if difflib.get_close_matches(key.lower(), list(lowered), n=1, cutoff=0.6):
        return _suggest(key, allowed)
    homes: dict[str, tuple[str, str]] = {}  # lowered key -> (key, its nearest table)
    for table, keys in reversed(others):
        homes.update((k.lower(), (k, table)) for k in keys)
    near = difflib.get_close_matches(key.lower(), list(homes), n=1, cutoff=0.6)
    if near:
        right, table = homes[near[0]]
        return (f"unknown key {key!r}; did you mean {right!r}? it is a {_KIND[table]} key and "
                f"belongs in {_home(right, table, here)}{listed}")
    return _suggest(key, allowed)


@lru_cache(maxsize=64)
def _key_set(allowed: Sequence[str]) -> frozenset[str]:
    """The allowed keys of a table as a set (a table's keys are checked once per circuit)."""
    return frozenset(allowed)


class _Table:
    """One TOML table being read: unknown keys are refused first, then each value is typed."""

    def __init__(self, data: Any, allowed: Sequence[str], *, circuit: str | None = None,
                 prefix: str = "", name: str = "", table: str | None = None) -> None:
        self.circuit = circuit
        self.prefix = prefix
        if not isinstance(data, Mapping):
            raise InputError(f"{name or prefix.rstrip('.')} must be a table of keys, "
                             f"not {_describe(data)}", circuit=circuit,
                             key=prefix.rstrip(".") or None)
        self.data = data
        if data.keys() <= _key_set(allowed):
            return
        for key in data:  # the first unknown key, in the order written
            if key not in allowed:
                problem = (_unknown(str(key), table, allowed) if table is not None
                           else _suggest(str(key), allowed))
                raise InputError(problem, circuit=circuit,
                                 key=f"{prefix}{key}")

    def error(self, key: str, problem: str) -> InputError:
        return InputError(problem, circuit=self.circuit, key=f"{self.prefix}{key}")

    def has(self, key: str) -> bool:
        return key in self.data

    def number(self, key: str, *, unit: str, lo: float, hi: float, lo_open: bool = True,
               default: float | None = None, required: bool = False) -> float | None:
        if key not in self.data:
            if required:
                raise self.error(key, f"missing key {key!r}; give a number [{unit}]")
            return default
        value = self.data[key]

        def allowed() -> str:  # the message is built only for an error
            low = f"more than {_g(lo)}" if lo_open else f"at least {_g(lo)}"
            return f"allowed: {low} and at most {_g(hi)} {unit}".rstrip()

        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.error(key, f"{key} must be a number [{unit}], not {_describe(value)}; "
                                  f"{allowed()}")
        value = float(value)
        if not math.isfinite(value):
            raise self.error(key, f"{key} = {_g(value)} is not a finite number; {allowed()}")
        if value < lo or (lo_open and value == lo) or value > hi:
            raise self.error(key, f"{key} = {_g(value)} is out of range; {allowed()}")
        return value

    def integer(self, key: str, *, choices: Sequence[int] | None = None, lo: int = 1,
                hi: int = 1, default: int | None = None) -> int | None:
        if key not in self.data:
            return default
        value = self.data[key]

        def allowed() -> str:  # the message is built only for an error
            return (" or ".join(str(c) for c in choices) if choices is not None
                    else f"a whole number from {lo} to {hi}")

        if (isinstance(value, bool) or not isinstance(value, int | float)
                or not math.isfinite(value) or value != int(value)):
            raise self.error(key, f"{key} must be a whole number, not {_describe(value)}; "
                                  f"allowed: {allowed()}")
        number = int(value)
        if (choices is not None and number not in choices) or (
                choices is None and not lo <= number <= hi):
            raise self.error(key, f"{key} = {number} is not allowed; allowed: {allowed()}")
        return number

    def text(self, key: str, *, required: bool = False, default: str | None = None,
             what: str = "a text") -> str | None:
        if key not in self.data:
            if required:
                raise self.error(key, f"missing key {key!r}; give {what}")
            return default
        value = self.data[key]
        if not isinstance(value, str) or not value.strip():
            raise self.error(key, f"{key} must be {what}, not {_describe(value)}")
        return value

    def choice(self, key: str, options: Sequence[str], *, default: str | None = None,
               aliases: Mapping[str, str] | None = None, case: bool = False) -> str | None:
        if key not in self.data:
            return default
        value = self.data[key]
        allowed = ", ".join(options)
        if isinstance(value, str):
            probe = value.strip() if case else value.strip().lower()
            table = {(o if case else o.lower()): o for o in options}
            if aliases:
                table.update(aliases)
            if probe in table:
                return table[probe]
            close = difflib.get_close_matches(probe, list(table), n=1, cutoff=0.6)
            hint = f" (did you mean {table[close[0]]!r}?)" if close else ""
            raise self.error(key, f"unknown {key} {value!r}{hint}; allowed: {allowed}")
        raise self.error(key, f"{key} must be one of {allowed}, not {_describe(value)}")

    def boolean(self, key: str) -> bool | None:
        if key not in self.data:
            return None
        value = self.data[key]
        if not isinstance(value, bool):
            raise self.error(key, f"{key} must be true or false, not {_describe(value)}")
        return value


# ---------------------------------------------------------------------------------------------
def _study_table(data: Any, source: str | None) -> dict[str, Any]:
    t = _Table(data, STUDY_KEYS, prefix="study.", name="[study]", table="study")
    title = t.text("title", what="a text (the study's title)")
    if title is None:
        title = Path(source).stem if source else "untitled study"
    return {
        "title": title,
        "basis": t.choice("basis", BASES, default="typical"),
        "margin": t.number("margin", unit="(factor)", lo=1.0, hi=10.0, lo_open=False,
                           default=1.0),
        "interval_s": t.number("interval_s", unit="s", lo=0.0, hi=10.0, lo_open=False,
                               default=0.0),
    }


def _transformer(data: Any) -> Transformer:
    t = _Table(data, TRANSFORMER_KEYS, prefix="supply.transformer.", name="[supply.transformer]",
               table="supply.transformer")
    return Transformer(
        rating_kva=t.number("rating_kva", unit="kVA", lo=0.0, hi=10000.0, required=True),
        impedance_pct=t.number("impedance_pct", unit="%", lo=0.0, hi=25.0, required=True),
        x_r=t.number("x_r", unit="", lo=0.0, hi=MAX_X_R, lo_open=False, default=6.0),
        upstream_pfc_a=t.number("upstream_pfc_a", unit="A (referred to the low-voltage side)",
                                lo=0.0, hi=MAX_CURRENT_A),
        upstream_x_r=t.number("upstream_x_r", unit="", lo=0.0, hi=MAX_X_R, lo_open=False,
                              default=10.0),
    )


def _supply(data: Any) -> Supply:
    t = _Table(data, SUPPLY_KEYS, prefix="supply.", name="[supply]", table="supply")
    phases = t.integer("phases", choices=(1, 3), default=3)
    earthing = t.choice("earthing", EARTHING_SYSTEMS, default="TN-C-S")
    pfc_a = t.number("pfc_a", unit="A", lo=0.0, hi=MAX_CURRENT_A)
    pfc_ln_a = t.number("pfc_ln_a", unit="A", lo=0.0, hi=MAX_CURRENT_A)
    ze_ohm = t.number("ze_ohm", unit="ohm", lo=0.0, hi=MAX_ZE_OHM)
    transformer = _transformer(t.data["transformer"]) if t.has("transformer") else None
    c_max = t.number("c_max", unit="", lo=1.0, hi=1.1, lo_open=False, default=1.05)
    c_min = t.number("c_min", unit="", lo=0.8, hi=1.0, lo_open=False, default=0.95)
    if pfc_a is None and ze_ohm is None and transformer is None:
        raise InputError("the supply needs its source: give pfc_a [A], ze_ohm [ohm] or a "
                         "[supply.transformer] table", key="supply")
    if pfc_a is not None and transformer is not None:
        raise InputError("give either pfc_a or a [supply.transformer] table, not both (the "
                         "transformer fixes the fault level)", key="supply.pfc_a")
    if pfc_ln_a is not None and (pfc_a is None or phases != 3):
        raise InputError("pfc_ln_a is the line-neutral value at the origin of a three-phase "
                         "supply and goes with pfc_a (for a single-phase supply pfc_a is "
                         "already the line-neutral value)", key="supply.pfc_ln_a")
    if transformer is not None and phases != 3:
        raise InputError("a [supply.transformer] is three-phase; set phases = 3 or give pfc_a "
                         "for a single-phase supply", key="supply.phases")
    if earthing == "TT" and ze_ohm is None:
        raise InputError("a TT supply needs ze_ohm [ohm], the earth-fault loop impedance "
                         "including the installation's earth electrode", key="supply.ze_ohm")
    if earthing == "TT" and pfc_a is None and transformer is None:
        raise InputError("in TT, ze_ohm includes the earth electrode and says nothing about "
                         "short-circuit levels; give pfc_a [A] or a [supply.transformer] too",
                         key="supply")
    u0_v = t.number("u0_v", unit="V", lo=50.0, hi=1000.0, default=230.0)
    _check_source(u0_v, pfc_a, pfc_ln_a, ze_ohm, earthing)
    return Supply(
        u0_v=u0_v,
        phases=phases,
        earthing=earthing,
        pfc_a=pfc_a,
        ze_ohm=ze_ohm,
        x_r=t.number("x_r", unit="", lo=0.0, hi=MAX_X_R, lo_open=False, default=1.0),
        transformer=transformer,
        c_max=c_max,
        c_min=c_min,
        pfc_ln_a=pfc_ln_a,
    )


def _check_floor(pfc_a: float | None, pfc_ln_a: float | None) -> None:
    """Refuse a declared fault level below :data:`MIN_FAULT_A`."""
    for key, value in (("pfc_a", pfc_a), ("pfc_ln_a", pfc_ln_a)):
        if value is not None and value < MIN_FAULT_A:
            slip = (f" (was it written in kA? {key} = {_g(value * 1000)} for {_g(value)} kA)"
                    if MIN_FAULT_A <= value * 1000 <= MAX_CURRENT_A else "")
            raise InputError(f"{key} = {_g(value)} A is below {_g(MIN_FAULT_A)} A, no supply's "
                             f"fault level{slip}; allowed: at least {_g(MIN_FAULT_A)} A",
                             key=f"supply.{key}")


def _check_source(u0_v: float, pfc_a: float | None, pfc_ln_a: float | None,
                  ze_ohm: float | None, earthing: str) -> None:
    """Refuse a supply whose fault level and Ze cannot both be true.

    Rules (stated in the constants above): every declared fault level is at least
    :data:`MIN_FAULT_A`; the earth fault that Ze implies (U0 / Ze) is at most
    :data:`MAX_CURRENT_A` and, in TN, at least :data:`MIN_FAULT_A`;
    U0 / Ze is at most :data:`ZE_PFC_TOLERANCE` times the declared line-neutral fault level
    (``pfc_ln_a``, else ``pfc_a``); in TN the declared ``pfc_a`` is at most
    :data:`PFC_ZE_TOLERANCE` times U0 / Ze (in TT, Ze includes the earth electrode and may be
    any size). A transformer's fault level is not compared here.

    Raises
    ------
    InputError
        Naming both keys and the unit slip that would explain the values.

    References
    ----------
    IEC 60364-4-41, 411.4.4 (TN: Zs x Ia <= U0, the loop through the supply's line and
    protective conductors); common practice (a supply's declared Ze and fault level are limits).
    """
    if ze_ohm is None:
        _check_floor(pfc_a, pfc_ln_a)
        return
    implied = u0_v / ze_ohm
    if implied > MAX_CURRENT_A:
        raise InputError(f"ze_ohm = {_g(ze_ohm)} ohm implies an earth fault of "
                         f"{_g(implied / 1000)} kA at u0_v = {_g(u0_v)} V, above "
                         f"{_g(MAX_CURRENT_A / 1000)} kA, no supply's; allowed: "
                         f"at least {_g(u0_v / MAX_CURRENT_A)} ohm", key="supply.ze_ohm")
    tn = earthing != "TT"
    if tn and implied < MIN_FAULT_A:
        raise InputError(f"ze_ohm = {_g(ze_ohm)} ohm implies an earth fault of "
                         f"{_g(implied)} A at u0_v = {_g(u0_v)} V, below {_g(MIN_FAULT_A)} A, "
                         "which no TN supply has; was it written in milliohm? allowed: at most "
                         f"{_g(u0_v / MIN_FAULT_A)} ohm in TN", key="supply.ze_ohm")
    line_key, line_a = ("pfc_ln_a", pfc_ln_a) if pfc_ln_a is not None else ("pfc_a", pfc_a)
    if line_a is not None and implied > ZE_PFC_TOLERANCE * line_a:
        in_ka = implied <= ZE_PFC_TOLERANCE * line_a * 1000 and line_a * 1000 <= MAX_CURRENT_A
        slip = (f"was {line_key} written in kA ({_g(line_a * 1000)} for {_g(line_a)} kA) or "
                "ze_ohm in the wrong unit?" if in_ka else "is one of them in the wrong unit?")
        raise InputError(f"supply.{line_key} = {_g(line_a)} A is below the earth fault that "
                         f"supply.ze_ohm = {_g(ze_ohm)} ohm implies ({_g(implied)} A at "
                         f"{_g(u0_v)} V), which it cannot be; {slip} allowed: U0 / ze_ohm at "
                         f"most {_g(ZE_PFC_TOLERANCE)} x {line_key}", key=f"supply.{line_key}")
    _check_floor(pfc_a, pfc_ln_a)
    if tn and pfc_a is not None and pfc_a > PFC_ZE_TOLERANCE * implied:
        raise InputError(f"supply.pfc_a = {_g(pfc_a)} A is over {_g(PFC_ZE_TOLERANCE)} times "
                         f"the earth fault that supply.ze_ohm = {_g(ze_ohm)} ohm implies "
                         f"({_g(implied)} A at {_g(u0_v)} V), which no TN supply has; was "
                         "ze_ohm written in milliohm, or pfc_a in the wrong unit? allowed: "
                         f"pfc_a at most {_g(PFC_ZE_TOLERANCE)} x U0 / ze_ohm in TN",
                         key="supply.pfc_a")


def _size(t: _Table, key: str, material: str, *, zero_ok: bool = False) -> float | None:
    value = t.number(key, unit="mm2", lo=0.0, hi=5000.0, lo_open=not zero_ok)
    if value is None or value == 0:
        return value
    try:
        cables.r20_ohm_per_m(value, material, key=key)
    except InputError as error:
        raise error.within(circuit=t.circuit, key="cable") from None
    return value


#: Cables already validated, by their table's items: a building repeats a few cable types
#: thousands of times, and a valid table always gives the same (frozen) Cable.
_CABLES: dict[tuple, Cable] = {}
_CABLES_MAX = 4096


def _cable(data: Any, circuit: str) -> Cable:
    try:
        # with each value's type: 1, 1.0 and true are equal keys but not equally valid
        key = (tuple(sorted((k, type(v), v) for k, v in data.items()))
               if isinstance(data, dict) else None)
        cached = _CABLES.get(key) if key is not None else None
    except TypeError:  # an unhashable or unorderable value: validate it the long way
        key = cached = None
    if cached is not None:
        return cached
    cable = _validated_cable(data, circuit)
    if key is not None and len(_CABLES) < _CABLES_MAX:
        _CABLES[key] = cable
    return cable


def _validated_cable(data: Any, circuit: str) -> Cable:
    t = _Table(data, CABLE_KEYS, circuit=circuit, prefix="cable.", name="[circuit.cable]",
               table="circuit.cable")
    material = t.choice("material", cables.MATERIALS, default="copper",
                        aliases=cables.MATERIAL_ALIASES)
    cpc_material = t.choice("cpc_material", cables.MATERIALS, aliases=cables.MATERIAL_ALIASES)
    insulation = t.choice("insulation", INSULATIONS, default="pvc")
    if not t.has("csa_mm2"):
        raise t.error("csa_mm2", "missing key 'csa_mm2'; give the line conductor's "
                                 "cross-section [mm2]")
    return Cable(
        length_m=t.number("length_m", unit="m", lo=0.0, hi=MAX_LENGTH_M, required=True),
        csa_mm2=_size(t, "csa_mm2", material),
        cpc_mm2=_size(t, "cpc_mm2", cpc_material or material),
        material=material,
        insulation=insulation,
        iz_a=t.number("iz_a", unit="A", lo=0.0, hi=MAX_CURRENT_A),
        parallel=t.integer("parallel", lo=1, hi=MAX_PARALLEL, default=1),
        neutral_mm2=_size(t, "neutral_mm2", material, zero_ok=True),
        x_ohm_per_m=t.number("x_ohm_per_m", unit="ohm/m", lo=0.0, hi=0.01, lo_open=False),
        cpc_material=cpc_material,
        cpc_parallel=t.integer("cpc_parallel", lo=1, hi=MAX_PARALLEL),
    )


def _circuit_id(raw: Any, number: int) -> str:
    where = f"the [[circuit]] table number {number}"
    if not isinstance(raw, Mapping):
        raise InputError(f"{where} is {_describe(raw)}, not a table; write each circuit as a "
                         "[[circuit]] table", key="circuit")
    cable = raw.get("cable")
    if "id" not in raw and isinstance(cable, Mapping) and "id" in cable:
        raise InputError(f"{where}: its id is written below its [circuit.cable] line, where it "
                         "is read as a cable key; move it above that line, since in TOML every "
                         "key below a table header belongs to that table", key="cable.id")
    if "id" not in raw:
        raise InputError(f"{where} has no id; every circuit needs a unique id (a text)",
                         key="id")
    cid = raw["id"]
    if not isinstance(cid, str) or not cid.strip() or cid != cid.strip():
        raise InputError(f"{where}: id must be a non-empty text without leading or trailing "
                         f"spaces, not {_describe(cid)}", key="id")
    if len(cid) > MAX_ID_CHARS:
        raise InputError(f"{where}: id is {len(cid)} characters long; allowed: at most "
                         f"{MAX_ID_CHARS}", key="id")
    if cid.lower() == SUPPLY_ID:
        raise InputError(f"{where}: the id {cid!r} is reserved for the origin; choose another",
                         circuit=cid, key="id")
    return cid


def _circuit_fields(raw: Mapping[str, Any], cid: str) -> dict[str, Any]:
    t = _Table(raw, CIRCUIT_KEYS, circuit=cid, table="circuit")
    if isinstance(raw.get("cable"), Mapping):  # a circuit key below [circuit.cable], such as
        # 'from' or 'device', is named there before it is reported missing here
        _Table(raw["cable"], CABLE_KEYS, circuit=cid, prefix="cable.", table="circuit.cable")
    parent = t.text("from", required=True,
                    what="the id of the circuit that feeds this one's board, or 'supply'")
    if not t.has("device"):
        raise t.error("device", "missing key 'device'; give a shorthand such as 'B32' or "
                                "'gG100', or an inline table")
    device = raw["device"]
    if isinstance(device, str):
        if not device.strip():
            raise t.error("device", "device is empty; give a shorthand such as 'B32' or "
                                    "'gG100', or an inline table")
        device = device.strip()
    elif isinstance(device, Mapping):
        if not device:
            raise t.error("device", "device is an empty table; give its family and settings")
        device = dict(device)
    else:
        raise t.error("device", f"device must be a shorthand text such as 'B32' or an inline "
                                f"table, not {_describe(device)}")
    limits: dict[str, float] = {}
    if t.has("tested_limits_a"):
        given = raw["tested_limits_a"]
        if not isinstance(given, Mapping):
            raise t.error("tested_limits_a", "tested_limits_a must be a table of upstream "
                          f"circuit id = current [A], not {_describe(given)}")
        lt = _Table(given, tuple(str(k) for k in given), circuit=cid, prefix="tested_limits_a.")
        for up in given:
            limits[str(up)] = lt.number(str(up), unit="A", lo=0.0, hi=MAX_CURRENT_A)
    return {
        "id": cid,
        "parent": parent,
        "device": device,
        "phases": t.integer("phases", choices=(1, 3)),
        "load_a": t.number("load_a", unit="A", lo=0.0, hi=MAX_CURRENT_A),
        "cable": _cable(raw["cable"], cid) if t.has("cable") else None,
        "basis": t.choice("basis", BASES),
        "final": t.boolean("final"),
        "selective_to_a": t.number("selective_to_a", unit="A", lo=0.0, hi=MAX_CURRENT_A),
        "tested_limits_a": limits,
        "breaking_capacity_a": t.number("breaking_capacity_a", unit="A", lo=0.0,
                                        hi=MAX_CURRENT_A),
        "margin": t.number("margin", unit="(factor)", lo=1.0, hi=10.0, lo_open=False),
        "interval_s": t.number("interval_s", unit="s", lo=0.0, hi=10.0, lo_open=False),
        "board": t.text("board", what="a text (the name of the board this circuit feeds)"),
    }


def _order(fields: dict[str, dict[str, Any]]) -> list[str]:
    """Circuit ids parents first (iterative depth-first from the supply; file order kept)."""
    kids: dict[str, list[str]] = {}
    for cid, f in fields.items():
        parent = f["parent"]
        if parent != SUPPLY_ID and parent not in fields:
            near = difflib.get_close_matches(parent, [SUPPLY_ID, *fields], n=1, cutoff=0.6)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            raise InputError(f"from {parent!r} names no circuit{hint}; allowed: 'supply' or the "
                             "id of another circuit in the study", circuit=cid, key="from")
        if parent == cid:
            raise InputError("a circuit cannot feed itself; allowed: 'supply' or the id of "
                             "another circuit", circuit=cid, key="from")
        kids.setdefault(parent, []).append(cid)
    order: list[str] = []
    stack = list(reversed(kids.get(SUPPLY_ID, [])))
    while stack:
        cid = stack.pop()
        order.append(cid)
        stack.extend(reversed(kids.get(cid, [])))
    if len(order) < len(fields):
        reached = set(order)
        start = next(cid for cid in fields if cid not in reached)
        seen: dict[str, int] = {}
        walk: list[str] = []
        node = start
        while node not in seen:
            seen[node] = len(walk)
            walk.append(node)
            node = fields[node]["parent"]
        loop = [*walk[seen[node]:], node]
        raise InputError("the circuits feed each other in a loop (" + " <- ".join(
            repr(c) for c in loop) + "); every chain of 'from' must end at 'supply'",
            circuit=node, key="from")
    return order


def _check_boards(fields: Mapping[str, dict[str, Any]], order: Sequence[str]) -> None:
    """Refuse a final circuit that feeds others, and one board name for two boards.

    A board is named by its feeder's ``board`` key, else by the feeder's id (as printouts name
    it); two feeders whose boards get one name would merge two boards under one heading.
    """
    named: dict[str, str] = {"origin": SUPPLY_ID}  # the supply's board (Study.board_name)
    feeders: set[str] = set()
    for cid in order:
        parent = fields[cid]["parent"]
        if parent != SUPPLY_ID and fields[parent]["final"] is True:
            raise InputError(f"circuit {parent!r} is marked final = true but feeds {cid!r}; "
                             "a final circuit feeds no board; allowed: final = false (or "
                             "leave it out) on a circuit that feeds others",
                             circuit=parent, key="final")
        if parent == SUPPLY_ID or parent in feeders:
            continue
        feeders.add(parent)
        name = fields[parent]["board"] or parent
        other = named.get(name)
        if other is not None:
            first = "the origin" if other == SUPPLY_ID else f"the board fed by {other!r}"
            raise InputError(f"{first} and the board fed by {parent!r} are both named "
                             f"{name!r}; every board needs its own name (key 'board', else the "
                             "feeder's id)", circuit=parent, key="board")
        named[name] = parent


def from_dict(data: Any, source: str | None = None) -> Study:
    """Validate a parsed study document and build the :class:`~coordination.model.Study`.

    Parameters
    ----------
    data : dict
        The document as a TOML parser returns it (keys of the study-file contract).
    source : str, optional
        Where it came from (a path), kept in ``Study.source``.

    Returns
    -------
    Study
        Circuits ordered parents first; each device's band has been built once.

    Raises
    ------
    InputError
        Naming the circuit and the key, and what is allowed.

    References
    ----------
    Our study-file format, version 1 (README.md, "The study file"), with the extensions listed
    in the module docstring.

    Examples
    --------
    >>> s = from_dict({"supply": {"pfc_a": 16000, "ze_ohm": 0.35},
    ...                "circuit": [{"id": "a", "from": "supply", "device": "gG100"}]})
    >>> print(s.supply.pfc_a)
    16000.0
    """
    top = _Table(data, TOP_KEYS, name="the study", table="")
    study_fields = _study_table(data.get("study", {}), source)
    if not top.has("supply"):
        raise InputError("missing [supply] table; give u0_v, phases, earthing and one of pfc_a, "
                         "ze_ohm or [supply.transformer]", key="supply")
    supply = _supply(data["supply"])
    raw_circuits = data.get("circuit")
    if raw_circuits is None or (isinstance(raw_circuits, list) and not raw_circuits):
        raise InputError("the study has no circuits; add at least one [[circuit]] table with "
                         "id, from and device", key="circuit")
    if not isinstance(raw_circuits, list):
        raise InputError("circuit must be an array of tables: write [[circuit]] (double "
                         "brackets) before each circuit", key="circuit")
    fields: dict[str, dict[str, Any]] = {}
    first_seen: dict[str, int] = {}
    for number, raw in enumerate(raw_circuits, start=1):
        cid = _circuit_id(raw, number)
        if cid in fields:
            raise InputError(f"duplicate id: the [[circuit]] tables number {first_seen[cid]} "
                             f"and {number} are both {cid!r}; every circuit needs its own id",
                             circuit=cid, key="id")
        first_seen[cid] = number
        fields[cid] = _circuit_fields(raw, cid)

    order = _order(fields)
    phases = {SUPPLY_ID: supply.phases}
    neutral = {SUPPLY_ID: None}  # None: the board has a neutral; else the circuit that lacks it
    _check_boards(fields, order)
    for cid in order:
        f = fields[cid]
        parent = f["parent"]
        above = "the supply" if parent == SUPPLY_ID else f"circuit {parent!r}"
        own = f["phases"] if f["phases"] is not None else phases[parent]
        if own == 3 and phases[parent] == 1:
            raise InputError(f"a three-phase circuit cannot be fed from a single-phase board "
                             f"({above} is single-phase); allowed: phases = 1",
                             circuit=cid, key="phases")
        phases[cid] = f["phases"] = own
        cable: Cable | None = f["cable"]
        if own == 1 and neutral[parent] is not None:
            raise InputError(f"a single-phase circuit needs a neutral, but its board has none "
                             f"(circuit {neutral[parent]!r} has neutral_mm2 = 0); allowed: "
                             "phases = 3", circuit=cid, key="phases")
        lacks = cable is not None and cable.neutral_mm2 == 0
        if lacks and own == 1:
            raise InputError("a single-phase circuit needs its neutral; neutral_mm2 = 0 (no "
                             "neutral) is allowed for three-phase circuits only",
                             circuit=cid, key="cable.neutral_mm2")
        neutral[cid] = cid if lacks else neutral[parent]
        for up in f["tested_limits_a"]:
            chain: list[str] = []
            node = parent
            while node != SUPPLY_ID and node != up:
                chain.append(node)
                node = fields[node]["parent"]
            if node != up or up == SUPPLY_ID:  # the supply has no device to be selective
                near = difflib.get_close_matches(up, chain, n=1, cutoff=0.6)
                hint = f" (did you mean {near[0]!r}?)" if near else ""
                shown = ", ".join(repr(c) for c in chain[:8]) + (", ..." if len(chain) > 8
                                                                 else "")
                raise InputError(f"{up!r} is not a circuit above {cid!r}{hint}; a tested limit "
                                 "names an upstream circuit; allowed: "
                                 f"{shown or 'none (the circuit is fed from the supply)'}",
                                 circuit=cid, key=f"tested_limits_a.{up}")

    study = Study(
        title=study_fields["title"],
        supply=supply,
        circuits=tuple(Circuit(**fields[cid]) for cid in order),
        basis=study_fields["basis"],
        margin=study_fields["margin"],
        interval_s=study_fields["interval_s"],
        source=source,
    )
    _check_devices(study)
    return study


def _check_devices(study: Study) -> None:
    """Build every device's band once, so that a bad device fails at load with its circuit."""
    try:
        from coordination.devices import band_for

        for c in study.circuits:
            try:
                band_for(study, c.id)
            except InputError:
                raise
            except (TypeError, ValueError, KeyError) as error:
                raise InputError(f"device {c.device!r} could not be built: {error}",
                                 circuit=c.id, key="device") from None
    except ModuleNotFoundError as error:  # the curves families are not installed yet
        if not (error.name or "").startswith("curves"):
            raise


def loads(text: str, source: str | None = None) -> Study:
    """Parse study-file text (TOML) and validate it.

    Parameters
    ----------
    text : str
        The TOML text.
    source : str, optional
        A name for messages (the file's path).

    Raises
    ------
    InputError
        Empty text, text that is not TOML (with its line), or any validation problem.

    References
    ----------
    TOML 1.0 (parsed by rtoml, a compiled parser: DEVELOPERS.md, "Set-up and checks");
    our study-file format, version 1 (README.md, "The study file").

    Examples
    --------
    >>> s = loads('[supply]\\nze_ohm = 0.35\\n[[circuit]]\\nid = "a"\\nfrom = "supply"\\n'
    ...           'device = "B32"\\nphases = 1\\n')
    >>> print(s.circuits[0].phases)
    1
    """
    name = source or "the study"
    if not text.strip():
        raise InputError(f"{name} is empty; a study needs a [supply] table and [[circuit]] "
                         "tables")
    try:
        data = rtoml.loads(text)
    except rtoml.TomlParsingError as error:
        raise InputError(f"{name} is not valid TOML: {error}") from None
    return from_dict(data, source=source)


#: The largest study file read [bytes]. A 20,000-circuit study of the benchmark's kind is about
#: 4 MB; anything beyond this limit is refused before it is read, so a wrong path (a device, a
#: huge file) cannot exhaust memory.
MAX_STUDY_BYTES = 64 * 1024 * 1024


def _read_study_bytes(p: Path) -> bytes:
    """The bytes of a regular file of at most :data:`MAX_STUDY_BYTES`, else an InputError.

    A device (``/dev/zero``), a FIFO or a socket is refused without reading it: it may never
    end. The size is checked on the open file, and at most one byte past the limit is read, so
    a file that grows while read is refused too.
    """
    # without blocking: opening a FIFO for reading would wait for a writer
    with os.fdopen(os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0)), "rb") as handle:
        info = os.fstat(handle.fileno())
        if not stat.S_ISREG(info.st_mode):
            raise InputError(f"{str(p)!r} is not a regular file (a device, pipe or socket); "
                             "give a study file")
        if info.st_size > MAX_STUDY_BYTES:
            raise InputError(f"study file {str(p)!r} is {info.st_size / 1e6:.0f} MB; the limit "
                             f"is {MAX_STUDY_BYTES // (1024 * 1024)} MiB")
        raw = handle.read(MAX_STUDY_BYTES + 1)
    if len(raw) > MAX_STUDY_BYTES:
        raise InputError(f"study file {str(p)!r} is larger than the limit of "
                         f"{MAX_STUDY_BYTES // (1024 * 1024)} MiB")
    return raw


def load(path: str | Path) -> Study:
    """Read and validate a study file.

    Raises
    ------
    InputError
        Naming the file when it is missing, unreadable, empty, not UTF-8 or not TOML; else
        naming the circuit and the key.

    References
    ----------
    Our study-file format, version 1 (README.md, "The study file").

    Examples
    --------
    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "s.toml"
    >>> _ = p.write_text('[supply]\\npfc_a = 16000\\nze_ohm = 0.35\\n[[circuit]]\\nid = "a"\\n'
    ...                  'from = "supply"\\ndevice = "gG63"\\n')
    >>> print(len(load(p).circuits))
    1
    """
    p = Path(path)
    try:
        raw = _read_study_bytes(p)
    except FileNotFoundError:
        raise InputError(f"study file {str(p)!r} does not exist") from None
    except IsADirectoryError:
        raise InputError(f"{str(p)!r} is a folder, not a study file") from None
    except OSError as error:
        raise InputError(f"cannot read the study file {str(p)!r}: "
                         f"{error.strerror or error}") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        raise InputError(f"study file {str(p)!r} is not UTF-8 text (bad byte at position "
                         f"{error.start}); save it as UTF-8") from None
    if not text.strip():
        raise InputError(f"study file {str(p)!r} is empty; a study needs a [supply] table and "
                         "[[circuit]] tables")
    return loads(text, source=str(p))
