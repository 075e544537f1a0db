"""The rules of the study file: its keys, bounds and the checks across keys and circuits.

:mod:`coordination.study` reads a study file table by table through :class:`Table` (unknown keys
first, then each value typed and bounded); this module holds what it checks against and the
checks that look beyond one value: a supply's fault level against its Ze
(:func:`check_source`), the tree of circuits (:func:`parents_first`, :func:`check_boards`,
:func:`check_feeds`) and the devices (:func:`check_devices`). Every problem raises
:class:`curves.errors.InputError` naming the circuit and the key and saying what is allowed.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Mapping, Sequence
from functools import lru_cache
from typing import Any

from coordination import cables
from coordination.model import SUPPLY_ID, Cable, Study
from curves.errors import InputError

TOP_KEYS = ("study", "supply", "circuit")
#: The title block's fields, in the order the cover, the footers and the diagram show them.
TITLE_BLOCK_KEYS = ("client", "project", "reference", "revision", "designer", "checker", "date")
#: The longest a title-block field may be [characters]: it must fit its box.
TITLE_BLOCK_CHARS = 80
STUDY_KEYS = ("title", "basis", "margin", "interval_s", "rules", *TITLE_BLOCK_KEYS)
SUPPLY_KEYS = ("u0_v", "phases", "earthing", "pfc_a", "pfc_ln_a", "ze_ohm", "x_r", "c_max",
               "c_min", "transformer", "ra_ohm", "standby")
TRANSFORMER_KEYS = ("rating_kva", "impedance_pct", "x_r", "upstream_pfc_a", "upstream_x_r",
                    "u_lv_v")
STANDBY_KEYS = ("name", "rating_kva", "u0_v", "xd2_pct", "xd1_pct", "td2_s", "td1_s", "x0_pct",
                "sustained_x", "feeds")
CIRCUIT_KEYS = ("id", "from", "device", "load_a", "phases", "basis", "final", "board",
                "selective_to_a", "tested_limits_a", "breaking_capacity_a", "margin",
                "interval_s", "cable", "rcd", "sockets", "leakage_ma", "ring", "backup_a",
                "conditional_a", "motor", "inrush")
CABLE_KEYS = ("length_m", "csa_mm2", "cpc_mm2", "material", "insulation", "iz_a", "parallel",
              "cpc_parallel", "neutral_mm2", "x_ohm_per_m", "cpc_material", "cpc_separate",
              "cpc_armour", "armour_mm2", "armour_ohm_per_m")

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
#: A transformer's rated low-voltage U_rT may lie this far from the system's nominal sqrt(3) U0
#: (our choice: 400, 410, 415, 420 and 433 V transformers on 230/400 V systems pass; a value
#: outside is a slip, such as the high-voltage side's rating or U0 itself).
U_LV_RANGE = (0.9, 1.2)


# ---------------------------------------------------------------------------------------------
# keys and values
def describe(value: Any) -> str:
    """A value as a message shows it: ``true``, ``'B32'``, ``a table``, ``a list``, ``2.5``.

    Examples
    --------
    >>> print(describe(True), describe("B32"), describe({}), describe(2.5))
    true 'B32' a table 2.5
    """
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
    "supply.standby": STANDBY_KEYS,
    "circuit": CIRCUIT_KEYS,
    "circuit.cable": CABLE_KEYS,
}
#: What a table's keys are called in messages.
_KIND = {"": "top-level", "study": "study", "supply": "supply",
         "supply.transformer": "transformer", "supply.standby": "standby source",
         "circuit": "circuit", "circuit.cable": "cable", "device": "device"}
#: Where to look for a key that is unknown in a table, nearest table first.
_ELSEWHERE = {
    "": ("study", "supply", "supply.transformer", "supply.standby", "circuit", "circuit.cable",
         "device"),
    "study": ("supply", "supply.transformer", "supply.standby", "circuit", "circuit.cable",
              "device"),
    "supply": ("supply.transformer", "supply.standby", "study", "circuit", "circuit.cable",
               "device"),
    "supply.transformer": ("supply", "supply.standby", "study", "circuit", "circuit.cable",
                           "device"),
    "supply.standby": ("supply", "supply.transformer", "study", "circuit", "circuit.cable",
                       "device"),
    "circuit": ("circuit.cable", "device", "study", "supply", "supply.transformer",
                "supply.standby"),
    "circuit.cable": ("circuit", "device", "study", "supply", "supply.transformer",
                      "supply.standby"),
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


def check_keys(data: Mapping[str, Any], allowed: Sequence[str], *, circuit: str | None = None,
               prefix: str = "", table: str | None = None) -> None:
    """Refuse the first key of a table, in the order written, that ``allowed`` does not hold.

    ``table`` is the table's dotted name in :data:`TABLES`: a key that belongs in another table
    is told which (:func:`_unknown`); without it, the nearest allowed key is suggested.

    Examples
    --------
    >>> check_keys({"length_m": 10}, ("length_m", "csa_mm2"), table="circuit.cable")
    """
    if data.keys() <= _key_set(allowed):
        return
    for key in data:
        if key not in allowed:
            problem = (_unknown(str(key), table, allowed) if table is not None
                       else _suggest(str(key), allowed))
            raise InputError(problem, circuit=circuit, key=f"{prefix}{key}")


def _range(lo: float, hi: float, lo_open: bool, unit: str) -> str:
    """The allowed range of a number, as :meth:`Table.number`'s messages say it."""
    low = f"more than {_g(lo)}" if lo_open else f"at least {_g(lo)}"
    return f"allowed: {low} and at most {_g(hi)} {unit}".rstrip()


def _whole_numbers(choices: Sequence[int] | None, lo: int, hi: int) -> str:
    """The whole numbers allowed, as :meth:`Table.integer`'s messages say them."""
    return (" or ".join(str(c) for c in choices) if choices is not None
            else f"a whole number from {lo} to {hi}")


class Table:
    """One TOML table being read: unknown keys are refused first, then each value is typed.

    Examples
    --------
    >>> t = Table({"load_a": 20}, ("load_a", "phases"), circuit="c1", table="circuit")
    >>> print(t.number("load_a", unit="A", lo=0.0, hi=100.0), t.integer("phases", default=1))
    20.0 1
    """

    __slots__ = ("circuit", "data", "prefix")

    def __init__(self, data: Any, allowed: Sequence[str], *, circuit: str | None = None,
                 prefix: str = "", name: str = "", table: str | None = None) -> None:
        self.circuit = circuit
        self.prefix = prefix
        if not isinstance(data, Mapping):
            raise InputError(f"{name or prefix.rstrip('.')} must be a table of keys, "
                             f"not {describe(data)}", circuit=circuit,
                             key=prefix.rstrip(".") or None)
        self.data = data
        check_keys(data, allowed, circuit=circuit, prefix=prefix, table=table)

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
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.error(key, f"{key} must be a number [{unit}], not {describe(value)}; "
                                  f"{_range(lo, hi, lo_open, unit)}")
        value = float(value)
        if not math.isfinite(value):
            raise self.error(key, f"{key} = {_g(value)} is not a finite number; "
                                  f"{_range(lo, hi, lo_open, unit)}")
        if value < lo or (lo_open and value == lo) or value > hi:
            raise self.error(key, f"{key} = {_g(value)} is out of range; "
                                  f"{_range(lo, hi, lo_open, unit)}")
        return value

    def integer(self, key: str, *, choices: Sequence[int] | None = None, lo: int = 1,
                hi: int = 1, default: int | None = None) -> int | None:
        if key not in self.data:
            return default
        value = self.data[key]
        if (isinstance(value, bool) or not isinstance(value, int | float)
                or not math.isfinite(value) or value != int(value)):
            raise self.error(key, f"{key} must be a whole number, not {describe(value)}; "
                                  f"allowed: {_whole_numbers(choices, lo, hi)}")
        number = int(value)
        if (choices is not None and number not in choices) or (
                choices is None and not lo <= number <= hi):
            raise self.error(key, f"{key} = {number} is not allowed; "
                                  f"allowed: {_whole_numbers(choices, lo, hi)}")
        return number

    def text(self, key: str, *, required: bool = False, default: str | None = None,
             what: str = "a text") -> str | None:
        if key not in self.data:
            if required:
                raise self.error(key, f"missing key {key!r}; give {what}")
            return default
        value = self.data[key]
        if not isinstance(value, str) or not value.strip():
            raise self.error(key, f"{key} must be {what}, not {describe(value)}")
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
        raise self.error(key, f"{key} must be one of {allowed}, not {describe(value)}")

    def boolean(self, key: str) -> bool | None:
        if key not in self.data:
            return None
        value = self.data[key]
        if not isinstance(value, bool):
            raise self.error(key, f"{key} must be true or false, not {describe(value)}")
        return value


# ---------------------------------------------------------------------------------------------
# the supply
def _check_floor(pfc_a: float | None, pfc_ln_a: float | None) -> None:
    """Refuse a declared fault level below :data:`MIN_FAULT_A`."""
    for key, value in (("pfc_a", pfc_a), ("pfc_ln_a", pfc_ln_a)):
        if value is not None and value < MIN_FAULT_A:
            slip = (f" (was it written in kA? {key} = {_g(value * 1000)} for {_g(value)} kA)"
                    if MIN_FAULT_A <= value * 1000 <= MAX_CURRENT_A else "")
            raise InputError(f"{key} = {_g(value)} A is below {_g(MIN_FAULT_A)} A, no supply's "
                             f"fault level{slip}; allowed: at least {_g(MIN_FAULT_A)} A",
                             key=f"supply.{key}")


def check_source(u0_v: float, pfc_a: float | None, pfc_ln_a: float | None,
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


def check_rated_voltage(u_lv_v: float | None, u0_v: float) -> None:
    """Refuse a transformer's rated low-voltage U_rT far from the system's sqrt(3) U0.

    Raises
    ------
    InputError
        When ``u_lv_v`` lies outside :data:`U_LV_RANGE` times sqrt(3) U0.

    References
    ----------
    IEC 60909-0:2016, 6.3 (U_rT, the rated voltage on the side the fault is on); the range is
    our choice.

    Examples
    --------
    >>> check_rated_voltage(420.0, 230.0)
    """
    if u_lv_v is None:
        return
    nominal = math.sqrt(3.0) * u0_v
    lo, hi = (f * nominal for f in U_LV_RANGE)
    if not lo <= u_lv_v <= hi:
        raise InputError(f"u_lv_v = {_g(u_lv_v)} V is not a low-voltage rating for U0 "
                         f"{_g(u0_v)} V (line to line {nominal:.0f} V); allowed: {lo:.0f} to "
                         f"{hi:.0f} V, the transformer's rated voltage on its low-voltage side",
                         key="supply.transformer.u_lv_v")


# ---------------------------------------------------------------------------------------------
# the tree of circuits and their devices
def parents_first(fields: dict[str, dict[str, Any]]) -> list[str]:
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


def check_boards(fields: Mapping[str, dict[str, Any]], order: Sequence[str]) -> None:
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
        if parent != SUPPLY_ID and fields[parent].get("ring"):
            raise InputError(f"circuit {parent!r} is a ring final circuit (ring = true) but "
                             f"feeds {cid!r}; a ring feeds no board; allowed: ring = true only "
                             "on a circuit that feeds no other", circuit=parent, key="ring")
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
    for cid in order:
        if fields[cid].get("conditional_a") is not None and cid not in feeders:
            raise InputError("conditional_a is the rating of the board this circuit feeds, and "
                             f"{cid!r} feeds no circuit; allowed: conditional_a on a circuit "
                             "that feeds a board (or backup_a on the circuit backed up)",
                             circuit=cid, key="conditional_a")


def check_feeds(fields: Mapping[str, dict[str, Any]], order: Sequence[str],
                supply_phases: int) -> None:
    """Give each circuit without ``phases`` its board's, and refuse a feed that cannot be.

    Refused: a three-phase circuit on a single-phase board, a single-phase circuit on a board
    without a neutral (or with ``neutral_mm2 = 0`` itself), and a tested limit naming no circuit
    above. ``fields`` are the circuits' validated keys by id, ``order`` their ids parents first
    (:func:`parents_first`); each circuit's ``phases`` is filled in place.
    """
    phases = {SUPPLY_ID: supply_phases}
    neutral = {SUPPLY_ID: None}  # None: the board has a neutral; else the circuit that lacks it
    for cid in order:
        f = fields[cid]
        parent = f["parent"]
        own = f["phases"] if f["phases"] is not None else phases[parent]
        if own == 3 and phases[parent] == 1:
            above = "the supply" if parent == SUPPLY_ID else f"circuit {parent!r}"
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
            _check_above(fields, cid, parent, up, "tested_limits_a", "a tested limit")
        for up in f["backup_a"]:
            _check_above(fields, cid, parent, up, "backup_a", "a back-up declaration")


def _check_above(fields: Mapping[str, dict[str, Any]], cid: str, parent: str, up: str,
                 key: str, what: str) -> None:
    """Refuse an upstream id (of ``tested_limits_a``, ``backup_a``) that is not above ``cid``."""
    chain: list[str] = []
    node = parent
    while node != SUPPLY_ID and node != up:
        chain.append(node)
        node = fields[node]["parent"]
    if node != up or up == SUPPLY_ID:  # the supply has no device
        near = difflib.get_close_matches(up, chain, n=1, cutoff=0.6)
        hint = f" (did you mean {near[0]!r}?)" if near else ""
        shown = ", ".join(repr(c) for c in chain[:8]) + (", ..." if len(chain) > 8 else "")
        raise InputError(f"{up!r} is not a circuit above {cid!r}{hint}; {what} names an "
                         "upstream circuit; allowed: "
                         f"{shown or 'none (the circuit is fed from the supply)'}",
                         circuit=cid, key=f"{key}.{up}")


def check_standby(study: Study) -> None:
    """Refuse a standby source that feeds nothing: ``feeds`` naming no circuit, or a circuit
    whose board has no circuits, or a source under a single-phase supply."""
    names = {c.id for c in study.circuits}
    for source in study.supply.standby:
        key = f"supply.standby.{source.name}"
        if study.supply.phases != 3:
            raise InputError("a standby generator is three-phase; it needs a three-phase "
                             "supply (phases = 3)", key=key)
        feeds = source.feeds
        if feeds is None or feeds == SUPPLY_ID:
            continue
        if feeds not in names:
            near = difflib.get_close_matches(feeds, sorted(names), n=1, cutoff=0.6)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            raise InputError(f"feeds {feeds!r} is not a circuit{hint}; allowed: the id of the "
                             f"circuit whose board the source supplies, or '{SUPPLY_ID}'",
                             key=f"{key}.feeds")
        if not study.children.get(feeds):
            raise InputError(f"circuit {feeds!r} feeds no board (no circuit has from = "
                             f"{feeds!r}), so the source would supply nothing; allowed: a "
                             f"circuit that feeds a board, or '{SUPPLY_ID}'", key=f"{key}.feeds")


def check_devices(study: Study) -> None:
    """Build every device's band once, so that a bad device fails at load with its circuit;
    every RCD's too (naming the key ``rcd.<key>``)."""
    try:
        from coordination.devices import band_for
        from coordination.residual import rcd_of

        for c in study.circuits:
            if c.rcd is not None:
                rcd_of(study, c.id)
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


#: Keys that describe an overcurrent device, refused on a residual-current switch (RCCB).
OVERCURRENT_ONLY_KEYS = ("breaking_capacity_a", "tested_limits_a", "selective_to_a", "basis",
                         "margin", "interval_s")


def check_rccbs(fields: Mapping[str, dict[str, Any]], order: Sequence[str]) -> None:
    """Refuse a residual-current switch (an ``rcd`` without ``device``) that cannot be.

    It needs an overcurrent device above it (a circuit with a ``device`` on its path to the
    supply), takes none of the keys of an overcurrent device, and no tested limit names it (it
    has no overcurrent characteristic to be selective with).
    """
    for cid in order:
        f = fields[cid]
        if f["device"] is None:
            if f["parent"] == SUPPLY_ID:
                raise InputError("an RCD without an overcurrent device (an RCCB) needs a circuit "
                                 "with a device above it, and this one is fed from the supply; "
                                 "give it a device (an RCBO) or feed it from a circuit that has "
                                 "one", circuit=cid, key="device")
            for key in ("motor", "inrush"):  # its start is judged on the circuit's own device
                if f.get(key) is not None:
                    raise InputError(f"{key} needs the circuit's own overcurrent device, and this "
                                     "circuit has none (an RCCB: rcd without device); allowed: "
                                     "give a device, or put the load on a circuit below it",
                                     circuit=cid, key=key)
            for key in OVERCURRENT_ONLY_KEYS:
                if f[key]:
                    raise InputError(f"{key} describes an overcurrent device, and this circuit "
                                     "has none (an RCCB: rcd without device); allowed: give a "
                                     "device, or leave the key out", circuit=cid, key=key)
        for up in f["tested_limits_a"]:
            if up in fields and fields[up]["device"] is None:
                raise InputError(f"{up!r} is an RCCB (rcd without device), with no overcurrent "
                                 "characteristic for a tested limit; allowed: the circuits "
                                 "above it that have a device", circuit=cid,
                                 key=f"tested_limits_a.{up}")
