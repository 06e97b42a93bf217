"""Bad general arrangement DXFs: one line naming the file, the layer or entity, and a fix.

Each drawing is made here with ezdxf from a small valid GA (a 10 m x 6 m slab on three 300 mm
walls, one strip line). What counts as a mistake follows the documented drawing rules of
``detailer.io.dxf_reader`` (common practice for GA drawings) and the DXF file structure
(a file ends with ``0 / EOF``; $INSUNITS 4 = mm, 6 = m, 1 = inches: DXF reference, HEADER).
"""

from __future__ import annotations

from pathlib import Path

import ezdxf
import pytest

from detailer.errors import InputError, ProjectError
from detailer.io.dxf_reader import (
    GAError,
    GAFileError,
    GALayerError,
    GALayers,
    GAOutlineError,
    GAStripError,
    GAStripIdError,
    GASupportError,
    GAUnitsError,
    read_general_arrangement,
)

SLAB, SUPPORTS, STRIPS = "SW-GA-SLAB", "SW-GA-SUPPORTS", "SW-GA-STRIPS"


def rect(x0, y0, x1, y1):
    return [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]


class GA:
    """A valid GA, changed by each test before it is written."""

    def __init__(self) -> None:
        self.doc = ezdxf.new("R2010")
        self.doc.header["$INSUNITS"] = 4
        for name in (SLAB, SUPPORTS, STRIPS):
            self.doc.layers.add(name)
        self.msp = self.doc.modelspace()
        self.slab = self.poly(rect(-150, 0, 10150, 6000), SLAB)
        self.walls = [self.poly(rect(x - 150, -100, x + 150, 6100), SUPPORTS) for x in (0, 5000, 10000)]  # fmt: skip
        self.strip = self.line((500, 3000), (9500, 3000), STRIPS)
        self.label = self.text("S1", (4000, 3300))

    def poly(self, points, layer, close=True):
        return self.msp.add_lwpolyline(points, close=close, dxfattribs={"layer": layer})

    def line(self, a, b, layer):
        return self.msp.add_line(a, b, dxfattribs={"layer": layer})

    def text(self, value, at):
        return self.msp.add_text(value, dxfattribs={"layer": STRIPS, "insert": at})

    def save(self, path: Path) -> Path:
        self.doc.saveas(path)
        return path


def fails(path: Path, error: type[GAError], *parts: str, **kw) -> str:
    """Read ``path``, expect ``error``; its one-line text holds the file name and ``parts``."""
    with pytest.raises(error) as info:
        read_general_arrangement(path, **kw)
    text = str(info.value)
    assert isinstance(info.value, ProjectError) and isinstance(info.value, InputError)
    assert "\n" not in text
    assert text.startswith(str(path) + ": ")
    for part in parts:
        assert part in text, (part, text)
    return text


def h(entity) -> str:
    return "#" + entity.dxf.handle


@pytest.fixture
def ga() -> GA:
    return GA()


def test_the_base_drawing_is_valid(tmp_path, ga):
    """Guard for the cases below: unchanged, the drawing reads as two 5000 mm spans."""
    strip = read_general_arrangement(ga.save(tmp_path / "ga.dxf")).strip("S1")
    assert strip.spans_mm == pytest.approx((5000.0, 5000.0), abs=1.0)


# -- the file ----------------------------------------------------------------------------------
def test_missing_file(tmp_path):
    fails(tmp_path / "nothere.dxf", GAFileError, "cannot read the file")


@pytest.mark.parametrize(
    ("content", "words"),
    [
        (b"", "not a DXF file"),
        (b"hello world\n", "not a DXF file"),
        (b"AC1032\x00\x00\x00binary", "DWG drawing"),  # DWG files start with AC10xx (from memory)
    ],
)
def test_not_a_dxf(tmp_path, content, words):
    path = tmp_path / "ga.dxf"
    path.write_bytes(content)
    fails(path, GAFileError, words)


def test_file_cut_short_is_refused(tmp_path, ga):
    """Recovery would silently keep only the start of the drawing (libraries guide)."""
    path = ga.save(tmp_path / "ga.dxf")
    lines = path.read_text().split("\n")
    path.write_text("\n".join(lines[: len(lines) * 2 // 3]) + "\n")
    fails(path, GAFileError, "cut short", "EOF")


def test_bad_number_is_refused_not_recovered(tmp_path, ga):
    """ezdxf recovery replaces a bad float by 1.0: measuring that would be wrong."""
    path = ga.save(tmp_path / "ga.dxf")
    text = path.read_text()
    assert "\n10150.0\n" in text
    path.write_text(text.replace("\n10150.0\n", "\n1O150.0\n", 1))
    fails(path, GAFileError, "damaged DXF", "1O150.0")


# -- units -------------------------------------------------------------------------------------
def test_units_in_inches_are_refused(tmp_path, ga):
    ga.doc.header["$INSUNITS"] = 1
    fails(ga.save(tmp_path / "ga.dxf"), GAUnitsError, "inches", "$INSUNITS = 1")


def test_missing_units_ask_the_project_file(tmp_path, ga):
    ga.doc.header["$INSUNITS"] = 0
    fails(ga.save(tmp_path / "ga.dxf"), GAUnitsError, "$INSUNITS", "units: mm")


def test_unknown_fallback_units(tmp_path, ga):
    ga.doc.header["$INSUNITS"] = 0
    fails(ga.save(tmp_path / "ga.dxf"), GAUnitsError, "'ft'", units_if_missing="ft")


def test_metres_labelled_as_millimetres(tmp_path, ga):
    """A slab 10 mm across is a units slip (drawn in m, header says mm)."""
    ga.doc.header["$INSUNITS"] = 4
    for e in ga.msp:
        e.scale_uniform(0.001)
    fails(ga.save(tmp_path / "ga.dxf"), GAUnitsError, SLAB, h(ga.slab), "10.3 mm across")


# -- layers ------------------------------------------------------------------------------------
def test_missing_layer_suggests_a_close_name(tmp_path, ga):
    path = ga.save(tmp_path / "ga.dxf")
    fails(path, GALayerError, "'SW-GA-STRIP'", "not in the drawing", f"did you mean '{STRIPS}'",
          layers=GALayers(strips="SW-GA-STRIP"))  # fmt: skip


def test_missing_layer_lists_the_layers(tmp_path, ga):
    path = ga.save(tmp_path / "ga.dxf")
    fails(path, GALayerError, "'BEAMS'", "layers in the drawing", SLAB,
          layers=GALayers(supports="BEAMS"))  # fmt: skip


def test_empty_layer(tmp_path, ga):
    for e in ga.walls:
        e.destroy()
    fails(ga.save(tmp_path / "ga.dxf"), GALayerError, SUPPORTS, "holds no entities",
          "draw the beams and walls")  # fmt: skip


def test_empty_layer_suggests_the_layer_used_instead(tmp_path, ga):
    for e in ga.walls:
        e.dxf.layer = "SW-GA-SUPPORT"
    fails(ga.save(tmp_path / "ga.dxf"), GALayerError, SUPPORTS, "holds no entities",
          "did you mean 'SW-GA-SUPPORT'")  # fmt: skip


# -- slab outline ------------------------------------------------------------------------------
def test_no_outline(tmp_path, ga):
    ga.slab.destroy()
    ga.msp.add_text("SLAB", dxfattribs={"layer": SLAB, "insert": (0, 0)})
    fails(ga.save(tmp_path / "ga.dxf"), GAOutlineError, SLAB, "no slab outline")


def test_two_outlines(tmp_path, ga):
    other = ga.poly(rect(20000, 0, 25000, 6000), SLAB)
    fails(ga.save(tmp_path / "ga.dxf"), GAOutlineError, "2 slab outlines", h(ga.slab), h(other))


def test_open_outline(tmp_path, ga):
    ga.slab.closed = False
    fails(ga.save(tmp_path / "ga.dxf"), GAOutlineError, SLAB, h(ga.slab), "open")


def test_self_intersecting_outline(tmp_path, ga):
    """A bow-tie crosses itself at the middle of its diagonals (5000, 3000)."""
    ga.slab.set_points([(-150, 0), (10150, 6000), (10150, 0), (-150, 6000)])
    fails(ga.save(tmp_path / "ga.dxf"), GAOutlineError, h(ga.slab), "crosses itself",
          "(5000, 3000)")  # fmt: skip


def test_outline_drawn_with_lines(tmp_path, ga):
    ga.slab.destroy()
    edge = ga.line((-150, 0), (10150, 0), SLAB)
    fails(ga.save(tmp_path / "ga.dxf"), GAOutlineError, SLAB, h(edge), "LINE")


# -- supports ----------------------------------------------------------------------------------
def test_support_line_without_partner(tmp_path, ga):
    ga.walls[1].destroy()
    face = ga.line((4850, -100), (4850, 6100), SUPPORTS)
    fails(ga.save(tmp_path / "ga.dxf"), GASupportError, SUPPORTS, h(face), "no parallel partner")


def test_open_support_polyline(tmp_path, ga):
    ga.walls[1].closed = False
    fails(ga.save(tmp_path / "ga.dxf"), GASupportError, SUPPORTS, h(ga.walls[1]), "open")


def test_circle_on_the_supports_layer(tmp_path, ga):
    column = ga.msp.add_circle((2500, 3000), 200, dxfattribs={"layer": SUPPORTS})
    fails(ga.save(tmp_path / "ga.dxf"), GASupportError, h(column), "CIRCLE")


def test_overlapping_supports(tmp_path, ga):
    extra = ga.poly(rect(4900, -100, 5400, 6100), SUPPORTS)
    fails(ga.save(tmp_path / "ga.dxf"), GASupportError, h(extra), h(ga.walls[1]), "overlap",
          h(ga.strip))  # fmt: skip


# -- strips ------------------------------------------------------------------------------------
def test_strip_crossing_no_support(tmp_path, ga):
    ga.slab.set_points(rect(-150, 0, 10150, 9000))
    ga.strip.dxf.start, ga.strip.dxf.end = (500, 7000), (9500, 7000)
    ga.label.dxf.insert = (4000, 7300)
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(ga.strip), "crosses no support")


def test_one_support_with_a_cantilever_is_accepted(tmp_path, ga):
    """Contrast case: a slab cantilevering off one wall is a valid strip (the loader must make
    that end monolithic)."""
    ga.slab.set_points(rect(-150, 0, 3000, 6000))
    ga.strip.dxf.end = (2500, 3000)
    ga.label.dxf.insert = (1000, 3300)
    for wall in ga.walls[1:]:
        wall.destroy()
    strip = read_general_arrangement(ga.save(tmp_path / "ga.dxf")).strip("S1")
    assert len(strip.supports) == 1
    assert strip.right_cantilever_mm == pytest.approx(3000.0, abs=1.0)


def test_strip_on_one_support_without_overhang(tmp_path, ga):
    ga.slab.set_points(rect(-150, 0, 150, 6000))
    ga.strip.dxf.start, ga.strip.dxf.end = (-100, 3000), (100, 3000)
    ga.label.dxf.insert = (0, 3300)
    for wall in ga.walls[1:]:
        wall.destroy()
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(ga.strip), "only one support",
          h(ga.walls[0]), "no overhang")  # fmt: skip


def test_strip_on_one_support_overhanging_both_sides(tmp_path, ga):
    ga.slab.set_points(rect(2000, 0, 8000, 6000))
    ga.strip.dxf.start, ga.strip.dxf.end = (2500, 3000), (7500, 3000)
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(ga.strip), h(ga.walls[1]),
          "overhangs on both sides")  # fmt: skip


def test_strip_outside_the_slab(tmp_path, ga):
    ga.strip.dxf.start, ga.strip.dxf.end = (500, 8000), (9500, 8000)
    ga.label.dxf.insert = (4000, 8300)
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, STRIPS, h(ga.strip), "outside the slab")


def test_strip_crossing_a_gap_in_a_u_shaped_slab(tmp_path, ga):
    ga.slab.set_points([(-150, 0), (10150, 0), (10150, 6000), (6000, 6000), (6000, 2000),
                        (4000, 2000), (4000, 6000), (-150, 6000)])  # fmt: skip
    ga.strip.dxf.start, ga.strip.dxf.end = (500, 4000), (9500, 4000)
    ga.label.dxf.insert = (2000, 4300)
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(ga.strip), "gap", "(5000, 4000)")


def test_zero_length_strip_line(tmp_path, ga):
    ga.strip.dxf.end = ga.strip.dxf.start
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, STRIPS, h(ga.strip), "zero length")


def test_open_strip_polyline(tmp_path, ga):
    bent = ga.poly([(500, 1000), (5000, 1200), (9500, 1000)], STRIPS, close=False)
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(bent), "open")


def test_band_about_as_wide_as_long(tmp_path, ga):
    band = ga.poly(rect(500, 200, 3300, 2800), STRIPS)  # 2800 x 2600: aspect 1.08 < 1.1
    ga.text("B1", (2000, 1500))
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(band), "direction is unclear")


def test_band_that_is_not_a_rectangle(tmp_path, ga):
    band = ga.poly([(500, 500), (9500, 500), (9500, 2500), (5000, 1000), (500, 2500)], STRIPS)
    ga.text("B1", (2000, 800))
    fails(ga.save(tmp_path / "ga.dxf"), GAStripError, h(band), "not a rectangle")


# -- strip ids ---------------------------------------------------------------------------------
def test_strip_without_id_text(tmp_path, ga):
    ga.label.dxf.insert = (4000, 5000)  # 2000 mm from the line: too far
    fails(ga.save(tmp_path / "ga.dxf"), GAStripIdError, h(ga.strip), "no id text", "1000 mm")


def test_strip_with_two_id_texts(tmp_path, ga):
    second = ga.text("S2", (7000, 2800))
    fails(ga.save(tmp_path / "ga.dxf"), GAStripIdError, h(ga.strip), "'S1'", "'S2'",
          h(second))  # fmt: skip


def test_two_strips_with_the_same_id(tmp_path, ga):
    other = ga.line((500, 1000), (9500, 1000), STRIPS)
    twin = ga.text("S1", (4000, 1300))
    fails(ga.save(tmp_path / "ga.dxf"), GAStripIdError, "'S1'", h(ga.strip), h(other), h(twin))


def test_id_text_that_is_not_an_id(tmp_path, ga):
    ga.label.dxf.text = "STRIP 1"
    fails(ga.save(tmp_path / "ga.dxf"), GAStripIdError, h(ga.label), "'STRIP 1'")
