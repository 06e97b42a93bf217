"""Command line: ``slabwright check|build|audit|compare ...`` and ``slabwright --version``.

Thin: parse arguments, call the project reader and the analysis, print, return an exit code
(0 success, 2 input error). Input errors print one line each on stderr, never a traceback.
"""

from __future__ import annotations

__all__ = ["EXIT_INPUT_ERROR", "EXIT_OK", "format_check", "main"]

import argparse
import os
import sys
from collections.abc import Sequence
from typing import TYPE_CHECKING, TextIO

from detailer import CAUTION, __version__
from detailer.errors import DesignError, InputError, ProjectError
from detailer.model import EndKind, Project, Segment, Strip
from detailer.project import load_project

if TYPE_CHECKING:
    from detailer.strip_analysis import StripAnalysis

EXIT_OK = 0
EXIT_DESIGN_FAILED = 1
EXIT_INPUT_ERROR = 2
EXIT_INTERRUPTED = 130  # 128 + SIGINT, as shells report an interrupted command

#: A build prints one line per strip for this many strips, then a summary line.
STRIP_LINES_MAX = 20

_END_TEXT = {
    EndKind.PINNED: "pinned end",
    EndKind.MONOLITHIC: "monolithic end (fixed and pinned enveloped)",
    EndKind.CANTILEVER: "cantilever root",
}


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="slabwright",
        description="Analysis, design and detailing of continuous one-way RC slab strips.",
        epilog=CAUTION,
    )
    p.add_argument("--version", action="store_true", help="print the version and exit")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    check = sub.add_parser(
        "check",
        help="validate a project file and print the analysis of each strip",
        description="Validate a project file and print spans, loads and the ULS envelope.",
        epilog=CAUTION,
    )
    check.add_argument("project", metavar="PROJECT.yaml", help="project file")
    build = sub.add_parser(
        "build",
        help="design and detail every strip and write schedule, record and drawings",
        description=(
            "Analyse, design and detail every strip of a project and write the bar-bending "
            "schedule and the record into output/<project-id>/ (or --out DIR)."
        ),
        epilog=CAUTION,
    )
    build.add_argument("project", metavar="PROJECT.yaml", help="project file")
    build.add_argument("--out", metavar="DIR", help="output folder (default output/<project-id>/)")
    build.add_argument(
        "--previous",
        metavar="RECORD.json",
        help="record of the previous issue (default: the record in the output folder)",
    )
    build.add_argument(
        "--jobs",
        type=_jobs,
        metavar="N",
        help="worker processes (default: one per CPU when there are more than a handful of "
        "strips; 1: none)",
    )
    build.add_argument(
        "--previews",
        action=argparse.BooleanOptionalAction,
        default=None,
        help="write a PNG preview of every sheet, or none (default: only for projects of up "
        "to 8 strips)",
    )
    build.add_argument(
        "--progress",
        action=argparse.BooleanOptionalAction,
        default=None,
        help="show progress bars on stderr, or none (default: when stderr is a terminal)",
    )
    compare = sub.add_parser(
        "compare",
        help="list what changed between two issues of a project (two record files)",
        description="Print the change report between two -record.json files of one project.",
        epilog=CAUTION,
    )
    compare.add_argument("old", metavar="OLD_RECORD.json", help="record of the earlier issue")
    compare.add_argument("new", metavar="NEW_RECORD.json", help="record of the later issue")
    audit = sub.add_parser(
        "audit",
        help="compare a layout drawing (perhaps edited since) with a bar schedule",
        description=(
            "Read the bar marks, callouts and bar geometry back from a layout DXF and list every "
            "disagreement with the schedule CSV. Exit 0 when they agree, 1 when not."
        ),
        epilog=CAUTION,
    )
    audit.add_argument(
        "drawing",
        metavar="DRAWING.dxf",
        nargs="+",
        help="layout drawing (every file of a drawing split into several)",
    )
    audit.add_argument("schedule", metavar="SCHEDULE.csv", help="bar-bending schedule")
    return p


def _jobs(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        value = 0
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be a whole number >= 1, not {text!r}")
    return value


def _input_errors(exc: ProjectError, err: TextIO) -> int:
    """Print every mistake of a project file, one line each; the input-error exit code."""
    for e in getattr(exc, "errors", (exc,)):
        print(str(e), file=err)
    return EXIT_INPUT_ERROR


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    try:
        return _main(argv)
    except KeyboardInterrupt:
        # Outputs are written all at once at the end: an interrupted build wrote nothing.
        print("interrupted: no output files were changed", file=sys.stderr)
        return EXIT_INTERRUPTED
    except BrokenPipeError:
        # The reader went away (e.g. `| head`): not an error of ours, and no traceback.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_OK


def _main(argv: Sequence[str] | None) -> int:
    args = _parser().parse_args(argv)
    if args.version:
        print(f"slabwright {__version__}\n{CAUTION}")
        return EXIT_OK
    if args.command == "check":
        return _check(args.project, sys.stdout, sys.stderr)
    if args.command == "build":
        show = args.progress if args.progress is not None else sys.stderr.isatty()
        return _build(
            args.project,
            args.out,
            sys.stdout,
            sys.stderr,
            args.previous,
            jobs=args.jobs,
            previews=args.previews,
            progress=show,
        )
    if args.command == "compare":
        return _compare(args.old, args.new, sys.stdout, sys.stderr)
    if args.command == "audit":
        return _audit(args.drawing, args.schedule, sys.stdout, sys.stderr)
    _parser().print_help(sys.stdout)
    print(CAUTION, file=sys.stdout)
    return EXIT_OK


def _check(path: str, out: TextIO, err: TextIO) -> int:
    try:
        project = load_project(path)
    except ProjectError as exc:
        return _input_errors(exc, err)
    except OSError as exc:  # load_project converts these; kept as a last guard
        print(f"{path}: cannot read the file: {exc.strerror or exc}; check the path", file=err)
        return EXIT_INPUT_ERROR
    _input_notes(project, err)
    from detailer.pipeline import default_code, detail_strip
    from detailer.strip_analysis import analyse_strip
    from detailer.summary import design_lines

    code = default_code(project)
    analyses: list[StripAnalysis] = []
    designs: list[list[str]] = []
    failures = 0
    for strip in project.strips:
        try:
            detail = detail_strip(project, strip, code)
        except DesignError as exc:
            analyses.append(analyse_strip(project, strip))
            designs.append(["", f"  DESIGN FAILS: {exc}"])
            print(str(exc), file=err)
            failures += 1
            continue
        analyses.append(detail.analysis)
        designs.append(design_lines(detail, project.materials.bar_type))
    out.write(format_check(path, project, analyses, designs))
    return EXIT_DESIGN_FAILED if failures else EXIT_OK


def _audit(drawing: str | list[str], schedule: str, out: TextIO, err: TextIO) -> int:
    from detailer.audit import run_audit

    try:
        report = run_audit(drawing, schedule)
    except InputError as exc:
        print(str(exc), file=err)
        return EXIT_INPUT_ERROR
    out.writelines(f"{finding}\n" for finding in report.findings)
    shown = drawing if isinstance(drawing, str) else " + ".join(drawing)
    if report.ok:
        out.write(f"OK: {shown} agrees with {schedule}\n")
    else:
        out.write(f"{len(report.findings)} disagreement(s) between {shown} and {schedule}\n")
    out.write(CAUTION + "\n")
    return EXIT_OK if report.ok else EXIT_DESIGN_FAILED


def _compare(old: str, new: str, out: TextIO, err: TextIO) -> int:
    from detailer.io.history import read_previous
    from detailer.revisions import compare_records, render_changes, view_of

    try:
        a = read_previous(old)
        b = read_previous(new, str(a.data.get("project_id")))
        text = render_changes(compare_records(view_of(a.data), view_of(b.data)))
    except InputError as exc:
        print(str(exc), file=err)
        return EXIT_INPUT_ERROR
    except (KeyError, TypeError, ValueError) as exc:
        print(f"{new}: the record is damaged ({exc!r}); rebuild it", file=err)
        return EXIT_INPUT_ERROR
    out.write(text)
    return EXIT_OK


def _build(
    path: str,
    out_dir: str | None,
    out: TextIO,
    err: TextIO,
    previous: str | None = None,
    *,
    jobs: int | None = None,
    previews: bool | None = None,
    progress: bool = False,
) -> int:
    from detailer.progress import SILENT, terminal_progress

    try:  # read first: preview workers, if any, then get ready while the rest is imported
        project = load_project(path)
    except ProjectError as exc:
        return _input_errors(exc, err)
    _input_notes(project, err)
    helpers = _start_previews(len(project.strips), previews)
    try:
        from detailer.build import BuildOptions

        bar = terminal_progress(err) if progress else SILENT
        options = BuildOptions(
            workers=jobs, previews=previews, progress=bar, preview_workers=helpers
        )
        return _run_build(path, out_dir, out, err, previous, options, project)
    finally:
        if helpers is not None:
            helpers.close()


def _input_notes(project, err: TextIO) -> None:
    """What reading the input repaired (a damaged drawing read by recovery), one line each:
    the user should know, and may want to mend the drawing."""
    for note in project.input_notes:
        print(f"note: {note}", file=err)


def _start_previews(n_strips: int, previews: bool | None):
    from detailer.preview_workers import start_preview_workers

    return start_preview_workers(n_strips, previews)


def _run_build(path, out_dir, out, err, previous, options, project) -> int:
    from detailer.build import BuildFailed, build

    bar = options.progress
    try:
        result, folder = build(path, out_dir, previous, options, project)
    except ProjectError as exc:
        bar.close()
        return _input_errors(exc, err)
    except BuildFailed as exc:
        bar.close()
        for _, reason in exc.failures:
            print(reason, file=err)
        print(f"{path}: {exc}; no files were written", file=err)
        print(CAUTION, file=err)
        return EXIT_DESIGN_FAILED
    except InputError as exc:  # e.g. an output folder that cannot be written
        bar.close()
        print(str(exc), file=err)
        return EXIT_INPUT_ERROR
    except ValueError as exc:  # a revision that cannot be advanced
        bar.close()
        print(f"{path}: {exc}", file=err)
        return EXIT_INPUT_ERROR
    bar.close()
    code = _report_build(path, result, folder, out)
    if result.not_detailed:
        for _, reason in result.not_detailed:
            print(reason, file=err)
        n_all = len(result.detail.strips) + len(result.not_detailed)
        ids = ", ".join(i for i, _ in result.not_detailed)
        done = "written" if not result.unchanged else "unchanged"
        print(
            f"{path}: {len(result.not_detailed)} of {n_all} strip(s) cannot be designed as "
            f"given ({ids}): they have no bars, sheet or schedule rows in this issue; the other "
            f"{len(result.detail.strips)} were {done}",
            file=err,
        )
        return EXIT_DESIGN_FAILED
    return code


def _report_build(path: str, result, folder, out: TextIO) -> int:
    """Print what a build did on ``out``; the exit code when no strip failed."""
    from detailer.preview_workers import PREVIEW_MAX_STRIPS

    detail = result.detail
    if result.unchanged:
        out.write(
            f"slabwright {__version__} build: {path}\n"
            f"no change since revision {result.previous_revision}: nothing written in {folder}\n"
        )
        out.write(CAUTION + "\n")
        return EXIT_OK
    out.write(f"slabwright {__version__} build: {path}\n")
    out.write(
        f"Project {detail.project.id}: {detail.project.title} (revision {detail.project.revision})\n"
    )
    for k, sd in enumerate(detail.strips):
        if k == STRIP_LINES_MAX and len(detail.strips) > STRIP_LINES_MAX + 1:
            rest = len(detail.strips) - k
            worst = max(detail.strips[k:], key=lambda d: d.selfcheck.utilisation_max)
            out.write(
                f"  ... and {rest} more strips (largest self-check utilisation "
                f"{worst.selfcheck.utilisation_max:.2f}, strip {worst.strip.id}); "
                "every strip is in the report\n"
            )
            break
        sc = sd.selfcheck
        n_bars = sum(b.count for b in sd.bar_sets)
        out.write(
            f"  strip {sd.strip.id}: {len(sd.zones)} zones, {len(sd.bar_sets)} bar sets, "
            f"{n_bars} bars; self-check utilisation {sc.utilisation_max:.2f} at x = "
            f"{sc.x_at_mm:.0f} mm ({sc.face.value})\n"
        )
    total = sum(line.mass_kg for line in result.schedule.summary)
    out.write(f"  total mass of reinforcement {total:.1f} kg\n")
    if result.previous_revision:
        out.write(
            f"  revision {result.previous_revision} -> {detail.project.revision}: "
            f"{result.description}\n"
        )
    if result.archive_dir is not None:
        out.write(f"  kept revision {result.previous_revision} in {result.archive_dir}\n")
    out.writelines(f"  wrote {folder / name}\n" for name, _ in result.files)
    if result.previews_skipped and detail.strips:
        out.write(
            f"  no PNG previews for {len(detail.strips)} strips (written for up to "
            f"{PREVIEW_MAX_STRIPS}); add --previews to render them\n"
        )
    if result.not_detailed:
        ids = ", ".join(i for i, _ in result.not_detailed)
        out.write(f"  INCOMPLETE ISSUE: not detailed: {ids} (reasons on stderr)\n")
    out.write(CAUTION + "\n")
    return EXIT_OK


def _num(value: float | None, digits: int = 2, width: int = 9) -> str:
    if value is None:
        return "-".rjust(width)
    return f"{value:{width}.{digits}f}"


def _segment_name(seg: Segment) -> str:
    kind = f"span {seg.span_number}" if seg.span_number else "cantilever"
    return f"{kind} {seg.label}"


def _other_loads(seg: Segment) -> str:
    parts = []
    for p in seg.loads.partial:
        what = " + ".join(
            f"{c} {v:g} kN/m2" for c, v in (("g", p.g_k_kn_per_m2), ("q", p.q_k_kn_per_m2)) if v
        )
        note = f" ({p.description})" if p.description else ""
        parts.append(f"{what} from {p.start_mm:g} to {p.end_mm:g}{note}")
    for ln in seg.loads.line:
        what = " + ".join(
            f"{c} {v:g} kN/m" for c, v in (("g", ln.g_k_kn_per_m), ("q", ln.q_k_kn_per_m)) if v
        )
        note = f" ({ln.description})" if ln.description else ""
        parts.append(f"line {what} at {ln.a_mm:g}{note}")
    return "; ".join(parts)


def _strip_text(project: Project, strip: Strip, a: StripAnalysis) -> list[str]:
    from detailer.codes.en1990 import category_description

    title = f"Strip {strip.id}" + (f": {strip.description}" if strip.description else "")
    origin = (
        "the free tip of the left cantilever"
        if strip.has_left_cantilever
        else f"the centreline of support {strip.supports[0].label}"
    )
    psi = strip.psi
    lines = [
        title,
        (
            f"  h = {strip.thickness_mm:g} mm; cover top {strip.cover_top_mm:g}, bottom "
            f"{strip.cover_bottom_mm:g}, side {strip.cover_side_mm:g} mm; panel width "
            f"{strip.panel_width_mm:g} mm; x from {origin}"
        ),
        (
            f"  imposed load category {strip.load_category} "
            f"({category_description(strip.load_category)}): psi_0 = {psi.psi_0:g}, "
            f"psi_1 = {psi.psi_1:g}, psi_2 = {psi.psi_2:g} (EN 1990 Table A1.1, UK NA)"
        ),
        (
            f"  self-weight {strip.self_weight_kn_per_m2:.3f} kN/m2 = {strip.thickness_mm / 1000:g} m"
            f" x {strip.concrete_density_kn_per_m3:g} kN/m3 (EN 1991-1-1 Table A.1)"
        ),
        "",
        "  Support      x (mm)  width (mm)  condition",
    ]
    n_sup = len(strip.supports)
    for k, s in enumerate(strip.supports):
        if k == 0:
            cond = _END_TEXT[strip.left_end.kind]
        elif k == n_sup - 1:
            cond = _END_TEXT[strip.right_end.kind]
        else:
            cond = "continuous"
        if n_sup == 1:
            cond = "monolithic cantilever root (fixed)"
        lines.append(f"  {s.label:<8}{s.x_mm:>11.0f}{s.width_mm:>12.0f}  {cond}")
    lines += [
        "",
        "  Segment            length (mm)  g_k (kN/m2)  q_k (kN/m2)  other loads",
    ]
    for seg in strip.segments:
        lines.append(
            f"  {_segment_name(seg):<18}{seg.length_mm:>12.0f}"
            f"{strip.g_k_total_kn_per_m2(seg.index):>13.3f}{seg.loads.q_k_kn_per_m2:>13.2f}"
            f"  {_other_loads(seg)}".rstrip()
        )
    lines.append(
        "  (g_k includes self-weight; other-load positions in mm from the segment's left end)"
    )

    uls = a.uls
    sls = a.sls_quasi_permanent
    lines += [
        "",
        (
            f"  ULS envelope: EN 1990 Eq. ({uls.combination.value}), arrangements "
            f"{project.analysis.pattern.value}, redistribution delta {uls.redistribution_delta:.2f}"
        ),
        "  Segment            M_max (kNm/m)  at x (mm)  M_max,qp (kNm/m)  governing M_max",
    ]
    segs = strip.segments
    for s, q in zip(uls.span_summaries(), sls.span_summaries(), strict=True):
        name = _segment_name(segs[s.segment])
        if s.m_max_knm > 0.0:
            row = f"{s.m_max_knm:>14.2f}{s.x_mm:>11.0f}{_num(q.m_max_knm if q.m_max_knm > 0 else None, width=18)}"
            lines.append(f"  {name:<18}{row}  {s.governing.label}")
        else:
            lines.append(f"  {name:<18}{'-':>14}{'-':>11}{'-':>18}  no sagging moment")
    reduce = project.analysis.use_support_reduction
    head = "  Support   M_cl (kNm/m)  M_face,left  M_face,right"
    head += "  M_cl,red" if reduce else ""
    head += "  R_max (kN/m)  governing M_cl"
    lines.append(head)
    offset = 1 if strip.has_left_cantilever else 0
    for s in uls.support_summaries():
        label = strip.supports[s.node - offset].label
        row = (
            f"  {label:<8}{s.m_min_knm:>14.2f}{_num(s.m_left_face_knm, width=13)}"
            f"{_num(s.m_right_face_knm, width=14)}"
        )
        if reduce:
            row += _num(s.m_min_reduced_knm, width=10)
        row += f"{s.reaction_max_kn:>14.2f}  {s.governing_m_min.label}"
        lines.append(row)
    lines.append("  (moments per metre width, sagging positive; reactions per metre width)")
    return lines


def format_check(
    path: str,
    project: Project,
    analyses: Sequence[StripAnalysis],
    designs: Sequence[Sequence[str]] | None = None,
) -> str:
    """The text printed by ``slabwright check`` (deterministic for a given file)."""
    m = project.materials
    an = project.analysis
    first = analyses[0] if analyses else None
    f = first.factors if first is not None else None
    lines = [
        f"slabwright {__version__} check: {path}",
        (
            f"Project {project.id}: {project.title} (revision {project.revision}, "
            f"{project.date}, drawing {project.drawing_ref or '-'})"
        ),
        (
            f"Code {project.code_id}; concrete {m.concrete_class} (f_ck {m.f_ck:g} MPa); "
            f"bars f_yk {m.f_yk:g} MPa, type {m.bar_type}, ductility class {m.ductility_class}; "
            f"exposure {m.exposure_class}"
        ),
    ]
    if f is not None:
        lines.append(
            f"Actions: gamma_G {f.gamma_g_sup:.2f} (favourable {f.gamma_g_inf:.2f}), "
            f"gamma_Q {f.gamma_q:.2f}, xi {f.xi:.3f} (EN 1990 Table A1.2(B), UK NA); "
            f"combination {an.combination.value}; arrangements {an.pattern.value}"
        )
    designs = designs if designs is not None else [[] for _ in analyses]
    failed = 0
    for strip, analysis, design in zip(project.strips, analyses, designs, strict=True):
        lines.append("")
        lines += _strip_text(project, strip, analysis)
        lines += list(design)
        failed += any("DESIGN FAILS" in d for d in design)
    if failed:
        lines += ["", f"{failed} of {len(project.strips)} strip(s) cannot be designed as given."]
    else:
        lines += ["", f"OK: {len(project.strips)} strip(s) checked."]
    lines.append(CAUTION)
    return "\n".join(lines) + "\n"
