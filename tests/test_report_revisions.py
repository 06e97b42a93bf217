"""The report's "Revisions" section: issued revisions and the changes at this revision.

Sources: the revision table and the change list follow common practice for drawing and
schedule revisions (every issue listed oldest first with its date and a one-line description;
changed bars shown old -> new; withdrawn marks listed so they are never reused). The values
checked come from outside the report: the span edit is our own input (span 2 of S1 + 400 mm,
so the bottom bar of span 2 is 400 mm longer: the bar follows the span), and every changed
bar is checked against the :class:`detailer.revisions.RevisionDiff` that also writes the
change report. HTML syntax: WHATWG HTML, checked with the strict parser of
``tests/test_report_html.py``.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from functools import cache
from html.parser import HTMLParser
from pathlib import Path

import pytest

from detailer.build import Issue, make_issue
from detailer.io.history import PreviousIssue
from detailer.io.json_writer import render_record_json
from detailer.project import parse_project
from detailer.record import record_to_jsonable
from detailer.report import render_report
from detailer.revisions import RevisionDiff, compare_records, render_changes, view_of
from tests.test_report_html import StrictChecker

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"
SPANS = "spans_mm: [4200, 5600, 5100, 4600]"
ARROW = " → "


def _project(spans: tuple[int, ...] = (4200, 5600, 5100, 4600)):
    text = SAMPLE.read_text(encoding="utf-8")
    assert SPANS in text
    text = text.replace(SPANS, "spans_mm: [" + ", ".join(str(s) for s in spans) + "]")
    return parse_project(text, SAMPLE.name)


def _as_previous(issue: Issue) -> PreviousIssue:
    raw = render_record_json(issue.record)
    return PreviousIssue(Path("prev-record.json"), json.loads(raw), raw)


@cache
def _first() -> Issue:
    return make_issue(_project())


@cache
def _second() -> Issue:
    return make_issue(_project((4200, 6000, 5100, 4600)), previous=_as_previous(_first()))


@cache
def _diff() -> RevisionDiff:
    return compare_records(
        view_of(record_to_jsonable(_first().record)), view_of(record_to_jsonable(_second().record))
    )


def _html(issue: Issue, changes: RevisionDiff | None) -> bytes:
    return render_report(
        issue.detail,
        issue.record,
        issue.schedule,
        input_name=SAMPLE.name,
        input_sha256="0" * 64,
        changes=changes,
    )


@cache
def _first_html() -> bytes:
    return _html(_first(), None)


@cache
def _second_html() -> bytes:
    return _html(_second(), _diff())


@dataclass
class Table:
    cls: str
    caption: str = ""
    rows: list[list[str]] = field(default_factory=list)


class SectionTables(HTMLParser):
    """The tables (class, caption, cell texts) and the text of ``<section id="revisions">``."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tables: list[Table] = []
        self.text: list[str] = []
        self.sections: list[int] = []  # depth of the revisions section when inside it
        self._depth = 0
        self._in: str | None = None  # "caption" or "cell"
        self._row_is_body = False

    def handle_starttag(self, tag, attrs):
        if tag in ("meta", "br", "hr", "img", "link", "col", "wbr", "input"):
            return
        self._depth += 1
        a = dict(attrs)
        if tag == "section" and a.get("id") == "revisions":
            self.sections.append(self._depth)
        if not self.sections:
            return
        if tag == "table":
            self.tables.append(Table(a.get("class") or ""))
        elif tag == "caption":
            self._in = "caption"
        elif tag == "tbody":
            self._row_is_body = True
        elif tag == "tr" and self._row_is_body:
            self.tables[-1].rows.append([])
        elif tag == "td" and self._row_is_body:
            self.tables[-1].rows[-1].append("")
            self._in = "cell"

    def handle_endtag(self, tag):
        if tag in ("caption", "td"):
            self._in = None
        if tag == "tbody":
            self._row_is_body = False
        if self.sections and tag == "section" and self._depth == self.sections[-1]:
            self.sections.pop()
            self.sections.append(-1)  # seen, now closed
        self._depth -= 1

    def handle_data(self, data):
        if not self.sections or self.sections[-1] == -1:
            return
        self.text.append(data)
        if self._in == "caption":
            self.tables[-1].caption += data
        elif self._in == "cell":
            self.tables[-1].rows[-1][-1] += data


def _section(html: bytes) -> SectionTables:
    p = SectionTables()
    p.feed(html.decode("utf-8"))
    p.close()
    assert p.sections == [-1], "exactly one revisions section"
    return p


def _tables(p: SectionTables, cls: str) -> list[Table]:
    return [t for t in p.tables if cls in t.cls.split()]


def _strict_ok(html: bytes) -> None:
    checker = StrictChecker()
    checker.feed(html.decode("utf-8"))
    checker.close()
    assert checker.errors == []
    assert checker.stack == []


# ---------------------------------------------------------------------------------- tests


def test_first_issue_says_so() -> None:
    p = _section(_first_html())
    (history,) = _tables(p, "revisions")
    assert history.rows == [["P1", _first().record.date, "first issue"]]
    text = " ".join(" ".join(p.text).split())
    assert "first issue" in text
    assert "Changes from revision" not in text
    _strict_ok(_first_html())


def test_section_is_near_the_top() -> None:
    """Before the overview and the first strip: the reader sees the issue state first."""
    text = _second_html().decode("utf-8")
    at = text.index('<section class="revisions" id="revisions">')
    assert at < text.index("<caption>Overview</caption>")
    assert at < text.index('<section class="strip"')


def test_both_revisions_listed_after_rebuild() -> None:
    p = _section(_second_html())
    (history,) = _tables(p, "revisions")
    rec = _second().record
    assert [row[0] for row in history.rows] == ["P1", "P2"]
    assert history.rows == [[x.revision, x.date, x.description] for x in rec.revisions]
    assert history.rows[1][2].startswith("span 2 of S1 lengthened by 400 mm")
    assert "Changes from revision P1 to P2" in " ".join(p.text)
    _strict_ok(_second_html())


def test_geometry_change_is_shown() -> None:
    p = _section(_second_html())
    geometry = {t.caption.split(":")[0]: t for t in _tables(p, "geometry")}
    assert set(geometry) == {"S1"}  # only S1's span was edited
    assert ["span 2 lengthened by 400 mm (5600 -> 6000 mm)"] in geometry["S1"].rows


def test_changed_bars_old_to_new_equal_the_diff() -> None:
    diff = _diff()
    p = _section(_second_html())
    shown = {t.caption.split(":")[0]: t.rows for t in _tables(p, "bars-changed")}
    expected = {s.strip_id: s.changed for s in diff.strips if s.changed}
    assert set(shown) == set(expected) and expected
    for sid, pairs in expected.items():
        rows = {row[0]: row for row in shown[sid]}
        assert set(rows) == {new.set_id for _, new in pairs}
        for old, new in pairs:
            row = rows[new.set_id]
            assert row[4] == (
                f"{old.length_mm}{ARROW}{new.length_mm}"
                if old.length_mm != new.length_mm
                else str(new.length_mm)
            )
            assert row[5] == (
                f"{old.count}{ARROW}{new.count}" if old.count != new.count else str(new.count)
            )
            assert row[2].split(ARROW)[-1] == new.type_and_size
            assert row[1].split(ARROW) == (
                [new.mark] if old.mark == new.mark else [old.mark, new.mark]
            )
    # The bottom bar of the lengthened span follows it: 5500 -> 5900 mm (our own edit, +400).
    b = {row[0]: row for row in shown["S1"]}["S2-B"]
    assert b[4] == f"5500{ARROW}5900"


def test_added_and_removed_bars_equal_the_diff() -> None:
    diff = _diff()
    p = _section(_second_html())
    for kind, attr in (("bars-added", "added"), ("bars-removed", "removed")):
        shown = {t.caption.split(":")[0]: t.rows for t in _tables(p, kind)}
        want = {
            s.strip_id: [
                [b.set_id, b.mark, b.type_and_size, b.shape_code, str(b.length_mm), str(b.count)]
                for b in getattr(s, attr)
            ]
            for s in diff.strips
            if getattr(s, attr)
        }
        assert shown == want, kind


def test_mass_change_and_marks() -> None:
    """Mass per size as the record writes kg (0.001); the total is the sum of the sizes."""
    diff = _diff()
    p = _section(_second_html())
    (mass,) = _tables(p, "mass-change")
    rows = dict(mass.rows)
    for size, v in diff.mass_change_by_size_kg:
        assert float(rows[size]) == pytest.approx(v, abs=5e-4)
    assert float(rows["Total"]) == pytest.approx(diff.mass_change_kg, abs=5e-4)
    assert rows["Total"].startswith("+")  # a longer span needs more steel
    new_total = json.dumps(record_to_jsonable(_second().record)["total_mass_kg"])
    assert mass.caption.endswith(f"→ {new_total} kg")
    (marks,) = _tables(p, "marks")
    m = dict(marks.rows)
    assert m["Marks withdrawn at this revision"] == ", ".join(diff.withdrawn_marks)
    assert diff.withdrawn_marks  # the old marks of the changed bars are withdrawn
    text = " ".join(p.text)
    assert ", ".join(_second().record.withdrawn_marks) in text


def test_diff_is_the_change_report() -> None:
    """The diff the report shows is the one that wrote the change report (changes.md)."""
    assert render_changes(_diff()) == _second().changes


def test_same_input_same_bytes() -> None:
    again = make_issue(_project((4200, 6000, 5100, 4600)), previous=_as_previous(_first()))
    diff = compare_records(
        view_of(record_to_jsonable(_first().record)), view_of(record_to_jsonable(again.record))
    )
    assert _html(again, diff) == _second_html()


def test_changes_for_another_revision_refused() -> None:
    with pytest.raises(ValueError, match="revision P2"):
        _html(_first(), _diff())
