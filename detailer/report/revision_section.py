"""The report's "Revisions" section: the issued revisions and what changed at this one.

Pure formatting: the revision history and withdrawn marks come from the record's JSON-ready
form, the changes from a :class:`detailer.revisions.RevisionDiff` (the same comparison that
writes ``<project-id>-changes.md``), rendered as HTML tables. Lengths are whole mm and masses
kg to 0.001, as the record writes them.
"""

from __future__ import annotations

__all__ = ["revisions_section"]

from collections.abc import Sequence

from detailer.report.markup import Cell, Json, c, esc, num, table, tag
from detailer.revisions import BarView, RevisionDiff, StripChange

_BAR_HEADERS = ["Set", "Mark", "Type and size", "Shape code", "Length (mm)", "Bars"]
_STATUS = {"added": "strip added", "removed": "strip removed", "changed": ""}


def _kg(value: float) -> str:
    """A mass in kg as the record writes it (0.001 kg)."""
    return num(round(value, 3) + 0.0)


def _signed_kg(value: float) -> str:
    r = round(value, 3) + 0.0
    return ("+" if r > 0 else "") + num(r)


def _old_new(old: object, new: object) -> str:
    return f"{old} → {new}" if old != new else f"{new}"


def _history(r: Json) -> str:
    rows = [[c(x["revision"]), c(x["date"]), c(x["description"])] for x in r["revisions"]]
    current = ["current" if x["revision"] == r["revision"] else "" for x in r["revisions"]]
    return table(
        ["Rev", "Date", "Description"],
        rows,
        caption="Issued revisions, oldest first",
        cls="revisions",
        row_classes=current,
    )


def _bar_row(b: BarView) -> list[Cell]:
    return [
        c(b.set_id),
        c(b.mark),
        c(b.type_and_size),
        c(b.shape_code),
        c(b.length_mm, "num"),
        c(b.count, "num"),
    ]


def _changed_row(old: BarView, new: BarView) -> list[Cell]:
    return [
        c(new.set_id),
        c(_old_new(old.mark, new.mark)),
        c(_old_new(old.type_and_size, new.type_and_size)),
        c(_old_new(old.shape_code, new.shape_code)),
        c(_old_new(old.length_mm, new.length_mm), "num"),
        c(_old_new(old.count, new.count), "num"),
    ]


def _strip_changes(s: StripChange) -> str:
    status = _STATUS.get(s.status, s.status)
    parts = [tag("h3", f"Strip {esc(s.strip_id)}" + (f" ({esc(status)})" if status else ""))]
    sid = esc(s.strip_id)
    if s.geometry:
        parts.append(
            table(
                ["Change"],
                [[c(g)] for g in s.geometry],
                caption=f"{sid}: geometry and loads (spans, supports, loads)",
                cls="geometry",
            )
        )
    if s.added:
        parts.append(
            table(
                _BAR_HEADERS,
                [_bar_row(b) for b in s.added],
                caption=f"{sid}: bars added",
                cls="bars-added",
            )
        )
    if s.removed:
        parts.append(
            table(
                _BAR_HEADERS,
                [_bar_row(b) for b in s.removed],
                caption=f"{sid}: bars removed",
                cls="bars-removed",
            )
        )
    if s.changed:
        parts.append(
            table(
                _BAR_HEADERS,
                [_changed_row(a, b) for a, b in s.changed],
                caption=f"{sid}: bars changed (old &rarr; new)",
                cls="bars-changed",
            )
        )
    return "".join(parts)


def _marks_text(marks: Sequence[str]) -> str:
    return ", ".join(marks) if marks else "none"


def _mass(diff: RevisionDiff) -> str:
    rows = [[c(size), c(_signed_kg(v), "num")] for size, v in diff.mass_change_by_size_kg]
    rows.append([c("Total"), c(_signed_kg(diff.mass_change_kg), "num")])
    return table(
        ["Type and size", "Change in mass (kg)"],
        rows,
        caption=(
            f"Mass of reinforcement: total {esc(_kg(diff.old_total_kg))} kg &rarr; "
            f"{esc(_kg(diff.new_total_kg))} kg"
        ),
        cls="mass-change summary",
        row_classes=[""] * (len(rows) - 1) + ["total"],
    )


def _changes(diff: RevisionDiff) -> str:
    head = tag(
        "h3",
        f"Changes from revision {esc(diff.old_revision)} to {esc(diff.new_revision)}",
    )
    if diff.unchanged:
        return head + tag("p", "No change: same bars, geometry and loads.")
    parts = [head] + [_strip_changes(s) for s in diff.strips]
    parts.append(
        table(
            ["", ""],
            [
                [c("New marks"), c(_marks_text(diff.new_marks))],
                [c("Marks withdrawn at this revision"), c(_marks_text(diff.withdrawn_marks))],
            ],
            caption="Bar marks",
            cls="marks kv",
        )
    )
    parts.append(_mass(diff))
    return "".join(parts)


def revisions_section(r: Json, changes: RevisionDiff | None) -> str:
    """The "Revisions" section of the report (``r``: the record's JSON-ready form)."""
    if changes is not None and (
        changes.new_revision != r["revision"] or changes.project_id != r["project_id"]
    ):
        raise ValueError(
            f"the changes are for {changes.project_id} revision {changes.new_revision}, the "
            f"record is {r['project_id']} revision {r['revision']}"
        )
    parts = [tag("h2", "Revisions"), _history(r)]
    if changes is not None:
        parts.append(_changes(changes))
    elif len(r["revisions"]) <= 1:
        parts.append(
            tag("p", f"Revision {esc(r['revision'])} is the first issue: no earlier revision.")
        )
    withdrawn = r["withdrawn_marks"]
    parts.append(
        tag(
            "p",
            "Withdrawn marks (issued before, no longer used, never given to another bar): "
            + esc(_marks_text(withdrawn))
            + ".",
            cls="withdrawn",
        )
    )
    return tag("section", "".join(parts), cls="revisions", id="revisions")
