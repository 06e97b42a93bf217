"""Sheets of the layout drawing: sheet size and scale, viewports, general notes, title block.

Pure. One sheet per strip, ISO 216 A2 or A1 landscape (A2 594 x 420, A1 841 x 594 mm), with a
frame 20 mm from the left (filing) edge and 10 mm from the others (ISO 5457, from memory). The
right-hand column holds the cross-section viewport, the general notes and the title block; the
rest holds one viewport on the section and plans at a standard scale. The revision table,
when there are revisions, stands on the title block (:mod:`detailer.io.dxf_revision`).

Choice: A2 when the strip fits it at 1:50 or larger, else A1 at the largest standard scale that
fits (1:20, 1:25, 1:50, 1:75, 1:100; beyond that 1:200, 1:250, 1:500 for very long strips).
"""

from __future__ import annotations

__all__ = [
    "A1",
    "A2",
    "DETAIL_SCALES",
    "MAIN_SCALES",
    "Sheet",
    "SheetPlan",
    "choose_sheet",
    "general_notes",
    "title_fields",
    "wrap_notes",
]

import math
import textwrap
from dataclasses import dataclass

from detailer import CAUTION, __version__
from detailer.curtailment import StripGeometry
from detailer.io.dxf_geometry import Box
from detailer.io.dxf_layout import StripPlan, View, plan_strip
from detailer.io.dxf_revision import RevisionTable, revision_table, table_height_mm
from detailer.io.dxf_views import cross_section
from detailer.layout import BarRole, StripDetail
from detailer.model import Project
from detailer.record_types import RevisionRecord


@dataclass(frozen=True, slots=True)
class Sheet:
    name: str
    width_mm: float
    height_mm: float


A2 = Sheet("A2", 594.0, 420.0)  # ISO 216
A1 = Sheet("A1", 841.0, 594.0)  # ISO 216
MAIN_SCALES = (20, 25, 50, 75, 100)
LONG_STRIP_SCALES = (200, 250, 500)
DETAIL_SCALES = (5, 10, 20, 25)
#: A2 is used only at this scale or larger; smaller scales go to A1 (common practice).
A2_SMALLEST_SCALE = 50

FRAME_LEFT_MM = 20.0
FRAME_MM = 10.0
COLUMN_MM = 175.0  # right-hand column: cross-section, notes, title block
TITLE_BLOCK_H_MM = 62.0
DETAIL_MAX_H_MM = 75.0
NOTE_TEXT_MM = 2.5
NOTE_LINE_MM = 4.2  # line pitch of the notes
NOTE_WRAP_CHARS = 80  # characters per line of the notes column (DejaVu Sans, 2.5 mm)


@dataclass(frozen=True, slots=True)
class Viewport:
    centre: tuple[float, float]  # paper mm
    size: tuple[float, float]  # paper mm
    view_centre: tuple[float, float]  # model mm (in the strip's own coordinates)
    view_height: float  # model mm


@dataclass(frozen=True, slots=True)
class SheetPlan:
    sheet: Sheet
    plan: StripPlan
    frame: Box
    column: Box
    main: Viewport
    detail: Viewport
    notes_top: float  # paper y of the first notes line
    title_box: Box
    revision_table: RevisionTable | None = None  # on the title block; None: no revisions
    notes: tuple[str, ...] = ()  # the general notes (``general_notes``), before wrapping


def _detail_box_fits(b: Box, s: int) -> bool:
    """The cross-section at 1:``s`` fits the right-hand column."""
    return b.width / s <= COLUMN_MM - 10.0 and b.height / s <= DETAIL_MAX_H_MM


def _main_area(sheet: Sheet) -> Box:
    return Box(
        FRAME_LEFT_MM + 5.0,
        FRAME_MM + 5.0,
        sheet.width_mm - FRAME_MM - COLUMN_MM - 5.0,
        sheet.height_mm - FRAME_MM - 5.0,
    )


def notes_lines_count(lines: tuple[str, ...]) -> int:
    return len(wrap_notes(lines))


def choose_sheet(
    project: Project,
    sd: StripDetail,
    *,
    revisions: tuple[RevisionRecord, ...] = (),
    changed_set_ids: frozenset[tuple[str, str]] = frozenset(),
    not_detailed: tuple[str, ...] = (),
) -> SheetPlan:
    """The sheet, scales and viewports for one strip (see the module docstring for the rule).

    ``revisions`` fill the revision table (oldest first); bar sets in ``changed_set_ids`` get
    a marker of the newest revision (the project's when ``revisions`` is empty); they are
    (strip id, set id) pairs, set ids being unique within a strip only. ``not_detailed``:
    the project's strips left out of this issue, named in the notes.
    """
    letter = revisions[-1].revision if revisions else project.revision
    changed = frozenset(changed_set_ids)

    def plan_at(scale: int, ds: int) -> StripPlan:
        return plan_strip(sd, scale, ds, revision=letter, changed_set_ids=changed)

    detail_scale = DETAIL_SCALES[-1]
    for ds in DETAIL_SCALES:  # the cross-section alone decides its scale
        view = View()
        cross_section(sd, ds, view)
        if _detail_box_fits(view.box(), ds):
            detail_scale = ds
            break
    # The main view is at least as wide as the slab: scales at which the slab alone
    # overflows the sheet need no trial layout.
    geom = StripGeometry.of(sd.strip)
    slab_mm = geom.slab_right_mm - geom.slab_left_mm
    notes = general_notes(project, sd, not_detailed=not_detailed)
    n_notes = notes_lines_count(notes)
    options = [(A2, s) for s in MAIN_SCALES if s <= A2_SMALLEST_SCALE]
    options += [(A1, s) for s in MAIN_SCALES + LONG_STRIP_SCALES]
    chosen = None
    for sheet, s in options:
        area = _main_area(sheet)
        if slab_mm / s > area.width:
            continue
        plan = plan_at(s, detail_scale)
        column_h = DETAIL_MAX_H_MM + 14.0 + n_notes * NOTE_LINE_MM + TITLE_BLOCK_H_MM
        column_h += table_height_mm(revisions, COLUMN_MM)
        if (
            plan.main_box.width / s <= area.width
            and plan.main_box.height / s <= area.height
            and column_h <= sheet.height_mm - 2 * FRAME_MM
        ):
            chosen = (sheet, plan)
            break
    if chosen is None:  # longer than 1:500 on A1 allows: keep 1:500, the viewport crops
        chosen = (A1, plan_at(LONG_STRIP_SCALES[-1], detail_scale))
    sheet, plan = chosen
    return _sheet_plan(sheet, plan, revisions, notes)


def _sheet_plan(
    sheet: Sheet,
    plan: StripPlan,
    revisions: tuple[RevisionRecord, ...] = (),
    notes: tuple[str, ...] = (),
) -> SheetPlan:
    frame = Box(FRAME_LEFT_MM, FRAME_MM, sheet.width_mm - FRAME_MM, sheet.height_mm - FRAME_MM)
    column = Box(frame.x1 - COLUMN_MM, frame.y0, frame.x1, frame.y1)
    area = _main_area(sheet)
    s = plan.scale
    mb = plan.main_box.grow(2.0 * s)
    w = min(mb.width / s, area.width)
    h = min(mb.height / s, area.height)
    # the main view sits at the top of its area, left-aligned: the eye starts there
    main = Viewport(
        centre=(area.x0 + w / 2, area.y1 - h / 2),
        size=(w, h),
        view_centre=((mb.x0 + mb.x1) / 2, (mb.y0 + mb.y1) / 2),
        view_height=h * s,
    )
    ds = plan.detail_scale
    db = plan.detail_box.grow(2.0 * ds)
    dw = min(db.width / ds, COLUMN_MM - 6.0)
    dh = min(db.height / ds, DETAIL_MAX_H_MM)
    detail = Viewport(
        centre=(column.x0 + 3.0 + dw / 2, column.y1 - 3.0 - dh / 2),
        size=(dw, dh),
        view_centre=((db.x0 + db.x1) / 2, (db.y0 + db.y1) / 2),
        view_height=dh * ds,
    )
    notes_top = column.y1 - 6.0 - dh - 8.0
    title_box = Box(column.x0, column.y0, column.x1, column.y0 + TITLE_BLOCK_H_MM)
    table = revision_table(revisions, column.x0, column.x1, title_box.y1)
    return SheetPlan(sheet, plan, frame, column, main, detail, notes_top, title_box, table, notes)


def _mm(value: float) -> str:
    """A length to print in the notes: whole mm, rounded up (never shorter than designed)."""
    return f"{math.ceil(value - 1e-6):d}"


# Strips named on a sheet of an incomplete issue; the rest are counted (the schedule header,
# record and report list them all).
NOT_DETAILED_NAMED = 12


def general_notes(
    project: Project, sd: StripDetail, *, not_detailed: tuple[str, ...] = ()
) -> tuple[str, ...]:
    """The general notes of a strip's sheet, one string per note (before wrapping).
    ``not_detailed``: strips of the project left out of this issue; the notes then open
    with a warning that the issue is incomplete."""
    strip = sd.strip
    m = project.materials
    notes = [
        "All dimensions in mm. Do not scale.",
        f"Concrete {m.concrete_class}, exposure class {m.exposure_class}.",
        (
            f"Nominal cover: top {strip.cover_top_mm:g}, bottom {strip.cover_bottom_mm:g}, "
            f"sides and bar ends {strip.cover_side_mm:g}."
        ),
        (
            f"Reinforcement: type {m.bar_type} (BS 8666 notation), f_yk = {m.f_yk:g} N/mm2, "
            f"ductility class {m.ductility_class}, to BS 4449; cut and bent to BS 8666."
        ),
        (
            "Callouts read: number, type and size, mark, centres, layer (e.g. 25H12-03-200 B1). "
            "T1/T2: top outer/inner layer; B1/B2: bottom outer/inner layer."
        ),
        (
            "Spans are dimensioned centreline to centreline; bar ends from the face of the "
            "nearest support."
        ),
        "Anchorage and lap lengths used (design values, EN 1992-1-1 8.4 and 8.7):",
    ]
    anchorage = [
        f"    {m.bar_type}{a.phi_mm} {a.layer} ({a.bond} bond): l_bd = {_mm(a.l_bd_mm)}, "
        f"lap l_0 = {_mm(a.l_0_mm)}"
        for a in sd.anchorage
    ]
    later = []
    if any(b.offset_mm > 0 for b in sd.bar_sets if b.role is BarRole.PRINCIPAL):
        later.append(
            "Alternate bar groups are drawn slightly apart for clarity; they lie in one layer."
        )
    later.append("Overlapping bars of one layer (laps, U-bars) are drawn slightly apart.")
    later.append(
        f"Bar schedule: see the schedule of drawing {project.drawing_ref} "
        f"revision {project.revision}."
    )
    lines = ["GENERAL NOTES"]
    if not_detailed:
        named = ", ".join(not_detailed[:NOT_DETAILED_NAMED])
        more = len(not_detailed) - NOT_DETAILED_NAMED
        if more > 0:
            named += f" and {more} more"
        lines.append(
            f"INCOMPLETE ISSUE: strip(s) {named} of this project could not be designed and "
            "are not on this drawing or its schedule (reasons in the calculation report)."
        )
    lines += [f"{i}. {t}" for i, t in enumerate(notes, start=1)]
    lines += anchorage
    lines += [f"{i}. {t}" for i, t in enumerate(later, start=len(notes) + 1)]
    lines.append(CAUTION)
    return tuple(lines)


def wrap_notes(lines: tuple[str, ...]) -> tuple[str, ...]:
    """The notes wrapped to the column (continuation lines indented under the text)."""
    out: list[str] = []
    for line in lines:
        indent = " " * (len(line) - len(line.lstrip()))
        head = line.split(" ", 1)[0] if line[:1].isdigit() else ""
        more = indent + " " * (len(head) + 1 if head else 0)
        out += textwrap.wrap(
            line, NOTE_WRAP_CHARS, initial_indent="", subsequent_indent=more, drop_whitespace=True
        ) or [""]
    return tuple(out)


def title_fields(
    project: Project, sd: StripDetail, sheet_plan: SheetPlan, index: int, total: int
) -> tuple[tuple[str, str], ...]:
    """(caption, value) pairs of the title block, top to bottom."""
    strip = sd.strip
    plan = sheet_plan.plan
    title = f"Strip {strip.id} - reinforcement layout"
    return (
        ("Project", project.title),
        ("Project id", project.id),
        ("Drawing", title),
        ("Strip", f"{strip.id}: {strip.description}" if strip.description else strip.id),
        ("Drawing ref", f"{project.drawing_ref}  sheet {index} of {total}"),
        ("Revision", project.revision),
        ("Date", project.date),
        (
            "Scale",
            (
                f"1:{plan.scale} (section, plans), 1:{plan.detail_scale} (section 1-1) "
                f"at {sheet_plan.sheet.name}"
            ),
        ),
        ("Produced by", f"slabwright {__version__}"),
    )
