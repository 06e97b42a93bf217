"""A batching backend for ezdxf's drawing add-on: the sheet as a few matplotlib collections.

ezdxf's own matplotlib backend adds one patch or line per primitive and lets the axes update
their data limits for each, which costs seconds per sheet. This backend only keeps each
primitive as a matplotlib path with its colour and width, in the order the Frontend draws
them; :meth:`BatchBackend.add_to_axes` then puts each run of consecutive strokes or fills into
one ``PathCollection`` (``autolim=False``), so the draw order (hatches, text, lines as they
come) is the Frontend's. Lineweights follow ezdxf's matplotlib backend: the lineweight in mm
is taken as a width in points, at least about one pixel, so the picture looks as before.

matplotlib is imported inside the methods, when a preview is drawn, not with this module.
"""

from __future__ import annotations

__all__ = ["BatchBackend"]

import functools
import itertools
import logging
from collections.abc import Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from ezdxf.addons.drawing.backend import Backend, BkPath2d, BkPoints2d, ImageData
from ezdxf.addons.drawing.config import Configuration
from ezdxf.addons.drawing.properties import BackendProperties
from ezdxf.math import Vec2

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.path import Path as MplPath

_LOG = logging.getLogger(__name__)
_MOVETO, _LINETO = 1, 2  # matplotlib.path.Path codes
# ezdxf path commands (LINE_TO 1, CURVE3_TO 2, CURVE4_TO 3, MOVE_TO 4): matplotlib code, vertices
_MPL_CODE = np.array((0, 2, 3, 4, 1), dtype=np.uint8)
_VERTEX_COUNT = np.array((0, 1, 2, 3, 1), dtype=np.intp)
_POINT_SIZE_PT2 = 0.1  # marker area (pt^2) of a DXF point, as ezdxf's matplotlib backend

RGBA = tuple[float, float, float, float]


@dataclass(frozen=True, slots=True)
class _Item:
    """One primitive: a filled area, or a stroke ``width_pt`` wide (points, 1/72 inch)."""

    path: MplPath
    rgba: RGBA
    filled: bool
    width_pt: float


@functools.cache
def _rgba(colour: str) -> RGBA:
    """ "#RRGGBB" or "#RRGGBBAA" (ezdxf's colour strings) as floats 0..1."""
    from matplotlib.colors import to_rgba

    r, g, b, a = to_rgba(colour)
    return (r, g, b, a)


class BatchBackend(Backend):
    """Collects the Frontend's output in draw order; ``dpi`` sets the ~1 pixel thinnest line."""

    def __init__(self, dpi: float) -> None:
        super().__init__()
        self._dpi = float(dpi)
        self._items: list[_Item] = []
        self._points: list[tuple[float, float, RGBA]] = []

    # -- BackendInterface --------------------------------------------------------------

    def configure(self, config: Configuration) -> None:
        if config.min_lineweight is None:  # as ezdxf's matplotlib backend: about one pixel
            config = config.with_changes(min_lineweight=72.0 / self._dpi)
        super().configure(config)

    def set_background(self, color: str) -> None:
        pass  # the caller paints the figure white

    def clear(self) -> None:
        self._items.clear()
        self._points.clear()

    def finalize(self) -> None:
        pass

    def draw_point(self, pos: Vec2, properties: BackendProperties) -> None:
        self._points.append((pos.x, pos.y, _rgba(properties.color)))

    def draw_line(self, start: Vec2, end: Vec2, properties: BackendProperties) -> None:
        if start.isclose(end):
            self.draw_point(start, properties)
            return
        from matplotlib.path import Path

        path = Path(np.array(((start.x, start.y), (end.x, end.y))), (_MOVETO, _LINETO))
        self._stroke(path, properties)

    def draw_solid_lines(
        self, lines: Iterable[tuple[Vec2, Vec2]], properties: BackendProperties
    ) -> None:
        from matplotlib.path import Path

        xy: list[tuple[float, float]] = []
        for s, e in lines:
            if s.isclose(e):
                self.draw_point(s, properties)
            else:
                xy.append((s.x, s.y))
                xy.append((e.x, e.y))
        if xy:
            codes = np.tile(np.array((_MOVETO, _LINETO), dtype=np.uint8), len(xy) // 2)
            self._stroke(Path(np.array(xy), codes), properties)

    def draw_path(self, path: BkPath2d, properties: BackendProperties) -> None:
        if len(path):
            self._stroke(_matplotlib_path([path], orient=False), properties)

    def draw_filled_paths(self, paths: Iterable[BkPath2d], properties: BackendProperties) -> None:
        paths = [p for p in paths if len(p)]
        if paths:
            mpl_path = _matplotlib_path(paths, orient=True)
            self._items.append(_Item(mpl_path, _rgba(properties.color), True, 0.0))

    def draw_filled_polygon(self, points: BkPoints2d, properties: BackendProperties) -> None:
        from matplotlib.path import Path

        xy = points.np_vertices()[:, :2]
        if len(xy) < 3:
            return
        self._items.append(_Item(Path(xy, closed=False), _rgba(properties.color), True, 0.0))

    def draw_image(self, image_data: ImageData, properties: BackendProperties) -> None:
        # The layout writer places no raster images; a foreign one is left out of the preview.
        _LOG.info("preview: skipped a raster image")

    # -- output ------------------------------------------------------------------------

    def _stroke(self, path: MplPath, properties: BackendProperties) -> None:
        config = self.config
        assert config.min_lineweight is not None
        width = max(properties.lineweight * config.lineweight_scaling, config.min_lineweight)
        self._items.append(_Item(path, _rgba(properties.color), False, width))

    def extents(self) -> tuple[float, float, float, float] | None:
        """(x_min, y_min, x_max, y_max) of everything drawn, None if nothing was."""
        arrays = [it.path.vertices for it in self._items if len(it.path.vertices)]
        arrays += [np.array([[x, y] for x, y, _ in self._points])] if self._points else []
        if not arrays:
            return None
        xy = np.concatenate(arrays)
        (x0, y0), (x1, y1) = xy.min(axis=0), xy.max(axis=0)
        return float(x0), float(y0), float(x1), float(y1)

    def add_to_axes(self, ax: Axes) -> int:
        """Add everything to ``ax`` as collections in draw order; the number of collections."""
        from matplotlib.collections import PathCollection
        from matplotlib.markers import MarkerStyle

        count = 0
        for filled, run in itertools.groupby(self._items, key=lambda it: it.filled):
            items = list(run)
            style: dict[str, Any]
            if filled:
                style = {"edgecolors": "none", "linewidths": 0.0}
                style["facecolors"] = [it.rgba for it in items]
            else:
                style = {"facecolors": "none", "capstyle": "butt", "joinstyle": "round"}
                style["edgecolors"] = [it.rgba for it in items]
                style["linewidths"] = [it.width_pt for it in items]
            collection = PathCollection([it.path for it in items], zorder=count, **style)
            ax.add_collection(collection, autolim=False)
            count += 1
        if self._points:  # dimensionless points last, as markers of a fixed size
            marker = MarkerStyle("o")
            dot = marker.get_path().transformed(marker.get_transform())
            dots = PathCollection(
                [dot],
                sizes=[_POINT_SIZE_PT2],
                offsets=np.array([(x, y) for x, y, _ in self._points]),
                offset_transform=ax.transData,
                facecolors=[c for _, _, c in self._points],
                edgecolors="none",
                zorder=count,
            )
            ax.add_collection(dots, autolim=False)
            count += 1
        return count


def _matplotlib_path(paths: list[BkPath2d], *, orient: bool) -> MplPath:
    """ezdxf paths as one matplotlib path; with ``orient`` holes are made to show as holes.

    Agg fills by the non-zero winding rule, so, as ezdxf's
    ``to_matplotlib_path(detect_holes=True)`` does, a boundary inside an even number of others
    (0, 2, ...) is turned counter-clockwise and one inside an odd number clockwise. The nesting
    is ezdxf's: by bounding boxes, the largest first, a boundary whose box centre lies in a
    larger one's box is inside it. Done on numpy arrays rather than with a path object per
    boundary, for speed: text glyphs are most of a sheet's fills.
    """
    from matplotlib.path import Path

    vertices, codes = [], []
    for path in paths:
        commands = np.asarray(path.command_codes(), dtype=np.intp)
        codes.append(np.array((_MOVETO,), dtype=np.uint8))
        codes.append(np.repeat(_MPL_CODE[commands], _VERTEX_COUNT[commands]))
        vertices.append(path.np_vertices()[:, :2])
    xy = np.concatenate(vertices).astype(float, copy=True)
    kinds = np.concatenate(codes)
    if orient:
        _orient_boundaries(xy, kinds)
    return Path(xy, kinds)


def _orient_boundaries(xy: np.ndarray, kinds: np.ndarray) -> None:
    """Reverse the boundaries (runs from one MOVETO to the next) that need it, in place."""
    starts = np.flatnonzero(kinds == _MOVETO)
    ends = np.append(starts[1:], len(xy))
    rings = np.flatnonzero(ends - starts >= 3)  # a move or one segment encloses nothing
    if len(rings) < 2:
        return  # one boundary fills the same either way round
    x, y = xy[:, 0], xy[:, 1]
    # ezdxf's orientation test: the sum of (x2 - x1)(y2 + y1) over the closed polygon of the
    # control vertices is positive for a clockwise boundary
    terms = np.zeros(len(xy))
    terms[:-1] = (x[1:] - x[:-1]) * (y[1:] + y[:-1])
    terms[starts[1:] - 1] = 0.0  # no term from one boundary to the next
    last = ends - 1
    closing = (x[starts] - x[last]) * (y[starts] + y[last])
    clockwise = np.add.reduceat(terms, starts) + closing > 0.0
    low = np.minimum.reduceat(xy, starts, axis=0)
    high = np.maximum.reduceat(xy, starts, axis=0)
    size = high - low
    area = (size[:, 0] * size[:, 1]).tolist()
    order = sorted(rings.tolist(), key=area.__getitem__)  # stable, as ezdxf's sort
    level = np.zeros(len(starts), dtype=np.intp)
    _nest(order, 1, low.tolist(), high.tolist(), ((low + high) / 2.0).tolist(), level)
    # odd levels (outer boundaries) counter-clockwise, even levels (holes) clockwise; a
    # reversed run keeps its MOVETO first, and its curve codes stay in runs of 2 or 3
    flip = np.where(level % 2 == 1, clockwise, ~clockwise) & (level > 0)
    for i in np.flatnonzero(flip):
        s, e = starts[i], ends[i]
        xy[s:e] = xy[s:e][::-1]
        kinds[s + 1 : e] = kinds[s + 1 : e][::-1]


def _nest(order: list[int], depth: int, low, high, centre, level: np.ndarray) -> None:
    """Nesting depth of each boundary in ``order`` (ascending box area), as ezdxf finds it."""
    while order:
        outer = order.pop()
        (x0, y0), (x1, y1) = low[outer], high[outer]
        level[outer] = depth
        inside, outside = [], []
        for i in order:
            cx, cy = centre[i]
            (inside if x0 <= cx <= x1 and y0 <= cy <= y1 else outside).append(i)
        if inside:
            _nest(inside, depth + 1, low, high, centre, level)
        order = outside
