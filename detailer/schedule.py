"""Bar schedule rows in the BS 8666 form of bar schedule, their summary, and the bar-count rule.

Columns of the form (BS 8666:2005, Figure 1 "Form of bar schedule", from memory): member, bar
mark, type and size, number of members, number of bars in each, total number, length of each
bar (mm), shape code, A, B, C, D, E/r, revision letter. One row per mark per member; bar sets
of the same mark in one member are summed into it, as a fabricator expects.

The summary gives, per type and size, the total length (m) and mass (kg) from the nominal mass
per metre of :mod:`detailer.bars` (area x 7850 kg/m3, BS 4449), and the total mass.

Pure: no I/O. Writers format these objects (see :mod:`detailer.io.csv_writer`).
"""

from __future__ import annotations

__all__ = [
    "Schedule",
    "ScheduleRow",
    "SummaryLine",
    "bar_count",
    "build_schedule",
    "distribution_bar_count",
    "principal_bar_count",
    "schedule_for_project",
    "schedule_rows",
    "summarise",
]

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

from detailer.bars import mass_kg_per_m
from detailer.layout import BarSet
from detailer.marks import BarIdentity, bar_identity, mark_sort_key

if TYPE_CHECKING:
    from detailer.layout import ProjectDetail

# Extents within this of a whole number of spacings count as whole (float noise in x).
_COUNT_TOL_MM = 1.0e-6


def bar_count(extent_mm: float, spacing_mm: float) -> int:
    """Number of bars laid at ``spacing_mm`` over ``extent_mm``, a bar at each end.

    floor(extent / spacing) + 1 (common practice; the first bar at the start of the extent,
    the last within it). An extent of 0 holds one bar.
    """
    if not (math.isfinite(spacing_mm) and spacing_mm > 0):
        raise ValueError(f"bar spacing must be > 0 mm (got {spacing_mm!r})")
    if not (math.isfinite(extent_mm) and extent_mm >= -_COUNT_TOL_MM):
        raise ValueError(f"extent for bars must be >= 0 mm (got {extent_mm!r})")
    return math.floor((max(extent_mm, 0.0) + _COUNT_TOL_MM) / spacing_mm) + 1


def principal_bar_count(panel_width_mm: float, side_cover_mm: float, spacing_mm: float) -> int:
    """Principal bars across a panel: ``bar_count(panel width - 2 x side cover, spacing)``.

    Common practice.
    """
    extent = panel_width_mm - 2.0 * side_cover_mm
    if extent < 0:
        raise ValueError(
            f"panel width {panel_width_mm} mm is less than twice the side cover {side_cover_mm} mm"
        )
    return bar_count(extent, spacing_mm)


def distribution_bar_count(x_start_mm: float, x_end_mm: float, spacing_mm: float) -> int:
    """Distribution bars along the strip: ``bar_count(x_end - x_start, spacing)``.

    Common practice.
    """
    if x_end_mm < x_start_mm:
        raise ValueError(f"bar run ends ({x_end_mm} mm) before it starts ({x_start_mm} mm)")
    return bar_count(x_end_mm - x_start_mm, spacing_mm)


@dataclass(frozen=True, slots=True)
class ScheduleRow:
    """One row of the bar schedule: one mark in one member."""

    member: str  # strip id
    mark: str
    bar_type: str  # BS 8666 steel notation, e.g. "H"
    phi_mm: int
    n_members: int  # number of identical members
    n_bars_each: int  # bars in each member
    length_mm: int  # length of each bar, scheduled
    shape_code: str
    dims_mm: tuple[tuple[str, int], ...]  # A..E and R (a specified radius), schedule order
    free_dims: tuple[str, ...]  # a code 99's free dimension, printed in parentheses
    sketch_ref: str  # code 99: the reference of its dimensioned sketch
    revision: str  # revision letter of the issue that last changed this row
    mass_kg: float  # total_bars x length x nominal mass per metre

    @property
    def type_and_size(self) -> str:
        """BS 8666 type and size, e.g. "H12"."""
        return f"{self.bar_type}{self.phi_mm}"

    @property
    def total_bars(self) -> int:
        """Total number of bars: members x bars in each."""
        return self.n_members * self.n_bars_each

    @property
    def total_length_m(self) -> float:
        """Total length of bar in the row, m."""
        return self.total_bars * self.length_mm / 1000.0

    def dim(self, name: str) -> int | None:
        """Dimension ``name`` in mm, None when the shape has none."""
        for key, value in self.dims_mm:
            if key == name:
                return value
        return None

    def same_bars(self, other: ScheduleRow) -> bool:
        """True when ``other`` schedules the same bars (all but the revision letter)."""
        return replace(self, revision="", mass_kg=0.0) == replace(other, revision="", mass_kg=0.0)


@dataclass(frozen=True, slots=True)
class SummaryLine:
    """Schedule totals for one type and size."""

    bar_type: str
    phi_mm: int
    total_bars: int
    total_length_m: float
    mass_kg_per_m: float  # nominal, BS 4449 basis (area x 7850 kg/m3)
    mass_kg: float

    @property
    def type_and_size(self) -> str:
        return f"{self.bar_type}{self.phi_mm}"


@dataclass(frozen=True, slots=True)
class Schedule:
    """The bar schedule of a project: rows in member then mark order, and their summary."""

    rows: tuple[ScheduleRow, ...]
    summary: tuple[SummaryLine, ...]
    total_mass_kg: float
    revision: str

    @property
    def total_length_m(self) -> float:
        return math.fsum(line.total_length_m for line in self.summary)


def _row_mass_kg(phi_mm: int, total_bars: int, length_mm: int) -> float:
    return total_bars * (length_mm / 1000.0) * mass_kg_per_m(phi_mm)


def schedule_rows(
    bar_sets: Iterable[BarSet],
    *,
    revision: str = "",
    members: Mapping[str, int] | None = None,
    previous: Iterable[ScheduleRow] = (),
) -> tuple[ScheduleRow, ...]:
    """One row per mark per member, counts summed; members in first-seen order, then marks.

    ``members`` gives the number of identical members of a strip (default 1). A row that is
    the same as one of ``previous`` (an earlier issue) keeps its revision letter; every other
    row takes ``revision``. Raises ``ValueError`` for an unmarked bar set, a mark given to two
    different bars, or a count below 1.
    """
    counts: dict[tuple[str, str], int] = {}
    identities: dict[tuple[str, str], BarIdentity] = {}
    by_mark: dict[str, BarIdentity] = {}
    member_order: dict[str, int] = {}
    for b in bar_sets:
        if not b.mark:
            raise ValueError(f"bar set {b.strip_id}/{b.set_id} has no mark; assign marks first")
        if isinstance(b.count, bool) or not isinstance(b.count, int) or b.count < 1:
            raise ValueError(f"bar set {b.strip_id}/{b.set_id}: count must be >= 1 ({b.count!r})")
        identity = bar_identity(b)
        if by_mark.setdefault(b.mark, identity) != identity:
            raise ValueError(f"mark {b.mark} is given to two different bars")
        member_order.setdefault(b.strip_id, len(member_order))
        key = (b.strip_id, b.mark)
        identities[key] = identity
        counts[key] = counts.get(key, 0) + b.count

    earlier = {(r.member, r.mark): r for r in previous}
    rows: list[ScheduleRow] = []
    for key in sorted(counts, key=lambda k: (member_order[k[0]], mark_sort_key(k[1]))):
        member, mark = key
        identity = identities[key]
        n_members = (members or {}).get(member, 1)
        if isinstance(n_members, bool) or not isinstance(n_members, int) or n_members < 1:
            raise ValueError(f"member {member}: number of members must be >= 1 ({n_members!r})")
        row = ScheduleRow(
            member=member,
            mark=mark,
            bar_type=identity.bar_type,
            phi_mm=identity.phi_mm,
            n_members=n_members,
            n_bars_each=counts[key],
            length_mm=identity.length_mm,
            shape_code=identity.shape_code,
            dims_mm=identity.dims_mm,
            free_dims=identity.free_dims,
            sketch_ref=identity.sketch_ref,
            revision=revision,
            mass_kg=_row_mass_kg(identity.phi_mm, n_members * counts[key], identity.length_mm),
        )
        old = earlier.get(key)
        if old is not None and old.same_bars(row):
            row = replace(row, revision=old.revision)
        rows.append(row)
    return tuple(rows)


def summarise(rows: Iterable[ScheduleRow]) -> tuple[SummaryLine, ...]:
    """Totals per type and size (sorted by type, then size): bars, length (m), mass (kg)."""
    groups: dict[tuple[str, int], list[ScheduleRow]] = {}
    for r in rows:
        groups.setdefault((r.bar_type, r.phi_mm), []).append(r)
    lines = []
    for (bar_type, phi), group in sorted(groups.items()):
        lines.append(
            SummaryLine(
                bar_type=bar_type,
                phi_mm=phi,
                total_bars=sum(r.total_bars for r in group),
                total_length_m=math.fsum(r.total_length_m for r in group),
                mass_kg_per_m=mass_kg_per_m(phi),
                mass_kg=math.fsum(r.mass_kg for r in group),
            )
        )
    return tuple(lines)


def build_schedule(
    bar_sets: Iterable[BarSet],
    *,
    revision: str = "",
    members: Mapping[str, int] | None = None,
    previous: Iterable[ScheduleRow] = (),
) -> Schedule:
    """The schedule of marked bar sets: rows (see :func:`schedule_rows`) and their summary."""
    rows = schedule_rows(bar_sets, revision=revision, members=members, previous=previous)
    summary = summarise(rows)
    return Schedule(
        rows=rows,
        summary=summary,
        total_mass_kg=math.fsum(line.mass_kg for line in summary),
        revision=revision,
    )


def schedule_for_project(
    detail: ProjectDetail,
    *,
    members: Mapping[str, int] | None = None,
    previous: Iterable[ScheduleRow] = (),
) -> Schedule:
    """The schedule of a detailed project (marks assigned), at the project's revision."""
    bar_sets = [b for strip in detail.strips for b in strip.bar_sets]
    return build_schedule(
        bar_sets, revision=detail.project.revision, members=members, previous=previous
    )
