"""Pure GA geometry (no DXF): invariants of ``arrange`` and comparisons with shapely.

Sources: shapely 2 is the reference library for lengths of a line inside a polygon
(``LineString.intersection(Polygon).length``); the invariants (a drawn line only places the
strip, the drawing direction does not matter, a translation moves nothing along the strip,
two parallel lines bound the same wall as a closed polyline) are the documented rules of
``detailer.io.ga_geometry`` and common CAD practice. Results are rounded to 0.001 mm by
design, hence the 1e-3 mm tolerances.
"""

from __future__ import annotations

import dataclasses
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import LineString, Polygon

from detailer.io.ga_geometry import arrange
from detailer.io.ga_model import (
    DrawnGA,
    DrawnLine,
    DrawnPolyline,
    DrawnText,
    GALayers,
    GAStrip,
    GAStripError,
)


def rect(x0, y0, x1, y1):
    return ((x0, y0), (x1, y0), (x1, y1), (x0, y1))


WALLS_X = (0.0, 4200.0, 9800.0)  # centres; 300 mm wide; from quayside-terrace.yaml S1 spans
OUTLINE = rect(-150, 0, 11300, 6000)


def drawn(
    *,
    outline=OUTLINE,
    line=((500.0, 3000.0), (9000.0, 3000.0)),
    text_at=(2000.0, 3300.0),
    walls_as_lines=False,
) -> DrawnGA:
    support_lines, support_outlines = [], []
    for i, x in enumerate(WALLS_X):
        if walls_as_lines:
            support_lines += [
                DrawnLine(f"L{i}a", (x - 150, -100), (x - 150, 6100)),
                DrawnLine(f"L{i}b", (x + 150, 6100), (x + 150, -100)),
            ]
        else:
            support_outlines.append(
                DrawnPolyline(f"W{i}", rect(x - 150, -100, x + 150, 6100), True)
            )
    return DrawnGA(
        file="ga.dxf",
        layers=GALayers(),
        mm_per_unit=1.0,
        outlines=(DrawnPolyline("O", tuple(outline), True),),
        support_lines=tuple(support_lines),
        support_outlines=tuple(support_outlines),
        strip_lines=(DrawnLine("S", *line),),
        strip_bands=(),
        strip_texts=(DrawnText("T", "S1", text_at),),
    )


def only(ga: DrawnGA) -> GAStrip:
    (strip,) = arrange(ga)
    return strip


def along(strip: GAStrip) -> tuple:
    """Everything measured along the strip (not the drawing coordinates)."""
    return (
        tuple((round(s.x_mm, 6), round(s.width_mm, 6)) for s in strip.supports),
        round(strip.left_cantilever_mm, 6),
        round(strip.right_cantilever_mm, 6),
        round(strip.left_edge_x_mm, 6),
        round(strip.right_edge_x_mm, 6),
    )


def test_base_layout_reads_as_drawn():
    """Spans 4200 and 5600 (sample S1), 1500 mm right cantilever past the 300 mm wall."""
    strip = only(drawn())
    assert strip.spans_mm == pytest.approx((4200.0, 5600.0), abs=1e-3)
    assert [s.width_mm for s in strip.supports] == pytest.approx([300.0] * 3, abs=1e-3)
    assert strip.right_cantilever_mm == pytest.approx(1500.0, abs=1e-3)
    assert strip.left_cantilever_mm == 0.0


@settings(max_examples=25, deadline=None)
@given(
    a=st.floats(-100.0, 5000.0),
    length=st.floats(10.0, 6000.0),
    reverse=st.booleans(),
    v=st.floats(100.0, 5900.0),
)
def test_the_drawn_line_only_places_the_strip(a, length, reverse, v):
    """Documented rule: any piece of the axis line on the slab, drawn either way, is the same
    strip."""
    p, q = (a, v), (a + length, v)
    line = (q, p) if reverse else (p, q)
    strip = only(drawn(line=line, text_at=(a + length / 2, v + 200.0)))
    assert along(strip) == along(only(drawn()))


@settings(max_examples=25, deadline=None)
@given(dx=st.floats(-1.0e6, 1.0e6), dy=st.floats(-1.0e6, 1.0e6))
def test_translation_moves_only_the_drawing_points(dx, dy):
    """A rigid translation changes no length (geometry); origin and ends move by (dx, dy)."""
    base = only(drawn())

    def sh(p):
        return (p[0] + dx, p[1] + dy)

    ga = drawn(outline=[sh(p) for p in OUTLINE])
    ga = dataclasses.replace(
        ga,
        support_outlines=tuple(
            DrawnPolyline(s.handle, tuple(sh(p) for p in s.points_mm), True)
            for s in ga.support_outlines
        ),
        strip_lines=(DrawnLine("S", sh((500.0, 3000.0)), sh((9000.0, 3000.0))),),
        strip_texts=(DrawnText("T", "S1", sh((2000.0, 3300.0))),),
    )
    moved = only(ga)
    got = (s.x_mm for s in moved.supports)
    assert list(got) == pytest.approx([s.x_mm for s in base.supports], abs=1e-3)
    assert moved.right_cantilever_mm == pytest.approx(base.right_cantilever_mm, abs=1e-3)
    assert moved.origin_mm == pytest.approx(sh(base.origin_mm), abs=1e-3)


def test_parallel_lines_bound_the_same_wall_as_a_polyline():
    """Common practice: a wall drawn as its two faces is the wall drawn as a rectangle."""
    as_lines = only(drawn(walls_as_lines=True))
    assert along(as_lines) == along(only(drawn()))
    assert [s.handle for s in as_lines.supports] == ["L0a+L0b", "L1a+L1b", "L2a+L2b"]


@settings(max_examples=25, deadline=None)
@given(
    right=st.lists(st.floats(10400.0, 14000.0), min_size=2, max_size=2),
    v=st.floats(500.0, 5500.0),
)
def test_slab_chord_matches_shapely(right, v):
    """A slab with a sloping right edge: edge-to-edge length along the strip equals shapely's
    length of a long line inside the outline."""
    outline = ((-150.0, 0.0), (right[0], 0.0), (right[1], 6000.0), (-150.0, 6000.0))
    strip = only(drawn(outline=outline, line=((500.0, v), (9000.0, v)), text_at=(2000, v + 200)))
    reference = LineString([(-1.0e5, v), (1.0e5, v)]).intersection(Polygon(outline)).length
    assert strip.right_edge_x_mm - strip.left_edge_x_mm == pytest.approx(reference, abs=1e-3)
    edge_x = right[0] + (right[1] - right[0]) * v / 6000.0  # the sloping edge at height v
    assert strip.right_cantilever_mm == pytest.approx(edge_x - WALLS_X[-1], abs=1e-3)


def test_inclined_strip_matches_shapely_support_lengths():
    """A strip at 20 degrees over square walls: widths are shapely's lengths of the axis inside
    each wall; the origin sits at the first wall's centre."""
    theta = math.radians(20)
    p = (100.0, 1500.0)
    q = (p[0] + 9000 * math.cos(theta), p[1] + 9000 * math.sin(theta))
    outline = rect(-150, -2000, 11300, 9000)
    ga = dataclasses.replace(
        drawn(outline=outline, line=(p, q), text_at=(2000, 2500)),
        support_outlines=tuple(
            DrawnPolyline(f"W{i}", rect(x - 150, -2100, x + 150, 9100), True)
            for i, x in enumerate(WALLS_X)
        ),
    )
    strip = only(ga)
    axis = LineString([strip.axis_start_mm, strip.axis_end_mm])
    for s, x in zip(strip.supports, WALLS_X, strict=True):
        wall = Polygon(rect(x - 150, -2100, x + 150, 9100))
        assert s.width_mm == pytest.approx(axis.intersection(wall).length, abs=1e-3)
        assert s.width_mm == pytest.approx(300.0 / math.cos(theta), abs=1e-3)
    assert strip.spans_mm == pytest.approx((4200 / math.cos(theta), 5600 / math.cos(theta)))


def test_band_axis_and_width_from_its_rectangle():
    """shapely's minimum rotated rectangle of a 9000 x 2400 band: axis along 9000, width 2400."""
    band = DrawnPolyline("B", rect(-150, 1800, 11300, 4200), True)
    ga = dataclasses.replace(drawn(), strip_lines=(), strip_bands=(band,))
    strip = only(ga)
    assert strip.panel_width_mm == pytest.approx(2400.0, abs=1e-3)
    assert strip.axis_start_mm == pytest.approx((-150.0, 3000.0), abs=1e-3)
    assert strip.spans_mm == pytest.approx((4200.0, 5600.0), abs=1e-3)


def test_messages_quote_points_in_drawing_units():
    """Coordinates in messages are in the drawing's own units (m here), as CAD shows them: a
    U-shaped slab's gap at (5000, 4000) mm is quoted as (5, 4)."""
    u_shape = ((-150, 0), (11300, 0), (11300, 6000), (6000, 6000), (6000, 2000), (4000, 2000),
               (4000, 6000), (-150, 6000))  # fmt: skip
    ga = dataclasses.replace(
        drawn(outline=u_shape, line=((500.0, 4000.0), (9000.0, 4000.0)), text_at=(2000, 4300)),
        mm_per_unit=1000.0,
    )
    with pytest.raises(GAStripError, match=r"gap in the slab outline near \(5, 4\)"):
        arrange(ga)
