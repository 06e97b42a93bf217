"""The build record: typed data to byte-stable JSON; it agrees with the schedule.

Sources: RFC 8259 (JSON) as parsed by Python's ``json``; the midspan moment of a simply
supported span, w L^2 / 8 (any structural handbook), with w from EN 1990:2002 Eq. (6.10b) and
the UK NA factor xi = 0.925 (1.25 G_k + 1.5 Q_k, as in the Concrete Centre's UK worked
examples); masses from BS 4449:1997, Table 1 (0.888 kg/m for 12 mm bars).
"""

from __future__ import annotations

import dataclasses
import json
import math
import re
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer import CAUTION
from detailer.codes.en1990 import PsiFactors
from detailer.io.json_writer import (
    RecordReadError,
    format_json,
    previous_marks,
    read_previous_marks,
    record_file_name,
    render_record_json,
)
from detailer.layout import (
    AnchorageLength,
    BarSet,
    Check,
    Face,
    ProjectDetail,
    SelfCheck,
    StripDetail,
    ZoneDesign,
)
from detailer.marks import assign_marks, mark_project
from detailer.model import (
    EndKind,
    LineLoad,
    Materials,
    PartialLoad,
    Project,
    SegmentLoads,
    Strip,
    StripEnd,
    Support,
)
from detailer.record import build_record, record_to_jsonable
from detailer.record_types import SCHEMA_VERSION
from detailer.schedule import build_schedule
from detailer.strip_analysis import analyse_strip
from tests.bar_fixtures import make_bar_set

DOCS = Path(__file__).resolve().parents[1] / "docs" / "record-schema.md"


def _strip(strip_id: str, spans: tuple[float, ...]) -> Strip:
    partial = (PartialLoad(500.0, 1500.0, 2.0, 1.0, "plant plinth"),)
    line = (LineLoad(2250.0, 4.5, 0.0, "partition"),)
    xs = [0.0]
    for s in spans:
        xs.append(xs[-1] + s)
    return Strip(
        id=strip_id,
        thickness_mm=200.0,
        cover_top_mm=25.0,
        cover_bottom_mm=25.0,
        cover_side_mm=25.0,
        panel_width_mm=3050.0,
        supports=tuple(Support(chr(65 + i), x, 0.0) for i, x in enumerate(xs)),
        left_end=StripEnd(EndKind.PINNED),
        right_end=StripEnd(EndKind.PINNED),
        segment_loads=tuple(
            SegmentLoads(1.5, 2.5) if i == 0 else SegmentLoads(1.5, 2.5, partial, line)
            for i in range(len(spans))
        ),
        load_category="A",
        psi=PsiFactors(0.7, 0.5, 0.3),
        description="test strip – ünïcode",
    )


PROJECT = Project(
    id="harbour-view-l1",
    title="Harbour View – level 1",
    revision="P1",
    date="2025-04-01",
    drawing_ref="HV-S-101",
    materials=Materials(concrete_class="C30/37", f_ck=30.0, f_ck_cube=37.0),
    strips=(_strip("S1", (4000.0,)), _strip("S2", (4000.0, 4500.0))),
)
ANALYSES = {s.id: analyse_strip(PROJECT, s) for s in PROJECT.strips}


def _bar(
    strip: str,
    set_id: str,
    layer: str,
    phi: int,
    length: int,
    count: int,
    x: float = 0.0,
    code: str = "00",
) -> BarSet:
    dims = {"A": length} if code == "00" else {"A": length, "B": 200}
    return make_bar_set(
        strip, set_id, layer, phi=phi, dims=dims, count=count, code=code, x_start=x,
        zone_id="S1-B",
    )  # fmt: skip


def _zone(strip: str) -> ZoneDesign:
    check = Check(
        "A_s,prov >= A_s,design", "EN 1992-1-1:2004, 9.2.1.1(1)", 420.0, 565.5, "mm2/m", True
    )
    return ZoneDesign(
        zone_id=f"{strip}-S1-B",
        description="span 1, bottom",
        face=Face.BOTTOM,
        x_from_mm=0.0,
        x_to_mm=4000.0,
        x_peak_mm=2000.0,
        m_ed_knm_per_m=np.float64(23.7333333),
        d_mm=169.0,
        k=0.0277,
        k_prime=0.208,
        z_mm=160.55,
        as_req_mm2_per_m=339.9,
        as_min_mm2_per_m=254.9,
        as_max_mm2_per_m=8000.0,
        as_design_mm2_per_m=339.9,
        governing="flexure",
        phi_mm=12,
        spacing_mm=200,
        as_prov_mm2_per_m=565.4867,
        user_fixed=False,
        checks=(check,),
    )


def _detail(bar_sets_by_strip: dict[str, list[BarSet]]) -> ProjectDetail:
    strips = []
    for s in PROJECT.strips:
        sets = tuple(bar_sets_by_strip.get(s.id, []))
        strips.append(
            StripDetail(
                strip=s,
                analysis=ANALYSES[s.id],
                zones=(_zone(s.id),),
                bar_sets=sets,
                anchorage=(AnchorageLength(12, "B1", "good", 3.0, 434.8, 360.0, 505.0),),
                selfcheck=SelfCheck(0.61234, 2000.0, Face.BOTTOM, True),
                checks=(Check("zero capacity", "none", 1.0, 0.0, "-", False, "for the test"),),
            )
        )
    return mark_project(ProjectDetail(project=PROJECT, strips=tuple(strips)))


BASE_SETS = {
    "S1": [
        _bar("S1", "b", "B1", 12, 4200, 15, x=-100.0),
        _bar("S1", "d", "B2", 10, 2950, 14, x=0.0),
    ],
    "S2": [
        _bar("S2", "b1", "B1", 12, 4200, 15, x=-100.0),
        _bar("S2", "t", "T1", 12, 2000, 15, x=3100.0, code="11"),
    ],
}


def _json(detail: ProjectDetail) -> dict:
    return json.loads(render_record_json(build_record(detail)).decode("utf-8"))


def test_record_file_name() -> None:
    assert record_file_name("harbour-view-l1") == "harbour-view-l1-record.json"


def test_json_round_trip_and_byte_stable() -> None:
    detail = _detail(BASE_SETS)
    raw = render_record_json(build_record(detail))
    assert raw == render_record_json(build_record(_detail(BASE_SETS)))  # rerun: same bytes
    data = json.loads(raw.decode("utf-8"))
    again = format_json(data).encode("utf-8")
    assert again == raw  # what is read back writes the same bytes
    assert json.loads(again) == data
    assert data == record_to_jsonable(build_record(detail))
    assert raw.endswith(b"}\n") and not raw.endswith(b"\n\n")
    assert "Harbour View – level 1".encode() in raw  # ensure_ascii=False
    assert b"NaN" not in raw and b"Infinity" not in raw


def test_top_level_fields() -> None:
    data = _json(_detail(BASE_SETS))
    assert list(data)[:2] == ["schema_version", "project_id"]
    assert data["schema_version"] == SCHEMA_VERSION
    assert data["project_id"] == "harbour-view-l1"
    assert data["revision"] == "P1"
    assert data["design_code"] == "EN1992-1-1+UKNA"
    assert data["caution"] == CAUTION
    assert data["materials"]["f_ck_mpa"] == 30 and data["materials"]["f_yk_mpa"] == 500
    assert data["materials"]["bar_type"] == "H"
    assert [s["id"] for s in data["strips"]] == ["S1", "S2"]


def test_numbers_are_rounded_by_unit_and_numpy_floats_converted() -> None:
    data = _json(_detail(BASE_SETS))
    zone = data["strips"][0]["zones"][0]
    assert zone["m_ed_knm_per_m"] == 23.733  # np.float64 in, 3 decimals for kNm
    assert zone["as_prov_mm2_per_m"] == 565.5
    assert zone["d_mm"] == 169 and isinstance(zone["d_mm"], int)  # whole mm as an integer
    assert zone["z_mm"] == 160.6  # 0.1 mm otherwise
    assert zone["checks"][0]["utilisation"] == pytest.approx(420.0 / 565.5, abs=1e-4)
    assert data["strips"][0]["checks"][0]["utilisation"] is None  # infinite: null, not NaN
    assert data["strips"][0]["selfcheck"]["utilisation_max"] == 0.6123


def test_section_loads_and_effective_depths() -> None:
    strip = _json(_detail(BASE_SETS))["strips"][0]
    sec = strip["section"]
    assert (sec["thickness_mm"], sec["cover_bottom_mm"], sec["cover_side_mm"]) == (200, 25, 25)
    depths = {(d["layer"], d["phi_mm"]): d["d_mm"] for d in sec["effective_depths"]}
    # B1 from the zone design; B2 = 200 - 25 - 12 - 10/2 = 158 (geometry of the layers).
    assert depths == {("B1", 12): 169, ("B2", 10): 158}
    seg = strip["segments"][0]
    # Self-weight 0.2 m x 25 kN/m3 = 5.0 kN/m2 (EN 1991-1-1 Table A.1 density).
    assert seg["self_weight_kn_per_m2"] == 5.0
    assert seg["g_k_kn_per_m2"] == 6.5 and seg["q_k_kn_per_m2"] == 2.5
    assert strip["spans_mm"] == [4000]
    assert strip["left_end"]["kind"] == "pinned"
    actions = strip["actions"]
    assert [e["name"] for e in actions["equations"]] == ["6.10a", "6.10b"]
    assert actions["xi"] == 0.925 and actions["gamma_q"] == 1.5


def test_partial_and_line_loads_are_recorded() -> None:
    seg = _json(_detail(BASE_SETS))["strips"][1]["segments"][1]
    assert seg["partial_loads"] == [
        {
            "start_mm": 500,
            "end_mm": 1500,
            "g_k_kn_per_m2": 2.0,
            "q_k_kn_per_m2": 1.0,
            "description": "plant plinth",
        }
    ]
    assert seg["line_loads"] == [
        {"a_mm": 2250, "g_k_kn_per_m": 4.5, "q_k_kn_per_m": 0, "description": "partition"}
    ]


def test_envelope_midspan_moment_is_w_l_squared_over_8() -> None:
    strip = _json(_detail(BASE_SETS))["strips"][0]
    # Single 4 m span, G_k = 6.5, Q_k = 2.5 kN/m2. Eq. (6.10b) UK: 0.925 x 1.35 x 6.5 + 1.5 x
    # 2.5 = 11.867 kN/m governs 6.10a (1.35 x 6.5 + 1.05 x 2.5 = 11.4); M = w L^2 / 8.
    w = 0.925 * 1.35 * 6.5 + 1.5 * 2.5
    mid = next(s for s in strip["envelope"] if s["x_mm"] == 2000)
    assert mid["m_max_knm"] == pytest.approx(w * 4.0**2 / 8.0, abs=1e-3)
    assert mid["m_max_by"].startswith("6.10b")
    end = strip["envelope"][0]
    assert end["x_mm"] == 0 and end["v_max_kn"] == pytest.approx(w * 4.0 / 2.0, abs=1e-3)


def test_bar_sets_in_the_record() -> None:
    strip = _json(_detail(BASE_SETS))["strips"][0]
    b = strip["bar_sets"][0]
    assert (b["mark"], b["layer"], b["type_and_size"], b["spacing_mm"], b["count"]) == (
        "01",
        "B1",
        "H12",
        200,
        15,
    )
    assert (b["x_start_mm"], b["x_end_mm"], b["shape_code"]) == (-100, 4100, "00")
    assert b["dims_mm"] == {"A": 4200}
    # 15 x 4.2 m x 0.888 kg/m (BS 4449:1997 Table 1) = 55.9 kg.
    assert b["mass_kg"] == pytest.approx(15 * 4.2 * 0.888, rel=1e-3)
    assert strip["anchorage"][0]["l_bd_mm"] == 360


def test_every_field_is_documented() -> None:
    text = DOCS.read_text(encoding="utf-8")
    documented = set(re.findall(r"`([a-z_0-9]+)`", text))
    keys: set[str] = set()

    def walk(node: object, parent: str) -> None:
        if isinstance(node, dict):
            for k, v in node.items():
                if parent != "dims_mm":
                    keys.add(k)
                walk(v, k)
        elif isinstance(node, list):
            for v in node:
                walk(v, parent)

    walk(_json(_detail(BASE_SETS)), "")
    assert sorted(keys - documented) == []


def test_previous_marks_read_back_keep_the_marks(tmp_path: Path) -> None:
    raw = render_record_json(build_record(_detail(BASE_SETS)))
    table, withdrawn = previous_marks(json.loads(raw))
    assert sorted(table.values()) == ["01", "02", "03"] and withdrawn == ()
    path = tmp_path / "old-record.json"
    path.write_bytes(raw)
    table2, _ = read_previous_marks(path)
    assert table2 == table
    # Same bars in another order still take the same marks.
    strips = [list(reversed(BASE_SETS[s.id])) for s in PROJECT.strips]
    again = assign_marks(strips, table)
    assert {(b.strip_id, b.set_id): b.mark for s in again for b in s} == {
        (b.strip_id, b.set_id): b.mark for s in _detail(BASE_SETS).strips for b in s.bar_sets
    }


def test_damaged_earlier_record_is_one_line(tmp_path: Path) -> None:
    path = tmp_path / "old-record.json"
    path.write_text("{not json", encoding="utf-8")
    with pytest.raises(RecordReadError) as info:
        read_previous_marks(path)
    assert "\n" not in str(info.value) and str(path) in str(info.value)
    path.write_text('{"schema_version": 99}', encoding="utf-8")
    with pytest.raises(RecordReadError, match="schema_version 99"):
        read_previous_marks(path)


# ---- record <-> schedule agreement (property)

_SHAPES = [("00", 12, 3000), ("00", 10, 2950), ("11", 12, 1500), ("00", 16, 4800), ("11", 16, 2000)]


@st.composite
def _sets(draw: st.DrawFn) -> dict[str, list[BarSet]]:
    out: dict[str, list[BarSet]] = {}
    for strip in ("S1", "S2"):
        n = draw(st.integers(0, 6))
        sets = []
        for i in range(n):
            code, phi, length = draw(st.sampled_from(_SHAPES))
            layer = draw(st.sampled_from(("B1", "B2", "T1", "T2")))
            count = draw(st.integers(1, 40))
            x = float(draw(st.integers(0, 80)) * 100)
            sets.append(_bar(strip, f"s{i}", layer, phi, length, count, x=x, code=code))
        out[strip] = sets
    return out


@settings(max_examples=40, deadline=None)
@given(sets=_sets())
def test_every_record_bar_set_is_in_the_schedule_with_its_mark_count_and_length(
    sets: dict[str, list[BarSet]],
) -> None:
    detail = _detail(sets)
    data = json.loads(render_record_json(build_record(detail)))
    sched = build_schedule([b for s in detail.strips for b in s.bar_sets], revision="P1")
    rows = {(r.member, r.mark): r for r in sched.rows}
    counted: dict[tuple[str, str], int] = {}
    for strip in data["strips"]:
        for b in strip["bar_sets"]:
            row = rows[(strip["id"], b["mark"])]
            assert row.length_mm == b["length_mm"]
            assert row.type_and_size == b["type_and_size"]
            assert row.shape_code == b["shape_code"]
            assert dict(row.dims_mm) == b["dims_mm"]
            key = (strip["id"], b["mark"])
            counted[key] = counted.get(key, 0) + b["count"]
    assert counted == {k: r.n_bars_each for k, r in rows.items()}
    assert data["total_mass_kg"] == pytest.approx(sched.total_mass_kg, abs=1e-3)
    assert math.isclose(
        sum(b["mass_kg"] for s in data["strips"] for b in s["bar_sets"]),
        sched.total_mass_kg,
        abs_tol=1e-3 * (1 + sum(len(s["bar_sets"]) for s in data["strips"])),
    )
    marks = {m["mark"] for m in data["marks"]}
    assert marks == {r.mark for r in sched.rows}


def test_record_is_frozen_data() -> None:
    record = build_record(_detail(BASE_SETS))
    with pytest.raises(dataclasses.FrozenInstanceError):
        record.revision = "P2"  # type: ignore[misc]
