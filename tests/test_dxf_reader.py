"""Reading strip geometry from a general arrangement DXF drawn by the test itself.

The reference for every check is the drawing's own construction: the test lays out a strip
(spans, support widths, cantilevers, panel width) in its own (u, v) frame, rotates and shifts
it, writes it with ezdxf and reads it back. Closed forms used: a rotation keeps lengths; a
support crossed at angle phi off square is w / cos(phi) long along the strip; a circular
slab edge of radius R lies sqrt(R^2 - v^2) beyond its centre at offset v (elementary
geometry). CAD conventions (closed polylines for outlines, two parallel lines for a wall,
layer 0 in a block taking the INSERT's layer, names matched case-insensitively) are common
practice. Spans are those of strip S1 of sample_projects/quayside-terrace.yaml.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import ezdxf
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.io.dxf_reader import (
    GALayers,
    GAUnitsError,
    GeneralArrangement,
    read_general_arrangement,
)

SLAB, SUPPORTS, STRIPS = "SW-GA-SLAB", "SW-GA-SUPPORTS", "SW-GA-STRIPS"
SPANS_MM = (4200.0, 5600.0, 5100.0, 4600.0)  # quayside-terrace.yaml, strip S1
TOL_MM = 1.0


@dataclass(frozen=True)
class Layout:
    """A strip in its own frame: u along the strip, v across; x = 0 at the first support."""

    spans_mm: tuple[float, ...] = SPANS_MM
    width_mm: float = 300.0
    left_cantilever_mm: float = 0.0  # 0: slab edge flush with the first support's outer face
    right_cantilever_mm: float = 1500.0
    half_slab_mm: float = 5000.0  # slab edge to edge across the strip: 2 x this
    skew_deg: float = 0.0  # supports turned this much off square to the strip

    @property
    def centres_mm(self) -> list[float]:
        xs = [0.0]
        for span in self.spans_mm:
            xs.append(xs[-1] + span)
        return xs

    @property
    def slab_u_mm(self) -> tuple[float, float]:
        half = self.width_mm / 2
        left = -self.left_cantilever_mm if self.left_cantilever_mm else -half
        right = self.centres_mm[-1] + (self.right_cantilever_mm or half)
        return left, right


def draw(
    path: Path,
    layout: Layout = Layout(),
    *,
    theta: float = 0.0,
    offset_mm: tuple[float, float] = (0.0, 0.0),
    units: str = "mm",
    strip: str = "line",
    supports: str = "polyline",
    strip_v_mm: float = 0.0,
    strip_u_mm: tuple[float, float] | None = None,
    panel_mm: float = 6200.0,
    version: str = "R2010",
    strip_id: str = "S1",
) -> Path:
    """Write the layout as a GA DXF, turned by theta about the origin and shifted."""
    k = {"mm": 1.0, "m": 1000.0}[units]
    c, s = math.cos(theta), math.sin(theta)

    def w(u: float, v: float) -> tuple[float, float]:
        return ((offset_mm[0] + c * u - s * v) / k, (offset_mm[1] + s * u + c * v) / k)

    doc = ezdxf.new(version)
    if version != "R12":
        doc.header["$INSUNITS"] = 4 if units == "mm" else 6
    for name in (SLAB, SUPPORTS, STRIPS):
        doc.layers.add(name)
    msp = doc.modelspace()

    def poly(points: list[tuple[float, float]], layer: str) -> None:
        if version == "R12":
            msp.add_polyline2d(points, close=True, dxfattribs={"layer": layer})
        else:
            msp.add_lwpolyline(points, close=True, dxfattribs={"layer": layer})

    u0, u1 = layout.slab_u_mm
    hs = layout.half_slab_mm
    poly([w(u0, -hs), w(u1, -hs), w(u1, hs), w(u0, hs)], SLAB)
    t = math.tan(math.radians(layout.skew_deg))
    half = layout.width_mm / 2 / math.cos(math.radians(layout.skew_deg))
    reach = hs + 400.0  # supports run on past the slab sides
    for i, x in enumerate(layout.centres_mm):
        # faces u = x +- half + v tan(skew): a parallelogram whose width along u is constant
        a, b = (w(x - half - reach * t, -reach), w(x - half + reach * t, reach))
        d, e = (w(x + half - reach * t, -reach), w(x + half + reach * t, reach))
        if supports == "lines" or (supports == "mixed" and i % 2):
            msp.add_line(a, b, dxfattribs={"layer": SUPPORTS})
            msp.add_line(e, d, dxfattribs={"layer": SUPPORTS})  # drawn the other way on purpose
        else:
            poly([a, d, e, b], SUPPORTS)
    ua, ub = strip_u_mm if strip_u_mm is not None else (u0 + 200.0, u1 - 200.0)
    if strip == "line":
        msp.add_line(w(ua, strip_v_mm), w(ub, strip_v_mm), dxfattribs={"layer": STRIPS})
        at = w((ua + ub) / 2 + 700.0, strip_v_mm + 350.0)
    else:
        hp = panel_mm / 2
        vv = strip_v_mm
        poly([w(ua, vv - hp), w(ub, vv - hp), w(ub, vv + hp), w(ua, vv + hp)], STRIPS)
        at = w((ua + ub) / 2 + 700.0, vv + hp / 2)
    msp.add_text(strip_id, dxfattribs={"layer": STRIPS, "insert": at, "height": 250 / k})
    doc.saveas(path)
    return path


def forward(theta: float) -> bool:
    """The documented axis direction: from the end with the smaller x, then smaller y."""
    c, s = math.cos(theta), math.sin(theta)
    return c > 1e-9 or (abs(c) <= 1e-9 and s > 0)


def expected(layout: Layout, theta: float) -> tuple[list[float], float, float]:
    """Support x positions and (left, right) cantilevers as read along the axis direction."""
    xs = layout.centres_mm
    lc, rc = layout.left_cantilever_mm, layout.right_cantilever_mm
    if not forward(theta):
        xs = [xs[-1] - x for x in reversed(xs)]
        lc, rc = rc, lc
    return [x + lc for x in xs], lc, rc


def read_one(path: Path, **kw) -> tuple[GeneralArrangement, object]:
    ga = read_general_arrangement(path, **kw)
    assert len(ga.strips) == 1
    return ga, ga.strips[0]


@settings(max_examples=30, deadline=None)
@given(
    theta=st.floats(0.0, 2 * math.pi, allow_nan=False),
    ox=st.floats(-1.0e6, 1.0e6),
    oy=st.floats(-1.0e6, 1.0e6),
    units=st.sampled_from(["mm", "m"]),
    strip=st.sampled_from(["line", "band"]),
    supports=st.sampled_from(["polyline", "lines", "mixed"]),
    strip_v=st.floats(-1500.0, 1500.0),
    left=st.sampled_from([0.0, 1200.0]),
)
def test_spans_and_widths_survive_rotation_offset_and_units(
    tmp_path_factory, theta, ox, oy, units, strip, supports, strip_v, left
):
    """Source: the drawn layout itself (a rigid motion keeps lengths); tolerance 1 mm."""
    layout = Layout(left_cantilever_mm=left)
    path = draw(
        tmp_path_factory.mktemp("ga") / "ga.dxf",
        layout,
        theta=theta,
        offset_mm=(ox, oy),
        units=units,
        strip=strip,
        supports=supports,
        strip_v_mm=strip_v,
    )
    ga, s = read_one(path)
    xs, lc, rc = expected(layout, theta)
    assert ga.units == units and ga.units_from_header
    assert [p.x_mm for p in s.supports] == pytest.approx(xs, abs=TOL_MM)
    assert [p.width_mm for p in s.supports] == pytest.approx([300.0] * 5, abs=TOL_MM)
    assert s.left_cantilever_mm == pytest.approx(lc, abs=TOL_MM)
    assert s.right_cantilever_mm == pytest.approx(rc, abs=TOL_MM)
    spans = list(SPANS_MM) if forward(theta) else list(reversed(SPANS_MM))
    assert list(s.spans_mm) == pytest.approx(spans, abs=TOL_MM)
    if strip == "band":
        assert s.panel_width_mm == pytest.approx(6200.0, abs=TOL_MM)
    else:
        assert s.panel_width_mm is None
    # The axis start is the end with the smaller x (or smaller y when vertical).
    dx, dy = s.direction
    assert dx > 1e-9 or (abs(dx) <= 1e-9 and dy > 0)
    assert math.dist(s.axis_start_mm, s.axis_end_mm) == pytest.approx(
        layout.slab_u_mm[1] - layout.slab_u_mm[0], abs=TOL_MM
    )


def test_sample_strip_read_back_in_metres(tmp_path):
    """S1 of the sample project drawn in metres at 30 degrees; the drawn values come back."""
    path = draw(tmp_path / "ga.dxf", theta=math.radians(30), offset_mm=(512000, -86000), units="m")
    _, s = read_one(path)
    assert s.id == "S1"
    assert s.spans_mm == pytest.approx(SPANS_MM, abs=TOL_MM)
    assert s.right_cantilever_mm == pytest.approx(1500.0, abs=TOL_MM)
    assert s.left_cantilever_mm == 0.0
    # Flush edge beam: the slab edge is on its outer face, half its width before x = 0.
    assert s.left_edge_x_mm == pytest.approx(-150.0, abs=TOL_MM)
    assert s.right_edge_x_mm == pytest.approx(19500.0 + 1500.0, abs=TOL_MM)
    assert s.origin_mm == pytest.approx((512000.0, -86000.0), abs=TOL_MM)


@pytest.mark.parametrize(
    ("degrees", "forward_expected"),
    [(0, True), (45, True), (90, True), (135, False), (180, False), (270, False), (315, True)],
)
def test_axis_direction_rule(tmp_path, degrees, forward_expected):
    """Documented convention: the axis starts at the end with the smaller x, then smaller y."""
    theta = math.radians(degrees)
    path = draw(tmp_path / "ga.dxf", theta=theta)
    _, s = read_one(path)
    c, sn = s.direction
    # Forward means the strip's +u (towards the cantilever) is the axis direction.
    assert (c * math.cos(theta) + sn * math.sin(theta) > 0) is forward_expected
    assert s.right_cantilever_mm > 0 if forward_expected else s.left_cantilever_mm > 0


def test_left_cantilever_moves_the_origin_to_the_tip(tmp_path):
    """detailer.model: x = 0 at the free tip of a left cantilever."""
    layout = Layout(left_cantilever_mm=1800.0, right_cantilever_mm=0.0)
    _, s = read_one(draw(tmp_path / "ga.dxf", layout))
    assert s.left_cantilever_mm == pytest.approx(1800.0, abs=TOL_MM)
    assert s.supports[0].x_mm == pytest.approx(1800.0, abs=TOL_MM)
    assert s.left_edge_x_mm == 0.0
    assert s.right_cantilever_mm == 0.0
    assert s.origin_mm == pytest.approx((-1800.0, 0.0), abs=TOL_MM)


@pytest.mark.parametrize("skew_deg", [15.0, 30.0])
def test_skewed_supports_are_measured_along_the_strip(tmp_path, skew_deg):
    """A support turned phi off square is w / cos(phi) long along the strip (trigonometry)."""
    layout = Layout(skew_deg=skew_deg, left_cantilever_mm=900.0, right_cantilever_mm=1500.0)
    _, s = read_one(draw(tmp_path / "ga.dxf", layout, strip_v_mm=0.0))
    w_along = 300.0 / math.cos(math.radians(skew_deg))
    assert [p.width_mm for p in s.supports] == pytest.approx([w_along] * 5, abs=TOL_MM)
    assert s.spans_mm == pytest.approx(SPANS_MM, abs=TOL_MM)
    assert s.left_cantilever_mm == pytest.approx(900.0, abs=TOL_MM)


def test_slab_edge_close_to_the_support_face_is_not_a_cantilever(tmp_path):
    """Documented rule (common practice): within edge_mm = 10 of the outer face is flush."""
    for beyond_mm, cantilever in ((5.0, False), (60.0, True)):
        layout = Layout(right_cantilever_mm=150.0 + beyond_mm)
        _, s = read_one(draw(tmp_path / f"ga{beyond_mm:g}.dxf", layout))
        if cantilever:
            assert s.right_cantilever_mm == pytest.approx(150.0 + beyond_mm, abs=TOL_MM)
        else:
            assert s.right_cantilever_mm == 0.0
            assert s.right_edge_x_mm == pytest.approx(19500.0 + 155.0, abs=TOL_MM)


def test_short_strip_line_still_measures_the_whole_slab(tmp_path):
    """Documented rule: the drawn line only places the strip; it runs from slab edge to edge."""
    path = draw(tmp_path / "ga.dxf", strip_u_mm=(6000.0, 7000.0))
    _, s = read_one(path)
    assert len(s.supports) == 5
    assert s.right_cantilever_mm == pytest.approx(1500.0, abs=TOL_MM)


def test_r12_file_takes_its_units_from_the_project(tmp_path):
    """R12 has POLYLINE only and no $INSUNITS (DXF R12 reference): the caller states units."""
    path = draw(tmp_path / "ga.dxf", version="R12", units="m")
    with pytest.raises(GAUnitsError, match=r"ga\.dxf.*\$INSUNITS.*units: mm"):
        read_general_arrangement(path)
    ga, s = read_one(path, units_if_missing="m")
    assert ga.units == "m" and not ga.units_from_header
    assert s.spans_mm == pytest.approx(SPANS_MM, abs=TOL_MM)


def test_layers_match_case_insensitively_and_can_be_renamed(tmp_path):
    """DXF layer names are case-insensitive (DXF reference, LAYER table; common practice)."""
    path = draw(tmp_path / "ga.dxf")
    doc = ezdxf.readfile(path)
    for e in doc.modelspace():
        e.dxf.layer = {SLAB: "Slab Edge", SUPPORTS: "walls", STRIPS: "Strips"}[e.dxf.layer]
    doc.saveas(path)
    _, s = read_one(path, layers=GALayers(slab="SLAB EDGE", supports="Walls", strips="strips"))
    assert s.spans_mm == pytest.approx(SPANS_MM, abs=TOL_MM)


def test_supports_inside_a_block_are_read(tmp_path):
    """Layer 0 inside a block takes the INSERT's layer (common CAD practice)."""
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 4
    msp = doc.modelspace()
    msp.add_lwpolyline([(-150, 0), (9150, 0), (9150, 3000), (-150, 3000)], close=True,
                       dxfattribs={"layer": SLAB})  # fmt: skip
    wall = doc.blocks.new("WALL-300")
    wall.add_lwpolyline([(-150, -100), (150, -100), (150, 3100), (-150, 3100)], close=True)
    inserts = [
        msp.add_blockref("WALL-300", (x, 0), dxfattribs={"layer": SUPPORTS}) for x in (0, 9000)
    ]
    msp.add_line((500, 1500), (8500, 1500), dxfattribs={"layer": STRIPS})
    msp.add_mtext("S7", dxfattribs={"layer": STRIPS, "insert": (4000, 1800)})
    doc.saveas(tmp_path / "ga.dxf")
    _, s = read_one(tmp_path / "ga.dxf")
    assert s.id == "S7"
    assert s.spans_mm == pytest.approx((9000.0,), abs=TOL_MM)
    assert [p.handle for p in s.supports] == [i.dxf.handle for i in inserts]


def test_curved_slab_edge_from_polyline_bulge(tmp_path):
    """A semicircular end of radius R: the edge lies sqrt(R^2 - v^2) past its centre."""
    r, v = 3000.0, 1200.0
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 4
    msp = doc.modelspace()
    # bulge 1 = a half circle from (6000, -R) to (6000, R) bulging to +x (DXF bulge = tan(a/4)).
    msp.add_lwpolyline(
        [(-150, -r, 0, 0, 0), (6000, -r, 0, 0, 1), (6000, r, 0, 0, 0), (-150, r, 0, 0, 0)],
        format="xyseb",
        close=True,
        dxfattribs={"layer": SLAB},
    )
    for x in (0.0, 5000.0):
        msp.add_lwpolyline([(x - 150, -r), (x + 150, -r), (x + 150, r), (x - 150, r)],
                           close=True, dxfattribs={"layer": SUPPORTS})  # fmt: skip
    msp.add_line((1000, v), (4000, v), dxfattribs={"layer": STRIPS})
    msp.add_text("S3", dxfattribs={"layer": STRIPS, "insert": (2000, v + 300)})
    doc.saveas(tmp_path / "ga.dxf")
    _, s = read_one(tmp_path / "ga.dxf")
    edge = 6000.0 + math.sqrt(r * r - v * v)
    assert s.right_cantilever_mm == pytest.approx(edge - 5000.0, abs=TOL_MM)


def test_damaged_file_is_recovered_with_a_note(tmp_path):
    """ezdxf recovery repairs a missing ENDSEC (ezdxf docs, recover module); we say so."""
    path = draw(tmp_path / "ga.dxf")
    lines = path.read_text().split("\n")
    i = lines.index("ENTITIES")
    j = next(k for k in range(i, len(lines)) if lines[k] == "ENDSEC")
    path.write_text("\n".join(lines[: j - 1] + lines[j + 1 :]))
    with pytest.raises(ezdxf.DXFStructureError):
        ezdxf.readfile(path)  # the file really is damaged
    ga, s = read_one(path)
    assert s.spans_mm == pytest.approx(SPANS_MM, abs=TOL_MM)
    assert ga.notes and all(str(path) in n for n in ga.notes)
    assert any("ENDSEC" in n for n in ga.notes)


def test_several_strips_are_ordered_by_id(tmp_path):
    """Deterministic output: strips sorted by id, digits compared as numbers."""
    path = draw(tmp_path / "ga.dxf", strip_v_mm=-3000.0, strip_id="S10")
    doc = ezdxf.readfile(path)
    msp = doc.modelspace()
    for v, name in ((0.0, "S2"), (3000.0, "S1")):
        msp.add_line((0, v), (15000, v), dxfattribs={"layer": STRIPS})
        msp.add_text(name, dxfattribs={"layer": STRIPS, "insert": (7000, v + 300)})
    doc.saveas(path)
    ga = read_general_arrangement(path)
    assert [s.id for s in ga.strips] == ["S1", "S2", "S10"]
    assert ga.strip("S2").spans_mm == pytest.approx(SPANS_MM, abs=TOL_MM)
