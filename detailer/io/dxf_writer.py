"""The reinforcement layout drawing as DXF (R2013, mm): one drawing per project.

Model space holds, per strip, a region stacked below the previous one: the longitudinal
section at 1:1 (x as in the detail, so bar positions read back unchanged), the bottom and top
plans, and cross-section 1-1 to the right. Paper space holds one sheet per strip, layout
"Strip <id>": frame, a viewport on the section and plans at a standard scale, a viewport on the
cross-section, the general notes and the title block (:mod:`detailer.io.dxf_sheet`), and, when
revisions are given, the revision table on the title block; bar sets changed at the revision
being issued get a revision marker beside their section callout, on layer ``SW-REVISIONS``
(:mod:`detailer.io.dxf_revision`).

Every bar entity carries XDATA under the application id ``SLABWRIGHT`` (mark, strip, set,
layer, count, type and size, spacing, length, shape code and dimensions, x_start, x_end); so do
callouts and dimensions; revision markers carry ``kind=revision_marker``, the revision, strip,
set and mark, and table texts ``kind=revision_table``. :mod:`detailer.io.dxf_readback` reads
bars, callouts and dimensions back and passes over the rest.

:func:`write_layout` is pure: it returns the bytes; the same input gives the same bytes (fixed
header metadata, handles in creation order, numbers formatted with fixed decimals).
"""

from __future__ import annotations

__all__ = [
    "build_layout",
    "document_bytes",
    "layout_name",
    "sheet_plans",
    "write_layout",
    "write_layout_file",
]

import contextlib
import re
from collections.abc import Iterable, Iterator, Sequence
from pathlib import Path

import ezdxf
from ezdxf import units
from ezdxf.document import Drawing
from ezdxf.enums import TextEntityAlignment
from ezdxf.lldxf import const

from detailer.io import dxf_style as st
from detailer.io.atomic import write_output
from detailer.io.dxf_dimension import add_linear_dimension
from detailer.io.dxf_geometry import Fields
from detailer.io.dxf_layout import View
from detailer.io.dxf_revision import (
    TABLE_LINE_MM,
    TABLE_ROW_MM,
    TABLE_TEXT_MM,
    RevisionRow,
    RevisionTable,
)
from detailer.io.dxf_sheet import (
    NOTE_LINE_MM,
    NOTE_TEXT_MM,
    SheetPlan,
    choose_sheet,
    title_fields,
    wrap_notes,
)
from detailer.io.dxf_text import document_text
from detailer.layout import ProjectDetail, StripDetail
from detailer.record_types import RevisionRecord

#: Gap between two strips' regions in model space, mm.
REGION_GAP_MM = 10000.0
_BAD_NAME = re.compile(r'[<>/\\":;?*|=`]')


def layout_name(strip_id: str) -> str:
    """The paper-space layout of a strip: "Strip S1" (characters DXF forbids become "_")."""
    return "Strip " + _BAD_NAME.sub("_", strip_id)


@contextlib.contextmanager
def _fixed_metadata() -> Iterator[None]:
    """Fixed creation dates and GUIDs while writing (ezdxf's global option, restored after)."""
    old = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    try:
        yield
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = old


def write_layout(
    detail: ProjectDetail,
    revisions: Iterable[RevisionRecord] = (),
    changed_set_ids: Iterable[tuple[str, str]] = frozenset(),
) -> bytes:
    """The layout drawing of a detailed project (bar sets carrying marks) as DXF bytes.

    ``revisions``: every issue so far, oldest first, this one last (the revision table);
    ``changed_set_ids``: (strip id, set id) of the bar sets added or changed at this issue (a
    marker of the newest revision beside each; set ids are unique within a strip only).
    Without them the sheets have neither.
    """
    return document_bytes(build_layout(detail, revisions, changed_set_ids))


def document_bytes(doc: Drawing, *, workers: int = 0) -> bytes:
    """The DXF file of a layout document built by :func:`build_layout` (fixed metadata),
    written over ``workers`` processes for a large drawing (the same bytes)."""
    with _fixed_metadata():
        return document_text(doc, workers).encode("utf-8")


def write_layout_file(
    path: Path,
    detail: ProjectDetail,
    revisions: Iterable[RevisionRecord] = (),
    changed_set_ids: Iterable[tuple[str, str]] = frozenset(),
) -> None:
    """Write the layout DXF atomically (an ``OutputError`` names the path and the fix)."""
    write_output(Path(path), write_layout(detail, revisions, changed_set_ids))


def build_layout(
    detail: ProjectDetail,
    revisions: Iterable[RevisionRecord] = (),
    changed_set_ids: Iterable[tuple[str, str]] = frozenset(),
    *,
    plans: Sequence[SheetPlan] | None = None,
    part: range | None = None,
) -> Drawing:
    """The ezdxf document of the layout drawing (see the module docstring). ``plans``: the
    sheets of the strips, in strip order, when already chosen (:func:`sheet_plans`);
    ``part``: the indices of the strips this document holds when the drawing is split into
    several files (sheets keep their numbers in the whole set), all of them when None."""
    project = detail.project
    history = tuple(revisions)
    changed = frozenset(changed_set_ids)
    for pair in changed:
        if not (isinstance(pair, tuple) and len(pair) == 2):
            raise ValueError(f"changed_set_ids holds (strip id, set id) pairs, not {pair!r}")
    chosen = part if part is not None else range(len(detail.strips))
    strips = [detail.strips[i] for i in chosen]
    if plans is None:
        plans = [strip_sheet(detail, sd, history, changed) for sd in strips]
    elif len(plans) != len(strips):
        raise ValueError(f"{len(plans)} sheet plans for {len(strips)} strips")
    plans = list(plans)
    with _fixed_metadata():  # ezdxf stamps the creation time into the document when made
        doc = ezdxf.new("R2013", setup=False, units=units.MM)
    _setup(doc, plans)
    msp = doc.modelspace()
    y_top = 0.0
    names: set[str] = set()
    for index, sd, sp in zip((i + 1 for i in chosen), strips, plans, strict=True):
        plan = sp.plan
        dy = y_top - plan.main_box.y1
        _emit(msp, plan.main, 0.0, dy)
        ddx = plan.main_box.x1 + 0.5 * REGION_GAP_MM - plan.detail_box.x0
        ddy = dy + plan.main_box.y1 - plan.detail_box.y1
        _emit(msp, plan.detail, ddx, ddy)
        name = layout_name(sd.strip.id)
        if name in names:
            raise ValueError(f"two strips give the same layout name {name!r}")
        names.add(name)
        _sheet(doc, name, project, sd, sp, (0.0, dy), (ddx, ddy), index, len(detail.strips))
        y_top = dy + min(plan.main_box.y0, ddy - dy + plan.detail_box.y0) - REGION_GAP_MM
    if strips:
        doc.layouts.set_active_layout(layout_name(strips[0].strip.id))
        doc.layouts.delete("Layout1")
    _stable_classes(doc)
    return doc


def sheet_plans(
    detail: ProjectDetail,
    revisions: Iterable[RevisionRecord] = (),
    changed_set_ids: Iterable[tuple[str, str]] = frozenset(),
) -> list[SheetPlan]:
    """The sheet of every strip, as :func:`build_layout` chooses them (pure, per strip)."""
    history, changed = tuple(revisions), frozenset(changed_set_ids)
    return [strip_sheet(detail, sd, history, changed) for sd in detail.strips]


def strip_sheet(
    detail: ProjectDetail,
    sd: StripDetail,
    revisions: tuple[RevisionRecord, ...] = (),
    changed_set_ids: frozenset[tuple[str, str]] = frozenset(),
) -> SheetPlan:
    """The sheet of one strip of ``detail`` (:func:`detailer.io.dxf_sheet.choose_sheet`,
    with the strips this issue left out named in its notes)."""
    return choose_sheet(
        detail.project,
        sd,
        revisions=revisions,
        changed_set_ids=changed_set_ids,
        not_detailed=detail.not_detailed,
    )


def _stable_classes(doc: Drawing) -> None:
    """Put the CLASSES section in a fixed order: ezdxf adds classes for the entity types in use
    from a set, whose order changes from one Python process to the next."""
    doc.classes.add_required_classes(doc.dxfversion)
    for name in sorted(doc.entitydb.dxf_types_in_use()):
        doc.classes.add_class(name)
    doc.classes.classes = dict(sorted(doc.classes.classes.items()))


def _setup(doc: Drawing, plans: list[SheetPlan]) -> None:
    """Define every table entry before use: appid, linetypes, text style, layers, dimstyles."""
    doc.appids.add(st.APPID)
    for lt in st.LINETYPES:
        doc.linetypes.add(
            lt.name, pattern=[lt.total_mm, *lt.pattern_mm], description=lt.description
        )
    doc.styles.add(st.TEXT_STYLE, font=st.TEXT_FONT)
    for layer in st.LAYERS:
        doc.layers.add(
            layer.name, color=layer.colour, linetype=layer.linetype, lineweight=layer.lineweight
        )
        entry = doc.layers.get(layer.name)
        entry.description = layer.description
        if not layer.plot:
            entry.dxf.plot = 0
    scales = sorted({p.plan.scale for p in plans} | {p.plan.detail_scale for p in plans})
    for s in scales:
        doc.dimstyles.add(
            st.dimstyle_name(s),
            dxfattribs={
                "dimtxsty": st.TEXT_STYLE,
                "dimtxt": 2.5,
                "dimasz": 2.0,
                "dimtsz": 1.5,  # oblique ticks, the usual terminator on UK structural drawings
                "dimscale": float(s),
                "dimlfac": 1.0,
                "dimdec": 0,
                "dimlunit": 2,
                "dimexe": 1.5,
                "dimexo": 1.5,
                "dimgap": 1.0,
                "dimtad": 1,
                "dimtih": 0,
                "dimtoh": 0,
                "dimdle": 0.0,
                "dimzin": 8,
                "dimtmove": 2,
                "dimdsep": ord("."),
            },
        )
    doc.header["$LTSCALE"] = 1.0
    # dashes keep their paper length in every viewport, whatever its scale
    doc.header["$PSLTSCALE"] = 1
    doc.header["$LWDISPLAY"] = 1
    doc.header["$TEXTSTYLE"] = st.TEXT_STYLE
    doc.header["$DIMSTYLE"] = st.dimstyle_name(scales[0]) if scales else "Standard"


def _attribs(layer: str, **extra) -> dict:
    return {"layer": layer, **extra}


def _xdata(entity, fields: Fields) -> None:
    if fields:
        entity.set_xdata(st.APPID, st.xdata_tags(fields))


def _dot_block(doc: Drawing, diameter: float) -> str:
    """The block of a disc of ``diameter`` at the origin (made once per size): a donut, two
    half-circle arcs of width r, on layer 0 so that it takes the colour of where it is put."""
    name = f"{st.DOT_BLOCK_PREFIX}{diameter:.1f}".replace(".", "_")
    if name not in doc.blocks:
        r = diameter / 4
        block = doc.blocks.new(name)
        block.add_lwpolyline(
            [(-r, 0.0, 1.0), (r, 0.0, 1.0)],
            format="xyb",
            close=True,
            dxfattribs={"layer": "0", "const_width": 2 * r},
        )
    return name


def _emit(layout, view: View, dx: float, dy: float) -> None:
    """Add the view's primitives to ``layout``, shifted by (dx, dy)."""
    for p in view.polys:
        pts = [(x + dx, y + dy, b) for x, y, b in p.points]
        e = layout.add_lwpolyline(
            pts, format="xyb", close=p.closed, dxfattribs=_attribs(p.layer, const_width=p.width)
        )
        _xdata(e, p.xdata)
    for ln in view.lines:
        e = layout.add_line(
            (ln.start[0] + dx, ln.start[1] + dy),
            (ln.end[0] + dx, ln.end[1] + dy),
            dxfattribs=_attribs(ln.layer),
        )
    for d in view.dots:  # a donut: two half-circle arcs of width r, closing to a disc
        r = d.diameter / 4
        pts = [(d.x + dx - r, d.y + dy, 1.0), (d.x + dx + r, d.y + dy, 1.0)]
        e = layout.add_lwpolyline(
            pts, format="xyb", close=True, dxfattribs=_attribs(d.layer, const_width=2 * r)
        )
        _xdata(e, d.xdata)
    for row in view.dot_rows:  # one disc block, inserted in a row (a MINSERT)
        name = _dot_block(layout.doc, row.diameter)
        e = layout.add_blockref(
            name,
            (row.x0 + dx, row.y + dy),
            dxfattribs=_attribs(row.layer, column_count=row.count, column_spacing=row.pitch),
        )
        _xdata(e, row.xdata)
    for c in view.circles:
        layout.add_circle((c.x + dx, c.y + dy), c.radius, dxfattribs=_attribs(c.layer))
    for h in view.hatches:
        hatch = layout.add_hatch(dxfattribs=_attribs(h.layer))
        hatch.paths.add_polyline_path([(x + dx, y + dy) for x, y in h.boundary], is_closed=True)
        hatch.set_pattern_fill(h.pattern, scale=h.scale)
    for t in view.texts:
        e = layout.add_text(
            t.text, height=t.height, dxfattribs=_attribs(t.layer, style=st.TEXT_STYLE)
        )
        e.set_placement((t.x + dx, t.y + dy), align=TextEntityAlignment[t.align])
        _xdata(e, t.xdata)
    for d in view.dims:
        _xdata(add_linear_dimension(layout, d, dx, dy), d.xdata)


def _sheet(
    doc: Drawing, name: str, project, sd, sp: SheetPlan, shift, detail_shift, index: int, total: int
) -> None:
    """One paper-space sheet: frame, viewports, notes, title block."""
    psp = doc.layouts.new(name)
    psp.page_setup(
        size=(sp.sheet.width_mm, sp.sheet.height_mm),
        margins=(0, 0, 0, 0),
        units="mm",
        scale=(1, 1),
        name=f"ISO {sp.sheet.name}",
    )
    overall = psp.main_viewport()  # the sheet's own view (id 1): keep it on our layer too
    if overall is not None:
        overall.dxf.layer = st.VIEWPORT_LAYER.name
    title = st.TITLE_LAYER.name
    f = sp.frame
    psp.add_lwpolyline(
        [(f.x0, f.y0), (f.x1, f.y0), (f.x1, f.y1), (f.x0, f.y1)],
        close=True,
        dxfattribs=_attribs(title, lineweight=50),
    )
    c = sp.column
    psp.add_line((c.x0, c.y0), (c.x0, c.y1), dxfattribs=_attribs(title))
    for vp, (mx, my), s in (
        (sp.main, shift, sp.plan.scale),
        (sp.detail, detail_shift, sp.plan.detail_scale),
    ):
        e = psp.add_viewport(
            center=vp.centre,
            size=vp.size,
            view_center_point=(vp.view_centre[0] + mx, vp.view_centre[1] + my),
            view_height=vp.view_height,
            dxfattribs=_attribs(st.VIEWPORT_LAYER.name),
        )
        e.dxf.flags = e.dxf.flags | const.VSF_LOCK_ZOOM
        _xdata(e, (("kind", "viewport"), ("strip", sd.strip.id), ("scale", f"1:{s}")))
    notes = st.NOTES_LAYER.name
    y = sp.notes_top
    for line in wrap_notes(sp.notes):
        if line.strip():
            e = psp.add_text(
                line.rstrip(), height=NOTE_TEXT_MM, dxfattribs=_attribs(notes, style=st.TEXT_STYLE)
            )
            e.set_placement((c.x0 + 4.0, y), align=TextEntityAlignment.TOP_LEFT)
        y -= NOTE_LINE_MM
    _title_block(psp, sp, title_fields(project, sd, sp, index, total))
    if sp.revision_table is not None:
        _revision_table(psp, sp.revision_table)


def _title_block(psp, sp: SheetPlan, fields) -> None:
    b = sp.title_box
    lay = st.TITLE_LAYER.name
    psp.add_line((b.x0, b.y1), (b.x1, b.y1), dxfattribs=_attribs(lay, lineweight=50))
    row_h = (b.y1 - b.y0) / len(fields)
    cap_w = 30.0
    psp.add_line((b.x0 + cap_w, b.y0), (b.x0 + cap_w, b.y1), dxfattribs=_attribs(lay))
    for i, (caption, value) in enumerate(fields):
        y_hi = b.y1 - i * row_h
        if i:
            psp.add_line((b.x0, y_hi), (b.x1, y_hi), dxfattribs=_attribs(lay, lineweight=13))
        ym = y_hi - row_h / 2
        room = b.x1 - b.x0 - cap_w - 4.0
        fit = room / max(len(value) * st.CHAR_WIDTH_FACTOR, 1.0)
        for x, text, h in ((b.x0 + 2.0, caption, 2.0), (b.x0 + cap_w + 2.0, value, min(2.5, fit))):
            e = psp.add_text(text, height=h, dxfattribs=_attribs(lay, style=st.TEXT_STYLE))
            e.set_placement((x, ym), align=TextEntityAlignment.MIDDLE_LEFT)


def _revision_table(psp, table: RevisionTable) -> None:
    """The revision table on the title block: header row lowest, newest revision on top."""
    lay = st.TITLE_LAYER.name
    b = table.box
    psp.add_lwpolyline(
        [(b.x0, b.y0), (b.x1, b.y0), (b.x1, b.y1), (b.x0, b.y1)],
        close=True,
        dxfattribs=_attribs(lay, lineweight=35),
    )
    for x in table.columns_x:
        psp.add_line((x, b.y0), (x, b.y1), dxfattribs=_attribs(lay, lineweight=13))
    for row in table.rows:  # each row's lower edge (the header's upper edge is the first)
        psp.add_line((b.x0, row.y0), (b.x1, row.y0), dxfattribs=_attribs(lay, lineweight=13))
    _table_row(psp, table, table.header, (("kind", "revision_table"), ("row", "header")))
    for row in table.rows:
        fields = (("kind", "revision_table"), ("row", "revision"), ("revision", row.revision))
        _table_row(psp, table, row, fields)


def _table_row(psp, table: RevisionTable, row: RevisionRow, fields) -> None:
    lay = st.TITLE_LAYER.name
    x_rev, (x_date, x_desc) = table.box.x0, table.columns_x
    y_first = row.y1 - TABLE_ROW_MM / 2  # middle of the first line
    cells = [("rev", x_rev, row.revision, y_first), ("date", x_date, row.date, y_first)]
    cells += [
        ("description", x_desc, line, y_first - k * TABLE_LINE_MM)
        for k, line in enumerate(row.lines)
    ]
    for column, x, text, y in cells:
        if not text:
            continue
        e = psp.add_text(text, height=TABLE_TEXT_MM, dxfattribs=_attribs(lay, style=st.TEXT_STYLE))
        e.set_placement((x + 2.0, y), align=TextEntityAlignment.MIDDLE_LEFT)
        _xdata(e, (*fields, ("column", column)))
