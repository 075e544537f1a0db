"""Starting: a motor's start (or an inrush) does not make the circuit's device, or any device
above it, operate (the test itself is :func:`coordination.motors.starting_verdict`).

Unlike the safety checks this one runs on the study's selectivity basis (typical by default):
it asks whether the installation will start, not whether it is safe; where the typical band
passes and the standard's envelope would not, the reason says so.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from coordination import rules
from coordination.checks.results import CheckResult
from coordination.model import Study
from curves.band import Band

if TYPE_CHECKING:  # coordination.motors is loaded with the first motor or inrush of a study
    from coordination.motors import ChainDevice, StartProfile

#: Where the starting check's rule comes from, as its results say.
STARTING_SOURCE = ("IEC 60947-4-1 (a starter's devices carry the start); first peak and "
                   "star-delta ratio: common practice")
#: Circuits named at most in the note on ancestors without a load.
_NAMED = 4


def start_profile(study: Study, circuit_id: str) -> StartProfile | None:
    """The circuit's start: its motor's, else its inrush load's, else None.

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> from coordination.motors import Motor
    >>> s = Study("demo", Supply(pfc_a=6000.0),
    ...           (Circuit("fan", "supply", "D16", motor=Motor(8.0, 6.0, 4.0)),))
    >>> print(start_profile(s, "fan").current_a)
    48.0
    """
    circuit = study.by_id[circuit_id]
    if circuit.motor is not None:
        from coordination.motors import motor_start

        return motor_start(circuit.motor)
    if circuit.inrush is not None and circuit.load_a is not None:
        from coordination.motors import inrush_start

        return inrush_start(circuit.inrush, float(circuit.load_a))
    return None


def starting_chain(study: Study, circuit_id: str,
                   envelope: Band | None = None) -> list[ChainDevice]:
    """The devices a circuit's start passes through: its own, then every overcurrent device
    above it (an RCCB has none), each with its own circuit's Ib as running load (0 where the
    study gives none).

    Parameters
    ----------
    envelope : Band, optional
        The circuit's device on the envelope basis (the checks' band; a chooser's candidate);
        default: the study's own.
    """
    from coordination.devices import band_for
    from coordination.motors import ChainDevice

    own = envelope if envelope is not None else band_for(study, circuit_id, "envelope")
    chain = [ChainDevice(circuit_id, band_for(study, circuit_id), 0.0, own)]
    for up in study.ancestors(circuit_id):
        if study.by_id[up].device is None:  # an RCCB: the overcurrent device above it counts
            continue
        load = study.by_id[up].load_a
        chain.append(ChainDevice(up, band_for(study, up), float(load or 0.0),
                                 band_for(study, up, "envelope")))
    return chain


def _starting(study: Study, circuit_id: str, envelope: Band) -> CheckResult | None:
    """The starting check of one circuit (None: it has no motor and no inrush)."""
    profile = start_profile(study, circuit_id)
    if profile is None:
        return None
    from coordination.motors import starting_verdict

    verdict = starting_verdict(profile, starting_chain(study, circuit_id, envelope))
    b = verdict.binding
    details = {**verdict.details(), "source": STARTING_SOURCE}
    reason = verdict.reason()
    unloaded = [up for up in study.ancestors(circuit_id) if study.by_id[up].load_a is None]
    if unloaded:
        names = ", ".join(unloaded[:_NAMED]) + (" ..." if len(unloaded) > _NAMED else "")
        note = (f"no load_a on {names}: the start alone taken through them (give their Ib for "
                "the running load)")
        details["notes"] = f"{details['notes']}; {note}"
        reason = f"{reason}; {note}"
    if b.holds_time and not b.holds_peak:  # the peak decides: currents
        value, limit, unit = b.peak_a, b.instantaneous_a, "A"
    else:  # the start's time against the least operating time
        value, limit, unit = profile.duration_s, b.t_min_s, "s"
    rule_set = study.rule_set
    return CheckResult(circuit_id, "starting", verdict.ok, value, float(limit), unit,
                       rules.tagged(rule_set, reason), verdict.basis, details, rule_set.key)
