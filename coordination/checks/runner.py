"""The checks of one circuit, and of every circuit of a study."""

from __future__ import annotations

from typing import Any

from coordination.checks.breaking_capacity import _breaking_capacity
from coordination.checks.common import _Edges, _in_a
from coordination.checks.disconnection import _disconnection
from coordination.checks.fault_energy import _fault_energy
from coordination.checks.overload import _overload
from coordination.checks.residual_checks import residual_results
from coordination.checks.results import CheckResult
from coordination.checks.starting import _starting
from coordination.criterion import breaking_duty
from coordination.faults import FaultLevels
from coordination.model import Study
from coordination.residual import RcdPath, has_rcds, rcds_on_path
from curves.band import Band
from curves.errors import InputError


def check_device(study: Study, levels: FaultLevels, circuit_id: str,
                 band: Band) -> tuple[CheckResult, ...]:
    """The protection checks of one circuit with a given device.

    Used by :func:`run` with the circuit's own device, and by the chooser on candidate devices.

    Parameters
    ----------
    study : Study
        The installation.
    levels : FaultLevels
        Fault levels of the study (``levels.by_circuit[circuit_id]`` with ``ik3_max_a``,
        ``ik1_max_a``, ``ik_max_a`` at the circuit's board, ``ief_min_a``, ``zs_ohm``,
        ``ik_min_end_a`` at its far end) [A], [ohm].
    circuit_id : str
        The circuit.
    band : Band
        The device, on the envelope basis (the worst case a compliant device allows).

    Returns
    -------
    tuple of CheckResult
        In the order of :data:`~coordination.checks.CHECK_NAMES`; a check the study gives no
        data for (overload without Ib and Iz, fault energy without a cable, starting without a
        motor or an inrush) is left out.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2 and Table 41.1; IEC 60364-4-43:2008, 433.1, 434.5.1, 434.5.2;
    IEC 60364-5-54:2011, 543.1.2.

    Examples
    --------
    >>> from coordination import faults, study
    >>> s = study.loads('''
    ... [supply]
    ... u0_v = 230
    ... phases = 1
    ... earthing = "TN-C-S"
    ... pfc_a = 6000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "lights"
    ... from = "supply"
    ... device = "B6"
    ... phases = 1
    ... ''')
    >>> from coordination.devices import band_for
    >>> r = check_device(s, faults.compute(s), "lights", band_for(s, "lights", "envelope"))
    >>> print(r[0].check, r[0].limit)
    disconnection 0.4
    """
    if circuit_id not in study.by_id:
        raise InputError(f"no circuit {circuit_id!r} in the study", key="circuit")
    node = levels.by_circuit[circuit_id]
    return _check_device(study, circuit_id, band, node, _Edges.for_nodes([(band, node)]),
                         _rcds_on_path(study, circuit_id))


def _rcds_on_path(study: Study, circuit_id: str) -> RcdPath:
    """:func:`coordination.residual.rcds_on_path`, an error naming the circuit."""
    try:
        return rcds_on_path(study, circuit_id)
    except InputError as error:
        raise error.within(circuit=circuit_id) from None


def _check_device(study: Study, circuit_id: str, band: Band, node: Any, edges: _Edges,
                  rcds: RcdPath) -> tuple[CheckResult, ...]:
    """:func:`check_device` with the band's edges at the node's currents already evaluated
    and the RCDs on the circuit's path found (:func:`coordination.residual.rcds_on_path`)."""
    circuit = study.by_id[circuit_id]
    try:
        disconnection = _disconnection(study, circuit_id, band, node, edges, rcds)
        overload = _overload(study, circuit_id, band)
        results: list[CheckResult | None] = [disconnection, overload]
        protected = (overload is not None and overload.ok and circuit.cable is not None
                     and circuit.cable.iz_a is not None)
        # the largest fault at the board, found once for the fault energy and the breaking
        # capacity; the disconnection limit passed on to the fault energy
        duty = breaking_duty(node, circuit.phases)
        results.append(_fault_energy(study, circuit_id, band, node, protected, edges,
                                     duty=duty, limit_s=disconnection.limit, rcds=rcds))
        if circuit.device is not None:  # an RCCB breaks no fault current: the device above
            results.append(_breaking_capacity(study, circuit_id, band, node, duty))  # does,
            # and is checked at its own board
        results.append(_starting(study, circuit_id, band))
    except InputError as error:
        if error.key is not None and error.key.startswith("supply"):
            raise
        raise error.within(circuit=circuit_id) from None
    return tuple(r for r in results if r is not None)


def run(study: Study, levels: FaultLevels) -> tuple[CheckResult, ...]:
    """Every protection check of every circuit, on the envelope basis.

    Parameters
    ----------
    study : Study
        The installation.
    levels : FaultLevels
        Its fault levels (:func:`coordination.faults.compute`).

    Returns
    -------
    tuple of CheckResult
        Circuit by circuit in study order, checks in the order of
        :data:`~coordination.checks.CHECK_NAMES`.

    References
    ----------
    IEC 60364-4-41:2005 Table 41.1; IEC 60364-4-43:2008, 433 and 434; IEC 60364-5-54:2011, 543.

    Examples
    --------
    >>> from coordination import faults, study
    >>> s = study.loads('''
    ... [supply]
    ... u0_v = 230
    ... phases = 1
    ... earthing = "TN-C-S"
    ... pfc_a = 6000
    ... ze_ohm = 0.35
    ... [[circuit]]
    ... id = "lights"
    ... from = "supply"
    ... device = "B6"
    ... phases = 1
    ... ''')
    >>> print(all(r.ok for r in run(s, faults.compute(s))))
    True
    """
    from coordination.devices import band_for

    # every band's edges at all its circuits' fault currents in one vectorised call per band
    bands = [band_for(study, circuit.id, basis="envelope") for circuit in study.circuits]
    rcds = has_rcds(study)
    by_circuit = levels.by_circuit
    edges = _Edges.for_nodes((band, by_circuit[circuit.id])
                             for band, circuit in zip(bands, study.circuits, strict=True)
                             if circuit.id in by_circuit)
    out: list[CheckResult] = []
    for band, circuit in zip(bands, study.circuits, strict=True):
        on_path = _rcds_on_path(study, circuit.id)  # once for all the circuit's checks
        out.extend(_check_device(study, circuit.id, band, by_circuit[circuit.id], edges,
                                 on_path))
        if rcds or circuit.sockets:
            in_a = _in_a(band) if circuit.device is not None else None
            try:
                out.extend(residual_results(study, circuit.id, in_a, on_path))
            except InputError as error:
                raise error.within(circuit=circuit.id) from None
    return tuple(out)
