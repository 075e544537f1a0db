"""Benchmarks, the generator of invented installations, and the output snapshot (not tests).

Run each from the repository root as a module, e.g. ``python -m benchmarks.bench_all``; the
figures they print are the ones quoted in docs/performance.md.
"""
