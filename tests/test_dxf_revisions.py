"""Revision table and revision markers of the layout DXF at a re-issue.

Scenario (our own): the sample project ``quayside-terrace.yaml`` issued at P1 (2025-03-14, its
project file), then re-issued with span 2 of strip S1 lengthened from 5600 to 6000 mm and the
date 2025-04-02; strip S2 is not edited.

Sources of the expected values:
* revision letters P1 -> P2: the project file's revision, then the next number (common practice,
  the rule of ``detailer.revisions``);
* which bar sets changed: the two issued records (JSON), compared set by set (same set id,
  different mark, size, shape, length or count); the strip not edited (S2) has none;
* the marker: a triangle with the revision letter inside, beside the item changed (common
  practice for revision marks on drawings);
* the table: columns Rev, Date, Description, one row per issue (common practice for a revision
  box above the title block); dates and descriptions from the records.
"""

from __future__ import annotations

import functools
import json
import tempfile
from pathlib import Path

import ezdxf
from dxf_fixtures import SAMPLE, read_doc

from detailer.build import make_issue
from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import Box, Text
from detailer.io.dxf_layout import text_box
from detailer.io.dxf_writer import layout_name, write_layout
from detailer.io.history import PreviousIssue
from detailer.io.json_writer import render_record_json
from detailer.project import load_project

SECOND_DATE = "2025-04-02"


def _fields(e) -> dict[str, str]:
    return st.parse_xdata(e.get_xdata(st.APPID)) if e.has_xdata(st.APPID) else {}


@functools.cache
def _issues():
    """(first issue, second issue, changed set ids from the two records' JSON)."""
    project = load_project(str(SAMPLE))
    first = make_issue(project)
    raw = render_record_json(first.record)
    data = json.loads(raw)
    previous = PreviousIssue(Path("quayside-terrace-l2-record.json"), data, raw)
    text = SAMPLE.read_text(encoding="utf-8")
    assert "spans_mm: [4200, 5600, 5100, 4600]" in text and "date: 2025-03-14" in text
    text = text.replace("spans_mm: [4200, 5600, 5100, 4600]", "spans_mm: [4200, 6000, 5100, 4600]")
    path = Path(tempfile.mkdtemp(prefix="sw-rev-")) / "quayside-terrace.yaml"
    path.write_text(text.replace("date: 2025-03-14", f"date: {SECOND_DATE}"), encoding="utf-8")
    edited = load_project(str(path))
    second = make_issue(edited, previous=previous)
    new = json.loads(render_record_json(second.record))
    # set ids are unique within a strip: key by (strip id, set id)
    old_bars = {(s["id"], b["set_id"]): b for s in data["strips"] for b in s["bar_sets"]}
    keys = ("mark", "type_and_size", "shape_code", "length_mm", "count")
    changed = frozenset(
        (s["id"], b["set_id"])
        for s in new["strips"]
        for b in s["bar_sets"]
        if (s["id"], b["set_id"]) not in old_bars
        or any(b[k] != old_bars[s["id"], b["set_id"]][k] for k in keys)
    )
    return first, second, changed


@functools.cache
def _second_dxf() -> bytes:
    _, second, changed = _issues()
    return write_layout(second.detail, revisions=second.record.revisions, changed_set_ids=changed)


@functools.cache
def _first_dxf() -> bytes:
    first, _, _ = _issues()
    return write_layout(first.detail, revisions=first.record.revisions)


def _table_rows(layout) -> dict[str, dict[str, str]]:
    """Revision -> column -> text, read from the table's TEXT entities of one sheet."""
    rows: dict[str, dict[str, list[tuple[float, str]]]] = {}
    for e in layout.query("TEXT MTEXT"):
        f = _fields(e)
        if f.get("kind") != "revision_table" or f.get("row") != "revision":
            continue
        assert e.dxf.layer == st.TITLE_LAYER.name
        text = e.dxf.text if e.dxftype() == "TEXT" else e.text
        y = e.get_placement()[1][1] if e.dxftype() == "TEXT" else e.dxf.insert[1]
        rows.setdefault(f["revision"], {}).setdefault(f["column"], []).append((-y, text))
    return {
        rev: {col: " ".join(t for _, t in sorted(parts)) for col, parts in cols.items()}
        for rev, cols in rows.items()
    }


def _row_y(layout, revision: str) -> float:
    for e in layout.query("TEXT"):
        f = _fields(e)
        if f.get("kind") == "revision_table" and f.get("revision") == revision:
            return e.get_placement()[1][1]
    raise AssertionError(revision)


def test_two_revisions_give_two_table_rows_on_every_sheet():
    _, second, _ = _issues()
    assert [r.revision for r in second.record.revisions] == ["P1", "P2"]
    doc = read_doc(_second_dxf())
    for sd in second.detail.strips:
        layout = doc.layouts.get(layout_name(sd.strip.id))
        rows = _table_rows(layout)
        assert set(rows) == {"P1", "P2"}
        assert rows["P1"] == {"rev": "P1", "date": "2025-03-14", "description": "first issue"}
        assert rows["P2"]["rev"] == "P2"
        assert rows["P2"]["date"] == SECOND_DATE
        assert rows["P2"]["description"] == second.record.revisions[-1].description
        assert "span 2 of S1 lengthened by 400 mm" in rows["P2"]["description"]
        # newest at the top: the table grows upwards from the title block
        assert _row_y(layout, "P2") > _row_y(layout, "P1")
        header = [e.dxf.text for e in layout.query("TEXT") if _fields(e).get("row") == "header"]
        assert header == ["Rev", "Date", "Description"]


def test_table_stands_on_the_title_block_clear_of_the_notes():
    doc = read_doc(_second_dxf())
    layout = doc.layouts.get(layout_name("S1"))
    table_ys = [
        e.get_placement()[1][1]
        for e in layout.query("TEXT")
        if _fields(e).get("kind") == "revision_table"
    ]
    notes_ys = [
        e.get_placement()[1][1] for e in layout.query(f"TEXT[layer=='{st.NOTES_LAYER.name}']")
    ]
    title = [e for e in layout.query(f"TEXT[layer=='{st.TITLE_LAYER.name}']") if not _fields(e)]
    title_top = max(e.get_placement()[1][1] for e in title)
    # every table text above every title-block text, below the last notes line (2.5 mm text)
    assert min(table_ys) > title_top
    assert max(table_ys) + 2.0 < min(notes_ys) - 2.5


def _markers(doc) -> list:
    return [e for e in doc.modelspace() if _fields(e).get("kind") == "revision_marker"]


def test_markers_only_beside_changed_sets_with_the_new_letter():
    _, second, changed = _issues()
    assert changed  # the lengthened span changes bars of S1
    assert {strip for strip, _ in changed} == {"S1"}  # S2 was not edited
    all_ids = {(b.strip_id, b.set_id) for sd in second.detail.strips for b in sd.bar_sets}
    assert changed < all_ids  # some of S1's sets keep their bars
    doc = read_doc(_second_dxf())
    markers = _markers(doc)
    tris = [e for e in markers if e.dxftype() == "LWPOLYLINE"]
    letters = [e for e in markers if e.dxftype() == "TEXT"]
    assert {(_fields(e)["strip"], _fields(e)["set"]) for e in tris} == changed
    assert {(_fields(e)["strip"], _fields(e)["set"]) for e in letters} == changed
    assert len(tris) == len(letters) == len(changed)  # one per set, beside its section callout
    for e in markers:
        assert e.dxf.layer == st.REVISION_LAYER.name
        assert _fields(e)["revision"] == "P2"
    assert {e.dxf.text for e in letters} == {"P2"}
    # nothing else is on the revision layer
    assert len(doc.modelspace().query(f"*[layer=='{st.REVISION_LAYER.name}']")) == len(markers)


def _key(e) -> tuple[str, str]:
    f = _fields(e)
    return (f["strip"], f["set"])


def _inside(p, tri) -> bool:
    (ax, ay), (bx, by), (cx, cy) = tri

    def side(x0, y0, x1, y1):
        return (x1 - x0) * (p[1] - y0) - (y1 - y0) * (p[0] - x0)

    s = (side(ax, ay, bx, by), side(bx, by, cx, cy), side(cx, cy, ax, ay))
    return all(v >= 0 for v in s) or all(v <= 0 for v in s)


def test_marker_is_a_triangle_round_its_letter_beside_its_callout():
    doc = read_doc(_second_dxf())
    msp = doc.modelspace()
    callouts = {
        _key(e): e
        for e in msp.query("TEXT")
        if _fields(e).get("kind") == "label" and _fields(e).get("view") == "section"
    }
    letters = {_key(e): e for e in _markers(doc) if e.dxftype() == "TEXT"}
    for e in _markers(doc):
        if e.dxftype() != "LWPOLYLINE":
            continue
        pts = [(p[0], p[1]) for p in e.get_points("xy")]
        assert e.closed and len(pts) == 3
        sides = [
            ((pts[i][0] - pts[i - 1][0]) ** 2 + (pts[i][1] - pts[i - 1][1]) ** 2) ** 0.5
            for i in range(3)
        ]
        assert max(sides) - min(sides) < 1e-6 * max(sides)  # equilateral
        sid = _key(e)
        letter = letters[sid]
        assert _inside(tuple(letter.get_placement()[1])[:2], pts)
        callout = callouts[sid]
        cy = callout.get_placement()[1][1]
        h = callout.dxf.height
        # on the callout's line, starting within a text height of the callout's end
        assert abs(sum(p[1] for p in pts) / 3 - cy) < h
        box = _text_box(callout)
        gap = min(abs(min(p[0] for p in pts) - box.x1), abs(box.x0 - max(p[0] for p in pts)))
        assert gap < h


def _text_box(e) -> Box:
    x, y = tuple(e.get_placement()[1])[:2]
    align = e.get_align_enum().name
    return text_box(Text("", e.dxf.text, x, y, e.dxf.height, align))


def test_markers_clear_every_other_text():
    doc = read_doc(_second_dxf())
    msp = doc.modelspace()
    tris = [e for e in _markers(doc) if e.dxftype() == "LWPOLYLINE"]
    others = [
        _text_box(e) for e in msp.query("TEXT") if _fields(e).get("kind") != "revision_marker"
    ]
    for e in tris:
        b = Box.around((p[0], p[1]) for p in e.get_points("xy"))
        for o in others:
            assert b.x1 <= o.x0 or o.x1 <= b.x0 or b.y1 <= o.y0 or o.y1 <= b.y0, (b, o)


def test_first_issue_has_one_row_and_no_marker():
    doc = read_doc(_first_dxf())
    assert _markers(doc) == []
    rows = _table_rows(doc.layouts.get(layout_name("S1")))
    assert rows == {"P1": {"rev": "P1", "date": "2025-03-14", "description": "first issue"}}


def test_without_revisions_no_table_and_no_marker():
    """Existing calls (no revision data) draw neither."""
    first, _, _ = _issues()
    doc = read_doc(write_layout(first.detail))
    assert _markers(doc) == []
    for name in doc.layout_names():
        if name != "Model":
            assert _table_rows(doc.layouts.get(name)) == {}


def test_audit_clean_and_layer_defined():
    doc = read_doc(_second_dxf())
    auditor = doc.audit()
    assert auditor.errors == [] and auditor.fixes == []
    entry = doc.layers.get(st.REVISION_LAYER.name)
    assert entry.dxf.color == st.REVISION_LAYER.colour
    others = {layer.colour for layer in st.LAYERS if layer is not st.REVISION_LAYER}
    assert st.REVISION_LAYER.colour not in others


def test_byte_stable():
    _, second, changed = _issues()
    again = write_layout(
        second.detail, revisions=second.record.revisions, changed_set_ids=set(changed)
    )
    assert again == _second_dxf()


def test_readback_passes_over_the_markers():
    """The audit's read-back sees the same bars and callouts with and without the markers."""
    from detailer.io.dxf_readback import read_layout

    _, second, _ = _issues()
    plain = read_layout(write_layout(second.detail))
    marked = read_layout(_second_dxf())
    assert [(b.strip_id, b.set_id, b.mark, b.count) for b in marked.bars] == [
        (b.strip_id, b.set_id, b.mark, b.count) for b in plain.bars
    ]
    assert sorted(lab.text for lab in marked.labels) == sorted(lab.text for lab in plain.labels)


def test_reads_with_ezdxf_from_file(tmp_path):
    path = tmp_path / "layout.dxf"
    path.write_bytes(_second_dxf())
    doc = ezdxf.readfile(path)
    assert st.REVISION_LAYER.name in doc.layers
