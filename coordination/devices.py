"""Bands for a study's devices, built once per distinct device and basis."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from coordination.model import Circuit, Study
from curves.band import Band
from curves.errors import InputError


@dataclass(frozen=True)
class _Flag:
    """A boolean in a frozen spec. ``True == 1`` and ``hash(True) == hash(1)``, so a bare
    boolean would make ``energy_class = true`` the same cache key as ``energy_class = 1`` (and
    ``sd_i2t = 0`` the same as ``sd_i2t = false``): the device built first would answer for
    both, and the builder's refusal of a boolean where a number is meant (or the reverse) would
    depend on the order of the study file."""

    value: bool


def freeze(value: Any) -> Any:
    """A hashable copy of a device spec (nested mappings and lists become sorted tuples).

    Booleans are kept apart from the numbers equal to them (:class:`_Flag`).

    Examples
    --------
    >>> freeze({"energy_class": True}) == freeze({"energy_class": 1})
    False
    >>> thaw(freeze({"sd_i2t": False, "lower": [[1, 2]]}))
    {'lower': [[1, 2]], 'sd_i2t': False}
    """
    if isinstance(value, str):  # a shorthand, most devices: hashable as it is
        return value
    if isinstance(value, bool):
        return _Flag(value)
    if isinstance(value, Mapping):
        return tuple(sorted((str(k), freeze(v)) for k, v in value.items()))
    if isinstance(value, list | tuple):
        return tuple(freeze(v) for v in value)
    return value


def thaw(value: Any) -> Any:
    """Undo :func:`freeze` for a spec that was a mapping."""
    if isinstance(value, _Flag):
        return value.value
    if isinstance(value, tuple) and all(isinstance(x, tuple) and len(x) == 2
                                        and isinstance(x[0], str) for x in value) and value:
        return {k: thaw(v) for k, v in value}
    if isinstance(value, tuple):
        return [thaw(v) for v in value]
    return value


@lru_cache(maxsize=4096)
def _band(frozen_spec: Any, basis: str) -> Band:
    from curves.spec import band_from_spec

    spec = frozen_spec if isinstance(frozen_spec, str) else thaw(frozen_spec)
    return band_from_spec(spec, basis=basis)


def device_band(device: str | Mapping[str, Any], basis: str = "typical") -> Band:
    """The band of a device spec on a basis, cached: identical devices share one Band."""
    return _band(freeze(device), basis)


def circuit_band(circuit: Circuit, device: str | Mapping[str, Any], basis: str) -> Band:
    """A device as a circuit uses it: joined with the circuit's motor overload relay if it has
    one (:func:`coordination.motors.with_relay`), else the device's own band.

    Raises
    ------
    InputError
        The device's own (no circuit named), or the relay's (key ``motor.relay_class``).
    """
    from coordination.motors import with_relay

    band = device_band(device, basis)
    if circuit.motor is None:
        return band
    try:
        return with_relay(band, circuit.motor)
    except InputError as error:
        raise error.within(circuit=circuit.id, key="motor") from None


def band_for(study: Study, circuit_id: str, basis: str | None = None) -> Band:
    """The band of a circuit's device (with its motor's overload relay, where it has one).

    Parameters
    ----------
    basis : str, optional
        ``"typical"`` or ``"envelope"``; ``None`` takes the circuit's own basis, else the
        study's. Safety checks pass ``"envelope"``.

    A residual-current switch (RCCB: an ``rcd`` and no ``device``) has no overcurrent device of
    its own: its band is that of the nearest circuit above it with a device, which protects it
    (the checks read it so; the engine pairs no RCCB).

    Raises
    ------
    InputError
        Naming the circuit and the ``device`` key.
    """
    circuit = study.by_id[circuit_id]
    if circuit.device is None:
        circuit_id = overcurrent_owner(study, circuit_id)
        circuit = study.by_id[circuit_id]
    chosen = basis or study.basis_of(circuit_id)
    try:
        band = device_band(circuit.device, chosen)
    except InputError as error:
        raise error.within(circuit=circuit_id, key="device") from None
    return band if circuit.motor is None else circuit_band(circuit, circuit.device, chosen)


def overcurrent_owner(study: Study, circuit_id: str) -> str:
    """The circuit whose overcurrent device protects this one: itself, or for a
    residual-current switch (RCCB) the nearest circuit above with a device."""
    node = circuit_id
    while study.by_id[node].device is None:
        node = study.by_id[node].parent  # the loader refuses an RCCB with no device above it
    return node


def compact_labels(study: Study, basis: str | None = None, *,
                   band_of: Callable[[Study, str, str | None], Band] = band_for
                   ) -> dict[str, str]:
    """Each circuit's device in the compact form for narrow table cells, by circuit id.

    ``"B32"``, ``"gG100"``, ``"electronic 1600 A, Ir 1440 A"`` (:func:`curves.spec.device_label`);
    the full label is the band's ``name``. ``band_of``: where the bands come from (the caller's
    own lookup, so that a table names the bands its results were computed on).
    """
    from coordination.residual import rccb_label
    from curves.spec import device_label

    return {c.id: (device_label(band_of(study, c.id, basis), compact=True)
                   if c.device is not None else rccb_label(study, c.id))
            for c in study.circuits}
