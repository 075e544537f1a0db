"""Device time-current models: every family becomes a :class:`curves.band.Band`.

This layer knows nothing of studies. Standard values live in ``curves/data`` with their sources.
"""

from typing import Any

from curves.errors import InputError

__all__ = ["Band", "InputError"]


def __getattr__(name: str) -> Any:
    """``curves.Band`` on first use, so that importing the errors alone does not load numpy."""
    if name == "Band":
        from curves.band import Band

        globals()["Band"] = Band
        return Band
    raise AttributeError(f"module 'curves' has no attribute {name!r}")
