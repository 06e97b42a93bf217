"""slabwright detailer: project input, design, detailing and scheduling of one-way RC slab strips.

``CAUTION`` is the one line every writer and the CLI print with their results.
"""

from __future__ import annotations

__all__ = ["CAUTION", "__version__"]

__version__ = "0.1.0"

#: One line, printed or written with every output (CLI, reports, schedules, drawings).
CAUTION = (
    "Caution: slabwright results must be checked by a competent engineer; "
    "they do not replace local codes or licensed professional practice."
)
