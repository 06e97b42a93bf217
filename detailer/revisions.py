"""Re-issue after a change: revision letters, and what changed between two records.

Pure: works on records read back with ``json.load`` (or made by
``record_to_jsonable``), turned into small typed views first; no I/O.

Revision rule (common practice for drawing and schedule revisions):

- the trailing number of a revision goes up by one, keeping its width: ``P1 -> P2``,
  ``P9 -> P10``, ``C01 -> C02``, ``C99 -> C100``;
- a revision of letters only goes up like a column name: ``A -> B``, ``Z -> AA``;
- the project file's revision is used instead when it differs from every revision issued so far
  (the engineer chose the next revision, e.g. ``P3 -> C01`` at construction issue);
- nothing changed (same bars, geometry and loads): no new revision, nothing is written.

Bars keep their marks when their type and size, shape and dimensions are unchanged
(:func:`detailer.marks.assign_marks`, common practice); a withdrawn mark is never reused.
"""

from __future__ import annotations

__all__ = [
    "RecordView",
    "RevisionDiff",
    "StripChange",
    "choose_revision",
    "compare_records",
    "describe",
    "next_revision",
    "previous_rows",
    "render_changes",
    "same_content",
    "view_of",
]

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any, Final

from detailer.marks import BarIdentity
from detailer.schedule import ScheduleRow

# Keys of a record that say which issue it is, not what was designed.
_ISSUE_KEYS: Final = frozenset({"revision", "date", "revisions", "schedule"})


def next_revision(revision: str) -> str:
    """The revision after ``revision`` (see the module docstring); ValueError if none."""
    text = revision.strip()
    digits = len(text) - len(text.rstrip("0123456789"))
    if digits:
        head, number = text[:-digits], text[-digits:]
        return f"{head}{int(number) + 1:0{digits}d}"
    if text.isalpha() and text.isascii():
        letters = list(text)
        i = len(letters) - 1
        while i >= 0:
            base = "A" if letters[i].isupper() else "a"
            if letters[i] in "Zz":
                letters[i] = base
                i -= 1
                continue
            letters[i] = chr(ord(letters[i]) + 1)
            return "".join(letters)
        return ("A" if text[0].isupper() else "a") + "".join(letters)
    raise ValueError(
        f"cannot work out the revision after {revision!r}; give the next revision in the "
        "project file (project: revision:)"
    )


def choose_revision(file_revision: str, issued: Sequence[str]) -> str:
    """The revision of a new issue: the file's if not issued yet, else the next after the last."""
    if not issued:
        return file_revision
    if file_revision not in issued:
        return file_revision
    return next_revision(issued[-1])


def same_content(old: Mapping[str, Any], new: Mapping[str, Any]) -> bool:
    """True when two records (JSON data) differ only in which issue they are."""

    def body(data: Mapping[str, Any]) -> dict[str, Any]:
        return {k: v for k, v in data.items() if k not in _ISSUE_KEYS}

    return body(old) == body(new)


# --------------------------------------------------------------------------------------------
# Typed views of a record


@dataclass(frozen=True, slots=True)
class BarView:
    """One bar set of a strip as the change report sees it."""

    set_id: str
    mark: str
    type_and_size: str
    shape_code: str
    length_mm: int
    count: int

    def text(self) -> str:
        return f"{self.count} {self.type_and_size} mark {self.mark} ({self.length_mm} mm)"


@dataclass(frozen=True, slots=True)
class StripView:
    id: str
    spans_mm: tuple[float, ...]
    supports: tuple[tuple[str, float, float], ...]  # label, x_mm, width_mm
    segment_loads: tuple[tuple[str, str], ...]  # segment label, load text
    bars: tuple[BarView, ...]


@dataclass(frozen=True, slots=True)
class RecordView:
    project_id: str
    revision: str
    revisions: tuple[str, ...]
    strips: tuple[StripView, ...]
    mass_by_size_kg: tuple[tuple[str, float], ...]  # type and size, mass; sorted
    total_mass_kg: float


def _load_text(seg: Mapping[str, Any]) -> str:
    parts = [f"g_k {seg['g_k_kn_per_m2']:g} kN/m2", f"q_k {seg['q_k_kn_per_m2']:g} kN/m2"]
    for p in seg["partial_loads"]:
        parts.append(
            f"partial g_k {p['g_k_kn_per_m2']:g} q_k {p['q_k_kn_per_m2']:g} kN/m2 "
            f"from {p['start_mm']:g} to {p['end_mm']:g} mm"
        )
    for ln in seg["line_loads"]:
        parts.append(
            f"line g_k {ln['g_k_kn_per_m']:g} q_k {ln['q_k_kn_per_m']:g} kN/m at {ln['a_mm']:g} mm"
        )
    return "; ".join(parts)


def view_of(data: Mapping[str, Any]) -> RecordView:
    """The typed view of a record (JSON data); KeyError/TypeError if it is damaged."""
    strips = []
    for s in data["strips"]:
        bars = tuple(
            BarView(
                set_id=str(b["set_id"]),
                mark=str(b["mark"]),
                type_and_size=str(b["type_and_size"]),
                shape_code=str(b["shape_code"]),
                length_mm=int(b["length_mm"]),
                count=int(b["count"]),
            )
            for b in s["bar_sets"]
        )
        strips.append(
            StripView(
                id=str(s["id"]),
                spans_mm=tuple(float(x) for x in s["spans_mm"]),
                supports=tuple(
                    (str(x["label"]), float(x["x_mm"]), float(x["width_mm"])) for x in s["supports"]
                ),
                segment_loads=tuple((str(g["label"]), _load_text(g)) for g in s["segments"]),
                bars=bars,
            )
        )
    by_size: dict[str, float] = {}
    for row in data.get("schedule", ()):
        by_size[row["type_and_size"]] = by_size.get(row["type_and_size"], 0.0) + row["mass_kg"]
    revisions = tuple(str(r["revision"]) for r in data.get("revisions", ())) or (
        str(data["revision"]),
    )
    return RecordView(
        project_id=str(data["project_id"]),
        revision=str(data["revision"]),
        revisions=revisions,
        strips=tuple(strips),
        mass_by_size_kg=tuple(sorted(by_size.items(), key=lambda kv: _size_key(kv[0]))),
        total_mass_kg=float(data["total_mass_kg"]),
    )


def _size_key(type_and_size: str) -> tuple[str, int]:
    head = type_and_size.rstrip("0123456789")
    tail = type_and_size[len(head) :]
    return (head, int(tail) if tail else 0)


# --------------------------------------------------------------------------------------------
# Differences


@dataclass(frozen=True, slots=True)
class StripChange:
    """What changed in one strip (strip added or removed: ``status``)."""

    strip_id: str
    status: str  # "changed", "added", "removed"
    geometry: tuple[str, ...]  # spans, supports, loads: one line each
    added: tuple[BarView, ...]
    removed: tuple[BarView, ...]
    changed: tuple[tuple[BarView, BarView], ...]  # (old, new), same set id


@dataclass(frozen=True, slots=True)
class RevisionDiff:
    old_revision: str
    new_revision: str
    project_id: str
    strips: tuple[StripChange, ...]  # strips with any change, in new-record order
    new_marks: tuple[str, ...]  # marks in the new record and not in the old one
    withdrawn_marks: tuple[str, ...]  # marks in the old record and not in the new one
    mass_change_by_size_kg: tuple[tuple[str, float], ...]
    mass_change_kg: float  # sum of the per-size changes
    old_total_kg: float
    new_total_kg: float

    @property
    def unchanged(self) -> bool:
        return not self.strips


def _geometry_changes(old: StripView, new: StripView) -> list[str]:
    lines = []
    if len(old.spans_mm) != len(new.spans_mm):
        lines.append(f"spans {_mm_list(old.spans_mm)} -> {_mm_list(new.spans_mm)} mm")
    else:
        for i, (a, b) in enumerate(zip(old.spans_mm, new.spans_mm, strict=True), start=1):
            if a != b:
                how = "lengthened" if b > a else "shortened"
                lines.append(f"span {i} {how} by {abs(b - a):g} mm ({a:g} -> {b:g} mm)")
    old_sup = {s[0]: s for s in old.supports}
    for label, x, width in new.supports:
        before = old_sup.get(label)
        if before is None:
            lines.append(f"support {label} added at x = {x:g} mm")
        elif before[2] != width:
            lines.append(f"support {label} width {before[2]:g} -> {width:g} mm")
    for label in sorted(old_sup.keys() - {s[0] for s in new.supports}):
        lines.append(f"support {label} removed")
    old_loads = dict(old.segment_loads)
    for label, text in new.segment_loads:
        if label in old_loads and old_loads[label] != text:
            lines.append(f"loads on {label}: {old_loads[label]} -> {text}")
    return lines


def _mm_list(values: Sequence[float]) -> str:
    return "[" + ", ".join(f"{v:g}" for v in values) + "]"


def compare_records(old: RecordView, new: RecordView) -> RevisionDiff:
    """What changed from ``old`` to ``new``: per strip geometry and bars, marks and mass."""
    old_strips = {s.id: s for s in old.strips}
    changes = []
    for s in new.strips:
        before = old_strips.get(s.id)
        if before is None:
            changes.append(StripChange(s.id, "added", (), s.bars, (), ()))
            continue
        old_bars = {b.set_id: b for b in before.bars}
        new_ids = {b.set_id for b in s.bars}
        added = tuple(b for b in s.bars if b.set_id not in old_bars)
        removed = tuple(b for b in before.bars if b.set_id not in new_ids)
        changed = tuple(
            (old_bars[b.set_id], b)
            for b in s.bars
            if b.set_id in old_bars and old_bars[b.set_id] != b
        )
        geometry = tuple(_geometry_changes(before, s))
        if geometry or added or removed or changed:
            changes.append(StripChange(s.id, "changed", geometry, added, removed, changed))
    for s in old.strips:
        if s.id not in {n.id for n in new.strips}:
            changes.append(StripChange(s.id, "removed", (), (), s.bars, ()))
    old_marks = {b.mark for s in old.strips for b in s.bars}
    new_marks = {b.mark for s in new.strips for b in s.bars}
    old_mass = dict(old.mass_by_size_kg)
    new_mass = dict(new.mass_by_size_kg)
    sizes = sorted(old_mass.keys() | new_mass.keys(), key=_size_key)
    by_size = tuple(
        (size, new_mass.get(size, 0.0) - old_mass.get(size, 0.0))
        for size in sizes
        if new_mass.get(size, 0.0) != old_mass.get(size, 0.0)
    )
    return RevisionDiff(
        old_revision=old.revision,
        new_revision=new.revision,
        project_id=new.project_id,
        strips=tuple(changes),
        new_marks=tuple(sorted(new_marks - old_marks, key=_mark_key)),
        withdrawn_marks=tuple(sorted(old_marks - new_marks, key=_mark_key)),
        mass_change_by_size_kg=by_size,
        mass_change_kg=math.fsum(v for _, v in by_size),
        old_total_kg=old.total_mass_kg,
        new_total_kg=new.total_mass_kg,
    )


def _mark_key(mark: str) -> tuple[int, int, str]:
    return (0, int(mark), "") if mark.isdigit() else (1, 0, mark)


def describe(diff: RevisionDiff) -> str:
    """One line for the revision table, e.g. "span 2 of S1 lengthened by 400 mm; 6 bar marks
    changed"."""
    if diff.unchanged:
        return "no change"
    parts = []
    for s in diff.strips:
        if s.status != "changed":
            parts.append(f"strip {s.strip_id} {s.status}")
            continue
        for g in s.geometry:
            head = g.split(" (")[0] if g.startswith("span ") else g.split(":")[0]
            words = head.split(" ")
            if g.startswith(("span ", "loads on ")) and len(words) >= 3:
                k = 2 if g.startswith("span ") else 3
                tail = " ".join(words[k:]) if g.startswith("span ") else "changed"
                parts.append(f"{' '.join(words[:k])} of {s.strip_id} {tail}")
            else:
                parts.append(f"{s.strip_id}: {g}")
    n_changed = len(diff.new_marks)
    if n_changed:
        parts.append(f"{n_changed} bar mark{'s' if n_changed != 1 else ''} changed")
    elif any(s.changed or s.added or s.removed for s in diff.strips):
        parts.append("numbers of bars changed")
    return "; ".join(parts)


def previous_rows(
    data: Mapping[str, Any], table: Mapping[BarIdentity, str]
) -> tuple[ScheduleRow, ...]:
    """The schedule rows of an earlier record (for keeping their revision letters)."""
    by_mark = {mark: identity for identity, mark in table.items()}
    rows = []
    for r in data.get("schedule", ()):
        identity = by_mark.get(str(r["mark"]))
        if identity is None:
            continue
        rows.append(
            ScheduleRow(
                member=str(r["member"]),
                mark=str(r["mark"]),
                bar_type=identity.bar_type,
                phi_mm=identity.phi_mm,
                n_members=int(r["n_members"]),
                n_bars_each=int(r["n_bars_each"]),
                length_mm=identity.length_mm,
                shape_code=identity.shape_code,
                dims_mm=identity.dims_mm,
                free_dims=identity.free_dims,
                sketch_ref=identity.sketch_ref,
                revision=str(r["revision"]),
                mass_kg=float(r["mass_kg"]),
            )
        )
    return tuple(rows)


def _kg(value: float) -> str:
    return f"{value:+.1f} kg"


def render_changes(diff: RevisionDiff) -> str:
    """The change report (Markdown): the text of ``<project-id>-changes.md`` and ``compare``."""
    lines = [
        f"# {diff.project_id}: changes from revision {diff.old_revision} to {diff.new_revision}",
        "",
    ]
    if diff.unchanged:
        lines += ["No change: same bars, geometry and loads.", ""]
    for s in diff.strips:
        lines += [
            f"## Strip {s.strip_id}" + ("" if s.status == "changed" else f" ({s.status})"),
            "",
        ]
        if s.geometry:
            lines += ["Geometry and loads:", ""] + [f"- {g}" for g in s.geometry] + [""]
        if s.added:
            lines += ["Bars added:", ""] + [f"- {b.set_id}: {b.text()}" for b in s.added] + [""]
        if s.removed:
            lines += ["Bars removed:", ""] + [f"- {b.set_id}: {b.text()}" for b in s.removed] + [""]
        if s.changed:
            lines += ["Bars changed:", ""]
            lines += [f"- {a.set_id}: {a.text()} -> {b.text()}" for a, b in s.changed]
            lines.append("")
    lines += [
        f"New marks: {', '.join(diff.new_marks) or 'none'}",
        f"Marks withdrawn: {', '.join(diff.withdrawn_marks) or 'none'}",
        "",
        "## Mass of reinforcement",
        "",
        "| Type and size | Change |",
        "|---|---|",
    ]
    lines += [f"| {size} | {_kg(v)} |" for size, v in diff.mass_change_by_size_kg]
    lines += [
        f"| Total | {_kg(diff.mass_change_kg)} |",
        "",
        f"Total mass {diff.old_total_kg:.1f} kg -> {diff.new_total_kg:.1f} kg.",
    ]
    return "\n".join(lines) + "\n"
