"""Benchmark: whole processes and in-process stages, on invented buildings of two sizes.

Run from the repository root (not collected by pytest)::

    python -m benchmarks.bench_all

It generates an invented building (an incomer, 10 risers, 5 boards each, 40 final circuits per
board: 2,061 circuits) and a quarter-size one, then times as whole processes ``--help``, ``times``,
``faults``, ``check`` (JSON, and the text tables), ``choose`` on a riser and ``report`` on the
multi-board example, against the floor any tool on these libraries pays (``python -c "import
numpy, scipy, shapely"``), and the same stages inside one process. Peak memory is the children's
maximum resident set size.

Commands run in rounds, each once a round and in turns, so that all see the machine alike (its
speed drifts by half within a minute); the table gives medians. Growth with the building's size
is given above the floor (the issue's measure) and above the tool's own fixed cost, a check of a
two-circuit study: a check imports neither scipy nor shapely, so its fixed cost is below the
floor. Growth for a chain and a wide board is the ratio of the work itself (load to JSON) in one
process, round by round, since differences of whole processes drown in the drift.
"""

from __future__ import annotations

import gc
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from benchmarks.generate import building, chain, wide  # noqa: E402

REPEATS = 5
#: Rounds of the commands measured in turns.
ROUNDS = 7
#: Children run as an installed tool does: with byte-code cached (an installer compiles it), so
#: a PYTHONDONTWRITEBYTECODE of the calling shell is dropped and one untimed run warms the cache.
ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def _run(cmd: list[str]) -> tuple[float, int]:
    start = time.perf_counter()
    code = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                          env=ENV).returncode
    return time.perf_counter() - start, code


def wall(cmd: list[str], repeats: int = REPEATS) -> tuple[float, int]:
    """Median wall time [s] of a command and its exit code (after one untimed run)."""
    _run(cmd)
    runs = [_run(cmd) for _ in range(repeats)]
    return statistics.median(t for t, _ in runs), runs[-1][1]


def in_turns(commands: dict[str, list[str]], rounds: int) -> dict[str, tuple[list[float], int]]:
    """Each command's wall times [s] over ``rounds`` rounds that run every command once, in
    turn (after one untimed round), and its exit code: all the commands see the machine alike,
    which matters on a machine whose speed drifts by half within a minute."""
    for cmd in commands.values():
        _run(cmd)
    times: dict[str, list[float]] = {name: [] for name in commands}
    codes: dict[str, int] = {}
    for _ in range(rounds):
        for name, cmd in commands.items():
            seconds, codes[name] = _run(cmd)
            times[name].append(seconds)
    return {name: (times[name], codes[name]) for name in commands}


def peak_rss_mb(cmd: list[str]) -> float:
    """Peak resident memory of one run of a command [MB] (Linux: ru_maxrss in KiB)."""
    script = ("import resource, subprocess, sys; subprocess.run(sys.argv[1:], "
              "stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL); "
              "print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)")
    out = subprocess.run([sys.executable, "-c", script, *cmd], capture_output=True, text=True,
                         env=ENV)
    return int(out.stdout.strip() or 0) / 1024


def in_process(path: Path) -> dict[str, float]:
    """Stage times inside one process [s]: the stages of ``check``, its tables and its JSON,
    with the cyclic garbage collector off as the command runs them (``cli.main``)."""
    gc.disable()
    try:
        return _stages(path)
    finally:
        gc.enable()


def _stages(path: Path) -> dict[str, float]:
    from coordination import (
        checks,
        devices,
        engine,
        faults,
        pair,
        residual,
        study,
        study_rules,
        tables,
    )
    from coordination.checks import common, disconnection, fault_energy, overload
    from coordination.cli import to_json

    # every cache, as a new process (the checks' caches live in their package's modules)
    for module in (devices, engine, pair, faults, residual, study, study_rules, common,
                   disconnection, fault_energy, overload):
        for value in vars(module).values():
            if callable(getattr(value, "cache_clear", None)):
                value.cache_clear()
    study._CABLES.clear()
    gc.collect()
    t0 = time.perf_counter()
    s = study.load(path)
    t1 = time.perf_counter()
    levels = faults.compute(s)
    t2 = time.perf_counter()
    analysis = engine.analyse(s, levels)
    t3 = time.perf_counter()
    results = checks.run(s, levels)
    t4 = time.perf_counter()
    tables.pair_table(s, levels, analysis)
    tables.check_table(results)
    t5 = time.perf_counter()
    to_json({**analysis.to_json(), "checks": [r.json_record() for r in results]})
    t6 = time.perf_counter()
    return {"load": t1 - t0, "faults": t2 - t1, "engine": t3 - t2, "checks": t4 - t3,
            "tables": t5 - t4, "json": t6 - t5, "pairs": len(analysis.pairs)}


def _growth(large: float, small: float, base: float) -> str:
    """``"2.13x"``: how much more time above ``base`` the larger study took; ``"-"`` where the
    smaller one did not rise above it (the measure has no meaning then)."""
    return f"{(large - base) / (small - base):.2f}x" if small - base > 0.005 else "-"


def main() -> None:
    exe = [sys.executable, "-m", "coordination"]
    example = HERE.parent / "examples" / "office-building.toml"
    print(f"machine: {os.cpu_count()} cores, Python {sys.version.split()[0]}")
    with tempfile.TemporaryDirectory() as tmp:
        full = Path(tmp) / "building-2061.toml"
        full.write_text(building(10, 5, 40))
        quarter = Path(tmp) / "building-quarter.toml"
        quarter.write_text(building(10, 5, 10))
        n_quarter = 1 + 10 + 50 + 500

        tiny = Path(tmp) / "one-final-circuit.toml"
        tiny.write_text(wide(1))
        commands = {
            "import floor (numpy, scipy, shapely)": [sys.executable, "-c",
                                                     "import numpy, scipy, shapely"],
            # the tool's own fixed cost: a check of a study of two circuits (incomer, one final)
            "check, 2 circuits (the fixed cost)": [*exe, "check", str(tiny), "--json"],
            "coordination --help": [*exe, "--help"],
            "times B32 (3 currents)": [*exe, "times", "B32", "-i", "100", "-i", "200", "-i",
                                       "5000"],
        }
        for label, path in ((f"quarter ({n_quarter} circuits)", quarter),
                            ("full (2,061 circuits)", full)):
            commands[f"faults, {label}"] = [*exe, "faults", str(path), "--json"]
            commands[f"check, {label}"] = [*exe, "check", str(path), "--json"]
        commands["check, full, text tables"] = [*exe, "check", str(full)]
        commands["choose riser-1, full"] = [*exe, "choose", str(full), "--circuit", "riser-1",
                                            "--json"]
        measured = in_turns(commands, ROUNDS)
        median = {name: statistics.median(t) for name, (t, _) in measured.items()}
        floor_name = "import floor (numpy, scipy, shapely)"
        fixed_name = "check, 2 circuits (the fixed cost)"
        floor = median[floor_name]
        pdf = Path(tmp) / "report.pdf"
        report_s, report_code = wall([*exe, "report", str(example), "-o", str(pdf)], 1)
        pages = 0
        if pdf.exists():
            from pypdf import PdfReader

            pages = len(PdfReader(pdf).pages)

        print(f"\n{'whole process (median of ' + str(ROUNDS) + ' rounds in turns)':44} "
              f"{'wall s':>8} {'over floor':>10} {'exit':>4}")
        for name, (_, code) in measured.items():
            print(f"{name:44} {median[name]:8.3f} {median[name] - floor:10.3f} {code:4d}")
        print(f"{'report, office-building example (one run)':44} {report_s:8.3f} "
              f"{report_s - floor:10.3f} {report_code:4d}")
        if pages:
            print(f"report: {pages} pages, {report_s / pages:.3f} s a page")
        full_times = measured["check, full (2,061 circuits)"][0]
        floor_times = measured[floor_name][0]
        ratios = [c / f for c, f in zip(full_times, floor_times, strict=True)]
        check_full = median["check, full (2,061 circuits)"]
        print(f"check full / floor: {check_full / floor:.2f}x (medians); round by round "
              f"{statistics.median(ratios):.2f}x (from {min(ratios):.2f}x to {max(ratios):.2f}x)")
        least = {name: min(t) for name, (t, _) in measured.items()}
        print(f"check full / floor, quickest round of each: "
              f"{least['check, full (2,061 circuits)'] / least[floor_name]:.2f}x")
        check_quarter = median[f"check, quarter ({n_quarter} circuits)"]
        print(f"for {2061 / n_quarter:.1f}x the circuits, check costs "
              f"{_growth(check_full, check_quarter, floor)} the time above the floor, "
              f"{_growth(check_full, check_quarter, median[fixed_name])} the time above the "
              "fixed cost (medians)")
        peak = peak_rss_mb([*exe, "check", str(full), "--json"])
        print(f"peak memory, check full: {peak:.0f} MB")

        print(f"\ndeep and wide trees, check --json (median of {ROUNDS} rounds in turns):")
        for label, make in (("chain", chain), ("wide board", wide)):
            paths = {n: Path(tmp) / f"{label.replace(' ', '-')}-{n}.toml" for n in (1250, 5000)}
            sizes = {}
            for n, path in paths.items():
                path.write_text(make(n))
                sizes[n] = [*exe, "check", str(path), "--json"]
            runs = in_turns({str(n): cmd for n, cmd in sizes.items()}, ROUNDS)
            for n in sizes:
                print(f"  {label} of {n:,}: {statistics.median(runs[str(n)][0]):.3f} s "
                      f"(exit {runs[str(n)][1]})")
            # growth of the work itself, in one process (a process's start is the same for both
            # sizes, and differences of whole processes drown in the machine's drift)
            growth = []
            for _ in range(ROUNDS):  # the two sizes in turn; the ratio of each round's pair
                work = {n: sum(v for k, v in in_process(path).items()
                               if k not in ("pairs", "tables")) for n, path in paths.items()}
                growth.append(work[5000] / work[1250])
            print(f"  {label}: 4x the circuits cost {statistics.median(growth):.2f}x the time of "
                  f"the work in one process (load to JSON; median of {ROUNDS} rounds, from "
                  f"{min(growth):.2f}x to {max(growth):.2f}x)")

        print("\nin process (first run, cold caches, no cyclic GC as in the command; tables: both "
              "text tables of check; json: the JSON of check --json):")
        for label, path in (("quarter", quarter), ("full", full)):
            stages = in_process(path)
            print(f"  {label:8} " + "  ".join(
                f"{k} {v:.3f} s" if k != "pairs" else f"{int(v)} pairs" for k, v in stages.items()))


if __name__ == "__main__":
    main()
