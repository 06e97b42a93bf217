"""The bar schedule as UTF-8 CSV, in the columns of the BS 8666 form of bar schedule.

Layout (every line is a CSV record, so the whole file reads back with Python's ``csv``):

1. header lines, two cells each: ``Bar schedule`` / standard, project, title, one ``Member ref``
   line per strip (id and description), for an incomplete issue one ``Not detailed`` line per
   strip left out (id and reason) and an ``Incomplete`` line, then drawing, revision, date,
   the caution line;
2. an empty line, then the column header row and one row per mark per member;
3. for code 99 rows, one ``Sketch`` line per mark naming its dimensioned sketch;
4. an empty line, then the summary block: a ``Summary`` line, its column header row, one
   line per type and size, and a ``Total`` line.

Every value comes from the project file or the schedule, so a rerun writes the same bytes:
``\\n`` line ends, no time stamps, fixed number formats (lengths in m to 2 decimals, mass per
metre to 3, masses in kg to 2).
"""

from __future__ import annotations

__all__ = [
    "COLUMNS",
    "SUMMARY_COLUMNS",
    "render_schedule_csv",
    "schedule_csv_lines",
    "write_schedule_csv",
]

import csv
import io
from collections.abc import Sequence
from pathlib import Path
from typing import Final

from detailer import CAUTION
from detailer.io.atomic import write_output
from detailer.model import Project
from detailer.schedule import Schedule, ScheduleRow
from detailer.shapes.bs8666 import STANDARD

#: Column headings of the schedule rows (BS 8666 form of bar schedule, from memory).
COLUMNS: Final[tuple[str, ...]] = (
    "Member",
    "Bar mark",
    "Type and size",
    "No. of mbrs",
    "No. of bars in each",
    "Total no.",
    "Length of each bar (mm)",
    "Shape code",
    "A",
    "B",
    "C",
    "D",
    "E/r",
    "Rev",
)

#: Column headings of the summary block.
SUMMARY_COLUMNS: Final[tuple[str, ...]] = (
    "Type and size",
    "Total no.",
    "Total length (m)",
    "Mass per metre (kg/m)",
    "Mass (kg)",
)


def _length_m(value: float) -> str:
    return f"{value:.2f}"


def _mass_kg(value: float) -> str:
    return f"{value:.2f}"


def _dim_cell(row: ScheduleRow, name: str) -> str:
    value = row.dim(name)
    if value is None:
        return ""
    # A code 99's free dimension is printed in parentheses (BS 8666:2005 general notes).
    if row.shape_code == "99" and name in row.free_dims:
        return f"({value})"
    return str(value)


def _e_or_r_cell(row: ScheduleRow) -> str:
    """Column E/r: dimension E, else a specified bend radius R; both as "E R<radius>"."""
    e = _dim_cell(row, "E")
    r = row.dim("R")
    if r is None:
        return e
    return f"{e} R{r}" if e else str(r)


def _row_cells(row: ScheduleRow) -> list[str]:
    return [
        row.member,
        row.mark,
        row.type_and_size,
        str(row.n_members),
        str(row.n_bars_each),
        str(row.total_bars),
        str(row.length_mm),
        row.shape_code,
        *(_dim_cell(row, n) for n in ("A", "B", "C", "D")),
        _e_or_r_cell(row),
        row.revision,
    ]


def schedule_csv_lines(
    schedule: Schedule, project: Project, not_detailed: Sequence[tuple[str, str]] = ()
) -> list[list[str]]:
    """The CSV records of the schedule, as lists of cells (see the module docstring).
    ``not_detailed``: (strip id, reason) of strips left out of an incomplete issue, listed in
    the header so that nobody takes the schedule for the whole floor."""
    out: list[list[str]] = [
        ["Bar schedule", STANDARD],
        ["Project", project.id],
        ["Title", project.title],
    ]
    for strip in project.strips:
        out.append(
            ["Member ref", strip.id, strip.description]
            if strip.description
            else ["Member ref", strip.id]
        )
    out += [["Not detailed", strip_id, reason] for strip_id, reason in not_detailed]
    if not_detailed:
        out.append(["Incomplete", f"{len(not_detailed)} strip(s) not detailed: not scheduled"])
    out += [
        ["Drawing", project.drawing_ref],
        ["Revision", project.revision],
        ["Date", project.date],
        ["Caution", CAUTION],
        [],
        list(COLUMNS),
    ]
    out += [_row_cells(r) for r in schedule.rows]
    sketches: dict[str, str] = {}
    for r in schedule.rows:
        if r.sketch_ref:
            sketches.setdefault(r.mark, r.sketch_ref)
    out += [["Sketch", mark, ref] for mark, ref in sketches.items()]
    out += [[], ["Summary"], list(SUMMARY_COLUMNS)]
    for line in schedule.summary:
        out.append(
            [
                line.type_and_size,
                str(line.total_bars),
                _length_m(line.total_length_m),
                f"{line.mass_kg_per_m:.3f}",
                _mass_kg(line.mass_kg),
            ]
        )
    out.append(
        [
            "Total",
            str(sum(line.total_bars for line in schedule.summary)),
            _length_m(schedule.total_length_m),
            "",
            _mass_kg(schedule.total_mass_kg),
        ]
    )
    return out


def render_schedule_csv(
    schedule: Schedule, project: Project, not_detailed: Sequence[tuple[str, str]] = ()
) -> bytes:
    """The schedule CSV as UTF-8 bytes with ``\\n`` line ends."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerows(schedule_csv_lines(schedule, project, not_detailed))
    return buffer.getvalue().encode("utf-8")


def write_schedule_csv(path: Path, schedule: Schedule, project: Project) -> None:
    """Write the schedule CSV atomically (an ``OutputError`` names the path and the fix)."""
    write_output(Path(path), render_schedule_csv(schedule, project))
