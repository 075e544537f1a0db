"""Device specs: the trade shorthand and inline tables, turned into a :class:`Band`.

Shorthand (case of the letters does not matter):

* ``"B32"``, ``"C16"``, ``"D10"``: an IEC 60898-1 MCB of that type and rating, Icn 6 kA,
  energy-limiting class 3 where EN 60898-1 Annex ZA has one (types B and C up to 32 A; none
  for type D and above 32 A).
* ``"gG100"``: an IEC 60269 gG fuse-link of that rating.
* ``"aM32"``: an IEC 60269-2 aM fuse-link (short-circuit protection of a motor circuit; its
  overload protection is the motor's overload relay).
* Optional suffix, after a space, ``/`` or ``,``: the breaking capacity in kA, e.g.
  ``"C16 10kA"`` (MCB Icn) or ``"gG100/80kA"`` (fuse-link breaking capacity, gG or aM).

Inline tables (TOML, with a ``family`` key; keys carry units)::

    {family = "mcb", type = "C", In_a = 16, energy_class = 3, icn_a = 10000}
    {family = "mcb", type = "D", In_a = 32, let_through_a2s = [[3000, 40000], [10000, 250000]]}
    {family = "gG", In_a = 100, breaking_capacity_a = 80000}
    {family = "aM", In_a = 32, breaking_capacity_a = 80000}
    {family = "tm", In_a = 250, Ir_x = 0.8, Ii_x = 10, icu_a = 36000}
    {family = "electronic", In_a = 630, Ir_x = 0.8, tr_s = 8, Isd_x = 6, tsd_s = 0.2,
     sd_i2t = false, Ii_x = 12, icu_a = 50000}
    {family = "datasheet", name = "feeder ACB", In_a = 630,
     lower = [[700, 3000], [6000, 0.05]], upper = [[820, 7200], [7000, 0.08]]}

``tm`` and ``electronic`` also take ``Ir_a``, ``Ii_a`` (and ``Isd_a``) in amperes instead of the
multiples; ``Ii_x = "off"`` switches an electronic unit's instantaneous release off. Families
``breaker-tm`` and ``breaker-electronic`` are accepted as names of ``tm`` and ``electronic``.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Mapping
from functools import lru_cache
from types import MappingProxyType
from typing import Any

import rtoml

from curves.band import Band
from curves.errors import InputError
from curves.families import BY_ALIAS, MCB_DEFAULT_ICN_A, REGISTRY, Family, am, gg, mcb
from curves.validate import positive_number

#: Family names an inline table may give (see :mod:`curves.families`).
FAMILIES = tuple(f.name for f in REGISTRY)
#: Keys each inline family takes (besides ``family``).
FAMILY_KEYS: Mapping[str, tuple[str, ...]] = MappingProxyType({f.name: f.keys for f in REGISTRY})

_SHORTHAND = re.compile(
    r"^(?P<kind>[bcd]|gg|am)\s*(?P<rating>\d+(?:\.\d+)?)"
    r"(?:\s*[\s/,]\s*(?P<cap>\d+(?:\.\d+)?)\s*ka)?$",
    re.IGNORECASE,
)
_HELP = ('shorthand "B32", "C16", "D10", "gG100", "aM32" (optional breaking capacity: '
         '"C16 10kA"), or an inline table with family = ' + ", ".join(f'"{f}"' for f in FAMILIES))


def parse_inline(text: str) -> str | dict:
    """A device spec from text: an inline TOML table when it starts with ``{``, else shorthand.

    Parameters
    ----------
    text : str
        E.g. ``"C16"`` or ``"{family = 'tm', In_a = 250, Ir_x = 0.8}"``.

    Returns
    -------
    str or dict
        The stripped shorthand, or the table as a dict.

    Raises
    ------
    InputError
        Empty text, or a table that is not valid TOML.

    References
    ----------
    TOML 1.0 inline tables (toml.io).

    Examples
    --------
    >>> print(parse_inline(" {family = 'tm', In_a = 250} ")["In_a"])
    250
    """
    if not isinstance(text, str) or not text.strip():
        raise InputError(f"empty device; give {_HELP}")
    stripped = text.strip()
    if not stripped.startswith("{"):
        return stripped
    try:
        return dict(rtoml.loads(f"device = {stripped}")["device"])
    except (rtoml.TomlParsingError, KeyError, TypeError) as error:
        raise InputError(f"the device table is not a valid TOML inline table ({error}); "
                         "e.g. {family = 'tm', In_a = 250, Ir_x = 0.8}") from None


def nearest(word: str, choices: tuple[str, ...]) -> str:
    """A hint naming the valid choice closest to a misspelt word, or ``""``.

    Parameters
    ----------
    word : str
        What the user wrote.
    choices : tuple of str
        The valid words.

    References
    ----------
    Python's difflib ratio (Ratcliff/Obershelp), cutoff 0.5; case is ignored as a fallback.

    Examples
    --------
    >>> print(nearest("tsd", ("tr_s", "tsd_s")))
     (did you mean 'tsd_s'?)
    """
    match = difflib.get_close_matches(word, choices, n=1, cutoff=0.5)
    if not match:
        lowered = {c.lower(): c for c in choices}
        match = difflib.get_close_matches(word.lower(), list(lowered), n=1, cutoff=0.5)
        match = [lowered[m] for m in match]
    return f" (did you mean {match[0]!r}?)" if match else ""


def _check_basis(basis: Any) -> str:
    allowed = ("typical", "envelope", "datasheet")
    if not isinstance(basis, str) or basis not in allowed:
        raise InputError(f"unknown basis {basis!r}; allowed: typical, envelope", key="basis")
    return basis


def _standard_basis(basis: str, family: str) -> str:
    if basis == "datasheet":
        raise InputError(f"basis 'datasheet' is only for datasheet devices; a {family} device "
                         "takes typical or envelope", key="basis")
    return basis


def _from_shorthand(text: str, basis: str) -> Band:
    match = _SHORTHAND.match(text.strip())
    if not match:
        raise InputError(f"unknown device {text!r}; give {_HELP}")
    kind = match["kind"].upper()
    rating = float(match["rating"])
    cap = None if match["cap"] is None else float(match["cap"]) * 1000.0
    basis = _standard_basis(basis, {"GG": "gG", "AM": "aM"}.get(kind, "mcb"))
    if kind == "GG":
        return gg(rating, basis, cap)
    if kind == "AM":
        return am(rating, basis, cap)
    return mcb(kind, rating, basis, None, MCB_DEFAULT_ICN_A if cap is None else cap)


def _table_family(spec: Mapping[str, Any]) -> Family:
    if "family" not in spec:
        raise InputError(f"the device table has no 'family'; allowed: {', '.join(FAMILIES)}",
                         key="family")
    family = spec["family"]
    if not isinstance(family, str):
        raise InputError(f"family must be a string, one of {', '.join(FAMILIES)}; not "
                         f"{family!r}", key="family")
    found = BY_ALIAS.get(family.strip().lower())
    if found is None:
        raise InputError(f"unknown device family {family!r}{nearest(family, FAMILIES)}; "
                         f"allowed: {', '.join(FAMILIES)}", key="family")
    return found


def _from_table(spec: Mapping[str, Any], basis: str) -> Band:
    entry = _table_family(spec)
    family, allowed = entry.name, entry.keys
    table = {}
    for key, value in spec.items():
        if key == "family":
            continue
        if not isinstance(key, str) or key not in allowed:
            hint = nearest(str(key), allowed)
            raise InputError(f"unknown key {key!r} for family {family!r}{hint}; allowed: "
                             f"family, {', '.join(allowed)}", key=str(key))
        table[key] = value
    for key in entry.required:
        if key not in table:
            raise InputError(f"family {family!r} needs {key}; keys: family, "
                             f"{', '.join(allowed)}", key=key)
    for key, value in table.items():
        if key not in entry.not_numbers:
            positive_number(key, value)
    if entry.standard:
        basis = _standard_basis(basis, family)
    return entry.build(table, basis)


def band_from_spec(spec: str | Mapping[str, Any], basis: str = "typical") -> Band:
    """The band of a device spec on a basis.

    Parameters
    ----------
    spec : str or mapping
        Shorthand (``"B32"``, ``"C16 10kA"``, ``"gG100"``, ``"aM32"``) or an inline table with
        ``family`` (see the module docstring for every family's keys).
    basis : str
        ``"typical"`` or ``"envelope"``. A datasheet device always has basis ``"datasheet"``.

    Returns
    -------
    Band

    Raises
    ------
    InputError
        Unknown shorthand or family, unknown key (with the nearest valid one), wrong type,
        non-finite or negative value, rating not in the series, settings a unit does not offer;
        the key is relative to the device table (``"Ir_x"``).

    References
    ----------
    IEC 60898-1 (MCB types B, C, D), IEC 60269-2 (gG, aM), IEC 60947-2 (breakers).

    Examples
    --------
    >>> band = band_from_spec({"family": "tm", "In_a": 100, "Ir_x": 0.8}, basis="envelope")
    >>> print(band.pickup_max_a)
    104.0
    """
    basis = _check_basis(basis)
    if isinstance(spec, str):
        text = spec.strip()
        if text.startswith("{"):
            parsed = parse_inline(text)
            return _from_table(parsed, basis) if isinstance(parsed, Mapping) else \
                _from_shorthand(parsed, basis)
        if not text:
            raise InputError(f"empty device; give {_HELP}")
        return _from_shorthand(text, basis)
    if isinstance(spec, Mapping):
        return _from_table(spec, basis)
    raise InputError(f"a device must be text or a table, not {spec!r}; give {_HELP}")


#: Keys of a device table that state its breaking capacity.
CAPACITY_KEYS = ("icn_a", "icu_a", "ics_a", "breaking_capacity_a")


def capacity_stated(spec: str | Mapping[str, Any]) -> bool:
    """Whether a device spec states its breaking capacity (else the family's default is assumed).

    A shorthand states it with its kA suffix (``"B32 10kA"``, ``"gG100/80kA"``), a table with
    ``icn_a``, ``icu_a``, ``ics_a`` or ``breaking_capacity_a``.

    Examples
    --------
    >>> print(capacity_stated("B32 10kA"), capacity_stated("B32"), capacity_stated(
    ...     {"family": "tm", "In_a": 250, "icu_a": 36000}))
    True False True
    """
    if isinstance(spec, Mapping):
        return any(key in spec for key in CAPACITY_KEYS)
    if isinstance(spec, str):
        text = spec.strip()
        if text.startswith("{"):
            try:
                parsed = parse_inline(text)
            except InputError:
                return False
            return capacity_stated(parsed)
        return _shorthand_capacity(text)
    return False


@lru_cache(maxsize=1024)
def _shorthand_capacity(text: str) -> bool:
    match = _SHORTHAND.match(text)
    return match is not None and match["cap"] is not None


def device_label(band: Band, *, compact: bool = False) -> str:
    """What a person reads for a device: its band's name, or the compact form for narrow cells.

    An MCB or a fuse-link is its standard designation (``"B32"``, ``"gG100"``) in both forms; a
    datasheet device its given name; an adjustable breaker its kind, rating and settings in
    words (:func:`curves.breaker.breaker_label`), compact: kind, rating and Ir; a motor's
    overload relay with its device (``curves.relay.combined_band``), compact: the relay's class
    and the device (``"class 10 relay + aM25"``).

    Parameters
    ----------
    band : Band
        The device.
    compact : bool
        The short form, for table cells beside the circuit's id.

    References
    ----------
    IEC 60898-1 (types B, C, D), IEC 60269-1 (gG), IEC 60947-2 (Ir, tr, Isd, tsd, Ii).

    Examples
    --------
    >>> band = band_from_spec({"family": "tm", "In_a": 250, "Ir_x": 0.8})
    >>> print(device_label(band))
    thermal-magnetic 250 A, Ir 200 A, Ii 10 In
    >>> print(device_label(band, compact=True))
    thermal-magnetic 250 A, Ir 200 A
    >>> print(device_label(band_from_spec("gG100"), compact=True))
    gG100
    >>> from curves.relay import combined_band, relay_band
    >>> print(device_label(combined_band(relay_band("10", 20.0), band_from_spec("aM25")),
    ...                    compact=True))
    class 10 relay + aM25
    """
    from curves.breaker import KIND_WORDS, breaker_label

    if compact and band.family in KIND_WORDS:
        return breaker_label(band.family, band.settings, compact=True)
    if compact and band.family == "motor-circuit":  # curves.relay.combined_band's name
        relay = band.settings.get("relay", {})
        device = band.name.rsplit(" with ", 1)[-1]
        return f"class {relay.get('trip_class', '?')} relay + {device}"
    return band.name
