"""The calculation report: one self-contained, printable HTML file per project.

``render_report(detail, record, schedule, input_name=..., input_sha256=..., changes=None,
not_detailed=())`` returns its bytes (``changes``: the revision diff shown in the "Revisions"
section; ``not_detailed``: (strip id, reason) of the strips this issue could not design). The
plots are hand-written SVG (:mod:`detailer.report.plots`): no plotting library is imported.
"""

from __future__ import annotations

__all__ = ["render_report", "report_file_name"]

from detailer.report.html import render_report, report_file_name
