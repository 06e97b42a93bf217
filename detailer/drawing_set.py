"""The layout drawing of a build: the DXF file(s), their PNG previews and their read-back.

One strip is one sheet. Up to :data:`SHEETS_PER_FILE` sheets go in one file,
``<project-id>-layout.dxf``; a bigger project (a whole floor) is split, in strip order, into
files of at most that many sheets, ``<project-id>-layout-01.dxf``, ``-02``, ... (sheets keep
their numbers in the whole set, "sheet 57 of 500"). A file of hundreds of sheets is slow to
open and to issue, and the split lets each file be drawn, written and read back in a worker
process of its own, the drawing being most of the time a floor takes.

Every document as written is read back (:func:`detailer.io.dxf_readback.readback`) and
audited against the schedule rows of its strips (:func:`detailer.audit.audit_layout`), where it
was made (in its worker for a split drawing); the findings come back with the files.
"""

from __future__ import annotations

__all__ = [
    "SHEETS_PER_FILE",
    "DrawingSet",
    "PendingDrawing",
    "drawing_file_names",
    "start_drawing",
]

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from detailer import preview_workers
from detailer.layout import ProjectDetail
from detailer.parallel import fork_shares_memory, map_indexed, start_indexed
from detailer.preview_workers import PreviewWorkers
from detailer.progress import SILENT, Progress
from detailer.record_types import RevisionRecord

if TYPE_CHECKING:  # ezdxf and the writers are imported when a drawing is made
    from detailer.audit import AuditFinding, ScheduleLine

#: Sheets per layout DXF file; more strips than this and the drawing is split into files.
SHEETS_PER_FILE = preview_workers.SHEETS_PER_FILE


@dataclass(frozen=True, slots=True)
class DrawingSet:
    files: tuple[tuple[str, bytes], ...]  # (file name, DXF bytes), in sheet order
    previews: tuple[bytes, ...]  # PNG of every sheet in strip order; () when not rendered
    findings: tuple[AuditFinding, ...]  # disagreements of the files with the schedule


def drawing_file_names(project_id: str, n_strips: int) -> tuple[tuple[str, range], ...]:
    """(file name, strip indices) of each layout file, sheets shared out evenly."""
    if n_strips <= SHEETS_PER_FILE:
        return ((f"{project_id}-layout.dxf", range(n_strips)),)
    parts = math.ceil(n_strips / SHEETS_PER_FILE)
    size = math.ceil(n_strips / parts)
    width = max(2, len(str(parts)))
    return tuple(
        (
            f"{project_id}-layout-{k + 1:0{width}d}.dxf",
            range(k * size, min(n_strips, (k + 1) * size)),
        )
        for k in range(parts)
    )


def _plan_task(context: tuple, index: int):
    from detailer.io.dxf_writer import strip_sheet

    detail, revisions, changed = context
    return strip_sheet(detail, detail.strips[index], revisions, changed)


def _preview_task(context: tuple, index: int) -> bytes:
    from detailer.io.dxf_preview import render_png

    dxf_bytes, doc, names = context
    if doc is None:  # a spawned worker: the drawing parsed once, then kept
        doc = preview_workers.parsed_drawing(dxf_bytes)
    return render_png(doc, names[index])


def _audit(doc, name: str, strip_ids: set[str], schedule) -> tuple[AuditFinding, ...]:
    """The document read back and audited against the schedule rows of its strips."""
    from detailer.audit import audit_layout
    from detailer.io.dxf_readback import readback

    rows = [r for r in schedule if r.member in strip_ids]
    return audit_layout(readback(doc, name), rows)


def _part_task(context: tuple, index: int) -> tuple[bytes, tuple, tuple[bytes, ...]]:
    """One file of a split drawing: its sheets chosen, drawn, written, audited, previewed."""
    from detailer.io.dxf_writer import build_layout, document_bytes, layout_name, strip_sheet

    detail, revisions, changed, parts, previews, schedule = context
    name, strips = parts[index]
    plans = [strip_sheet(detail, detail.strips[i], revisions, changed) for i in strips]
    doc = build_layout(detail, revisions, changed, plans=plans, part=strips)
    data = document_bytes(doc)
    pngs: tuple[bytes, ...] = ()
    if previews:
        from detailer.io.dxf_preview import render_png

        pngs = tuple(render_png(doc, layout_name(detail.strips[i].strip.id)) for i in strips)
    ids = {detail.strips[i].strip.id for i in strips}
    return data, _audit(doc, name, ids, schedule), pngs


class PendingDrawing:
    """A drawing being made (:func:`start_drawing`); :meth:`finish` gives the DrawingSet."""

    def __init__(self, finish: Callable[[], DrawingSet]) -> None:
        self._finish = finish

    def finish(self) -> DrawingSet:
        return self._finish()


def start_drawing(
    detail: ProjectDetail,
    revisions: tuple[RevisionRecord, ...],
    changed_set_ids: frozenset[tuple[str, str]],
    *,
    previews: bool,
    workers: int = 0,
    progress: Progress = SILENT,
    preview_workers: PreviewWorkers | None = None,
    schedule: Sequence[ScheduleLine] = (),
) -> PendingDrawing:
    """Start the layout file(s): a drawing split into files is drawn by the workers while
    this process goes on (e.g. with the report); one file is drawn at :meth:`finish`."""
    n = len(detail.strips)
    parts = drawing_file_names(detail.project.id, n)
    schedule = tuple(schedule)
    if len(parts) > 1:
        pending = start_indexed(
            _part_task,
            (detail, revisions, changed_set_ids, parts, previews, schedule),
            len(parts),
            workers=workers,
        )

        def finish_parts() -> DrawingSet:
            progress.start("drawing", n)
            results = pending.results(lambda k: progress.advance(len(parts[k][1])))
            files = tuple(
                (name, data) for (name, _), (data, _, _) in zip(parts, results, strict=True)
            )
            findings = tuple(f for _, found, _ in results for f in found)
            return DrawingSet(files, tuple(p for _, _, pngs in results for p in pngs), findings)

        return PendingDrawing(finish_parts)
    return PendingDrawing(
        lambda: _one_file(
            detail,
            revisions,
            changed_set_ids,
            parts[0][0],
            previews,
            workers,
            progress,
            preview_workers,
            schedule,
        )
    )


def _one_file(
    detail: ProjectDetail,
    revisions: tuple[RevisionRecord, ...],
    changed_set_ids: frozenset[tuple[str, str]],
    name: str,
    previews: bool,
    workers: int,
    progress: Progress,
    preview_workers: PreviewWorkers | None,
    schedule: tuple[ScheduleLine, ...],
) -> DrawingSet:
    from detailer.io.dxf_writer import build_layout, document_bytes, layout_name

    n = len(detail.strips)
    progress.start("sheets", n)
    plans = map_indexed(
        _plan_task,
        (detail, revisions, changed_set_ids),
        n,
        workers=workers,
        on_done=lambda _: progress.advance(),
    )
    doc = build_layout(detail, revisions, changed_set_ids, plans=plans)
    data = document_bytes(doc, workers=workers)
    findings = _audit(doc, name, {sd.strip.id for sd in detail.strips}, schedule)
    pngs: tuple[bytes, ...] = ()
    if previews and preview_workers is not None:
        progress.start("previews", n)
        pngs = preview_workers.render(data, tuple(layout_name(sd.strip.id) for sd in detail.strips))
        progress.advance(n)
    elif previews:
        names = tuple(layout_name(sd.strip.id) for sd in detail.strips)
        progress.start("previews", n)
        shared = doc if fork_shares_memory() else None
        pngs = tuple(
            map_indexed(
                _preview_task,
                (data, shared, names),
                n,
                workers=workers,
                on_done=lambda _: progress.advance(),
            )
        )
    return DrawingSet(((name, data),), pngs, findings)
