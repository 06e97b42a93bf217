"""The plan strips and the cross-section of a strip's layout drawing.

Pure, like :mod:`detailer.io.dxf_layout`, which calls these.

Plans (one for the bottom bars, one for the top bars, common practice so the mats do not hide
each other): the panel as wide as the strip stands for, supports dashed below, and per bar set
one representative bar drawn to its length (legs folded into the plan) crossed by a range line
with end ticks showing over what width the set is spread, tagged with its mark and layer.

Cross-section 1-1 (at a place where as many layers as possible are present): the slab over part
of the panel width with the bars to scale, the layers T1, T2, B2, B1 named, and the covers and
depth dimensioned.
"""

from __future__ import annotations

__all__ = ["DETAIL_WIDTH_MM", "choose_cut_x", "cross_section", "plan_view"]

import itertools
from typing import TYPE_CHECKING

from detailer.curtailment import StripGeometry
from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import Circle, Dim, Dot, Line, Poly, Text, layer_levels_mm
from detailer.io.dxf_packing import text_width
from detailer.layout import BarRole, BarSet, StripDetail

if TYPE_CHECKING:
    from detailer.io.dxf_layout import View

PAPER = st.PaperSizes()
#: Part of the panel shown in the cross-section, mm (common practice: a metre or so).
DETAIL_WIDTH_MM = 800.0


def _layer_of(b: BarSet) -> str:
    return b.layer.upper()


def plan_view(
    sd: StripDetail, geom: StripGeometry, face: str, y_top: float, s: int, v: View
) -> float:
    """Draw the plan of ``face`` ("bottom" or "top") with its top edge at ``y_top``; return
    the lowest y used."""
    from detailer.io.dxf_layout import bar_fields, label_fields

    strip = sd.strip
    w = strip.panel_width_mm
    cs = strip.cover_side_mm
    y0 = y_top - w
    letter = "T" if face == "top" else "B"
    left, right = geom.slab_left_mm, geom.slab_right_mm
    v.polys.append(
        Poly(
            st.OUTLINE_LAYER.name,
            ((left, y0, 0), (right, y0, 0), (right, y_top, 0), (left, y_top, 0)),
            True,
        )
    )
    for sup in strip.supports:
        xs = (
            (sup.x_mm,)
            if sup.width_mm <= 0
            else (sup.x_mm - sup.width_mm / 2, sup.x_mm + sup.width_mm / 2)
        )
        for x in xs:
            v.lines.append(Line(st.SUPPORT_HIDDEN_LAYER.name, (x, y0), (x, y_top)))
        v.texts.append(
            Text(
                st.GRID_LAYER.name,
                sup.label,
                sup.x_mm,
                y_top + 1.5 * s,
                PAPER.small_text_mm * s,
                "BOTTOM_CENTER",
            )
        )

    sets = sorted(
        (b for b in sd.bar_sets if _layer_of(b).startswith(letter)),
        key=lambda b: (b.x_start_mm, b.set_id),
    )
    th = PAPER.small_text_mm * s
    verticals: list[float] = []
    chosen: dict[str, float] = {}
    for b in sets:
        fracs = (0.5, 0.35, 0.65, 0.25, 0.75, 0.15, 0.85)
        if b.role is BarRole.DISTRIBUTION:
            fracs = (0.2, 0.8, 0.35, 0.65, 0.1, 0.9)
        cands = [b.x_start_mm + f * (b.x_end_mm - b.x_start_mm) for f in fracs]
        best = max(cands, key=lambda x: min((abs(x - o) for o in verticals), default=1e18) >= 6 * s)
        verticals.append(best)
        chosen[b.set_id] = best

    lanes_p: list[list[tuple[float, float]]] = []
    lanes_d: list[list[tuple[float, float]]] = []
    lane_of: dict[str, int] = {}
    for b in sets:
        xv = chosen[b.set_id]
        tw = text_width(_tag(b), th)
        if b.role is BarRole.DISTRIBUTION:
            x_last = b.x_start_mm + (b.count - 1) * b.spacing_mm
            span = (min(b.x_start_mm, xv) - 2 * s, max(x_last, xv + 2 * s + tw) + 2 * s)
            lane_of[b.set_id] = _lane(lanes_d, span)
        else:
            span = (b.x_start_mm - 2 * s, max(b.x_end_mm, xv + 2 * s + tw) + 2 * s)
            lane_of[b.set_id] = _lane(lanes_p, span)
    pitch_p = min(9.0 * s, 0.45 * w / max(len(lanes_p), 1))
    pitch_d = min(9.0 * s, 0.3 * w / max(len(lanes_d), 1))

    lab = st.LABEL_LAYER.name
    tick = 1.2 * s
    for b in sets:
        xv = chosen[b.set_id]
        layer = st.bar_layer(b.layer, b.role is BarRole.DISTRIBUTION).name
        if b.role is BarRole.DISTRIBUTION:
            yl = y_top - 0.12 * w - lane_of[b.set_id] * pitch_d
            a = float(b.shape.dim("A")) if "A" in b.shape.shape.as_dict() else w - 2 * cs
            v.polys.append(
                Poly(
                    layer,
                    ((xv, y0 + (w - a) / 2, 0), (xv, y0 + (w + a) / 2, 0)),
                    False,
                    0.0,
                    bar_fields(b, "plan"),
                )
            )
            x_last = b.x_start_mm + (b.count - 1) * b.spacing_mm
            v.lines.append(Line(lab, (b.x_start_mm, yl), (x_last, yl)))
            for x in (b.x_start_mm, x_last):
                v.lines.append(Line(lab, (x - tick, yl - tick), (x + tick, yl + tick)))
            ymark = yl
        else:
            yl = y0 + 0.12 * w + lane_of[b.set_id] * pitch_p
            v.polys.append(
                Poly(
                    layer,
                    tuple((x, y, 0.0) for x, y in _plan_corners(b, geom, yl)),
                    False,
                    0.0,
                    bar_fields(b, "plan"),
                )
            )
            ya = y0 + cs + b.phi_mm / 2 + b.offset_mm
            yb = ya + (b.count - 1) * b.spacing_mm
            v.lines.append(Line(lab, (xv, ya), (xv, yb)))
            for y in (ya, yb):
                v.lines.append(Line(lab, (xv - tick, y - tick), (xv + tick, y + tick)))
            ymark = yl
        v.circles.append(Circle(lab, xv, ymark, 0.7 * s))
        tw = text_width(_tag(b), th)
        clash = any(xv + s < o < xv + 2 * s + tw for o in verticals if o != xv)
        if clash:
            v.texts.append(
                Text(lab, _tag(b), xv - s, ymark + s, th, "BOTTOM_RIGHT", label_fields(b, "plan"))
            )
        else:
            v.texts.append(
                Text(lab, _tag(b), xv + s, ymark + s, th, "BOTTOM_LEFT", label_fields(b, "plan"))
            )

    title = f"PLAN - {face.upper()} BARS ({letter}1, {letter}2)  (1:{s})"
    v.texts.append(
        Text(st.NOTES_LAYER.name, title, left, y0 - 4.0 * s, PAPER.title_text_mm * s, "TOP_LEFT")
    )
    return y0 - 4.0 * s - PAPER.title_text_mm * s


def _tag(b: BarSet) -> str:
    """The plan tag of a set: mark and layer, e.g. "03 B1"."""
    return f"{b.mark} {b.layer}"


def _lane(lanes: list[list[tuple[float, float]]], span: tuple[float, float]) -> int:
    for i, lane in enumerate(lanes):
        if all(span[1] <= a or b <= span[0] for a, b in lane):
            lane.append(span)
            return i
    lanes.append([span])
    return len(lanes) - 1


def _plan_corners(b: BarSet, geom: StripGeometry, y: float) -> list[tuple[float, float]]:
    """A principal bar in plan, its legs folded into the plan (turned towards the panel edge)."""
    x0, x1 = b.x_start_mm, b.x_end_mm
    dims = b.shape.shape.as_dict()
    code = b.shape.code
    if code == "11" and "B" in dims:
        leg = dims["B"]
        if abs(x0 - geom.bar_left_mm) <= 1.0 or abs(x1 - geom.bar_right_mm) > 1.0:
            return [(x0, y - leg), (x0, y), (x1, y)]
        return [(x0, y), (x1, y), (x1, y - leg)]
    if code == "21" and {"A", "B", "C"} <= dims.keys():
        if abs(dims["B"] - (x1 - x0)) <= 10.0:
            return [(x0, y - dims["A"]), (x0, y), (x1, y), (x1, y - dims["C"])]
        if abs(x1 - geom.bar_right_mm) <= 1.0:
            return [
                (x1 - dims["A"], y),
                (x1, y),
                (x1, y - dims["B"]),
                (x1 - dims["C"], y - dims["B"]),
            ]
        return [(x0 + dims["A"], y), (x0, y), (x0, y - dims["B"]), (x0 + dims["C"], y - dims["B"])]
    return [(x0, y), (x1, y)]


# --------------------------------------------------------------------------------------------
# Cross-section


def choose_cut_x(sd: StripDetail) -> float:
    """Where to cut section 1-1: the middle of the longest stretch with the most layers."""
    geom = StripGeometry.of(sd.strip)
    events = sorted(
        {geom.bar_left_mm, geom.bar_right_mm}
        | {x for b in sd.bar_sets for x in (b.x_start_mm, b.x_end_mm)}
    )
    best, best_key = 0.5 * (geom.bar_left_mm + geom.bar_right_mm), (-1, -1.0)
    for a, b in itertools.pairwise(events):
        if b - a < 20.0:
            continue
        mid = 0.5 * (a + b)
        layers = {x.layer for x in sd.bar_sets if x.x_start_mm <= mid <= x.x_end_mm}
        key = (len(layers), b - a)
        if key > best_key:
            best, best_key = mid, key
    return float(round(best / 10.0) * 10.0)


def cross_section(sd: StripDetail, s: int, v: View) -> float:
    """Draw section 1-1 at 1:s with its own origin (panel edge at x = 0, soffit at y = 0)."""
    from detailer.io.dxf_layout import bar_fields, label_fields

    strip = sd.strip
    h, cs = strip.thickness_mm, strip.cover_side_mm
    wc = min(strip.panel_width_mm, DETAIL_WIDTH_MM)
    x_cut = choose_cut_x(sd)
    zig = min(0.1 * h, 3.0 * s)
    outline = (
        (wc, 0),
        (0, 0),
        (0, h),
        (wc, h),
        (wc, 0.6 * h),
        (wc - zig, 0.5 * h),
        (wc + zig, 0.5 * h),
        (wc, 0.4 * h),
    )
    v.polys.append(Poly(st.OUTLINE_LAYER.name, tuple((x, y, 0.0) for x, y in outline), True))
    levels = layer_levels_mm(strip, sd.bar_sets)
    present = [b for b in sd.bar_sets if b.x_start_mm <= x_cut <= b.x_end_mm]
    order = {"T1": 0, "T2": 1, "B2": 2, "B1": 3}
    present.sort(key=lambda b: (order.get(_layer_of(b), 9), b.offset_mm, b.set_id))
    th = PAPER.small_text_mm * s
    x_text = wc + 8.0 * s
    top_rows = [b for b in present if _layer_of(b).startswith("T")]
    bottom_rows = [b for b in present if not _layer_of(b).startswith("T")]
    row_y: dict[str, float] = {}
    for i, b in enumerate(reversed(top_rows)):
        row_y[b.set_id] = h + (3.0 + 5.0 * i) * s
    for i, b in enumerate(bottom_rows):
        row_y[b.set_id] = -(3.0 + 5.0 * i) * s
    for b in present:
        layer = st.bar_layer(b.layer, b.role is BarRole.DISTRIBUTION).name
        y = levels.get(_layer_of(b), h / 2)
        if b.role is BarRole.DISTRIBUTION:  # runs across the panel: a line, to its size
            v.polys.append(
                Poly(
                    layer,
                    ((cs, y, 0), (wc, y, 0)),
                    False,
                    float(b.phi_mm),
                    bar_fields(b, "cross-section"),
                )
            )
            xa = 0.8 * wc
        else:  # seen end-on: one dot per bar within the part shown
            u = cs + b.phi_mm / 2 + b.offset_mm
            xs = []
            while u <= wc - b.phi_mm:
                xs.append(u)
                u += b.spacing_mm
            for x in xs:
                v.dots.append(Dot(layer, x, y, float(b.phi_mm), bar_fields(b, "cross-section")))
            xa = xs[-1] if xs else 0.8 * wc
        yr = row_y[b.set_id]
        v.polys.append(
            Poly(st.LABEL_LAYER.name, ((xa, y, 0), (wc + 4.0 * s, yr, 0), (x_text - s, yr, 0)))
        )
        text = f"{b.layer}: {b.bar_type}{b.phi_mm}-{b.mark}-{b.spacing_mm}"
        v.texts.append(
            Text(
                st.LABEL_LAYER.name,
                text,
                x_text,
                yr,
                th,
                "MIDDLE_LEFT",
                label_fields(b, "cross-section"),
            )
        )
    _cover_dims(sd, levels, present, s, v)
    title = f"SECTION 1-1 AT x = {x_cut:.0f}  (1:{s})"
    low = -(3.0 + 5.0 * max(len(bottom_rows), 1)) * s
    v.texts.append(
        Text(
            st.NOTES_LAYER.name,
            title,
            -20.0 * s,
            min(low, -16.0 * s) - 2.0 * s,
            PAPER.title_text_mm * s,
            "TOP_LEFT",
        )
    )
    return x_cut


def _cover_dims(sd: StripDetail, levels, present, s: int, v: View) -> None:
    strip = sd.strip
    h = strip.thickness_mm
    ct, cb, cs = strip.cover_top_mm, strip.cover_bottom_mm, strip.cover_side_mm

    def fields(kind: str, ref: str):
        return (("kind", "dimension"), ("dim", kind), ("strip", strip.id), ("ref", ref))

    v.dims.append(
        Dim(
            (0, h),
            (0, h - ct),
            (-7.0 * s, h),
            90.0,
            s,
            (-7.0 * s - 2.5 * s, h + 3.0 * s),
            fields("cover", "top"),
        )
    )
    v.dims.append(
        Dim(
            (0, 0),
            (0, cb),
            (-7.0 * s, 0),
            90.0,
            s,
            (-7.0 * s - 2.5 * s, -3.0 * s),
            fields("cover", "bottom"),
        )
    )
    v.dims.append(Dim((0, 0), (0, h), (-16.0 * s, 0), 90.0, s, None, fields("depth", "h")))
    v.dims.append(
        Dim(
            (0, 0),
            (cs, 0),
            (0, -12.0 * s),
            0.0,
            s,
            (cs + 6.0 * s, -12.0 * s + 2.0 * s),
            fields("cover", "side"),
        )
    )
