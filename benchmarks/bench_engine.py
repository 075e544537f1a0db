"""Benchmark of the overlap engine on an invented 2,061-circuit building (not collected by pytest).

Run from the repository root::

    python -m benchmarks.bench_engine [--risers 10 --boards 5 --finals 40 --repeats 5]

The building (an incomer, risers, boards on each riser, final circuits on each board) is invented
(benchmarks/generate.py). It is loaded through ``coordination.study.loads`` and its fault levels
come from ``coordination.faults.compute``; where those modules are not importable yet, the study is
built from the model dataclasses directly and the fault levels are an invented stand-in falling
with depth, so that the engine alone can still be timed.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path
from types import SimpleNamespace

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from coordination import engine, tables  # noqa: E402
from coordination import pair as pair_test  # noqa: E402
from coordination.devices import _band  # noqa: E402
from coordination.model import Circuit, Study, Supply  # noqa: E402

FINAL_DEVICES = ("B6", "B10", "B16", "B20", "C16", "B32", "C20", "B16")


def build_direct(risers: int, boards: int, finals: int) -> Study:
    """The same invented building from the model dataclasses (no study loader needed)."""
    circuits = [Circuit("incomer", "supply", "gG1250", board="main switchboard")]
    for r in range(risers):
        rid = f"riser-{r + 1}"
        circuits.append(Circuit(rid, "incomer", "gG315", board=f"riser {r + 1}"))
        for b in range(boards):
            bid = f"{rid}-db{b + 1}"
            circuits.append(Circuit(bid, rid, "gG100", board=f"DB {r + 1}.{b + 1}"))
            for f in range(finals):
                circuits.append(Circuit(f"{bid}-c{f + 1}", bid,
                                        FINAL_DEVICES[f % len(FINAL_DEVICES)], phases=1))
    return Study("Invented building", Supply(pfc_a=25_000.0), tuple(circuits))


def stand_in_levels(study: Study) -> SimpleNamespace:
    """Invented fault levels: 25 kA at the origin, falling with depth (stand-in only)."""
    top = {0: 25_000.0, 1: 22_000.0, 2: 12_000.0, 3: 6_000.0}
    return SimpleNamespace(by_circuit={
        c.id: SimpleNamespace(ik_max_a=top[len(study.ancestors(c.id))]) for c in study.circuits})


def make_study(risers: int, boards: int, finals: int) -> tuple[Study, object, str]:
    try:
        from benchmarks.generate import building
        from coordination import study as loader

        s = loader.loads(building(risers, boards, finals))
        how = "study.loads"
    except Exception as error:  # the loader may not be ready: build the same tree directly
        print(f"(study.loads unavailable: {type(error).__name__}: {error}; building directly)")
        s = build_direct(risers, boards, finals)
        how = "model dataclasses"
    try:
        from coordination import faults

        levels = faults.compute(s)
        how += " + faults.compute"
    except Exception as error:
        print(f"(faults.compute unavailable: {type(error).__name__}: {error}; stand-in levels)")
        levels = stand_in_levels(s)
        how += " + stand-in fault levels"
    return s, levels, how


def clear_caches() -> None:
    _band.cache_clear()
    pair_test._first_crossing.cache_clear()
    pair_test.decide.cache_clear()


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--risers", type=int, default=10)
    ap.add_argument("--boards", type=int, default=5)
    ap.add_argument("--finals", type=int, default=40)
    ap.add_argument("--repeats", type=int, default=5)
    args = ap.parse_args()

    s, levels, how = make_study(args.risers, args.boards, args.finals)
    print(f"study: {len(s.circuits)} circuits ({how})")

    cold = []
    for _ in range(args.repeats):
        clear_caches()
        t0 = time.perf_counter()
        analysis = engine.analyse(s, levels)
        cold.append(time.perf_counter() - t0)
    crossings = pair_test._first_crossing.cache_info()
    compares = pair_test.decide.cache_info()
    warm = []
    for _ in range(args.repeats):
        t0 = time.perf_counter()
        engine.analyse(s, levels)
        warm.append(time.perf_counter() - t0)
    t0 = time.perf_counter()
    text = tables.pair_table(s, levels, analysis)
    t_table = time.perf_counter() - t0
    t0 = time.perf_counter()
    analysis.to_json()
    t_json = time.perf_counter() - t0

    summary = analysis.summary()
    print(f"pairs: {summary['pairs']} (total {summary['total']}, partial {summary['partial']}, "
          f"none {summary['none']}, unmet {summary['unmet']})")
    print(f"distinct crossing searches: {crossings.misses}; distinct pair windows: "
          f"{compares.misses} of {compares.hits + compares.misses} compare calls")
    print(f"analyse, cold caches: median {statistics.median(cold):.3f} s "
          f"(min {min(cold):.3f}, max {max(cold):.3f})")
    print(f"analyse, warm caches: median {statistics.median(warm):.3f} s")
    print(f"format_table: {t_table:.3f} s ({len(text.splitlines())} lines); "
          f"to_json: {t_json:.3f} s")

    # one pair, cold: the cost of a crossing search and its refinement
    pair = next(p for p in analysis.pairs if p.verdict == "partial") if summary["partial"] else (
        analysis.pairs[0])
    from coordination.devices import band_for

    up, down = band_for(s, pair.upstream), band_for(s, pair.downstream)
    per = []
    for _ in range(20):
        pair_test._first_crossing.cache_clear()
        pair_test.decide.cache_clear()
        t0 = time.perf_counter()
        engine.compare(up, down, pair.window_a)
        per.append(time.perf_counter() - t0)
    print(f"one pair cold ({pair.downstream_device} under {pair.upstream_device}): "
          f"median {statistics.median(per) * 1000:.2f} ms")


if __name__ == "__main__":
    main()
