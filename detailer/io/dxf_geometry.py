"""Geometry of the layout drawing: drawing primitives, bar centre lines, dimension targets.

Pure: no ezdxf here. Coordinates are model millimetres of one strip's region: x along the
strip exactly as in the detail (x from the strip's left end, ``analysis.beam``), y up from the
slab soffit in the longitudinal section. The writer shifts whole regions vertically, never in x,
so bar positions in the drawing read back as the detail's x values.

Bar centre lines follow the BS 8666 out-to-out dimensions of each shape: a leg of out-to-out
length B ends B from the outer face of the bar, and each 90 degree bend is drawn as an arc of
centre-line radius r + phi/2, r the minimum scheduling radius of BS 8666:2005, Table 2 (or a
specified R). The developed length of the drawn centre line then equals the BS 8666 length to
well within the 5 mm rounding of the schedule.
"""

from __future__ import annotations

__all__ = [
    "Box",
    "Circle",
    "Dim",
    "DimTarget",
    "Dot",
    "DotRow",
    "Hatch",
    "Line",
    "Poly",
    "Text",
    "bar_tracks",
    "centreline_corners",
    "curtailment_targets",
    "developed_length_mm",
    "fillet",
    "layer_levels_mm",
    "span_targets",
    "support_faces",
]

import itertools
import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from detailer.curtailment import StripGeometry
from detailer.layout import BarRole, BarSet
from detailer.model import Strip
from detailer.shapes.table2 import bending_limits

Fields = tuple[tuple[str, str], ...]
Vertex = tuple[float, float, float]  # x, y, bulge of the segment that starts here

#: Bar ends within this of the slab-end bar position are at the end, not curtailed (mm).
END_TOL_MM = 1.0


# --------------------------------------------------------------------------------------------
# Primitives handed to the writer


@dataclass(frozen=True, slots=True)
class Box:
    x0: float
    y0: float
    x1: float
    y1: float

    @property
    def width(self) -> float:
        return self.x1 - self.x0

    @property
    def height(self) -> float:
        return self.y1 - self.y0

    def union(self, other: Box) -> Box:
        return Box(
            min(self.x0, other.x0),
            min(self.y0, other.y0),
            max(self.x1, other.x1),
            max(self.y1, other.y1),
        )

    def grow(self, margin: float) -> Box:
        return Box(self.x0 - margin, self.y0 - margin, self.x1 + margin, self.y1 + margin)

    @staticmethod
    def around(points: Iterable[tuple[float, float]]) -> Box:
        pts = list(points)
        xs = [p[0] for p in pts]
        ys = [p[1] for p in pts]
        return Box(min(xs), min(ys), max(xs), max(ys))


@dataclass(frozen=True, slots=True)
class Poly:
    layer: str
    points: tuple[Vertex, ...]
    closed: bool = False
    width: float = 0.0  # constant width (a bar drawn to its size)
    xdata: Fields = ()


@dataclass(frozen=True, slots=True)
class Line:
    layer: str
    start: tuple[float, float]
    end: tuple[float, float]


@dataclass(frozen=True, slots=True)
class Dot:
    """A bar seen end-on: a filled disc of ``diameter``."""

    layer: str
    x: float
    y: float
    diameter: float
    xdata: Fields = ()


@dataclass(frozen=True, slots=True)
class DotRow:
    """Bars seen end-on at a regular pitch: ``count`` discs from ``x0`` every ``pitch``
    (drawn as one block inserted in a row, a MINSERT: one entity for the whole row)."""

    layer: str
    x0: float
    y: float
    pitch: float
    count: int
    diameter: float
    xdata: Fields = ()

    @property
    def x1(self) -> float:
        return self.x0 + (self.count - 1) * self.pitch


@dataclass(frozen=True, slots=True)
class Circle:
    layer: str
    x: float
    y: float
    radius: float


@dataclass(frozen=True, slots=True)
class Text:
    layer: str
    text: str
    x: float
    y: float
    height: float
    align: str = "MIDDLE_LEFT"  # ezdxf TextEntityAlignment name
    xdata: Fields = ()


@dataclass(frozen=True, slots=True)
class Hatch:
    layer: str
    boundary: tuple[tuple[float, float], ...]
    pattern: str
    scale: float


@dataclass(frozen=True, slots=True)
class Dim:
    """A linear dimension between p1 and p2, its line through ``base``; angle 0 or 90."""

    p1: tuple[float, float]
    p2: tuple[float, float]
    base: tuple[float, float]
    angle: float
    scale: int  # plot scale of the view: selects our dimension style
    text_at: tuple[float, float] | None = None  # text placed beside a short dimension
    xdata: Fields = ()


# --------------------------------------------------------------------------------------------
# Positions along the strip


@dataclass(frozen=True, slots=True)
class DimTarget:
    """A distance the drawing must dimension: a span, or a bar end from a support face."""

    kind: str  # "span" or "curtailment"
    face: str  # "top" / "bottom" for curtailment, "" for spans
    x_from_mm: float  # the support centreline or face
    x_to_mm: float  # the other centreline, the tip, or the bar end
    ref: str  # e.g. "A-B", "B-T end from face B left"

    @property
    def value_mm(self) -> float:
        return abs(self.x_to_mm - self.x_from_mm)


def support_faces(strip: Strip) -> tuple[tuple[float, str], ...]:
    """Faces of every support as (x, name), e.g. (4050.0, "face B left"); a knife edge once."""
    out: list[tuple[float, str]] = []
    for s in strip.supports:
        if s.width_mm <= 0:
            out.append((s.x_mm, f"support {s.label}"))
        else:
            out.append((s.x_mm - s.width_mm / 2, f"face {s.label} left"))
            out.append((s.x_mm + s.width_mm / 2, f"face {s.label} right"))
    return tuple(out)


def span_targets(strip: Strip) -> tuple[DimTarget, ...]:
    """Every span, centreline to centreline, and each cantilever, centreline to tip."""
    out = []
    for seg in strip.segments:
        out.append(DimTarget("span", "", seg.x_start_mm, seg.x_end_mm, seg.label))
    return tuple(out)


def curtailment_targets(
    strip: Strip, bar_sets: Sequence[BarSet], geom: StripGeometry
) -> tuple[DimTarget, ...]:
    """Each principal bar end that is not at a slab end, from the nearest support face.

    Ends at the same place on the same face are dimensioned once. Ties between two faces go to
    the left one (a fixed rule, so the drawing is stable).
    """
    faces = support_faces(strip)
    seen: set[tuple[str, float, float]] = set()
    out: list[DimTarget] = []
    for b in bar_sets:
        if b.role is not BarRole.PRINCIPAL:
            continue
        face = "top" if b.layer.upper().startswith("T") else "bottom"
        for x, end in ((b.x_start_mm, "start"), (b.x_end_mm, "end")):
            if abs(x - geom.bar_left_mm) <= END_TOL_MM or abs(x - geom.bar_right_mm) <= END_TOL_MM:
                continue
            xf, name = min(faces, key=lambda f: (abs(x - f[0]), f[0]))
            if abs(x - xf) < END_TOL_MM:
                continue
            key = (face, round(xf, 1), round(x, 1))
            if key in seen:
                continue
            seen.add(key)
            out.append(DimTarget("curtailment", face, xf, x, f"{b.set_id} {end} from {name}"))
    out.sort(key=lambda t: (t.face, min(t.x_from_mm, t.x_to_mm), t.x_to_mm))
    return tuple(out)


# --------------------------------------------------------------------------------------------
# Bars in the longitudinal section


def layer_levels_mm(strip: Strip, bar_sets: Sequence[BarSet]) -> dict[str, float]:
    """Height above the soffit of the centre of each layer's bars (largest size on the face).

    T1 = h - c_top - phi/2; T2 = h - c_top - phi_T1 - phi/2; B1 = c_bottom + phi/2;
    B2 = c_bottom + phi_B1 + phi/2 (the bars of the inner layer sit on those of the outer).
    """
    h = strip.thickness_mm

    def phi(layer: str) -> int:
        return max((b.phi_mm for b in bar_sets if b.layer == layer), default=0)

    t1, t2, b1, b2 = phi("T1"), phi("T2"), phi("B1"), phi("B2")
    return {
        "T1": h - strip.cover_top_mm - t1 / 2,
        "T2": h - strip.cover_top_mm - t1 - t2 / 2,
        "B1": strip.cover_bottom_mm + b1 / 2,
        "B2": strip.cover_bottom_mm + b1 + b2 / 2,
    }


def bar_tracks(bar_sets: Sequence[BarSet]) -> dict[str, int]:
    """Drawing track of each principal set (by set id): 0 for the first set at a place,
    1, 2, ... for sets of the same layer overlapping it (laps, alternate groups, U-bars).

    Bent bars are placed first so they keep the true level and stay inside the concrete;
    straight bars are the ones drawn offset.
    """
    tracks: dict[str, int] = {}
    by_layer: dict[str, list[BarSet]] = {}
    for b in bar_sets:
        if b.role is BarRole.PRINCIPAL:
            by_layer.setdefault(b.layer, []).append(b)
    for sets in by_layer.values():
        order = sorted(
            sets, key=lambda b: (b.shape.code in ("00", "01"), b.x_start_mm, b.x_end_mm, b.set_id)
        )
        placed: list[tuple[float, float, int]] = []
        for b in order:
            t = 0
            while any(
                t == pt and b.x_start_mm < x1 + END_TOL_MM and x0 < b.x_end_mm + END_TOL_MM
                for x0, x1, pt in placed
            ):
                t += 1
            placed.append((b.x_start_mm, b.x_end_mm, t))
            tracks[b.set_id] = t
    return tracks


def bend_radius_mm(bar: BarSet) -> float:
    """Centre-line radius of a bend: (r or a specified R) + phi / 2, BS 8666:2005, Table 2."""
    specified = bar.shape.shape.get("R")
    r = float(specified) if specified else float(bending_limits(bar.phi_mm).r_mm)
    return r + bar.phi_mm / 2.0


def centreline_corners(
    bar: BarSet, geom: StripGeometry, y_mm: float, *, free_edge_right: bool
) -> tuple[tuple[float, float], ...]:
    """Corner points of a principal bar's centre line in the section (before bends are rounded).

    ``y_mm`` is the level of the bar's main run. Top bars turn their legs down, bottom bars up.
    Code 11: the leg is at the end standing at a slab end (left if both). Code 21 either has
    its legs at both ends of the run (B = the run), or is a U-bar closing a free edge (A along
    the bar's own face, B across the depth, C back along the other face).
    """
    phi = bar.phi_mm
    down = -1.0 if bar.layer.upper().startswith("T") else 1.0
    outer = y_mm - down * phi / 2.0  # the outer face of the bar's main run
    x0, x1 = bar.x_start_mm, bar.x_end_mm
    code = bar.shape.code
    dims = bar.shape.shape.as_dict()

    def tip(leg: float) -> float:
        return outer + down * leg

    if code == "11" and "B" in dims:
        at_left = abs(x0 - geom.bar_left_mm) <= END_TOL_MM or not (
            abs(x1 - geom.bar_right_mm) <= END_TOL_MM
        )
        if at_left:
            return ((x0 + phi / 2, tip(dims["B"])), (x0 + phi / 2, y_mm), (x1, y_mm))
        return ((x0, y_mm), (x1 - phi / 2, y_mm), (x1 - phi / 2, tip(dims["B"])))
    if code == "21" and {"A", "B", "C"} <= dims.keys():
        run = x1 - x0
        if abs(dims["B"] - run) <= 10.0:
            return (
                (x0 + phi / 2, tip(dims["A"])),
                (x0 + phi / 2, y_mm),
                (x1 - phi / 2, y_mm),
                (x1 - phi / 2, tip(dims["C"])),
            )
        far = tip(dims["B"]) - down * phi / 2.0  # centre of the leg along the other face
        if free_edge_right:
            xe = x1 - phi / 2
            return ((x1 - dims["A"], y_mm), (xe, y_mm), (xe, far), (x1 - dims["C"], far))
        xe = x0 + phi / 2
        return ((x0 + dims["A"], y_mm), (xe, y_mm), (xe, far), (x0 + dims["C"], far))
    return ((x0, y_mm), (x1, y_mm))


def fillet(corners: Sequence[tuple[float, float]], radius: float) -> tuple[Vertex, ...]:
    """Round every interior corner with an arc of ``radius`` (smaller where a leg is short);
    returns LWPOLYLINE vertices (x, y, bulge)."""
    pts = [(float(x), float(y)) for x, y in corners]
    if len(pts) < 3 or radius <= 0:
        return tuple((x, y, 0.0) for x, y in pts)
    out: list[Vertex] = [(pts[0][0], pts[0][1], 0.0)]
    for i in range(1, len(pts) - 1):
        (ax, ay), (bx, by), (cx, cy) = pts[i - 1], pts[i], pts[i + 1]
        d1 = (bx - ax, by - ay)
        d2 = (cx - bx, cy - by)
        l1, l2 = math.hypot(*d1), math.hypot(*d2)
        if l1 == 0 or l2 == 0:
            continue
        u1 = (d1[0] / l1, d1[1] / l1)
        u2 = (d2[0] / l2, d2[1] / l2)
        cross = u1[0] * u2[1] - u1[1] * u2[0]
        dot = max(-1.0, min(1.0, u1[0] * u2[0] + u1[1] * u2[1]))
        turn = math.acos(dot)
        if turn < 1e-9:
            continue
        # tangent length t = R tan(turn/2); keep it within half of the shorter leg
        room_in = l1 if i == 1 else 0.5 * l1
        room_out = l2 if i == len(pts) - 2 else 0.5 * l2
        t = min(radius * math.tan(turn / 2), room_in, room_out)
        p_in = (bx - u1[0] * t, by - u1[1] * t)
        p_out = (bx + u2[0] * t, by + u2[1] * t)
        bulge = math.tan(turn / 4) * (1.0 if cross > 0 else -1.0)
        out.append((p_in[0], p_in[1], bulge))
        out.append((p_out[0], p_out[1], 0.0))
    out.append((pts[-1][0], pts[-1][1], 0.0))
    return tuple(out)


def developed_length_mm(vertices: Sequence[Sequence[float]], closed: bool = False) -> float:
    """Length along an LWPOLYLINE's vertices (x, y, bulge): chords, and arcs where bulged."""
    pts = [tuple(v) for v in vertices]
    if closed and pts:
        pts.append(pts[0])
    total = 0.0
    for a, b in itertools.pairwise(pts):
        chord = math.hypot(b[0] - a[0], b[1] - a[1])
        bulge = a[2] if len(a) > 2 else 0.0
        if abs(bulge) < 1e-12 or chord == 0:
            total += chord
            continue
        theta = 4.0 * math.atan(abs(bulge))
        r = chord / (2.0 * math.sin(theta / 2.0))
        total += r * theta
    return total
