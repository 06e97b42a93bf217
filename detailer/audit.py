"""Audit of a layout drawing against the bar schedule: every place where they disagree.

The drawing is read as a person may have left it (:mod:`detailer.io.dxf_readback`): what its
callouts say wins over what its bars were tagged with, since the callout is what the fixer
reads. The schedule is read from its CSV file as the fabricator has it (the format of
:mod:`detailer.io.csv_writer`). Both are reduced to one line per member and mark: number of bars
in each member, type and size, length of each bar, shape code; then compared.

Findings (one per disagreement):

* ``missing-in-drawing`` / ``missing-in-schedule``: a mark of a member on one side only;
* ``label-missing``: a bar set drawn without its callout (section) or tag (plan);
* ``label-unreadable``: a callout whose text no longer reads as one;
* ``label-differs``: a callout whose layer or spacing differs from the bars it labels;
* ``count``, ``size``, ``length``, ``shape``: the values differ (lengths beyond 0.5 mm, since
  both sides give whole millimetres);
* ``geometry``: a bar drawn elsewhere or longer than its record says.

:func:`audit_layout` and :func:`parse_schedule_csv` are pure; :func:`run_audit` reads the files.
The command line turns ``AuditReport.ok`` into the exit code.
"""

from __future__ import annotations

__all__ = [
    "AuditFinding",
    "AuditReport",
    "FindingKind",
    "ScheduleLine",
    "audit_layout",
    "parse_schedule_csv",
    "run_audit",
]

import csv
import enum
import io
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

from detailer.errors import InputError
from detailer.io.csv_writer import COLUMNS
from detailer.io.dxf_readback import (
    DrawnBar,
    LayoutReadback,
    merge_readbacks,
    parse_tag,
    read_layout,
)
from detailer.marks import mark_number

#: Lengths agree within this, mm (both sides are whole millimetres).
LENGTH_TOL_MM = 0.5
#: A drawn bar end may sit half a bar off its recorded end (legs are drawn on the centre line).
EXTENT_TOL_MM = 1.0
#: Drawn developed length against the scheduled length: the 5 mm rounding of BS 8666 lengths
#: (from memory) and 1 mm for drawing the bends as arcs.
DRAWN_LENGTH_TOL_MM = 6.0


class FindingKind(enum.Enum):
    MISSING_IN_DRAWING = "missing-in-drawing"
    MISSING_IN_SCHEDULE = "missing-in-schedule"
    LABEL_MISSING = "label-missing"
    LABEL_UNREADABLE = "label-unreadable"
    LABEL_DIFFERS = "label-differs"
    COUNT = "count"
    SIZE = "size"
    LENGTH = "length"
    SHAPE = "shape"
    GEOMETRY = "geometry"


@dataclass(frozen=True, slots=True)
class AuditFinding:
    """One disagreement: the member and mark, what each side says, and a readable sentence."""

    kind: FindingKind
    member: str
    mark: str
    drawing: str  # the drawing's value ("" when it has none)
    schedule: str  # the schedule's value ("" when it has none)
    detail: str

    def __str__(self) -> str:
        return f"{self.member} mark {self.mark or '?'}: {self.kind.value}: {self.detail}"


@dataclass(frozen=True, slots=True)
class AuditReport:
    drawing: str
    schedule: str
    findings: tuple[AuditFinding, ...]

    @property
    def ok(self) -> bool:
        """True when drawing and schedule agree in everything audited."""
        return not self.findings


@dataclass(frozen=True, slots=True)
class ScheduleLine:
    """One row of the schedule CSV (the columns the audit compares)."""

    member: str
    mark: str
    type_and_size: str
    n_members: int
    n_bars_each: int
    total_bars: int
    length_mm: int
    shape_code: str
    line: int  # line number in the CSV file


# --------------------------------------------------------------------------------------------
# Schedule CSV


def parse_schedule_csv(text: str, source: str = "schedule.csv") -> tuple[ScheduleLine, ...]:
    """The rows of a schedule CSV (see :mod:`detailer.io.csv_writer`); one-line ``InputError``
    naming the file, line and column for anything that cannot be read."""
    reader = csv.reader(io.StringIO(text.lstrip("\ufeff")))
    rows = [(reader.line_num, row) for row in reader]
    start = next((i for i, (_, row) in enumerate(rows) if row[:2] == list(COLUMNS[:2])), None)
    if start is None:
        raise InputError(
            f"{source}: no schedule header row ({', '.join(COLUMNS[:3])}, ...) found; "
            "give the bar schedule CSV written by slabwright"
        )
    header = rows[start][1]
    missing = [c for c in COLUMNS[:8] if c not in header]
    if missing:
        raise InputError(
            f"{source}:{rows[start][0]}: header lacks column {missing[0]!r}; "
            "give the bar schedule CSV written by slabwright"
        )
    col = {name: header.index(name) for name in COLUMNS[:8]}
    out: list[ScheduleLine] = []
    for line_no, row in rows[start + 1 :]:
        if not any(cell.strip() for cell in row) or row[0] in ("Sketch", "Summary"):
            break

        def cell(name: str, row=row) -> str:
            i = col[name]
            return row[i].strip() if i < len(row) else ""

        def number(name: str, line_no=line_no, cell=cell) -> int:
            value = cell(name)
            try:
                return int(value)
            except ValueError:
                raise InputError(
                    f"{source}:{line_no}: column {name!r}: not a whole number ({value!r}); "
                    "correct the schedule row"
                ) from None

        out.append(
            ScheduleLine(
                member=cell("Member"),
                mark=cell("Bar mark"),
                type_and_size=cell("Type and size").upper().replace(" ", ""),
                n_members=number("No. of mbrs"),
                n_bars_each=number("No. of bars in each"),
                total_bars=number("Total no."),
                length_mm=number("Length of each bar (mm)"),
                shape_code=cell("Shape code"),
                line=line_no,
            )
        )
    return tuple(out)


# --------------------------------------------------------------------------------------------
# Comparison


def _mark_key(mark: str) -> str:
    """Marks compare as numbers when numeric ("01" = "1": a spreadsheet drops the zero)."""
    number = mark_number(mark)
    return str(number) if number is not None else mark.strip()


@dataclass(slots=True)
class _Side:
    """The drawing's view of one member and mark."""

    mark: str
    count: int = 0
    sizes: set[str] = field(default_factory=set)
    lengths: set[int] = field(default_factory=set)
    shapes: set[str] = field(default_factory=set)
    sets: list[str] = field(default_factory=list)


def audit_layout(
    drawing: LayoutReadback, schedule: Sequence[ScheduleLine]
) -> tuple[AuditFinding, ...]:
    """Every disagreement between the drawing read back and the schedule rows."""
    findings: list[AuditFinding] = []
    sides: dict[tuple[str, str], _Side] = {}
    for bar in drawing.bars:
        mark, count, size = _what_the_drawing_says(drawing, bar, findings)
        side = sides.setdefault((bar.strip_id, _mark_key(mark)), _Side(mark))
        side.count += count
        side.sizes.add(size)
        side.lengths.add(bar.length_mm)
        side.shapes.add(bar.shape_code)
        side.sets.append(bar.set_id)
        findings += _geometry(bar)
    for lab in drawing.labels:
        if not lab.tagged and not lab.set_id and lab.callout is not None:
            findings.append(
                AuditFinding(
                    FindingKind.LABEL_DIFFERS,
                    lab.strip_id or "?",
                    lab.callout.mark,
                    lab.text,
                    "",
                    f"callout {lab.text!r} matches no bar set drawn with mark {lab.callout.mark}",
                )
            )

    rows: dict[tuple[str, str], ScheduleLine] = {}
    for r in schedule:
        rows[(r.member, _mark_key(r.mark))] = r
        if r.total_bars != r.n_members * r.n_bars_each:
            findings.append(
                AuditFinding(
                    FindingKind.COUNT,
                    r.member,
                    r.mark,
                    "",
                    str(r.total_bars),
                    f"schedule line {r.line}: total {r.total_bars} is not {r.n_members} members x "
                    f"{r.n_bars_each} bars",
                )
            )
    for key in sorted(set(sides) | set(rows), key=_order):
        side, row = sides.get(key), rows.get(key)
        if row is None:
            assert side is not None
            findings.append(
                AuditFinding(
                    FindingKind.MISSING_IN_SCHEDULE,
                    key[0],
                    side.mark,
                    ", ".join(side.sets),
                    "",
                    f"drawn ({', '.join(side.sets)}) but not in the schedule",
                )
            )
            continue
        if side is None:
            findings.append(
                AuditFinding(
                    FindingKind.MISSING_IN_DRAWING,
                    row.member,
                    row.mark,
                    "",
                    str(row.n_bars_each),
                    f"scheduled (line {row.line}, {row.n_bars_each} {row.type_and_size}) but not "
                    "drawn",
                )
            )
            continue
        findings += _compare(key[0], side, row)
    return tuple(findings)


def _order(key: tuple[str, str]) -> tuple[str, int, str]:
    number = mark_number(key[1])
    return (key[0], number if number is not None else 10**9, key[1])


def _what_the_drawing_says(drawing: LayoutReadback, bar: DrawnBar, findings: list) -> tuple:
    """(mark, count, type and size) of a bar set: from its section callout when readable."""
    mark, count, size = bar.mark, bar.count, bar.type_and_size
    callouts = drawing.labels_of(bar.strip_id, bar.set_id, "section")
    if not callouts:
        findings.append(
            AuditFinding(
                FindingKind.LABEL_MISSING,
                bar.strip_id,
                bar.mark,
                "",
                "",
                f"bar set {bar.set_id} ({bar.count}{bar.type_and_size} {bar.layer}) has no callout "
                "in the section",
            )
        )
    else:
        c = callouts[0].callout
        if c is None:
            findings.append(
                AuditFinding(
                    FindingKind.LABEL_UNREADABLE,
                    bar.strip_id,
                    bar.mark,
                    callouts[0].text,
                    "",
                    f"callout of bar set {bar.set_id} reads {callouts[0].text!r}, not a bar callout",
                )
            )
        else:
            mark, count, size = c.mark, c.count, c.type_and_size
            for what, said, drawn in (
                ("layer", c.layer, bar.layer),
                ("spacing", str(c.spacing_mm), str(bar.spacing_mm)),
            ):
                if said != drawn:
                    findings.append(
                        AuditFinding(
                            FindingKind.LABEL_DIFFERS,
                            bar.strip_id,
                            c.mark,
                            said,
                            "",
                            f"callout of bar set {bar.set_id} gives {what} {said}, the bars are "
                            f"drawn at {drawn}",
                        )
                    )
    if "plan" in bar.views:
        tags = drawing.labels_of(bar.strip_id, bar.set_id, "plan")
        parsed = parse_tag(tags[0].text) if tags else None
        if not tags:
            findings.append(
                AuditFinding(
                    FindingKind.LABEL_MISSING,
                    bar.strip_id,
                    bar.mark,
                    "",
                    "",
                    f"bar set {bar.set_id} has no tag in the plan",
                )
            )
        elif parsed is None or _mark_key(parsed[0]) != _mark_key(mark):
            findings.append(
                AuditFinding(
                    FindingKind.LABEL_DIFFERS,
                    bar.strip_id,
                    mark,
                    tags[0].text,
                    "",
                    f"plan tag of bar set {bar.set_id} reads {tags[0].text!r}, the callout gives "
                    f"mark {mark}",
                )
            )
    return mark, count, size


def _geometry(bar: DrawnBar) -> list[AuditFinding]:
    out = []
    if bar.drawn_x_min_mm is None or bar.drawn_x_max_mm is None:
        return out
    phi = _phi(bar.type_and_size)
    tol = EXTENT_TOL_MM + phi / 2
    if bar.role == "principal":
        off = max(abs(bar.drawn_x_min_mm - bar.x_start_mm), abs(bar.drawn_x_max_mm - bar.x_end_mm))
        if off > tol:
            out.append(
                AuditFinding(
                    FindingKind.GEOMETRY,
                    bar.strip_id,
                    bar.mark,
                    f"{bar.drawn_x_min_mm:.0f}..{bar.drawn_x_max_mm:.0f}",
                    f"{bar.x_start_mm:.0f}..{bar.x_end_mm:.0f}",
                    f"bar set {bar.set_id} is drawn from x = {bar.drawn_x_min_mm:.0f} to "
                    f"{bar.drawn_x_max_mm:.0f}, recorded {bar.x_start_mm:.0f} to {bar.x_end_mm:.0f}",
                )
            )
        if (
            bar.drawn_length_mm is not None
            and abs(bar.drawn_length_mm - bar.length_mm) > DRAWN_LENGTH_TOL_MM
        ):
            out.append(
                AuditFinding(
                    FindingKind.GEOMETRY,
                    bar.strip_id,
                    bar.mark,
                    f"{bar.drawn_length_mm:.0f}",
                    str(bar.length_mm),
                    f"bar set {bar.set_id} is drawn {bar.drawn_length_mm:.0f} mm long, scheduled "
                    f"{bar.length_mm} mm",
                )
            )
    elif abs(bar.drawn_x_min_mm - bar.x_start_mm) > tol:
        out.append(
            AuditFinding(
                FindingKind.GEOMETRY,
                bar.strip_id,
                bar.mark,
                f"{bar.drawn_x_min_mm:.0f}",
                f"{bar.x_start_mm:.0f}",
                f"distribution bars {bar.set_id} start at x = {bar.drawn_x_min_mm:.0f}, recorded "
                f"{bar.x_start_mm:.0f}",
            )
        )
    return out


def _phi(type_and_size: str) -> float:
    digits = "".join(ch for ch in type_and_size if ch.isdigit())
    return float(digits) if digits else 0.0


def _compare(member: str, side: _Side, row: ScheduleLine) -> list[AuditFinding]:
    out = []
    mark = row.mark
    if side.count != row.n_bars_each:
        out.append(
            AuditFinding(
                FindingKind.COUNT,
                member,
                mark,
                str(side.count),
                str(row.n_bars_each),
                f"drawing shows {side.count} bars in the member, schedule {row.n_bars_each} "
                f"(line {row.line})",
            )
        )
    for size in sorted(side.sizes):
        if size.upper() != row.type_and_size:
            out.append(
                AuditFinding(
                    FindingKind.SIZE,
                    member,
                    mark,
                    size,
                    row.type_and_size,
                    f"drawing gives {size}, schedule {row.type_and_size} (line {row.line})",
                )
            )
    for length in sorted(side.lengths):
        if abs(length - row.length_mm) > LENGTH_TOL_MM:
            out.append(
                AuditFinding(
                    FindingKind.LENGTH,
                    member,
                    mark,
                    str(length),
                    str(row.length_mm),
                    f"drawing gives bars {length} mm long, schedule {row.length_mm} mm "
                    f"(line {row.line})",
                )
            )
    for shape in sorted(side.shapes):
        if shape != row.shape_code:
            out.append(
                AuditFinding(
                    FindingKind.SHAPE,
                    member,
                    mark,
                    shape,
                    row.shape_code,
                    f"drawing gives shape code {shape}, schedule {row.shape_code} (line {row.line})",
                )
            )
    return out


# --------------------------------------------------------------------------------------------
# Files


def run_audit(dxf_path: str | Path | Sequence[str | Path], csv_path: str | Path) -> AuditReport:
    """Read the drawing (one file, or every file of a drawing split into several) and the
    schedule CSV and audit one against the other.

    Raises a one-line ``InputError`` for a file that cannot be read (missing, not a DXF, not
    the schedule CSV, a drawing without slabwright's bar data).
    """
    paths = [dxf_path] if isinstance(dxf_path, (str, Path)) else list(dxf_path)
    parts = []
    for one in paths:
        part = read_layout(Path(one))
        if not part.bars:
            raise InputError(
                f"{one}: the drawing holds no slabwright bar data (XDATA 'SLABWRIGHT'); "
                "audit a layout drawing written by slabwright"
            )
        parts.append(part)
    drawing = parts[0] if len(parts) == 1 else merge_readbacks(parts)
    dxf_path = " + ".join(str(p) for p in paths)
    path = Path(csv_path)
    try:
        text = path.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise InputError(f"{path}: no such schedule file; check the path") from None
    except UnicodeDecodeError:
        raise InputError(f"{path}: not a UTF-8 text file; give the schedule CSV") from None
    except OSError as exc:
        raise InputError(f"{path}: cannot read the schedule ({exc.strerror or exc})") from None
    schedule = parse_schedule_csv(text, str(path))
    return AuditReport(str(dxf_path), str(path), audit_layout(drawing, schedule))
