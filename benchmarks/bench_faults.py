"""Benchmark: fault levels of a generated 2,061-circuit invented building (not collected by pytest).

Run from the repository root::

    python -m benchmarks.bench_faults

Times loading (TOML parsing, validation, band building) and ``faults.compute`` separately; the
fault computation itself should take well under a second. A 5,000-deep chain is timed too.
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from benchmarks.generate import building, chain  # noqa: E402
from coordination import faults, study  # noqa: E402

REPEATS = 7


def timed(label: str, text: str, tmp: Path) -> float:
    path = tmp / f"{label}.toml"
    path.write_text(text, encoding="utf-8")
    t0 = time.perf_counter()
    s = study.load(path)
    load_s = time.perf_counter() - t0
    runs = []
    for _ in range(REPEATS):
        faults._own.cache_clear()  # cold per-cable cache each time: the full computation
        t0 = time.perf_counter()
        levels = faults.compute(s)
        runs.append(time.perf_counter() - t0)
    best, median = min(runs), statistics.median(runs)
    print(f"{label:28} {len(s.circuits):6d} circuits  load {load_s:7.3f} s  "
          f"faults best {best * 1000:7.1f} ms  median {median * 1000:7.1f} ms  "
          f"(deepest Zs {levels.nodes[-1].zs_ohm:.3g} ohm)")
    return median


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        full = timed("building (10 x 5 x 40)", building(10, 5, 40), folder)
        timed("chain of 5,000", chain(5000), folder)
    verdict = "well under a second" if full < 0.25 else "SLOWER than intended"
    print(f"2,061-circuit fault levels: {full * 1000:.1f} ms median ({verdict})")


if __name__ == "__main__":
    main()
