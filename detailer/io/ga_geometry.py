"""Strip geometry from a general arrangement (GA): pure shapely work, no file access.

The DXF reader (``detailer.io.dxf_reader``) reduces the drawing to :class:`DrawnGA` (points in
mm, one record per entity, with its DXF handle); :func:`arrange` turns that into one
:class:`GAStrip` per design strip. Conventions (common practice for GA drawings):

- A strip's axis runs from its drawn end with the smaller x (then the smaller y when the strip
  is vertical) to the other end. A band's axis is the long centre line of its minimum rotated
  rectangle; its short side is the panel width.
- The axis is extended both ways to the slab edges: the strip is the piece of the axis line
  inside the slab outline that the drawn line (or band) lies on, so the drawn length only
  places the strip. A drawn strip running over a gap in the outline is an error.
- A support is where the axis passes through a support shape: its centre is the middle of
  that piece of axis, its width the length of the piece (measured along the strip, so a
  support crossed at a skew is wider than drawn). Only the part under the slab counts.
- Slab running on past the outer face of an end support by more than ``edge_mm`` is a
  cantilever, measured from that support's centreline to the slab edge.
- x = 0 at the free tip of a left cantilever, otherwise at the first support's centreline
  (``detailer.model``). All lengths in mm.
"""

from __future__ import annotations

__all__ = ["arrange"]

import math
import re
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import LineString, Point, Polygon
from shapely.validation import explain_validity

from detailer.io.ga_model import (
    XY,
    DrawnGA,
    DrawnLine,
    DrawnPolyline,
    DrawnText,
    GAError,
    GALayerError,
    GAOutlineError,
    GAStrip,
    GAStripError,
    GAStripIdError,
    GASupport,
    GASupportError,
    GATolerances,
)

# Same rule as a strip id in the project file (detailer.project_schema.Id).
_ID_RE = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$")
_TINY_MM = 0.01  # below this two positions along an axis are the same point


# -- geometry ----------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class _Shape:
    handle: str
    polygon: Polygon


@dataclass(frozen=True, slots=True)
class _Axis:
    handle: str
    start: XY  # drawn ends, already in the axis direction
    end: XY
    panel_width_mm: float | None
    shape: Polygon | LineString  # what an id text is searched in or near


@dataclass(frozen=True, slots=True)
class _Hit:
    a: float  # along the axis, from the axis start point
    b: float
    handle: str


class _Ctx:
    def __init__(self, drawn: DrawnGA, tol: GATolerances) -> None:
        self.drawn = drawn
        self.tol = tol
        self.file = drawn.file
        self.layers = drawn.layers

    def at(self, p: XY) -> str:
        """A point in the drawing's own units, as the user finds it in CAD."""
        k = self.drawn.mm_per_unit
        return f"({_num(p[0] / k)}, {_num(p[1] / k)})"

    def length(self, mm: float) -> str:
        return f"{_num(mm)} mm"


def _num(v: float) -> str:
    text = f"{v:.3f}".rstrip("0").rstrip(".")
    return "0" if text == "-0" else text


def arrange(drawn: DrawnGA, tol: GATolerances | None = None) -> tuple[GAStrip, ...]:
    """Measure every design strip of ``drawn``; raises a GAError subclass on a bad drawing."""
    ctx = _Ctx(drawn, tol or GATolerances())
    slab = _slab(ctx)
    supports = _support_shapes(ctx)
    axes = [_line_axis(ctx, line) for line in drawn.strip_lines]
    axes += [_band_axis(ctx, band) for band in drawn.strip_bands]
    if not axes:
        raise GALayerError(
            ctx.file,
            "holds no design strip",
            layer=ctx.layers.strips,
            fix="draw each strip as a LINE (1 m strip) or a closed polyline (band)",
        )
    ids = _strip_ids(ctx, axes)
    tree = shapely.STRtree([shape.polygon for shape in supports])
    strips = [_measure(ctx, axis, ids[i], slab, supports, tree) for i, axis in enumerate(axes)]
    return tuple(sorted(strips, key=lambda s: _natural(s.id)))


def _natural(text: str) -> tuple:
    return tuple(int(p) if p.isdigit() else p for p in re.split(r"(\d+)", text))


def _polygon(
    ctx: _Ctx, poly: DrawnPolyline, layer: str, error: type[GAError], what: str
) -> Polygon:
    no_area = f"{what} encloses no area (its points lie on one line)"
    how = "draw it as a closed polyline around the area it covers"
    if len(set(poly.points_mm)) < 3:
        raise error(ctx.file, no_area, layer=layer, handle=poly.handle, fix=how)
    polygon = Polygon(poly.points_mm)
    if polygon.convex_hull.area <= 1.0:  # collinear points: "invalid", but not a crossing
        raise error(ctx.file, no_area, layer=layer, handle=poly.handle, fix=how)
    if not polygon.is_valid:
        reason = explain_validity(polygon)
        where = re.search(r"\[([-\d.eE+]+) ([-\d.eE+]+)\]", reason)
        near = f" near {ctx.at((float(where[1]), float(where[2])))}" if where else ""
        raise error(
            ctx.file,
            f"{what} crosses itself{near}",
            layer=layer,
            handle=poly.handle,
            fix="redraw it as a simple closed polyline whose edges do not cross",
        )
    if polygon.area <= 1.0:
        raise error(ctx.file, f"{what} encloses no area", layer=layer, handle=poly.handle, fix=how)
    return polygon


def _slab(ctx: _Ctx) -> Polygon:
    layer = ctx.layers.slab
    drawn = ctx.drawn.outlines
    if not drawn:
        raise GAOutlineError(
            ctx.file,
            "no slab outline",
            layer=layer,
            fix="draw the slab edge as one closed polyline on this layer",
        )
    for poly in drawn:
        if not poly.closed:
            raise GAOutlineError(
                ctx.file,
                "the slab outline polyline is open",
                layer=layer,
                handle=poly.handle,
                fix="close it (its last vertex joined to the first)",
            )
    if len(drawn) > 1:
        handles = ", ".join(f"#{p.handle}" for p in drawn)
        raise GAOutlineError(
            ctx.file,
            f"{len(drawn)} slab outlines ({handles})",
            layer=layer,
            fix="keep one closed polyline for the slab edge; move the others to another layer",
        )
    return _polygon(ctx, drawn[0], layer, GAOutlineError, "the slab outline")


def _support_shapes(ctx: _Ctx) -> list[_Shape]:
    layer = ctx.layers.supports
    shapes = []
    for poly in ctx.drawn.support_outlines:
        if not poly.closed:
            raise GASupportError(
                ctx.file,
                "support polyline is open",
                layer=layer,
                handle=poly.handle,
                fix="close it, or draw the support as two parallel LINEs",
            )
        shapes.append(_Shape(poly.handle, _polygon(ctx, poly, layer, GASupportError, "support")))
    shapes += _pair_lines(ctx)
    if not shapes:
        raise GALayerError(
            ctx.file,
            "holds no support",
            layer=layer,
            fix="draw beams and walls as closed polylines or pairs of parallel LINEs",
        )
    return shapes


def _pair_lines(ctx: _Ctx) -> list[_Shape]:
    """Pair the faces of walls and beams: nearest parallel, overlapping lines first."""
    lines = ctx.drawn.support_lines
    for line in lines:
        if math.dist(line.start_mm, line.end_mm) < 1.0:
            raise GASupportError(
                ctx.file,
                "support line has zero length",
                layer=ctx.layers.supports,
                handle=line.handle,
                fix="delete it",
            )
    if not lines:
        return []
    sin_max = math.sin(math.radians(ctx.tol.parallel_deg))
    candidates = []
    # One line against all later lines at once (numpy), with the arithmetic of _unit and _cross.
    start = np.array([line.start_mm for line in lines], dtype=float)
    end = np.array([line.end_mm for line in lines], dtype=float)
    length = np.array([math.dist(line.start_mm, line.end_mm) for line in lines])
    unit = (end - start) / length[:, None]
    for i in range(len(lines)):
        p, u, li = start[i], unit[i], float(length[i])
        s0, s1, v = start[i + 1 :] - p, end[i + 1 :] - p, unit[i + 1 :]
        parallel = np.abs(u[0] * v[:, 1] - u[1] * v[:, 0]) <= sin_max
        gap = np.abs(
            ((u[0] * s0[:, 1] - u[1] * s0[:, 0]) + (u[0] * s1[:, 1] - u[1] * s1[:, 0])) / 2
        )
        ta, tb = u[0] * s0[:, 0] + u[1] * s0[:, 1], u[0] * s1[:, 0] + u[1] * s1[:, 1]
        t0 = np.maximum(0.0, np.minimum(ta, tb))
        t1 = np.minimum(li, np.maximum(ta, tb))
        keep = parallel & (gap >= 1.0) & (gap <= ctx.tol.max_support_width_mm) & (t1 - t0 >= 1.0)
        for k in np.flatnonzero(keep):
            candidates.append((float(gap[k]), i, i + 1 + int(k), float(t0[k]), float(t1[k])))
    used: set[int] = set()
    shapes = []
    for gap, i, j, t0, t1 in sorted(candidates):
        if i in used or j in used:
            continue
        used |= {i, j}
        p, u, _ = _unit(lines[i].start_mm, lines[i].end_mm)
        q, v, _ = _unit(lines[j].start_mm, lines[j].end_mm)
        # The quadrilateral between the two faces where both are drawn.
        a, b = _along(p, u, t0), _along(p, u, t1)
        c, d = _foot(b, q, v), _foot(a, q, v)
        shapes.append(_Shape(f"{lines[i].handle}+{lines[j].handle}", Polygon([a, b, c, d])))
    for k, line in enumerate(lines):
        if k not in used:
            raise GASupportError(
                ctx.file,
                "support line has no parallel partner within "
                f"{ctx.length(ctx.tol.max_support_width_mm)}",
                layer=ctx.layers.supports,
                handle=line.handle,
                fix="draw each wall or beam as two parallel LINEs or as a closed polyline",
            )
    return shapes


def _directed(p: XY, q: XY) -> tuple[XY, XY]:
    """Ends in the axis direction: from the smaller x, then (vertical strips) the smaller y."""
    dx, dy = q[0] - p[0], q[1] - p[1]
    eps = 1e-9 * math.hypot(dx, dy)
    if dx < -eps or (abs(dx) <= eps and dy < 0):
        return q, p
    return p, q


def _line_axis(ctx: _Ctx, line: DrawnLine) -> _Axis:
    if math.dist(line.start_mm, line.end_mm) < 1.0:
        raise GAStripError(
            ctx.file,
            "strip line has zero length",
            layer=ctx.layers.strips,
            handle=line.handle,
            fix="draw the strip as a LINE across its supports",
        )
    p, q = _directed(line.start_mm, line.end_mm)
    return _Axis(line.handle, p, q, None, LineString([p, q]))


def _band_axis(ctx: _Ctx, band: DrawnPolyline) -> _Axis:
    layer = ctx.layers.strips
    if not band.closed:
        raise GAStripError(
            ctx.file,
            "strip polyline is open",
            layer=layer,
            handle=band.handle,
            fix="draw a strip as a LINE, or a band as a closed polyline",
        )
    polygon = _polygon(ctx, band, layer, GAStripError, "strip band")
    rect = shapely.minimum_rotated_rectangle(polygon)
    c = list(rect.exterior.coords)[:4]
    if math.dist(c[0], c[1]) >= math.dist(c[1], c[2]):
        p, q, width = _mid(c[0], c[3]), _mid(c[1], c[2]), math.dist(c[1], c[2])
    else:
        p, q, width = _mid(c[0], c[1]), _mid(c[3], c[2]), math.dist(c[0], c[1])
    length = math.dist(p, q)
    if polygon.area < 0.98 * rect.area:
        raise GAStripError(
            ctx.file,
            "strip band is not a rectangle",
            layer=layer,
            handle=band.handle,
            fix="draw the band as a rectangle, its width across the strip",
        )
    if length < ctx.tol.min_band_aspect * width:
        raise GAStripError(
            ctx.file,
            f"strip band is about as wide ({ctx.length(width)}) as long ({ctx.length(length)}),"
            " so its direction is unclear",
            layer=layer,
            handle=band.handle,
            fix="draw the strip as a LINE and give panel_width_mm in the project file",
        )
    p, q = _directed(p, q)
    return _Axis(band.handle, p, q, width, polygon)


def _strip_ids(ctx: _Ctx, axes: list[_Axis]) -> list[DrawnText]:
    """Each text goes to the strip it lies in (band) or nearest to (line); one per strip."""
    layer = ctx.layers.strips
    found: list[list[DrawnText]] = [[] for _ in axes]
    tree = shapely.STRtree([axis.shape for axis in axes])  # only strips near a text are tried
    for text in ctx.drawn.strip_texts:
        if not text.text.strip():
            continue
        at = Point(text.at_mm)
        best: tuple[float, int] | None = None
        near = tree.query(at, predicate="dwithin", distance=ctx.tol.id_search_mm)
        for i in sorted(int(k) for k in near):
            axis = axes[i]
            if axis.panel_width_mm is not None:
                dist = 0.0 if axis.shape.covers(at) else math.inf
            else:
                dist = axis.shape.distance(at)
            if dist <= ctx.tol.id_search_mm and (best is None or (dist, i) < best):
                best = (dist, i)
        if best is not None:
            found[best[1]].append(text)
    ids: list[DrawnText] = []
    where = f"within {ctx.length(ctx.tol.id_search_mm)} of the line or inside the band"
    for axis, texts in zip(axes, found):
        if not texts:
            raise GAStripIdError(
                ctx.file,
                f"strip has no id text {where}",
                layer=layer,
                handle=axis.handle,
                fix="put a TEXT or MTEXT such as S1 on this layer next to the strip",
            )
        if len(texts) > 1:
            names = ", ".join(f"'{t.text.strip()}' (#{t.handle})" for t in texts)
            raise GAStripIdError(
                ctx.file,
                f"strip has {len(texts)} id texts: {names}",
                layer=layer,
                handle=axis.handle,
                fix="keep one id text per strip",
            )
        text = texts[0]
        if not _ID_RE.match(text.text.strip()):
            raise GAStripIdError(
                ctx.file,
                f"strip id text {text.text.strip()!r} is not a valid id",
                layer=layer,
                handle=text.handle,
                fix="use letters, digits, '.', '-' or '_' (no spaces), e.g. S1",
            )
        ids.append(text)
    seen: dict[str, int] = {}
    for i, text in enumerate(ids):
        key = text.text.strip()
        if key in seen:
            other = axes[seen[key]].handle
            raise GAStripIdError(
                ctx.file,
                f"two strips have the id '{key}' (#{other} and #{axes[i].handle})",
                layer=layer,
                handle=text.handle,
                fix="give every strip its own id",
            )
        seen[key] = i
    return ids


def _chord(ctx: _Ctx, axis: _Axis, name: str, slab: Polygon) -> tuple[float, float]:
    """Where the slab starts and ends along the axis line, from the axis start."""
    p, d, length = _unit(axis.start, axis.end)
    minx, miny, maxx, maxy = slab.bounds
    reach = math.hypot(maxx - minx, maxy - miny) + math.dist(p, (minx, miny)) + length
    line = LineString([_along(p, d, -reach), _along(p, d, reach)])
    pieces = sorted(_intervals(line.intersection(slab), p, d))
    merged: list[list[float]] = []
    for a, b in pieces:
        if merged and a - merged[-1][1] <= _TINY_MM:
            merged[-1][1] = max(merged[-1][1], b)
        else:
            merged.append([a, b])
    inside = [(a, b) for a, b in merged if min(b, length) - max(a, 0.0) > 1.0]
    if not inside:
        raise GAStripError(
            ctx.file,
            f"{name} lies outside the slab outline",
            layer=ctx.layers.strips,
            handle=axis.handle,
            fix="move the strip onto the slab, or check the slab layer",
        )
    if len(inside) > 1:
        gap = _along(p, d, (inside[0][1] + inside[1][0]) / 2)
        raise GAStripError(
            ctx.file,
            f"{name} crosses a gap in the slab outline near {ctx.at(gap)}",
            layer=ctx.layers.strips,
            handle=axis.handle,
            fix="a strip must run over one continuous piece of slab; shorten or move it",
        )
    return inside[0][0], inside[0][1]


def _measure(
    ctx: _Ctx,
    axis: _Axis,
    id_text: DrawnText,
    slab: Polygon,
    supports: list[_Shape],
    tree: shapely.STRtree,
) -> GAStrip:
    layer = ctx.layers.strips
    p, d, _ = _unit(axis.start, axis.end)
    name = f"strip '{id_text.text.strip()}'"
    t_start, t_end = _chord(ctx, axis, name, slab)
    chord = LineString([_along(p, d, t_start), _along(p, d, t_end)])
    hits = []
    for k in sorted(int(k) for k in tree.query(chord, predicate="intersects")):
        shape = supports[k]
        if chord.intersects(shape.polygon):
            for a, b in _intervals(chord.intersection(shape.polygon), p, d):
                hits.append(_Hit(a, b, shape.handle))
    hits.sort(key=lambda h: (h.a, h.b))
    reach = None  # the hit reaching farthest along the axis so far
    for hit in hits:
        if reach is not None and hit.a < reach.b - _TINY_MM:
            raise GASupportError(
                ctx.file,
                f"supports #{reach.handle} and #{hit.handle} overlap along strip "
                f"#{axis.handle} ('{id_text.text.strip()}')",
                layer=ctx.layers.supports,
                handle=hit.handle,
                fix="draw each beam or wall once, without overlaps",
            )
        if reach is None or hit.b > reach.b:
            reach = hit
    if not hits:
        raise GAStripError(
            ctx.file,
            f"{name} crosses no support",
            layer=layer,
            handle=axis.handle,
            fix=f"a strip must cross at least two supports on layer '{ctx.layers.supports}'",
        )
    first, last = hits[0], hits[-1]
    left = first.a - t_start > ctx.tol.edge_mm
    right = t_end - last.b > ctx.tol.edge_mm
    if len(hits) == 1 and left == right:
        shape = "overhangs on both sides" if left else "has no overhang"
        raise GAStripError(
            ctx.file,
            f"{name} crosses only one support (#{first.handle}) and the slab {shape}",
            layer=layer,
            handle=axis.handle,
            fix="a strip needs two supports, or one support and one cantilever",
        )
    centres = [(h.a + h.b) / 2 for h in hits]
    t0 = t_start if left else centres[0]
    return GAStrip(
        id=id_text.text.strip(),
        handle=axis.handle,
        id_handle=id_text.handle,
        supports=tuple(
            GASupport(_r(c - t0), _r(h.b - h.a), h.handle)
            for c, h in zip(centres, hits, strict=True)
        ),
        left_cantilever_mm=_r(centres[0] - t_start) if left else 0.0,
        right_cantilever_mm=_r(t_end - centres[-1]) if right else 0.0,
        panel_width_mm=None if axis.panel_width_mm is None else _r(axis.panel_width_mm),
        left_edge_x_mm=_r(t_start - t0),
        right_edge_x_mm=_r(t_end - t0),
        axis_start_mm=_rp(_along(p, d, t_start)),
        axis_end_mm=_rp(_along(p, d, t_end)),
        origin_mm=_rp(_along(p, d, t0)),
    )


def _r(mm: float) -> float:
    # Results to 0.001 mm: far below drawing accuracy, and 4200.0 rather than 4199.999999998.
    return round(mm, 3) + 0.0  # + 0.0 turns -0.0 into 0.0


def _rp(p: XY) -> XY:
    return (_r(p[0]), _r(p[1]))


def _intervals(geom, p: XY, d: XY) -> list[tuple[float, float]]:
    """Intervals along the axis (p, d) covered by the line pieces of ``geom``."""
    out = []
    for part in getattr(geom, "geoms", [geom]):
        if isinstance(part, LineString) and not part.is_empty:
            ts = [_dot(d, _sub(c, p)) for c in part.coords]
            if max(ts) - min(ts) > _TINY_MM:
                out.append((min(ts), max(ts)))
        elif hasattr(part, "geoms"):
            out += _intervals(part, p, d)
    return out


# -- small vector helpers on (x, y) tuples -----------------------------------------------------
def _sub(a, b) -> XY:
    return (a[0] - b[0], a[1] - b[1])


def _dot(a, b) -> float:
    return a[0] * b[0] + a[1] * b[1]


def _cross(a, b) -> float:
    return a[0] * b[1] - a[1] * b[0]


def _mid(a, b) -> XY:
    return ((a[0] + b[0]) / 2, (a[1] + b[1]) / 2)


def _along(p, d, t: float) -> XY:
    return (p[0] + d[0] * t, p[1] + d[1] * t)


def _unit(p, q) -> tuple[XY, XY, float]:
    """Start, unit direction and length of the segment p -> q."""
    length = math.dist(p, q)
    return (p[0], p[1]), ((q[0] - p[0]) / length, (q[1] - p[1]) / length), length


def _foot(a, q, v) -> XY:
    """Foot of the perpendicular from a onto the line through q with direction v."""
    return _along(q, v, _dot(v, _sub(a, q)))
