"""The selectivity report: one printable PDF of a whole study, and its tables as CSV.

:func:`write_report` writes it; :func:`run_demo` runs the bundled example. The package, by
responsibility:

- :mod:`.layout`: the A4 page frame and tables set across pages (no study knowledge);
- :mod:`.content`: what the report says (standards, tables, supply and basis summaries, notes);
- :mod:`.plan`: which time-current plots it carries;
- :mod:`.pages`: the page builders, in order, from an assessment of the study;
- :mod:`.write`: the PDF and the CSV files, written atomically;
- :mod:`.demo`: the bundled example and the demo.
"""

from __future__ import annotations

# the tests reach the underscored parts of the layout and the content through the package
from .content import STANDARDS, register_settings, report_date
from .content import _basis_summary as _basis_summary
from .content import _cable_text as _cable_text
from .content import _device_table as _device_table
from .content import _pair_table as _pair_table
from .demo import DEMO_EXAMPLE, DEMO_REPORT_NAME, bundled_example, run_demo
from .layout import MAX_TABLE_ROWS, TableSpec
from .layout import _capped as _capped
from .layout import _column_chars as _column_chars
from .layout import _row_lines as _row_lines
from .pages import build_pages
from .plan import MAX_PAIR_PLOTS, PlannedPlot, not_drawn, plot_plan
from .write import ReportSummary, write_report

__all__ = ["DEMO_EXAMPLE", "DEMO_REPORT_NAME", "MAX_PAIR_PLOTS", "MAX_TABLE_ROWS", "STANDARDS",
           "PlannedPlot", "ReportSummary", "TableSpec", "build_pages", "bundled_example",
           "not_drawn", "plot_plan", "register_settings", "report_date", "run_demo",
           "write_report"]
