"""PNG previews: a real picture of each sheet, bars in their layers' colours on white.

The expected colours are the layers' ACI colours through the standard AutoCAD Colour Index
table as ezdxf gives it (ACI 1 = red 255,0,0; ACI 5 = blue 0,0,255; ACI 94 = 0,127,0) and the
PNG signature is that of the PNG specification (RFC 2083: 89 50 4E 47 0D 0A 1A 0A).
"""

from __future__ import annotations

import functools
import io
import itertools

import numpy as np
import pytest
from dxf_fixtures import read_doc, sample_dxf
from ezdxf.enums import TextEntityAlignment
from hypothesis import given, settings
from hypothesis import strategies as st_h
from PIL import Image

from detailer.errors import InputError
from detailer.io import dxf_preview
from detailer.io import dxf_style as st
from detailer.io.dxf_preview import render_png, write_preview_files

DPI = 80


@functools.cache
def _png(layout: str) -> bytes:
    return render_png(sample_dxf(), layout, dpi=DPI)


def _pixels(png: bytes) -> np.ndarray:
    return np.asarray(Image.open(io.BytesIO(png)).convert("RGB")).astype(int)


def _near(px: np.ndarray, rgb: tuple[int, int, int], tol: int = 40) -> int:
    return int(np.all(np.abs(px - np.array(rgb)) <= tol, axis=-1).sum())


def _hue(px: np.ndarray, rgb: tuple[int, int, int]) -> int:
    """Pixels whose strongest channel is the one of ``rgb`` by a clear margin: anti-aliased
    thin lines blend with the white paper, but keep their hue (and their brightness: the navy
    title block, ACI 174 = 0,0,127, is not the blue of the bottom bars)."""
    channel = int(np.argmax(rgb))
    others = [c for c in range(3) if c != channel]
    main = px[..., channel]
    tests = [main - px[..., c] > 60 for c in others] + [main >= 0.8 * rgb[channel]]
    return int(np.all(tests, axis=0).sum())


def test_png_is_the_whole_sheet_on_white():
    png = _png("Strip S1")
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    img = Image.open(io.BytesIO(png))
    # S1 (21 m long) goes on A1 landscape, 841 x 594 mm
    assert img.size[0] == pytest.approx(841 / 25.4 * DPI, abs=1)
    assert img.size[1] == pytest.approx(594 / 25.4 * DPI, abs=1)
    px = _pixels(png)
    white = _near(px, (255, 255, 255), 8)
    assert white > 0.8 * px.shape[0] * px.shape[1]


def test_bars_show_in_their_layer_colours():
    px = _pixels(_png("Strip S1"))
    from ezdxf.colors import aci2rgb

    for layer in (st.BARS_TOP_LAYER, st.BARS_BOTTOM_LAYER, st.BARS_DISTRIBUTION_LAYER):
        rgb = tuple(aci2rgb(layer.colour))
        assert _hue(px, rgb) > 1000, layer.name
    # and something black: outline, callouts, notes
    assert _near(px, (0, 0, 0), 60) > 3000


def test_second_sheet_renders_too():
    px = _pixels(_png("Strip S2"))
    assert _hue(px, (255, 0, 0)) > 400
    assert _hue(px, (0, 0, 255)) > 400


def test_unknown_layout_and_bad_bytes_are_one_line_errors():
    with pytest.raises(InputError, match="no layout 'Strip X'") as exc:
        render_png(read_doc(sample_dxf()), "Strip X")
    assert "\n" not in str(exc.value)
    with pytest.raises(InputError, match="not a readable DXF"):
        render_png(b"\xff\xfe not a drawing", "Strip S1")


def test_preview_files_one_per_sheet(tmp_path, monkeypatch):
    import detailer.io.dxf_preview as preview

    monkeypatch.setattr(preview, "render_png", lambda doc, name, dpi=100: _png(name))
    paths = write_preview_files(sample_dxf(), tmp_path, "quayside")
    assert [p.name for p in paths] == ["quayside-strip-s1.png", "quayside-strip-s2.png"]
    assert paths[0].read_bytes() == _png("Strip S1")


def test_hatched_sheet_renders_to_the_same_bytes_every_time():
    # Regression: ezdxf offsets hatch pattern lines by a random jiggle, so the sheet with the
    # hatched walls (strip S2) came out different on every render until the preview fixed
    # the generator's state.
    import random

    dxf = sample_dxf()
    callers = random.Random(1234).getstate()
    random.setstate(callers)
    before = random.random()
    random.setstate(callers)
    first = render_png(dxf, "Strip S2")
    assert random.random() == before  # the caller's random state is left as it was
    assert render_png(dxf, "Strip S2") == first


# --- where things are drawn: positions from the DXF entities and the viewport transform ----
#
# A paper-space VIEWPORT (DXF reference, VIEWPORT: 10 = centre on paper, 40/41 = width and
# height on paper, 12 = view centre in model space, 45 = view height in model units) shows
# model point p at  centre + (p - view_centre) * height / view_height  on the sheet; id 1 is
# the paper-space view itself. The sheet is 1:1 in mm, and a PNG row counts from the top.


def _viewports(layout):
    for vp in layout.query("VIEWPORT"):
        if vp.dxf.id == 1 or vp.dxf.view_height <= 0:
            continue
        yield (
            vp.dxf.center,
            vp.dxf.width,
            vp.dxf.height,
            vp.dxf.view_center_point,
            (vp.dxf.height / vp.dxf.view_height),
        )


def _on_sheet(layout, x: float, y: float, margin_mm: float = 1.0):
    """Paper positions (mm) of model point (x, y) in every viewport whose window holds it."""
    for centre, width, height, view, scale in _viewports(layout):
        px = centre[0] + (x - view[0]) * scale
        py = centre[1] + (y - view[1]) * scale
        if abs(px - centre[0]) <= width / 2 - margin_mm and (
            abs(py - centre[1]) <= height / 2 - margin_mm
        ):
            yield px, py, scale


def _pixel(x_mm: float, y_mm: float, image_height: int, dpi: int = DPI) -> tuple[int, int]:
    """(row, column) of the pixel at sheet position (x, y) mm."""
    return image_height - round(y_mm / 25.4 * dpi), round(x_mm / 25.4 * dpi)


def _bar_points(layer_name: str, layout) -> list[tuple[int, int]]:
    """Pixel (row, col) of the midpoint of every straight bar segment at least 2 mm long on
    paper, in each viewport that shows it (bars on the layer, colour BYLAYER)."""
    doc = read_doc(sample_dxf())
    height_px = int(float(layout.dxf_layout.dxf.paper_height) / 25.4 * DPI)
    points = []
    for pl in doc.modelspace().query(f'LWPOLYLINE[layer=="{layer_name}"]'):
        if pl.dxf.get("color", 256) != 256:
            continue
        xyb = list(pl.get_points("xyb"))
        for (x1, y1, bulge), (x2, y2, _) in itertools.pairwise(xyb):
            if bulge:
                continue
            mx, my = (x1 + x2) / 2, (y1 + y2) / 2
            length = ((x2 - x1) ** 2 + (y2 - y1) ** 2) ** 0.5
            for px, py, scale in _on_sheet(layout, mx, my):
                if length * scale >= 2.0:
                    points.append(_pixel(px, py, height_px))
    return points


def _share_with_hue(px: np.ndarray, points, rgb, reach: int = 2) -> float:
    hits = sum(
        _hue(px[max(r - reach, 0) : r + reach + 1, max(c - reach, 0) : c + reach + 1], rgb) > 0
        for r, c in points
    )
    return hits / len(points)


@pytest.mark.parametrize("sheet", ["Strip S1", "Strip S2"])
def test_each_bar_layer_shows_in_its_colour_where_its_bars_are(sheet):
    from ezdxf.colors import aci2rgb

    doc = read_doc(sample_dxf())
    layout = doc.layouts.get(sheet)
    px = _pixels(_png(sheet))
    assert px.shape[0] == int(float(layout.dxf_layout.dxf.paper_height) / 25.4 * DPI)
    layers = (st.BARS_TOP_LAYER, st.BARS_BOTTOM_LAYER, st.BARS_DISTRIBUTION_LAYER)
    for layer in layers:
        points = _bar_points(layer.name, layout)
        assert len(points) >= 5, layer.name
        rgb = tuple(aci2rgb(layer.colour))
        # within 2 px of where the DXF puts the bar (a pixel of rounding, a pixel of line)
        assert _share_with_hue(px, points, rgb) >= 0.9, layer.name
        # and not just any bar colour: another layer's colour shows at few of these places
        for other in layers:
            if other is not layer:
                other_rgb = tuple(aci2rgb(other.colour))
                assert _share_with_hue(px, points, other_rgb) <= 0.3, (layer.name, other.name)


def test_title_block_text_is_drawn_inside_its_box():
    # A left/middle TEXT (DXF reference, TEXT: 72 = 0 left, 73 = 2 middle) sits on its
    # alignment point, cap height 40 = h centred on it; a sans-serif glyph is at least 0.4 h
    # wide on average (common practice). Ink = navy title colour ACI 174 (0, 0, 127)
    # blended with white, or darker.
    doc = read_doc(sample_dxf())
    layout = doc.layouts.get("Strip S1")
    px = _pixels(_png("Strip S1"))
    texts = {t.dxf.text: t for t in layout.query("TEXT")}
    title = texts["Quayside Terrace - level 2 floor slab"]
    assert (title.dxf.halign, title.dxf.valign) == (0, 2)

    def dark_share(x0: float, x1: float, y_mid: float, h: float) -> float:
        rows = sorted(_pixel(0.0, y, px.shape[0])[0] for y in (y_mid - 0.4 * h, y_mid + 0.4 * h))
        cols = [_pixel(x, 0.0, px.shape[0])[1] for x in (x0, x1)]
        box = px[rows[0] : rows[1] + 1, cols[0] : cols[1] + 1]
        return float((box.max(axis=-1) <= 150).mean())

    ax, ay = title.dxf.align_point[0], title.dxf.align_point[1]
    h = title.dxf.height
    assert dark_share(ax, ax + 0.4 * h * len(title.dxf.text), ay, h) >= 0.04
    # the same band right of the short revision value "P1" holds nothing
    rev = texts["P1"]
    rx, ry = rev.dxf.align_point[0], rev.dxf.align_point[1]
    assert dark_share(rx + 4 * h, rx + 16 * h, ry, h) <= 0.005


def test_first_sheet_renders_to_the_same_bytes_and_keeps_the_callers_random_state():
    import random

    random.setstate(random.Random(99).getstate())
    state = random.getstate()
    again = render_png(sample_dxf(), "Strip S1", dpi=DPI)  # bytes in; _png passed bytes too
    assert random.getstate() == state
    assert again == _png("Strip S1")
    assert render_png(read_doc(sample_dxf()), "Strip S1", dpi=DPI) == again  # a document in


def test_png_chunks_follow_the_png_specification():
    # RFC 2083: 8-byte signature; chunks of length (4, big-endian), type, data, CRC-32 over
    # type and data; IHDR first (width, height, bit depth, colour type 2 = RGB, 0, 0, 0),
    # IEND last; pHYs in pixels per metre with unit 1; IDAT a zlib stream of one filter byte
    # plus 3 bytes per pixel for each row.
    import struct
    import zlib

    png = _png("Strip S2")
    pos, chunks = 8, []
    while pos < len(png):
        (length,) = struct.unpack(">I", png[pos : pos + 4])
        kind, data = png[pos + 4 : pos + 8], png[pos + 8 : pos + 8 + length]
        (crc,) = struct.unpack(">I", png[pos + 8 + length : pos + 12 + length])
        assert crc == zlib.crc32(kind + data), kind
        chunks.append((kind, data))
        pos += 12 + length
    kinds = [k for k, _ in chunks]
    assert kinds[0] == b"IHDR" and kinds[-1] == b"IEND" and b"IDAT" in kinds
    width, height, depth, colour, *rest = struct.unpack(">IIBBBBB", chunks[0][1])
    assert (depth, colour, rest) == (8, 2, [0, 0, 0])
    # S2 is on A2 landscape, 594 x 420 mm
    assert width == pytest.approx(594 / 25.4 * DPI, abs=1)
    assert height == pytest.approx(420 / 25.4 * DPI, abs=1)
    ppm_x, ppm_y, unit = struct.unpack(">IIB", dict(chunks)[b"pHYs"])
    assert unit == 1 and ppm_x == ppm_y == pytest.approx(DPI / 0.0254, abs=1)
    raw = zlib.decompress(b"".join(d for k, d in chunks if k == b"IDAT"))
    assert len(raw) == height * (1 + 3 * width)
    rows = np.frombuffer(raw, dtype=np.uint8).reshape(height, 1 + 3 * width)
    assert set(np.unique(rows[:, 0]).tolist()) <= {0, 1, 2, 3, 4}  # the five filter types
    assert np.array_equal(rows[:, 1:].reshape(height, width, 3), _pixels(png))  # filter None


# --- holes: nested boundaries of a fill alternate filled and empty --------------------------


def _small_sheet(width_mm: float = 60.0, height_mm: float = 40.0):
    import ezdxf

    doc = ezdxf.new()
    layout = doc.layouts.get("Layout1")
    layout.page_setup(size=(width_mm, height_mm), margins=(0, 0, 0, 0), units="mm")
    for vp in list(layout.query("VIEWPORT")):
        layout.delete_entity(vp)
    return doc, layout


def _square(cx: float, cy: float, half: float, clockwise: bool) -> list[tuple[float, float]]:
    corners = [(cx - half, cy - half), (cx + half, cy - half), (cx + half, cy + half)]
    corners.append((cx - half, cy + half))
    return corners[::-1] if clockwise else corners


@settings(max_examples=12, deadline=None)
@given(st_h.lists(st_h.booleans(), min_size=1, max_size=4))
def test_nested_hatch_boundaries_alternate_whatever_their_direction(clockwise):
    # DXF reference, HATCH: hatch style 0 ("normal", odd parity): the area between the outer
    # boundary and the first island is filled, the next ring is not, and so on; the direction
    # a boundary is drawn in does not matter.
    doc, layout = _small_sheet()
    hatch = layout.add_hatch(color=1)
    hatch.dxf.hatch_style = 0
    halves = [18.0 - 4.0 * i for i in range(len(clockwise))]
    for half, cw in zip(halves, clockwise):
        hatch.paths.add_polyline_path(_square(30.0, 20.0, half, cw), is_closed=True)
    px = _pixels(render_png(doc, "Layout1", dpi=100))
    for i, half in enumerate(halves):
        x_mm = 30.0 - half + 2.0  # the middle of ring i (rings are 4 mm wide)
        row, col = _pixel(x_mm, 20.0, px.shape[0], dpi=100)
        red = tuple(px[row, col]) == pytest.approx((255, 0, 0), abs=8)
        white = tuple(px[row, col]) == pytest.approx((255, 255, 255), abs=8)
        assert (red, white) == ((True, False) if i % 2 == 0 else (False, True)), (i, clockwise)
    row, col = _pixel(30.0, 20.0, px.shape[0], dpi=100)  # inside the innermost boundary
    assert tuple(px[row, col]) == pytest.approx(
        (255, 0, 0) if len(halves) % 2 else (255, 255, 255), abs=8
    )


def test_letter_o_is_a_ring_with_its_counter():
    # A glyph's inner contour is a hole: the middle of a big "O" is paper. And it is the
    # glyph, not the empty box drawn for a missing font: the corners of its ink box are paper.
    doc, layout = _small_sheet()
    layout.add_text("O", height=20.0, dxfattribs={"color": 7}).set_placement(
        (30.0, 20.0), align=TextEntityAlignment.MIDDLE_CENTER
    )
    px = _pixels(render_png(doc, "Layout1", dpi=100))
    ink = px.max(axis=-1) <= 60
    rows, cols = np.nonzero(ink)
    top, bottom, left, right = rows.min(), rows.max(), cols.min(), cols.max()
    # 20 mm cap height at 100 dpi is 79 px; an "O" overshoots it a little
    assert bottom - top == pytest.approx(20.0 / 25.4 * 100, rel=0.15)
    middle_row, middle_col = (top + bottom) // 2, (left + right) // 2
    assert ink[middle_row, left : left + 4].any() and ink[middle_row, right - 3 : right + 1].any()
    assert not ink[middle_row - 5 : middle_row + 6, middle_col - 5 : middle_col + 6].any()
    corner = max((right - left) // 10, 2)
    for r, c in ((top, left), (top, right - corner), (bottom - corner, left)):
        assert not ink[r : r + corner, c : c + corner].any(), (r, c)
    assert not ink[bottom - corner : bottom + 1, right - corner : right + 1].any()


def test_drawing_only_what_a_viewport_sees_changes_no_pixel(monkeypatch):
    """The quick boxes that keep other sheets' model space out of a viewport must never
    hide what the viewport shows: a sheet of a three-strip drawing renders to the same bytes
    with them as with ezdxf's own exact boxes (ezdxf measuring every entity, text by its
    glyphs). Not against no culling at all: hatches elsewhere would then draw the random
    offsets of their pattern lines in another order."""
    import ezdxf.bbox

    from detailer.build import make_issue
    from detailer.io.dxf_writer import build_layout
    from detailer.project import parse_project
    from tests.floor_factory import floor_yaml

    issue = make_issue(parse_project(floor_yaml(3, key=5), "floor.yaml"))
    doc = build_layout(issue.detail, issue.record.revisions)
    sheets = ("Strip F001", "Strip F002", "Strip F003")
    culled = [dxf_preview.render_png(doc, name, dpi=60) for name in sheets]
    monkeypatch.setattr(dxf_preview, "_bbox_cache", lambda doc: ezdxf.bbox.Cache())
    assert [dxf_preview.render_png(doc, name, dpi=60) for name in sheets] == culled


# --- the renderer: matplotlib's Agg, called directly, gives the pixels of a figure ----------


def _model_space_extras():
    """Model space with what the sheets seldom hold: DXF points and a zero-length line (drawn
    as dots), polylines of 128 vertices or more (which matplotlib marks for simplification),
    a fill of as many, a half-transparent fill over it, text, a circle, framed by what is
    drawn, as model space is."""
    import math

    import ezdxf

    doc = ezdxf.new()
    msp = doc.modelspace()
    msp.add_point((10.0, 5.0), dxfattribs={"color": 1})
    msp.add_line((0.0, 0.0), (0.0, 0.0), dxfattribs={"color": 3})
    ring = [(20 + 10 * math.cos(t / 40), 10 + 8 * math.sin(t / 40)) for t in range(200)]
    msp.add_lwpolyline(ring, dxfattribs={"color": 5, "lineweight": 50})
    wave = [(x, 3 * math.sin(x)) for x in np.linspace(0.0, 30.0, 150)]
    msp.add_lwpolyline(wave, dxfattribs={"color": 6})
    solid = msp.add_hatch(color=2)
    solid.paths.add_polyline_path(ring, is_closed=True)
    glass = msp.add_hatch(color=4)
    glass.paths.add_polyline_path([(0.0, 0.0), (15.0, 0.0), (15.0, 15.0)], is_closed=True)
    glass.transparency = 0.5
    msp.add_text("Ob 8", height=4.0, dxfattribs={"color": 7}).set_placement(
        (5.0, 20.0), align=TextEntityAlignment.MIDDLE_CENTER
    )
    msp.add_circle((30.0, 25.0), 4.0)
    return doc


@pytest.mark.parametrize(
    ("drawing", "layout", "dpi"),
    [("sample", "Strip S2", 60), ("extras", "Model", 37), ("extras", "Model", 100)],
)
def test_agg_called_directly_draws_the_pixels_of_a_matplotlib_figure(
    monkeypatch, drawing, layout, dpi
):
    """Oracle: matplotlib's public drawing path, a ``Figure`` with one axes filling it, one
    ``PathCollection`` per run of strokes or fills, drawn by ``FigureCanvasAgg`` (the way
    the previews were drawn before, and the way they are drawn when the Agg extension cannot
    be called directly). The direct calls must give the same PNG, byte for byte."""
    from detailer.io import preview_backend

    doc = read_doc(sample_dxf()) if drawing == "sample" else _model_space_extras()

    def no_figure(*args):
        raise AssertionError("the preview fell back to drawing a figure")

    def unusable():
        raise ImportError("Agg extension made unusable by the test")

    with monkeypatch.context() as patch:
        patch.setattr(preview_backend, "_render_figure", no_figure)
        direct = render_png(doc, layout, dpi=dpi)
    monkeypatch.setattr(preview_backend, "_agg_extension", unusable)
    through_figure = render_png(doc, layout, dpi=dpi)
    assert direct == through_figure
    px = _pixels(direct)
    assert _near(px, (255, 255, 255), 8) < px.shape[0] * px.shape[1]  # not a blank picture


def test_a_preview_imports_only_the_agg_extension_of_matplotlib():
    """Importing ``matplotlib.figure`` and ``backend_agg`` cost about half a second of a
    fresh preview worker's start (measured with ``python -X importtime``); the package's
    ``__init__`` alone a fifth. A preview rendered in a fresh process loads matplotlib's Agg
    extension from its file and no other matplotlib module; matplotlib imported afterwards
    (as the report plots do) takes that extension as its own and draws as usual."""
    import json
    import subprocess
    import sys
    from pathlib import Path

    code = (
        "import json, sys, ezdxf, numpy as np\n"
        "from detailer.io.dxf_preview import render_png\n"
        "doc = ezdxf.new()\n"
        "doc.layouts.new('Sheet').add_text('Ob 8', height=2.5)\n"
        "png = render_png(doc, 'Sheet', dpi=20)\n"
        "loaded = sorted(m for m in sys.modules if 'matplotlib' in m)\n"
        "from matplotlib.backends.backend_agg import FigureCanvasAgg\n"
        "from matplotlib.figure import Figure\n"
        "fig = Figure(figsize=(1, 1), dpi=50)\n"
        "fig.add_axes((0, 0, 1, 1)).plot([0, 1], [0, 1], color='black', linewidth=4)\n"
        "canvas = FigureCanvasAgg(fig)\n"
        "canvas.draw()\n"
        "red = np.asarray(canvas.buffer_rgba())[..., 0]\n"
        "inked = [int((red < 128).sum()), int((red < 128).any(axis=0).sum())]\n"
        "print(json.dumps([png[:8].hex(), loaded, inked]))\n"
    )
    root = Path(__file__).resolve().parents[1]
    done = subprocess.run(
        [sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=True
    )
    signature, loaded, inked = json.loads(done.stdout.strip().splitlines()[-1])
    assert signature == "89504e470d0a1a0a"  # RFC 2083 PNG signature
    assert loaded == ["matplotlib.backends._backend_agg"]
    # a black line 4 pt = 2.8 px wide across the diagonal of a 50 x 50 px figure: about
    # 50 * sqrt(2) * 2.8 = 200 dark pixels, some in every column
    dark, columns = inked
    assert dark == pytest.approx(200, rel=0.3) and columns == 50
