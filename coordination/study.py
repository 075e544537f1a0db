"""Load and validate a study file (TOML) into the frozen dataclasses of :mod:`coordination.model`.

Every problem raises :class:`curves.errors.InputError` naming the circuit and the key and saying
what is allowed; a key written in the wrong table is told the table it belongs in, and a misspelt
key gets the nearest valid one suggested. Circuits come back ordered parents first (an iterative
depth-first walk from the supply, siblings in file order), so a 5,000-deep chain loads without
recursion. The keys, their bounds and the checks across keys and circuits are in
:mod:`coordination.study_rules`; this module reads the tables and builds the study.

Keys (units in every name that carries a number)::

    [study]       title, basis, margin, interval_s, rules; the title block: client, project,
                  reference, revision, designer, checker, date
    [supply]      u0_v, phases, earthing, pfc_a, pfc_ln_a, ze_ohm, x_r, c_max, c_min, ra_ohm
    [supply.transformer]  rating_kva, impedance_pct, x_r, upstream_pfc_a, upstream_x_r, u_lv_v
    [[supply.standby]]  name, rating_kva, u0_v, xd2_pct, xd1_pct, td2_s, td1_s, x0_pct,
                  sustained_x, feeds
    [[circuit]]   id, from, device, load_a, phases, basis, final, board, selective_to_a,
                  tested_limits_a, breaking_capacity_a, margin, interval_s, rcd, sockets,
                  leakage_ma, ring, backup_a, conditional_a, motor, inrush
    [circuit.rcd]  idn_ma, selective, waveform, delay_s
    [circuit.cable]  length_m, csa_mm2, cpc_mm2, material, insulation, iz_a, parallel,
                  cpc_parallel, neutral_mm2, x_ohm_per_m, cpc_material, cpc_separate,
                  cpc_armour, armour_mm2, armour_ohm_per_m
    [circuit.motor]  flc_a, start_x, start_s, starting, relay_class, relay_ir_a
    [circuit.inrush] x, s     (both read by coordination.motors)
"""


from __future__ import annotations

import datetime as dt
import os
import stat
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

import rtoml

from coordination import cables, rules
from coordination.model import (
    NO_CURRENTS,
    SUPPLY_ID,
    Cable,
    Circuit,
    Study,
    Supply,
    Transformer,
)
from coordination.residual import RCD_KEYS
from coordination.study_rules import (
    BASES,
    CABLE_KEYS,
    CIRCUIT_KEYS,
    EARTHING_SYSTEMS,
    INSULATIONS,
    MAX_CURRENT_A,
    MAX_ID_CHARS,
    MAX_LENGTH_M,
    MAX_PARALLEL,
    MAX_X_R,
    MAX_ZE_OHM,
    MIN_FAULT_A,
    PFC_ZE_TOLERANCE,
    STANDBY_KEYS,
    STUDY_KEYS,
    SUPPLY_KEYS,
    TABLES,
    TITLE_BLOCK_CHARS,
    TITLE_BLOCK_KEYS,
    TOP_KEYS,
    TRANSFORMER_KEYS,
    ZE_PFC_TOLERANCE,
    Table,
    check_boards,
    check_devices,
    check_feeds,
    check_keys,
    check_rated_voltage,
    check_rccbs,
    check_source,
    check_standby,
    describe,
    parents_first,
)
from curves.errors import InputError

if TYPE_CHECKING:  # imported where a study has them: most have neither
    from coordination.generator import StandbySource
    from coordination.motors import Inrush, Motor

#: The loader's functions, and the study file's keys and bounds (from coordination.study_rules).
__all__ = [
    "BASES",
    "CABLE_KEYS",
    "CIRCUIT_KEYS",
    "EARTHING_SYSTEMS",
    "INSULATIONS",
    "MAX_CURRENT_A",
    "MAX_ID_CHARS",
    "MAX_LENGTH_M",
    "MAX_PARALLEL",
    "MAX_STUDY_BYTES",
    "MAX_X_R",
    "MAX_ZE_OHM",
    "MIN_FAULT_A",
    "PFC_ZE_TOLERANCE",
    "STANDBY_KEYS",
    "STUDY_KEYS",
    "SUPPLY_KEYS",
    "TABLES",
    "TITLE_BLOCK_CHARS",
    "TITLE_BLOCK_KEYS",
    "TOP_KEYS",
    "TRANSFORMER_KEYS",
    "ZE_PFC_TOLERANCE",
    "from_dict",
    "load",
    "loads",
]


# ---------------------------------------------------------------------------------------------
def _study_table(data: Any, source: str | None) -> dict[str, Any]:
    t = Table(data, STUDY_KEYS, prefix="study.", name="[study]", table="study")
    title = t.text("title", what="a text (the study's title)")
    if title is None:
        title = Path(source).stem if source else "untitled study"
    return {
        "title": title,
        "title_block": _title_block(t),
        "basis": t.choice("basis", BASES, default="typical"),
        "margin": t.number("margin", unit="(factor)", lo=1.0, hi=10.0, lo_open=False,
                           default=1.0),
        "interval_s": t.number("interval_s", unit="s", lo=0.0, hi=10.0, lo_open=False,
                               default=0.0),
        "rules": t.choice("rules", tuple(rules.RULE_SETS), default=rules.DEFAULT),
    }


def _title_block(t: Table) -> tuple[tuple[str, str], ...]:
    """The title-block keys given, in :data:`TITLE_BLOCK_KEYS` order: one line of text each
    (``date`` may also be a TOML date), at most :data:`TITLE_BLOCK_CHARS` characters."""
    fields = []
    for key in TITLE_BLOCK_KEYS:
        value = t.data.get(key)
        if key == "date" and isinstance(value, dt.date | dt.datetime):
            fields.append((key, value.isoformat()))
            continue
        text = t.text(key, what="a line of text" + (" or a TOML date" if key == "date" else ""))
        if text is None:
            continue
        if "\n" in text or "\r" in text or len(text) > TITLE_BLOCK_CHARS:
            raise t.error(key, f"{key} must be one line of at most {TITLE_BLOCK_CHARS} "
                               f"characters (it fills a box of the title block), not "
                               f"{len(text)} characters" + (" on several lines"
                                                            if "\n" in text else ""))
        fields.append((key, text.strip()))
    return tuple(fields)


def _transformer(data: Any) -> Transformer:
    t = Table(data, TRANSFORMER_KEYS, prefix="supply.transformer.", name="[supply.transformer]",
               table="supply.transformer")
    return Transformer(
        rating_kva=t.number("rating_kva", unit="kVA", lo=0.0, hi=10000.0, required=True),
        impedance_pct=t.number("impedance_pct", unit="%", lo=0.0, hi=25.0, required=True),
        x_r=t.number("x_r", unit="", lo=0.0, hi=MAX_X_R, lo_open=False, default=6.0),
        upstream_pfc_a=t.number("upstream_pfc_a", unit="A (referred to the low-voltage side)",
                                lo=0.0, hi=MAX_CURRENT_A),
        upstream_x_r=t.number("upstream_x_r", unit="", lo=0.0, hi=MAX_X_R, lo_open=False,
                              default=10.0),
        u_lv_v=t.number("u_lv_v", unit="V", lo=0.0, hi=1e6),  # bounded by U0 in _supply
    )


#: The case name of the normal supply, which no standby source may take.
NORMAL_CASE = "normal"


def _standby_source(data: Any, number: int, u0_v: float) -> StandbySource:
    """One ``[[supply.standby]]`` table."""
    from coordination.generator import StandbySource  # a study without standby needs none
    where = f"supply.standby[{number}]"
    t = Table(data, STANDBY_KEYS, prefix=f"{where}.", name="[[supply.standby]]",
              table="supply.standby")
    name = t.text("name", required=True, what="a text (the source's name, its case)")
    assert name is not None
    if name != name.strip() or len(name) > MAX_ID_CHARS or name.lower() == NORMAL_CASE:
        raise t.error("name", f"name {name!r} is not allowed; allowed: a text of at most "
                              f"{MAX_ID_CHARS} characters without leading or trailing spaces, "
                              f"other than {NORMAL_CASE!r} (the normal supply's case)")
    t = Table(data, STANDBY_KEYS, prefix=f"supply.standby.{name}.", name="[[supply.standby]]",
              table="supply.standby")
    xd2 = t.number("xd2_pct", unit="%", lo=0.0, hi=100.0, required=True)
    xd1 = t.number("xd1_pct", unit="% (at least xd2_pct)", lo=xd2, hi=500.0, lo_open=False,
                   required=True)
    td2 = t.number("td2_s", unit="s", lo=0.001, hi=1.0, lo_open=False, required=True)
    td1 = t.number("td1_s", unit="s (more than td2_s)", lo=td2, hi=10.0, required=True)
    feeds = t.text("feeds", what=f"a circuit id, or '{SUPPLY_ID}' for the origin")
    return StandbySource(
        name=name,
        rating_kva=t.number("rating_kva", unit="kVA", lo=0.0, hi=100000.0, required=True),
        u0_v=t.number("u0_v", unit="V", lo=50.0, hi=1000.0, default=u0_v),
        xd2_pct=xd2, xd1_pct=xd1, td2_s=td2, td1_s=td1,
        x0_pct=t.number("x0_pct", unit="%", lo=0.0, hi=100.0, required=True),
        sustained_x=t.number("sustained_x", unit="x rated current (not above the transient "
                             "current 100 / xd1_pct)", lo=0.0, hi=100.0 / xd1, lo_open=False,
                             default=0.0),
        feeds=feeds,
    )


def _standby(data: Any, u0_v: float) -> tuple[StandbySource, ...]:
    """The ``[[supply.standby]]`` array: each source read, names unique."""
    if not isinstance(data, list):
        raise InputError("standby must be an array of tables: write [[supply.standby]] "
                         "(double brackets) before each standby source", key="supply.standby")
    sources: list[StandbySource] = []
    for number, raw in enumerate(data, start=1):
        source = _standby_source(raw, number, u0_v)
        if any(s.name == source.name for s in sources):
            raise InputError(f"two standby sources are named {source.name!r}; every source "
                             "needs its own name (it names its case)",
                             key=f"supply.standby.{source.name}.name")
        sources.append(source)
    return tuple(sources)


def _supply(data: Any) -> Supply:
    t = Table(data, SUPPLY_KEYS, prefix="supply.", name="[supply]", table="supply")
    phases = t.integer("phases", choices=(1, 3), default=3)
    earthing = t.choice("earthing", EARTHING_SYSTEMS, default="TN-C-S")
    pfc_a = t.number("pfc_a", unit="A", lo=0.0, hi=MAX_CURRENT_A)
    pfc_ln_a = t.number("pfc_ln_a", unit="A", lo=0.0, hi=MAX_CURRENT_A)
    ze_ohm = t.number("ze_ohm", unit="ohm", lo=0.0, hi=MAX_ZE_OHM)
    ra_ohm = t.number("ra_ohm", unit="ohm", lo=0.0, hi=MAX_ZE_OHM)
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
    if ra_ohm is not None and earthing != "TT":
        raise InputError(f"ra_ohm is the earth electrode's resistance of a TT installation "
                         f"(IEC 60364-4-41, 411.5.3), and this supply is {earthing}; allowed: "
                         "earthing = \"TT\", or leave ra_ohm out", key="supply.ra_ohm")
    u0_v = t.number("u0_v", unit="V", lo=50.0, hi=1000.0, default=230.0)
    check_source(u0_v, pfc_a, pfc_ln_a, ze_ohm, earthing)
    if transformer is not None:
        check_rated_voltage(transformer.u_lv_v, u0_v)
    standby = _standby(t.data["standby"], u0_v) if t.has("standby") else ()
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
        ra_ohm=ra_ohm,
        standby=standby,
    )



def _size(t: Table, key: str, material: str, *, zero_ok: bool = False) -> float | None:
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
        # the items as written, with each value's type: 1, 1.0 and true are equal keys but not
        # equally valid
        key = ((tuple(data.items()), tuple(map(type, data.values())))
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
    t = Table(data, CABLE_KEYS, circuit=circuit, prefix="cable.", name="[circuit.cable]",
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
        **_protective_conductor(t),
    )


def _protective_conductor(t: Table) -> dict[str, Any]:
    """The cable's keys of a separate protective conductor or of armour used as one."""
    separate = bool(t.boolean("cpc_separate"))
    armour = bool(t.boolean("cpc_armour"))
    armour_mm2 = t.number("armour_mm2", unit="mm2", lo=0.0, hi=5000.0)
    armour_ohm = t.number("armour_ohm_per_m", unit="ohm/m", lo=0.0, hi=1.0)
    if armour:
        clash = [k for k in ("cpc_mm2", "cpc_material", "cpc_parallel", "cpc_separate")
                 if t.has(k)]
        if clash:
            raise t.error(clash[0], f"{clash[0]} describes a protective conductor of copper or "
                                    "aluminium; with cpc_armour = true the armour is the "
                                    "protective conductor; allowed: armour_mm2 and "
                                    "armour_ohm_per_m")
        if armour_mm2 is None:
            raise t.error("armour_mm2", "cpc_armour = true needs armour_mm2, the cross-section "
                                        "of the armour [mm2] (its k, and its resistance unless "
                                        "armour_ohm_per_m is given)")
    elif armour_mm2 is not None or armour_ohm is not None:
        key = "armour_mm2" if armour_mm2 is not None else "armour_ohm_per_m"
        raise t.error(key, f"{key} describes the armour as the protective conductor; allowed "
                           "only with cpc_armour = true")
    return {"cpc_separate": separate, "cpc_armour": armour, "armour_mm2": armour_mm2,
            "armour_ohm_per_m": armour_ohm}


def _ring(t: Table) -> bool:
    ring = bool(t.boolean("ring"))
    if ring and not isinstance(t.data.get("cable"), Mapping):
        raise t.error("ring", "ring = true needs the ring's cable: a [circuit.cable] table with "
                              "length_m the ring's whole route length")
    return ring


def _upstream_currents(t: Table, key: str, what: str) -> Mapping[str, float]:
    """A table of upstream circuit id = current [A] (``tested_limits_a``, ``backup_a``)."""
    if not t.has(key):
        return NO_CURRENTS
    given = t.data[key]
    if not isinstance(given, Mapping):
        raise t.error(key, f"{key} must be a table of upstream circuit id = {what} [A], not "
                           f"{describe(given)}")
    table = Table(given, tuple(str(k) for k in given), circuit=t.circuit, prefix=f"{key}.")
    return {str(up): table.number(str(up), unit="A", lo=0.0, hi=MAX_CURRENT_A) for up in given}


def _circuit_id(raw: Any, number: int) -> str:
    where = f"the [[circuit]] table number {number}"
    if not isinstance(raw, Mapping):
        raise InputError(f"{where} is {describe(raw)}, not a table; write each circuit as a "
                         "[[circuit]] table", key="circuit")
    if "id" not in raw:
        cable = raw.get("cable")
        if isinstance(cable, Mapping) and "id" in cable:
            raise InputError(f"{where}: its id is written below its [circuit.cable] line, where "
                             "it is read as a cable key; move it above that line, since in TOML "
                             "every key below a table header belongs to that table",
                             key="cable.id")
        raise InputError(f"{where} has no id; every circuit needs a unique id (a text)",
                         key="id")
    cid = raw["id"]
    if not isinstance(cid, str) or not cid.strip() or cid != cid.strip():
        raise InputError(f"{where}: id must be a non-empty text without leading or trailing "
                         f"spaces, not {describe(cid)}", key="id")
    if len(cid) > MAX_ID_CHARS:
        raise InputError(f"{where}: id is {len(cid)} characters long; allowed: at most "
                         f"{MAX_ID_CHARS}", key="id")
    if cid.lower() == SUPPLY_ID:
        raise InputError(f"{where}: the id {cid!r} is reserved for the origin; choose another",
                         circuit=cid, key="id")
    return cid


def _circuit_fields(raw: Mapping[str, Any], cid: str) -> dict[str, Any]:
    """A circuit's keys read and checked, as :class:`~coordination.model.Circuit` takes them.

    First the keys the others depend on (from, device, tested_limits_a, motor, inrush,
    load_a); then the others given, in the order of :data:`_OTHER_KEYS`. A key not given is not
    read: it keeps its value in :data:`_NOT_GIVEN` (most circuits give two or three of them).
    """
    t = Table(raw, CIRCUIT_KEYS, circuit=cid, table="circuit")
    if isinstance(raw.get("cable"), Mapping):  # a circuit key below [circuit.cable], such as
        # 'from' or 'device', is named there before it is reported missing here
        check_keys(raw["cable"], CABLE_KEYS, circuit=cid, prefix="cable.",
                   table="circuit.cable")
    parent = t.text("from", required=True,
                    what="the id of the circuit that feeds this one's board, or 'supply'")
    if "device" not in raw and "rcd" not in raw:
        raise t.error("device", "missing key 'device'; give a shorthand such as 'B32' or "
                                "'gG100', or an inline table (or an rcd table alone for a "
                                "residual-current switch)")
    device = raw.get("device")
    if device is None:
        pass  # a residual-current switch (RCCB): its overcurrent protection is above it
    elif isinstance(device, str):
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
                                f"table, not {describe(device)}")
    limits = _upstream_currents(t, "tested_limits_a", "selectivity limit")
    motor: Motor | None = None
    inrush: Inrush | None = None
    if "motor" in raw or "inrush" in raw:  # the module is loaded for the circuits that need it
        from coordination.motors import inrush_from_table, motor_from_table

        motor = _load_table(raw, cid, "motor", motor_from_table)
        inrush = _load_table(raw, cid, "inrush", inrush_from_table)
    load = t.number("load_a", unit="A", lo=0.0, hi=MAX_CURRENT_A)
    if inrush is not None and load is None:
        raise t.error("inrush", "an inrush is given as a multiple of the circuit's load_a; give "
                                "load_a (the running current Ib, in A)")
    if motor is not None and inrush is not None:
        raise t.error("inrush", "give motor or inrush on one circuit, not both (a motor's start "
                                "is its inrush)")
    fields = {
        **_NOT_GIVEN,
        "id": cid,
        "parent": parent,
        "device": device,
        "load_a": load if load is not None or motor is None else motor.flc_a,
        "motor": motor,
        "inrush": inrush,
        "tested_limits_a": limits,
    }
    for key, read in _OTHER_KEYS.items():
        if key in raw:
            fields[key] = read(t)
    return fields


def _load_table(raw: Mapping[str, Any], cid: str, key: str,
                read: Callable[[Mapping[str, Any]], Any]) -> Any:
    """A circuit's ``motor`` or ``inrush`` table read and checked by ``read`` (from
    :mod:`coordination.motors`), its errors naming the circuit and the key; None when absent."""
    if key not in raw:
        return None
    try:
        return read(raw[key])
    except InputError as error:
        raise error.within(circuit=cid, key=key) from None


def _rcd_table(t: Table) -> dict[str, Any]:
    """The circuit's ``rcd`` table with its keys checked (the values are checked when its band
    is built, :func:`coordination.residual.rcd_of`)."""
    Table(t.data["rcd"], RCD_KEYS, circuit=t.circuit, prefix="rcd.", name="rcd")
    return dict(t.data["rcd"])


#: The circuit keys read after those the others depend on, each with how it is read and
#: checked, in the order they are checked (the first problem is the one reported).
_OTHER_KEYS: dict[str, Callable[[Table], Any]] = {
    "phases": lambda t: t.integer("phases", choices=(1, 3)),
    "cable": lambda t: _cable(t.data["cable"], t.circuit),
    "basis": lambda t: t.choice("basis", BASES),
    "final": lambda t: t.boolean("final"),
    "selective_to_a": lambda t: t.number("selective_to_a", unit="A", lo=0.0, hi=MAX_CURRENT_A),
    "breaking_capacity_a": lambda t: t.number("breaking_capacity_a", unit="A", lo=0.0,
                                              hi=MAX_CURRENT_A),
    "margin": lambda t: t.number("margin", unit="(factor)", lo=1.0, hi=10.0, lo_open=False),
    "interval_s": lambda t: t.number("interval_s", unit="s", lo=0.0, hi=10.0, lo_open=False),
    "board": lambda t: t.text("board", what="a text (the name of the board this circuit feeds)"),
    "rcd": _rcd_table,
    "sockets": lambda t: t.boolean("sockets"),
    "leakage_ma": lambda t: t.number("leakage_ma", unit="mA", lo=0.0, hi=100000.0,
                                     lo_open=False),
    "ring": _ring,
    "backup_a": lambda t: _upstream_currents(t, "backup_a", "back-up current"),
    "conditional_a": lambda t: t.number("conditional_a", unit="A", lo=0.0, hi=MAX_CURRENT_A),
}
#: The value of each of :data:`_OTHER_KEYS` on a circuit that does not give it.
_NOT_GIVEN: dict[str, Any] = {
    "phases": None,  # its board's (check_feeds fills it in)
    "cable": None,
    "basis": None,
    "final": None,
    "selective_to_a": None,
    "breaking_capacity_a": None,
    "margin": None,
    "interval_s": None,
    "board": None,
    "rcd": None,
    "sockets": False,
    "leakage_ma": None,
    "ring": False,
    "backup_a": NO_CURRENTS,
    "conditional_a": None,
}


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
    top = Table(data, TOP_KEYS, name="the study", table="")
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

    order = parents_first(fields)
    check_boards(fields, order)
    check_feeds(fields, order, supply.phases)
    check_rccbs(fields, order)

    study = Study(
        title=study_fields["title"],
        supply=supply,
        circuits=tuple(Circuit(**fields[cid]) for cid in order),
        basis=study_fields["basis"],
        margin=study_fields["margin"],
        interval_s=study_fields["interval_s"],
        source=source,
        title_block=study_fields["title_block"],
        rules=study_fields["rules"],
    )
    check_standby(study)
    check_devices(study)
    return study


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
