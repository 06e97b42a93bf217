"""Bounded fuzzing of the two readers: the project YAML and the general-arrangement DXF.

Invariant (the project's rule for user mistakes, README): whatever the bytes, a reader
returns a valid result or raises its own one-line error naming the file (ProjectError /
GAError, both InputError) with a fix after "; "; never another exception, never a
multi-line message, never a warning (a warning prints on the user's stderr). Examples are
derandomized (the "ci" profile in tests/conftest.py) and bounded (max_examples below).

Inputs: random bytes and text; a token soup of YAML syntax (anchors, aliases, tags, flow and
block collections: YAML 1.1 spec, yaml.org/spec/1.1); structured mutations of the sample
project (sample_projects/quayside-terrace.yaml) and of a GA project; and mutations of a
valid GA DXF (the drawing of tests/test_dxf_reader_errors.py: flipped bytes, cuts, deleted
group-code pairs, scaled coordinates, NaN and infinite values: DXF group codes 10/20 are
point coordinates, DXF reference).
"""

from __future__ import annotations

import copy
import functools
import math
import shutil
import tempfile
import warnings
from pathlib import Path
from typing import Any

import pytest
import yaml
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from detailer.errors import InputError, ProjectError
from detailer.io.dxf_reader import GAError, GeneralArrangement, read_general_arrangement
from detailer.model import Project
from detailer.project import decode_project_bytes, parse_project
from tests.test_dxf_reader_errors import GA

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"
SAMPLE_DATA = yaml.safe_load(SAMPLE.read_text(encoding="utf-8"))

FUZZ = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def clean_errors(exc: ProjectError, file: str) -> None:
    """Every message of ``exc``: one line, starting with the file name, with a fix."""
    for e in getattr(exc, "errors", (exc,)):
        text = str(e)
        assert isinstance(e, InputError)
        assert "\n" not in text and "\r" not in text, text
        assert text.startswith(file), text
        assert "; " in text, text


def parse_cleanly(text: str, file: str = "fuzz.yaml", named: str | None = None) -> Project | None:
    """Parse; on errors check them (each names ``named``, by default the file itself)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            return parse_project(text, file)
        except ProjectError as exc:
            clean_errors(exc, named or file)
            return None


# -- (1) random bytes and text -----------------------------------------------------------------
@FUZZ
@given(data=st.binary(max_size=600))
def test_random_bytes(data: bytes) -> None:
    try:
        text = decode_project_bytes(data, "fuzz.yaml")
    except ProjectError as exc:
        clean_errors(exc, "fuzz.yaml")
        return
    parse_cleanly(text)


@FUZZ
@given(text=st.text(max_size=300))
def test_random_text(text: str) -> None:
    parse_cleanly(text)


_TOKENS = [
    "project:", "strips:", "materials:", "- ", "  ", "    ", "\n", "\t", ": ", ":", ",",
    "[", "]", "{", "}", "&a ", "*a", "&b ", "*b", "!!binary ", "!!python/object:os.system ",
    "!!set ", "!!str ", "!!int ", "!!float ", "!!bool ", "!!timestamp ", "!!null ", "? ", "'", '"', "#", "---\n", "...\n", "|\n", ">\n", "id",
    "S1", "1e3", "0777", "5:30", ".nan", "-.inf", "yes", "~", "2025-03-14", "9" * 30,
    "spans_mm", "thickness_mm", "<<: ", "%YAML 1.1\n", "\\", "\x00", "\ufeff", "é", "中",
]  # fmt: skip


@FUZZ
@given(parts=st.lists(st.sampled_from(_TOKENS), max_size=60))
@example(parts=["!!int "])  # found by this test: PyYAML raised IndexError (regression)
@example(parts=["a: ", "!!bool ", "S1"])  # KeyError from PyYAML's bool constructor
@example(parts=["!!timestamp ", "S1"])  # AttributeError from the timestamp constructor
def test_yaml_token_soup(parts: list[str]) -> None:
    parse_cleanly("".join(parts))


# -- (2) structured mutations of a valid project ------------------------------------------------
def paths_of(node: Any, prefix: tuple = ()) -> list[tuple]:
    """Every key path in a plain YAML data tree (the root excluded)."""
    out = []
    items = node.items() if isinstance(node, dict) else enumerate(node) if isinstance(node, list) else ()  # fmt: skip
    for key, value in items:
        out.append((*prefix, key))
        out += paths_of(value, (*prefix, key))
    return out


_SCALARS = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(-(10**30), 10**30),
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0, -1, 1e9, 1e-300, 10**400, "", "4.2 m", "C30/37", "6.10", "S1/2", "é中"]),
    st.text(max_size=12),
)
_VALUES = st.recursive(
    _SCALARS,
    lambda inner: (
        st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner, max_size=3)
    ),
    max_leaves=8,
)


@st.composite
def mutated(draw, base: dict) -> dict:
    data = copy.deepcopy(base)
    for _ in range(draw(st.integers(1, 3))):
        paths = paths_of(data)
        if not paths:
            break
        path = draw(st.sampled_from(paths))
        parent = data
        for key in path[:-1]:
            parent = parent[key]
        action = draw(st.sampled_from(["drop", "replace", "replace", "scale", "copy"]))
        key = path[-1]
        if action == "drop":
            del parent[key]
        elif action == "scale" and isinstance(parent[key], (int, float)) and not isinstance(parent[key], bool):  # fmt: skip
            k = draw(st.sampled_from([-1, 0, 1e-3, 1e3, 1e12, math.inf]))
            try:
                parent[key] = parent[key] * k
            except OverflowError:  # an integer of hundreds of digits times a float
                parent[key] = math.inf
        elif action == "copy" and isinstance(parent, list):
            parent.append(copy.deepcopy(parent[key]))  # e.g. a duplicate strip
        else:
            parent[key] = draw(_VALUES)
    return data


@FUZZ
@given(data=mutated(SAMPLE_DATA))
def test_mutated_sample_project(data: dict) -> None:
    """Either a valid Project or one-line errors naming the file (and the sample is valid)."""
    text = yaml.safe_dump(data, allow_unicode=True, sort_keys=False)
    result = parse_cleanly(text)
    if result is not None:
        assert result.strips and all(s.spans_mm for s in result.strips if len(s.supports) > 1)


def test_the_unmutated_sample_is_valid() -> None:
    text = yaml.safe_dump(SAMPLE_DATA, allow_unicode=True, sort_keys=False)
    assert parse_cleanly(text) is not None


GA_PROJECT = {
    "project": {"id": "ga", "title": "GA fuzz", "revision": "P1", "date": "2025-03-14"},
    "materials": {"concrete": "C30/37"},
    "geometry": {"dxf": "ga.dxf", "units": "mm", "layers": {"slab": "SW-GA-SLAB"}},
    "strips": [
        {
            "id": "S1",
            "thickness_mm": 200,
            "cover": {"top_mm": 25, "bottom_mm": 25, "side_mm": 25},
            "panel_width_mm": 5000,
            "left_end": "monolithic",
            "loads": {"category": "A", "g_k_kn_per_m2": 1.5, "q_k_kn_per_m2": 1.5},
        }
    ],
}


@pytest.fixture(scope="module")
def ga_folder(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("ga-fuzz")
    GA().save(folder / "ga.dxf")
    return folder


def test_the_unmutated_ga_project_is_valid(ga_folder: Path) -> None:
    project = parse_cleanly(yaml.safe_dump(GA_PROJECT), str(ga_folder / "p.yaml"))
    assert project is not None and project.strips[0].spans_mm == (5000.0, 5000.0)


@FUZZ
@given(data=mutated(GA_PROJECT))
def test_mutated_ga_project(ga_folder: Path, data: dict) -> None:
    """The project file's geometry: block and strips mutated; the drawing stays valid. An
    error may name the project file or the drawing (both in the fixture folder)."""
    text = yaml.safe_dump(data, allow_unicode=True, sort_keys=False)
    parse_cleanly(text, str(ga_folder / "p.yaml"), named=str(ga_folder))


# -- (3) the DXF reader --------------------------------------------------------------------------
@functools.cache
def ga_bytes() -> bytes:
    """The valid GA drawing as DXF bytes (not a fixture: a failing example prints its args)."""
    folder = Path(tempfile.mkdtemp(prefix="sw-ga-"))
    data = GA().save(folder / "ga.dxf").read_bytes()
    shutil.rmtree(folder)
    return data


def _pairs(lines: list[bytes]) -> list[int]:
    """Indexes of the value lines of coordinate group codes (10, 20, 11, 21)."""
    return [
        i + 1
        for i in range(0, len(lines) - 1, 2)
        if lines[i].strip() in (b"10", b"20", b"11", b"21")
    ]


@st.composite
def dxf_mutation(draw, base: bytes) -> bytes:
    data = bytearray(base)
    action = draw(st.sampled_from(["flip", "cut", "delete", "scale", "value", "layer"]))
    if action == "flip":
        for _ in range(draw(st.integers(1, 8))):
            data[draw(st.integers(0, len(data) - 1))] = draw(st.integers(0, 255))
        return bytes(data)
    if action == "cut":
        return bytes(data[: draw(st.integers(0, len(data)))])
    lines = bytes(data).split(b"\n")
    if action == "delete":  # whole group-code/value pairs: entities lose parts or vanish
        start = 2 * draw(st.integers(0, len(lines) // 2 - 1))
        del lines[start : start + 2 * draw(st.integers(1, 12))]
    elif action == "scale":
        k = draw(st.sampled_from([0.0, 1e-3, -1.0, 1e3, 1e9, 1e15]))
        for i in _pairs(lines):
            lines[i] = repr(float(lines[i]) * k).encode()
    elif action == "value":
        coords = _pairs(lines)
        for _ in range(draw(st.integers(1, 3))):
            i = draw(st.sampled_from(coords))
            lines[i] = draw(st.sampled_from([b"nan", b"inf", b"-inf", b"1e308", b"1e12", b"-0.0", b"x"]))  # fmt: skip
    else:
        names = [b"SW-GA-SLAB", b"SW-GA-SUPPORTS", b"SW-GA-STRIPS"]
        old, new = draw(st.sampled_from(names)), draw(st.sampled_from([*names, b"0", b"\xc3\xa9"]))  # fmt: skip
        lines = [new if line == old else line for line in lines]
    return b"\n".join(lines)


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(dxf=dxf_mutation(ga_bytes()), units=st.sampled_from([None, "mm", "m"]))
def test_mutated_dxf(ga_folder: Path, dxf: bytes, units: str | None) -> None:
    path = ga_folder / "mutated.dxf"
    path.write_bytes(dxf)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            ga = read_general_arrangement(path, units_if_missing=units)
        except GAError as exc:
            clean_errors(exc, str(path))
            return
    assert isinstance(ga, GeneralArrangement)
    for strip in ga.strips:  # what is accepted is measurable: finite, increasing supports
        xs = [s.x_mm for s in strip.supports]
        assert all(math.isfinite(x) for x in xs) and xs == sorted(xs)
        assert all(s.width_mm > 0 for s in strip.supports)
