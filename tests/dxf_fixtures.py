"""Shared, cached inputs of the layout-drawing tests (built once per test session).

Not a conftest: import the functions you need. Every builder is cached, so the sample project is
detailed and drawn once however many tests use it.
"""

from __future__ import annotations

import dataclasses
import functools
import tempfile
from pathlib import Path

import ezdxf

from detailer.layout import ProjectDetail
from detailer.marks import assign_marks
from detailer.pipeline import detail_project
from detailer.project import load_project

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_projects" / "quayside-terrace.yaml"

#: A strip with alternate (staggered) bar groups, laps for a 6 m stock length, a left
#: cantilever with its U-bars, a knife-edge support and a pinned wall: our own test scenario.
ALTERNATE_YAML = """\
project: {id: alt-test, title: "Alternate bars test floor", revision: C2, date: 2025-06-02,
          drawing: AT-100}
materials: {concrete: C30/37}
reinforcement: {diameters_mm: [12, 16, 20], spacings_mm: [100, 125, 150, 175, 200],
                stock_length_mm: 6000}
strips:
  - id: W1
    thickness_mm: 300
    cover: {top_mm: 30, bottom_mm: 30, side_mm: 30}
    panel_width_mm: 3000
    spans_mm: [7500, 8000]
    support_widths_mm: [300, 0, 300]
    left_end: {cantilever_mm: 1800}
    right_end: pinned
    loads: {category: C, g_k_kn_per_m2: 2.0, q_k_kn_per_m2: 5.0}
"""


def with_marks(detail: ProjectDetail) -> ProjectDetail:
    """The detail with every bar set marked by ``detailer.marks.assign_marks``."""
    marked = assign_marks([s.bar_sets for s in detail.strips])
    strips = tuple(
        dataclasses.replace(s, bar_sets=b) for s, b in zip(detail.strips, marked, strict=True)
    )
    return dataclasses.replace(detail, strips=strips)


@functools.cache
def sample_detail() -> ProjectDetail:
    return with_marks(detail_project(load_project(str(SAMPLE))))


@functools.cache
def alternate_detail() -> ProjectDetail:
    folder = Path(tempfile.mkdtemp(prefix="sw-dxf-"))
    path = folder / "alternate.yaml"
    path.write_text(ALTERNATE_YAML, encoding="utf-8")
    return with_marks(detail_project(load_project(str(path))))


@functools.cache
def sample_dxf() -> bytes:
    from detailer.io.dxf_writer import write_layout

    return write_layout(sample_detail())


@functools.cache
def alternate_dxf() -> bytes:
    from detailer.io.dxf_writer import write_layout

    return write_layout(alternate_detail())


@functools.cache
def sample_csv() -> bytes:
    from detailer.io.csv_writer import render_schedule_csv
    from detailer.schedule import schedule_for_project

    detail = sample_detail()
    return render_schedule_csv(schedule_for_project(detail), detail.project)


def read_doc(data: bytes):
    """A fresh ezdxf document of DXF bytes (tests may edit it)."""
    import io

    return ezdxf.read(io.StringIO(data.decode("utf-8")))
