"""IEC 60269-2 aM fuse-links (short-circuit protection of motor circuits) as bands.

An aM fuse-link has a partial-range breaking capacity: it is meant to break short-circuit
currents only and gives NO overload protection (an overload relay or similar device must clear
overloads; :func:`curves.relay.combined_band` joins the two). Its time-current zone starts at
about 4 In: from memory, IEC 60269-2 states no melting within 60 s at 4 In and melting within
60 s at 6.3 In, with further gates at short times (``curves/data/am_gates_iec60269.csv``, every
row from memory). The same machinery as the gG fuse-links builds the band
(:class:`curves.fuse.GGEnvelope`, :func:`curves.fuse.gg_nominal`).

``envelope``
    * Lower edge (minimum pre-arcing): ``inf`` at and below In (the rated current is carried
      continuously, common practice); 60 s from just above In up to 4 In (the 4 In gate taken
      back to In: no value below 4 In is known to us, so nothing longer is claimed); then log-log
      through the lower gates (8 In, 0.5 s), (12.5 In, 0.1 s) down to 0.01 s, and
      ``I2t_pre_min / I^2`` below.
    * Upper edge (maximum operating): ``inf`` below 6.3 In; log-log through (6.3 In, 60 s),
      (19 In, 0.1 s) down to 0.01 s, then ``I2t_op_max / I^2``. Log-log between the gates is
      assumed, as for gG fuse-links; the arcing time is neglected at the gates.
    * I2t at 0.01 s (modelling choice, derived, not a value of the standard):
      ``I2t_pre_min = 0.04 s x (12.5 In)^2`` and ``I2t_op_max = 0.04 s x (19 In)^2``, the ratio
      ``I2t / I(0.1 s)^2`` of about 0.04 s that the gG table shows at both its lower and its upper
      0.1 s gate (see the header of ``curves/data/gg_gates_iec60269.csv``).

``typical``
    The log-middle in current of the envelope at every time from 60 s down to 0.01 s, +/-10 % in
    current (as gG fuse-links, from memory); below the nominal 60 s current (about 4.5 In at its
    lower edge) the typical fuse-link does not melt; in the energy region the envelope's edges.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from curves.band import Band
from curves.fuse import (
    DEFAULT_BREAKING_CAPACITY_A,
    GG_RATINGS_A,
    I2T_TIME_S,
    TYPICAL_TOLERANCE,
    GGEnvelope,
    fuse_let_through,
    gg_envelope_lower,
    gg_envelope_upper,
    gg_nominal,
    gg_nominal_time,
)
from curves.mcb import read_data_table
from curves.validate import in_series, known_basis, positive_number

#: Rated currents In [A] of aM fuse-links: the preferred series of IEC 60269-1 shared with gG
#: fuse-links (common practice).
AM_RATINGS_A = GG_RATINGS_A

#: The gates' common time at the start of the zone [s] (IEC 60269-2, from memory).
AM_GATE_TIME_S = 60.0

#: Equivalent time [s] giving the I2t limits at 0.01 s from the 0.1 s gates:
#: ``I2t = AM_I2T_RATIO_S x I(0.1 s)^2`` (modelling choice; about the gG table's ratio).
AM_I2T_RATIO_S = 0.04


@lru_cache(maxsize=1)
def am_gates() -> tuple[tuple[tuple[float, float], ...], tuple[tuple[float, float], ...]]:
    """The aM gates as ((multiple of In, time [s]), ...) for the lower and the upper edge.

    References
    ----------
    IEC 60269-2, aM gates (every value from memory; statuses in
    ``curves/data/am_gates_iec60269.csv``).

    Examples
    --------
    >>> print(am_gates()[1])
    ((6.3, 60.0), (19.0, 0.1))
    """
    rows = read_data_table("am_gates_iec60269.csv")
    lower = tuple(sorted((float(r["multiple_x"]), float(r["time_s"]))
                         for r in rows if r["edge"] == "lower"))
    upper = tuple(sorted((float(r["multiple_x"]), float(r["time_s"]))
                         for r in rows if r["edge"] == "upper"))
    return lower, upper


@lru_cache(maxsize=64)
def am_envelope(rating_a: float) -> GGEnvelope:
    """The envelope numbers of an aM rating, in the gG envelope's form.

    The first gate of each edge (4 In and 6.3 In at 60 s) takes the place of the gG conventional
    currents, 60 s of the conventional time.

    Examples
    --------
    >>> env = am_envelope(100.0)
    >>> print(round(env.pre_min_a2s), round(env.i_op_a))
    62500 3800
    """
    lower, upper = am_gates()
    x_pre_01 = next(x for x, t in lower if t == 0.1)
    x_op_01 = next(x for x, t in upper if t == 0.1)
    pre_min = AM_I2T_RATIO_S * (x_pre_01 * rating_a) ** 2
    op_max = AM_I2T_RATIO_S * (x_op_01 * rating_a) ** 2
    i_pre = math.sqrt(pre_min / I2T_TIME_S)
    i_op = math.sqrt(op_max / I2T_TIME_S)
    lower_i = [x * rating_a for x, _ in lower] + [i_pre]
    lower_t = [t for _, t in lower] + [I2T_TIME_S]
    upper_i = [x * rating_a for x, _ in upper] + [i_op]
    upper_t = [t for _, t in upper] + [I2T_TIME_S]
    return GGEnvelope(
        rating_a=float(rating_a),
        non_fusing_a=lower[0][0] * rating_a,
        fusing_a=upper[0][0] * rating_a,
        conventional_time_s=AM_GATE_TIME_S,
        pre_min_a2s=pre_min,
        op_max_a2s=op_max,
        i_pre_a=i_pre,
        i_op_a=i_op,
        lower_ln_i=np.log(lower_i),
        lower_ln_t=np.log(lower_t),
        upper_ln_i=np.log(upper_i),
        upper_ln_t=np.log(upper_t),
    )


def am_envelope_lower(current_a: np.ndarray, env: GGEnvelope) -> np.ndarray:
    """Minimum pre-arcing time [s]: ``inf`` at and below In, 60 s up to 4 In, then the gates.

    References
    ----------
    IEC 60269-2, aM gates (from memory); rated current carried continuously (common practice).

    Examples
    --------
    >>> env = am_envelope(63.0)
    >>> print(am_envelope_lower(np.array([63.0, 120.0, 252.0, 504.0]), env).round(3).tolist())
    [inf, 60.0, 60.0, 0.5]
    """
    i = np.asarray(current_a, dtype=np.float64)
    t = gg_envelope_lower(i, env)
    t = np.where(i < env.non_fusing_a, AM_GATE_TIME_S, t)
    return np.where(i <= env.rating_a, np.inf, t)


def am_band(rating_a: float, *, basis: str = "typical",
            breaking_capacity_a: float | None = None) -> Band:
    """An IEC 60269-2 aM fuse-link as a band.

    Parameters
    ----------
    rating_a : float
        Rated current In [A], one of :data:`AM_RATINGS_A`.
    basis : str
        ``"typical"`` or ``"envelope"``.
    breaking_capacity_a : float, optional
        Rated breaking capacity [A]; default 50 kA (the gG default, from memory), noted.

    Returns
    -------
    Band
        Family ``"aM"``; ``pre_arcing_i2t_min_a2s`` and ``let_through`` from the derived I2t
        limits; ``pickup_min_a`` In (envelope) or the typical 60 s current (about 4.5 In).

    Raises
    ------
    InputError
        Rating not in the series (key ``In_a``), bad breaking capacity
        (``breaking_capacity_a``), unknown basis (``basis``).

    References
    ----------
    IEC 60269-2, aM gates (from memory); IEC 60269-1, utilization category "a" (partial-range
    breaking capacity).

    Examples
    --------
    >>> band = am_band(100, basis="envelope")
    >>> print(round(float(band.t_min(400.0)), 6), round(float(band.t_max(630.0)), 6))
    60.0 60.0
    """
    rating = in_series(rating_a, AM_RATINGS_A, key="In_a", what="rated current",
                       standard="IEC 60269 aM")
    notes = [
        "aM: short-circuit protection only, no overload protection; an overload device must "
        "clear every current below the fuse's breaking range (IEC 60269-1 category a)",
        "aM gates from memory (4 In / 6.3 In at 60 s; 8 In 0.5 s, 12.5 In and 19 In 0.1 s); I2t "
        "limits derived as 0.04 s x I(0.1 s)^2 (modelling choice)",
    ]
    if breaking_capacity_a is None:
        breaking = DEFAULT_BREAKING_CAPACITY_A
        notes.append(f"breaking capacity not given: {breaking / 1000:g} kA assumed (from memory)")
    else:
        breaking = positive_number("breaking_capacity_a", breaking_capacity_a)
    basis = known_basis(basis, ("typical", "envelope"))
    env = am_envelope(rating)
    op = env.op_max_a2s

    if basis == "envelope":

        def lower(i: np.ndarray) -> np.ndarray:
            return am_envelope_lower(i, env)

        def upper(i: np.ndarray) -> np.ndarray:
            return gg_envelope_upper(i, env)

        pickup_min, pickup_max = rating, env.fusing_a
        notes.append("envelope: may melt after 60 s anywhere above In (no value below 4 In is "
                     "known); log-log between the gates (assumed)")
    else:
        nom = gg_nominal(env)
        shrink, widen = 1.0 / (1.0 - TYPICAL_TOLERANCE), 1.0 / (1.0 + TYPICAL_TOLERANCE)

        def lower(i: np.ndarray) -> np.ndarray:
            t_nom = gg_nominal_time(i * shrink, env, nom)
            return np.where(t_nom > 0.0, t_nom, am_envelope_lower(i, env))

        def upper(i: np.ndarray) -> np.ndarray:
            with np.errstate(divide="ignore"):
                floor = np.minimum(I2T_TIME_S, op / (i * i))
            return np.maximum(gg_nominal_time(i * widen, env, nom), floor)

        pickup_min = nom.i_conv_a * (1.0 - TYPICAL_TOLERANCE)
        pickup_max = nom.i_conv_a * (1.0 + TYPICAL_TOLERANCE)
        notes.append(f"typical: log-middle of the aM zone, +/-{TYPICAL_TOLERANCE:.0%} in current; "
                     f"no melting below {pickup_min / rating:.3g} In (modelling choice)")

    let_through = fuse_let_through(op, upper)
    return Band(
        name=f"aM{rating:g}",
        family="aM",
        basis=basis,
        rating_a=rating,
        pickup_min_a=pickup_min,
        pickup_max_a=pickup_max,
        conventional_time_s=AM_GATE_TIME_S,
        lower=lower,
        upper=upper,
        let_through=let_through,
        pre_arcing_i2t_min_a2s=env.pre_min_a2s,
        breaking_capacity_a=breaking,
        settings={"In_a": int(rating) if rating.is_integer() else rating,
                  "breaking_capacity_a": breaking},
        key=("aM", rating, breaking, basis),
        notes=tuple(notes),
    )
