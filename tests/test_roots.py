"""The bracketing root-finder (coordination.roots): analytic roots and a reference library."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from coordination.roots import find_crossing


def counted(f):
    """f, and a list whose length is the number of points it was evaluated at."""
    seen: list[float] = []

    def g(x):
        x = np.asarray(x, dtype=np.float64)
        seen.extend(np.ravel(x).tolist())
        return f(x)

    return g, seen


# Analytic roots: sqrt(2), ln 5, the cube root of 10, pi (zero of sin), 1 / e (zero of ln x + 1).
SMOOTH = [
    ("x^2 - 2", lambda x: x * x - 2.0, 0.0, 2.0, math.sqrt(2.0)),
    ("exp(x) - 5", lambda x: np.exp(x) - 5.0, 0.0, 3.0, math.log(5.0)),
    ("x^3 - 10", lambda x: x**3 - 10.0, 1.0, 4.0, 10.0 ** (1.0 / 3.0)),
    ("-sin(x)", lambda x: -np.sin(x), 2.0, 4.0, math.pi),
    ("ln(x) + 1", lambda x: np.log(x) + 1.0, 0.1, 1.0, 1.0 / math.e),
]


# analytic roots (mathematical identities)
@pytest.mark.parametrize(("name", "f", "a", "b", "root"), SMOOTH, ids=[c[0] for c in SMOOTH])
def test_smooth_functions_reach_their_analytic_root(name, f, a, b, root):
    lo, hi = find_crossing(f, a, b, xtol=1e-13)
    assert float(hi) - float(lo) <= 1e-13
    assert float(lo) <= root + 1e-15
    assert float(hi) >= root - 1e-15
    assert float(lo) == pytest.approx(root, rel=0.0, abs=1e-13)


# the same roots from a general-purpose reference library (scipy.optimize.brentq)
@pytest.mark.parametrize(("name", "f", "a", "b", "root"), SMOOTH, ids=[c[0] for c in SMOOTH])
def test_agrees_with_a_reference_library(name, f, a, b, root):
    reference = brentq(lambda x: float(f(np.array(x))), a, b, xtol=1e-14, rtol=1e-15)
    lo, hi = find_crossing(f, a, b, xtol=1e-13)
    assert float(lo) == pytest.approx(reference, rel=0.0, abs=1e-13)
    assert float(hi) == pytest.approx(reference, rel=0.0, abs=1e-13)


# a step function's only crossing is the step itself (analytic)
@pytest.mark.parametrize("step", [0.3, 1.2345, 2.0, 2.9999])
def test_a_step_is_found_to_the_tolerance_in_bisection_time(step):
    g, seen = counted(lambda x: np.where(x > step, 3.0, -2.0))
    lo, hi = find_crossing(g, 0.0, 3.0, xtol=1e-12)
    assert float(lo) <= step < float(hi)
    assert float(hi) - float(lo) <= 1e-12
    bisections = math.ceil(math.log2(3.0 / 1e-12))
    assert len(seen) <= 2 + 2 * bisections  # never much slower than bisection


# a straight piece beside a flat one (an edge meeting a definite-time floor): the root is where
# the straight piece crosses zero (analytic), found in a few steps, not by bisection
@pytest.mark.parametrize("flat", [-1.0, -1e6])
def test_a_kinked_function_converges_in_few_steps(flat):
    g, seen = counted(lambda x: np.maximum(flat, 5.0 * (x - 3.004)))
    lo, hi = find_crossing(g, 3.0, 3.01, xtol=1e-13)
    assert float(lo) <= 3.004 <= float(hi)
    assert float(hi) - float(lo) <= 1e-13
    assert len(seen) <= 12


def test_many_brackets_at_once_agree_with_one_at_a_time():
    rng = np.random.default_rng(7)
    roots = rng.uniform(0.5, 5.5, 40)
    slopes = rng.uniform(0.2, 30.0, 40)
    kinds = np.arange(40) % 3

    def one(k: int, x: np.ndarray) -> np.ndarray:
        d = x - roots[k]
        if kinds[k] == 0:
            return slopes[k] * d * (1.0 + 0.1 * d * d)  # smooth
        if kinds[k] == 1:
            return np.maximum(-1.0, slopes[k] * d)  # kinked
        return np.where(d > 0, slopes[k], -1.0)  # step

    # problem k lives on [10 k, 10 k + 6]: a value tells which problem it belongs to (the
    # vectorised search evaluates only the brackets still open)
    shift = 10.0 * np.arange(40)

    def batch(x: np.ndarray) -> np.ndarray:
        k = (x // 10.0).astype(int)
        return np.array([one(j, np.array([v - 10.0 * j]))[0] for j, v in zip(k, x, strict=True)])

    lo_b, hi_b = find_crossing(batch, shift, shift + 6.0, xtol=1e-11)
    for k in range(40):
        lo_s, hi_s = find_crossing(lambda x, k=k: one(k, x), 0.0, 6.0, xtol=1e-11)
        assert lo_b[k] - shift[k] == pytest.approx(float(lo_s), rel=0.0, abs=1e-10)
        assert hi_b[k] - shift[k] == pytest.approx(float(hi_s), rel=0.0, abs=1e-10)
        assert lo_b[k] - shift[k] - 1e-12 <= roots[k] <= hi_b[k] - shift[k] + 1e-12


def test_shapes_broadcast_and_scalars_work():
    # brackets [0, 5], [10, 15], [20, 25] around 1, 12, 23 (analytic): g = x - (11 k + 1)
    lo, hi = find_crossing(lambda x: x - (11.0 * (x // 10.0) + 1.0), np.array([0.0, 10.0, 20.0]),
                           np.array([5.0, 15.0, 25.0]))
    assert lo.shape == (3,) and hi.shape == (3,)
    assert np.allclose(lo, [1.0, 12.0, 23.0], rtol=0.0, atol=1e-13)
    assert np.all(hi - lo <= 1e-13)
    lo1, hi1 = find_crossing(lambda x: x - 1.5, 0.0, 4.0)
    assert lo1.shape == () and hi1.shape == ()
    assert float(lo1) == pytest.approx(1.5, rel=0.0, abs=1e-13)


def test_an_end_already_at_zero_counts_as_the_selective_side():
    # g(a) = 0 exactly: the crossing to g > 0 is at a itself (analytic)
    lo, hi = find_crossing(lambda x: x - 1.0, 1.0, 2.0, xtol=1e-13)
    assert float(lo) == 1.0
    assert float(hi) - 1.0 <= 1e-13


@settings(max_examples=50, deadline=None)
@given(root=st.floats(0.01, 5.99), slope=st.floats(0.01, 100.0),
       kind=st.sampled_from(["line", "kink", "step", "cubic"]))
def test_the_final_bracket_always_straddles_the_root(root, slope, kind):
    def g(x):
        if kind == "line":
            return slope * (x - root)
        if kind == "kink":
            return np.minimum(np.maximum(-2.0, slope * (x - root)), 1.0)
        if kind == "step":
            return np.where(x > root, slope, -slope)
        return (x - root) ** 3

    lo, hi = find_crossing(g, 0.0, 6.0, xtol=1e-12)
    assert float(hi) - float(lo) <= 1e-12
    assert float(g(np.array(float(lo)))) <= 0.0 < float(g(np.array(float(hi))))
    assert float(lo) - 1e-12 <= root <= float(hi) + 1e-12
