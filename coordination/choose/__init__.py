"""The chooser: the smallest rating, or the lowest settings, that meet every requirement.

A designer does not only check a design: they must pick the upstream device (the sub-main fuse
that will not operate before any final-circuit breaker on its board) and the settings of
adjustable breakers. :func:`choose` searches one circuit's device family in "lowness" order
(rated current first; for adjustable breakers then Ir, Isd, tsd, tr, Ii on the unit's own setting
grid) and returns the first candidate that meets every requirement at once:

* carries the load and protects its cable (IEC 60364-4-43 clause 433.1): Ib <= In <= Iz and
  I2 <= 1.45 Iz, where In is the current setting Ir for an adjustable device;
* breaks the largest fault where it sits (breaking capacity);
* disconnects earth faults in time and limits the fault energy in its cable (the checks of
  :mod:`coordination.checks`, on the envelope basis);
* is selective as required with every device below it, up to each one's board fault level, and
  with every device above it (the overlap engine, :func:`coordination.engine.compare`).

Cheap requirements (Ib, Iz, I2, breaking capacity) rule out whole groups of candidates first.
Selectivity is then screened vectorised on one current grid: the need of the devices below
(the largest of their upper edges times their margins, plus the interval over an adjustable
breaker) is computed once, and the edges of a whole grid of candidate settings are compared with
it and with the lower edges of the devices above, as arrays (:func:`screen_grid`: about a
million electronic settings in a fraction of a second). Survivors are confirmed in lowness order
by the same engine and checks that ``coordination check`` runs, so the answer is what the check
would say.

When nothing fits, each remedy is checked before it is offered, by searching again with it
assumed: a larger cable (Iz relaxed to what the smallest otherwise passing candidate needs, then
confirmed with that Iz), a tested limit (only for pairs whose bands meet where the device below
operates within 0.1 s, the region a makers' test decides), a partial requirement, a downstream
MCB with a lower let-through (never where the limit is the candidate's own instantaneous
release), another family, a larger device above, a higher breaking capacity, earth faults or
fault energy dealt with by other means. A remedy is offered only with the device that then meets
every requirement; otherwise the choice says that it alone would not be enough and what stays
binding (:attr:`Choice.insufficient`).

The package, in the order a search runs: :mod:`~coordination.choose.candidates` (each family's
series and the settings grids), :mod:`~coordination.choose.problem` (one circuit's requirements,
frozen, and a search's state, apart), :mod:`~coordination.choose.screening` (the vectorised
pre-filter), :mod:`~coordination.choose.exact` (the exact check),
:mod:`~coordination.choose.search`, :mod:`~coordination.choose.explain` (why nothing fits; the
remedies) and :mod:`~coordination.choose.answer` (:func:`choose`, :func:`choose_board`, the
printout). The selectivity rule itself is :mod:`coordination.criterion`, shared with the engine.

References
----------
IEC 60364-4-43:2008, 433.1 (Ib <= In <= Iz, I2 <= 1.45 Iz); IEC 60364-4-41:2005, 411.3.2 and
Table 41.1 (disconnection times); IEC 60364-5-53:2019, 536.4 (selectivity); IEC 60947-2:2016,
Annex A (selectivity limit current); EN 60898-1 Annex ZA and IEC 60269-2 (let-through and
pre-arcing I2t).
"""

from coordination.choose.answer import Choice, choose, choose_board, format_results
from coordination.choose.candidates import (
    FAMILIES,
    Candidate,
    SettingsGrid,
    candidate_groups,
    electronic_edges,
    electronic_parts,
    family_of,
    spec_text,
)
from coordination.choose.exact import exact_failure
from coordination.choose.problem import Failure, substitute
from coordination.choose.screening import screen, screen_grid

__all__ = ["FAMILIES", "Candidate", "Choice", "Failure", "SettingsGrid", "candidate_groups",
           "choose", "choose_board", "electronic_edges", "electronic_parts", "exact_failure",
           "family_of", "format_results", "screen", "screen_grid", "spec_text", "substitute"]
