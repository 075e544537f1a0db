"""Boards by the names the outputs print: which circuit feeds a board named on the command line.

A board is named by its feeding circuit's ``board`` key, else by that circuit's id; the board
the supply feeds is ``origin`` (``Study.board_name`` prints the same names). Commands that take
``--board`` accept either the name as printed or the id of the circuit that feeds the board.
"""

from __future__ import annotations

from coordination.model import SUPPLY_ID, Study
from curves.errors import InputError

#: The name of the board the supply feeds, as every output prints it.
ORIGIN = "origin"


def board_names(study: Study) -> dict[str, str]:
    """Each circuit that feeds a board -> the board's name as printed (its ``board`` or id).

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=6000.0), (Circuit("main", "supply", "gG63", board="DB-1"),
    ...                                       Circuit("lights", "main", "B6")))
    >>> board_names(s)
    {'main': 'DB-1'}
    """
    return {c.id: c.board or c.id for c in study.circuits if study.children.get(c.id)}


def board_name(study: Study, feeder: str) -> str:
    """The name of the board a circuit feeds (``"supply"``: :data:`ORIGIN`)."""
    return ORIGIN if feeder == SUPPLY_ID else study.by_id[feeder].board or feeder


def feeder_of(study: Study, board: str) -> str:
    """The circuit that feeds a board, given its name as printed or the feeder's id.

    ``"origin"`` (or ``"supply"``) is the board the supply feeds, returned as ``"supply"``.
    A name as printed wins over a circuit id spelt the same.

    Raises
    ------
    InputError
        With the key ``--board``: no such board, or a circuit that feeds none; the boards
        there are are listed (the first twelve).

    Examples
    --------
    >>> from coordination.model import Circuit, Supply
    >>> s = Study("t", Supply(pfc_a=6000.0), (Circuit("main", "supply", "gG63", board="DB-1"),
    ...                                       Circuit("lights", "main", "B6")))
    >>> print(feeder_of(s, "DB-1"), feeder_of(s, "main"), feeder_of(s, "origin"))
    main main supply
    """
    if board in (ORIGIN, SUPPLY_ID):
        return SUPPLY_ID
    names = board_names(study)
    for feeder, name in names.items():
        if name == board:
            return feeder
    if board in names:
        return board
    shown = ", ".join(sorted(names.values(), key=str.casefold)[:12])
    more = "" if len(names) <= 12 else f" and {len(names) - 12} more"
    if board in study.by_id:
        what = f"circuit {board!r} feeds no board (it has no circuits below it)"
    else:
        what = f"no circuit or board {board!r} in the study"
    raise InputError(f"{what}; give a board's name or the id of the circuit that feeds it: "
                     f"{ORIGIN}, {shown}{more}", key="--board")
