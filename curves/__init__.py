"""Device time-current models: every family becomes a :class:`curves.band.Band`.

This layer knows nothing of studies. Standard values live in ``curves/data`` with their sources.
"""

from curves.band import Band
from curves.errors import InputError

__all__ = ["Band", "InputError"]
