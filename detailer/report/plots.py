"""Plots of the calculation report as inline SVG: moment and shear envelopes, curtailment.

Drawn by hand with :mod:`detailer.report.svg` (no plotting library): a few milliseconds a
plot, the same bytes for the same data. Every plot is an ``<svg class="plot">`` with
``data-plot`` (the caller's ``salt``, unique on the page), ``role="img"``, an accessible name
(``aria-label`` and ``<title>``) and a ``<desc>`` listing the values written on it. The curves
carry ``data-series`` (``m_max``, ``m_min``, ``v_max``, ``v_min``, ``m_rd_top``,
``m_ed_top``, ``m_rd_bottom``, ``m_ed_bottom``; the shaded area between an envelope's two
curves is ``range``), the bars of the curtailment diagram ``data-mark`` and ``data-layer``,
so tests and tools can find them. Scales and ticks: :mod:`detailer.report.axes`.

Sign convention of every moment plot: sagging positive, drawn on the tension side (the UK
convention), i.e. sagging below the axis and hogging above it. x is in mm in the data and
labelled in m on the axis.
"""

from __future__ import annotations

__all__ = [
    "Annotation",
    "BarLine",
    "CurtailmentData",
    "EnvelopeData",
    "SupportMark",
    "curtailment_svg",
    "moment_svg",
    "shear_svg",
]

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from detailer.report import axes
from detailer.report.axes import Frame, Legend
from detailer.report.svg import Canvas, Pen, simplify, text_width

# Pens (report rendering only).
SAGGING = "#c0392b"  # bottom face / sagging
HOGGING = "#1f5fa8"  # top face / hogging
SHIFTED = "#333333"
SHEAR_MAX = "#7a3e9d"
SHEAR_MIN = "#2e8b57"
ENVELOPE_FILL = "#f1f1f1"
CURVE_WIDTH = 1.4
BAR_WIDTH = 2.2
#: Curves are thinned to this deviation (drawing units, about 0.03 mm on an A4 page).
TOLERANCE = 0.12
FS_NOTE = 9.0
FS_BAR = 8.8


@dataclass(frozen=True, slots=True)
class SupportMark:
    label: str
    x_mm: float
    width_mm: float


@dataclass(frozen=True, slots=True)
class Annotation:
    """A value written beside the curve at ``x_mm`` (text already formatted as in the record)."""

    x_mm: float
    value: float
    text: str


@dataclass(frozen=True, slots=True)
class EnvelopeData:
    """One envelope pair (max, min) along the strip, in kNm/m or kN/m."""

    x_mm: np.ndarray
    upper: np.ndarray
    lower: np.ndarray
    supports: tuple[SupportMark, ...]
    annotations: tuple[Annotation, ...] = ()


@dataclass(frozen=True, slots=True)
class BarLine:
    """A principal bar set as drawn in the curtailment diagram."""

    mark: str
    label: str  # e.g. "01 25H10-250"
    layer: str  # "T1" or "B1"
    x_start_mm: float
    x_end_mm: float
    leg_left: bool = False  # a bend down/up into a support or a U-bar at this end
    leg_right: bool = False


@dataclass(frozen=True, slots=True)
class CurtailmentData:
    """Shifted M_Ed and M_Rd of the provided bars per face (magnitudes, kNm/m) and the bars."""

    x_top_mm: np.ndarray
    m_ed_top: np.ndarray
    m_rd_top: np.ndarray
    x_bottom_mm: np.ndarray
    m_ed_bottom: np.ndarray
    m_rd_bottom: np.ndarray
    bars: tuple[BarLine, ...]
    supports: tuple[SupportMark, ...]


# ----------------------------------------------------------------------------- drawing


def _xy(frame: Frame, x_mm: np.ndarray, values: np.ndarray) -> np.ndarray:
    """Finite (x, value) pairs in drawing units, thinned to :data:`TOLERANCE`."""
    x = np.asarray(x_mm, dtype=float)
    v = np.asarray(values, dtype=float)
    ok = np.isfinite(x) & np.isfinite(v)
    xy = np.column_stack([frame.px(x[ok]), frame.py(v[ok])])
    return simplify(xy, TOLERANCE)


def _curve(c: Canvas, xy: np.ndarray, pen: Pen, name: str) -> None:
    if len(xy):
        c.polyline(xy, pen, data_series=name)


def _to_zero(frame: Frame, xy: np.ndarray) -> np.ndarray:
    """Outline of the area between a curve (drawing units) and the zero line."""
    if not len(xy):
        return xy
    y0 = float(frame.py(0.0))
    return np.vstack([xy, [[xy[-1, 0], y0], [xy[0, 0], y0]]])


def _notes(c: Canvas, frame: Frame, notes: Sequence[Annotation]) -> None:
    """Values beside their points, on the side away from the zero line (below a point drawn
    below it), kept inside the frame, on a white ground so curves do not cross the digits."""
    y0 = float(frame.py(0.0))
    cap = 0.73 * FS_NOTE
    c.open(cls="values")
    for n in sorted(notes, key=lambda n: (n.x_mm, n.value, n.text)):
        if not (np.isfinite(n.x_mm) and np.isfinite(n.value)):
            continue
        px, py = float(frame.px(n.x_mm)), float(frame.py(n.value))
        w = text_width(n.text, FS_NOTE)
        x = min(max(px, frame.left + 3 + w / 2), frame.right - 3 - w / 2)
        base = py + 6 + cap if py > y0 + 0.01 else py - 6
        base = min(max(base, frame.top + cap + 3), frame.bottom - 3)
        c.rect(x - w / 2 - 1.5, base - cap - 1.5, w + 3, cap + 3.5, "#ffffff", 0.85)
        c.text(x, base, n.text, size=FS_NOTE, anchor="middle", data_x_mm=f"{n.x_mm:.1f}")
    c.close()


def _desc_values(notes: Sequence[Annotation], unit: str) -> str:
    if not notes:
        return ""
    ordered = sorted(notes, key=lambda n: (n.x_mm, n.value, n.text))
    return (
        "Values marked ("
        + unit
        + "): "
        + "; ".join(f"{n.text} at x = {n.x_mm / 1000.0:.2f} m" for n in ordered)
        + "."
    )


def _envelope(
    data: EnvelopeData,
    *,
    title: str,
    salt: str,
    inverted: bool,
    pens: tuple[Pen, Pen],
    names: tuple[str, str],
    labels: tuple[str, str],
    ylabel: str,
    unit: str,
    height: float,
) -> str:
    x = np.asarray(data.x_mm, dtype=float)
    upper = np.asarray(data.upper, dtype=float)
    lower = np.asarray(data.lower, dtype=float)
    legend = Legend.of(((labels[0], pens[0]), (labels[1], pens[1])))
    frame, yaxis, xaxis, head = axes.layout(
        title,
        legend,
        x_mm=[x, [s.x_mm for s in data.supports]],
        values=[upper, lower, [n.value for n in data.annotations]],
        inverted=inverted,
        height=height,
        pad=0.16,
    )
    c = Canvas(axes.WIDTH, frame.bottom + axes.BELOW)
    axes.background(c)
    axes.header(c, head)
    axes.support_bands(c, frame, data.supports, frame.top, frame.bottom)
    axes.grid(c, frame, xaxis, yaxis, frame.top, frame.bottom)
    xy_upper, xy_lower = _xy(frame, x, upper), _xy(frame, x, lower)
    c.polygon(np.vstack([xy_upper, xy_lower[::-1]]), ENVELOPE_FILL, data_series="range")
    axes.support_lines(c, frame, data.supports, frame.top, frame.bottom, labels=True)
    axes.zero_line(c, frame)
    _curve(c, xy_upper, pens[0], names[0])
    _curve(c, xy_lower, pens[1], names[1])
    _notes(c, frame, data.annotations)
    axes.frame_box(c, frame)
    axes.y_ticks(c, frame, yaxis, ylabel)
    axes.x_ticks(c, frame, xaxis, frame.bottom, "x along the strip (m)")
    return c.svg(title=title, desc=_desc_values(data.annotations, unit), cls="plot", data_plot=salt)


def moment_svg(data: EnvelopeData, *, title: str, salt: str) -> str:
    """Bending-moment envelope, sagging drawn below the axis (tension side)."""
    return _envelope(
        data,
        title=title,
        salt=salt,
        inverted=True,
        pens=(Pen(SAGGING, CURVE_WIDTH), Pen(HOGGING, CURVE_WIDTH)),
        names=("m_max", "m_min"),
        labels=("M_Ed,max (most sagging)", "M_Ed,min (most hogging)"),
        ylabel="M_Ed (kNm/m), sagging +",
        unit="kNm/m",
        height=170.0,
    )


def shear_svg(data: EnvelopeData, *, title: str, salt: str) -> str:
    """Shear-force envelope, positive up."""
    return _envelope(
        data,
        title=title,
        salt=salt,
        inverted=False,
        pens=(Pen(SHEAR_MAX, CURVE_WIDTH), Pen(SHEAR_MIN, CURVE_WIDTH)),
        names=("v_max", "v_min"),
        labels=("V_Ed,max", "V_Ed,min"),
        ylabel="V_Ed (kN/m)",
        unit="kN/m",
        height=145.0,
    )


# ------------------------------------------------------------------------- curtailment


@dataclass(frozen=True, slots=True)
class _Placed:
    """A bar with its lane (0 next to the axis) and its label's anchor and extent."""

    bar: BarLine
    lane: int
    x0: float  # bar ends, drawing units
    x1: float
    text_x: float  # label centre
    lo: float  # what the bar and its label occupy along x
    hi: float


LANE_GAP = 8.0  # clear distance between two bars (with labels) in one lane, drawing units


def _place(bars: Sequence[BarLine], frame: Frame) -> list[_Placed]:
    """First-fit lanes per layer: a bar goes into the first lane nearest the axis where it and
    its label clear the bars already there."""
    out: list[_Placed] = []
    for layer in ("T1", "B1"):
        group = sorted(
            (b for b in bars if b.layer == layer),
            key=lambda b: (b.x_start_mm, b.x_end_mm, b.mark, b.label),
        )
        ends: list[float] = []
        for b in group:
            x0 = float(frame.px(b.x_start_mm))
            x1 = float(frame.px(b.x_end_mm))
            w = text_width(b.label, FS_BAR)
            mid = min(max(0.5 * (x0 + x1), frame.left + w / 2), frame.right - w / 2)
            lo, hi = min(x0, mid - w / 2), max(x1, mid + w / 2)
            for lane, end in enumerate(ends):
                if lo > end + LANE_GAP:
                    ends[lane] = hi
                    break
            else:
                ends.append(hi)
                lane = len(ends) - 1
            out.append(_Placed(b, lane, x0, x1, mid, lo, hi))
    return out


LANE_PITCH = 17.0
LEG = 5.0


def _bar_y(p: _Placed, axis_y: float) -> float:
    if p.bar.layer == "T1":
        return axis_y - 9.0 - p.lane * LANE_PITCH
    return axis_y + 14.0 + p.lane * LANE_PITCH


def curtailment_svg(data: CurtailmentData, *, title: str, salt: str) -> str:
    """Shifted M_Ed against M_Rd of the bars provided, both faces on the tension side, and
    the principal bars with their marks below, cut-off points dotted through both."""
    xt = np.asarray(data.x_top_mm, dtype=float)
    xb = np.asarray(data.x_bottom_mm, dtype=float)
    top_rd = -np.asarray(data.m_rd_top, dtype=float)  # hogging: negative, drawn above
    top_ed = -np.asarray(data.m_ed_top, dtype=float)
    bot_rd = np.asarray(data.m_rd_bottom, dtype=float)
    bot_ed = np.asarray(data.m_ed_bottom, dtype=float)
    pens = {
        "top": Pen(HOGGING, CURVE_WIDTH),
        "bottom": Pen(SAGGING, CURVE_WIDTH),
        "shifted": Pen(SHIFTED, 1.1, dash="5 2.5"),
    }
    legend = Legend.of(
        (
            ("M_Rd top bars (above the axis)", pens["top"]),
            ("M_Ed shifted by a_l (9.2.1.3)", pens["shifted"]),
            ("M_Rd bottom bars (below)", pens["bottom"]),
        )
    )
    frame, yaxis, xaxis, head = axes.layout(
        title,
        legend,
        x_mm=[xt, xb, [s.x_mm for s in data.supports]]
        + [[b.x_start_mm, b.x_end_mm] for b in data.bars],
        values=[top_rd, top_ed, bot_rd, bot_ed],
        inverted=True,
        height=175.0,
        pad=0.06,
    )
    placed = _place(data.bars, frame)
    n_top = max([p.lane + 1 for p in placed if p.bar.layer == "T1"], default=1)
    n_bot = max([p.lane + 1 for p in placed if p.bar.layer == "B1"], default=1)
    lanes_top = frame.bottom + 8.0
    axis_y = lanes_top + 22.0 + (n_top - 1) * LANE_PITCH
    lanes_bottom = axis_y + 20.0 + (n_bot - 1) * LANE_PITCH

    c = Canvas(axes.WIDTH, lanes_bottom + axes.BELOW)
    axes.background(c)
    axes.header(c, head)
    axes.support_bands(c, frame, data.supports, frame.top, frame.bottom)
    axes.support_bands(c, frame, data.supports, lanes_top, lanes_bottom)
    axes.grid(c, frame, xaxis, yaxis, frame.top, frame.bottom)
    curves = {
        "m_rd_top": _xy(frame, xt, top_rd),
        "m_ed_top": _xy(frame, xt, top_ed),
        "m_rd_bottom": _xy(frame, xb, bot_rd),
        "m_ed_bottom": _xy(frame, xb, bot_ed),
    }
    c.polygon(_to_zero(frame, curves["m_rd_top"]), HOGGING, 0.1)
    c.polygon(_to_zero(frame, curves["m_rd_bottom"]), SAGGING, 0.1)
    # Cut-off points: dotted through the diagram and the bars.
    for layer, colour in (("T1", HOGGING), ("B1", SAGGING)):
        ends = sorted({x for p in placed if p.bar.layer == layer for x in (p.x0, p.x1)})
        c.path(
            [(x, frame.top, x, lanes_bottom) for x in ends if frame.left <= x <= frame.right],
            Pen(colour, 0.6, dash="1 2", opacity=0.7),
            cls=f"cut-offs-{layer}",
        )
    axes.support_lines(c, frame, data.supports, frame.top, frame.bottom, labels=True)
    axes.support_lines(c, frame, data.supports, lanes_top, lanes_bottom, labels=False)
    axes.zero_line(c, frame)
    for name, pen in (
        ("m_rd_top", pens["top"]),
        ("m_ed_top", pens["shifted"]),
        ("m_rd_bottom", pens["bottom"]),
        ("m_ed_bottom", pens["shifted"]),
    ):
        _curve(c, curves[name], pen, name)
    axes.frame_box(c, frame)
    axes.y_ticks(c, frame, yaxis, "M (kNm/m), sagging +")

    # The bars: T1 lanes above the line, B1 lanes below; legs turn towards the other face.
    c.line(frame.left, axis_y, frame.right, axis_y, Pen("#000000", 0.7), cls="lanes-axis")
    for layer, y in (
        ("T1", 0.5 * (lanes_top + axis_y)),
        ("B1", 0.5 * (axis_y + lanes_bottom)),
    ):
        c.text(frame.left - 8, y + 3.5, layer, size=axes.FS_TICK, anchor="end", bold=True)
    for p in sorted(placed, key=lambda p: (p.bar.layer, p.lane, p.x0, p.bar.mark)):
        colour = HOGGING if p.bar.layer == "T1" else SAGGING
        y = _bar_y(p, axis_y)
        leg = LEG if p.bar.layer == "T1" else -LEG
        c.open(cls="bar", data_mark=p.bar.mark, data_layer=p.bar.layer)
        pts = [(p.x0, y), (p.x1, y)]
        if p.bar.leg_left:
            pts.insert(0, (p.x0, y + leg))
        if p.bar.leg_right:
            pts.append((p.x1, y + leg))
        c.polyline(np.array(pts), Pen(colour, BAR_WIDTH), data_x_mm=_span_text(p.bar))
        w = text_width(p.bar.label, FS_BAR)
        c.rect(p.text_x - w / 2 - 1.5, y - 11.0, w + 3.0, 8.5, "#ffffff", 0.85)
        c.text(p.text_x, y - 3.5, p.bar.label, size=FS_BAR, anchor="middle", colour=colour)
        c.close()
    c.line(frame.left, lanes_bottom, frame.right, lanes_bottom, axes.FRAME)
    axes.x_ticks(
        c, frame, xaxis, lanes_bottom, "x along the strip (m); dotted: bar ends (cut-off points)"
    )
    desc = "Bars: " + "; ".join(
        f"{p.bar.label} ({p.bar.layer}) from x = {p.bar.x_start_mm / 1000.0:.2f} m "
        f"to {p.bar.x_end_mm / 1000.0:.2f} m"
        for p in sorted(placed, key=lambda p: (p.bar.x_start_mm, p.bar.layer, p.bar.mark))
    )
    return c.svg(title=title, desc=desc + "." if placed else "", cls="plot", data_plot=salt)


def _span_text(b: BarLine) -> str:
    return f"{b.x_start_mm:.1f} {b.x_end_mm:.1f}"
