"""The one exception type for bad input, shared by every layer.

A message names where the problem is (the circuit id and the key, when known) and what is
allowed. The command line prints ``str(error)`` on one line and exits with code 2.
"""

from __future__ import annotations


class InputError(ValueError):
    """Bad input: an unknown device, a value out of range, a malformed study.

    Parameters
    ----------
    problem : str
        What is wrong and what is allowed, e.g. ``"rating 33 A is not in the series 6, 10, ..."``.
    circuit : str, optional
        Id of the circuit the value belongs to.
    key : str, optional
        The study-file key (dotted for nested keys, e.g. ``"cable.csa_mm2"``).
    """

    def __init__(self, problem: str, *, circuit: str | None = None, key: str | None = None):
        self.problem = problem
        self.circuit = circuit
        self.key = key
        super().__init__(str(self))

    def within(self, *, circuit: str | None = None, key: str | None = None) -> InputError:
        """The same error with the circuit and/or key filled in where they were unknown.

        A key given here is a prefix: ``within(key="device")`` on an error about ``"Ir_a"``
        gives ``"device.Ir_a"``.
        """
        new_key = self.key
        if key is not None:
            new_key = key if self.key is None else f"{key}.{self.key}"
        return InputError(
            self.problem,
            circuit=self.circuit if self.circuit is not None else circuit,
            key=new_key,
        )

    def __str__(self) -> str:
        where = []
        if self.circuit is not None:
            where.append(f"circuit '{self.circuit}'")
        if self.key is not None:
            where.append(f"key '{self.key}'")
        text = " ".join(self.problem.split())  # always one line
        return f"{', '.join(where)}: {text}" if where else text
