"""Benchmark: candidate settings per second of the vectorised electronic-settings search.

Run from the repository root (not collected by pytest)::

    python -m benchmarks.bench_choose            # candidate settings per second
    python -m benchmarks.bench_choose --scale    # choose against check: flat boards, deep chains

Two invented installations: an incomer with an electronic trip unit over one gG160 sub-main,
and the same over a board of 40 final circuits (more devices below it to clear). For each it
times :func:`coordination.choose.screen_grid` over every (In, Ir) grid of the electronic family
(every setting of Isd, tsd, tr and Ii the unit offers: the vectorised screen of selectivity below
and above and of disconnection), then the whole ``choose`` (screen plus exact confirmation by the
engine and the checks), and prints candidate settings per second.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

import numpy as np  # noqa: E402

from coordination import choose, faults, study  # noqa: E402

REPEATS = 5

INCOMER = """
[study]
title = "Invented workshop"
interval_s = 0.1

[supply]
u0_v = 230
phases = 3
earthing = "TN-C-S"
pfc_a = 20000
ze_ohm = 0.02

[[circuit]]
id = "incomer"
from = "supply"
device = {family = "electronic", In_a = 630, Isd_x = 6, tsd_s = 0.4, icu_a = 50000}
load_a = 250
[circuit.cable]
length_m = 10
csa_mm2 = 185
cpc_mm2 = 95
insulation = "xlpe"
iz_a = 450

[[circuit]]
id = "sub-main"
from = "incomer"
device = "gG160"
load_a = 120
breaking_capacity_a = 80000
[circuit.cable]
length_m = 25
csa_mm2 = 70
cpc_mm2 = 35
insulation = "xlpe"
iz_a = 200
"""

FINAL = """
[[circuit]]
id = "final-{n}"
from = "sub-main"
device = "{device}"
phases = 1
load_a = 10
[circuit.cable]
length_m = {length}
csa_mm2 = 4
cpc_mm2 = 1.5
iz_a = 36
"""


def installations() -> dict[str, str]:
    devices = ("B6", "B10", "B16", "B20", "C16", "B32", "C20", "C10")
    board = INCOMER + "".join(FINAL.format(n=n + 1, device=devices[n % len(devices)],
                                           length=8 + n % 5 * 4) for n in range(40))
    return {"incomer over one fuse": INCOMER, "incomer over a board of 40 finals": board}


def bench(name: str, text: str) -> None:
    s = study.loads(text)
    levels = faults.compute(s)
    problem, current = choose.problem.build_problem(s, levels, "incomer", "electronic")
    grids = [g for g in choose.candidate_groups("electronic", current, problem.ik_break_a)
             if isinstance(g, choose.SettingsGrid)]
    settings_count = sum(int(g.valid().sum()) for g in grids)
    choose.screen_grid(problem, grids[0])  # warm up (imports)
    runs = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        passing = sum(int(choose.screen_grid(problem, g).sum()) for g in grids)
        runs.append(time.perf_counter() - start)
    screen_s = statistics.median(runs)
    choose.choose(s, "incomer", family="electronic", levels=levels)  # warm the engine's caches
    runs = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        choice = choose.choose(s, "incomer", family="electronic", levels=levels)
        runs.append(time.perf_counter() - start)
    choose_s = statistics.median(runs)
    print(f"\n{name}: {len(s.circuits)} circuits, current grid {problem.grid.size} points")
    print(f"  screen of every grid: {len(grids)} grids, {settings_count:,} settings, "
          f"{passing:,} pass the screen, {screen_s:.3f} s -> "
          f"{settings_count / screen_s:,.0f} candidate settings per second")
    print(f"  whole choose (cheap masks, screen, exact confirmation): {choose_s:.3f} s for "
          f"{choice.searched:,} candidates ruled in or out (most by the cheap masks on Ib and "
          f"Iz, a whole (In, Ir) grid at a time); answer: {choice.name}")


# -- scale: choose against check of the same study, as whole processes --------------------------
SCALE_ROUNDS = 3


def _scale_studies() -> list[tuple[str, str, str]]:
    """(label, study text, circuit to choose for): invented flat boards and deep chains.

    The flat boards' incomer cable is limited to Iz 100 A, so that no fuse meets every
    requirement and the chooser tries each remedy (the lower let-through below among them);
    the plain boards find their answer at once.
    """
    from generate import chain, wide

    limited = 'insulation = "xlpe"\niz_a = 100'
    out = []
    for n in (1000, 5000, 20000):
        out.append((f"flat board of {n:,}, nothing fits", wide(n).replace(
            'insulation = "xlpe"', limited, 1), "incomer"))
    out.append(("flat board of 20,000, found", wide(20000), "incomer"))
    for devices in (("gG100",), ("gG100", "C32")):
        text = chain(200, devices)
        for cid in ("n0", "n100", "n198"):
            out.append((f"chain of 200 ({'/'.join(devices)}), {cid}", text, cid))
    return out


def _wall(args: list[str]) -> tuple[float, int]:
    import subprocess

    start = time.perf_counter()
    proc = subprocess.run([sys.executable, "-m", "coordination", *args],
                          stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
    return time.perf_counter() - start, proc.returncode


def scale() -> None:
    """Whole-process wall time of ``choose`` and of ``check`` on the same study (median of
    :data:`SCALE_ROUNDS`, in turns)."""
    import tempfile

    sys.path.insert(0, str(HERE))
    print(f"\nscale: whole processes, median of {SCALE_ROUNDS} rounds in turns")
    print(f"{'study':44s} {'choose s':>9s} {'check s':>8s} {'ratio':>6s}")
    with tempfile.TemporaryDirectory() as folder:
        for label, text, cid in _scale_studies():
            path = Path(folder) / "study.toml"
            path.write_text(text, encoding="utf-8")
            chosen, checked = [], []
            for _ in range(SCALE_ROUNDS):
                chosen.append(_wall(["choose", str(path), "--circuit", cid]))
                checked.append(_wall(["check", str(path), "--json"]))
            t_choose = statistics.median(t for t, _ in chosen)
            t_check = statistics.median(t for t, _ in checked)
            print(f"{label:44s} {t_choose:9.2f} {t_check:8.2f} {t_choose / t_check:6.1f}"
                  f"  (exit {chosen[0][1]})")


def main() -> None:
    if "--scale" in sys.argv[1:]:
        scale()
        return
    print(f"numpy {np.__version__}, Python {sys.version.split()[0]}; median of {REPEATS}")
    for name, text in installations().items():
        bench(name, text)


if __name__ == "__main__":
    main()
