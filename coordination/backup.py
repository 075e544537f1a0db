"""Back-up protection and conditional ratings: a device on the supply side that breaks what a
device below it cannot.

IEC 60364-4-43 (and BS 7671) 434.5.1 admit a device whose breaking capacity is below the largest
fault where it sits, provided a device on the supply side has the breaking capacity needed and
the energy it lets through is withstood by the device and the conductors on the load side. That
proof is the makers' tests (the back-up or "cascading" tables of a pair, the conditional
short-circuit rating of an assembly with a stated device ahead of it), never a curve: the study
declares it, and the breaking-capacity check takes the declaration as given and says so.

Two ways to declare it:

* ``backup_a = { <upstream id> = <A> }`` on a circuit: the circuit's device is backed up to that
  current by the device of that upstream circuit (any circuit above it);
* ``conditional_a = <A>`` on a circuit that feeds a board: every device on that board is backed
  up to that current by this circuit's device (an assembly's conditional rating).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Any

#: Where a back-up declaration is written, for the reason's words.
BACKUP_KEY = "backup_a"
CONDITIONAL_KEY = "conditional_a"
BACKUP_SOURCE = "IEC 60364-4-43 434.5.1"
#: What every pass by back-up says: the figure is the maker's tested data.
TESTED_NOTE = "the maker's tested combination: verify against the maker's data"


@dataclass(frozen=True)
class Backup:
    """One declared back-up of a circuit's device.

    Parameters
    ----------
    upstream : str
        Id of the circuit whose device backs this one up.
    current_a : float
        Up to this prospective fault current [A] the pair is declared to break the fault.
    key : str
        ``"backup_a"`` (declared on the circuit) or ``"conditional_a"`` (on its feeder).
    """

    upstream: str
    current_a: float
    key: str


def declared_backups(circuit: Any, feeder: Any | None) -> tuple[Backup, ...]:
    """The back-up declarations that cover a circuit's device, largest current first.

    Parameters
    ----------
    circuit : coordination.model.Circuit
        The circuit (its ``backup_a``: upstream id -> current [A]).
    feeder : coordination.model.Circuit or None
        The circuit that feeds its board (its ``conditional_a`` [A]); None at the origin.

    Returns
    -------
    tuple of Backup

    References
    ----------
    IEC 60364-4-43:2008, 434.5.1.

    Examples
    --------
    >>> from types import SimpleNamespace as C
    >>> got = declared_backups(C(backup_a={"main": 10000.0}), C(id="cu", conditional_a=16000.0))
    >>> print([(b.upstream, b.current_a, b.key) for b in got])
    [('cu', 16000.0, 'conditional_a'), ('main', 10000.0, 'backup_a')]
    """
    backups = getattr(circuit, BACKUP_KEY, None)
    conditional = None if feeder is None else getattr(feeder, CONDITIONAL_KEY, None)
    if not backups and conditional is None:
        return ()  # most circuits declare none
    found = [Backup(str(up), float(a), BACKUP_KEY) for up, a in (backups or {}).items()]
    if conditional is not None:
        found.append(Backup(str(feeder.id), float(conditional), CONDITIONAL_KEY))
    return tuple(sorted(found, key=lambda b: -b.current_a))


def covering(fault_a: float, backups: Iterable[Backup]) -> Backup | None:
    """The declaration that covers a fault (the largest current among those at or above it).

    Parameters
    ----------
    fault_a : float
        The largest prospective fault current where the device sits [A].
    backups : iterable of Backup
        Its declarations (:func:`declared_backups`).

    Returns
    -------
    Backup or None
        None when no declaration reaches the fault.

    References
    ----------
    IEC 60364-4-43:2008, 434.5.1.

    Examples
    --------
    >>> b = Backup("cu", 16000.0, "conditional_a")
    >>> print(covering(12000.0, [b]) is b, covering(20000.0, [b]))
    True None
    """
    best = None
    for backup in backups:
        if fault_a <= backup.current_a and (best is None or backup.current_a > best.current_a):
            best = backup
    return best


def describe(backup: Backup) -> str:
    """Words for a declaration, for a check's reason.

    Examples
    --------
    >>> print(describe(Backup("tails", 16000.0, "conditional_a"))[:61])
    declared back-up by tails up to 16 kA (conditional_a on tails
    """
    amount = (f"{backup.current_a / 1000:.3g} kA" if backup.current_a >= 1000
              else f"{backup.current_a:.3g} A")
    if backup.key == CONDITIONAL_KEY:
        where = f"conditional_a on {backup.upstream}: the board's conditional rating"
    else:
        where = "backup_a of this circuit"
    return f"declared back-up by {backup.upstream} up to {amount} ({where}; {TESTED_NOTE})"


def json_backups(backups: Iterable[Backup]) -> list[Mapping[str, Any]]:
    """The declarations for the JSON output: ``upstream``, ``current_a``, ``key``.

    Examples
    --------
    >>> print(json_backups([Backup("cu", 16000.0, "conditional_a")]))
    [{'upstream': 'cu', 'current_a': 16000.0, 'key': 'conditional_a'}]
    """
    return [{"upstream": b.upstream, "current_a": b.current_a, "key": b.key} for b in backups]
