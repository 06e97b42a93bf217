"""The layout DXF: a valid R2013 mm drawing whose bars and dimensions read back as designed.

Sources of the expected values:
* spans, support widths, covers, thickness: the project file ``quayside-terrace.yaml``
  (S1 spans 4200, 5600, 5100, 4600 + 1500 cantilever; S2 supports at 0, 3600, 5400, 9000);
* curtailment: each bar end of the detail, measured in this test from the nearer support face
  (face = centreline -/+ width / 2, the project file's support widths);
* DXF header codes: Autodesk DXF Reference, $ACADVER AC1027 = AutoCAD 2013 file format and
  $INSUNITS 4 = millimetres (from memory);
* sheet sizes: ISO 216, A1 = 841 x 594 mm, A2 = 594 x 420 mm;
* standard scales 1:20, 1:25, 1:50, 1:75, 1:100: common practice for RC layout drawings.
"""

from __future__ import annotations

import math
import os
import subprocess
import sys

import ezdxf
import pytest
from dxf_fixtures import ROOT, alternate_detail, alternate_dxf, read_doc, sample_detail, sample_dxf

from detailer import CAUTION
from detailer.io import dxf_style as st
from detailer.io.dxf_readback import read_layout
from detailer.io.dxf_writer import write_layout, write_layout_file
from detailer.layout import BarRole

ISO_216 = {(841.0, 594.0), (594.0, 420.0)}
STANDARD_SCALES = {20, 25, 50, 75, 100}


def _fields(e) -> dict[str, str]:
    return st.parse_xdata(e.get_xdata(st.APPID)) if e.has_xdata(st.APPID) else {}


def test_file_reopens_and_audits_clean(tmp_path):
    path = tmp_path / "layout.dxf"
    write_layout_file(path, sample_detail())
    doc = ezdxf.readfile(path)
    auditor = doc.audit()
    assert auditor.errors == []
    assert auditor.fixes == []
    assert doc.dxfversion == "AC1027"
    assert doc.header["$INSUNITS"] == 4
    assert st.APPID in doc.appids


def test_layers_are_ours_with_distinct_colours():
    doc = read_doc(sample_dxf())
    colours = [layer.colour for layer in st.LAYERS]
    assert len(set(colours)) == len(colours)
    for layer in st.LAYERS:
        entry = doc.layers.get(layer.name)
        assert entry.dxf.color == layer.colour
        assert entry.dxf.linetype.upper() == layer.linetype.upper()
        assert entry.dxf.lineweight == layer.lineweight
    names = {layer.name for layer in st.LAYERS}
    for layout in doc.layouts:
        for e in layout:
            assert e.dxf.layer in names, (e.dxftype(), e.dxf.layer)


def test_one_sheet_per_strip_on_iso_paper_at_a_standard_scale():
    doc = read_doc(sample_dxf())
    assert [n for n in doc.layout_names() if n != "Model"] == ["Strip S1", "Strip S2"]
    sections = _section_boxes(doc)
    for strip_id in ("S1", "S2"):
        layout = doc.layouts.get(f"Strip {strip_id}")
        size = (layout.dxf_layout.dxf.paper_width, layout.dxf_layout.dxf.paper_height)
        assert size in ISO_216
        vps = [vp for vp in layout.query("VIEWPORT") if vp.dxf.id != 1]
        main = max(vps, key=lambda vp: vp.dxf.width * vp.dxf.height)
        scale = main.dxf.view_height / main.dxf.height
        assert round(scale) in STANDARD_SCALES and math.isclose(scale, round(scale))
        # the viewport lies on the sheet and shows every bar of the strip's section
        cx, cy = main.dxf.center.x, main.dxf.center.y
        assert 0 < cx - main.dxf.width / 2 and cx + main.dxf.width / 2 < size[0]
        assert 0 < cy - main.dxf.height / 2 and cy + main.dxf.height / 2 < size[1]
        vx, vy = main.dxf.view_center_point.x, main.dxf.view_center_point.y
        half_w, half_h = main.dxf.width * scale / 2, main.dxf.view_height / 2
        x0, y0, x1, y1 = sections[strip_id]
        assert vx - half_w <= x0 and x1 <= vx + half_w
        assert vy - half_h <= y0 and y1 <= vy + half_h


def _section_boxes(doc) -> dict[str, tuple[float, float, float, float]]:
    boxes: dict[str, list[float]] = {}
    for e in doc.modelspace().query("LWPOLYLINE"):
        f = _fields(e)
        if f.get("kind") == "bar" and f.get("view") == "section":
            pts = list(e.get_points("xy"))
            b = boxes.setdefault(f["strip"], [math.inf, math.inf, -math.inf, -math.inf])
            b[0] = min(b[0], *(p[0] for p in pts))
            b[1] = min(b[1], *(p[1] for p in pts))
            b[2] = max(b[2], *(p[0] for p in pts))
            b[3] = max(b[3], *(p[1] for p in pts))
    return {k: tuple(v) for k, v in boxes.items()}


def test_every_bar_entity_carries_its_schedule_data():
    doc = read_doc(sample_dxf())
    keys = {"mark", "strip", "set", "layer", "count", "size", "length", "shape", "x_start", "x_end"}
    sets = {(b.strip_id, b.set_id): b for s in sample_detail().strips for b in s.bar_sets}
    seen = set()
    for e in doc.modelspace():
        f = _fields(e)
        if f.get("kind") != "bar":
            continue
        assert e.dxf.layer.startswith("SW-BARS-")
        assert keys <= f.keys()
        b = sets[(f["strip"], f["set"])]
        assert (f["mark"], int(f["count"]), f["size"]) == (b.mark, b.count, f"H{b.phi_mm}")
        assert int(f["length"]) == b.shape.length_mm and f["shape"] == b.shape.code
        seen.add((f["strip"], f["set"]))
    assert seen == set(sets)


def test_readback_gives_the_detail_bars():
    """Marks, counts, lengths of every bar set; the drawn centre line as long as scheduled
    within the 5 mm rounding of BS 8666 dimensions (from memory) plus 1 mm for the bends."""
    back = read_layout(sample_dxf())
    drawn = {(b.strip_id, b.set_id): b for b in back.bars}
    detail = sample_detail()
    expected = {(b.strip_id, b.set_id): b for s in detail.strips for b in s.bar_sets}
    assert drawn.keys() == expected.keys()
    for key, b in expected.items():
        d = drawn[key]
        assert (d.mark, d.count, d.length_mm, d.layer) == (
            b.mark,
            b.count,
            b.shape.length_mm,
            b.layer,
        )
        assert d.x_start_mm == pytest.approx(b.x_start_mm, abs=0.05)
        assert d.x_end_mm == pytest.approx(b.x_end_mm, abs=0.05)
        assert d.drawn_x_min_mm == pytest.approx(b.x_start_mm, abs=b.phi_mm / 2 + 0.01)
        if b.role is BarRole.PRINCIPAL:
            assert d.drawn_x_max_mm == pytest.approx(b.x_end_mm, abs=b.phi_mm / 2 + 0.01)
            assert d.drawn_length_mm == pytest.approx(b.shape.length_mm, abs=6.0)
        else:  # the last distribution bar lies within one spacing of the end of the run
            assert b.x_end_mm - b.spacing_mm < d.drawn_x_max_mm <= b.x_end_mm + 0.01


def _faces(strip) -> list[float]:
    out = []
    for s in strip.supports:
        out += [s.x_mm] if s.width_mm == 0 else [s.x_mm - s.width_mm / 2, s.x_mm + s.width_mm / 2]
    return out


def _expected_curtailment(sd) -> list[float]:
    """Distances of principal bar ends from the nearer support face (ends at the slab ends,
    inside the end cover, are not curtailment points)."""
    strip = sd.strip
    first, last = strip.supports[0], strip.supports[-1]
    left = 0.0 if strip.has_left_cantilever else first.x_mm - first.width_mm / 2
    right = (
        last.x_mm + strip.right_end.cantilever_mm
        if strip.has_right_cantilever
        else last.x_mm + last.width_mm / 2
    )
    ends = set()
    for b in sd.bar_sets:
        if b.role is not BarRole.PRINCIPAL:
            continue
        face_kind = b.layer[0]
        for x in (b.x_start_mm, b.x_end_mm):
            if (
                abs(x - (left + strip.cover_side_mm)) < 1
                or abs(x - (right - strip.cover_side_mm)) < 1
            ):
                continue
            near = min(_faces(strip), key=lambda f: (abs(x - f), f))
            if abs(x - near) >= 1:
                ends.add((face_kind, round(near, 1), round(x, 1)))
    return sorted(abs(x - f) for _, f, x in ends)


def test_dimensions_measure_spans_and_curtailment():
    back = read_layout(sample_dxf())
    spans = {"S1": [4200.0, 5600.0, 5100.0, 4600.0, 1500.0], "S2": [3600.0, 1800.0, 3600.0]}
    for sd in sample_detail().strips:
        sid = sd.strip.id
        dims = [d for d in back.dimensions if d.strip_id == sid]
        got_spans = [d.measurement_mm for d in dims if d.kind == "span"]
        assert got_spans == pytest.approx(spans[sid], abs=1e-6)
        got = sorted(d.measurement_mm for d in dims if d.kind == "curtailment")
        assert got == pytest.approx(_expected_curtailment(sd), abs=1e-6)
        assert len(got) > 0


def test_cross_section_dimensions_are_the_project_covers():
    back = read_layout(sample_dxf())
    covers = {"S1": (30.0, 25.0, 25.0, 225.0), "S2": (25.0, 25.0, 25.0, 200.0)}
    for sid, (top, bottom, side, h) in covers.items():
        dims = {(d.kind, d.ref): d.measurement_mm for d in back.dimensions if d.strip_id == sid}
        assert dims[("cover", "top")] == pytest.approx(top)
        assert dims[("cover", "bottom")] == pytest.approx(bottom)
        assert dims[("cover", "side")] == pytest.approx(side)
        assert dims[("depth", "h")] == pytest.approx(h)


def test_dimension_text_reads_millimetres():
    """Our dimstyle has dimlfac 1: a 5600 mm span reads "5600" (ezdxf's default styles are set
    up for metre drawings and would print 560000)."""
    doc = read_doc(sample_dxf())
    checked = 0
    for dim in doc.modelspace().query("DIMENSION"):
        style = doc.dimstyles.get(dim.dxf.dimstyle)
        assert style.dxf.dimlfac == 1.0
        texts = [t.plain_text() for t in dim.get_geometry_block().query("MTEXT")]
        assert texts == [f"{dim.get_measurement():.0f}"]
        checked += 1
    assert checked > 30


def test_bars_lie_inside_the_concrete():
    for data in (sample_dxf(), alternate_dxf()):
        doc = read_doc(data)
        outlines = {}
        for e in doc.modelspace().query("LWPOLYLINE[layer=='SW-OUTLINE']"):
            f = _fields(e)
            if f.get("kind") == "outline":
                pts = list(e.get_points("xy"))
                outlines[f["strip"]] = (
                    min(p[0] for p in pts),
                    min(p[1] for p in pts),
                    max(p[0] for p in pts),
                    max(p[1] for p in pts),
                )
        for e in doc.modelspace().query("LWPOLYLINE"):
            f = _fields(e)
            if f.get("kind") != "bar" or f.get("view") != "section":
                continue
            x0, y0, x1, y1 = outlines[f["strip"]]
            for x, y, w in e.get_points("xyb"):  # bend arcs bulge inwards of their corners
                assert x0 < x < x1 and y0 < y < y1, (f["set"], x, y)


def test_callouts_in_the_section_are_the_trade_notation():
    doc = read_doc(sample_dxf())
    texts = {}
    for e in doc.modelspace().query("TEXT[layer=='SW-LABELS']"):
        f = _fields(e)
        if f.get("view") == "section":
            texts[(f["strip"], f["set"])] = e.dxf.text
    for sd in sample_detail().strips:
        for b in sd.bar_sets:
            assert texts[(b.strip_id, b.set_id)] == b.callout
    assert texts[("S1", "S1-B")] == "25H10-01-250 B1"  # 6200 - 2 x 25 side cover at 250: 25 bars


def test_notes_and_title_block_on_each_sheet():
    doc = read_doc(sample_dxf())
    project = sample_detail().project
    for sid in ("S1", "S2"):
        texts = [e.dxf.text for e in doc.layouts.get(f"Strip {sid}").query("TEXT")]
        joined = " ".join(texts)
        assert "1. All dimensions in mm. Do not scale." in texts
        assert "C32/40" in joined and "XC1" in joined
        for value in (
            project.title,
            project.id,
            project.drawing_ref,
            project.revision,
            project.date,
            f"Strip {sid} - reinforcement layout",
        ):
            assert value in joined
        assert "Caution:" in joined and "competent engineer" in joined
        assert CAUTION.split(";")[0].split(" ")[-1] in joined
        assert "l_bd = " in joined and "l_0 = " in joined


def test_two_writes_give_identical_bytes():
    data = write_layout(sample_detail())
    assert data == sample_dxf()
    assert ezdxf.options.write_fixed_meta_data_for_testing is False  # restored


def test_identical_bytes_in_another_process():
    """ezdxf orders some tables through sets; a process with other string hashes (``-R``:
    randomised hashing) must write the same file."""
    code = (
        "import sys; sys.path.insert(0, 'tests'); import dxf_fixtures as f; "
        "sys.stdout.buffer.write(f.sample_dxf())"
    )
    env = {k: v for k, v in os.environ.items() if not k.startswith("PYTHONHASH")}
    out = subprocess.run(
        [sys.executable, "-R", "-c", code],
        cwd=ROOT,
        env=env,
        capture_output=True,
        check=True,
        timeout=120,
    )
    assert out.stdout == sample_dxf()


def test_alternate_groups_are_drawn_apart_and_inside():
    """Staggered groups of one layer (offset_mm > 0) are drawn at a different level from the
    full-length group they overlap, so a reader can tell them apart."""
    doc = read_doc(alternate_dxf())
    detail = alternate_detail()
    staged = [b for s in detail.strips for b in s.bar_sets if b.offset_mm > 0]
    assert staged, "the test scenario must produce alternate bar groups"
    levels = {}
    for e in doc.modelspace().query("LWPOLYLINE"):
        f = _fields(e)
        if f.get("kind") == "bar" and f.get("view") == "section":
            levels[f["set"]] = {round(p[1], 3) for p in e.get_points("xy")}
    for b in staged:
        partners = [
            a
            for a in detail.strips[0].bar_sets
            if a.layer == b.layer
            and a.offset_mm == 0
            and a.x_start_mm < b.x_end_mm
            and b.x_start_mm < a.x_end_mm
        ]
        for a in partners:
            assert levels[a.set_id].isdisjoint(levels[b.set_id])


def test_unmarked_bar_sets_are_refused():
    from detailer.pipeline import detail_project
    from detailer.project import load_project

    raw = detail_project(load_project(str(ROOT / "sample_projects" / "quayside-terrace.yaml")))
    with pytest.raises(ValueError, match="no mark"):
        write_layout(raw)
