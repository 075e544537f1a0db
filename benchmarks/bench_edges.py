"""Benchmark: one million edge evaluations per device family (not collected by pytest).

Run from the repository root::

    python -m benchmarks.bench_edges [--points 1000000] [--repeat 5]

Prints, per family, the best time of ``--repeat`` runs for ``t_min`` and ``t_max`` over
``--points`` currents spread log-uniformly from 1 A to 100 kA. Families whose module is missing
are reported as skipped. The devices are invented settings, not products.
"""

from __future__ import annotations

import argparse
import time
from collections.abc import Callable

import numpy as np

from curves.band import Band
from curves.spec import band_from_spec

DEVICES: dict[str, object] = {
    "mcb (C16)": "C16",
    "gG (gG100)": "gG100",
    "aM (aM32)": "aM32",
    "breaker-tm": {"family": "tm", "In_a": 250, "Ir_x": 0.8, "Ii_x": 10},
    "breaker-electronic": {"family": "electronic", "In_a": 630, "Ir_x": 0.8, "tr_s": 8,
                           "Isd_x": 6, "tsd_s": 0.2, "sd_i2t": True, "Ii_x": 12},
    "datasheet (13 points)": {
        "family": "datasheet", "In_a": 100,
        "lower": [[120, 3600], [150, 1000], [200, 200], [300, 60], [500, 10], [1000, 0.5],
                  [1500, 0.01]],
        "upper": [[150, 7200], [200, 1500], [300, 300], [500, 40], [1000, 4], [2000, 0.05]],
    },
}


def best_of(fn: Callable[[np.ndarray], np.ndarray], current: np.ndarray, repeat: int) -> float:
    """Best wall time of ``repeat`` calls [s]."""
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        fn(current)
        best = min(best, time.perf_counter() - start)
    return best


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--points", type=int, default=1_000_000)
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()
    current = np.geomspace(1.0, 1e5, args.points)
    print(f"{args.points:,} currents, best of {args.repeat}")
    print(f"{'family':<24}{'t_min [ms]':>12}{'t_max [ms]':>12}{'ns/point':>10}")
    for label, spec in DEVICES.items():
        try:
            band: Band = band_from_spec(spec, basis="envelope")
        except ImportError as error:
            print(f"{label:<24}skipped ({error})")
            continue
        lo = best_of(band.t_min, current, args.repeat)
        hi = best_of(band.t_max, current, args.repeat)
        per = (lo + hi) / 2 / args.points * 1e9
        print(f"{label:<24}{lo * 1e3:>12.1f}{hi * 1e3:>12.1f}{per:>10.1f}")


if __name__ == "__main__":
    main()
