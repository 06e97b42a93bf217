"""Audit of a layout drawing against the schedule CSV: each kind of edit is found, nothing else.

The drawings are edited with ezdxf the way a person would in CAD (a callout deleted, its
count or size retyped, a bar stretched); the schedule CSV is edited as a text file. The
reference for what must be found is the edit itself; the callout notation is the trade's
(number, type and size, mark, spacing, layer: "25H12-03-200 B1", common practice).
"""

from __future__ import annotations

import dataclasses

import pytest
from dxf_fixtures import read_doc, sample_csv, sample_detail, sample_dxf
from hypothesis import given, settings
from hypothesis import strategies as hs

from detailer.audit import (
    FindingKind,
    ScheduleLine,
    audit_layout,
    parse_schedule_csv,
    run_audit,
)
from detailer.errors import InputError
from detailer.io import dxf_style as st
from detailer.io.dxf_readback import parse_callout, read_layout, readback
from detailer.layout import BarRole
from detailer.schedule import schedule_for_project


def _sets(strip_id: str = "S1"):
    detail = sample_detail()
    return {b.set_id: b for s in detail.strips if s.strip.id == strip_id for b in s.bar_sets}


def _count_of_mark(strip_id: str, mark: str) -> int:
    return sum(b.count for b in _sets(strip_id).values() if b.mark == mark)


def _callout_entity(doc, strip_id: str, set_id: str):
    for e in doc.modelspace().query("TEXT"):
        if e.has_xdata(st.APPID):
            f = st.parse_xdata(e.get_xdata(st.APPID))
            if (f.get("strip"), f.get("set"), f.get("view")) == (strip_id, set_id, "section"):
                return e
    raise AssertionError(f"no callout for {strip_id}/{set_id}")


def _schedule() -> tuple[ScheduleLine, ...]:
    return parse_schedule_csv(sample_csv().decode("utf-8"))


def _write(tmp_path, doc=None, csv_text: str | None = None):
    dxf = tmp_path / "layout.dxf"
    csv = tmp_path / "schedule.csv"
    if doc is None:
        dxf.write_bytes(sample_dxf())
    else:
        doc.saveas(dxf)
    csv.write_text(
        csv_text if csv_text is not None else sample_csv().decode("utf-8"), encoding="utf-8"
    )
    return dxf, csv


def test_drawing_and_schedule_as_written_agree(tmp_path):
    report = run_audit(*_write(tmp_path))
    assert report.ok, [str(f) for f in report.findings]


def test_schedule_csv_reads_back_as_the_schedule_rows():
    rows = schedule_for_project(sample_detail()).rows
    parsed = _schedule()
    assert [
        (p.member, p.mark, p.type_and_size, p.n_bars_each, p.length_mm, p.shape_code)
        for p in parsed
    ] == [
        (r.member, r.mark, r.type_and_size, r.n_bars_each, r.length_mm, r.shape_code) for r in rows
    ]


def test_edits_in_the_drawing_are_each_found(tmp_path):
    """A deleted callout, a retyped count and a retyped size: three findings, nothing else."""
    sets = _sets()
    deleted, recounted, resized = sets["S2-B"], sets["S3-B"], sets["S4-B"]
    assert len({deleted.mark, recounted.mark, resized.mark}) == 3
    doc = read_doc(sample_dxf())
    doc.modelspace().delete_entity(_callout_entity(doc, "S1", deleted.set_id))
    e = _callout_entity(doc, "S1", recounted.set_id)
    e.dxf.text = e.dxf.text.replace(f"{recounted.count}H", f"{recounted.count + 2}H", 1)
    e = _callout_entity(doc, "S1", resized.set_id)
    e.dxf.text = e.dxf.text.replace(f"H{resized.phi_mm}-", "H32-", 1)

    report = run_audit(*_write(tmp_path, doc))
    got = sorted(
        ((f.kind, f.member, f.mark, f.drawing, f.schedule) for f in report.findings), key=str
    )
    n = _count_of_mark("S1", recounted.mark)
    assert got == sorted(
        [
            (FindingKind.LABEL_MISSING, "S1", deleted.mark, "", ""),
            (FindingKind.COUNT, "S1", recounted.mark, str(n + 2), str(n)),
            (FindingKind.SIZE, "S1", resized.mark, "H32", f"H{resized.phi_mm}"),
        ],
        key=str,
    )
    assert not report.ok
    assert all("\n" not in str(f) for f in report.findings)


def test_a_retyped_callout_without_xdata_still_counts(tmp_path):
    """A callout deleted and typed again as plain text is joined to its bar set by mark."""
    b = _sets()["S2-B"]
    doc = read_doc(sample_dxf())
    old = _callout_entity(doc, "S1", b.set_id)
    x, y = old.get_placement()[1].x, old.get_placement()[1].y
    doc.modelspace().delete_entity(old)
    doc.modelspace().add_text(
        b.callout, height=125, dxfattribs={"layer": "SW-LABELS"}
    ).set_placement((x, y))
    report = run_audit(*_write(tmp_path, doc))
    assert report.ok, [str(f) for f in report.findings]


def test_bars_deleted_from_the_drawing_are_missing(tmp_path):
    b = _sets()["S1-B"]
    assert sum(1 for x in _sets().values() if x.mark == b.mark) == 1
    doc = read_doc(sample_dxf())
    msp = doc.modelspace()
    for e in list(msp):
        if e.has_xdata(st.APPID):
            f = st.parse_xdata(e.get_xdata(st.APPID))
            if (f.get("strip"), f.get("set")) == ("S1", b.set_id):
                msp.delete_entity(e)
    report = run_audit(*_write(tmp_path, doc))
    got = [(f.kind, f.member, f.mark) for f in report.findings]
    assert got == [(FindingKind.MISSING_IN_DRAWING, "S1", b.mark)]


def test_a_stretched_bar_is_found(tmp_path):
    b = _sets()["S2-B"]
    doc = read_doc(sample_dxf())
    for e in doc.modelspace().query("LWPOLYLINE"):
        f = st.parse_xdata(e.get_xdata(st.APPID)) if e.has_xdata(st.APPID) else {}
        if (f.get("set"), f.get("view"), f.get("strip")) == (b.set_id, "section", "S1"):
            pts = list(e.get_points("xyb"))
            pts[-1] = (pts[-1][0] + 600.0, pts[-1][1], pts[-1][2])
            e.set_points(pts, format="xyb")
    report = run_audit(*_write(tmp_path, doc))
    kinds = {(f.kind, f.mark) for f in report.findings}
    assert kinds == {(FindingKind.GEOMETRY, b.mark)}
    assert len(report.findings) == 2  # drawn extent and drawn length


def test_edits_in_the_schedule_are_found(tmp_path):
    rows = _schedule()
    dropped, relengthed = rows[0], rows[1]
    lines = sample_csv().decode("utf-8").split("\n")
    lines.pop(dropped.line - 1)
    i = relengthed.line - 2  # one line above it is gone now
    lines[i] = lines[i].replace(f",{relengthed.length_mm},", f",{relengthed.length_mm + 50},", 1)
    report = run_audit(*_write(tmp_path, csv_text="\n".join(lines)))
    got = sorted(((f.kind, f.member, f.mark) for f in report.findings), key=str)
    assert got == sorted(
        [
            (FindingKind.MISSING_IN_SCHEDULE, dropped.member, dropped.mark),
            (FindingKind.LENGTH, relengthed.member, relengthed.mark),
        ],
        key=str,
    )


def test_spreadsheet_marks_without_leading_zero_still_match(tmp_path):
    """A spreadsheet turns mark "01" into 1; the audit compares marks as numbers."""
    text = sample_csv().decode("utf-8").replace(",01,", ",1,").replace(",02,", ",2,")
    assert run_audit(*_write(tmp_path, csv_text=text)).ok


def test_callout_parser():
    c = parse_callout("25H12-03-200 B1")
    assert (c.count, c.type_and_size, c.mark, c.spacing_mm, c.layer) == (25, "H12", "03", 200, "B1")
    assert parse_callout("H12-03-200") is None
    assert parse_callout("T1: H10-08-250") is None


@pytest.mark.parametrize(
    ("dxf_text", "message"),
    [
        (None, "no such drawing file"),
        ("this is not a drawing\n", "cannot read the drawing"),
    ],
)
def test_unreadable_drawing_is_one_line(tmp_path, dxf_text, message):
    dxf = tmp_path / "bad.dxf"
    if dxf_text is not None:
        dxf.write_text(dxf_text)
    csv = tmp_path / "s.csv"
    csv.write_bytes(sample_csv())
    with pytest.raises(InputError, match=message) as exc:
        run_audit(dxf, csv)
    assert "\n" not in str(exc.value) and str(dxf) in str(exc.value)


def test_drawing_without_our_data_is_refused(tmp_path):
    import ezdxf

    path = tmp_path / "other.dxf"
    doc = ezdxf.new("R2013")
    doc.modelspace().add_line((0, 0), (1000, 0))
    doc.saveas(path)
    csv = tmp_path / "s.csv"
    csv.write_bytes(sample_csv())
    with pytest.raises(InputError, match="no slabwright bar data"):
        run_audit(path, csv)


@pytest.mark.parametrize(
    ("csv_text", "message"),
    [
        (None, "no such schedule file"),
        ("a,b\n1,2\n", "no schedule header row"),
        (
            (
                "Member,Bar mark,Type and size,No. of mbrs,No. of bars in each,Total no.,"
                "Length of each bar (mm),Shape code\nS1,01,H10,1,many,25,4275,00\n"
            ),
            ":2: column",
        ),
    ],
)
def test_unreadable_schedule_is_one_line(tmp_path, csv_text, message):
    dxf = tmp_path / "l.dxf"
    dxf.write_bytes(sample_dxf())
    csv = tmp_path / "s.csv"
    if csv_text is not None:
        csv.write_text(csv_text)
    with pytest.raises(InputError, match=message) as exc:
        run_audit(dxf, csv)
    assert "\n" not in str(exc.value)


_BACK = None


def _readback():
    global _BACK
    if _BACK is None:
        _BACK = read_layout(sample_dxf())
    return _BACK


@settings(max_examples=25, deadline=None)
@given(hs.dictionaries(hs.sampled_from(sorted(_sets())), hs.integers(-5, 5), max_size=6))
def test_count_findings_are_exactly_the_changed_marks(changes):
    """Property: retyping callout counts gives one count finding per mark whose total changed,
    with the drawing's total = the schedule's + the sum of the changes; nothing else."""
    back = _readback()
    sets = _sets()
    labels = []
    for lab in back.labels:
        delta = changes.get(lab.set_id, 0) if lab.strip_id == "S1" and lab.view == "section" else 0
        if delta and lab.callout is not None:
            c = dataclasses.replace(lab.callout, count=max(lab.callout.count + delta, 1))
            lab = dataclasses.replace(lab, callout=c)
        labels.append(lab)
    edited = dataclasses.replace(back, labels=tuple(labels))
    findings = audit_layout(edited, _schedule())
    expected = {}
    for set_id, delta in changes.items():
        b = sets[set_id]
        real = max(b.count + delta, 1) - b.count
        expected[b.mark] = expected.get(b.mark, 0) + real
    expected = {m: d for m, d in expected.items() if d}
    got = {f.mark: int(f.drawing) - int(f.schedule) for f in findings}
    assert all(f.kind is FindingKind.COUNT and f.member == "S1" for f in findings)
    assert got == expected


def test_readback_of_an_open_document_matches_the_file():
    doc = read_doc(sample_dxf())
    a, b = readback(doc), _readback()
    assert a.bars == b.bars and a.dimensions == b.dimensions
    principal = [x for x in a.bars if x.role == BarRole.PRINCIPAL.value]
    assert principal and all(x.drawn_length_mm is not None for x in principal)
