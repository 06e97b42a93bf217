"""Plots of the calculation report as inline SVG: moment and shear envelopes, curtailment.

matplotlib is imported lazily (only when a report is written) and driven without pyplot, so no
global backend or figure state is touched. Output is byte-stable: the SVG id salt is fixed per
figure (which also keeps ids unique when several plots share one HTML page), text stays text
(``svg.fonttype = 'none'``) and the date and creator metadata are left out.

Sign convention of every moment plot: sagging positive, drawn on the tension side (the UK
convention), i.e. sagging below the axis and hogging above it.
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

import html
import io
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

# Pens (report rendering only).
SAGGING = "#c0392b"  # bottom face / sagging
HOGGING = "#1f5fa8"  # top face / hogging
SHIFTED = "#333333"
BAND = "#e8e8e8"
SUPPORT = "#9a9a9a"
FIG_WIDTH_IN = 7.2  # fits an A4 page with 12 mm margins
_RC = {
    "font.family": "DejaVu Sans",
    "font.size": 7.5,
    "axes.titlesize": 8.5,
    "axes.labelsize": 7.5,
    "xtick.labelsize": 7,
    "ytick.labelsize": 7,
    "legend.fontsize": 7,
    "axes.linewidth": 0.6,
    "lines.linewidth": 1.1,
    "svg.fonttype": "none",
    "path.simplify": True,
}
_METADATA = {"Date": None, "Creator": None, "Format": None, "Type": None}


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


def _mpl() -> tuple[Any, Any]:
    import matplotlib
    from matplotlib.figure import Figure

    return matplotlib, Figure


def _to_svg(fig: Any, salt: str, title: str, matplotlib: Any) -> str:
    """The figure as an ``<svg>`` element for inline use (no XML prolog), tagged with
    ``data-plot`` (= ``salt``) and an accessible name."""
    buf = io.StringIO()
    with matplotlib.rc_context({"svg.hashsalt": salt, **_RC}):
        fig.savefig(buf, format="svg", metadata=_METADATA)
    text = buf.getvalue()
    text = text[text.index("<svg") :].strip()
    label = html.escape(title, quote=True)
    attrs = f'<svg class="plot" data-plot="{html.escape(salt, quote=True)}" role="img" aria-label="{label}" '
    return attrs + text[len("<svg ") :] + "\n"


def _metres(ax: Any) -> None:
    """x tick labels in m (the strip is drawn in mm)."""
    from matplotlib.ticker import FuncFormatter, MultipleLocator

    ax.xaxis.set_major_locator(MultipleLocator(1000.0))
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _pos: f"{v / 1000.0:g}"))


def _supports(ax: Any, supports: Sequence[SupportMark], labels: bool = True) -> None:
    for s in supports:
        if s.width_mm > 0:
            ax.axvspan(s.x_mm - s.width_mm / 2, s.x_mm + s.width_mm / 2, color=BAND, zorder=0, lw=0)
        ax.axvline(s.x_mm, color=SUPPORT, lw=0.6, ls=(0, (4, 3)), zorder=1)
        if labels:
            ax.annotate(
                s.label,
                xy=(s.x_mm, 1.0),
                xycoords=("data", "axes fraction"),
                xytext=(0, 2),
                textcoords="offset points",
                ha="center",
                va="bottom",
                fontsize=7.5,
                fontweight="bold",
            )


def _annotate(ax: Any, notes: Sequence[Annotation], tension_side: bool) -> None:
    """Values beside their peaks, pushed away from the axis (down for sagging in the moment
    plot, whose y axis is inverted)."""
    x0, x1 = ax.get_xlim()
    for n in notes:
        away = 1 if n.value >= 0 else -1
        dy = -away * 7 if tension_side else away * 7
        where = (n.x_mm - x0) / ((x1 - x0) or 1.0)
        ha = "left" if where < 0.04 else "right" if where > 0.96 else "center"
        ax.annotate(
            n.text,
            xy=(n.x_mm, n.value),
            xytext=(0, dy),
            textcoords="offset points",
            ha=ha,
            va="center",
            fontsize=6.5,
            bbox={"boxstyle": "square,pad=0.1", "fc": "white", "ec": "none", "alpha": 0.8},
        )


def _finish(ax: Any, x_mm: np.ndarray, ylabel: str) -> None:
    ax.axhline(0.0, color="black", lw=0.7, zorder=2)
    ax.set_xlim(float(np.min(x_mm)) - 150.0, float(np.max(x_mm)) + 150.0)
    _metres(ax)
    ax.set_xlabel("x along the strip (m)")
    ax.set_ylabel(ylabel)
    ax.grid(True, color="#dddddd", lw=0.4)
    ax.set_axisbelow(True)


def _title_and_legend(fig: Any, ax: Any, title: str, *, tight: bool = True) -> None:
    """Title on the left and the legend on the right of one line above the plot, clear of
    the curves and of the support labels."""
    fig.text(0.01, 0.995, title, ha="left", va="top", fontsize=8.5, fontweight="bold")
    fig.legend(
        *ax.get_legend_handles_labels(),
        loc="upper right",
        bbox_to_anchor=(0.995, 0.955),
        ncols=3,
        frameon=False,
        handlelength=2.4,
    )
    if tight:
        fig.tight_layout(pad=0.4, rect=(0.0, 0.0, 1.0, 0.86))


def moment_svg(data: EnvelopeData, *, title: str, salt: str) -> str:
    """Bending-moment envelope, sagging drawn below the axis (tension side)."""
    matplotlib, Figure = _mpl()
    with matplotlib.rc_context(_RC):
        fig = Figure(figsize=(FIG_WIDTH_IN, 2.9))
        ax = fig.add_subplot()
        x = data.x_mm
        ax.fill_between(x, data.lower, data.upper, color="#f3f3f3", lw=0, zorder=1)
        ax.plot(x, data.upper, color=SAGGING, label=r"$M_\mathrm{Ed,max}$ (most sagging)", zorder=3)
        ax.plot(x, data.lower, color=HOGGING, label=r"$M_\mathrm{Ed,min}$ (most hogging)", zorder=3)
        _supports(ax, data.supports)
        _finish(ax, x, r"$M_\mathrm{Ed}$ (kNm/m), sagging +")
        ax.invert_yaxis()  # sagging (+) below the axis: tension side
        ax.margins(y=0.18)
        _annotate(ax, data.annotations, tension_side=True)
        _title_and_legend(fig, ax, title)
    return _to_svg(fig, salt, title, matplotlib)


def shear_svg(data: EnvelopeData, *, title: str, salt: str) -> str:
    """Shear-force envelope, positive up."""
    matplotlib, Figure = _mpl()
    with matplotlib.rc_context(_RC):
        fig = Figure(figsize=(FIG_WIDTH_IN, 2.6))
        ax = fig.add_subplot()
        x = data.x_mm
        ax.fill_between(x, data.lower, data.upper, color="#f3f3f3", lw=0, zorder=1)
        ax.plot(x, data.upper, color="#7a3e9d", label=r"$V_\mathrm{Ed,max}$", zorder=3)
        ax.plot(x, data.lower, color="#2e8b57", label=r"$V_\mathrm{Ed,min}$", zorder=3)
        _supports(ax, data.supports)
        _finish(ax, x, r"$V_\mathrm{Ed}$ (kN/m)")
        ax.margins(y=0.18)
        _annotate(ax, data.annotations, tension_side=False)
        _title_and_legend(fig, ax, title)
    return _to_svg(fig, salt, title, matplotlib)


def _lanes(bars: Sequence[BarLine], gap_mm: float) -> list[int]:
    """First-fit lanes so that overlapping bars of one layer are drawn one above the other."""
    ends: list[float] = []
    out = []
    for b in bars:
        for i, end in enumerate(ends):
            if b.x_start_mm > end + gap_mm:
                ends[i] = b.x_end_mm
                out.append(i)
                break
        else:
            ends.append(b.x_end_mm)
            out.append(len(ends) - 1)
    return out


def _bar_rows(
    bars: Sequence[BarLine], length_mm: float
) -> tuple[list[tuple[BarLine, float]], float]:
    """(bar, y) for the bar diagram: top layer lanes above y = 0, bottom layer lanes below."""
    gap = 0.09 * length_mm  # room for the label
    rows: list[tuple[BarLine, float]] = []
    n_top = n_bot = 0
    for layer, sign in (("T1", 1.0), ("B1", -1.0)):
        group = sorted((b for b in bars if b.layer == layer), key=lambda b: b.x_start_mm)
        lanes = _lanes(group, gap)
        for b, lane in zip(group, lanes, strict=True):
            rows.append((b, sign * (lane + 1)))
        if layer == "T1":
            n_top = max(lanes, default=-1) + 1
        else:
            n_bot = max(lanes, default=-1) + 1
    return rows, float(max(n_top, n_bot, 1))


def _label_at(b: BarLine, x_lo: float, x_hi: float) -> tuple[float, str]:
    """Where a bar's label goes: centred on the bar, or flush with a bar end at the edges of
    the plot so it is not cut off (the label is about 11 % of the plot width)."""
    half = 0.055 * (x_hi - x_lo)
    mid = 0.5 * (b.x_start_mm + b.x_end_mm)
    if mid - half < x_lo:
        return max(b.x_start_mm, x_lo), "left"
    if mid + half > x_hi:
        return min(b.x_end_mm, x_hi), "right"
    return mid, "center"


def curtailment_svg(data: CurtailmentData, *, title: str, salt: str) -> str:
    """Shifted M_Ed against M_Rd of the bars provided, both faces on the tension side, and
    the principal bars with their marks below, cut-off points dotted through both."""
    matplotlib, Figure = _mpl()
    with matplotlib.rc_context(_RC):
        x_all = np.concatenate([data.x_top_mm, data.x_bottom_mm])
        length = float(np.max(x_all) - np.min(x_all)) or 1.0
        rows, n_lanes = _bar_rows(data.bars, length)
        fig = Figure(figsize=(FIG_WIDTH_IN, 3.4 + 0.32 * 2 * n_lanes))
        grid = fig.add_gridspec(2, 1, height_ratios=[3.0, 0.55 + 0.3 * 2 * n_lanes], hspace=0.08)
        ax = fig.add_subplot(grid[0])
        axb = fig.add_subplot(grid[1], sharex=ax)

        # Top face: hogging, drawn above the axis (negative values, y axis inverted).
        ax.fill_between(data.x_top_mm, -data.m_rd_top, 0.0, color=HOGGING, alpha=0.10, lw=0)
        ax.plot(
            data.x_top_mm,
            -data.m_rd_top,
            color=HOGGING,
            label=r"$M_\mathrm{Rd}$ top bars (above the axis)",
        )
        ax.plot(
            data.x_top_mm,
            -data.m_ed_top,
            color=SHIFTED,
            ls=(0, (5, 2)),
            label=r"$M_\mathrm{Ed}$ shifted by $a_l$ (9.2.1.3)",
        )
        ax.fill_between(data.x_bottom_mm, 0.0, data.m_rd_bottom, color=SAGGING, alpha=0.10, lw=0)
        ax.plot(
            data.x_bottom_mm,
            data.m_rd_bottom,
            color=SAGGING,
            label=r"$M_\mathrm{Rd}$ bottom bars (below)",
        )
        ax.plot(data.x_bottom_mm, data.m_ed_bottom, color=SHIFTED, ls=(0, (5, 2)))
        _supports(ax, data.supports)
        _finish(ax, x_all, "M (kNm/m), sagging +")
        ax.invert_yaxis()
        ax.margins(y=0.08)
        ax.set_xlabel("")
        ax.tick_params(labelbottom=False)
        _title_and_legend(fig, ax, title, tight=False)
        x_lo = float(np.min(x_all)) - 150.0
        x_hi = float(np.max(x_all)) + 150.0
        # The bars: T1 lanes above, B1 lanes below; cut-off points dotted through both axes.
        tick = 0.28
        for b, y in rows:
            colour = HOGGING if b.layer == "T1" else SAGGING
            axb.plot(
                [b.x_start_mm, b.x_end_mm], [y, y], color=colour, lw=1.6, solid_capstyle="butt"
            )
            down = -tick if y > 0 else tick  # legs turn towards the other face
            for at, leg in ((b.x_start_mm, b.leg_left), (b.x_end_mm, b.leg_right)):
                if leg:
                    axb.plot([at, at], [y, y + down], color=colour, lw=1.6)
                for a in (ax, axb):
                    a.axvline(at, color=colour, lw=0.45, ls=(0, (1, 2)), alpha=0.7, zorder=1)
            x_text, ha = _label_at(b, x_lo, x_hi)
            axb.text(
                x_text,
                y + 0.2,
                b.label,
                ha=ha,
                va="bottom",
                fontsize=6.3,
                color=colour,
            )
        _supports(axb, data.supports, labels=False)
        axb.axhline(0.0, color="black", lw=0.5)
        axb.set_ylim(-n_lanes - 0.7, n_lanes + 0.9)
        axb.set_yticks([n_lanes / 2 + 0.5, -n_lanes / 2 - 0.5], ["T1", "B1"])
        axb.tick_params(axis="y", length=0)
        _metres(axb)
        axb.set_xlabel("x along the strip (m); dotted: bar ends (cut-off points)")
        for s in ("top", "right", "left"):
            axb.spines[s].set_visible(False)
        fig.subplots_adjust(left=0.08, right=0.99, top=0.87, bottom=0.1)
    return _to_svg(fig, salt, title, matplotlib)
