"""Arrangement of one strip's views at a plot scale: section, two plans, and a cross-section.

Pure: turns a :class:`~detailer.layout.StripDetail` into drawing primitives
(:mod:`detailer.io.dxf_geometry`) in the strip's own model coordinates. Annotation is sized in
paper millimetres times the plot scale, so the same strip laid out at 1:50 and at 1:100 has the
same geometry and differently sized text; :func:`plan_strip` is called for each candidate scale
and the sheet planner keeps the largest that fits.

Labels and dimensions are packed into rows so that no two texts overlap, no leader runs
through a text, and no dimension text sits on a leader (see :mod:`detailer.io.dxf_packing`).
"""

from __future__ import annotations

__all__ = ["StripPlan", "View", "bar_fields", "marker_fields", "plan_strip"]

import itertools
from dataclasses import dataclass, field

from detailer.curtailment import StripGeometry
from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import (
    Box,
    Circle,
    Dim,
    Dot,
    DotRow,
    Fields,
    Hatch,
    Line,
    Poly,
    Text,
    bar_tracks,
    bend_radius_mm,
    centreline_corners,
    curtailment_targets,
    fillet,
    layer_levels_mm,
    span_targets,
)
from detailer.io.dxf_packing import LabelSpec, pack_dimensions, pack_labels, text_width
from detailer.io.dxf_views import cross_section, plan_view
from detailer.layout import BarRole, BarSet, StripDetail
from detailer.model import EndKind

#: Nominal depth of a downstand beam or wall drawn below the slab, as a multiple of h.
SUPPORT_DEPTH_OVER_H = 2.5
PAPER = st.PaperSizes()
#: Where along a bar its callout's leader may start, in order of preference.
_FRACTIONS = (0.4, 0.55, 0.25, 0.7, 0.15, 0.85, 0.32, 0.47, 0.62, 0.77, 0.1, 0.9, 0.05, 0.95)


@dataclass(slots=True)
class View:
    """Primitives of one view (or a group of views) and the box they fill (model mm)."""

    polys: list[Poly] = field(default_factory=list)
    lines: list[Line] = field(default_factory=list)
    dots: list[Dot] = field(default_factory=list)
    dot_rows: list[DotRow] = field(default_factory=list)
    circles: list[Circle] = field(default_factory=list)
    texts: list[Text] = field(default_factory=list)
    hatches: list[Hatch] = field(default_factory=list)
    dims: list[Dim] = field(default_factory=list)
    extra_boxes: list[Box] = field(default_factory=list)
    crowded: int = 0  # callouts the packer could not place without a leader crossing a text

    def box(self) -> Box:
        boxes = list(self.extra_boxes)
        for p in self.polys:
            boxes.append(Box.around((v[0], v[1]) for v in p.points))
        for ln in self.lines:
            boxes.append(Box.around((ln.start, ln.end)))
        for d in self.dots:
            r = d.diameter / 2
            boxes.append(Box(d.x - r, d.y - r, d.x + r, d.y + r))
        for row in self.dot_rows:
            r = row.diameter / 2
            boxes.append(Box(row.x0 - r, row.y - r, row.x1 + r, row.y + r))
        for c in self.circles:
            boxes.append(Box(c.x - c.radius, c.y - c.radius, c.x + c.radius, c.y + c.radius))
        for t in self.texts:
            boxes.append(text_box(t))
        for d in self.dims:
            boxes.append(Box.around((d.p1, d.p2, d.base)))
            if d.text_at is not None:
                boxes.append(Box.around((d.text_at,)).grow(PAPER.text_mm * d.scale))
        out = boxes[0]
        for b in boxes[1:]:
            out = out.union(b)
        return out


def text_box(t: Text) -> Box:
    """Estimated box of a single-line text (see ``dxf_style.CHAR_WIDTH_FACTOR``)."""
    w = text_width(t.text, t.height)
    h = t.height
    horiz = t.align.split("_")[-1]
    vert = t.align.split("_")[0] if "_" in t.align else "BOTTOM"
    x0 = t.x - (w if horiz == "RIGHT" else w / 2 if horiz == "CENTER" else 0.0)
    y0 = t.y - (h if vert == "TOP" else h / 2 if vert == "MIDDLE" else 0.0)
    return Box(x0, y0, x0 + w, y0 + h)


@dataclass(frozen=True, slots=True)
class StripPlan:
    """One strip laid out at ``scale`` (main views) and ``detail_scale`` (cross-section)."""

    strip_id: str
    scale: int
    detail_scale: int
    main: View
    detail: View
    main_box: Box
    detail_box: Box
    cut_x_mm: float


def bar_fields(b: BarSet, view: str) -> Fields:
    """The XDATA of a drawn bar: enough to rebuild its schedule line and find it again."""
    dims = ";".join(f"{k}={v}" for k, v in b.shape.dims_mm)
    return (
        ("kind", "bar"),
        ("view", view),
        ("strip", b.strip_id),
        ("set", b.set_id),
        ("mark", b.mark),
        ("layer", b.layer),
        ("role", b.role.value),
        ("count", str(b.count)),
        ("size", f"{b.bar_type}{b.phi_mm}"),
        ("spacing", str(b.spacing_mm)),
        ("length", str(b.shape.length_mm)),
        ("shape", b.shape.code),
        ("dims", dims),
        ("x_start", f"{b.x_start_mm:.1f}"),
        ("x_end", f"{b.x_end_mm:.1f}"),
    )


def label_fields(b: BarSet, view: str) -> Fields:
    return (
        ("kind", "label"),
        ("view", view),
        ("strip", b.strip_id),
        ("set", b.set_id),
        ("mark", b.mark),
        ("layer", b.layer),
    )


def plan_strip(
    sd: StripDetail,
    scale: int,
    detail_scale: int,
    *,
    revision: str = "",
    changed_set_ids: frozenset[tuple[str, str]] = frozenset(),
) -> StripPlan:
    """Lay out the strip's longitudinal section and plans at 1:scale, cross-section at
    1:detail_scale, in the strip's model coordinates. The section callout of every bar set in
    ``changed_set_ids`` ((strip id, set id) pairs: set ids are unique within a strip only) gets
    a marker of ``revision`` beside it."""
    for b in sd.bar_sets:
        if not b.mark:
            raise ValueError(
                f"bar set {b.strip_id}/{b.set_id} has no mark; assign marks before drawing"
            )
    main = View()
    marked = changed_set_ids if revision else frozenset()
    bottom = _section(sd, scale, main, revision, marked)
    geom = StripGeometry.of(sd.strip)
    y = bottom - 14.0 * scale
    for face in ("bottom", "top"):
        y = plan_view(sd, geom, face, y, scale, main) - 14.0 * scale
    detail = View()
    cut_x = cross_section(sd, detail_scale, detail)
    _cut_marks(sd, cut_x, scale, main)
    return StripPlan(
        strip_id=sd.strip.id,
        scale=scale,
        detail_scale=detail_scale,
        main=main,
        detail=detail,
        main_box=main.box(),
        detail_box=detail.box(),
        cut_x_mm=cut_x,
    )


# --------------------------------------------------------------------------------------------
# Longitudinal section


def _section(
    sd: StripDetail, s: int, v: View, revision: str, marked: frozenset[tuple[str, str]]
) -> float:
    """Draw the section; return the lowest y used (model mm)."""
    strip = sd.strip
    geom = StripGeometry.of(strip)
    h = strip.thickness_mm
    depth = SUPPORT_DEPTH_OVER_H * h
    left, right = geom.slab_left_mm, geom.slab_right_mm
    outline = ((left, 0, 0), (right, 0, 0), (right, h, 0), (left, h, 0))
    v.polys.append(
        Poly(
            st.OUTLINE_LAYER.name,
            outline,
            True,
            0.0,
            (("kind", "outline"), ("view", "section"), ("strip", strip.id)),
        )
    )
    _supports(sd, depth, s, v)

    levels = layer_levels_mm(strip, sd.bar_sets)
    tracks = bar_tracks(sd.bar_sets)
    anchors: list[LabelSpec] = []
    for b in sd.bar_sets:
        top = b.layer.upper().startswith("T")
        if b.role is BarRole.DISTRIBUTION:
            y = levels.get(b.layer, levels["T2" if top else "B2"])
            xs = [b.x_start_mm + i * b.spacing_mm for i in range(b.count)]
            xs = [x for x in xs if x <= b.x_end_mm + 1.0] or [b.x_start_mm]
            dia = max(float(b.phi_mm), 0.35 * s)
            lay = st.BARS_DISTRIBUTION_LAYER.name
            v.dot_rows.append(
                DotRow(lay, xs[0], y, float(b.spacing_mm), len(xs), dia, bar_fields(b, "section"))
            )
            pref = _at(b, 0.7)
            cands = sorted(xs, key=lambda x: (abs(x - pref), x))[:12]
            anchors.append(
                _label(b, "top" if top else "bottom", [(x, y) for x in cands], s, revision, marked)
            )
            continue
        base = levels.get(b.layer, levels["T1" if top else "B1"])
        y = base + (-1 if top else 1) * tracks.get(b.set_id, 0) * _track_step(strip, sd, top, s)
        free_right = strip.has_right_cantilever and abs(b.x_end_mm - geom.bar_right_mm) <= 1.0
        corners = centreline_corners(b, geom, y, free_edge_right=free_right)
        verts = fillet(corners, bend_radius_mm(b))
        v.polys.append(
            Poly(st.bar_layer(b.layer, False).name, verts, False, 0.0, bar_fields(b, "section"))
        )
        run = _main_run(corners, y)
        cands = [(run[0] + f * (run[1] - run[0]), y) for f in _FRACTIONS]
        anchors.append(_label(b, "top" if top else "bottom", cands, s, revision, marked))

    # dimensions next to the concrete, labels beyond them, spans and grid outermost
    targets = curtailment_targets(strip, sd.bar_sets, geom)
    top_dims = pack_dimensions([t for t in targets if t.face == "top"], s, h, +1, PAPER)
    bot_dims = pack_dimensions([t for t in targets if t.face == "bottom"], s, -depth, -1, PAPER)
    for packed, y_from in ((top_dims, h), (bot_dims, 0.0)):
        for pd in packed.dims:
            t = pd.target
            xa, xb = sorted((t.x_from_mm, t.x_to_mm))  # left to right: text above the line
            v.dims.append(
                Dim(
                    (xa, y_from),
                    (xb, y_from),
                    (xa, pd.y),
                    0.0,
                    s,
                    pd.text_at,
                    _dim_fields(strip.id, t.kind, t.ref),
                )
            )
    top_labels = pack_labels(
        [a for a in anchors if a.face == "top"], top_dims.edge + 5.0 * s, +1, s, top_dims, PAPER
    )
    bot_labels = pack_labels(
        [a for a in anchors if a.face == "bottom"], bot_dims.edge - 5.0 * s, -1, s, bot_dims, PAPER
    )
    for packed in (top_labels, bot_labels):
        v.crowded += packed.crowded
        v.polys.extend(packed.leaders)
        v.dots.extend(packed.ticks)
        v.texts.extend(packed.texts)

    y_span = top_labels.edge + 7.0 * s
    _grid(sd, y_span, depth, s, v)
    title_y = bot_labels.edge - 8.0 * s
    v.texts.append(
        Text(
            st.NOTES_LAYER.name,
            f"LONGITUDINAL SECTION - STRIP {strip.id}  (1:{s})",
            left,
            title_y,
            PAPER.title_text_mm * s,
            "TOP_LEFT",
        )
    )
    return title_y - PAPER.title_text_mm * s


def _at(b: BarSet, f: float) -> float:
    return b.x_start_mm + f * (b.x_end_mm - b.x_start_mm)


def _main_run(corners, y: float) -> tuple[float, float]:
    """x range of the longest straight run of a bar at level y (where its label goes)."""
    best = (corners[0][0], corners[-1][0])
    best_len = -1.0
    for (x0, y0), (x1, y1) in itertools.pairwise(corners):
        if abs(y0 - y) < 1e-6 and abs(y1 - y) < 1e-6 and abs(x1 - x0) > best_len:
            best, best_len = (min(x0, x1), max(x0, x1)), abs(x1 - x0)
    return best


def _track_step(strip, sd: StripDetail, top: bool, s: int) -> float:
    """Drawing offset between overlapping sets of one layer: visible on paper, inside the slab."""
    phi = max(
        (b.phi_mm for b in sd.bar_sets if b.layer.startswith("T" if top else "B")), default=10
    )
    cover = strip.cover_top_mm if top else strip.cover_bottom_mm
    room = max(0.25 * (strip.thickness_mm / 2 - cover - phi), 0.0)
    return min(max(float(phi), 0.5 * s), room)


def _label(
    b: BarSet, face: str, candidates, s: int, revision: str, marked: frozenset[tuple[str, str]]
) -> LabelSpec:
    height = PAPER.text_mm * s
    letter = revision if (b.strip_id, b.set_id) in marked else ""
    return LabelSpec(
        face=face,
        text=b.callout,
        candidates=tuple((float(x), float(y)) for x, y in candidates),
        width=text_width(b.callout, height),
        height=height,
        xdata=label_fields(b, "section"),
        marker=letter,
        marker_xdata=marker_fields(b, letter) if letter else (),
    )


def marker_fields(b: BarSet, revision: str) -> Fields:
    """The XDATA of a revision marker: which revision changed which bar set."""
    return (
        ("kind", "revision_marker"),
        ("revision", revision),
        ("strip", b.strip_id),
        ("set", b.set_id),
        ("mark", b.mark),
    )


def _dim_fields(strip_id: str, kind: str, ref: str) -> Fields:
    return (("kind", "dimension"), ("dim", kind), ("strip", strip_id), ("ref", ref))


def _supports(sd: StripDetail, depth: float, s: int, v: View) -> None:
    strip = sd.strip
    last = len(strip.supports) - 1
    for k, sup in enumerate(strip.supports):
        end_kind = None
        if k == 0 and not strip.has_left_cantilever:
            end_kind = strip.left_end.kind
        if k == last and not strip.has_right_cantilever:
            end_kind = strip.right_end.kind
        lay = st.SUPPORT_LAYER.name
        if sup.width_mm <= 0:  # knife edge: a small triangle under the soffit
            t = 3.0 * s
            v.polys.append(
                Poly(
                    lay,
                    ((sup.x_mm, 0, 0), (sup.x_mm - t, -1.5 * t, 0), (sup.x_mm + t, -1.5 * t, 0)),
                    True,
                )
            )
            continue
        x0, x1 = sup.x_mm - sup.width_mm / 2, sup.x_mm + sup.width_mm / 2
        rect = ((x0, 0.0), (x1, 0.0), (x1, -depth), (x0, -depth))
        v.polys.append(Poly(lay, tuple((x, y, 0.0) for x, y in rect), True))
        if end_kind is EndKind.PINNED:  # a wall: hatched
            v.hatches.append(Hatch(lay, rect, "ANSI31", 0.5 * s))
        else:  # a downstand beam, drawn with a break line at its nominal depth
            zig = min(0.25 * sup.width_mm, 2.0 * s)
            xm = sup.x_mm
            v.polys.append(
                Poly(
                    lay,
                    (
                        (x0, -depth - zig, 0),
                        (xm - zig, -depth - zig, 0),
                        (xm, -depth + zig, 0),
                        (xm, -depth - 2 * zig, 0),
                        (xm + zig, -depth - zig, 0),
                        (x1, -depth - zig, 0),
                    ),
                )
            )


def _grid(sd: StripDetail, y_span: float, depth: float, s: int, v: View) -> None:
    """Span dimensions, support centrelines and lettered grid bubbles above the section."""
    strip = sd.strip
    h = strip.thickness_mm
    for t in span_targets(strip):
        v.dims.append(
            Dim(
                (t.x_from_mm, y_span - 4.0 * s),
                (t.x_to_mm, y_span - 4.0 * s),
                (t.x_from_mm, y_span),
                0.0,
                s,
                None,
                _dim_fields(strip.id, "span", t.ref),
            )
        )
    r = PAPER.grid_bubble_radius_mm * s
    yc = y_span + 6.0 * s + r
    g = st.GRID_LAYER.name
    for sup in strip.supports:
        x = sup.x_mm
        v.circles.append(Circle(g, x, yc, r))
        v.texts.append(Text(g, sup.label, x, yc, PAPER.title_text_mm * s, "MIDDLE_CENTER"))
        v.lines.append(Line(g, (x, yc - r), (x, y_span - 5.0 * s)))
        v.lines.append(Line(g, (x, h + 2.0 * s), (x, -depth - 4.0 * s)))


def _cut_marks(sd: StripDetail, x: float, s: int, v: View) -> None:
    """Marks of cross-section 1-1 on the longitudinal section: short thick lines and numbers."""
    h = sd.strip.thickness_mm
    lay = st.LABEL_LAYER.name
    for y0, y1, ty, align in (
        (h + 0.5 * s, h + 3.5 * s, h + 4.0 * s, "BOTTOM_CENTER"),
        (-0.5 * s, -3.5 * s, -4.0 * s, "TOP_CENTER"),
    ):
        v.polys.append(Poly(lay, ((x, y0, 0), (x, y1, 0)), False, 0.5 * s))
        v.texts.append(Text(lay, "1", x + 1.5 * s, ty, PAPER.small_text_mm * s, align))
