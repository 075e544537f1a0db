"""Writing the report: the PDF page by page, and its tables as CSV on request.

The PDF is drawn with matplotlib alone (``PdfPages``; text pages are figures with text placed on
them): the plots need matplotlib anyway, so the report adds no dependency, and with TrueType
fonts embedded (``pdf.fonttype`` 42) its text layer can be searched, copied and extracted.

Everything is computed before the first byte is written; files are written beside their target
and moved into place only when complete (:func:`coordination.io.atomic_path`), so on any error no
file is written and an existing report is never left half-written.
"""

from __future__ import annotations

import csv as csv_module
import math
import os
import sys
from collections.abc import Sequence
from contextlib import ExitStack
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from coordination import CAUTION, __version__
from coordination.engine import PairResult
from coordination.faults import NodeFaults
from coordination.io import atomic_path, check_output_path
from coordination.model import Study
from coordination.pipeline import Assessment, assess
from curves.errors import InputError

from .cases import csv_records
from .pages import build_pages


@dataclass(frozen=True)
class ReportSummary:
    """What :func:`write_report` wrote.

    Attributes
    ----------
    ok : bool
        Every selectivity requirement and every protection check is met.
    pages : int
        Pages in the PDF.
    extra_files : tuple of Path
        The CSV files written beside the PDF (empty unless asked for).
    path : Path
        The PDF.
    """

    ok: bool
    pages: int
    extra_files: tuple[Path, ...] = ()
    path: Path | None = None


# -- CSV ---------------------------------------------------------------------------------------
def _flat(value: Any) -> Any:
    if isinstance(value, float):
        return value if math.isfinite(value) else ""
    if value is None:
        return ""
    if isinstance(value, list | tuple):
        return " ".join(str(_flat(v)) for v in value)
    if isinstance(value, dict):
        return "; ".join(f"{k}={_flat(v)}" for k, v in value.items())
    return value


def _csv_rows(records: Sequence[dict[str, Any]]) -> tuple[list[str], list[list[Any]]]:
    headers: list[str] = []
    for r in records:
        for key in r:
            if key not in headers:
                headers.append(key)
    return headers, [[_flat(r.get(h)) for h in headers] for r in records]


def _pair_record(p: PairResult) -> dict[str, Any]:
    record = p.to_json()
    lo, hi = record.pop("window_a")
    record.pop("band_basis", None)
    out = {"upstream": record.pop("upstream"), "downstream": record.pop("downstream"),
           "verdict": record.pop("verdict"), "limit_a": record.pop("limit_a"),
           "window_lo_a": lo, "window_hi_a": hi, "decided_by": record.pop("decided_by"),
           "basis": record.pop("basis"),
           "upstream_basis": p.upstream_basis, "downstream_basis": p.downstream_basis}
    out.update(record)
    return out


def _node_record(node: NodeFaults) -> dict[str, Any]:
    return node.to_json()


def _write_csv(path: Path, records: Sequence[dict[str, Any]]) -> None:
    headers, rows = _csv_rows(records)
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv_module.writer(handle)
        writer.writerow(headers)
        writer.writerows(rows)


def _progress(enabled: bool, done: int, total: int) -> None:
    if not enabled:
        return
    width = 30
    filled = int(width * done / max(total, 1))
    sys.stderr.write(f"\rreport [{'#' * filled}{'.' * (width - filled)}] page {done}/{total}")
    if done >= total:
        sys.stderr.write("\n")
    sys.stderr.flush()


def write_report(study: Study, path: str | os.PathLike, *, csv: bool = False,
                 basis: str | None = None, progress: bool = False,
                 assessment: Assessment | None = None) -> ReportSummary:
    """Write the selectivity report of a study as a PDF (and its tables as CSV on request).

    Parameters
    ----------
    study : Study
        The loaded study.
    path : path-like
        The PDF to write. Replaced atomically: on any error nothing is written and an existing
        file is left as it was.
    csv : bool
        Also write ``<stem>-pairs.csv``, ``<stem>-checks.csv`` and ``<stem>-faults.csv`` beside
        it (currents in A, impedances in ohm, as in the JSON output).
    basis : str, optional
        ``"typical"`` or ``"envelope"`` for every device's selectivity band; ``None``: each
        circuit's own, else the study's.
    progress : bool
        Show a one-line progress bar on stderr.
    assessment : Assessment, optional
        The study's assessment when the caller has it already (the demo prints it first);
        made with ``basis``, which it must carry. By default it is made here.

    Returns
    -------
    ReportSummary
        ``ok`` (every requirement met), the page count and the CSV files written.

    References
    ----------
    IEC 60909-0 (fault levels), IEC 60947-2 Annex A (selectivity), IEC 60364-4-41/-4-43/-5-54
    (protection checks): the pages say which clause each table rests on.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from pypdf import PdfReader
    >>> from coordination import study
    >>> from coordination.report import bundled_example
    >>> text, where = bundled_example("small-shop.toml")
    >>> s = study.loads(text, source=where)
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     summary = write_report(s, Path(folder) / "shop.pdf")
    ...     print(summary.pages == len(PdfReader(summary.path).pages), summary.pages > 5)
    True True
    """
    import matplotlib
    from matplotlib.backends.backend_pdf import PdfPages

    from coordination.plot import LITERAL_TEXT

    target = check_output_path(path, inputs=(study.source,) if study.source else (), key="-o")
    if target.suffix.lower() != ".pdf":
        raise InputError(f"the report is a PDF; give a file ending in .pdf, not {target.name!r}",
                         key="-o")
    # everything that can fail on the study's data runs before a file is opened
    if assessment is None:
        assessment = assess(study, basis)
    elif assessment.basis != basis:
        raise ValueError(f"the assessment was made on basis {assessment.basis!r}, not {basis!r}")
    pages = build_pages(study, assessment)
    total = len(pages)
    extra: list[Path] = []
    stem = target.with_suffix("")
    with ExitStack() as stack:
        pdf_tmp = stack.enter_context(atomic_path(target))
        if csv:
            tables = (
                ("pairs", [_pair_record(p) for p in assessment.analysis.all_pairs]),
                ("checks", [r.to_json() for r in assessment.checks]),
                ("faults", [_node_record(n) for n in assessment.levels.nodes]),
            )
            if assessment.cases:  # every standby source's rows after the normal supply's
                more = csv_records(assessment)
                tables = (
                    ("pairs", [*tables[0][1], *(_pair_record(p) for p in more["pairs"])]),
                    ("checks", [*tables[1][1], *more["checks"]]),
                    ("faults", [*({"case": "normal", **n} for n in tables[2][1]),
                                *more["faults"]]),
                )
            for name, records in tables:
                out = check_output_path(stem.parent / f"{stem.name}-{name}.csv",
                                        inputs=(study.source,) if study.source else (),
                                        key="--csv")
                tmp = stack.enter_context(atomic_path(out))
                _write_csv(tmp, records)
                extra.append(out)
        metadata = {"Title": f"Selectivity report: {study.title}",
                    "Creator": f"coordination {__version__}", "Subject": CAUTION}
        # LITERAL_TEXT: a "$" in the study's text is printed as written, never as a formula
        with matplotlib.rc_context({"pdf.fonttype": 42, "font.family": "DejaVu Sans",
                                    **LITERAL_TEXT}), \
                PdfPages(pdf_tmp, metadata=metadata) as pdf:
            _progress(progress, 0, total)
            for number, build in enumerate(pages, start=1):
                fig = build(number, total)
                pdf.savefig(fig)
                _progress(progress, number, total)
    return ReportSummary(ok=assessment.ok, pages=total, extra_files=tuple(extra), path=target)


