"""The schedule CSV: reads back with Python's csv module, byte-identical on a rerun.

Sources: RFC 4180 (CSV format) as read by Python's ``csv`` module; columns of the BS 8666:2005
form of bar schedule (from memory); masses from BS 4449:1997, Table 1 (0.888 kg/m for 12 mm,
1.579 kg/m for 16 mm).
"""

from __future__ import annotations

import csv
import io

import pytest

from detailer import CAUTION
from detailer.codes.en1990 import PsiFactors
from detailer.io.csv_writer import COLUMNS, SUMMARY_COLUMNS, render_schedule_csv
from detailer.layout import BarRole, BarSet
from detailer.marks import assign_marks
from detailer.model import (
    EndKind,
    Materials,
    Project,
    SegmentLoads,
    Strip,
    StripEnd,
    Support,
)
from detailer.schedule import build_schedule
from detailer.shapes.bs8666 import make_shape
from tests.bar_fixtures import make_bar_set


def _strip(strip_id: str, description: str = "") -> Strip:
    return Strip(
        id=strip_id,
        thickness_mm=200.0,
        cover_top_mm=25.0,
        cover_bottom_mm=25.0,
        cover_side_mm=25.0,
        panel_width_mm=6200.0,
        supports=(Support("A", 0.0, 300.0), Support("B", 4000.0, 300.0)),
        left_end=StripEnd(EndKind.PINNED),
        right_end=StripEnd(EndKind.PINNED),
        segment_loads=(SegmentLoads(1.5, 2.5),),
        load_category="A",
        psi=PsiFactors(0.7, 0.5, 0.3),
        description=description,
    )


PROJECT = Project(
    id="harbour-view-l1",
    title="Harbour View – level 1 slab, grids 2–5",  # en dashes: UTF-8 must survive
    revision="P2",
    date="2025-04-01",
    drawing_ref="HV-S-101",
    materials=Materials(concrete_class="C30/37", f_ck=30.0, f_ck_cube=37.0),
    strips=(_strip("S1", "Grid 2, A–C"), _strip("S2")),
)


def _bar(
    strip: str, set_id: str, layer: str, phi: int, dims: dict[str, int], count: int, code: str
) -> BarSet:
    return make_bar_set(strip, set_id, layer, phi=phi, dims=dims, count=count, code=code)


def _schedule():
    strips = assign_marks(
        [
            (
                _bar("S1", "b", "B1", 12, {"A": 4200}, 31, "00"),
                _bar("S1", "t", "T1", 16, {"A": 1400, "B": 160}, 31, "11"),
            ),
            (_bar("S2", "b", "B1", 12, {"A": 4200}, 20, "00"),),
        ]
    )
    return build_schedule([b for s in strips for b in s], revision=PROJECT.revision)


def _read(data: bytes) -> list[list[str]]:
    return list(csv.reader(io.StringIO(data.decode("utf-8"), newline="")))


def test_header_lines_come_from_the_project_file() -> None:
    lines = _read(render_schedule_csv(_schedule(), PROJECT))
    head = {r[0]: r[1:] for r in lines[: lines.index(list(COLUMNS))] if r}
    assert head["Project"] == ["harbour-view-l1"]
    assert head["Title"] == ["Harbour View – level 1 slab, grids 2–5"]
    assert head["Drawing"] == ["HV-S-101"]
    assert head["Revision"] == ["P2"]
    assert head["Date"] == ["2025-04-01"]
    assert head["Caution"] == [CAUTION]
    assert head["Bar schedule"] == ["BS 8666:2005"]
    members = [r[1:] for r in lines if r and r[0] == "Member ref"]
    assert members == [["S1", "Grid 2, A–C"], ["S2"]]


def test_rows_read_back_with_the_csv_module() -> None:
    sched = _schedule()
    lines = _read(render_schedule_csv(sched, PROJECT))
    start = lines.index(list(COLUMNS)) + 1
    body = [dict(zip(COLUMNS, r)) for r in lines[start : start + len(sched.rows)]]
    assert [(r["Member"], r["Bar mark"], r["Type and size"]) for r in body] == [
        ("S1", "01", "H12"),
        ("S1", "02", "H16"),
        ("S2", "01", "H12"),
    ]
    l_bar = body[1]
    # Code 11, L = A + (B) - 0.5r - d = 1400 + 160 - 16 - 16 = 1528, scheduled 1530
    # (BS 8666:2005 shapes table, r = 32 mm for 16 mm bars from Table 2; rounded up to 5 mm).
    assert l_bar["Shape code"] == "11"
    assert (l_bar["A"], l_bar["B"], l_bar["C"], l_bar["D"], l_bar["E/r"]) == (
        "1400",
        "160",
        "",
        "",
        "",
    )
    assert l_bar["Length of each bar (mm)"] == "1530"
    assert (l_bar["No. of mbrs"], l_bar["No. of bars in each"], l_bar["Total no."]) == (
        "1",
        "31",
        "31",
    )
    assert all(r["Rev"] == "P2" for r in body)


def test_summary_block_reads_back_and_totals_match() -> None:
    sched = _schedule()
    lines = _read(render_schedule_csv(sched, PROJECT))
    at = lines.index(["Summary"])
    assert lines[at - 1] == []
    assert lines[at + 1] == list(SUMMARY_COLUMNS)
    summary = {r[0]: r[1:] for r in lines[at + 2 :]}
    # H12: 51 bars x 4.2 m = 214.2 m; x 0.888 kg/m (BS 4449:1997 Table 1) = 190.2 kg.
    n, length_m, kg_per_m, mass = summary["H12"]
    assert (n, length_m) == ("51", "214.20")
    assert float(kg_per_m) == pytest.approx(0.888, abs=0.001)
    assert float(mass) == pytest.approx(214.2 * 0.888, rel=1e-3)
    # H16: 31 x 1.53 m = 47.43 m x 1.579 kg/m = 74.9 kg.
    assert summary["H16"][1] == "47.43"
    assert float(summary["H16"][3]) == pytest.approx(47.43 * 1.579, rel=1e-3)
    total = summary["Total"]
    assert total[0] == "82"
    assert float(total[1]) == pytest.approx(214.2 + 47.43)
    assert float(total[3]) == pytest.approx(float(mass) + float(summary["H16"][3]), abs=0.011)


def test_rerun_is_byte_identical_with_unix_line_ends_and_utf8() -> None:
    a = render_schedule_csv(_schedule(), PROJECT)
    b = render_schedule_csv(_schedule(), PROJECT)
    assert a == b
    assert b"\r" not in a
    assert a.endswith(b"\n")
    assert "Harbour View – level 1".encode() in a  # raw UTF-8, no escapes, no BOM
    assert not a.startswith(b"\xef\xbb\xbf")


def test_code_99_sketch_and_free_dimension_in_parentheses() -> None:
    # BS 8666:2005 general notes: a code 99 is drawn as a dimensioned sketch with the free
    # dimension in parentheses.
    shape = make_shape(
        "99",
        12,
        {"A": 400, "B": 1200, "C": 400},
        free_dim="C",
        sketch_ref="SK-07",
        length_mm=1952.0,
    )
    b = BarSet("S1", "x", BarRole.PRINCIPAL, "T1", "z", "H", 12, 200, 0.0, 10, 0.0, 1200.0, shape)
    (marked,) = assign_marks([(b,)])
    lines = _read(render_schedule_csv(build_schedule(marked, revision="P2"), PROJECT))
    start = lines.index(list(COLUMNS)) + 1
    row = dict(zip(COLUMNS, lines[start]))
    assert (row["A"], row["B"], row["C"]) == ("400", "1200", "(400)")
    assert ["Sketch", "01", "SK-07"] in lines
