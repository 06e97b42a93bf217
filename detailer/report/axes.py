"""Axes of the report's plots: the frame and its scales, ticks, grid, supports, title, legend.

Every plot is :data:`WIDTH` drawing units wide (about one CSS pixel each at the page's full
width of 190 mm) and as tall as it needs. x ticks are in metres at a step of 1, 2, 2.5 or
5 x 10^k m that leaves room for the labels; y ticks are at such a step too, from the last
one at or below the lowest value to the first at or above the highest (the ticks cover the
data), with extra room above and below for the values written beside the curves.
"""

from __future__ import annotations

__all__ = [
    "BELOW",
    "WIDTH",
    "Frame",
    "Legend",
    "XAxis",
    "YAxis",
    "background",
    "frame_box",
    "grid",
    "header",
    "layout",
    "support_bands",
    "support_lines",
    "x_ticks",
    "y_ticks",
    "zero_line",
]

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Any, Protocol

import numpy as np

from detailer.report.svg import (
    Canvas,
    Pen,
    nice_step,
    nice_ticks,
    text_width,
    tick_label,
    wrap,
)

WIDTH = 720.0
RIGHT = 10.0  # margin right of the frame
LEFT_MIN = 58.0  # frame's left edge at least here, so the plots of a strip line up
BELOW = 36.0  # x tick labels and the x axis title under the frame
X_PAD_MM = 150.0  # the frame runs this far beyond the data at both ends
FS_TITLE = 11.5
FS_LEGEND = 9.5
FS_TICK = 9.5
FS_LABEL = 10.0
FS_SUPPORT = 10.0
TITLE_LEADING = 15.0
Y_TICK_GAP = 21.0  # least distance between two y ticks
GRID = Pen("#e1e1e1", 0.5)
TICK = Pen("#222222", 0.7)
FRAME = Pen("#222222", 0.7)
ZERO = Pen("#000000", 0.8)
SUPPORT = Pen("#9a9a9a", 0.6, dash="4 3")
BAND = "#e8e8e8"
_X_STEPS_M = (0.1, 0.2, 0.25, 0.5, 1.0, 2.0, 2.5, 5.0, 10.0, 20.0, 25.0, 50.0, 100.0, 200.0)


class _Support(Protocol):
    @property
    def label(self) -> str: ...
    @property
    def x_mm(self) -> float: ...
    @property
    def width_mm(self) -> float: ...


@dataclass(frozen=True, slots=True)
class Frame:
    """The plot area in drawing units and the data ranges at its edges."""

    left: float
    top: float
    width: float
    height: float
    x_lo_mm: float  # at the left edge
    x_hi_mm: float  # at the right edge
    y_top: float  # value at the top edge (the most hogging one for a moment plot)
    y_bottom: float  # value at the bottom edge

    @property
    def right(self) -> float:
        return self.left + self.width

    @property
    def bottom(self) -> float:
        return self.top + self.height

    def px(self, x_mm: Any) -> Any:
        """x (mm; a float or an array) in drawing units."""
        return self.left + (x_mm - self.x_lo_mm) * (self.width / (self.x_hi_mm - self.x_lo_mm))

    def py(self, value: Any) -> Any:
        """A value (kNm/m, kN/m; a float or an array) in drawing units, y down."""
        return self.top + (value - self.y_top) * (self.height / (self.y_bottom - self.y_top))


@dataclass(frozen=True, slots=True)
class YAxis:
    ticks: tuple[float, ...]
    step: float


@dataclass(frozen=True, slots=True)
class XAxis:
    ticks_mm: tuple[float, ...]
    step_m: float


@dataclass(frozen=True, slots=True)
class LegendEntry:
    label: str  # "M_Ed,max" style subscripts
    pen: Pen

    @property
    def width(self) -> float:
        return 24.0 + text_width(self.label, FS_LEGEND, subscripts=True)


@dataclass(frozen=True, slots=True)
class Legend:
    entries: tuple[LegendEntry, ...]

    @staticmethod
    def of(items: Iterable[tuple[str, Pen]]) -> Legend:
        return Legend(tuple(LegendEntry(label, pen) for label, pen in items))

    def rows(self, width: float) -> list[list[LegendEntry]]:
        """Entries in rows no wider than ``width`` (in order, 14 units apart)."""
        rows: list[list[LegendEntry]] = [[]]
        used = 0.0
        for e in self.entries:
            need = e.width + (14.0 if rows[-1] else 0.0)
            if rows[-1] and used + need > width:
                rows.append([])
                used, need = 0.0, e.width
            rows[-1].append(e)
            used += need
        return [r for r in rows if r]


@dataclass(frozen=True, slots=True)
class Header:
    """Title lines and legend rows with their baselines."""

    title_lines: tuple[tuple[str, float], ...]
    legend_rows: tuple[tuple[tuple[LegendEntry, ...], float], ...]
    bottom: float


def _header_layout(title: str, legend: Legend) -> Header:
    room = WIDTH - 16.0
    lines = wrap(title, FS_TITLE, room, bold=True)
    titled = tuple((line, 16.0 + i * TITLE_LEADING) for i, line in enumerate(lines))
    last_w = text_width(lines[-1], FS_TITLE, bold=True)
    rows = legend.rows(room)
    base = titled[-1][1]
    placed: list[tuple[tuple[LegendEntry, ...], float]] = []
    if len(rows) == 1 and last_w + 24.0 + _row_width(rows[0]) <= room:
        placed.append((tuple(rows[0]), base))
    else:
        for i, row in enumerate(rows):
            placed.append((tuple(row), base + (i + 1) * 14.0))
    bottom = (placed[-1][1] if placed else base) + 4.0
    return Header(titled, tuple(placed), bottom)


def _row_width(row: Sequence[LegendEntry]) -> float:
    return sum(e.width for e in row) + 14.0 * (len(row) - 1)


def _y_axis(
    values: Sequence[np.ndarray], inverted: bool, pad: float, height: float
) -> tuple[float, float, YAxis]:
    """(value at the top edge, value at the bottom edge, ticks): the ticks cover the values
    and zero; the frame leaves ``pad`` of the range free beyond the values on both sides.
    Of the nice steps, the one whose ticks reach least beyond the values, the finer on a tie,
    provided the ticks are at least :data:`Y_TICK_GAP` apart on a frame ``height`` tall."""
    lo, hi = 0.0, 0.0
    for v in values:
        a = np.asarray(v, dtype=float)
        a = a[np.isfinite(a)]
        if a.size:
            lo, hi = min(lo, float(a.min())), max(hi, float(a.max()))
    if hi - lo < 1e-6:  # all zero (to rounding): an axis from -1 to 1
        lo, hi = -1.0, 1.0
    room = pad * (hi - lo)
    best: tuple[float, float, list[float]] | None = None
    for target in (7, 6, 5, 4, 3, 2):  # on a tie the finer step
        step = nice_step(hi - lo, target)
        ticks = nice_ticks(lo, hi, step)
        full = max(ticks[-1], hi + room) - min(ticks[0], lo - room)
        extent = ticks[-1] - ticks[0]
        if height * step / full < Y_TICK_GAP and target > 2:
            continue
        if best is None or extent < best[0] - 1e-9:
            best = (extent, step, ticks)
    assert best is not None
    _, step, ticks = best
    y_lo = min(ticks[0], lo - room)
    y_hi = max(ticks[-1], hi + room)
    axis = YAxis(tuple(ticks), step)
    return (y_lo, y_hi, axis) if inverted else (y_hi, y_lo, axis)


def _left_margin(axis: YAxis) -> float:
    w = max(text_width(tick_label(t, axis.step), FS_TICK) for t in axis.ticks)
    return max(LEFT_MIN, 30.0 + w)


def _x_axis(x_lo_mm: float, x_hi_mm: float, width: float) -> XAxis:
    per_m = width / ((x_hi_mm - x_lo_mm) / 1000.0)
    label_w = max(
        text_width(tick_label(v, 1.0), FS_TICK) for v in (x_lo_mm / 1000.0, x_hi_mm / 1000.0)
    )
    step = _X_STEPS_M[-1]
    for s in _X_STEPS_M:
        decimals_w = text_width(tick_label(x_hi_mm / 1000.0, s), FS_TICK)
        if s * per_m >= max(label_w, decimals_w) + 12.0 and s * per_m >= 22.0:
            step = s
            break
    first = math.ceil(x_lo_mm / 1000.0 / step - 1e-9)
    last = math.floor(x_hi_mm / 1000.0 / step + 1e-9)
    ticks = tuple(round(i * step * 1000.0, 6) + 0.0 for i in range(first, last + 1))
    return XAxis(ticks, step)


def layout(
    title: str,
    legend: Legend,
    *,
    x_mm: Sequence[Sequence[float] | np.ndarray],
    values: Sequence[Sequence[float] | np.ndarray],
    inverted: bool,
    height: float,
    pad: float,
) -> tuple[Frame, YAxis, XAxis, Header]:
    """The frame of one plot under its title and legend, its y ticks and its x ticks."""
    xs = np.concatenate([np.asarray(a, dtype=float).ravel() for a in x_mm] + [np.zeros(0)])
    xs = xs[np.isfinite(xs)]
    x_lo = (float(xs.min()) if xs.size else 0.0) - X_PAD_MM
    x_hi = (float(xs.max()) if xs.size else 1000.0) + X_PAD_MM
    y_top, y_bottom, yaxis = _y_axis(
        [np.asarray(v, dtype=float) for v in values], inverted, pad, height
    )
    head = _header_layout(title, legend)
    left = _left_margin(yaxis)
    top = head.bottom + 18.0  # the support labels sit above the frame
    frame = Frame(left, top, WIDTH - RIGHT - left, height, x_lo, x_hi, y_top, y_bottom)
    return frame, yaxis, _x_axis(x_lo, x_hi, frame.width), head


# ---------------------------------------------------------------------------- painting


def background(c: Canvas) -> None:
    c.rect(0, 0, c.width, c.height, "#ffffff")


def header(c: Canvas, head: Header) -> None:
    """Title on the left; legend right-aligned on the title's last line or below it."""
    for line, base in head.title_lines:
        c.text(8.0, base, line, size=FS_TITLE, bold=True, cls="title")
    c.open(cls="legend")
    for row, base in head.legend_rows:
        x = WIDTH - RIGHT - _row_width(row)
        for e in row:
            c.line(x, base - 3.5, x + 20.0, base - 3.5, e.pen)
            c.text(x + 24.0, base, e.label, size=FS_LEGEND, subscripts=True)
            x += e.width + 14.0
    c.close()


def support_bands(
    c: Canvas, f: Frame, supports: Sequence[_Support], top: float, bottom: float
) -> None:
    """Grey bands as wide as the supports, clipped to the frame."""
    for s in supports:
        if s.width_mm <= 0:
            continue
        a = max(float(f.px(s.x_mm - s.width_mm / 2)), f.left)
        b = min(float(f.px(s.x_mm + s.width_mm / 2)), f.right)
        if b > a:
            c.rect(a, top, b - a, bottom - top, BAND)


def support_lines(
    c: Canvas, f: Frame, supports: Sequence[_Support], top: float, bottom: float, *, labels: bool
) -> None:
    """Dashed support centrelines and, above the frame, the support labels."""
    xs = [float(f.px(s.x_mm)) for s in supports]
    c.path(
        [(x, top, x, bottom) for x in xs if f.left - 0.01 <= x <= f.right + 0.01],
        SUPPORT,
        cls="supports",
    )
    if not labels:
        return
    c.open(cls="support-labels")
    for s in supports:
        x = float(f.px(s.x_mm))
        w = text_width(s.label, FS_SUPPORT, bold=True)
        x = min(max(x, w / 2), WIDTH - w / 2)
        c.text(x, top - 5.0, s.label, size=FS_SUPPORT, anchor="middle", bold=True)
    c.close()


def grid(c: Canvas, f: Frame, xaxis: XAxis, yaxis: YAxis, top: float, bottom: float) -> None:
    xs = [float(f.px(t)) for t in xaxis.ticks_mm]
    ys = [float(f.py(t)) for t in yaxis.ticks if t != 0.0]
    c.path(
        [(x, top, x, bottom) for x in xs] + [(f.left, y, f.right, y) for y in ys],
        GRID,
        cls="grid",
    )


def zero_line(c: Canvas, f: Frame) -> None:
    y = float(f.py(0.0))
    c.line(f.left, y, f.right, y, ZERO, cls="zero")


def frame_box(c: Canvas, f: Frame) -> None:
    c.add(
        f'<rect x="{_n(f.left)}" y="{_n(f.top)}" width="{_n(f.width)}" height="{_n(f.height)}" '
        f'fill="none" {FRAME.attrs()}/>'
    )


def y_ticks(c: Canvas, f: Frame, axis: YAxis, label: str) -> None:
    """Tick marks and labels left of the frame, and the axis title read upwards."""
    ys = [float(f.py(t)) for t in axis.ticks]
    c.path([(f.left - 4.0, y, f.left, y) for y in ys], TICK, cls="y-ticks")
    c.open(cls="y-labels", font_size=_n(FS_TICK), text_anchor="end")
    for t, y in zip(axis.ticks, ys, strict=True):
        c.add(f'<text x="{_n(f.left - 7.0)}" y="{_n(y + 3.4)}">{tick_label(t, axis.step)}</text>')
    c.close()
    c.text(
        15.0,
        f.top + f.height / 2,
        label,
        size=FS_LABEL,
        anchor="middle",
        subscripts=True,
        rotate=True,
        cls="y-title",
    )


def x_ticks(c: Canvas, f: Frame, axis: XAxis, bottom: float, label: str) -> None:
    """Tick marks and labels (m) under ``bottom`` and the axis title under them."""
    xs = [float(f.px(t)) for t in axis.ticks_mm]
    c.path([(x, bottom, x, bottom + 4.0) for x in xs], TICK, cls="x-ticks")
    c.open(cls="x-labels", font_size=_n(FS_TICK), text_anchor="middle")
    base = _n(bottom + 14.0)
    for t, x in zip(axis.ticks_mm, xs, strict=True):
        text = tick_label(t / 1000.0, axis.step_m)
        c.add(f'<text x="{_n(x)}" y="{base}">{text}</text>')
    c.close()
    c.text(f.left + f.width / 2, bottom + 29.0, label, size=FS_LABEL, anchor="middle")


def _n(value: float, decimals: int = 1) -> str:
    s = f"{value:.{decimals}f}".rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s
