"""Random valid projects for the design and detailing tests, built from YAML text.

A ``StripSpec`` describes one strip in the terms of the project file (sample_projects/README.md);
``project_yaml`` writes the file and ``build_project`` reads it back through
``detailer.project.parse_project``, so every generated project is one a user could have typed.
``strip_specs()`` is the hypothesis strategy for the property tests.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from hypothesis import strategies as st

from detailer.model import Project
from detailer.project import parse_project

# --------------------------------------------------------------------------- project files


@dataclass(frozen=True, slots=True)
class StripSpec:
    """One strip of a generated project; lengths in mm, area loads kN/m2, line loads kN/m."""

    spans_mm: tuple[int, ...]
    thickness_mm: int
    g_k_kn_per_m2: float  # superimposed permanent load (self-weight is added by the reader)
    q_k_kn_per_m2: float
    left_end: str = "pinned"  # "pinned", "monolithic" or "cantilever"
    right_end: str = "pinned"
    left_cantilever_mm: int = 0
    right_cantilever_mm: int = 0
    line_load: tuple[int, int, float] | None = None  # (span number, x_mm, g_k kN/m)
    concrete: str = "C30/37"
    cover_mm: int = 25
    support_width_mm: int = 250
    panel_width_mm: int = 5000
    stock_length_mm: int = 12000
    curtailment: str = "envelope"
    category: str = "A"


def _end(kind: str, cantilever_mm: int) -> str:
    return f"{{cantilever_mm: {cantilever_mm}}}" if kind == "cantilever" else kind


def project_yaml(spec: StripSpec, strip_id: str = "G1") -> str:
    """The project file for one generated strip (format: sample_projects/README.md)."""
    lines = [
        'project: {id: gen, title: "Generated strip", revision: P1, date: 2025-01-01, drawing: G-1}',
        f"materials: {{concrete: {spec.concrete}}}",
        "reinforcement:",
        f"  stock_length_mm: {spec.stock_length_mm}",
        f"  curtailment: {spec.curtailment}",
        "strips:",
        f"  - id: {strip_id}",
        f"    thickness_mm: {spec.thickness_mm}",
        f"    cover: {{top_mm: {spec.cover_mm}, bottom_mm: {spec.cover_mm}, side_mm: {spec.cover_mm}}}",
        f"    panel_width_mm: {spec.panel_width_mm}",
        f"    spans_mm: [{', '.join(str(s) for s in spec.spans_mm)}]",
        f"    support_widths_mm: {spec.support_width_mm}",
        f"    left_end: {_end(spec.left_end, spec.left_cantilever_mm)}",
        f"    right_end: {_end(spec.right_end, spec.right_cantilever_mm)}",
        "    loads:",
        f"      category: {spec.category}",
        f"      g_k_kn_per_m2: {spec.g_k_kn_per_m2:.2f}",
        f"      q_k_kn_per_m2: {spec.q_k_kn_per_m2:.2f}",
    ]
    if spec.line_load is not None:
        span, x_mm, g_k = spec.line_load
        lines.append(f"      line: [{{span: {span}, x_mm: {x_mm}, g_k_kn_per_m: {g_k:.2f}}}]")
    return "\n".join(lines) + "\n"


def build_project(spec: StripSpec) -> Project:
    """Parse the generated file exactly as a user's file would be parsed."""
    return parse_project(project_yaml(spec), "gen.yaml")


@st.composite
def strip_specs(draw: st.DrawFn) -> StripSpec:
    """2-5 spans of 2.5-7.5 m, h 175-300, g_k 0.5-3, q_k 1.5-5 kN/m2, optional cantilever
    (0.8-2 m), monolithic end and line load; stock bars of 6 or 12 m. h is drawn at least
    span/32 so that most strips are designable (the tests still accept a clean DesignError)."""
    n = draw(st.integers(2, 5))
    spans = tuple(draw(st.integers(50, 150)) * 50 for _ in range(n))
    h_low = max(175, 5 * math.ceil(max(spans) / 32 / 5))
    h = draw(st.integers(h_low // 5, 60)) * 5 if h_low <= 300 else 300
    ends = []
    cantilevers = []
    for _ in range(2):
        kind = draw(st.sampled_from(["pinned", "pinned", "monolithic", "cantilever"]))
        ends.append(kind)
        cantilevers.append(draw(st.integers(16, 40)) * 50 if kind == "cantilever" else 0)
    line = None
    if draw(st.booleans()):
        span = draw(st.integers(1, n))
        x = draw(st.integers(2, 8)) * spans[span - 1] // 10
        line = (span, x, draw(st.integers(4, 20)) / 2.0)
    return StripSpec(
        spans_mm=spans,
        thickness_mm=h,
        g_k_kn_per_m2=draw(st.integers(2, 12)) / 4.0,
        q_k_kn_per_m2=draw(st.integers(3, 10)) / 2.0,
        left_end=ends[0],
        right_end=ends[1],
        left_cantilever_mm=cantilevers[0],
        right_cantilever_mm=cantilevers[1],
        line_load=line,
        concrete=draw(st.sampled_from(["C25/30", "C30/37", "C32/40", "C35/45"])),
        cover_mm=draw(st.sampled_from([25, 30, 35])),
        support_width_mm=draw(st.integers(4, 7)) * 50,
        panel_width_mm=draw(st.integers(6, 16)) * 500,
        stock_length_mm=draw(st.sampled_from([6000, 12000, 12000])),
    )
