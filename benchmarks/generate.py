"""Invented installations of any size, as study-file text (for benchmarks and scale tests).

Not collected by pytest (no ``test_`` prefix). Every installation here is invented.
"""

from __future__ import annotations

FINAL_DEVICES = ("B6", "B10", "B16", "B20", "C16", "B32", "C20", "B16")
FINAL_CABLES = {  # csa_mm2: (cpc_mm2, iz_a) for a PVC copper twin-and-earth style run
    2.5: (1.5, 24.0),
    4.0: (1.5, 32.0),
    6.0: (2.5, 41.0),
}


def _final(i: int) -> tuple[str, float]:
    device = FINAL_DEVICES[i % len(FINAL_DEVICES)]
    rating = float(device[1:])
    csa = next(s for s, (_, iz) in FINAL_CABLES.items() if iz >= rating * 1.0)
    return f"{device} 10kA", csa


def _circuit(cid: str, parent: str, device: str, *, phases: int = 3, load_a: float | None = None,
             length_m: float = 20.0, csa_mm2: float = 2.5, cpc_mm2: float = 1.5,
             insulation: str = "pvc", iz_a: float | None = None, board: str | None = None) -> str:
    lines = ["[[circuit]]", f'id = "{cid}"', f'from = "{parent}"', f'device = "{device}"',
             f"phases = {phases}"]
    if load_a is not None:
        lines.append(f"load_a = {load_a}")
    if board is not None:
        lines.append(f'board = "{board}"')
    lines += ["[circuit.cable]", f"length_m = {length_m}", f"csa_mm2 = {csa_mm2}",
              f"cpc_mm2 = {cpc_mm2}", f'insulation = "{insulation}"']
    if iz_a is not None:
        lines.append(f"iz_a = {iz_a}")
    return "\n".join(lines) + "\n"


def header(title: str) -> str:
    return (f'[study]\ntitle = "{title}"\n\n[supply]\nu0_v = 230\nphases = 3\n'
            'earthing = "TN-C-S"\n\n[supply.transformer]\nrating_kva = 1000\n'
            "impedance_pct = 6.0\nx_r = 6.0\n\n")


def building(risers: int = 10, boards_per_riser: int = 5, finals_per_board: int = 40) -> str:
    """An invented building: an incomer, risers, boards on each riser, final circuits per board.

    With the defaults: 1 + 10 + 50 + 2,000 = 2,061 circuits.
    """
    parts = [header(f"Invented building, {risers} risers")]
    parts.append(_circuit("incomer", "supply", "gG1250", length_m=5, csa_mm2=240, cpc_mm2=240,
                          insulation="xlpe", board="main switchboard"))
    for r in range(risers):
        rid = f"riser-{r + 1}"
        # lengths differ from riser to riser and board to board, as in a real building, so
        # that the boards differ in their fault levels (nothing is computed once for all)
        parts.append(_circuit(rid, "incomer", "gG315", length_m=25 + (7 * r) % 30,
                              csa_mm2=150, cpc_mm2=70,
                              insulation="xlpe", board=f"riser {r + 1}"))
        for b in range(boards_per_riser):
            bid = f"{rid}-db{b + 1}"
            parts.append(_circuit(bid, rid, "gG100", length_m=10 + (11 * r + 5 * b) % 23,
                                  csa_mm2=35, cpc_mm2=16,
                                  insulation="xlpe", board=f"DB {r + 1}.{b + 1}"))
            for f in range(finals_per_board):
                device, csa = _final(f)
                cpc, iz = FINAL_CABLES[csa]
                parts.append(_circuit(f"{bid}-c{f + 1}", bid, device, phases=1,
                                      load_a=float(device.split()[0][1:]) * 0.8,
                                      length_m=10 + (f % 5) * 4,
                                      csa_mm2=csa, cpc_mm2=cpc, iz_a=iz))
    return "\n".join(parts)


def chain(depth: int, devices: tuple[str, ...] = ("gG100",)) -> str:
    """A chain of ``depth`` circuits, each feeding the next (a deep tree).

    The devices repeat from the top down in the order given (one device: all alike).
    """
    parts = [header(f"Chain of {depth}")]
    parent = "supply"
    for d in range(depth):
        cid = f"n{d}"
        parts.append(_circuit(cid, parent, devices[d % len(devices)], length_m=0.5, csa_mm2=35,
                              cpc_mm2=16))
        parent = cid
    return "\n".join(parts)


def wide(width: int) -> str:
    """One board with ``width`` final circuits (a wide board)."""
    parts = [header(f"Board of {width}")]
    parts.append(_circuit("incomer", "supply", "gG400", length_m=5, csa_mm2=185, cpc_mm2=95,
                          insulation="xlpe"))
    for f in range(width):
        device, csa = _final(f)
        cpc, iz = FINAL_CABLES[csa]
        parts.append(_circuit(f"c{f + 1}", "incomer", device, phases=1, length_m=12,
                              csa_mm2=csa, cpc_mm2=cpc, iz_a=iz))
    return "\n".join(parts)


def _toml_value(value: object) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        if value != value:
            return "nan"
        if value in (float("inf"), float("-inf")):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{" + ", ".join(f'"{k}" = {_toml_value(v)}' for k, v in value.items()) + "}"
    raise TypeError(f"cannot write {type(value).__name__} as TOML")


def to_toml(doc: dict) -> str:
    """A study document (nested dicts, a list of circuit tables) as TOML text.

    Scalars and inline values of a table come first, then its sub-tables, then arrays of tables,
    as TOML requires. Enough for study documents; not a general TOML writer.
    """
    out: list[str] = []

    def table(prefix: str, body: dict, array: bool = False) -> None:
        if prefix:
            out.append(f"[[{prefix}]]" if array else f"[{prefix}]")
        subtables = []
        for key, value in body.items():
            if isinstance(value, dict) and key != "device" and key != "tested_limits_a":
                subtables.append((key, value, False))
            elif isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
                subtables.append((key, value, True))
            else:
                out.append(f'"{key}" = {_toml_value(value)}')
        for key, value, is_array in subtables:
            name = f"{prefix}.{key}" if prefix else key
            if is_array:
                for item in value:
                    table(name, item, array=True)
            else:
                table(name, value)

    table("", doc)
    return "\n".join(out) + "\n"
