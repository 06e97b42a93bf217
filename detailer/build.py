"""The main job: read a project, design and detail every strip, and write the outputs.

``build_outputs`` is pure (project in, named file contents out); ``build`` adds the file
system: it reads the project file and writes every output atomically, all or none, so a failed
run leaves earlier outputs untouched.
"""

from __future__ import annotations

import dataclasses
import hashlib
from dataclasses import dataclass
from pathlib import Path

from detailer.codes.base import DesignCode
from detailer.drawing_set import start_drawing
from detailer.errors import DesignError
from detailer.io.csv_writer import render_schedule_csv
from detailer.io.history import PreviousIssue, find_previous, read_previous, write_issue
from detailer.io.json_writer import format_json, previous_marks, record_file_name
from detailer.layout import ProjectDetail, StripDetail
from detailer.marks import BarIdentity, assign_marks, mark_table, withdrawn_marks
from detailer.model import Project
from detailer.parallel import map_indexed, worker_count
from detailer.pipeline import default_code, detail_strip
from detailer.preview_workers import (
    PreviewWorkers,
    start_preview_workers,
    wants_previews,
)
from detailer.progress import SILENT, Progress
from detailer.project import load_project
from detailer.record import build_record, record_to_jsonable, station_labels
from detailer.record_types import ProjectRecord, RevisionRecord
from detailer.revisions import (
    RevisionDiff,
    choose_revision,
    compare_records,
    describe,
    previous_rows,
    render_changes,
    same_content,
    view_of,
)
from detailer.schedule import Schedule, schedule_for_project
from detailer.strip_analysis import StripAnalysis, analyse_strips

DEFAULT_OUTPUT_ROOT = Path("output")


class BuildFailed(DesignError):
    """No strip can be designed; ``failures`` holds (strip id, reason) pairs."""

    def __init__(self, failures: tuple[tuple[str, str], ...]) -> None:
        self.failures = failures
        names = ", ".join(f for f, _ in failures)
        super().__init__(f"{len(failures)} strip(s) cannot be designed as given: {names}")


@dataclass(frozen=True, slots=True)
class BuildOptions:
    """How a build runs (never what it produces, except ``previews``)."""

    workers: int | None = None  # worker processes; None: one per CPU for more than a handful
    previews: bool | None = None  # PNG previews; None: up to PREVIEW_MAX_STRIPS strips
    progress: Progress = SILENT
    preview_workers: PreviewWorkers | None = None  # started early by the caller (the CLI)

    def wants_previews(self, n_strips: int) -> bool:
        return wants_previews(n_strips, self.previews)


@dataclass(frozen=True, slots=True)
class BuildResult:
    """What a build produced: the detailed project, its schedule and the files (name -> bytes)."""

    detail: ProjectDetail
    schedule: Schedule
    files: tuple[tuple[str, bytes], ...]
    previous_revision: str = ""  # revision of the previous record, "" for a first issue
    unchanged: bool = False  # same as the previous record: nothing to write
    description: str = ""  # one line: what changed at this revision
    archive_dir: Path | None = None  # where the previous issue's files were kept
    not_detailed: tuple[tuple[str, str], ...] = ()  # (strip id, reason): left out, no files
    previews_skipped: bool = False  # previews not rendered (many strips, or asked not to)


@dataclass(frozen=True, slots=True)
class Issue:
    """The pure part of a build: marked detail, schedule, record and change report."""

    detail: ProjectDetail
    schedule: Schedule
    record: ProjectRecord
    previous_revision: str
    unchanged: bool
    description: str
    changes: str  # Markdown change report; "" for a first issue
    diff: RevisionDiff | None = None  # the changes as data (None: first issue or unchanged)
    not_detailed: tuple[tuple[str, str], ...] = ()  # (strip id, reason) of strips left out


def _detail_task(context: tuple, index: int) -> tuple:
    """(detail, its record's station labels), or (strip id, reason) when it fails."""
    project, code, analyses = context
    strip = project.strips[index]
    try:
        detail = detail_strip(project, strip, code, analyses[index] if analyses else None)
    except DesignError as exc:
        return (strip.id, str(exc))
    return (detail, station_labels(detail))


def detail_strips(
    project: Project,
    code: DesignCode | None = None,
    *,
    workers: int = 0,
    progress: Progress = SILENT,
) -> tuple[
    tuple[StripDetail, ...], tuple[tuple[str, str], ...], dict[str, dict[str, tuple[str, ...]]]
]:
    """Design and detail every strip (over ``workers`` processes; 0: in this one).

    Returns the detailed strips and the (strip id, reason) of those that cannot be designed,
    both in project-file order (one strip failing does not stop the others), and the station
    labels of each detailed strip's record (:func:`detailer.record.station_labels`)."""
    code = code or default_code(project)
    progress.start("detailing", len(project.strips))
    try:  # every strip's analysis in one floor solve; else each strip on its own, below
        analyses: tuple[StripAnalysis, ...] | None = analyse_strips(project, project.strips)
    except (DesignError, ValueError):
        analyses = None
    results = map_indexed(
        _detail_task,
        (project, code, analyses),
        len(project.strips),
        workers=workers,
        on_done=lambda _: progress.advance(),
    )
    details = tuple(r[0] for r in results if isinstance(r[0], StripDetail))
    failures = tuple(r for r in results if not isinstance(r[0], StripDetail))
    labels = {r[0].strip.id: r[1] for r in results if isinstance(r[0], StripDetail)}
    return details, failures, labels


def _marked(
    project: Project,
    details: tuple[StripDetail, ...],
    previous: dict[BarIdentity, str] | None = None,
    withdrawn: tuple[str, ...] = (),
) -> ProjectDetail:
    """Every bar set with its mark (keeping the marks of ``previous`` for unchanged bars,
    never reusing ``withdrawn``); the project keeps only the detailed strips, and the
    others are listed in ``not_detailed``."""
    marked = assign_marks([d.bar_sets for d in details], previous, withdrawn=withdrawn)
    strips = tuple(dataclasses.replace(d, bar_sets=m) for d, m in zip(details, marked, strict=True))
    done = {d.strip.id for d in details}
    kept = tuple(s for s in project.strips if s.id in done)
    return ProjectDetail(
        project=dataclasses.replace(project, strips=kept),
        strips=strips,
        not_detailed=tuple(s.id for s in project.strips if s.id not in done),
    )


def detail_with_marks(
    project: Project,
    code: DesignCode | None = None,
    *,
    previous: dict[BarIdentity, str] | None = None,
    withdrawn: tuple[str, ...] = (),
) -> ProjectDetail:
    """Design and detail every strip, then give every bar set its mark; ``BuildFailed`` when
    any strip cannot be designed (a build leaves such strips out instead: :func:`make_issue`)."""
    details, failures, _ = detail_strips(project, code)
    if failures:
        raise BuildFailed(failures)
    return _marked(project, details, previous, withdrawn)


def make_issue(
    project: Project,
    code: DesignCode | None = None,
    previous: PreviousIssue | None = None,
    *,
    workers: int = 0,
    progress: Progress = SILENT,
) -> Issue:
    """Marks, schedule, record and change report of a project against its previous issue (pure).

    Strips that cannot be designed are left out (``not_detailed``) and the others issued;
    ``BuildFailed`` when none can be. Unchanged bars keep their marks and schedule rows their
    revision letters; when nothing changed the issue is ``unchanged`` at the previous revision.
    Otherwise the revision is chosen by :func:`detailer.revisions.choose_revision`.
    """
    code = code or default_code(project)
    members = {s.id: s.members for s in project.strips}
    details, failed, labels = detail_strips(project, code, workers=workers, progress=progress)
    if not details:
        raise BuildFailed(failed)
    if previous is None:
        detail = _marked(project, details)
        schedule = schedule_for_project(detail, members=members)
        record = build_record(detail, schedule=schedule, not_detailed=failed, station_labels=labels)
        return Issue(detail, schedule, record, "", False, "first issue", "", None, failed)
    data = previous.data
    table, earlier_withdrawn = previous_marks(data)
    history = tuple(
        RevisionRecord(
            revision=str(r["revision"]), date=str(r["date"]), description=str(r["description"])
        )
        for r in data.get("revisions", ())
    ) or (
        RevisionRecord(revision=previous.revision, date=str(data.get("date", "")), description=""),
    )
    old_rows = previous_rows(data, table)
    at_old = dataclasses.replace(project, revision=previous.revision)
    detail = _marked(at_old, details, table, earlier_withdrawn)
    gone = withdrawn_marks(table, mark_table(s.bar_sets for s in detail.strips), earlier_withdrawn)
    schedule = schedule_for_project(detail, members=members, previous=old_rows)
    same = build_record(
        detail,
        withdrawn_marks=gone,
        schedule=schedule,
        history=history[:-1],
        description=history[-1].description,
        not_detailed=failed,
        station_labels=labels,
    )
    if same_content(data, record_to_jsonable(same)):
        return Issue(detail, schedule, same, previous.revision, True, "no change", "", None, failed)
    revision = choose_revision(project.revision, tuple(r.revision for r in history))
    detail = dataclasses.replace(
        detail, project=dataclasses.replace(detail.project, revision=revision)
    )
    schedule = schedule_for_project(detail, members=members, previous=old_rows)
    record = build_record(
        detail,
        withdrawn_marks=gone,
        schedule=schedule,
        history=history,
        not_detailed=failed,
        station_labels=labels,
    )
    diff = compare_records(view_of(data), view_of(record_to_jsonable(record)))
    text = describe(diff)
    record = dataclasses.replace(
        record,
        revisions=(
            *history,
            RevisionRecord(revision=revision, date=project.date, description=text),
        ),
    )
    return Issue(
        detail, schedule, record, previous.revision, False, text, render_changes(diff), diff, failed
    )


def build_outputs(
    project: Project,
    code: DesignCode | None = None,
    *,
    input_name: str = "",
    input_sha256: str = "",
    previous: PreviousIssue | None = None,
    options: BuildOptions = BuildOptions(),
) -> BuildResult:
    """The output files of a project, by file name (pure). ``input_name``/``input_sha256``
    identify the project file in the calculation report; ``previous`` is the earlier issue
    (marks kept, revision advanced, change report written; no files when nothing changed).
    Strips that cannot be designed are left out and listed in ``not_detailed``."""
    n_strips = len(project.strips)
    workers = worker_count(n_strips, options.workers)
    helpers = options.preview_workers  # started early by the caller, who closes them
    own = helpers is None
    if own:
        helpers = start_preview_workers(n_strips, options.previews)  # ready while we design
    try:
        return _build_outputs(
            project, code, input_name, input_sha256, previous, options, workers, helpers
        )
    finally:
        if own and helpers is not None:
            helpers.close()


def _build_outputs(
    project: Project,
    code: DesignCode | None,
    input_name: str,
    input_sha256: str,
    previous: PreviousIssue | None,
    options: BuildOptions,
    workers: int,
    helpers: PreviewWorkers | None,
) -> BuildResult:
    from detailer.audit import parse_schedule_csv
    from detailer.report import render_report, report_file_name

    progress = options.progress
    issue = make_issue(project, code, previous, workers=workers, progress=progress)
    detail, schedule, record = issue.detail, issue.schedule, issue.record
    failed = issue.not_detailed
    if issue.unchanged:
        return BuildResult(
            detail,
            schedule,
            (),
            issue.previous_revision,
            True,
            issue.description,
            not_detailed=failed,
        )
    pid = project.id
    csv_bytes = render_schedule_csv(schedule, detail.project, failed)
    diff = issue.diff
    changed_ids: frozenset[tuple[str, str]] = frozenset()
    if diff is not None:  # bar sets added or changed at this revision get a marker
        changed_ids = frozenset(
            [(s.strip_id, b.set_id) for s in diff.strips for b in s.added]
            + [(s.strip_id, new.set_id) for s in diff.strips for _, new in s.changed]
        )
    n = len(detail.strips)
    previews = options.wants_previews(n)
    # A drawing split into files is made by the workers while this process writes the
    # record and the report, which do not depend on it.
    schedule_lines = parse_schedule_csv(csv_bytes.decode("utf-8"), f"{pid}-schedule.csv")
    pending = start_drawing(
        detail,
        record.revisions,
        changed_ids,
        schedule=schedule_lines,
        previews=previews,
        workers=workers,
        progress=progress,
        preview_workers=helpers,
    )
    record_data = record_to_jsonable(record)
    record_bytes = format_json(record_data).encode("utf-8")
    progress.start("report", 1)
    report = render_report(
        detail,
        record,
        schedule,
        input_name=input_name,
        input_sha256=input_sha256,
        changes=diff,
        not_detailed=failed,
        record_data=record_data,
    )
    progress.advance()
    drawing = pending.finish()
    # The drawing must agree with the schedule it is issued with: our own outputs audited (the
    # documents just written, read back through the same code as `slabwright audit`).
    findings = drawing.findings
    orphans = sorted({r.member for r in schedule_lines} - {sd.strip.id for sd in detail.strips})
    if orphans:
        findings = (f"schedule rows of member {orphans[0]}, which has no sheet",)
    if findings:
        raise DesignError(
            f"project {pid}: the drawing disagrees with the schedule ({findings[0]}); this is a "
            "fault in slabwright, please report it with the project file"
        )
    files = [
        (f"{pid}-schedule.csv", csv_bytes),
        (f"{pid}-record.json", record_bytes),
        *drawing.files,
    ]
    files += [(f"{pid}-{sd.strip.id}.png", png) for sd, png in zip(detail.strips, drawing.previews)]
    files.append((report_file_name(pid), report))
    if issue.changes:
        files.append((f"{pid}-changes.md", issue.changes.encode("utf-8")))
    return BuildResult(
        detail=detail,
        schedule=schedule,
        files=tuple(files),
        previous_revision=issue.previous_revision,
        description=issue.description,
        not_detailed=failed,
        previews_skipped=not previews,
    )


def output_dir(project: Project, out: str | Path | None) -> Path:
    """``--out DIR`` as given, else ``output/<project-id>/`` under the working folder."""
    return Path(out) if out is not None else DEFAULT_OUTPUT_ROOT / project.id


def build(
    project_path: str | Path,
    out: str | Path | None = None,
    previous: str | Path | None = None,
    options: BuildOptions = BuildOptions(),
    project: Project | None = None,
) -> tuple[BuildResult, Path]:
    """Read, design, detail and write; returns the result and the folder written to.

    The previous issue is ``previous`` (a record file) or the record in the output folder;
    its files are kept in ``<out>/rev-<revision>/`` before the new issue is written. When
    nothing changed nothing is written (``result.unchanged``). ``project``: the file as
    already read by the caller (it is read here otherwise).
    """
    project = project if project is not None else load_project(project_path)
    digest = hashlib.sha256(Path(project_path).read_bytes()).hexdigest()
    folder = output_dir(project, out)
    prev_path = find_previous(folder, project.id, previous)
    prev = read_previous(prev_path, project.id) if prev_path is not None else None
    result = build_outputs(
        project,
        input_name=Path(project_path).name,
        input_sha256=digest,
        previous=prev,
        options=options,
    )
    if result.unchanged:
        return result, folder
    in_folder = folder / record_file_name(project.id)
    old_revision = None
    if in_folder.is_file():
        old_revision = (
            prev.revision
            if prev is not None and prev.path == in_folder
            else read_previous(in_folder).revision
        )
    archive = write_issue(folder, project.id, dict(result.files), old_revision)
    return dataclasses.replace(result, archive_dir=archive), folder
