"""Row packing of callouts and dimensions, so that annotation never overlaps.

Pure. Widths of texts are estimated from the character count (``dxf_style.CHAR_WIDTH_FACTOR``,
slightly generous), so a packed row leaves real space between its texts.

* Dimensions of one face are stacked in rows next to the concrete: a row takes a dimension
  when its extent (with its text, placed beside it when the dimension is too short to hold it)
  clears every other in the row.
* Callouts sit in rows beyond the dimensions, each text to the right of a vertical leader
  from its bar. A callout takes the nearest row and the first of its anchor candidates where
  its text clears the row, its leader crosses no text nearer the concrete and no dimension
  text, and no leader from a farther row crosses its text.
* A callout with a revision marker (:mod:`detailer.io.dxf_revision`) is packed with the
  marker's room added beyond its text, so the marker clears the row too.
"""

from __future__ import annotations

__all__ = [
    "LabelSpec",
    "PackedDim",
    "PackedDims",
    "PackedLabels",
    "pack_dimensions",
    "pack_labels",
    "text_width",
]

from collections.abc import Sequence
from dataclasses import dataclass, field

from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import DimTarget, Dot, Fields, Poly, Text
from detailer.io.dxf_revision import marker_primitives, marker_width_mm

MAX_ROWS = 40


def text_width(text: str, height: float) -> float:
    """Estimated width of a single-line text of ``height`` (model units)."""
    return len(text) * st.CHAR_WIDTH_FACTOR * height


@dataclass(frozen=True, slots=True)
class PackedDim:
    target: DimTarget
    y: float  # level of the dimension line
    text_at: tuple[float, float] | None  # set when the text sits beside a short dimension


@dataclass(frozen=True, slots=True)
class PackedDims:
    dims: tuple[PackedDim, ...]
    edge: float  # the outermost level used (beyond it the callouts start)
    text_spans: tuple[tuple[float, float], ...]  # x ranges of the dimension texts


def pack_dimensions(
    targets: Sequence[DimTarget], s: int, base_y: float, direction: int, paper: st.PaperSizes
) -> PackedDims:
    """Stack ``targets`` in rows from ``base_y`` outwards (``direction`` +1 up, -1 down)."""
    th = paper.text_mm * s
    rows: list[list[tuple[float, float]]] = []
    placed: list[tuple[DimTarget, int, tuple[float, float] | None, tuple[float, float]]] = []
    for t in sorted(targets, key=lambda t: (min(t.x_from_mm, t.x_to_mm), t.x_to_mm)):
        xa, xb = min(t.x_from_mm, t.x_to_mm), max(t.x_from_mm, t.x_to_mm)
        tw = text_width(f"{t.value_mm:.0f}", th)
        if xb - xa >= tw + 2.0 * (paper.arrow_mm + 1.0) * s:
            span = (xa, xb)
            text_c = 0.5 * (xa + xb)
            beside = False
        elif t.x_to_mm >= t.x_from_mm:  # text beyond the bar end
            text_c = xb + 1.5 * s + tw / 2
            span, beside = (xa, xb + 3.0 * s + tw), True
        else:
            text_c = xa - 1.5 * s - tw / 2
            span, beside = (xa - 3.0 * s - tw, xb), True
        row = _first_free(rows, span, 2.0 * s)
        placed.append(
            (t, row, (text_c, 0.0) if beside else None, (text_c - tw / 2, text_c + tw / 2))
        )
    out = []
    spans = []
    for t, row, at, tspan in placed:
        y = base_y + direction * (8.0 + 7.0 * row) * s
        text_at = None if at is None else (at[0], y + (1.0 + paper.text_mm / 2) * s)
        out.append(PackedDim(t, y, text_at))
        spans.append(tspan)
    if not rows:
        return PackedDims((), base_y, ())
    last = base_y + direction * (8.0 + 7.0 * (len(rows) - 1)) * s
    edge = last + (1.5 + paper.text_mm) * s if direction > 0 else last - 2.0 * s
    return PackedDims(tuple(out), edge, tuple(spans))


def _first_free(
    rows: list[list[tuple[float, float]]], span: tuple[float, float], gap: float
) -> int:
    for i, row in enumerate(rows):
        if all(span[1] + gap <= a or b + gap <= span[0] for a, b in row):
            row.append(span)
            return i
    rows.append([span])
    return len(rows) - 1


@dataclass(frozen=True, slots=True)
class LabelSpec:
    """A callout to place: its text, and candidate anchor points on its bar."""

    face: str
    text: str
    candidates: tuple[tuple[float, float], ...]
    width: float
    height: float
    xdata: Fields = ()
    marker: str = ""  # revision letter of a marker beside the text, "" for none
    marker_xdata: Fields = ()

    def room(self, s: int) -> float:
        """Width of the text and its marker, model mm at 1:``s``."""
        return self.width + marker_width_mm(self.marker) * s


@dataclass(slots=True)
class PackedLabels:
    leaders: list[Poly] = field(default_factory=list)
    ticks: list[Dot] = field(default_factory=list)
    texts: list[Text] = field(default_factory=list)
    edge: float = 0.0
    crowded: int = 0  # callouts that could not be placed without breaking a rule


def pack_labels(
    labels: Sequence[LabelSpec],
    y_base: float,
    direction: int,
    s: int,
    dims: PackedDims,
    paper: st.PaperSizes,
) -> PackedLabels:
    """Place callouts in rows from ``y_base`` outwards; leaders drop to their anchors.

    Callouts with the fewest places to go (short bars) are placed first; when one cannot be
    placed cleanly it is moved to the front and the rows are packed again (a few times).
    """

    def reach(i: int) -> float:
        xs = [c[0] for c in labels[i].candidates]
        return max(xs) - min(xs)

    order = sorted(
        range(len(labels)), key=lambda i: (reach(i), labels[i].candidates[0][0], labels[i].text)
    )
    best: tuple[list, list[int]] | None = None
    for _ in range(len(labels) + 1):
        placed, failed = _place(labels, order, s, dims)
        if best is None or len(failed) < len(best[1]):
            best = (placed, failed)
        if not failed:
            break
        order.remove(failed[0])
        order.insert(0, failed[0])
    assert best is not None
    placed, failed = best
    pitch = ROW_PITCH_MM * s
    land, gap = LANDING_MM * s, GAP_MM * s
    lay = st.LABEL_LAYER.name
    result = PackedLabels(edge=y_base, crowded=len(failed))
    for i, row, x, y, right in placed:
        lab = labels[i]
        yr = y_base + direction * row * pitch
        end = x + land if right else x - land
        result.leaders.append(Poly(lay, ((x, y, 0.0), (x, yr, 0.0), (end, yr, 0.0))))
        result.ticks.append(Dot(lay, x, y, 0.8 * s))
        tx = end + gap if right else end - gap
        result.texts.append(
            Text(
                lay,
                lab.text,
                tx,
                yr,
                lab.height,
                "MIDDLE_LEFT" if right else "MIDDLE_RIGHT",
                lab.xdata,
            )
        )
        if lab.marker:
            far = tx + lab.width if right else tx - lab.width
            tri, letter = marker_primitives(
                lab.marker, far, yr, 1 if right else -1, s, lab.marker_xdata
            )
            result.leaders.append(tri)
            result.texts.append(letter)
    if placed:
        top = max(p[1] for p in placed)
        result.edge = y_base + direction * (top * pitch + 0.5 * paper.text_mm * s + s)
    return result


ROW_PITCH_MM = 6.0
LANDING_MM = 2.0
GAP_MM = 1.0


def _place(labels: Sequence[LabelSpec], order: Sequence[int], s: int, dims: PackedDims):
    """One greedy packing in ``order``: [(index, row, x, y, text_right)], [indices that broke
    a rule]."""
    land, gap, clear = LANDING_MM * s, GAP_MM * s, 1.0 * s
    rows: dict[int, list[tuple[float, float]]] = {}
    leaders: list[tuple[float, int]] = []  # (x, row)
    obstacles = [(a - clear, b + clear) for a, b in dims.text_spans]
    placed, failed = [], []

    def span(lab: LabelSpec, x: float, right: bool) -> tuple[float, float]:
        if right:
            return (x - clear, x + land + gap + lab.room(s) + clear)
        return (x - land - gap - lab.room(s) - clear, x + clear)

    for i in order:
        lab = labels[i]
        choice = None
        for row in range(MAX_ROWS):
            for x, y in lab.candidates:
                for right in (True, False):
                    sp = span(lab, x, right)
                    if _fits(sp, x, row, rows, leaders, obstacles, 1.5 * s):
                        choice = (row, x, y, right, sp)
                        break
                if choice:
                    break
            if choice:
                break
        if choice is None:  # crowded beyond reason: a new outer row, fewest clashes
            row = max(rows, default=-1) + 1
            x, y = min(
                lab.candidates,
                key=lambda c: _clashes(
                    span(lab, c[0], True), c[0], row, rows, leaders, obstacles, 1.5 * s
                ),
            )
            choice = (row, x, y, True, span(lab, x, True))
            failed.append(i)
        row, x, y, right, sp = choice
        rows.setdefault(row, []).append(sp)
        leaders.append((x, row))
        placed.append((i, row, x, y, right))
    return placed, failed


def _fits(span, x, row, rows, leaders, obstacles, leader_gap) -> bool:
    """True when a callout at ``x`` in ``row`` breaks no rule (see :func:`_clashes`)."""
    for a, b in rows.get(row, ()):
        if not (span[1] <= a or b <= span[0]):
            return False
    for q in range(row):
        for a, b in rows.get(q, ()):
            if a <= x <= b:
                return False
    for lx, lrow in leaders:
        if (lrow > row and span[0] <= lx <= span[1]) or abs(lx - x) < leader_gap:
            return False
    return not any(a <= x <= b for a, b in obstacles)


def _clashes(span, x, row, rows, leaders, obstacles, leader_gap) -> int:
    """How many rules a callout at ``x`` in ``row`` breaks (0: it may go there)."""
    n = sum(1 for a, b in rows.get(row, ()) if not (span[1] <= a or b <= span[0]))
    for q in range(row):  # the leader crosses every nearer row
        n += sum(1 for a, b in rows.get(q, ()) if a <= x <= b)
    for lx, lrow in leaders:
        n += lrow > row and span[0] <= lx <= span[1]
        n += abs(lx - x) < leader_gap
    return n + sum(1 for a, b in obstacles if a <= x <= b)
