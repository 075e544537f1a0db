"""Overload: Ib <= In <= Iz and I2 <= 1.45 Iz (IEC 60364-4-43, 433.1), and what to choose
instead."""

from __future__ import annotations

import math
from collections.abc import Mapping
from functools import lru_cache
from types import MappingProxyType
from typing import Any

from coordination import rules
from coordination.checks.common import _in_a, a_text
from coordination.checks.results import CheckResult
from coordination.model import Study
from curves.band import Band


def overload_conditions(ib_a: float | None, in_a: float, iz_a: float | None,
                        i2_a: float, *, i2_implied: bool = False,
                        ) -> tuple[tuple[str, float, float], ...]:
    """The overload conditions that the given data allow, as (name, value [A], limit [A]).

    ``Ib <= In`` when Ib is given; ``In <= Iz`` and ``I2 <= 1.45 Iz`` when Iz is given (the
    last left out where the rule set holds it met by In <= Iz, ``i2_implied``). Each holds when
    value <= limit.

    Parameters
    ----------
    ib_a : float or None
        Design current Ib [A].
    in_a : float
        Rated current or current setting of the device In (Ir) [A].
    iz_a : float or None
        Current-carrying capacity of the cable after derating Iz [A].
    i2_a : float
        Current ensuring the device operates within the conventional time I2 [A].
    i2_implied : bool
        The rule set holds In <= Iz to meet I2 <= 1.45 Iz for this device
        (:func:`coordination.rules.i2_implied`).

    References
    ----------
    IEC 60364-4-43:2008, 433.1, equations (1) and (2); BS 7671:2018, 433.1.202 (from memory).

    Examples
    --------
    >>> print(overload_conditions(None, 32.0, 34.0, 1.6 * 32.0)[-1])
    ('I2 <= 1.45 Iz', 51.2, 49.3)
    """
    terms: list[tuple[str, float, float]] = []
    if ib_a is not None:
        terms.append(("Ib <= In", float(ib_a), float(in_a)))
    if iz_a is not None:
        terms.append(("In <= Iz", float(in_a), float(iz_a)))
        if not i2_implied:
            terms.append(("I2 <= 1.45 Iz", float(i2_a), round(1.45 * float(iz_a), 12)))
    return tuple(terms)


def overload_ok(ib_a: float | None, in_a: float, iz_a: float | None, i2_a: float, *,
                i2_implied: bool = False) -> bool:
    """Whether Ib <= In <= Iz and I2 <= 1.45 Iz hold (those the data allow).

    References
    ----------
    IEC 60364-4-43:2008, 433.1.

    Examples
    --------
    >>> print(overload_ok(20.0, 32.0, 34.0, 1.45 * 32.0))
    True
    """
    return all(v <= lim for _, v, lim in overload_conditions(ib_a, in_a, iz_a, i2_a,
                                                               i2_implied=i2_implied))


def _series(band: Band) -> tuple[float, ...] | None:
    """The standard ratings of the band's family, where it has a fixed series."""
    if band.family == "mcb":
        from curves.mcb import MCB_RATINGS_A
        return tuple(float(r) for r in MCB_RATINGS_A)
    if band.family == "gG":
        from curves.fuse import GG_RATINGS_A
        return tuple(float(r) for r in GG_RATINGS_A)
    return None


def _next_device(band: Band, ib_a: float) -> tuple[str, float, float, bool] | None:
    """The smallest device of the band's family that carries ``ib_a``: (name, In [A], I2 [A],
    exact). ``exact`` is False where I2 is scaled from the present device (adjustable breakers,
    datasheet devices: a rating or setting of at least Ib); None where the series ends below Ib.
    """
    series = _series(band)
    if series is None:
        ratio = float(band.pickup_max_a) / _in_a(band)
        in_new = math.ceil(ib_a * 10.0 - 1e-9) / 10.0
        return f"a rating or setting of at least {in_new:g} A", in_new, ratio * in_new, False
    fits = [r for r in series if r >= ib_a]
    if not fits:
        return None
    new = _family_member(band, fits[0])
    return new.name, float(new.rating_a), float(new.pickup_max_a), True


def _family_member(band: Band, rating: float) -> Band:
    """Another rating of an MCB's or a gG fuse-link's family, on the same basis and settings."""
    if band.family == "mcb":
        from curves.mcb import class_applies, mcb_band
        st = band.settings
        curve = str(st.get("type", band.name[0]))
        cls = st.get("energy_class")  # a class kept where EN 60898-1 Annex ZA has one
        return mcb_band(curve, rating, basis=band.basis,
                        energy_class=cls if cls and class_applies(curve, rating, cls) else None,
                        icn_a=float(st.get("icn_a", 6000.0)))
    from curves.fuse import gg_band
    return gg_band(rating, basis=band.basis)


def _smaller_device(band: Band, ib_a: float | None, iz_a: float, implied: bool) -> str | None:
    """A smaller device of the band's family that meets every overload condition with this
    cable (the largest such rating), or a lower setting for adjustable devices; None if none."""
    series = _series(band)
    if series is None:
        if band.family not in ("breaker-tm", "breaker-electronic"):
            return None  # a datasheet device has no setting and no series here
        from curves.breaker import ELECTRONIC_IR_FRACTIONS, TM_IR_FRACTIONS

        fractions = TM_IR_FRACTIONS if band.family == "breaker-tm" else ELECTRONIC_IR_FRACTIONS
        lowest = min(fractions) * float(band.rating_a)  # the unit's lowest Ir [A]
        ratio = float(band.pickup_max_a) / _in_a(band)  # I2 scales with the setting
        highest = iz_a if implied else min(iz_a, 1.45 * iz_a / ratio)
        if (highest >= _in_a(band) or highest < lowest
                or (ib_a is not None and ib_a > highest)):
            return None
        return f"a lower setting, Ir <= {math.floor(highest * 10.0 + 1e-9) / 10.0:g} A"
    for rating in sorted((r for r in series if r < _in_a(band)), reverse=True):
        if ib_a is not None and rating < ib_a:
            return None
        member = _family_member(band, rating)
        if overload_ok(ib_a, rating, iz_a, float(member.pickup_max_a), i2_implied=implied):
            return member.name
    return None


def _iz_needed_a(in_a: float, i2_a: float, implied: bool = False) -> float:
    """Least Iz with In <= Iz and I2 <= 1.45 Iz (In <= Iz alone where the rule set holds it
    enough), rounded up to 0.1 A (never too small) [A]."""
    need = in_a if implied else max(in_a, i2_a / 1.45)
    return math.ceil(need * 10.0 - 1e-9) / 10.0


#: Why an aM fuse-link alone fails the overload check.
AM_NO_OVERLOAD = ("gives no overload protection (IEC 60269-1, utilization category a: it breaks "
                  "short-circuit currents only): give the motor's overload relay "
                  "(motor.relay_class, motor.relay_ir_a) or choose a gG fuse-link or an MCB")
#: What the overload check takes from a motor's overload relay.
RELAY_TERMS = ("In is the relay's Ir and I2 its 1.2 Ir (IEC 60947-4-1: trip within 2 h at "
               "1.2 Ir)")


def _overload(study: Study, cid: str, band: Band) -> CheckResult | None:
    circuit = study.by_id[cid]
    ib = circuit.load_a
    iz = circuit.cable.iz_a if circuit.cable is not None else None
    rule_set = study.rule_set
    if band.family == "aM":  # short-circuit protection only: never an overload device
        i2 = float(band.pickup_max_a)
        limit = 1.45 * float(iz) if iz is not None else math.nan
        details = {"ib_a": ib, "in_a": _in_a(band), "iz_a": iz, "i2_a": i2,
                   "binding": "overload device", "source": "IEC 60364-4-43 433.1; IEC 60269-1"}
        return CheckResult(cid, "overload", False, i2, limit, "A",
                           rules.tagged(rule_set, f"{band.name} {AM_NO_OVERLOAD}"), band.basis,
                           details, rule_set.key)
    if ib is None and iz is None:
        return None
    ok, value, limit, reason, details = _overload_verdict(band, ib, iz, rule_set)
    if band.family == "motor-circuit":  # the relay protects against overload
        reason = f"{reason}; {RELAY_TERMS}"
        details = {**details, "source": f"IEC 60364-4-43 433.1; {RELAY_TERMS}"}
    return CheckResult(cid, "overload", ok, value, limit, "A", reason, band.basis, details,
                       rule_set.key)


@lru_cache(maxsize=4096)
def _overload_verdict(band: Band, ib: float | None, iz: float | None, rule_set: rules.RuleSet,
                      ) -> tuple[bool, float, float, str, Mapping[str, Any]]:
    """The overload check of a device with its load and cable under a rule set: ok, value [A],
    limit [A], the reason and the details (a read-only view, shared by the circuits that repeat
    the four, as many of a building's do)."""
    in_a = _in_a(band)
    i2 = float(band.pickup_max_a)
    implied = rules.i2_implied(rule_set, band.family)
    terms = overload_conditions(ib, in_a, iz, i2, i2_implied=implied)
    name, value, limit = max(terms, key=lambda t: t[1] / t[2] if t[2] > 0 else math.inf)
    ok = all(v <= lim for _, v, lim in terms)
    source = rule_set.overload.cite
    implied_note = ""
    if implied and iz is not None:
        source = f"{source}; {rule_set.i2_implied.cite}"
        fuse = " (a gG fuse-link taken as BS 88-2 / BS 88-3)" if band.family == "gG" else ""
        implied_note = (f"; I2 <= 1.45 Iz held met by In <= Iz{fuse}, "
                        f"{rule_set.i2_implied.cite}")
    details: dict[str, Any] = {"ib_a": ib, "in_a": in_a, "iz_a": iz, "i2_a": i2,
                               "binding": name, "source": source,
                               "i2_condition": "implied" if implied else "checked"}
    if ok:
        have = ", ".join(f"{n} ({a_text(v)} <= {a_text(lim)})" for n, v, lim in terms)
        reason = f"{band.name} protects against overload: {have}{implied_note}"
    else:
        failing = [f"{n.replace(' <= ', ' > ')} ({a_text(v)} > {a_text(lim)})"
                   for n, v, lim in terms if v > lim]
        if ib is not None and float(ib) > in_a:
            # the device cannot carry the load: only a larger one helps, with the cable it needs
            nxt = _next_device(band, float(ib))
            if nxt is None:
                fix = (f"no {band.family} rating carries Ib {a_text(float(ib))}: choose another "
                       "family")
            else:
                new_name, new_in, new_i2, exact = nxt
                need = _iz_needed_a(new_in, new_i2, implied)
                details.update({"next_device": new_name, "next_in_a": new_in,
                                "next_i2_a": new_i2, "next_iz_needed_a": need})
                i2_text = f"I2 {a_text(new_i2)}" if exact else f"I2 about {a_text(new_i2)}"
                needs = (f"it needs Iz >= {need:g} A (In <= Iz)" if implied else
                         f"it needs Iz >= {need:g} A (In <= Iz, {i2_text} <= 1.45 Iz)")
                if iz is None:
                    cable = "; check the cable's Iz"
                elif float(iz) >= need:
                    cable = f"; the cable's Iz {a_text(float(iz))} is enough"
                else:
                    cable = f", so also a cable with Iz >= {need:g} A (now {a_text(float(iz))})"
                fix = f"{new_name}, which carries Ib {a_text(float(ib))}: {needs}{cable}"
            reason = f"{band.name} (I2 {a_text(i2)}): {'; '.join(failing)}: choose {fix}"
        else:  # the device carries the load; the cable is what it fails to protect
            assert iz is not None  # only In <= Iz and I2 <= 1.45 Iz are left to fail
            need = _iz_needed_a(in_a, i2, implied)
            fixes = [f"a cable with Iz >= {need:g} A"]
            if ib is not None and float(ib) > float(iz):
                fixes[0] += (f" (Ib {a_text(float(ib))} exceeds Iz {a_text(float(iz))}: the cable "
                             "is too small for the load, whatever the device)")
            else:
                smaller = _smaller_device(band, None if ib is None else float(ib), float(iz),
                                          implied)
                if smaller is not None:
                    carries = "" if ib is None else f"carries Ib {a_text(float(ib))} and "
                    fixes.append(f"{smaller}, which {carries}protects this cable")
                    details["smaller_device"] = smaller
            reason = (f"{band.name} (I2 {a_text(i2)}): {'; '.join(failing)}: choose "
                      f"{' or '.join(fixes)}{implied_note}")
    return ok, value, limit, rules.tagged(rule_set, reason), MappingProxyType(details)
