"""Revision marks of the layout drawing: the revision table and the marker beside a changed bar.

Pure. The revision table sits on the title block, full column width, with the header row
(Rev, Date, Description) next to the title block and one row per issued revision stacked
upwards, oldest lowest and newest at the top: rows already issued never move when a revision
is added (common practice for a revision box above the title block).

A revision marker is an equilateral triangle, point up, with the revision letter inside
(common practice), drawn on :data:`~detailer.io.dxf_style.REVISION_LAYER` beside the callout
of each bar set changed or added at the revision being issued.
"""

from __future__ import annotations

__all__ = [
    "RevisionRow",
    "RevisionTable",
    "marker_primitives",
    "marker_width_mm",
    "revision_table",
    "table_height_mm",
]

import math
import textwrap
from collections.abc import Sequence
from dataclasses import dataclass

from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import Box, Fields, Poly, Text
from detailer.record_types import RevisionRecord

#: Paper sizes of the marker, mm: letter height, smallest side, room around the letter.
MARKER_TEXT_MM = 1.8
MARKER_MIN_SIDE_MM = 5.0
MARKER_MARGIN_MM = 3.5
MARKER_GAP_MM = 1.0  # between the callout text and the marker

#: Paper sizes of the revision table, mm.
TABLE_TEXT_MM = 2.0
TABLE_ROW_MM = 5.0  # a row of one line
TABLE_LINE_MM = 3.0  # each further wrapped line of a description
TABLE_REV_W_MM = 14.0
TABLE_DATE_W_MM = 26.0
TABLE_GAP_MM = 4.0  # clear space kept above the table (to the notes)


def _side_mm(letter: str) -> float:
    tw = len(letter) * st.CHAR_WIDTH_FACTOR * MARKER_TEXT_MM
    return max(MARKER_MIN_SIDE_MM, tw + MARKER_MARGIN_MM)


def marker_width_mm(letter: str) -> float:
    """Room a marker takes beside a callout on paper: the gap and the triangle's base."""
    return MARKER_GAP_MM + _side_mm(letter) if letter else 0.0


def marker_primitives(
    letter: str, x_near: float, y_mid: float, direction: int, s: int, xdata: Fields
) -> tuple[Poly, Text]:
    """The triangle and its letter beside a callout, model mm at plot scale 1:``s``.

    ``x_near`` is the end of the callout text the marker goes beside; ``direction`` +1 puts it
    to the right of that point, -1 to the left; ``y_mid`` is the callout's middle line.
    """
    a = _side_mm(letter) * s
    h = a * math.sqrt(3.0) / 2.0
    x0 = x_near + direction * MARKER_GAP_MM * s
    x1 = x0 + direction * a
    xa, xb = min(x0, x1), max(x0, x1)
    yb = y_mid - h / 2.0
    lay = st.REVISION_LAYER.name
    tri = Poly(
        lay, ((xa, yb, 0.0), (xb, yb, 0.0), ((xa + xb) / 2.0, yb + h, 0.0)), True, 0.0, xdata
    )
    # the letter on the centroid, a third of the height up: the widest place it fits
    text = Text(
        lay, letter, (xa + xb) / 2.0, yb + h / 3.0, MARKER_TEXT_MM * s, "MIDDLE_CENTER", xdata
    )
    return tri, text


@dataclass(frozen=True, slots=True)
class RevisionRow:
    """One row of the table (paper mm): its cells and the band it fills."""

    revision: str
    date: str
    lines: tuple[str, ...]  # the description, wrapped to its column
    y0: float
    y1: float


@dataclass(frozen=True, slots=True)
class RevisionTable:
    """The laid-out table: outline, column dividers, header band and rows, newest last."""

    box: Box
    columns_x: tuple[float, float]  # the two inner column lines
    header: RevisionRow
    rows: tuple[RevisionRow, ...]  # oldest first (lowest on the sheet)


def _wrap_chars(width_mm: float) -> int:
    return max(int((width_mm - 4.0) / (st.CHAR_WIDTH_FACTOR * TABLE_TEXT_MM)), 10)


def _lines(description: str, width_mm: float) -> tuple[str, ...]:
    return tuple(textwrap.wrap(description, _wrap_chars(width_mm))) or ("",)


def _row_h(n_lines: int) -> float:
    return TABLE_ROW_MM + TABLE_LINE_MM * (n_lines - 1)


def _desc_width(width_mm: float) -> float:
    return width_mm - TABLE_REV_W_MM - TABLE_DATE_W_MM


def table_height_mm(revisions: Sequence[RevisionRecord], width_mm: float) -> float:
    """Paper height of the table (header included) and the gap above it; 0 with no revision."""
    if not revisions:
        return 0.0
    w = _desc_width(width_mm)
    rows = sum(_row_h(len(_lines(r.description, w))) for r in revisions)
    return TABLE_ROW_MM + rows + TABLE_GAP_MM


def revision_table(
    revisions: Sequence[RevisionRecord], x0: float, x1: float, y_base: float
) -> RevisionTable | None:
    """The table standing on ``y_base`` between ``x0`` and ``x1`` (paper mm); None if empty."""
    if not revisions:
        return None
    w = _desc_width(x1 - x0)
    header = RevisionRow("Rev", "Date", ("Description",), y_base, y_base + TABLE_ROW_MM)
    rows = []
    y = header.y1
    for r in revisions:
        lines = _lines(r.description, w)
        y_top = y + _row_h(len(lines))
        rows.append(RevisionRow(r.revision, r.date, lines, y, y_top))
        y = y_top
    return RevisionTable(
        box=Box(x0, y_base, x1, y),
        columns_x=(x0 + TABLE_REV_W_MM, x0 + TABLE_REV_W_MM + TABLE_DATE_W_MM),
        header=header,
        rows=tuple(rows),
    )
