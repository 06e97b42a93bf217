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
from detailer.errors import DesignError
from detailer.io.csv_writer import render_schedule_csv
from detailer.io.history import PreviousIssue, find_previous, read_previous, write_issue
from detailer.io.json_writer import previous_marks, record_file_name, render_record_json
from detailer.layout import ProjectDetail, StripDetail
from detailer.marks import BarIdentity, assign_marks, mark_table, withdrawn_marks
from detailer.model import Project
from detailer.pipeline import default_code, detail_strip
from detailer.project import load_project
from detailer.record import ProjectRecord, RevisionRecord, build_record, record_to_jsonable
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

DEFAULT_OUTPUT_ROOT = Path("output")


class BuildFailed(DesignError):
    """One or more strips cannot be designed; ``failures`` holds (strip id, reason) pairs."""

    def __init__(self, failures: tuple[tuple[str, str], ...]) -> None:
        self.failures = failures
        names = ", ".join(f for f, _ in failures)
        super().__init__(f"{len(failures)} strip(s) cannot be designed as given: {names}")


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


def detail_with_marks(
    project: Project,
    code: DesignCode | None = None,
    *,
    previous: dict[BarIdentity, str] | None = None,
    withdrawn: tuple[str, ...] = (),
) -> ProjectDetail:
    """Design and detail every strip, then give every bar set its mark (keeping the marks of
    ``previous`` for unchanged bars, never reusing ``withdrawn``)."""
    code = code or default_code(project)
    details: list[StripDetail] = []
    failures: list[tuple[str, str]] = []
    for strip in project.strips:
        try:
            details.append(detail_strip(project, strip, code))
        except DesignError as exc:
            failures.append((strip.id, str(exc)))
    if failures:
        raise BuildFailed(tuple(failures))
    marked = assign_marks([d.bar_sets for d in details], previous, withdrawn=withdrawn)
    strips = tuple(dataclasses.replace(d, bar_sets=m) for d, m in zip(details, marked, strict=True))
    return ProjectDetail(project=project, strips=strips)


def make_issue(
    project: Project, code: DesignCode | None = None, previous: PreviousIssue | None = None
) -> Issue:
    """Marks, schedule, record and change report of a project against its previous issue (pure).

    Unchanged bars keep their marks and schedule rows their revision letters; when nothing
    changed the issue is ``unchanged`` at the previous revision. Otherwise the revision is
    chosen by :func:`detailer.revisions.choose_revision`.
    """
    members = {s.id: s.members for s in project.strips}
    if previous is None:
        detail = detail_with_marks(project, code)
        schedule = schedule_for_project(detail, members=members)
        record = build_record(detail, schedule=schedule)
        return Issue(detail, schedule, record, "", False, "first issue", "")
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
    detail = detail_with_marks(at_old, code, previous=table, withdrawn=earlier_withdrawn)
    gone = withdrawn_marks(table, mark_table(s.bar_sets for s in detail.strips), earlier_withdrawn)
    schedule = schedule_for_project(detail, members=members, previous=old_rows)
    same = build_record(
        detail,
        withdrawn_marks=gone,
        schedule=schedule,
        history=history[:-1],
        description=history[-1].description,
    )
    if same_content(data, record_to_jsonable(same)):
        return Issue(detail, schedule, same, previous.revision, True, "no change", "")
    revision = choose_revision(project.revision, tuple(r.revision for r in history))
    detail = dataclasses.replace(detail, project=dataclasses.replace(project, revision=revision))
    schedule = schedule_for_project(detail, members=members, previous=old_rows)
    record = build_record(detail, withdrawn_marks=gone, schedule=schedule, history=history)
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
        detail, schedule, record, previous.revision, False, text, render_changes(diff), diff
    )


def build_outputs(
    project: Project,
    code: DesignCode | None = None,
    *,
    input_name: str = "",
    input_sha256: str = "",
    previous: PreviousIssue | None = None,
) -> BuildResult:
    """The output files of a project, by file name (pure). ``input_name``/``input_sha256``
    identify the project file in the calculation report; ``previous`` is the earlier issue
    (marks kept, revision advanced, change report written; no files when nothing changed)."""
    from detailer.audit import audit_layout, parse_schedule_csv
    from detailer.io.dxf_preview import render_png
    from detailer.io.dxf_readback import read_layout
    from detailer.io.dxf_writer import layout_name, write_layout
    from detailer.report import render_report, report_file_name

    issue = make_issue(project, code, previous)
    detail, schedule, record = issue.detail, issue.schedule, issue.record
    if issue.unchanged:
        return BuildResult(detail, schedule, (), issue.previous_revision, True, issue.description)
    pid = project.id
    csv_bytes = render_schedule_csv(schedule, project)
    diff = issue.diff
    changed_ids: frozenset[tuple[str, str]] = frozenset()
    if diff is not None:  # bar sets added or changed at this revision get a marker
        changed_ids = frozenset(
            [(s.strip_id, b.set_id) for s in diff.strips for b in s.added]
            + [(s.strip_id, new.set_id) for s in diff.strips for _, new in s.changed]
        )
    dxf_bytes = write_layout(detail, revisions=record.revisions, changed_set_ids=changed_ids)
    # The drawing must agree with the schedule it is issued with: audit our own outputs.
    findings = audit_layout(
        read_layout(dxf_bytes), parse_schedule_csv(csv_bytes.decode("utf-8"), f"{pid}-schedule.csv")
    )
    if findings:
        raise DesignError(
            f"project {pid}: the drawing disagrees with the schedule ({findings[0]}); this is a "
            "fault in slabwright, please report it with the project file"
        )
    files = [
        (f"{pid}-schedule.csv", csv_bytes),
        (f"{pid}-record.json", render_record_json(record)),
        (f"{pid}-layout.dxf", dxf_bytes),
    ]
    for sd in detail.strips:
        files.append((f"{pid}-{sd.strip.id}.png", render_png(dxf_bytes, layout_name(sd.strip.id))))
    files.append(
        (
            report_file_name(pid),
            render_report(
                detail,
                record,
                schedule,
                input_name=input_name,
                input_sha256=input_sha256,
                changes=diff,
            ),
        )
    )
    if issue.changes:
        files.append((f"{pid}-changes.md", issue.changes.encode("utf-8")))
    return BuildResult(
        detail=detail,
        schedule=schedule,
        files=tuple(files),
        previous_revision=issue.previous_revision,
        description=issue.description,
    )


def output_dir(project: Project, out: str | Path | None) -> Path:
    """``--out DIR`` as given, else ``output/<project-id>/`` under the working folder."""
    return Path(out) if out is not None else DEFAULT_OUTPUT_ROOT / project.id


def build(
    project_path: str | Path, out: str | Path | None = None, previous: str | Path | None = None
) -> tuple[BuildResult, Path]:
    """Read, design, detail and write; returns the result and the folder written to.

    The previous issue is ``previous`` (a record file) or the record in the output folder;
    its files are kept in ``<out>/rev-<revision>/`` before the new issue is written. When
    nothing changed nothing is written (``result.unchanged``).
    """
    project = load_project(project_path)
    digest = hashlib.sha256(Path(project_path).read_bytes()).hexdigest()
    folder = output_dir(project, out)
    prev_path = find_previous(folder, project.id, previous)
    prev = read_previous(prev_path, project.id) if prev_path is not None else None
    result = build_outputs(
        project, input_name=Path(project_path).name, input_sha256=digest, previous=prev
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
