"""Geometry behind the drawing: bar centre lines against BS 8666 lengths, and annotation packing.

Sources:
* BS 8666:2005 standard shapes (reproduced in /work/shared/reference/standards.md 1.1): shape 11
  L = A + B - 0.5r - d, shape 21 L = A + B + C - r - 2d, with r from Table 2 (1.2 there);
* the centre line of a 90 degree bend of centre-line radius R = r + d/2 is a quarter circle,
  pi R / 2 long, replacing 2R of the two tangent legs (plane geometry);
* packing rules are our own drawing rules (no overlapping texts, no leader through a text).
"""

from __future__ import annotations

import itertools
import math

from dxf_fixtures import sample_detail
from hypothesis import assume, given, settings
from hypothesis import strategies as hs

from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import DimTarget, developed_length_mm, fillet
from detailer.io.dxf_packing import LabelSpec, pack_dimensions, pack_labels
from detailer.io.dxf_sheet import A1, A2, choose_sheet
from detailer.shapes.table2 import TABLE_2

SIZES = sorted(TABLE_2)
PAPER = st.PaperSizes()


@settings(max_examples=60, deadline=None)
@given(hs.sampled_from(SIZES), hs.integers(400, 6000), hs.integers(150, 800))
def test_l_bar_centre_line_is_as_long_as_bs8666_shape_11(phi, a, b):
    r = TABLE_2[phi].r_mm
    assume(b >= TABLE_2[phi].p_mm)  # a leg shorter than P (Table 2) is not bent
    # outer faces at x = 0 (the leg) and y = phi/2 (the run); the leg's end B below the top
    corners = [(phi / 2, phi / 2 - b), (phi / 2, 0.0), (float(a), 0.0)]
    length = developed_length_mm(fillet(corners, r + phi / 2))
    big_r = r + phi / 2
    assert math.isclose(length, a + b - phi - 2 * big_r + math.pi * big_r / 2, abs_tol=1e-6)
    assert abs(length - (a + b - 0.5 * r - phi)) <= 0.1 * phi


@settings(max_examples=60, deadline=None)
@given(hs.sampled_from(SIZES), hs.integers(300, 1500), hs.integers(150, 600))
def test_u_bar_centre_line_is_as_long_as_bs8666_shape_21(phi, leg, height):
    r = TABLE_2[phi].r_mm
    big_r = r + phi / 2
    assume(height >= 2 * (r + phi) + 4 * phi)  # BS 8666 Fig. 6 minimum between two bends
    assume(leg >= TABLE_2[phi].p_mm)
    top, bottom = height - phi / 2, phi / 2  # centre lines of the two legs
    corners = [(0.0, top), (leg - phi / 2, top), (leg - phi / 2, bottom), (0.0, bottom)]
    length = developed_length_mm(fillet(corners, big_r))
    assert math.isclose(
        length, 2 * leg + height - 2 * phi - 4 * big_r + math.pi * big_r, abs_tol=1e-6
    )
    assert abs(length - (leg + height + leg - r - 2 * phi)) <= 0.15 * phi


def _boxes(packed):
    out = []
    for t in packed.texts:
        w = len(t.text) * st.CHAR_WIDTH_FACTOR * t.height
        x0 = t.x - w if t.align.endswith("RIGHT") else t.x
        out.append((x0, t.y - t.height / 2, x0 + w, t.y + t.height / 2))
    return out


labels_strategy = hs.lists(
    hs.tuples(hs.floats(0, 20000), hs.floats(200, 6000), hs.integers(8, 18)),
    min_size=1,
    max_size=14,
)


@settings(max_examples=40, deadline=None)
@given(labels_strategy, hs.sampled_from([20, 50, 100]))
def test_packed_callouts_never_overlap_and_leaders_cross_no_text(specs, s):
    labels = []
    for i, (x0, run, n) in enumerate(specs):
        h = PAPER.text_mm * s
        text = "X" * n
        cands = tuple((x0 + f * run, 100.0) for f in (0.4, 0.55, 0.25, 0.7, 0.15, 0.85))
        labels.append(
            LabelSpec("top", text, cands, len(text) * st.CHAR_WIDTH_FACTOR * h, h, (("i", str(i)),))
        )
    dims = pack_dimensions([], s, 225.0, +1, PAPER)
    packed = pack_labels(labels, 1000.0, +1, s, dims, PAPER)
    boxes = _boxes(packed)
    assert len(boxes) == len(labels)
    for i, a in enumerate(boxes):
        for b in boxes[i + 1 :]:
            overlap = a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]
            assert not overlap
    crossings = 0
    for leader in packed.leaders:
        (x, y0, _), (_, y1, _), _ = leader.points
        for box in boxes:
            if box[3] < min(y0, y1) or abs((box[1] + box[3]) / 2 - y1) < 1e-6:
                continue  # below the anchor, or in the leader's own row (it ends at its landing)
            if box[1] < y1 and box[0] < x < box[2]:
                crossings += 1
    # a leader crosses a text only where the packer had to give up on a callout
    assert crossings == 0 or packed.crowded > 0
    if len({round(c[0] / (60.0 * s)) for c in specs}) == len(specs) and all(
        abs(a[0] - b[0]) > 60.0 * s for i, a in enumerate(specs) for b in specs[i + 1 :]
    ):
        assert packed.crowded == 0  # well spread callouts always pack cleanly


@settings(max_examples=40, deadline=None)
@given(
    hs.lists(hs.tuples(hs.floats(0, 20000), hs.floats(50, 3000)), min_size=1, max_size=12),
    hs.sampled_from([25, 50, 100]),
)
def test_packed_dimensions_in_one_row_never_overlap(spans, s):
    targets = [DimTarget("curtailment", "top", x, x + d, str(i)) for i, (x, d) in enumerate(spans)]
    packed = pack_dimensions(targets, s, 0.0, +1, PAPER)
    rows: dict[float, list[tuple[float, float]]] = {}
    for pd, (ta, tb) in zip(packed.dims, packed.text_spans, strict=True):
        t = pd.target
        lo, hi = min(t.x_from_mm, t.x_to_mm, ta), max(t.x_from_mm, t.x_to_mm, tb)
        rows.setdefault(round(pd.y, 6), []).append((lo, hi))
    for row in rows.values():
        row.sort()
        for (a0, a1), (b0, b1) in itertools.pairwise(row):
            assert a1 <= b0 + 1e-6


def test_sheet_and_scale_for_the_sample():
    """Regression values computed by the project: S1 (21.15 m) does not fit A2 at 1:50 and
    goes to A1 at 1:50; S2 (9.2 m) fits A2 at 1:50. Cross-sections at 1:10."""
    detail = sample_detail()
    got = [choose_sheet(detail.project, sd) for sd in detail.strips]
    assert [(g.sheet, g.plan.scale, g.plan.detail_scale) for g in got] == [
        (A1, 50, 10),
        (A2, 50, 10),
    ]


def test_sample_callouts_pack_cleanly():
    """Every callout of the sample and of the alternate-bars strip finds a clean place."""
    from dxf_fixtures import alternate_detail

    for detail in (sample_detail(), alternate_detail()):
        for sd in detail.strips:
            plan = choose_sheet(detail.project, sd).plan
            assert plan.main.crowded == 0, sd.strip.id
