"""The calculation report: one self-contained HTML file (inline CSS and SVG, no scripts).

:func:`render_report` is pure: the detailed project, its record and its schedule in, bytes out.
Numbers that are in the record are printed from the record's JSON-ready form, so they read
exactly as in ``<project-id>-record.json``; plots are drawn from the same analysis and
resistance objects the record was built from. The page prints to A4, one strip per page
group, with the caution at the top and the bottom.
"""

from __future__ import annotations

__all__ = ["render_report", "report_file_name"]

from detailer import CAUTION
from detailer.layout import ProjectDetail
from detailer.record import record_to_jsonable
from detailer.record_types import ProjectRecord
from detailer.report.design_sections import (
    all_checks,
    anchorage_section,
    checks_summary_section,
    curtailment_section,
    design_section,
    highest,
    other_checks_section,
    serviceability_shear_section,
)
from detailer.report.input_sections import actions_section, analysis_section, input_section
from detailer.report.markup import Json, c, esc, k, num, raw, table, tag
from detailer.report.revision_section import revisions_section
from detailer.revisions import RevisionDiff
from detailer.schedule import Schedule

CSS = """
@page { size: A4; margin: 14mm 12mm 16mm 12mm;
        @bottom-left { content: "@CAUTION@"; font: bold 6.5pt sans-serif; color: #6d0010; }
        @bottom-right { content: "page " counter(page) " of " counter(pages);
                        font: 6.5pt sans-serif; } }
* { box-sizing: border-box; }
html { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif;
       font-size: 9pt; line-height: 1.35; color: #111; margin: 0 auto; max-width: 190mm;
       padding: 6mm 0; background: #fff; }
h1 { font-size: 15pt; margin: 0 0 2mm; }
h2 { font-size: 13pt; margin: 0 0 2mm; padding-bottom: 1mm; border-bottom: 0.5mm solid #222; }
h3 { font-size: 10.5pt; margin: 5mm 0 1.5mm; break-after: avoid; }
p { margin: 1.5mm 0; }
code { font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 8pt; }
code.hash { word-break: break-all; }
.incomplete { border: 0.6mm solid #a15c00; background: #fff6e5; padding: 2mm 3mm; margin: 3mm 0;
              break-inside: avoid; }
.incomplete h2 { color: #7a4500; border-bottom-color: #a15c00; }
.incomplete table { background: #fff; }
.caution { border: 0.6mm solid #b00020; background: #fff3f3; color: #6d0010; padding: 2mm 3mm;
           font-weight: bold; margin: 3mm 0; break-inside: avoid; }
table { border-collapse: collapse; width: 100%; margin: 1.5mm 0 3mm; font-size: 7.6pt;
        break-inside: auto; }
caption { caption-side: top; text-align: left; font-weight: bold; font-size: 8pt;
          padding: 0 0 1mm; }
th, td { border: 0.25mm solid #999; padding: 0.6mm 1.2mm; vertical-align: top; text-align: left; }
th { background: #eceff3; font-weight: bold; }
thead { display: table-header-group; }
tr { break-inside: avoid; }
table.keep { break-inside: avoid; }
td.num { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; }
td.note { color: #444; font-size: 7pt; }
.nw { white-space: nowrap; }
table.summary { width: auto; }
td.ok { color: #176b2c; font-weight: bold; }
td.fail, .fail { color: #b00020; font-weight: bold; }
tr.peak td { background: #fff1b8; }
tr.peak td:first-child::before { content: "\\25B2 "; color: #a15c00; }
table.kv { width: auto; min-width: 60%; }
figure { margin: 2mm 0 3mm; break-inside: avoid; }
figure svg { width: 100%; height: auto; display: block; }
figcaption { font-size: 7.6pt; color: #333; margin-top: 1mm; }
.strip { break-before: page; }
.meta td:first-child { font-weight: bold; width: 35%; }
.source { font-size: 8pt; }
ol.arrangements { margin: 1mm 0 2mm 5mm; padding-left: 4mm; font-size: 8pt; columns: 2; }
.warn { color: #8a4b00; }
.schedule { break-before: page; }
tr.current td, tr.total td { font-weight: bold; }
@media screen { body { padding: 8mm; } }
"""


def _css() -> str:
    """The style sheet, with the caution in every printed page's footer."""
    safe = CAUTION.replace("\\", "\\\\").replace('"', '\\"')
    return CSS.replace("@CAUTION@", safe)


def report_file_name(project_id: str) -> str:
    """File name of a project's report: ``<project-id>-calcs.html`` (the calculation report)."""
    return f"{project_id}-calcs.html"


def _caution() -> str:
    return tag("div", esc(CAUTION), cls="caution", role="note")


def _header(r: Json, *, input_name: str, input_sha256: str) -> str:
    rows = [
        ("Project", f"{r['title']} ({r['project_id']})"),
        ("Revision, date", f"{r['revision']}, {r['date']}"),
        ("Drawing", r["drawing_ref"]),
        ("Design code", r["design_code"]),
        ("Input file", input_name),
    ]
    cells = [[c(a), c(b)] for a, b in rows]
    cells.append([c("Input SHA-256"), raw(f"<code class='hash'>{esc(input_sha256)}</code>")])
    cells.append([c("Record"), c(f"{r['project_id']}-record.json (same numbers, same rounding)")])
    return tag("h1", "Calculation report: " + esc(r["title"])) + table(
        ["", ""], cells, cls="meta kv"
    )


def _conventions() -> str:
    return tag(
        "p",
        "Units: mm, kN, kNm and N/mm&sup2;; forces and moments per metre width of slab, areas in "
        "mm&sup2;/m. x is measured along the strip from its left end (the free tip of a left "
        "cantilever, otherwise the centreline of the first support). Sagging moments are "
        "positive and are drawn on the tension side, below the axis (UK convention). Numbers "
        "carry the rounding of the record: lengths to 0.1 mm, areas to 0.1 mm&sup2;/m, forces "
        "and moments to 0.001, other numbers to 0.0001.",
        cls="conventions",
    )


def _overview(r: Json, missing: tuple[tuple[str, str], ...]) -> str:
    rows = []
    for s in r["strips"]:
        checks = all_checks(s)
        peak = highest(checks)
        worst = next(x for x in checks if x.utilisation == peak)
        n_fail = sum(1 for x in checks if not x.check["ok"])
        rows.append(
            [
                c(s["id"]),
                c(s["description"]),
                c(len(checks), "num"),
                raw("all OK", "ok") if n_fail == 0 else raw(f"{n_fail} fail", "fail"),
                k(worst.check["utilisation"], f"{s['id']}/summary/utilisation_max"),
                c(f"{worst.where}: {worst.check['name']}", "note"),
            ]
        )
    for sid, _ in missing:
        rows.append(
            [
                c(sid),
                c("not detailed in this issue"),
                c(""),
                raw("not detailed", "fail"),
                raw("&ndash;", "num"),
                raw("<a href='#not-detailed'>see above</a>", "note"),
            ]
        )
    return table(
        ["Strip", "Description", "Checks", "Result", "Highest utilisation", "in"],
        rows,
        caption="Overview",
    )


def _not_detailed(strips: tuple[tuple[str, str], ...]) -> str:
    """The strips this issue could not design, with the reason for each, marked as such."""
    if not strips:
        return ""
    n = len(strips)
    lead = (
        f"<strong>This issue is incomplete.</strong> {n} "
        + ("strip" if n == 1 else "strips")
        + " of the project could not be designed and "
        + ("is" if n == 1 else "are")
        + " not detailed: "
        + ("it has" if n == 1 else "they have")
        + " no bars on the drawing or in the bar schedule, and no calculations in this "
        "report. Correct the input and issue again before the reinforcement is fixed."
    )
    rows = [[c(sid, "nw"), c(reason)] for sid, reason in strips]
    return tag(
        "section",
        tag("h2", "Strips not detailed in this issue")
        + tag("p", lead)
        + table(["Strip", "Why it could not be designed"], rows),
        cls="incomplete",
        id="not-detailed",
    )


def _schedule(schedule: Schedule, r: Json) -> str:
    rows = [
        [
            c(line.type_and_size),
            c(line.total_bars, "num"),
            c(f"{line.total_length_m:.2f}", "num"),
            c(f"{line.mass_kg_per_m:.3f}", "num"),
            c(num(round(line.mass_kg, 3) + 0.0), "num"),
        ]
        for line in schedule.summary
    ]
    rows.append(
        [
            raw("<strong>Total</strong>"),
            c(sum(x.total_bars for x in schedule.summary), "num"),
            c(f"{schedule.total_length_m:.2f}", "num"),
            c(""),
            k(r["total_mass_kg"], "total_mass_kg"),
        ]
    )
    return tag(
        "section",
        tag("h2", "Bar schedule summary")
        + table(
            ["Type and size", "Bars", "Total length (m)", "Mass per metre (kg/m)", "Mass (kg)"],
            rows,
            caption=f"All members, revision {esc(schedule.revision)} (BS 8666 schedule in "
            f"{esc(r['project_id'])}-schedule.csv; nominal mass per metre from the bar area "
            "&times; 7850 kg/m&sup3;)",
        ),
        cls="schedule",
    )


def render_report(
    detail: ProjectDetail,
    record: ProjectRecord,
    schedule: Schedule,
    *,
    input_name: str,
    input_sha256: str,
    changes: RevisionDiff | None = None,
    not_detailed: tuple[tuple[str, str], ...] = (),
    record_data: dict | None = None,
) -> bytes:
    """The calculation report as UTF-8 HTML bytes (same input, same bytes).

    ``changes``: this issue against the previous one (:func:`detailer.revisions.compare_records`),
    shown in the "Revisions" section; ``None`` at a first issue. ``not_detailed``: (strip
    id, one-line reason) of the strips that could not be designed in this issue, listed near
    the top under "Strips not detailed in this issue" (the issue is then incomplete).
    ``record_data``: ``record_to_jsonable(record)`` when the caller has it already.
    """
    r = record_data if record_data is not None else record_to_jsonable(record)
    if len(r["strips"]) != len(detail.strips):
        raise ValueError("the record and the detailed project have different strips")
    missing = tuple((str(sid), str(reason)) for sid, reason in not_detailed)
    both = {s["id"] for s in r["strips"]} & {sid for sid, _ in missing}
    if both:
        raise ValueError(f"strip {min(both)} is both detailed and not detailed")
    bar_type = r["materials"]["bar_type"]
    body = [
        _caution(),
        _header(r, input_name=input_name, input_sha256=input_sha256),
        _not_detailed(missing),
        revisions_section(r, changes),
        _conventions(),
        _overview(r, missing),
    ]
    for s, sd in zip(r["strips"], detail.strips, strict=True):
        if s["id"] != sd.strip.id:
            raise ValueError(f"record strip {s['id']} is not detailed strip {sd.strip.id}")
        salt = f"{r['project_id']}/{s['id']}"
        title = f"Strip {esc(s['id'])}" + (f": {esc(s['description'])}" if s["description"] else "")
        parts = [
            tag("h2", title),
            input_section(s, r["materials"], sd, input_name=input_name, input_sha256=input_sha256),
            actions_section(s),
            analysis_section(s, sd, detail.project.analysis, salt=salt),
            design_section(s, bar_type),
            serviceability_shear_section(s),
            anchorage_section(s),
            curtailment_section(s, sd, salt=salt),
            other_checks_section(s),
            checks_summary_section(s),
        ]
        body.append(tag("section", "".join(parts), cls="strip", id=f"strip-{s['id']}"))
    body.append(_schedule(schedule, r))
    body.append(_caution())
    doc = (
        "<!DOCTYPE html>\n"
        '<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        f"<title>{esc(r['title'])} - calculation report</title>\n"
        '<meta name="generator" content="slabwright">\n'
        f"<style>{_css()}</style>\n</head>\n<body>\n" + "\n".join(body) + "\n</body>\n</html>\n"
    )
    return doc.encode("utf-8")
