"""A batching backend for ezdxf's drawing add-on, rasterised by matplotlib's Agg renderer.

ezdxf's own matplotlib backend adds one patch or line per primitive and lets the axes update
their data limits for each, which costs seconds per sheet. This backend only keeps each
primitive as a path with its colour and width, in the order the Frontend draws them;
:meth:`BatchBackend.render_rgba` then hands each run of consecutive strokes or fills to Agg as
one path collection, so the draw order (hatches, text, lines as they come) is the Frontend's.
Lineweights follow ezdxf's matplotlib backend: the lineweight in mm is taken as a width in
points, at least about one pixel, so the picture looks as before.

The collections go straight to the renderer of matplotlib's C++ Agg extension, loaded from
its file: importing ``matplotlib.figure`` and ``backend_agg`` (rcParams, colour maps, fonts,
axes, text) costs half a second in a fresh process, the extension about a millisecond. The
calls are the ones a ``Figure`` with one full-size axes and a ``PathCollection`` per run
makes (the same transform, clip box, colours, widths, caps and joins), so the pixels are the
same as drawing through the figure. Should that private interface not take the
calls (another matplotlib), the sheet is drawn through a figure instead, more slowly.
"""

from __future__ import annotations

__all__ = ["BatchBackend"]

import functools
import itertools
import logging
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, ClassVar

import numpy as np
from ezdxf.addons.drawing.backend import Backend, BkPath2d, BkPoints2d, ImageData
from ezdxf.addons.drawing.config import Configuration
from ezdxf.addons.drawing.properties import BackendProperties
from ezdxf.math import Vec2

_LOG = logging.getLogger(__name__)
_MOVETO, _LINETO = 1, 2  # matplotlib.path.Path codes
# ezdxf path commands (LINE_TO 1, CURVE3_TO 2, CURVE4_TO 3, MOVE_TO 4; 5 here: a path's start
# point): matplotlib code, vertices
_START = 5
_MPL_CODE = np.array((0, 2, 3, 4, 1, _MOVETO), dtype=np.uint8)
_VERTEX_COUNT = np.array((0, 1, 2, 3, 1, 1), dtype=np.intp)
_POINT_SIZE_PT2 = 0.1  # marker area (pt^2) of a DXF point, as ezdxf's matplotlib backend

RGBA = tuple[float, float, float, float]


@dataclass(frozen=True, slots=True)
class _AggPath:
    """A path as Agg reads one: the four attributes of a ``matplotlib.path.Path`` it uses.
    Agg draws a path collection unsimplified, whatever the flag (it reads it all the same)."""

    vertices: np.ndarray  # (n, 2) float64, drawing units
    codes: np.ndarray | None  # uint8 matplotlib path codes; None: a MOVETO, then LINETOs
    should_simplify: ClassVar[bool] = False
    simplify_threshold: ClassVar[float] = 0.0


def _agg_path(vertices: np.ndarray, codes: np.ndarray | None) -> _AggPath:
    """The path of ``vertices`` (as float64) and ``codes``."""
    return _AggPath(np.asarray(vertices, dtype=float), codes)


@dataclass(frozen=True, slots=True)
class _Item:
    """One primitive: a filled area, or a stroke ``width_pt`` wide (points, 1/72 inch)."""

    path: _AggPath
    rgba: RGBA
    filled: bool
    width_pt: float


@functools.cache
def _rgba(colour: str) -> RGBA:
    """ "#RRGGBB" or "#RRGGBBAA" (ezdxf's colour strings) as floats 0..1, each byte / 255
    as matplotlib's ``to_rgba`` gives them; any other form through matplotlib itself."""
    if len(colour) in (7, 9) and colour[0] == "#":
        try:
            channels = [n / 255 for n in bytes.fromhex(colour[1:])]
        except ValueError:
            pass
        else:
            r, g, b, a = (*channels, 1.0) if len(channels) == 3 else channels
            return (r, g, b, a)
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
        pass  # render_rgba puts the drawing on white paper

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
        xy = np.array(((start.x, start.y), (end.x, end.y)))
        self._stroke(_agg_path(xy, np.array((_MOVETO, _LINETO), dtype=np.uint8)), properties)

    def draw_solid_lines(
        self, lines: Iterable[tuple[Vec2, Vec2]], properties: BackendProperties
    ) -> None:
        xy: list[tuple[float, float]] = []
        for s, e in lines:
            if s.isclose(e):
                self.draw_point(s, properties)
            else:
                xy.append((s.x, s.y))
                xy.append((e.x, e.y))
        if xy:
            codes = np.tile(np.array((_MOVETO, _LINETO), dtype=np.uint8), len(xy) // 2)
            self._stroke(_agg_path(np.array(xy), codes), properties)

    def draw_path(self, path: BkPath2d, properties: BackendProperties) -> None:
        if len(path):
            self._stroke(_matplotlib_path([path], orient=False), properties)

    def draw_filled_paths(self, paths: Iterable[BkPath2d], properties: BackendProperties) -> None:
        paths = [p for p in paths if len(p)]
        if paths:
            mpl_path = _matplotlib_path(paths, orient=True)
            self._items.append(_Item(mpl_path, _rgba(properties.color), True, 0.0))

    def draw_filled_polygon(self, points: BkPoints2d, properties: BackendProperties) -> None:
        xy = points.np_vertices()[:, :2]
        if len(xy) < 3:
            return
        self._items.append(_Item(_agg_path(xy, None), _rgba(properties.color), True, 0.0))

    def draw_image(self, image_data: ImageData, properties: BackendProperties) -> None:
        # The layout writer places no raster images; a foreign one is left out of the preview.
        _LOG.info("preview: skipped a raster image")

    # -- output ------------------------------------------------------------------------

    def _stroke(self, path: _AggPath, properties: BackendProperties) -> None:
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

    def render_rgba(
        self, size_in: tuple[float, float], view: tuple[float, float, float, float], dpi: int
    ) -> np.ndarray:
        """The sheet's pixels, (rows, columns, RGBA) uint8, on opaque white: a picture
        ``size_in`` inches (width, height) at ``dpi`` showing ``view`` (x0, y0, x1, y1 in
        drawing units) edge to edge, as a figure of that size with one axes filling it."""
        try:
            return _render_agg(self._items, self._points, size_in, view, dpi)
        except (ImportError, AttributeError, TypeError, ValueError) as exc:
            _LOG.debug("preview: Agg renderer not usable directly (%s); drawing a figure", exc)
            return _render_figure(self._items, self._points, size_in, view, dpi)


# -- rasterising -------------------------------------------------------------------------


def matplotlib_data_folder() -> Path:
    """matplotlib's ``mpl-data`` folder (its ``get_data_path()``), found without importing it."""
    import importlib.util

    spec = importlib.util.find_spec("matplotlib")
    if spec is None or not spec.submodule_search_locations:
        raise ImportError("matplotlib is not installed")
    return Path(next(iter(spec.submodule_search_locations))) / "mpl-data"


@functools.cache
def _agg_extension() -> Any:
    """matplotlib's compiled Agg module, loaded from its file without running the matplotlib
    package's ``__init__`` (rcParams, colour tables: a fifth of a second). It is entered in
    ``sys.modules`` under its own name, so a later ``import matplotlib`` (report plots) uses
    this module rather than initialising the extension a second time."""
    import importlib
    import importlib.machinery
    import importlib.util
    import sys

    name = "matplotlib.backends._backend_agg"
    if name in sys.modules or "matplotlib" in sys.modules:  # the ordinary import is free
        return importlib.import_module(name)
    folder = matplotlib_data_folder().parent / "backends"
    finder = importlib.machinery.FileFinder(
        str(folder),
        (importlib.machinery.ExtensionFileLoader, importlib.machinery.EXTENSION_SUFFIXES),
    )
    spec = finder.find_spec(name)
    if spec is None or spec.loader is None:
        raise ImportError(f"no {name} in {folder}")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    sys.modules[name] = module
    return module


class _AggGC:
    """The graphics context Agg reads, with the values a ``PathCollection`` of ours gives
    matplotlib's (``GraphicsContextBase``): black, opaque, antialiased, butt caps, round
    joins, solid, no clip path, no hatch, no sketch, snapping left to Agg; clipped to
    ``cliprect`` ([[x0, y0], [x1, y1]] pixels), the axes box."""

    _linewidth = 1.0
    _alpha = 1.0
    _forced_alpha = False
    _rgb = (0.0, 0.0, 0.0, 1.0)
    _antialiased = 1
    _capstyle = "butt"
    _joinstyle = "round"

    def __init__(self, cliprect: np.ndarray) -> None:
        self._cliprect = cliprect

    def get_dashes(self) -> tuple[float, None]:
        return (0, None)

    def get_clip_path(self) -> tuple[None, None]:
        return (None, None)

    def get_snap(self) -> None:
        return None

    def get_hatch_path(self) -> None:
        return None

    def get_hatch_color(self) -> RGBA:
        return (0.0, 0.0, 0.0, 1.0)

    def get_hatch_linewidth(self) -> float:
        return 1.0

    def get_sketch_params(self) -> None:
        return None


def _pixel_size(size_in: tuple[float, float], dpi: int) -> tuple[float, float]:
    """The figure's size in pixels, unrounded, as matplotlib computes it (inches x dpi)."""
    return size_in[0] * dpi, size_in[1] * dpi


def _data_to_pixels(
    view: tuple[float, float, float, float], width_px: float, height_px: float
) -> np.ndarray:
    """The 3x3 affine matrix from drawing units to pixels of an axes that fills the
    figure: matplotlib's ``transData`` frozen (``BboxTransformFrom`` the view limits, then
    ``BboxTransformTo`` the axes box, composed by ``np.dot``), float for float."""
    x0, y0, x1, y1 = view
    x_scale, y_scale = 1.0 / (x1 - x0), 1.0 / (y1 - y0)
    from_view = np.array(
        [[x_scale, 0.0, -x0 * x_scale], [0.0, y_scale, -y0 * y_scale], [0.0, 0.0, 1.0]]
    )
    to_axes = np.array([[width_px, 0.0, 0.0], [0.0, height_px, 0.0], [0.0, 0.0, 1.0]])
    return np.dot(to_axes, from_view)


def _render_agg(
    items: Sequence[_Item],
    points: Sequence[tuple[float, float, RGBA]],
    size_in: tuple[float, float],
    view: tuple[float, float, float, float],
    dpi: int,
) -> np.ndarray:
    """:meth:`BatchBackend.render_rgba` on the Agg renderer itself."""
    agg = _agg_extension()
    width_px, height_px = _pixel_size(size_in, dpi)
    # the canvas truncates the figure size to whole pixels (recent matplotlib first adds
    # 1e-8 against float noise)
    renderer = agg.RendererAgg(int(width_px + 1e-8), int(height_px + 1e-8), dpi)
    pixels = np.asarray(renderer)
    pixels[...] = 255  # the figure's white patch covers the canvas: opaque white paper
    to_px = _data_to_pixels(view, width_px, height_px)
    gc = _AggGC(np.array([[0.0, 0.0], [width_px, height_px]]))
    identity = np.eye(3)
    no_transforms, one_offset = np.empty((0, 3, 3)), np.zeros((1, 2))
    no_colours, antialiased = np.empty((0, 4)), np.ones(1, dtype=np.uint8)
    for filled, run in itertools.groupby(items, key=lambda it: it.filled):
        group = list(run)
        colours = np.array([it.rgba for it in group])
        if filled:
            faces, edges, widths = colours, no_colours, np.zeros(1)
        else:
            faces, edges = no_colours, colours
            widths = np.array([it.width_pt for it in group])
        renderer.draw_path_collection(
            gc,
            to_px,
            [it.path for it in group],
            no_transforms,
            one_offset,
            identity,
            faces,
            edges,
            widths,
            [(0.0, None)] * len(widths),
            antialiased,
            [None],
            "screen",
        )
    if points:  # rare (DXF points, zero-length lines): drawn with matplotlib's own marker
        dot, scale = _dot_marker(dpi)
        renderer.draw_path_collection(
            gc,
            to_px,
            [dot],
            scale,
            np.array([(x, y) for x, y, _ in points]),
            to_px,
            np.array([c for _, _, c in points]),
            no_colours,
            np.ones(1),
            [(0.0, None)],
            antialiased,
            [None],
            "screen",
        )
    return pixels


def _dot_marker(dpi: int) -> tuple[Any, np.ndarray]:
    """The path of a point's disc and its scaling (transforms of one), as a
    ``PathCollection`` of the "o" marker with ``sizes=[_POINT_SIZE_PT2]`` has them."""
    from matplotlib.markers import MarkerStyle

    marker = MarkerStyle("o")
    dot = marker.get_path().transformed(marker.get_transform())
    scale = np.zeros((1, 3, 3))
    # matplotlib's sqrt(sizes) * dpi / 72 * factor, the factor of a PathCollection being 1
    scale[:, 0, 0] = scale[:, 1, 1] = np.sqrt(np.asarray([_POINT_SIZE_PT2])) * dpi / 72.0 * 1.0
    scale[:, 2, 2] = 1.0
    return dot, scale


def _render_figure(
    items: Sequence[_Item],
    points: Sequence[tuple[float, float, RGBA]],
    size_in: tuple[float, float],
    view: tuple[float, float, float, float],
    dpi: int,
) -> np.ndarray:
    """:meth:`BatchBackend.render_rgba` through a matplotlib figure and its collections."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.collections import PathCollection
    from matplotlib.figure import Figure
    from matplotlib.markers import MarkerStyle
    from matplotlib.path import Path as MplPath

    fig = Figure(figsize=size_in, dpi=dpi, facecolor="white")
    canvas = FigureCanvasAgg(fig)
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    ax.set_axis_off()
    ax.set_xlim(view[0], view[2])
    ax.set_ylim(view[1], view[3])
    count = 0
    for filled, run in itertools.groupby(items, key=lambda it: it.filled):
        group = list(run)
        style: dict[str, Any]
        if filled:
            style = {"edgecolors": "none", "linewidths": 0.0}
            style["facecolors"] = [it.rgba for it in group]
        else:
            style = {"facecolors": "none", "capstyle": "butt", "joinstyle": "round"}
            style["edgecolors"] = [it.rgba for it in group]
            style["linewidths"] = [it.width_pt for it in group]
        paths = [MplPath(it.path.vertices, it.path.codes) for it in group]
        ax.add_collection(PathCollection(paths, zorder=count, **style), autolim=False)
        count += 1
    if points:  # dimensionless points last, as markers of a fixed size
        marker = MarkerStyle("o")
        dots = PathCollection(
            [marker.get_path().transformed(marker.get_transform())],
            sizes=[_POINT_SIZE_PT2],
            offsets=np.array([(x, y) for x, y, _ in points]),
            offset_transform=ax.transData,
            facecolors=[c for _, _, c in points],
            edgecolors="none",
            zorder=count,
        )
        ax.add_collection(dots, autolim=False)
    canvas.draw()
    return np.asarray(canvas.buffer_rgba())


def _matplotlib_path(paths: list[BkPath2d], *, orient: bool) -> _AggPath:
    """ezdxf paths as one path of matplotlib codes; with ``orient`` holes show as holes.

    Agg fills by the non-zero winding rule, so, as ezdxf's
    ``to_matplotlib_path(detect_holes=True)`` does, a boundary inside an even number of others
    (0, 2, ...) is turned counter-clockwise and one inside an odd number clockwise. The nesting
    is ezdxf's: by bounding boxes, the largest first, a boundary whose box centre lies in a
    larger one's box is inside it. Done on numpy arrays rather than with a path object per
    boundary, for speed: text glyphs are most of a sheet's fills.
    """
    commands: list[int] = []  # of all paths, each after its start: one numpy pass for all
    for path in paths:
        commands.append(_START)
        commands.extend(path.command_codes())
    steps = np.array(commands, dtype=np.intp)
    kinds = np.repeat(_MPL_CODE[steps], _VERTEX_COUNT[steps])
    xy = np.concatenate([path.np_vertices() for path in paths])[:, :2].astype(float, copy=True)
    if orient:
        _orient_boundaries(xy, kinds)
    return _agg_path(xy, kinds)


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
