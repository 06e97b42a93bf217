"""Re-issue after a change: revision letters, stable marks, change report (pure part).

Sources: the revision-letter rule and the keep-marks rule are common practice for drawing and
schedule revisions (a bar keeps its mark while type and size, shape and dimensions are
unchanged; a withdrawn mark is never given to another bar). Mass per metre: BS 4449 nominal
(via the schedule). EN/BS clauses are not applicable to revision bookkeeping.
"""

from __future__ import annotations

import json
from functools import cache
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.build import Issue, make_issue
from detailer.io.history import PreviousIssue
from detailer.io.json_writer import render_record_json
from detailer.project import parse_project
from detailer.record import record_to_jsonable
from detailer.revisions import (
    choose_revision,
    compare_records,
    next_revision,
    render_changes,
    view_of,
)

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"
SPANS = "spans_mm: [4200, 5600, 5100, 4600]"


def _project(spans: tuple[int, ...] = (4200, 5600, 5100, 4600), revision: str = "P1"):
    text = SAMPLE.read_text(encoding="utf-8")
    assert SPANS in text
    text = text.replace(SPANS, "spans_mm: [" + ", ".join(str(s) for s in spans) + "]")
    text = text.replace("revision: P1", f"revision: {revision}")
    return parse_project(text, "quayside-terrace.yaml")


def _as_previous(issue: Issue) -> PreviousIssue:
    raw = render_record_json(issue.record)
    return PreviousIssue(Path("prev-record.json"), json.loads(raw), raw)


@cache
def _first() -> Issue:
    return make_issue(_project())


@cache
def _lengthened() -> Issue:
    return make_issue(_project((4200, 6000, 5100, 4600)), previous=_as_previous(_first()))


def _marks(issue: Issue) -> dict[tuple[str, str], str]:
    return {(s.strip.id, b.set_id): b.mark for s in issue.detail.strips for b in s.bar_sets}


@pytest.mark.parametrize(
    ("old", "new"),
    [
        ("P1", "P2"),
        ("P9", "P10"),
        ("C01", "C02"),
        ("C99", "C100"),
        ("A", "B"),
        ("Z", "AA"),
        ("AZ", "BA"),
        ("T3", "T4"),
    ],
)
def test_next_revision(old: str, new: str) -> None:
    """Common practice: the trailing number goes up keeping its width; letters like columns."""
    assert next_revision(old) == new


def test_next_revision_refuses_unknown_form() -> None:
    with pytest.raises(ValueError, match="project file"):
        next_revision("-")


def test_choose_revision_file_wins_when_not_issued() -> None:
    """Common practice: the engineer's own next revision (e.g. construction issue C01) wins."""
    assert choose_revision("C01", ("P1", "P2")) == "C01"
    assert choose_revision("P1", ("P1", "P2")) == "P3"
    assert choose_revision("P1", ()) == "P1"


def test_same_input_twice_is_no_new_revision() -> None:
    again = make_issue(_project(), previous=_as_previous(_first()))
    assert again.unchanged and again.previous_revision == "P1"
    assert render_record_json(again.record) == render_record_json(_first().record)


def test_lengthened_span_changes_only_dependent_bars() -> None:
    """Span 2 of S1 + 400 mm: bars of spans 1, 3, 4, the cantilever tip, the U-bar and every bar
    of S2 keep their marks (common practice: unchanged bars keep marks)."""
    old, new = _marks(_first()), _marks(_lengthened())
    assert set(old) == set(new)
    kept = [k for k in old if k[0] == "S2"] + [
        ("S1", s) for s in ("S1-B", "S3-B", "S4-B", "E-tip-B", "E-T-U")
    ]
    for key in kept:
        assert new[key] == old[key], key
    assert new[("S1", "S2-B")] != old[("S1", "S2-B")]
    lengths = {
        b.set_id: b.shape.length_mm
        for s in _lengthened().detail.strips
        if s.strip.id == "S1"
        for b in s.bar_sets
    }
    assert lengths["S2-B"] == 5500 + 400  # bottom bar of span 2 follows the span
    assert _lengthened().record.revision == "P2"
    assert _lengthened().description.startswith("span 2 of S1 lengthened by 400 mm")


def test_unchanged_schedule_rows_keep_revision_letter() -> None:
    old_rows = {(r.member, r.mark): r for r in _first().schedule.rows}
    new_rows = _lengthened().schedule.rows
    for r in new_rows:
        before = old_rows.get((r.member, r.mark))
        if before is not None and before.same_bars(r):
            assert r.revision == "P1" and r == before
        else:
            assert r.revision == "P2"
    assert sum(r.revision == "P1" for r in new_rows) >= 10  # S2's five rows and five of S1's


def test_mass_changes_add_up() -> None:
    old = view_of(record_to_jsonable(_first().record))
    new = view_of(record_to_jsonable(_lengthened().record))
    diff = compare_records(old, new)
    assert sum(v for _, v in diff.mass_change_by_size_kg) == pytest.approx(diff.mass_change_kg)
    assert diff.mass_change_kg == pytest.approx(new.total_mass_kg - old.total_mass_kg, abs=0.01)
    assert diff.mass_change_kg > 0  # a longer span needs more steel


def test_withdrawn_mark_never_reused() -> None:
    """Back to the first geometry at a third issue: the marks withdrawn at P2 stay unused."""
    second = _lengthened()
    withdrawn = set(second.record.withdrawn_marks)
    assert withdrawn
    third = make_issue(_project(), previous=_as_previous(second))
    assert third.record.revision == "P3"
    used = {m.mark for m in third.record.marks}
    assert not used & withdrawn
    assert withdrawn <= set(third.record.withdrawn_marks)
    assert [r.revision for r in third.record.revisions] == ["P1", "P2", "P3"]


def test_change_report_text() -> None:
    text = _lengthened().changes
    assert "span 2 lengthened by 400 mm (5600 -> 6000 mm)" in text
    assert "S2-B: 25 H10 mark 02 (5500 mm) -> 25 H10 mark" in text
    assert text == render_changes(
        compare_records(
            view_of(record_to_jsonable(_first().record)),
            view_of(record_to_jsonable(_lengthened().record)),
        )
    )


@settings(max_examples=15, deadline=None)
@given(span=st.integers(0, 3), delta=st.integers(-12, 12).map(lambda n: 50 * n))
def test_distant_spans_keep_marks(span: int, delta: int) -> None:
    """Editing one span never renames a bottom bar of a span two or more away whose zone design
    (bar size and spacing) is unchanged (common practice: unchanged bars keep marks)."""
    spans = [4200, 5600, 5100, 4600]
    spans[span] += delta
    new = make_issue(_project(tuple(spans)), previous=_as_previous(_first()))
    old_zones = {z.zone_id: z for z in _first().detail.strips[0].zones}
    new_zones = {z.zone_id: z for z in new.detail.strips[0].zones}
    old_marks, new_marks = _marks(_first()), _marks(new)
    for k in range(4):
        if abs(k - span) < 2:
            continue
        zid = f"S{k + 1}-B"
        a, b = old_zones[zid], new_zones[zid]
        if (a.phi_mm, a.spacing_mm) == (b.phi_mm, b.spacing_mm):
            assert new_marks[("S1", zid)] == old_marks[("S1", zid)]
    assert all(new_marks[key] == old_marks[key] for key in old_marks if key[0] == "S2")
