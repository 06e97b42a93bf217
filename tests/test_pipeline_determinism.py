"""Deterministic outputs (rules for helpers: "Deterministic outputs"; common practice for
reproducible drawings and schedules): the same project gives the same design, and the same
file bytes, in one process and across fresh processes (each with its own randomised string
hashing, so set and dict ordering cannot leak into the files)."""

from __future__ import annotations

import hashlib
import os
import subprocess
import sys
from pathlib import Path

import numpy as np

from detailer.build import build_outputs
from detailer.pipeline import detail_project
from detailer.project import load_project
from tests.strip_factory import StripSpec, build_project

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_projects" / "quayside-terrace.yaml"
GENERATED = StripSpec(
    spans_mm=(6500, 6500, 3000), thickness_mm=250, g_k_kn_per_m2=1.5, q_k_kn_per_m2=2.5,
    support_width_mm=250, panel_width_mm=7000, stock_length_mm=6000, left_end="monolithic",
    right_end="cantilever", right_cantilever_mm=1200,
)  # fmt: skip


def _same_strip(a, b) -> None:
    assert a.zones == b.zones
    assert a.bar_sets == b.bar_sets
    assert a.anchorage == b.anchorage
    assert a.checks == b.checks
    assert a.selfcheck == b.selfcheck
    for fa, fb in zip(a.resistance, b.resistance, strict=True):
        assert np.array_equal(fa.x_mm, fb.x_mm)
        assert np.array_equal(fa.m_rd_knm_per_m, fb.m_rd_knm_per_m)
        assert np.array_equal(fa.m_ed_shifted_knm_per_m, fb.m_ed_shifted_knm_per_m)


def test_detail_project_twice_is_equal():
    for project in (load_project(SAMPLE), build_project(GENERATED)):
        first, second = detail_project(project), detail_project(project)
        assert len(first.strips) == len(second.strips) == len(project.strips)
        for a, b in zip(first.strips, second.strips, strict=True):
            _same_strip(a, b)


def test_build_outputs_twice_gives_identical_bytes():
    project = load_project(SAMPLE)
    first, second = build_outputs(project), build_outputs(project)
    assert [name for name, _ in first.files] == [name for name, _ in second.files]
    for (name, a), (_, b) in zip(first.files, second.files, strict=True):
        assert a == b, name
        assert len(a) > 100, name


_DIGEST = """
import hashlib, sys
from detailer.build import build_outputs
from detailer.project import load_project
for name, data in build_outputs(load_project(sys.argv[1])).files:
    print(name, hashlib.sha256(data).hexdigest())
"""


def test_build_outputs_identical_across_processes():
    """A fresh interpreter writes the same bytes as this one. String hashing is randomised per
    process unless the environment pins it, so the pinning variable is removed."""
    here = {
        name: hashlib.sha256(data).hexdigest()
        for name, data in build_outputs(load_project(SAMPLE)).files
    }
    env = {k: v for k, v in os.environ.items() if not k.startswith("PYTHONHASH")}
    out = subprocess.run(
        [sys.executable, "-c", _DIGEST, str(SAMPLE)],
        capture_output=True, text=True, env=env, check=True, cwd=ROOT,
    )  # fmt: skip
    there = dict(line.split() for line in out.stdout.splitlines())
    assert there == here and len(here) >= 2
