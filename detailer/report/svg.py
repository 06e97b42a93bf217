"""A tiny SVG 1.1 builder for the report's plots: pens, text, numbers, ticks.

Pure string work, no dependencies beyond numpy. Output is byte-stable: coordinates are
written with at most one decimal (the plots are about 720 units wide, so 0.1 unit is far
below what a screen or a printer shows), attributes in a fixed order, and text escaped for
XML (``&``, ``<``, ``>`` and quotes; characters XML 1.0 forbids are dropped, other non-ASCII
text is kept as is, the page being UTF-8).

Text widths are estimated from the advance widths of DejaVu Sans, the report's first font
(``WIDTHS``: printable ASCII, in thousandths of an em; other characters count as 0.62 em),
so labels can be placed clear of each other without a font engine.
"""

from __future__ import annotations

__all__ = [
    "FONT_FAMILY",
    "Canvas",
    "Pen",
    "nice_step",
    "nice_ticks",
    "num",
    "num_fine",
    "points",
    "rich",
    "simplify",
    "text_width",
    "tick_label",
    "wrap",
    "xml_text",
]

import functools
import html
import math
import re
from collections.abc import Iterable
from dataclasses import dataclass

import numpy as np

#: Font stack of the plots (the report's own): DejaVu Sans first, as the widths below assume.
FONT_FAMILY = "DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif"

# Advance widths of DejaVu Sans (Book and Bold), characters 32-126, in 1/1000 em (from the
# font's metrics).
WIDTHS = (
    318, 401, 460, 838, 636, 950, 780, 275, 390, 390, 500, 838, 318, 361, 318, 337, 636, 636,
    636, 636, 636, 636, 636, 636, 636, 636, 337, 337, 838, 838, 838, 531, 1000, 684, 686, 698,
    770, 632, 575, 775, 752, 295, 295, 656, 557, 863, 748, 787, 603, 787, 695, 635, 611, 732,
    684, 989, 685, 611, 685, 390, 337, 390, 838, 500, 500, 613, 635, 550, 635, 615, 352, 635,
    634, 278, 278, 579, 278, 974, 634, 612, 635, 635, 411, 521, 392, 634, 592, 818, 592, 592,
    525, 636, 337, 636, 838,
)  # fmt: skip
WIDTHS_BOLD = (
    348, 456, 521, 838, 696, 1002, 872, 306, 457, 457, 523, 838, 380, 415, 380, 365, 696, 696,
    696, 696, 696, 696, 696, 696, 696, 696, 400, 400, 838, 838, 838, 580, 1000, 774, 762, 734,
    830, 683, 683, 821, 837, 372, 372, 775, 637, 995, 837, 850, 733, 850, 770, 720, 682, 812,
    774, 1103, 771, 724, 725, 457, 365, 457, 838, 500, 500, 675, 716, 593, 716, 678, 435, 716,
    712, 343, 343, 665, 343, 1042, 712, 687, 716, 716, 493, 595, 478, 712, 652, 924, 645, 652,
    582, 712, 365, 712, 838,
)  # fmt: skip
_OTHER = 620  # a character outside printable ASCII (accented letters are about this wide)
_WIDTHS_OTHER = {"\u2212": 838, "\u2013": 500, "\u2014": 1000, "\u221e": 833, "\u00b2": 401}
#: Subscripts are drawn at this fraction of the font size, lowered by ``SUB_SHIFT`` em.
SUB_SIZE = 0.72
SUB_SHIFT = 0.25

# Characters XML 1.0 does not allow (C0 controls but tab, newline and carriage return).
_BAD_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")
# "M_Ed", "V_Ed,max", "a_l": a letter, an underscore, the subscript.
_SUB = re.compile(r"([A-Za-z])_([A-Za-z0-9,]+)")


_SPECIAL = re.compile("[&<>\"']")


def xml_text(text: object) -> str:
    """``text`` escaped for SVG/XML text and attribute values."""
    s = text if isinstance(text, str) else str(text)
    if _BAD_XML.search(s):
        s = _BAD_XML.sub("", s)
    return html.escape(s, quote=True) if _SPECIAL.search(s) else s


def num(value: float) -> str:
    """A coordinate with at most one decimal, no trailing ``.0``, never ``-0``."""
    s = f"{value:.1f}".removesuffix(".0")
    return "0" if s == "-0" else s


@functools.lru_cache(maxsize=4096)
def _plain_width(text: str, size: float, bold: bool) -> float:
    table = WIDTHS_BOLD if bold else WIDTHS
    total = 0
    for ch in text:
        o = ord(ch)
        total += table[o - 32] if 32 <= o < 127 else _WIDTHS_OTHER.get(ch, _OTHER)
    return total * size / 1000.0


def _runs(text: str) -> list[tuple[str, bool]]:
    """``text`` as (run, is_subscript) pairs: ``M_Ed,max`` is M then Ed,max lowered."""
    out: list[tuple[str, bool]] = []
    pos = 0
    for m in _SUB.finditer(text):
        out.append((text[pos : m.start(2) - 1], False))
        out.append((m.group(2), True))
        pos = m.end()
    out.append((text[pos:], False))
    return [(r, sub) for r, sub in out if r]


def text_width(text: str, size: float, *, bold: bool = False, subscripts: bool = False) -> float:
    """Estimated width of ``text`` at font ``size`` (same units as the size)."""
    if not subscripts:
        return _plain_width(text, size, bold)
    return sum(_plain_width(r, size * SUB_SIZE if sub else size, bold) for r, sub in _runs(text))


def rich(text: str, size: float) -> str:
    """Escaped text with ``X_sub`` written as a lowered, smaller ``<tspan>`` (SVG 1.1 ``dy``)."""
    parts = []
    down = 0.0
    shift = SUB_SHIFT * size
    for run, sub in _runs(text):
        if sub:
            parts.append(f'<tspan font-size="{num(size * SUB_SIZE)}" dy="{num(shift)}">')
            parts.append(xml_text(run) + "</tspan>")
            down = shift
        elif down:
            parts.append(f'<tspan dy="{num(-down)}">{xml_text(run)}</tspan>')
            down = 0.0
        else:
            parts.append(xml_text(run))
    return "".join(parts)


def nice_step(span: float, target: int) -> float:
    """The step of 1, 2, 2.5 or 5 x 10^k giving about ``target`` intervals over ``span``."""
    if not math.isfinite(span) or span <= 0:
        return 1.0
    raw = span / max(target, 1)
    mag = 10.0 ** math.floor(math.log10(raw))
    for m in (1.0, 2.0, 2.5, 5.0, 10.0):
        if m * mag >= raw * (1.0 - 1e-9):
            return m * mag
    return 10.0 * mag  # pragma: no cover - the loop always returns


def nice_ticks(lo: float, hi: float, step: float) -> list[float]:
    """Multiples of ``step`` from the last one at or below ``lo`` to the first at or above
    ``hi`` (so the ticks cover the range), rounded to the step's decimals."""
    first = math.floor(lo / step + 1e-9)
    last = math.ceil(hi / step - 1e-9)
    digits = max(0, 2 - math.floor(math.log10(step)))
    return [round(i * step, digits) + 0.0 for i in range(first, last + 1)]


def tick_label(value: float, step: float) -> str:
    """A tick value with the decimals its step needs; negatives with a true minus sign."""
    decimals = 0
    while decimals < 6 and abs(step * 10**decimals - round(step * 10**decimals)) > 1e-9:
        decimals += 1
    s = f"{abs(value):.{decimals}f}"
    if value < 0 and float(s) != 0.0:
        return "\u2212" + s
    return s


#: Polylines of fewer points are drawn as they are (only straight runs thinned): thinning
#: them further would save little and cost more time than it saves.
SIMPLIFY_FROM = 400


def simplify(xy: np.ndarray, tol: float) -> np.ndarray:
    """Vertices of a polyline (``(n, 2)``, drawing units) with the points closer than ``tol``
    to the chord of their neighbours dropped (Douglas-Peucker); the ends are always kept and
    the drawn line moves by less than ``tol``.

    The intervals of one level of the recursion are split together (vectorised), which
    keeps the same points as the recursive form: each interval is split independently.
    """
    xy = _drop_collinear(xy)
    n = len(xy)
    if n <= SIMPLIFY_FROM:
        return xy
    x, y = xy[:, 0], xy[:, 1]
    keep = np.zeros(n, dtype=bool)
    keep[0] = keep[-1] = True
    while True:
        idx = np.flatnonzero(keep)
        pos = np.cumsum(keep) - 1  # interval of each point: the kept point at or before it
        pos[-1] = len(idx) - 2  # the last point closes the last interval
        a, b = idx[pos], idx[pos + 1]
        dx, dy = x[b] - x[a], y[b] - y[a]
        norm = np.hypot(dx, dy)
        cross = np.abs(dx * (y - y[a]) - dy * (x - x[a]))
        with np.errstate(divide="ignore", invalid="ignore"):
            dist = np.where(norm > 0.0, cross / norm, np.hypot(x - x[a], y - y[a]))
        dist[keep] = 0.0
        peak = np.maximum.reduceat(dist, idx[:-1])
        split = (dist > tol) & (dist == peak[pos])
        if not split.any():
            return xy[keep]
        where = np.flatnonzero(split)
        group = pos[where]
        first = np.ones(len(where), dtype=bool)  # the first maximum of each interval
        first[1:] = group[1:] != group[:-1]
        keep[where[first]] = True


def _drop_collinear(xy: np.ndarray) -> np.ndarray:
    """``xy`` without the points that lie on the line through their neighbours (to 1e-9
    units: only straight runs, such as a constant resistance, go; cheap and exact enough to
    leave nothing for the eye)."""
    if len(xy) <= 2:
        return xy
    repeat = np.zeros(len(xy), dtype=bool)
    repeat[1:] = np.all(xy[1:] == xy[:-1], axis=1)
    xy = xy[~repeat]
    if len(xy) <= 2:
        return xy
    d1 = xy[1:-1] - xy[:-2]
    d2 = xy[2:] - xy[1:-1]
    cross = np.abs(d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0])
    forward = d1[:, 0] * d2[:, 0] + d1[:, 1] * d2[:, 1] >= 0.0  # not turning back
    keep = np.ones(len(xy), dtype=bool)
    keep[1:-1] = ~((cross <= 1e-9 * np.hypot(d2[:, 0], d2[:, 1])) & forward)
    return xy[keep]


_DOT_ZERO = re.compile(r"\.0(?=[ ,]|$)")


def points(xy: np.ndarray) -> str:
    """``x,y x,y ...`` for a ``points`` attribute, one decimal (``.0`` left off); a vertex
    equal to the one before it is written once."""
    if len(xy) == 0:
        return ""
    if len(xy) < 16:  # a few points: plain Python is quicker than numpy's set-up
        out: list[str] = []
        for x, y in np.asarray(xy, dtype=float).tolist():
            p = f"{num(x)},{num(y)}"
            if not out or out[-1] != p:
                out.append(p)
        return " ".join(out)
    q = np.round(np.asarray(xy, dtype=float), 1) + 0.0  # + 0.0: no "-0.0"
    same = np.zeros(len(q), dtype=bool)
    same[1:] = np.all(q[1:] == q[:-1], axis=1)
    text = " ".join([f"{x:.1f},{y:.1f}" for x, y in q[~same].tolist()])
    return _DOT_ZERO.sub("", text)


@dataclass(frozen=True, slots=True)
class Pen:
    """How a line is stroked (report rendering only)."""

    colour: str
    width: float = 1.0
    dash: str = ""  # SVG stroke-dasharray, e.g. "4 3"; "" for a solid line
    opacity: float = 1.0
    cap: str = ""  # stroke-linecap when not the default (butt)

    def attrs(self) -> str:
        """The stroke attributes (``stroke="#..." stroke-width="..."`` ...)."""
        return _pen_attrs(self)


@functools.lru_cache(maxsize=256)
def _pen_attrs(pen: Pen) -> str:
    s = f'stroke="{xml_text(pen.colour)}" stroke-width="{num_fine(pen.width)}"'
    if pen.dash:
        s += f' stroke-dasharray="{xml_text(pen.dash)}"'
    if pen.opacity != 1.0:
        s += f' stroke-opacity="{num_fine(pen.opacity)}"'
    if pen.cap:
        s += f' stroke-linecap="{xml_text(pen.cap)}"'
    return s


def num_fine(value: float) -> str:
    """A width or an opacity: up to two decimals."""
    s = f"{value:.2f}".rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s


class Canvas:
    """Collects SVG elements as text; :meth:`svg` closes them into one ``<svg>`` element."""

    __slots__ = ("_parts", "height", "width")

    def __init__(self, width: float, height: float) -> None:
        self.width = width
        self.height = height
        self._parts: list[str] = []

    def add(self, markup: str) -> None:
        self._parts.append(markup)

    def open(self, pen: Pen | None = None, **attrs: object) -> None:
        """A group; its ``pen`` strokes the lines inside that have none of their own."""
        stroke = f" {pen.attrs()}" if pen is not None else ""
        self._parts.append(f"<g{_attrs(attrs)}{stroke}>")

    def close(self) -> None:
        self._parts.append("</g>")

    def line(
        self, x1: float, y1: float, x2: float, y2: float, pen: Pen | None = None, **attrs: object
    ) -> None:
        """A line; without ``pen`` it is stroked as its group says."""
        stroke = f" {pen.attrs()}" if pen is not None else ""
        self._parts.append(
            f'<line x1="{num(x1)}" y1="{num(y1)}" x2="{num(x2)}" y2="{num(y2)}"'
            f"{stroke}{_attrs(attrs)}/>"
        )

    def path(
        self,
        segments: Iterable[tuple[float, float, float, float]],
        pen: Pen | None = None,
        **attrs: object,
    ) -> None:
        """Straight segments ``(x1, y1, x2, y2)`` as one ``<path>`` (vertical and horizontal
        ones written with ``V``/``H``); without ``pen`` it is stroked as its group says."""
        d = []
        for x1, y1, x2, y2 in segments:
            start = f"M{num(x1)} {num(y1)}"
            if x1 == x2:
                d.append(f"{start}V{num(y2)}")
            elif y1 == y2:
                d.append(f"{start}H{num(x2)}")
            else:
                d.append(f"{start}L{num(x2)} {num(y2)}")
        if not d:
            return
        stroke = f" {pen.attrs()}" if pen is not None else ""
        self._parts.append(f'<path{_attrs(attrs)} d="{"".join(d)}" fill="none"{stroke}/>')

    def polyline(self, xy: np.ndarray, pen: Pen, **attrs: object) -> None:
        self._parts.append(
            f'<polyline{_attrs(attrs)} points="{points(xy)}" fill="none" {pen.attrs()}'
            ' stroke-linejoin="round"/>'
        )

    def polygon(self, xy: np.ndarray, fill: str, opacity: float = 1.0, **attrs: object) -> None:
        op = f' fill-opacity="{num_fine(opacity)}"' if opacity != 1.0 else ""
        self._parts.append(
            f'<polygon points="{points(xy)}" fill="{fill}"{op} stroke="none"{_attrs(attrs)}/>'
        )

    def rect(
        self,
        x: float,
        y: float,
        w: float,
        h: float,
        fill: str,
        opacity: float = 1.0,
        **attrs: object,
    ) -> None:
        op = f' fill-opacity="{num_fine(opacity)}"' if opacity != 1.0 else ""
        self._parts.append(
            f'<rect x="{num(x)}" y="{num(y)}" width="{num(w)}" height="{num(h)}" '
            f'fill="{fill}"{op}{_attrs(attrs)}/>'
        )

    def text(
        self,
        x: float,
        y: float,
        text: str,
        *,
        size: float,
        anchor: str = "start",
        bold: bool = False,
        colour: str = "",
        subscripts: bool = False,
        rotate: bool = False,
        **attrs: object,
    ) -> None:
        """Text with its baseline at ``y``; ``rotate`` turns it to read upwards about (x, y)."""
        where = (
            f'transform="translate({num(x)},{num(y)}) rotate(-90)"'
            if rotate
            else f'x="{num(x)}" y="{num(y)}"'
        )
        style = f' font-size="{num(size)}"'
        if anchor != "start":
            style += f' text-anchor="{anchor}"'
        if bold:
            style += ' font-weight="bold"'
        if colour:
            style += f' fill="{colour}"'
        body = rich(text, size) if subscripts else xml_text(text)
        self._parts.append(f"<text {where}{style}{_attrs(attrs)}>{body}</text>")

    def svg(self, *, title: str, desc: str = "", **attrs: object) -> str:
        """The finished element for inline use in HTML (no XML prolog)."""
        w, h = num(self.width), num(self.height)
        head = (
            f'<svg xmlns="http://www.w3.org/2000/svg" version="1.1"{_attrs(attrs)} role="img" '
            f'aria-label="{xml_text(title)}" width="{w}" height="{h}" viewBox="0 0 {w} {h}" '
            f'font-family="{FONT_FAMILY}" font-size="10" fill="#111111">'
        )
        meta = f"<title>{xml_text(title)}</title>"
        if desc:
            meta += f"<desc>{xml_text(desc)}</desc>"
        return head + meta + "\n" + "\n".join(self._parts) + "\n</svg>\n"


def _attrs(attrs: dict[str, object]) -> str:
    """Extra attributes in the order given: ``cls`` is ``class``, ``data_x`` is ``data-x``."""
    if not attrs:
        return ""
    out = []
    for key, value in attrs.items():
        if value is None:
            continue
        name = "class" if key == "cls" else key.replace("_", "-")
        out.append(f' {name}="{xml_text(value)}"')
    return "".join(out)


def wrap(text: str, size: float, width: float, *, bold: bool = False) -> list[str]:
    """``text`` broken at spaces into lines no wider than ``width`` (a long word stays whole)."""
    lines: list[str] = []
    line = ""
    for word in text.split(" "):
        trial = f"{line} {word}" if line else word
        if line and text_width(trial, size, bold=bold) > width:
            lines.append(line)
            line = word
        else:
            line = trial
    lines.append(line)
    return lines
