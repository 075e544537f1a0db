"""Protection checks beside selectivity: disconnection, overload, fault energy, breaking capacity.

A selective design that leaves a cable unprotected or an earth fault uncleared is no design. For
every circuit of a study, with the fault levels of :func:`coordination.faults.compute`, this module
runs four checks a designer documents beside selectivity, and a fifth on motor circuits:

``disconnection``
    The device's latest operating time at the minimum earth-fault current at the circuit's far
    end against IEC 60364-4-41 Table 41.1 (final circuits) or the 5 s / 1 s of distribution
    circuits; the maximum loop impedance Zs for that device is shown beside the circuit's Zs.
``overload``
    Ib <= In <= Iz and I2 <= 1.45 Iz (IEC 60364-4-43, 433.1), where the study gives Ib or Iz.
``fault-energy``
    The adiabatic rule S >= sqrt(I2t) / k (IEC 60364-4-43, 434.5.2; IEC 60364-5-54, 543.1.2) for
    the line conductors and the protective conductor.
``breaking-capacity``
    The device's rated short-circuit breaking capacity against the largest fault at its board
    (IEC 60364-4-43, 434.5.1).
``starting``
    On a circuit with a motor or an inrush load: neither the circuit's device nor any device
    above it operates during the start, and the start's first peak stays at or below every
    lowest instantaneous pickup (:mod:`coordination.motors`). On the study's selectivity basis,
    since it asks whether the installation starts, not whether it is safe.

The first four are safety checks: they always take the worst case that a device complying with its
standard allows (the band's envelope basis: the upper edge, the maximum let-through energy),
whatever basis the study chose for selectivity. For MCBs this reproduces BS 7671 Table 41.3: the
0.4 s of Table 41.1 is met only in the instantaneous region, so Ia is the upper instantaneous
multiple times In.

Every result reads the same way: it passes when ``value <= limit`` (a time, a current or a
cross-section in ``unit``), and its ``reason`` is one line a designer can act on.

The package, by responsibility (names with a leading underscore are internal to it):

``results``            :class:`CheckResult` and :data:`CHECK_NAMES`
``common``             the words for numbers in reasons; a device's edges at its fault currents
``disconnection``      IEC 60364-4-41 Table 41.1, Ia, Zs max, the disconnection check
``overload``           IEC 60364-4-43 433.1 and the device or cable to choose instead
``fault_energy``       the adiabatic rule, conductor sizes and k, the fault-energy check
``breaking_capacity``  the device against the largest fault at its board
``starting``           a motor's start or an inrush through the circuit's device and those above
``runner``             :func:`check_device` (one circuit) and :func:`run` (a study)

The text table of the results is :func:`coordination.tables.check_table`.
"""

from coordination.checks.breaking_capacity import CAPACITY_KEYS
from coordination.checks.disconnection import (
    DISTRIBUTION_TIME_S,
    EARTHING_KIND,
    FASTEST_OVERCURRENT_MULTIPLE,
    FINAL_CIRCUIT_SCOPE_A,
    TABLE_41_1,
    TABLE_41_1_SOURCE,
    disconnection_time_s,
    max_zs_ohm,
    operating_current_a,
)
from coordination.checks.fault_energy import (
    ADIABATIC_LIMIT_S,
    INSULATION_ALIASES,
    K_TABLE,
    K_TABLE_SOURCE,
    MATERIAL_ALIASES,
    ConductorSizes,
    adiabatic_min_csa_mm2,
    conductor_sizes,
    k_factor,
)
from coordination.checks.overload import overload_conditions, overload_ok
from coordination.checks.results import CHECK_NAMES, CheckResult
from coordination.checks.runner import check_device, run
from coordination.checks.starting import STARTING_SOURCE, start_profile, starting_chain

__all__ = [
    "ADIABATIC_LIMIT_S",
    "CAPACITY_KEYS",
    "CHECK_NAMES",
    "DISTRIBUTION_TIME_S",
    "EARTHING_KIND",
    "FASTEST_OVERCURRENT_MULTIPLE",
    "FINAL_CIRCUIT_SCOPE_A",
    "INSULATION_ALIASES",
    "K_TABLE",
    "K_TABLE_SOURCE",
    "MATERIAL_ALIASES",
    "STARTING_SOURCE",
    "TABLE_41_1",
    "TABLE_41_1_SOURCE",
    "CheckResult",
    "ConductorSizes",
    "adiabatic_min_csa_mm2",
    "check_device",
    "conductor_sizes",
    "disconnection_time_s",
    "k_factor",
    "max_zs_ohm",
    "operating_current_a",
    "overload_conditions",
    "overload_ok",
    "run",
    "start_profile",
    "starting_chain",
]
