"""IEC 60269 gG fuse-links as :class:`~curves.band.Band`.

The data (``curves/data/gg_gates_iec60269.csv`` and ``gg_conventional_iec60269.csv``) give for
each rating the gates of the pre-arcing zone (Imin(10 s), Imax(5 s), Imin(0.1 s), Imax(0.1 s)),
the I2t limits at 0.01 s (minimum pre-arcing, maximum operating) and the conventional currents
and time. Two bases (the study chooses; the safety checks always take the envelope):

``envelope``
    The widest band the standard allows, piecewise linear in log-log between its points.

    * Lower edge (minimum pre-arcing): ``inf`` below the conventional non-fusing current
      (1.25 In for In >= 16 A); the conventional time at that current itself (IEC 60269-1: no
      fusing within the conventional time there); then log-log through (Imin(10 s), 10 s),
      (Imin(0.1 s), 0.1 s) and (sqrt(I2t_pre_min / 0.01 s), 0.01 s); beyond it constant energy,
      ``t = I2t_pre_min / I^2``. The edge passes continuously through every point the standard
      states. From 25 A up it is further held at or above the upper edge of the rating two steps
      below (1.6:1, :func:`minor_rating`): IEC 60269 requires gG fuse-links in the ratio 1.6:1
      to be selective (IEC 60269-1 selectivity of gG fuse-links; clause from memory), so no
      compliant fuse-link melts before a compliant one 1.6 times smaller has cleared. The gates
      alone would not show it between 10 s and 5 s (Imin(10 s) of the larger rating lies below
      Imax(5 s) of the smaller), which is why the requirement enters the envelope as a
      requirement of its own; the upper edge, which the safety checks use, is the gates' alone.
    * Upper edge (maximum operating): ``inf`` below the conventional fusing current (1.6 In);
      log-log through (fusing current, conventional time), (Imax(5 s), 5 s), (Imax(0.1 s),
      0.1 s), (sqrt(I2t_op_max / 0.01 s), 0.01 s); beyond it ``t = I2t_op_max / I^2``.
      The Imax gates are pre-arcing limits; the arcing time is neglected there.

    Guaranteed: the gates, the conventional currents and times and the I2t limits. Assumed: the
    zone between the gates is log-log linear (the characteristic of a fuse-link is smooth and
    lies in the standard's time-current zone; the straight log-log line between two gates is our
    reading of the zone's boundary, not a value of the standard). So in the energy region
    (below 0.01 s) ``t_min = I2t_pre_min / I^2`` and ``t_max = I2t_op_max / I^2`` exactly.

``typical``
    A nominal curve at the log-middle of the envelope at every time from the conventional time
    down to 0.01 s (through the geometric middles of the 0.1 s gate, of the 0.01 s I2t points and
    of the conventional currents), with +/-10 % in current (:data:`TYPICAL_TOLERANCE`, from
    memory); it lies inside the envelope because the envelope is at least 1.267:1 wide in
    current at every time. Above the conventional time the nominal curve is not drawn: below the
    nominal conventional current, ``sqrt(1.25 x 1.6) In``, the typical fuse-link does not melt
    (its edges are ``inf`` there, and the conventional time at that current). In the energy
    region the edges are the envelope's: the lower edge drops to ``I2t_pre_min / I^2`` where the
    shifted nominal reaches 0.01 s; the upper edge stays at 0.01 s until ``I2t_op_max / I^2``
    falls below it. With the standard's table this makes ratings two steps apart (1.6:1)
    selective everywhere.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache
from itertools import pairwise

import numpy as np

from curves.band import Band, as_current
from curves.laws import equivalent_time, loglog_interpolate
from curves.mcb import read_data_table
from curves.validate import in_series, known_basis, positive_number

#: Rated currents In [A] of gG fuse-links (IEC 60269-1 preferred values, common practice).
GG_RATINGS_A = (
    2, 4, 6, 8, 10, 12, 16, 20, 25, 32, 40, 50, 63, 80, 100, 125,
    160, 200, 250, 315, 400, 500, 630, 800, 1000, 1250,
)  # fmt: skip

#: The bases a standard-built gG band can have.
GG_BASES = ("typical", "envelope")

#: The time at which IEC 60269-2 gives the I2t limits of gG fuse-links [s] (from memory).
I2T_TIME_S = 0.01

#: Tolerance in current of the typical band, +/- fraction: manufacturers' curves are commonly
#: given with +/-10 % in current (from memory).
TYPICAL_TOLERANCE = 0.10

#: Rated breaking capacity assumed when none is given [A]: 50 kA, the least rated breaking
#: capacity of IEC 60269-2 (industrial) gG fuse-links at 400 V a.c. (from memory).
DEFAULT_BREAKING_CAPACITY_A = 50_000.0

#: Grid of the nominal curve between 0.01 s and the conventional time (points per band).
_NOMINAL_POINTS = 400


@dataclass(frozen=True)
class GGRow:
    """One rating of the gG table (IEC 60269-2 gates and I2t at 0.01 s).

    Attributes are prospective currents [A] and energies [A^2 s]; ``gates_status`` and
    ``i2t_status`` say "confirmed", "from memory" or "derived" as the data file does.
    """

    in_a: float
    imin_10s_a: float
    imax_5s_a: float
    imin_0_1s_a: float
    imax_0_1s_a: float
    i2t_pre_arcing_min_a2s: float
    i2t_operating_max_a2s: float
    gates_status: str
    i2t_status: str


@lru_cache(maxsize=1)
def gg_table() -> dict[float, GGRow]:
    """The gG table by rating, from ``curves/data/gg_gates_iec60269.csv``.

    References
    ----------
    IEC 60269-2, gate table of gG fuse-links and the I2t table at 0.01 s (statuses per row).

    Examples
    --------
    >>> print(gg_table()[100.0].imax_5s_a)
    580.0
    """
    rows = {}
    for r in read_data_table("gg_gates_iec60269.csv"):
        row = GGRow(
            in_a=float(r["in_a"]),
            imin_10s_a=float(r["imin_10s_a"]),
            imax_5s_a=float(r["imax_5s_a"]),
            imin_0_1s_a=float(r["imin_0_1s_a"]),
            imax_0_1s_a=float(r["imax_0_1s_a"]),
            i2t_pre_arcing_min_a2s=float(r["i2t_pre_arcing_min_a2s"]),
            i2t_operating_max_a2s=float(r["i2t_operating_max_a2s"]),
            gates_status=r["gates_status"],
            i2t_status=r["i2t_status"],
        )
        rows[row.in_a] = row
    return rows


@lru_cache(maxsize=1)
def _conventional_rows() -> tuple[tuple[str, float, float, float], ...]:
    return tuple(
        (r["quantity"], float(r["in_min_a"]), float(r["in_max_a"]), float(r["value"]))
        for r in read_data_table("gg_conventional_iec60269.csv")
    )


def gg_conventional(quantity: str, rating_a: float) -> float:
    """A conventional value of gG fuse-links for a rating.

    Parameters
    ----------
    quantity : str
        ``"non_fusing_current_x"``, ``"fusing_current_x"`` (multiples of In) or
        ``"conventional_time_s"`` [s].
    rating_a : float
        Rated current In [A].

    References
    ----------
    IEC 60269-1, 8.4.3.1, table of conventional times and currents (from memory; the 1..4 h
    range confirmed).

    Examples
    --------
    >>> print(gg_conventional("fusing_current_x", 100))
    1.6
    """
    for name, lo, hi, value in _conventional_rows():
        if name == quantity and lo <= rating_a <= hi:
            return value
    raise KeyError(f"no {quantity!r} for In = {rating_a:g} A in gg_conventional_iec60269.csv")


@dataclass(frozen=True)
class GGEnvelope:
    """The envelope of one gG rating as numbers: knots in (ln I, ln t) and the energy limits.

    Built once per band by :func:`gg_envelope`; the edge functions below read only these.
    """

    rating_a: float
    non_fusing_a: float
    fusing_a: float
    conventional_time_s: float
    pre_min_a2s: float
    op_max_a2s: float
    i_pre_a: float  # current where the lower edge reaches I2T_TIME_S
    i_op_a: float  # current where the upper edge reaches I2T_TIME_S
    lower_ln_i: np.ndarray
    lower_ln_t: np.ndarray
    upper_ln_i: np.ndarray
    upper_ln_t: np.ndarray


@lru_cache(maxsize=64)
def gg_envelope(rating_a: float) -> GGEnvelope:
    """The envelope numbers of a gG rating (gates, conventional currents, I2t at 0.01 s).

    References
    ----------
    IEC 60269-2, gG gates and I2t table; IEC 60269-1, 8.4.3.1 conventional currents and times.

    Examples
    --------
    >>> print(round(gg_envelope(63).i_pre_a, 1))
    948.7
    """
    row = gg_table()[float(rating_a)]
    k_nf = gg_conventional("non_fusing_current_x", rating_a)
    k_f = gg_conventional("fusing_current_x", rating_a)
    t_conv = gg_conventional("conventional_time_s", rating_a)
    i_pre = math.sqrt(row.i2t_pre_arcing_min_a2s / I2T_TIME_S)
    i_op = math.sqrt(row.i2t_operating_max_a2s / I2T_TIME_S)
    lower_i = (k_nf * rating_a, row.imin_10s_a, row.imin_0_1s_a, i_pre)
    lower_t = (t_conv, 10.0, 0.1, I2T_TIME_S)
    upper_i = (k_f * rating_a, row.imax_5s_a, row.imax_0_1s_a, i_op)
    upper_t = (t_conv, 5.0, 0.1, I2T_TIME_S)
    for knots in (lower_i, upper_i):
        if not all(a < b for a, b in pairwise(knots)):
            raise ValueError(f"gG {rating_a:g} A: gate currents do not rise as time falls")
    return GGEnvelope(
        rating_a=float(rating_a),
        non_fusing_a=k_nf * rating_a,
        fusing_a=k_f * rating_a,
        conventional_time_s=t_conv,
        pre_min_a2s=row.i2t_pre_arcing_min_a2s,
        op_max_a2s=row.i2t_operating_max_a2s,
        i_pre_a=i_pre,
        i_op_a=i_op,
        lower_ln_i=np.log(lower_i),
        lower_ln_t=np.log(lower_t),
        upper_ln_i=np.log(upper_i),
        upper_ln_t=np.log(upper_t),
    )


def gg_envelope_lower(current_a: np.ndarray, env: GGEnvelope) -> np.ndarray:
    """Minimum pre-arcing time [s] of the envelope; ``inf`` below the non-fusing current, the
    conventional time at it.

    References
    ----------
    IEC 60269-1, 8.4.3.1 (conventional non-fusing current and time); IEC 60269-2, gG gates
    Imin(10 s), Imin(0.1 s) and minimum pre-arcing I2t at 0.01 s.

    Examples
    --------
    >>> env = gg_envelope(63)
    >>> print(round(float(gg_envelope_lower(np.array(160.0), env)), 6))
    10.0
    >>> print(float(gg_envelope_lower(np.array(1.25 * 63), env)))
    3600.0
    """
    i = np.asarray(current_a, dtype=np.float64)
    t = loglog_interpolate(i, env.lower_ln_i, env.lower_ln_t)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(i > env.i_pre_a, equivalent_time(env.pre_min_a2s, i), t)
    # exactly the conventional time at the first knot (no exp/log rounding there)
    t = np.where(i == env.non_fusing_a, env.conventional_time_s, t)
    return np.where(i < env.non_fusing_a, np.inf, t)


def gg_envelope_upper(current_a: np.ndarray, env: GGEnvelope) -> np.ndarray:
    """Maximum operating time [s] of the envelope; ``inf`` below the fusing current.

    References
    ----------
    IEC 60269-2, gG gates Imax(5 s), Imax(0.1 s), maximum operating I2t at 0.01 s; IEC 60269-1
    conventional fusing current and time.

    Examples
    --------
    >>> print(round(float(gg_envelope_upper(np.array(580.0), gg_envelope(100))), 6))
    5.0
    """
    i = np.asarray(current_a, dtype=np.float64)
    t = loglog_interpolate(i, env.upper_ln_i, env.upper_ln_t)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(i > env.i_op_a, equivalent_time(env.op_max_a2s, i), t)
    return np.where(i < env.fusing_a, np.inf, t)


def _envelope_currents(env: GGEnvelope, t_s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Currents [A] where the envelope's lower and upper edges reach times ``t_s`` in
    [I2T_TIME_S, conventional time]."""
    i_lo = loglog_interpolate(t_s, env.lower_ln_t, env.lower_ln_i, descending=True)
    i_hi = loglog_interpolate(t_s, env.upper_ln_t, env.upper_ln_i, descending=True)
    return i_lo, i_hi


@dataclass(frozen=True)
class GGNominal:
    """The nominal curve of a gG rating: log-middle of the envelope at every time from the
    conventional time down to 0.01 s."""

    ln_i: np.ndarray  # ascending
    ln_t: np.ndarray  # descending, from ln(conventional time) to ln(0.01 s)
    i_conv_a: float  # nominal current at the conventional time
    i_last_a: float  # nominal current at 0.01 s


def gg_nominal(env: GGEnvelope) -> GGNominal:
    """The nominal curve of a rating (geometric middle in current of the envelope at each time).

    A dense log-log grid from the conventional time (where the nominal current is
    ``sqrt(I_nf * I_f)``) down to 0.01 s.

    Examples
    --------
    >>> print(round(gg_nominal(gg_envelope(63)).i_last_a))
    1249
    """
    t = np.logspace(
        math.log10(env.conventional_time_s), math.log10(I2T_TIME_S), _NOMINAL_POINTS
    )
    i_lo, i_hi = _envelope_currents(env, t)
    i_nom = np.sqrt(i_lo * i_hi)
    if not np.all(np.diff(i_nom) > 0):
        raise ValueError(f"gG {env.rating_a:g} A: nominal curve does not rise as time falls")
    return GGNominal(
        ln_i=np.log(i_nom),
        ln_t=np.log(t),
        i_conv_a=float(i_nom[0]),
        i_last_a=float(i_nom[-1]),
    )


def gg_nominal_time(current_a: np.ndarray, env: GGEnvelope, nom: GGNominal) -> np.ndarray:
    """Nominal time [s] at current(s) [A]; ``inf`` below the nominal conventional current (the
    conventional time at it), ``0`` past the nominal 0.01 s point (the energy region, where the
    typical edges are the envelope's).

    Examples
    --------
    >>> env = gg_envelope(63)
    >>> print(round(float(gg_nominal_time(np.array(1248.0), env, gg_nominal(env))), 4))
    0.01
    """
    i = np.asarray(current_a, dtype=np.float64)
    t = loglog_interpolate(i, nom.ln_i, nom.ln_t)
    t = np.where(i == nom.i_conv_a, env.conventional_time_s, t)
    t = np.where(i < nom.i_conv_a, np.inf, t)
    return np.where(i > nom.i_last_a, 0.0, t)


def minor_rating(rating_a: float) -> float | None:
    """The gG rating two steps below in the series (ratio about 1.6:1), from 25 A up; else None.

    References
    ----------
    IEC 60269-1, selectivity ratio 1.6:1 of gG fuse-links (from memory); the ratings of
    :data:`GG_RATINGS_A` two steps apart are in the ratio 1.56..1.60.

    Examples
    --------
    >>> print(minor_rating(100), minor_rating(16))
    63 None
    """
    k = GG_RATINGS_A.index(rating_a) if rating_a in GG_RATINGS_A else -1
    if k < 2 or GG_RATINGS_A[k - 2] < 16:
        return None
    return GG_RATINGS_A[k - 2]


def fuse_let_through(
    op_max_a2s: float, upper: Callable[[np.ndarray], np.ndarray]
) -> Callable[[np.ndarray], np.ndarray]:
    """A fuse-link's let-through I2t [A^2 s] against prospective current [A].

    The maximum operating I2t where the fuse-link limits the current (below its 0.01 s point),
    ``I^2 t_max(I)`` where that is larger (a fault it clears in the time-current region).

    References
    ----------
    IEC 60269-1, operating I2t; IEC 60269-2, maximum operating I2t at 0.01 s.

    Examples
    --------
    >>> lt = fuse_let_through(1000.0, lambda i: np.full_like(i, 0.01))
    >>> print(float(lt(np.array(100.0))), float(lt(np.array(1000.0))))
    1000.0 10000.0
    """

    def let_through(current_a: np.ndarray) -> np.ndarray:
        i = as_current(current_a)
        return np.maximum(op_max_a2s, i * i * upper(i))

    return let_through


def gg_band(
    rating_a: float, *, basis: str = "typical", breaking_capacity_a: float | None = None
) -> Band:
    """An IEC 60269 gG fuse-link as a band.

    Parameters
    ----------
    rating_a : float
        Rated current In [A], one of :data:`GG_RATINGS_A`.
    basis : str
        ``"typical"`` (nominal curve with +/-10 % in current) or ``"envelope"`` (widest band the
        standard allows).
    breaking_capacity_a : float, optional
        Rated breaking capacity [A]; default :data:`DEFAULT_BREAKING_CAPACITY_A` (50 kA, from
        memory), noted on the band.

    Returns
    -------
    Band
        Family ``"gG"``; ``pre_arcing_i2t_min_a2s`` set; ``let_through`` = the maximum operating
        I2t where the fuse limits (below 0.01 s), ``I^2 t_max(I)`` where that is larger;
        ``instantaneous_a`` None.

    Raises
    ------
    InputError
        Rating not in the series (key ``In_a``), breaking capacity not a finite positive number
        (``breaking_capacity_a``), unknown basis (``basis``).

    References
    ----------
    IEC 60269-1, 8.4.3.1 (conventional times and currents); IEC 60269-2, gG gates and I2t
    table at 0.01 s; statuses in ``curves/data/gg_gates_iec60269.csv``.

    Examples
    --------
    >>> band = gg_band(100, basis="envelope")
    >>> print(round(float(band.t_min(290.0)), 6), band.pre_arcing_i2t_min_a2s)
    10.0 27000.0
    """
    rating = in_series(rating_a, GG_RATINGS_A, key="In_a", what="rated current",
                       standard="IEC 60269 gG")
    notes: list[str] = []
    if breaking_capacity_a is None:
        breaking = DEFAULT_BREAKING_CAPACITY_A
        notes.append(
            f"breaking capacity not given: {breaking / 1000:g} kA assumed (IEC 60269-2 "
            "industrial gG minimum, from memory)"
        )
    else:
        breaking = positive_number("breaking_capacity_a", breaking_capacity_a)
    basis = known_basis(basis, GG_BASES)

    env = gg_envelope(rating)
    row = gg_table()[rating]
    op = env.op_max_a2s
    if basis == "envelope":
        minor = minor_rating(rating)
        minor_env = None if minor is None else gg_envelope(float(minor))

        def lower(current_a: np.ndarray) -> np.ndarray:
            own = gg_envelope_lower(current_a, env)
            if minor_env is None:
                return own
            return np.maximum(own, gg_envelope_upper(current_a, minor_env))

        def upper(current_a: np.ndarray) -> np.ndarray:
            return gg_envelope_upper(current_a, env)

        pickup_min, pickup_max = env.non_fusing_a, env.fusing_a
        notes.append(
            "envelope: IEC 60269-2 gates (log-log between them), conventional currents "
            f"{env.non_fusing_a / rating:g}/{env.fusing_a / rating:g} In, I2t at 0.01 s; "
            "arcing time neglected at the Imax gates; log-log between the gates (assumed)"
        )
        if minor is not None:
            notes.append(
                f"envelope: melting held no sooner than a gG{minor:g} clears (IEC 60269 "
                "selectivity ratio 1.6:1, which a compliant fuse-link meets)"
            )
    else:
        nom = gg_nominal(env)
        shrink = 1.0 / (1.0 - TYPICAL_TOLERANCE)
        widen = 1.0 / (1.0 + TYPICAL_TOLERANCE)

        # No clipping to the envelope: the +/-10 % band lies inside it by construction (the
        # envelope is at least 1.267:1 wide in current at every time), and a test checks it.
        def lower(current_a: np.ndarray) -> np.ndarray:
            nominal = gg_nominal_time(current_a * shrink, env, nom)
            return np.where(nominal > 0.0, nominal, gg_envelope_lower(current_a, env))

        def upper(current_a: np.ndarray) -> np.ndarray:
            nominal = gg_nominal_time(current_a * widen, env, nom)
            with np.errstate(divide="ignore"):
                energy = np.minimum(I2T_TIME_S, equivalent_time(op, current_a))
            # from the nominal 0.01 s point: flat at 0.01 s, then the maximum operating I2t
            return np.maximum(nominal, energy)

        # below these currents the shifted nominal curve is above the conventional time: inf
        pickup_min = nom.i_conv_a * (1.0 - TYPICAL_TOLERANCE)
        pickup_max = nom.i_conv_a * (1.0 + TYPICAL_TOLERANCE)
        notes.append(
            "typical: nominal curve at the log-middle of the IEC 60269-2 envelope, "
            f"+/-{TYPICAL_TOLERANCE:.0%} in current (from memory); below 0.01 s as the envelope"
        )
    if row.i2t_status == "derived":
        notes.append(
            f"gates for {rating:g} A from memory; its I2t limits derived "
            "(0.04 s x Imin(0.1 s)^2, selective two steps apart)"
        )

    let_through = fuse_let_through(op, upper)
    in_setting = int(rating) if rating.is_integer() else rating
    return Band(
        name=f"gG{rating:g}",
        family="gG",
        basis=basis,
        rating_a=rating,
        pickup_min_a=pickup_min,
        pickup_max_a=pickup_max,
        conventional_time_s=env.conventional_time_s,
        lower=lower,
        upper=upper,
        let_through=let_through,
        pre_arcing_i2t_min_a2s=env.pre_min_a2s,
        instantaneous_a=None,
        breaking_capacity_a=breaking,
        settings={"In_a": in_setting, "breaking_capacity_a": breaking},
        key=("gG", rating, breaking, basis),
        notes=tuple(notes),
    )
