"""Input checks the device families share: one function per kind of check.

Each returns the checked value as the family uses it, or raises
:class:`~curves.errors.InputError` naming the key and what is allowed. Booleans are refused
wherever a number is meant, although Python counts them as numbers; numpy scalars are accepted.

* :func:`real`: a real number as float, or None (the building block of the others);
* :func:`positive_number`: a finite number above 0 (or at 0, where allowed);
* :func:`known_basis`: one of a family's bases;
* :func:`in_series`: a value of a standard series (ratings, rated short-circuit capacities);
* :func:`on_grid`: a setting on an adjustable unit's grid;
* :func:`curve_points`: ``[[current, value], ...]`` pairs, currents rising, values monotone.
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Sequence
from itertools import pairwise
from typing import Any

from curves.errors import InputError


def real(value: Any) -> float | None:
    """A real number as float; None for anything else (text, a boolean, None).

    An integer too large for a float gives an infinity of its sign, which the finite checks
    then refuse.

    Examples
    --------
    >>> print(real(32), real(True), real("32"), real(10**400))
    32.0 None None inf
    """
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        return None
    try:
        return float(value)
    except OverflowError:
        return math.inf if value > 0 else -math.inf


def values_text(values: Sequence[float]) -> str:
    """Allowed values as a message lists them: ``"6, 10, 13"``.

    Examples
    --------
    >>> print(values_text((0.5, 1.0, 2.0)))
    0.5, 1, 2
    """
    return ", ".join(f"{v:g}" for v in values)


def positive_number(key: str, value: Any, *, allow_zero: bool = False) -> float:
    """A finite number above 0 (at or above 0 with ``allow_zero``), or InputError naming the key.

    Examples
    --------
    >>> print(positive_number("In_a", 32))
    32.0
    >>> positive_number("icu_a", True)
    Traceback (most recent call last):
    ...
    curves.errors.InputError: key 'icu_a': icu_a must be a number, not True
    """
    number = real(value)
    if number is None:
        raise InputError(f"{key} must be a number, not {value!r}", key=key)
    if not math.isfinite(number) or number < 0 or (number == 0 and not allow_zero):
        allowed = "a finite number >= 0" if allow_zero else "a finite positive number"
        raise InputError(f"{key} = {number:g} is not allowed; give {allowed}", key=key)
    return number


def known_basis(value: Any, allowed: Sequence[str]) -> str:
    """One of the bases a family offers, or InputError (key ``basis``) naming them.

    Examples
    --------
    >>> print(known_basis("envelope", ("typical", "envelope")))
    envelope
    """
    if not isinstance(value, str) or value not in allowed:
        raise InputError(f"unknown basis {value!r}; allowed: {', '.join(allowed)}", key="basis")
    return value


def _match(value: float, grid: Sequence[float], rel_tol: float, abs_tol: float) -> float | None:
    for g in grid:
        if math.isclose(value, g, rel_tol=rel_tol, abs_tol=abs_tol):
            return float(g)
    return None


def in_series(value: Any, series: Sequence[float], *, key: str, what: str,
              standard: str) -> float:
    """A value of a standard series [A], as the series gives it, or InputError listing it.

    Parameters
    ----------
    value : float
        The value given.
    series : sequence of float
        The allowed values (ratings In, rated short-circuit capacities) [A].
    key : str
        The key the value came from (``"In_a"``, ``"icn_a"``).
    what : str
        What the value is, in words (``"rated current"``).
    standard : str
        Whose series it is (``"IEC 60898-1"``, ``"breaker"``).

    Examples
    --------
    >>> print(in_series(32, (16, 32, 63), key="In_a", what="rated current", standard="MCB"))
    32.0
    """
    allowed = values_text(series)
    number = real(value)
    if number is None or not math.isfinite(number):
        raise InputError(f"{what} {value!r} is not a finite number; allowed ({standard} "
                         f"series): {allowed} A", key=key)
    found = _match(number, series, 1e-9, 0.0)
    if found is None:
        raise InputError(f"{what} {number:g} A is not in the {standard} series; allowed: "
                         f"{allowed} A", key=key)
    return found


def on_grid(key: str, value: float, grid: Sequence[float], what: str) -> float:
    """A setting on an adjustable unit's grid (within 1 ppm), as the grid gives it.

    Parameters
    ----------
    key : str
        The setting's key (``"tr_s"``).
    value : float
        The setting, already a number (see :func:`positive_number`).
    grid : sequence of float
        The settings the unit offers.
    what : str
        What the setting is, for the message (``"(time at 6 Ir, s)"``).

    Examples
    --------
    >>> print(on_grid("tsd_s", 0.2, (0.1, 0.2, 0.3), "(s)"))
    0.2
    """
    found = _match(value, grid, 1e-6, 1e-9)
    if found is None:
        raise InputError(f"{key} = {value:g} is not a setting {what}; allowed: "
                         f"{values_text(grid)}", key=key)
    return found


def curve_points(key: str, value: Any, *, rising: bool = False) -> tuple[tuple[float, float], ...]:
    """``[[current_a, value], ...]`` pairs: at least two, positive and finite, currents strictly
    increasing, values never rising (times) or, with ``rising``, never falling (energies).

    Parameters
    ----------
    key : str
        The key the points came from (``"lower"``, ``"let_through_a2s"``); a bad number names
        its point (``"lower[1]"``).
    value : sequence of pairs
        The points as given.
    rising : bool
        False: values never rise with current. True: values never fall.

    Returns
    -------
    tuple of (float, float)
        The points as floats.

    Examples
    --------
    >>> print(curve_points("let_through_a2s", [[3000, 20000], [10000, 120000]], rising=True))
    ((3000.0, 20000.0), (10000.0, 120000.0))
    """
    shape = "a list of [current_a, value] pairs, e.g. [[100, 10.0], [1000, 0.1]]"
    if isinstance(value, str | bytes) or not isinstance(value, Sequence):
        raise InputError(f"{key} must be {shape}, not {value!r}", key=key)
    if len(value) < 2:
        raise InputError(f"{key} needs at least two points; give {shape}", key=key)
    rows: list[tuple[float, float]] = []
    for n, pair in enumerate(value):
        where = f"{key}[{n}]"
        if isinstance(pair, str | bytes) or not isinstance(pair, Sequence) or len(pair) != 2:
            raise InputError(f"{where} must be a [current_a, value] pair, not {pair!r}", key=key)
        rows.append((positive_number(where, pair[0]), positive_number(where, pair[1])))
    pairs = list(enumerate(pairwise(rows), start=1))
    for n, ((i0, _), (i1, _)) in pairs:
        if i1 <= i0:
            raise InputError(f"{key}[{n}]: currents must strictly increase ({i0:g} A then "
                             f"{i1:g} A)", key=key)
    for n, ((_, v0), (_, v1)) in pairs:
        if (v1 < v0) if rising else (v1 > v0):
            word = "never fall" if rising else "never rise"
            raise InputError(f"{key}[{n}]: values must {word} with current ({v0:g} then "
                             f"{v1:g})", key=key)
    return tuple(rows)
