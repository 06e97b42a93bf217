"""The calculation report: one self-contained, printable HTML file per project.

``render_report(detail, record, schedule, input_name=..., input_sha256=..., changes=None)``
returns its bytes (``changes``: the revision diff shown in the "Revisions" section); matplotlib (the ``report`` extra) is imported only when a report is rendered.
"""

from __future__ import annotations

__all__ = ["render_report", "report_file_name"]

from detailer.report.html import render_report, report_file_name
