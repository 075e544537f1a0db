"""`curves.band.sorted_unique`: what numpy's own ``np.unique`` gives, without importing numpy.ma."""

from __future__ import annotations

import subprocess
import sys

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from curves.band import sorted_unique

# general-purpose reference library: numpy's np.unique
FLOATS = st.floats(allow_nan=True, allow_infinity=True, width=64)
SMALL = st.sampled_from([0.0, -0.0, 1.0, 2.5, np.inf, -np.inf, np.nan])


@settings(max_examples=200, deadline=None)
@given(arrays(np.float64, st.integers(0, 40), elements=FLOATS | SMALL))
def test_same_as_numpy_unique(values):
    got = sorted_unique(values)
    expected = np.unique(values)
    np.testing.assert_array_equal(got, expected)  # NaN equals NaN here; one NaN at most
    assert got.dtype == np.float64


def test_two_dimensional_and_list_input_are_flattened():
    np.testing.assert_array_equal(sorted_unique([[3.0, 1.0], [1.0, 2.0]]), [1.0, 2.0, 3.0])
    assert sorted_unique([]).size == 0


def test_does_not_import_numpy_ma():
    code = ("import sys; from curves.band import sorted_unique; sorted_unique([2.0, 1.0, 2.0]); "
            "print('numpy.ma' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=60)
    assert out.stdout.strip() == "False"
