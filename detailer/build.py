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
from detailer.io.atomic import write_outputs
from detailer.io.csv_writer import render_schedule_csv
from detailer.io.json_writer import render_record_json
from detailer.layout import ProjectDetail, StripDetail
from detailer.marks import assign_marks
from detailer.model import Project
from detailer.pipeline import default_code, detail_strip
from detailer.project import load_project
from detailer.record import build_record
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


def detail_with_marks(project: Project, code: DesignCode | None = None) -> ProjectDetail:
    """Design and detail every strip, then give every bar set its mark."""
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
    marked = assign_marks([d.bar_sets for d in details])
    strips = tuple(dataclasses.replace(d, bar_sets=m) for d, m in zip(details, marked, strict=True))
    return ProjectDetail(project=project, strips=strips)


def build_outputs(
    project: Project,
    code: DesignCode | None = None,
    *,
    input_name: str = "",
    input_sha256: str = "",
) -> BuildResult:
    """The output files of a project, by file name (pure). ``input_name``/``input_sha256``
    identify the project file in the calculation report."""
    from detailer.audit import audit_layout, parse_schedule_csv
    from detailer.io.dxf_preview import render_png
    from detailer.io.dxf_readback import read_layout
    from detailer.io.dxf_writer import layout_name, write_layout
    from detailer.report import render_report, report_file_name

    detail = detail_with_marks(project, code)
    schedule = schedule_for_project(detail, members={s.id: s.members for s in project.strips})
    record = build_record(detail)
    pid = project.id
    csv_bytes = render_schedule_csv(schedule, project)
    dxf_bytes = write_layout(detail)
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
                detail, record, schedule, input_name=input_name, input_sha256=input_sha256
            ),
        )
    )
    return BuildResult(detail=detail, schedule=schedule, files=tuple(files))


def output_dir(project: Project, out: str | Path | None) -> Path:
    """``--out DIR`` as given, else ``output/<project-id>/`` under the working folder."""
    return Path(out) if out is not None else DEFAULT_OUTPUT_ROOT / project.id


def build(project_path: str | Path, out: str | Path | None = None) -> tuple[BuildResult, Path]:
    """Read, design, detail and write; returns the result and the folder written to."""
    project = load_project(project_path)
    digest = hashlib.sha256(Path(project_path).read_bytes()).hexdigest()
    result = build_outputs(project, input_name=Path(project_path).name, input_sha256=digest)
    folder = output_dir(project, out)
    write_outputs({folder / name: data for name, data in result.files})
    return result, folder
