"""What the report says: the standards, its tables (as :class:`~.layout.TableSpec`), the supply
and basis summaries and the notes, in words and numbers a designer reads.
"""

from __future__ import annotations

import datetime as dt
import os
import re
from collections.abc import Sequence
from typing import Any

from coordination.checks import CheckResult
from coordination.engine import Analysis
from coordination.faults import FaultLevels
from coordination.model import Cable, Study
from coordination.text import finite_or_none, format_current

from .layout import TableSpec

#: Standards the models, fault levels and checks rest on (shown on the cover).
STANDARDS = (
    ("IEC 60898-1", "circuit-breakers for household and similar installations (MCBs, types B, C "
                    "and D; energy-limiting classes)"),
    ("IEC 60269-1 / -2", "low-voltage fuses, gG and aM fuse-links: gates, conventional "
                         "currents, I2t"),
    ("IEC 60947-2", "circuit-breakers: thermal-magnetic and electronic releases, selectivity "
                    "(Annex A)"),
    ("IEC 60947-4-1", "motor starters: overload relays (trip classes 10A, 10, 20, 30), "
                      "contactors"),
    ("IEC 60909-0", "short-circuit currents in three-phase a.c. systems (simplified for LV)"),
    ("IEC 60364-4-41", "protection against electric shock: disconnection times (Table 41.1)"),
    ("IEC 60364-4-43", "protection against overcurrent: overload and fault energy (k^2 S^2)"),
    ("IEC 60364-5-54", "earthing arrangements and protective conductors (Tables A.54.2, "
                       "A.54.3, A.54.4)"),
    ("IEC 60228", "conductors of insulated cables: resistance at 20 degC"),
    ("BS 7671 Table 41.3", "maximum earth-fault loop impedance for circuit-breakers"),
)
#: Added to the standards where a study has residual-current devices.
RCD_STANDARDS = (
    ("IEC 61008-1 / 61009-1", "RCCBs and RCBOs: break and non-actuating times (general, type S)"),
    ("IEC 60364-4-41 411.3.3, 411.5.3", "additional protection by RCD; TT: RA x IΔn <= 50 V"),
    ("IEC 60364-5-53", "selectivity between RCDs in series (from memory)"),
)


# -- small formatting helpers -------------------------------------------------------------------
def ka_text(value: Any) -> str:
    """A current in kA to three significant figures, for the tables; "-" when unknown."""
    v = finite_or_none(value)
    if v is None:
        return "-"
    return f"{v / 1000:.3g}"


def ohm_text(value: Any) -> str:
    v = finite_or_none(value)
    return "-" if v is None else f"{v:.3g}"


def value_text(value: Any, unit: str) -> str:
    v = finite_or_none(value)
    if v is None:
        return "never" if unit == "s" and value is not None else "-"
    if unit == "s":
        return f"{v * 1000:.3g} ms" if v < 1 else f"{v:.3g} s"
    if unit == "A":
        return format_current(v)
    if unit == "mm2":
        return f"{v:.3g} mm\u00b2"
    return f"{v:.3g} {unit}"


def report_date() -> dt.date:
    """Today, or the date of ``SOURCE_DATE_EPOCH`` when set (reproducible documents).

    Examples
    --------
    >>> import os
    >>> os.environ["SOURCE_DATE_EPOCH"] = "86400"
    >>> print(report_date().isoformat())
    1970-01-02
    >>> del os.environ["SOURCE_DATE_EPOCH"]
    """
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.isdigit():
        return dt.datetime.fromtimestamp(int(epoch), tz=dt.UTC).date()
    return dt.date.today()


#: How the register shows a band's settings: a label and the unit to show the value in
#: (``None``: left out, because the device's name already says it).
SETTING_LABELS: dict[str, tuple[str, str] | None] = {
    "In_a": None, "type": None, "Ir_x": None, "Isd_x": None, "Ii_x": None,
    "energy_class": ("class", ""), "icn_a": ("Icn", "kA"), "icu_a": ("Icu", "kA"),
    "breaking_capacity_a": ("breaks", "kA"), "Ir_a": ("Ir", "A"), "Isd_a": ("Isd", "A"),
    "Ii_a": ("Ii", "A"), "tr_s": ("tr", "s"), "tsd_s": ("tsd", "s"),
}
CAPACITY_SETTINGS = ("icn_a", "icu_a", "breaking_capacity_a")


def register_settings(settings: Any, capacity_a: float | None = None) -> str:
    """A band's settings as a person reads them (``class 3, Icn 6 kA``).

    ``capacity_a``: a breaking capacity the study gives for the circuit, which replaces the
    device's own.

    Examples
    --------
    >>> print(register_settings({"type": "B", "In_a": 32, "energy_class": 3, "icn_a": 6000}))
    class 3, Icn 6 kA
    >>> print(register_settings({"In_a": 250, "Ir_a": 200, "Ii_a": 2500}, capacity_a=36000))
    Ir 200 A, Ii 2500 A, breaks 36 kA (study)
    """
    parts = []
    capacity_shown = False
    for key, val in dict(settings).items():
        label = SETTING_LABELS.get(key, (key, ""))
        if label is None:
            continue
        name, unit = label
        if key == "sd_i2t":
            if val:
                parts.append("I2t ramp")
            continue
        if key in CAPACITY_SETTINGS and capacity_a is not None:
            parts.append(f"{name} {capacity_a / 1000:g} kA (study)")
            capacity_shown = True
            continue
        if not isinstance(val, int | float):
            parts.append(f"{name} {val}")
        elif unit == "kA":
            parts.append(f"{name} {val / 1000:g} kA")
        else:
            parts.append(f"{name} {val:g}{' ' + unit if unit else ''}")
    if capacity_a is not None and not capacity_shown:
        parts.append(f"breaks {capacity_a / 1000:g} kA (study)")
    return ", ".join(parts)


def _cable_text(cable: Cable | None) -> str:
    if cable is None:
        return "-"
    parallel = cable.parallel or 1
    par = f"{parallel}x" if parallel > 1 else ""
    cpc = f"/{cable.cpc_mm2:g}" if cable.cpc_mm2 else ""
    cpc_parallel = getattr(cable, "cpc_parallel", None)
    if cable.cpc_mm2 and cpc_parallel and cpc_parallel != parallel:  # e.g. one cpc for the set
        cpc = f" + cpc {cpc_parallel}x{cable.cpc_mm2:g}" if cpc_parallel > 1 else (
            f" + cpc {cable.cpc_mm2:g}")
    metal = {"copper": "cu", "aluminium": "al"}.get(cable.material, cable.material)
    return f"{par}{cable.csa_mm2:g}{cpc} {metal} {cable.insulation} {cable.length_m:g} m"


def _device_table(study: Study, basis: str | None) -> TableSpec:
    from coordination.devices import band_for
    from coordination.residual import has_rcds, rcd_of

    rcds = has_rcds(study)
    rows = []
    for c in study.circuits:
        rcd = rcd_of(study, c.id) if rcds else None
        if c.device is None:  # a residual-current switch: its RCD is its device
            name, kind, settings = (f"{rcd.name.replace('RCD', 'RCCB', 1)}" if rcd else "RCCB",
                                    "envelope", "overcurrent: the device above")
        else:
            band = band_for(study, c.id, basis)
            name, kind = band.name, band.basis
            settings = register_settings(band.settings, c.breaking_capacity_a)
        row = (c.id, study.board_name(c.id), name, kind, settings,
               "-" if c.load_a is None else f"{c.load_a:g}", _cable_text(c.cable))
        if rcds:
            extra = [rcd.name] if rcd is not None and c.device is not None else []
            extra += ["sockets"] if c.sockets else []
            extra += [f"leakage {c.leakage_ma:g} mA"] if c.leakage_ma is not None else []
            row = (*row, ", ".join(extra) or "-")
        rows.append(row)
    if rcds:  # an RCD column only where the study has RCDs (the same register otherwise)
        return TableSpec(("circuit", "sits on", "device", "basis", "settings", "Ib A",
                          "cable mm\u00b2", "RCD"), (0.0, 0.0, 0.6, 0.0, 2.0, 0.0, 0.0, 0.6),
                         tuple(rows), "lllllrll", wrap=(2, 4, 7), fit=(0, 1, 3, 6))
    return TableSpec(("circuit", "sits on", "device", "basis", "settings", "Ib A",
                      "cable mm\u00b2"), (0.0, 0.0, 0.6, 0.0, 2.0, 0.0, 0.0), tuple(rows),
                     "lllllrl", wrap=(2, 4), fit=(0, 1, 3, 6))


def _fault_table(study: Study, levels: FaultLevels) -> TableSpec:
    rows = []
    for c in study.circuits:
        n = levels.by_circuit.get(c.id)
        rows.append((c.id, study.board_name(c.id), str(c.phases),
                     *(ka_text(getattr(n, key, None)) for key in (
                         "ik3_max_a", "ik1_max_a", "ik_max_a", "ik_min_end_a", "ief_min_a")),
                     ohm_text(getattr(n, "zs_ohm", None))))
    return TableSpec(("circuit", "board", "ph", "Ik3 max kA", "Ik1 max kA", "window kA",
                      "Ik min end kA", "Ief min end kA", "Zs end \u03a9"),
                     (0.5, 1.0, 0.0, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2), tuple(rows), "lllrrrrrr",
                     fit=(0, 1))


BASIS_SHORT = {"typical": "typ", "envelope": "env", "datasheet": "data"}


def _keep_together(label: str) -> str:
    """A label whose numbers stay with their units and setting names when a cell wraps.

    Examples
    --------
    >>> _keep_together("electronic 1600 A, Ir 1440 A").replace("\u00a0", "_")
    'electronic 1600_A, Ir_1440_A'
    """
    label = re.sub(r"(?<=\d) (?=[A-Za-z])", "\u00a0", label)
    return re.sub(r"\b(In|Ir|tr|Isd|tsd|Ii) (?=\d)", "\\1\u00a0", label)


def _pair_table(study: Study, analysis: Analysis) -> TableSpec:
    from coordination.devices import compact_labels

    # the register has every setting; a breaker's compact label wraps between its parts
    label = {k: _keep_together(v) for k, v in compact_labels(study, analysis.basis).items()}
    rows, flags, failing = [], [], []
    for p in analysis.pairs:
        bases = "/".join(BASIS_SHORT.get(b, b) for b in (p.downstream_basis, p.upstream_basis))
        rows.append((
            p.downstream, p.upstream_span, f"{label[p.downstream]} / {label[p.upstream]}",
            p.verdict, "-" if p.verdict == "total" else ka_text(p.limit_a),
            f"{ka_text(p.window_a[0])}-{ka_text(p.window_a[1])}", p.decided_by, bases,
            "total" if p.required_a is None else ka_text(p.required_a), "yes" if p.ok else "NO"))
        flags.append(not p.ok)
        failing.append(() if p.ok else (4, 9))  # Is short of the need, and the verdict
    for p in analysis.residual:  # RCDs in series: residual current on the window
        rows.append((
            p.downstream, p.upstream, f"{p.downstream_device} / {p.upstream_device}",
            p.verdict, "-", f"{p.window_a[0] * 1000:.3g} mA-{ka_text(p.window_a[1])}",
            p.decided_by, "env/env", "total", "yes" if p.ok else "NO"))
        flags.append(not p.ok)
        failing.append(() if p.ok else (9,))
    return TableSpec(("downstream", "upstream", "devices", "verdict", "Is kA", "window kA",
                      "decided by", "bases", "need kA", "met"),
                     (0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0), tuple(rows),
                     "llllrlllrr", wrap=(2,), fit=(0, 1, 3, 6, 7), whole=(4, 5, 8, 9),
                     flags=tuple(flags), failing=tuple(failing))


CHECK_COLUMNS = (("disconnection", "disconnection"), ("overload", "overload"),
                 ("fault-energy", "fault energy"), ("breaking-capacity", "breaking capacity"))
#: The residual-current checks: a column each only where a study has them.
RESIDUAL_COLUMNS = (("touch-voltage", "touch voltage"),
                    ("additional-protection", "additional protection"), ("leakage", "leakage"))


def _whole(text: str) -> str:
    """Text whose words never part when its cell wraps (a number with its unit and name)."""
    return text.replace(" ohm", " \u03a9").replace(" ", "\u00a0")


def _margin(result: CheckResult) -> str:
    from coordination.tables import check_margin

    margin = check_margin(result)
    if margin is None:
        return ""
    share = f"{margin * 100:.1f}" if abs(margin) < 0.1 else f"{margin * 100:.0f}"
    return f", {share}\u00a0%" + ("\u00a0left" if margin >= 0 else "\u00a0over")


def _check_cell(result: CheckResult) -> str:
    """``ok Zs 0.89 Ω / max 4.37 Ω, 80 % left``: the result (ok, near limit within 5 %, or
    FAIL), what is compared against its limit (for disconnection the loop impedance; for
    overload the comparison that binds) and the share of the limit to spare. Numbers keep
    their units and names when the cell wraps."""
    from coordination.tables import check_cells, check_status

    value, limit = check_cells(result)
    return (f"{_whole(check_status(result))} {_whole(value)} / {_whole(limit)}"
            f"{_margin(result)}")


def _check_matrix(study: Study, results: Sequence[CheckResult]) -> TableSpec:
    """One row per circuit, one column per check (``-``: not run, for want of data); only the
    cells of failed checks are set in the failure ink."""
    by_circuit: dict[str, dict[str, Any]] = {}
    for r in results:
        by_circuit.setdefault(r.circuit, {})[r.check] = r
    present = {r.check for r in results}
    columns = CHECK_COLUMNS + tuple(c for c in RESIDUAL_COLUMNS if c[0] in present)
    rows, flags, failing = [], [], []
    for c in study.circuits:
        mine = by_circuit.get(c.id, {})
        rows.append((c.id, *(_check_cell(mine[k]) if k in mine else "-"
                             for k, _ in columns)))
        flags.append(any(not r.ok for r in mine.values()))
        failing.append(tuple(j for j, (k, _) in enumerate(columns, start=1)
                             if k in mine and not mine[k].ok))
    n = len(columns)
    return TableSpec(("circuit", *(title for _, title in columns)),
                     (0.0, *(1.0,) * n), tuple(rows), "l" * (n + 1),
                     wrap=tuple(range(1, n + 1)), fit=(0,), flags=tuple(flags),
                     failing=tuple(failing))


def _check_failures(results: Sequence[CheckResult]) -> TableSpec:
    """The checks that fail or are near their limit (within 5 %), with what to do."""
    from coordination.tables import check_cells, check_status, near_limit

    rows, failing = [], []
    for r in results:
        if r.ok and not near_limit(r):
            continue
        value, limit = check_cells(r)
        rows.append((r.circuit, r.check, check_status(r), _whole(value), _whole(limit),
                     _margin(r).removeprefix(", ") or "-", r.reason))
        failing.append(() if r.ok else (2, 3))
    return TableSpec(("circuit", "check", "result", "value", "limit", "margin", "what to do"),
                     (0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 1.0), tuple(rows), "lllrrrl", wrap=(6,),
                     fit=(0, 1, 2), whole=(3, 4, 5),
                     flags=tuple(bool(f) for f in failing), failing=tuple(failing))


def _starting_table(results: Sequence[CheckResult]) -> TableSpec:
    """One row per circuit with a motor or an inrush: the start, the device that decides it,
    the time it waits at its current (or its pickup against the first peak), the result."""
    rows, flags = [], []
    for r in results:
        if r.check != "starting":
            continue
        d = r.details
        start = (f"{d.get('starting', '')} {format_current(float(d['start_current_a']))} for "
                 f"{value_text(d.get('start_s'), 's')}, peak {format_current(float(d['peak_a']))}")
        rows.append((r.circuit, start, str(d.get("binding_circuit", "")),
                     "ok" if r.ok else "FAIL", value_text(r.value, r.unit),
                     value_text(r.limit, r.unit), r.reason))
        flags.append(not r.ok)
    return TableSpec(("circuit", "start", "decided by", "result", "value", "limit", "why"),
                     (0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 1.0), tuple(rows), "llllrrl", wrap=(6,),
                     fit=(0, 1, 2, 3, 4, 5), flags=tuple(flags))


def _supply_lines(study: Study, levels: FaultLevels) -> list[str]:
    s = study.supply
    lines = [f"{s.u0_v:g} V to earth, {s.phases}-phase, {s.earthing} earthing"]
    if s.transformer is not None:
        t = s.transformer
        upstream = (f", network {format_current(t.upstream_pfc_a)} referred to LV"
                    if t.upstream_pfc_a else ", infinite network assumed")
        rated = "" if t.u_lv_v is None else f", rated {t.u_lv_v:g} V on its low-voltage side"
        lines.append(f"transformer {t.rating_kva:g} kVA, uk {t.impedance_pct:g} %, X/R "
                     f"{t.x_r:g}{rated}{upstream}")
    if s.pfc_a is not None:
        lines.append(f"declared prospective fault current {format_current(s.pfc_a)}")
    if s.ze_ohm is not None:
        lines.append(f"external earth-fault loop impedance Ze {s.ze_ohm:g} \u03a9")
    lines.append(f"voltage factors cmax {s.c_max:g}, cmin {s.c_min:g} (IEC 60909-0 Table 1)")
    ik3 = finite_or_none(levels.origin_ik3_a)
    ik1 = finite_or_none(levels.origin_ik1_a)
    ze = finite_or_none(levels.ze_ohm)
    origin = []
    if ik3:
        origin.append(f"Ik3 max {ik3 / 1000:.3g} kA")
    if ik1:
        origin.append(f"Ik1 max {ik1 / 1000:.3g} kA")
    if ze:
        origin.append(f"Ze {ze:.3g} \u03a9")
    if origin:
        lines.append("at the origin: " + ", ".join(origin))
    return lines


def _basis_summary(study: Study, basis: str | None) -> str:
    from coordination.devices import band_for

    ids: dict[str, list[str]] = {}
    for c in study.circuits:
        ids.setdefault(band_for(study, c.id, basis).basis, []).append(c.id)
    ranked = sorted(ids.items(), key=lambda item: -len(item[1]))
    if len(ranked) == 1:
        parts = [f"{ranked[0][0]} for every device ({len(ranked[0][1])})"]
    else:  # the most common basis by count, the others by name
        parts = [f"{ranked[0][0]} for {len(ranked[0][1])} devices"]
        for b, members in ranked[1:]:
            shown = ", ".join(members[:8]) + (f" and {len(members) - 8} more"
                                              if len(members) > 8 else "")
            parts.append(f"{b} for {shown}")
    return "Selectivity basis: " + "; ".join(parts) + (
        " (each device's basis is in the device register). Protection checks: envelope, the "
        "worst case a compliant device allows.")


NOTES = (
    ("Fault levels", (
        "Short-circuit currents follow the method of IEC 60909-0, simplified for low voltage: "
        "the source impedance comes from the declared prospective fault current, the external "
        "loop impedance Ze or the transformer (rating, uk, X/R); conductor resistance from "
        "IEC 60228 at 20 degC for maximum currents and at operating temperature for minimum "
        "ones; reactance per metre from common practice unless the study gives it; voltage "
        "factors cmax and cmin as stated on the cover. Arc resistance, busbar and switchgear "
        "impedance are neglected, which puts maxima slightly high and minima slightly low (the "
        "safe side for both); the contribution of running motors to the maximum currents is "
        "neglected too, so where large motors run the maxima may be slightly low.")),
    ("Bands and bases", (
        "Each device is a band between its earliest operating time (lower edge) and its latest "
        "clearing time (upper edge). On the typical basis the band sits in the middle of the "
        "standard's limits, widened by the usual manufacturing tolerance; on the envelope basis "
        "it is the widest band any complying device may have; a datasheet basis uses the points "
        "the study gave. Below 10 ms times are equivalent times I2t / I^2 from the energy "
        "limits of the standards (let-through of MCB energy classes, fuse pre-arcing and "
        "operating I2t).")),
    ("Selectivity", (
        "A downstream device is selective with an upstream one at a current when its latest "
        "clearing time, times the margin and plus the interval over adjustable breakers, does "
        "not exceed the upstream device's earliest operating time. The window runs from the "
        "downstream device's conventional non-tripping current to the maximum fault at its "
        "board. Is is the lowest current where the bands meet; 'partial' means selective up to "
        "Is, 'none' that the bands meet in overload. An upstream breaker with an instantaneous "
        "release withstands no energy above it: only a tested limit given in the study, shown "
        "as 'tested', can show selectivity there. Crossover zones are hatched on the plots.")),
    ("Protection checks", (
        "Disconnection times (IEC 60364-4-41 Table 41.1), overload (Ib <= In <= Iz, "
        "I2 <= 1.45 Iz), fault energy (k^2 S^2 >= I2t, IEC 60364-4-43) and breaking capacity, "
        "always on the envelope basis whatever the selectivity basis. The study's rule set "
        "(IEC 60364, or BS 7671 with its own scope of Table 41.1 and its 433.1.202, recalled "
        "from memory) is named on the cover and in front of every check's reason. A breaking "
        "capacity below the fault passes only on a declared back-up or conditional rating: "
        "the maker's tested data, to be verified against the maker's documents.")),
    ("Not covered", (
        "Residual-current devices, back-up (cascade) ratings other than those declared, "
        "earth-fault protection settings, ambient derating of devices, harmonics, voltage drop "
        "and discrimination under motor starting are outside this report. Manufacturers' "
        "selectivity tables and curves take precedence over the standard-based bands used "
        "here.")),
)


def sentence(text: str) -> str:
    """``text`` with its first letter capitalised (the fault convention reads as a clause)."""
    return text[:1].upper() + text[1:]


# -- the introductions of the table pages ------------------------------------------------------
#: Above the device register.
REGISTER_INTRO = (
    "Every protective device of the study: the board it sits on, its band and the basis of "
    "that band for selectivity, its settings, the design current Ib and its cable (line/"
    "protective conductor in mm\u00b2, material, insulation, length).",
)

#: Above the fault levels (the study's fault convention follows).
FAULTS_INTRO = (
    "Maximum currents at each circuit's origin (its board): Ik3 three-phase, Ik1 "
    "line-neutral, and the window value (Ik3 for a three-phase circuit, Ik1 for a "
    "single-phase one), which is the top of its selectivity window. Minimum currents at the "
    "circuit's far end: Ik min (line-neutral), Ief min (earth fault) and the loop "
    "impedance Zs. Currents in kA, impedances in ohm (IEC 60909-0, simplified).",
)

#: Above the selectivity of every pair.
PAIRS_INTRO = (
    "Each circuit under each device above it. Verdict 'total': selective up to the maximum "
    "fault at its board; 'partial': selective up to Is; 'none': the bands meet in overload. "
    "Decided by the time-current edges, by energy (below 10 ms, I2t) or by a tested limit. "
    "Devices and bases downstream/upstream (typ: typical, env: envelope, data: datasheet; "
    "full device settings in the register). Need: the selectivity the study requires "
    "('total' unless it gives selective_to_a). Rows that miss it are marked NO.",
)

#: Added where a study has residual-current devices: above the register, the pairs and the
#: checks.
REGISTER_RCD = (
    "RCD: the residual-current device beside the overcurrent device (an RCBO or a breaker with "
    "an RCD); an RCCB (an RCD with no overcurrent device) is listed as the device, protected "
    "against overcurrent by the device above it. RCD bands are the worst case of IEC 61008-1 / "
    "61009-1.")
PAIRS_RCD = (
    "Pairs of RCDs in series (window in residual current): selective when the upstream RCD is "
    "type S or delayed and its IΔn is at least 3 times the downstream one's (IEC 60364-5-53, "
    "from memory); 'rule' where the IEC 61008-1 limit values alone leave a range unproven "
    "(the JSON and the terminal output name it): confirm with the makers' data.")
CHECKS_RCD = (
    "Disconnection may be met by an RCD on the circuit or above it (its maximum break time at "
    "the earth-fault current, IEC 61008-1; IEC 60364-4-41 411.4.5 in TN, 411.5 in TT). Touch "
    "voltage (TT): RA x IΔn <= 50 V (411.5.3). Additional protection: socket-outlet circuits "
    "up to 32 A need an RCD of at most 30 mA (411.3.3). Leakage: the standing leakage below an "
    "RCD within 30 % of its IΔn (common practice).")

#: Above the protection checks.
CHECKS_INTRO = (
    "Disconnection time (IEC 60364-4-41 Table 41.1), overload (IEC 60364-4-43, 433: the "
    "device's conventional tripping current I2 against 1.45 Iz), fault energy "
    "(IEC 60364-4-43, 434.5.2: the conductor section needed for the let-through I2t against "
    "the section installed) and breaking capacity against the maximum fault at the board, on "
    "the envelope basis. Each cell: the result (ok; near limit: within 5 % of it; FAIL), what "
    "is compared with its limit and the share of the limit left: for disconnection the "
    "earth-fault loop impedance Zs against the largest Zs with which the device disconnects "
    "in time, for overload the comparison that binds (Ib <= In, In <= Iz or I2 <= 1.45 Iz). "
    "'-' where the study lacks the data. Only the cells of failed checks are set in red; "
    "failures and near limits are detailed after the table, and the reason for every check "
    "is in the CSV output (--csv). Motor starts and inrush loads (the starting check) have a "
    "table of their own.",
)

#: Above the starting checks.
STARTING_INTRO = (
    "Each motor start and inrush load of the study, through the circuit's device and every "
    "device above it (each carrying the start plus the Ib of its own circuit), on the study's "
    "selectivity basis: the start passes when no device may operate before it ends (value: "
    "the start's time, limit: the least operating time) and its first peak, taken as 2.0 "
    "times the r.m.s. start current (the safe end of 1.7-2, common practice; an inrush as "
    "given), stays at or below every lowest instantaneous pickup (value: the peak, limit: the "
    "pickup). Starts are rectangular (the trip side) and the devices cold: a device warm from "
    "its running load operates sooner. Verify against the makers' curves.",
)

#: Above the failed protection checks.
FAILURES_INTRO = (
    "Each check that fails (its result and value in red) or passes within 5 % of its limit "
    "(near limit), with what it compares, the share of the limit left and what to do.",
)
