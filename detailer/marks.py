"""Bar marks: one mark per distinct bar in a project, numbered in a stable, readable order.

A bar's identity is what a fabricator cuts and bends: type and size, shape code, dimensions
(and, for a code 99, its sketch and length). Bar sets with the same identity share one mark,
across strips too; the mark joins the drawing, the schedule and the record.

Numbering order (common practice: marks read in the order the bars are fixed):

1. strips in input order;
2. within a strip, by layer: ``B1, B2, T1, T2`` (bottom mat before top mat, outer layer first;
   any other layer name after these, alphabetically);
3. then along the strip by ``x_start_mm`` (then ``x_end_mm``, then ``set_id``).

An identity takes the next number the first time it is met in that order. Marks are written
with two digits, ``"01"`` .. ``"99"``, then ``"100"``, ``"101"``, ... (never re-padding the
earlier marks, so a revision that adds the 100th bar renames nothing).

Revisions: pass the previous issue's mark table as ``previous`` (identity -> mark). Unchanged
bars keep their marks; new bars are numbered after the highest number ever issued, so a
withdrawn mark is never given to a different bar. Withdrawn marks of still earlier issues are
passed as ``withdrawn`` (the record keeps them; see :mod:`detailer.record`).
"""

from __future__ import annotations

__all__ = [
    "LAYER_ORDER",
    "BarIdentity",
    "MarkEntry",
    "assign_marks",
    "bar_identity",
    "format_mark",
    "layer_sort_key",
    "mark_number",
    "mark_project",
    "mark_sort_key",
    "mark_table",
    "withdrawn_marks",
]

import dataclasses
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Final

from detailer.layout import BarSet, ProjectDetail

#: Layer order used for numbering marks (bottom mat first, outer layer first).
LAYER_ORDER: Final[tuple[str, ...]] = ("B1", "B2", "T1", "T2")


@dataclass(frozen=True, slots=True, order=True)
class BarIdentity:
    """What makes two bars the same bar for the fabricator (and so the same mark).

    Dimensions are BS 8666 out-to-out leg lengths in mm in schedule order, e.g.
    ``(("A", 3400), ("B", 150))``; ``length_mm`` is the scheduled length of each bar.
    """

    bar_type: str  # BS 8666 steel notation, e.g. "H"
    phi_mm: int
    shape_code: str  # BS 8666 shape code, e.g. "00", "21"
    dims_mm: tuple[tuple[str, int], ...]
    free_dims: tuple[str, ...] = ()
    sketch_ref: str = ""  # code 99 only
    length_mm: int = 0

    @property
    def type_and_size(self) -> str:
        """BS 8666 type and size, e.g. "H12"."""
        return f"{self.bar_type}{self.phi_mm}"


@dataclass(frozen=True, slots=True)
class MarkEntry:
    """One line of a project's mark table."""

    mark: str
    identity: BarIdentity


def bar_identity(bar_set: BarSet) -> BarIdentity:
    """The identity of a bar set's bars (type, size, shape code, dimensions, length)."""
    shape = bar_set.shape
    return BarIdentity(
        bar_type=shape.bar_type,
        phi_mm=int(shape.phi_mm),
        shape_code=shape.code,
        dims_mm=tuple((name, int(value)) for name, value in shape.dims_mm),
        free_dims=tuple(shape.free_dims),
        sketch_ref=shape.shape.sketch_ref,
        length_mm=int(shape.length_mm),
    )


def format_mark(number: int) -> str:
    """Mark text of a mark number: at least two digits, e.g. 1 -> "01", 100 -> "100"."""
    if isinstance(number, bool) or not isinstance(number, int) or number < 1:
        raise ValueError(f"a mark number must be a positive int (got {number!r})")
    return f"{number:02d}"


def mark_number(mark: str) -> int | None:
    """The number of a numeric mark ("07" -> 7); None for a mark that is not all digits."""
    text = mark.strip()
    return int(text) if text.isdigit() else None


def layer_sort_key(layer: str) -> tuple[int, str]:
    """Sort key of a layer name: ``LAYER_ORDER`` first, any other name after, alphabetically."""
    if layer in LAYER_ORDER:
        return (LAYER_ORDER.index(layer), "")
    return (len(LAYER_ORDER), layer)


def _numbering_order(bar_sets: Sequence[BarSet]) -> list[int]:
    """Indices of one strip's bar sets in numbering order (layer, x_start, x_end, set_id)."""
    return sorted(
        range(len(bar_sets)),
        key=lambda i: (
            layer_sort_key(bar_sets[i].layer),
            bar_sets[i].x_start_mm,
            bar_sets[i].x_end_mm,
            bar_sets[i].set_id,
            i,
        ),
    )


def assign_marks(
    strips_bar_sets: Sequence[Sequence[BarSet]],
    previous: Mapping[BarIdentity, str] | None = None,
    *,
    withdrawn: Iterable[str] = (),
) -> tuple[tuple[BarSet, ...], ...]:
    """Give every bar set its mark; return new bar sets in the input's structure and order.

    ``strips_bar_sets`` holds one sequence of bar sets per strip, in strip order. Identical
    bars (see :func:`bar_identity`) share a mark within the project. ``previous`` maps the
    identities of an earlier issue to their marks, which are kept; ``withdrawn`` lists marks
    issued before and no longer in use. New marks are numbered after every number in
    ``previous`` and ``withdrawn``.
    """
    kept: dict[BarIdentity, str] = dict(previous or {})
    owners: dict[str, BarIdentity] = {}
    for identity, mark in kept.items():
        if mark in owners:
            raise ValueError(f"previous mark table gives mark {mark} to two different bars")
        owners[mark] = identity
    reserved = [mark_number(m) for m in (*kept.values(), *withdrawn)]
    next_number = max((n for n in reserved if n is not None), default=0) + 1

    marks: dict[BarIdentity, str] = {}
    for bar_sets in strips_bar_sets:
        for i in _numbering_order(bar_sets):
            identity = bar_identity(bar_sets[i])
            if identity in marks:
                continue
            if identity in kept:
                marks[identity] = kept[identity]
            else:
                marks[identity] = format_mark(next_number)
                next_number += 1
    return tuple(
        tuple(dataclasses.replace(b, mark=marks[bar_identity(b)]) for b in bar_sets)
        for bar_sets in strips_bar_sets
    )


def mark_project(
    detail: ProjectDetail,
    previous: Mapping[BarIdentity, str] | None = None,
    *,
    withdrawn: Iterable[str] = (),
) -> ProjectDetail:
    """A new ``ProjectDetail`` whose bar sets carry their marks (see :func:`assign_marks`)."""
    marked = assign_marks([s.bar_sets for s in detail.strips], previous, withdrawn=withdrawn)
    strips = tuple(dataclasses.replace(s, bar_sets=sets) for s, sets in zip(detail.strips, marked))
    return dataclasses.replace(detail, strips=strips)


def mark_table(strips_bar_sets: Iterable[Iterable[BarSet]]) -> tuple[MarkEntry, ...]:
    """The marks in use, one entry per mark, in mark order (numeric first, then by text).

    Raises ``ValueError`` if a mark is missing or one mark stands for two different bars.
    """
    by_mark: dict[str, BarIdentity] = {}
    for bar_sets in strips_bar_sets:
        for b in bar_sets:
            if not b.mark:
                raise ValueError(f"bar set {b.strip_id}/{b.set_id} has no mark")
            identity = bar_identity(b)
            seen = by_mark.setdefault(b.mark, identity)
            if seen != identity:
                raise ValueError(f"mark {b.mark} is given to two different bars")
    return tuple(MarkEntry(m, by_mark[m]) for m in sorted(by_mark, key=mark_sort_key))


def withdrawn_marks(
    previous: Mapping[BarIdentity, str],
    current: Iterable[MarkEntry],
    earlier_withdrawn: Iterable[str] = (),
) -> tuple[str, ...]:
    """Marks issued before (``previous`` or ``earlier_withdrawn``) and not in use now, sorted."""
    in_use = {entry.mark for entry in current}
    gone = (set(previous.values()) | set(earlier_withdrawn)) - in_use
    return tuple(sorted(gone, key=mark_sort_key))


def mark_sort_key(mark: str) -> tuple[int, int, str]:
    """Sort key of a mark: numeric marks by number, then any other mark by its text."""
    number = mark_number(mark)
    return (0, number, "") if number is not None else (1, 0, mark)
