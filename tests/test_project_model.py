"""A good project file -> the model: values, derived geometry, defaults, determinism.

Sources: EN 1991-1-1:2002 Table A.1 (reinforced concrete 25 kN/m3); EN 1992-1-1:2004 Table 3.1
(C30/37: f_ck 30, f_ck,cube 37 MPa); BS 8500-1 class C32/40 (f_ck 32, cube 40; from memory);
EN 1990:2002 Table A1.1 (category A: psi 0.7 / 0.5 / 0.3); hand sums of the sample geometry.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.model import (
    Combination,
    Curtailment,
    EndKind,
    PatternRule,
    SegmentKind,
)
from detailer.project import load_project, parse_project

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"

MINIMAL = """\
project: {id: demo, title: "Demo floor", revision: 3, date: "2025-03-14"}
materials: {concrete: C30/37}
strips:
  - id: S1
    thickness_mm: 200
    cover: {top_mm: 25, bottom_mm: 30, side_mm: 25}
    panel_width_mm: 5000
    SPANS
    support_widths_mm: 250
    left_end: LEFT
    right_end: RIGHT
    loads: {category: b, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 2.5}
"""


def minimal(
    spans: str = "spans_mm: [4000, 4500]",
    left: str = "pinned",
    right: str = "{cantilever_mm: 1200}",
) -> str:
    return MINIMAL.replace("SPANS", spans).replace("LEFT", left).replace("RIGHT", right)


def test_sample_project_header_and_materials() -> None:
    p = load_project(SAMPLE)
    assert (p.id, p.revision, p.date, p.drawing_ref) == (
        "quayside-terrace-l2",
        "P1",
        "2025-03-14",
        "QT-S-202",
    )
    assert p.code_id == "EN1992-1-1+UKNA"
    m = p.materials
    assert (m.concrete_class, m.f_ck, m.f_ck_cube) == ("C32/40", 32.0, 40.0)
    assert (m.f_yk, m.bar_type, m.ductility_class, m.exposure_class) == (500.0, "H", "B", "XC1")
    assert p.analysis.combination is Combination.EQ_6_10AB
    assert p.analysis.pattern is PatternRule.UK_SIMPLIFIED
    assert p.analysis.redistribution_delta == 1.0
    assert not p.analysis.use_support_reduction and p.analysis.design_at_support_faces
    assert p.reinforcement.diameters_mm == (10, 12, 16, 20)
    assert p.reinforcement.spacings_mm == tuple(range(100, 301, 25))
    assert p.reinforcement.curtailment is Curtailment.ENVELOPE


def test_sample_strip_geometry_and_loads() -> None:
    s1, s2 = load_project(SAMPLE).strips
    # EN 1991-1-1 Table A.1: 0.225 m x 25 kN/m3 = 5.625 kN/m2; 0.200 m -> 5.0 kN/m2.
    assert s1.self_weight_kn_per_m2 == pytest.approx(5.625, abs=1e-12)
    assert s2.self_weight_kn_per_m2 == pytest.approx(5.0, abs=1e-12)
    assert s1.spans_mm == (4200.0, 5600.0, 5100.0, 4600.0)
    assert s1.node_x_mm == (0.0, 4200.0, 9800.0, 14900.0, 19500.0, 21000.0)
    assert s1.length_mm == 21000.0
    assert [s.label for s in s1.supports] == ["A", "B", "C", "D", "E"]
    assert s1.left_end.kind is EndKind.MONOLITHIC
    assert (s1.right_end.kind, s1.right_end.cantilever_mm) == (EndKind.CANTILEVER, 1500.0)
    # Cover: the strip's own top_mm over the defaults' bottom/side.
    assert (s1.cover_top_mm, s1.cover_bottom_mm, s1.cover_side_mm) == (30.0, 25.0, 25.0)
    segs = s1.segments
    assert [g.label for g in segs] == ["A-B", "B-C", "C-D", "D-E", "E-tip"]
    assert [g.span_number for g in segs] == [1, 2, 3, 4, None]
    assert segs[-1].kind is SegmentKind.RIGHT_CANTILEVER and segs[-1].length_mm == 1500.0
    assert (segs[-1].loads.g_k_kn_per_m2, segs[-1].loads.q_k_kn_per_m2) == (1.2, 2.5)
    assert s1.g_k_total_kn_per_m2(0) == pytest.approx(7.125)
    (partition,) = segs[2].loads.line
    assert (partition.a_mm, partition.g_k_kn_per_m, partition.q_k_kn_per_m) == (2550.0, 4.5, 0.0)
    # EN 1990 Table A1.1, category A.
    assert s1.load_category == "A"
    assert (s1.psi.psi_0, s1.psi.psi_1, s1.psi.psi_2) == (0.7, 0.5, 0.3)
    # Corridor strip given by supports_mm.
    assert s2.spans_mm == (3600.0, 1800.0, 3600.0)
    assert [s.width_mm for s in s2.supports] == [215.0, 300.0, 300.0, 215.0]
    (riser,) = s2.segments[1].loads.partial
    assert (riser.start_mm, riser.end_mm, riser.g_k_kn_per_m2) == (0.0, 900.0, 2.0)
    assert s2.segments[1].loads.q_k_kn_per_m2 == 3.0


def test_minimal_file_defaults() -> None:
    p = parse_project(minimal(), "m.yaml")
    assert p.revision == "3"  # a plain number is taken as text
    assert p.drawing_ref == ""
    assert (p.materials.f_ck, p.materials.f_ck_cube) == (30.0, 37.0)  # EN 1992-1-1 Table 3.1
    assert p.materials.f_yk == 500.0 and p.materials.bar_type == "H"
    assert p.analysis.combination is Combination.EQ_6_10AB
    s = p.strips[0]
    assert s.load_category == "B"  # lower case accepted
    assert (s.psi.psi_0, s.psi.psi_1, s.psi.psi_2) == (0.7, 0.5, 0.3)  # EN 1990 Table A1.1
    assert s.node_x_mm == (0.0, 4000.0, 8500.0, 9700.0)


def test_left_cantilever_origin_and_supports_mm_origin() -> None:
    s = parse_project(
        minimal("supports_mm: [2000, 6000]", "{cantilever_mm: 1500}", "pinned"), "m"
    ).strips[0]
    # x from the free tip: supports at 1500 and 1500 + 4000.
    assert [x.x_mm for x in s.supports] == [1500.0, 5500.0]
    assert s.node_x_mm == (0.0, 1500.0, 5500.0)
    assert [g.label for g in s.segments] == ["tip-A", "A-B"]


def test_combination_6_10_and_redistribution() -> None:
    text = (
        minimal() + 'design: {combination: "6.10", arrangements: all-subsets, '
        "redistribution_delta: 0.85, support_reduction: true}\n"
    )
    p = parse_project(text, "m")
    assert p.analysis.combination is Combination.EQ_6_10
    assert p.analysis.pattern is PatternRule.ALL_SUBSETS
    assert p.analysis.redistribution_delta == 0.85
    assert p.analysis.use_support_reduction


def test_class_a_limits_redistribution() -> None:
    # UK NA to EN 1992-1-1 5.5(4): delta >= 0.8 with Class A reinforcement (from memory).
    text = minimal().replace(
        "concrete: C30/37", "concrete: C30/37, bar_type: A, ductility_class: A"
    )
    parse_project(text + "design: {redistribution_percent: 20}\n", "m")
    with pytest.raises(Exception, match="below 0.8"):
        parse_project(text + "design: {redistribution_percent: 25}\n", "m")


def test_model_is_frozen_and_deterministic() -> None:
    a, b = load_project(SAMPLE), load_project(SAMPLE)
    assert a == b
    with pytest.raises(dataclasses.FrozenInstanceError):
        a.strips[0].thickness_mm = 250.0  # type: ignore[misc]


@settings(max_examples=40, deadline=None)
@given(
    spans=st.lists(st.integers(300, 12000), min_size=1, max_size=8),
    width=st.integers(0, 290),
    cantilever=st.one_of(st.none(), st.integers(300, 3000)),
)
def test_spans_round_trip(spans: list[int], width: int, cantilever: int | None) -> None:
    """Invariant: spans in -> same spans out; nodes increase; origin at the left end."""
    right = "pinned" if cantilever is None else f"{{cantilever_mm: {cantilever}}}"
    text = minimal(f"spans_mm: {spans}", "monolithic", right).replace(
        "support_widths_mm: 250", f"support_widths_mm: {width}"
    )
    s = parse_project(text, "h").strips[0]
    assert s.spans_mm == tuple(float(v) for v in spans)
    assert s.node_x_mm[0] == 0.0
    assert all(b > a for a, b in zip(s.node_x_mm, s.node_x_mm[1:]))
    assert s.length_mm == sum(spans) + (cantilever or 0)
    assert len(s.segments) == len(spans) + (cantilever is not None)
