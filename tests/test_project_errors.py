"""Bad project files: one line per mistake naming the file, the line, the key and a fix.

The expected behaviour is the project-file contract in sample_projects/README.md. Values that
decide what is a mistake have outside sources, named beside each case: EN 1992-1-1:2004
Table 3.1 (strength classes), the YAML 1.1 type library (yaml.org/type/float.html: a float
needs a '.'; yaml.org/type/int.html: leading 0 is octal, ':' is base 60;
yaml.org/type/bool.html: yes/no/on/off), and plain geometry (supports that overlap, cover
that leaves no room for bars).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.cli import main
from detailer.errors import ProjectError, ProjectErrors
from detailer.project import load_project, parse_project

BASE = """\
project:
  id: t1
  title: Test floor
  revision: P1
  date: 2025-03-14
  drawing: T-01
materials:
  concrete: C30/37
strips:
  - id: S1
    thickness_mm: 200
    cover:
      top_mm: 25
      bottom_mm: 25
      side_mm: 25
    panel_width_mm: 5000
    spans_mm: [4000, 4500, 4000]
    support_widths_mm: 300
    left_end: pinned
    right_end: monolithic
    loads:
      category: A
      g_k_kn_per_m2: 1.5
      q_k_kn_per_m2: 1.5
"""

SECOND_STRIP = """\
  - id: S1
    thickness_mm: 200
    cover: {top_mm: 25, bottom_mm: 25, side_mm: 25}
    panel_width_mm: 5000
    spans_mm: [3000]
    support_widths_mm: 300
    left_end: pinned
    right_end: pinned
    loads: {category: A, g_k_kn_per_m2: 1.0, q_k_kn_per_m2: 1.5}
"""


def sub(old: str, new: str) -> Callable[[str], str]:
    def edit(text: str) -> str:
        assert old in text, old
        return text.replace(old, new, 1)

    return edit


# (case id, edit of BASE, expected line, expected key path, words expected in the message)
CASES: list[tuple[str, Callable[[str], str], int, str, tuple[str, ...]]] = [
    # Contract: required keys (README "Strips" table).
    ("missing key", sub("    thickness_mm: 200\n", ""), 10, "strips[0].thickness_mm", ("missing",)),
    # Contract: unknown keys are errors, with a spelling hint.
    (
        "unknown key",
        sub("thickness_mm: 200", "thicknes_mm: 200"),
        11,
        "strips[0].thicknes_mm",
        ("unknown key", "did you mean 'thickness_mm'"),
    ),
    (
        "wrong type",
        sub("panel_width_mm: 5000", "panel_width_mm: wide"),
        16,
        "strips[0].panel_width_mm",
        ("expected a number",),
    ),
    # Geometry: a span length must be positive and finite.
    (
        "zero span",
        sub("[4000, 4500, 4000]", "[4000, 0, 4000]"),
        17,
        "strips[0].spans_mm[1]",
        ("must be > 0 (got 0)", "give the span length in mm"),
    ),
    (
        "negative span",
        sub("[4000, 4500, 4000]", "[4000, -4500, 4000]"),
        17,
        "strips[0].spans_mm[1]",
        ("must be > 0 (got -4500)",),
    ),
    (
        "NaN span",
        sub("[4000, 4500, 4000]", "[4000, .nan, 4000]"),
        17,
        "strips[0].spans_mm[1]",
        ("finite",),
    ),
    # Geometry: supports B and C (1200 wide each) overlap over a 1000 mm span: 600 + 600 >= 1000.
    (
        "overlapping supports",
        lambda t: sub("[4000, 4500, 4000]", "[4000, 1000, 4000]")(
            sub("support_widths_mm: 300", "support_widths_mm: [300, 1200, 1200, 300]")(t)
        ),
        18,
        "strips[0].support_widths_mm[2]",
        ("overlap",),
    ),
    # Geometry: support C (1100 wide) is wider than the 1000 mm span B-C.
    (
        "support wider than span",
        lambda t: sub("[4000, 4500, 4000]", "[4000, 1000, 4000]")(
            sub("support_widths_mm: 300", "support_widths_mm: [300, 300, 1100, 300]")(t)
        ),
        18,
        "strips[0].support_widths_mm[2]",
        ("support C", "as wide as span B-C"),
    ),
    # Geometry: cover must be less than the thickness.
    (
        "cover >= thickness",
        sub("bottom_mm: 25", "bottom_mm: 200"),
        14,
        "strips[0].cover.bottom_mm",
        ("not less than the slab thickness",),
    ),
    # Geometry: 90 + 95 + 2 x 10 mm bars = 205 >= 200 leaves no room for two layers of bars.
    (
        "no room for bars",
        lambda t: sub("top_mm: 25", "top_mm: 90")(sub("bottom_mm: 25", "bottom_mm: 95")(t)),
        12,
        "strips[0].cover",
        ("no room for bars",),
    ),
    # EN 1992-1-1:2004 Table 3.1 has no C33/40.
    (
        "unknown concrete class",
        sub("C30/37", "C33/40"),
        8,
        "materials.concrete",
        ("unknown concrete class 'C33/40'", "C30/37"),
    ),
    ("empty file", lambda t: "", 1, "(document)", ("empty",)),
    ("comments only", lambda t: "# nothing here\n", 1, "(document)", ("empty",)),
    (
        "not YAML",
        sub("thickness_mm: 200", "thickness_mm: 200: 5"),
        11,
        "(document)",
        ("not valid YAML",),
    ),
    ("not a mapping", lambda t: "- one\n- two\n", 1, "(document)", ("expected a mapping",)),
    (
        "duplicate strip ids",
        lambda t: t + SECOND_STRIP,
        25,
        "strips[1].id",
        ("duplicate strip id 'S1'",),
    ),
    # YAML 1.1 bool: true is not a number (pydantic's lax mode would take it as 1).
    (
        "bool for a number",
        sub("thickness_mm: 200", "thickness_mm: true"),
        11,
        "strips[0].thickness_mm",
        ("got true",),
    ),
    (
        "yes for a number",
        sub("panel_width_mm: 5000", "panel_width_mm: yes"),
        16,
        "strips[0].panel_width_mm",
        ("got true",),
    ),
    # YAML 1.1 float needs a '.': 2e2 is read as the text '2e2'.
    (
        "1e3 string",
        sub("thickness_mm: 200", "thickness_mm: 2e2"),
        11,
        "strips[0].thickness_mm",
        ("'2e2'", "write 200 or 2.0e+2"),
    ),
    # YAML 1.1 int: a leading 0 is octal (0200 = 128), ':' is base 60 (3:20 = 200).
    (
        "octal",
        sub("thickness_mm: 200", "thickness_mm: 0200"),
        11,
        "strips[0].thickness_mm",
        ("octal", "(128)"),
    ),
    (
        "base 60",
        sub("thickness_mm: 200", "thickness_mm: 3:20"),
        11,
        "strips[0].thickness_mm",
        ("base-60", "(200)"),
    ),
    (
        "duplicate key",
        sub("    thickness_mm: 200\n", "    thickness_mm: 200\n    thickness_mm: 250\n"),
        12,
        "strips[0].thickness_mm",
        ("duplicate key",),
    ),
    # YAML 1.1 float: unquoted 6.10 is the number 6.1.
    (
        "unquoted combination",
        lambda t: t + "design:\n  combination: 6.10\n",
        26,
        "design.combination",
        ("got 6.1", "in quotes"),
    ),
    (
        "unknown end",
        sub("left_end: pinned", "left_end: fixed"),
        19,
        "strips[0].left_end",
        ("got 'fixed'", "{cantilever_mm: 1500}"),
    ),
    (
        "cantilevers both ends, one support",
        lambda t: sub("[4000, 4500, 4000]", "[]")(
            sub("left_end: pinned", "left_end: {cantilever_mm: 1200}")(
                sub("right_end: monolithic", "right_end: {cantilever_mm: 1200}")(t)
            )
        ),
        10,
        "strips[0]",
        ("unstable",),
    ),
    (
        "load on a missing span",
        sub(
            "      q_k_kn_per_m2: 1.5\n",
            "      q_k_kn_per_m2: 1.5\n      line:\n        - {span: 4, x_mm: 100, g_k_kn_per_m: 2}\n",
        ),
        26,
        "strips[0].loads.line[0].span",
        ("there is no span 4",),
    ),
    (
        "metres for mm",
        sub("[4000, 4500, 4000]", "[4000, 4.5, 4000]"),
        17,
        "strips[0].spans_mm[1]",
        ("4200 for 4.2 m",),
    ),
    (
        "spans and supports",
        sub(
            "    spans_mm: [4000, 4500, 4000]\n",
            "    spans_mm: [4000]\n    supports_mm: [0, 4000]\n",
        ),
        10,
        "strips[0]",
        ("not both",),
    ),
    (
        "unsorted supports",
        sub("spans_mm: [4000, 4500, 4000]", "supports_mm: [0, 4000, 3000, 9000]"),
        17,
        "strips[0].supports_mm[2]",
        ("greater than the previous",),
    ),
    ("bad date", sub("date: 2025-03-14", "date: 14/03/2025"), 5, "project.date", ("YYYY-MM-DD",)),
    (
        "unknown category",
        sub("category: A", "category: Z"),
        22,
        "strips[0].loads.category",
        ("got 'Z'",),
    ),
]


def _write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "project.yaml"
    path.write_text(text, encoding="utf-8")
    return path


def test_base_file_is_valid(tmp_path: Path) -> None:
    project = load_project(_write(tmp_path, BASE))
    assert project.strips[0].spans_mm == (4000.0, 4500.0, 4000.0)


@pytest.mark.parametrize(("case", "edit", "line", "key", "words"), CASES, ids=[c[0] for c in CASES])
def test_bad_input_message(tmp_path: Path, case, edit, line, key, words) -> None:
    path = _write(tmp_path, edit(BASE))
    with pytest.raises(ProjectError) as info:
        load_project(path)
    errors = getattr(info.value, "errors", (info.value,))
    first = errors[0]
    text = str(first)
    assert "\n" not in text
    assert text.startswith(f"{path}:{line}: {key}: "), text
    for w in words:
        assert w in text, text
    assert first.line == line
    assert first.key_path == key
    assert "; " in text  # every message carries a fix after the reason
    assert len(errors) == 1, [str(e) for e in errors]


@pytest.mark.parametrize(("case", "edit", "line", "key", "words"), CASES, ids=[c[0] for c in CASES])
def test_cli_exit_code_2_one_line(tmp_path: Path, capsys, case, edit, line, key, words) -> None:
    path = _write(tmp_path, edit(BASE))
    assert main(["check", str(path)]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    lines = captured.err.splitlines()
    assert len(lines) == 1, lines
    assert lines[0].startswith(f"{path}:{line}: {key}: ")
    assert "Traceback" not in captured.err


def test_missing_file(tmp_path: Path, capsys) -> None:
    path = tmp_path / "nowhere.yaml"
    with pytest.raises(ProjectError) as info:
        load_project(path)
    assert info.value.line is None
    assert str(info.value).startswith(f"{path}: cannot read the file")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and str(path) in err and "Traceback" not in err


def test_not_utf8(tmp_path: Path) -> None:
    path = tmp_path / "binary.yaml"
    path.write_bytes(b"\xff\xfe\x00garbage")
    with pytest.raises(ProjectError, match="not UTF-8"):
        load_project(path)


def test_several_errors_reported_one_per_line(tmp_path: Path, capsys) -> None:
    text = sub("thickness_mm: 200", "thickness_mm: -1")(sub("C30/37", "C99/40")(BASE))
    path = _write(tmp_path, sub("panel_width_mm: 5000", "panel_width_mm: true")(text))
    with pytest.raises(ProjectErrors) as info:
        load_project(path)
    assert [e.line for e in info.value.errors] == [11, 16]  # schema errors first, in file order
    assert main(["check", str(path)]) == 2
    assert len(capsys.readouterr().err.splitlines()) == 2


def test_error_from_defaults_points_at_defaults(tmp_path: Path) -> None:
    text = BASE.replace("strips:\n", "defaults:\n  support_width_mm: 300\nstrips:\n")
    path = _write(tmp_path, text.replace("    support_widths_mm: 300\n", ""))
    with pytest.raises(ProjectError) as info:
        load_project(path)
    errors = info.value.errors  # type: ignore[attr-defined]
    assert str(errors[0]).startswith(f"{path}:10: defaults.support_width_mm: unknown key")
    assert "did you mean 'support_widths_mm'" in str(errors[0])
    assert len(errors) == 1  # the misspelling is not reported again as a missing key


def test_project_error_format() -> None:
    e = ProjectError(
        "project.yaml",
        "must be > 0 (got -4200)",
        line=12,
        key_path="strips[0].spans_mm[1]",
        fix="give the span length in mm",
    )
    assert str(e) == (
        "project.yaml:12: strips[0].spans_mm[1]: must be > 0 (got -4200); give the span length in mm"
    )
    assert str(ProjectError("p.yaml", "bad\nvalue")) == "p.yaml: bad value"


_VALUES = [line.split(": ", 1)[1] for line in BASE.splitlines() if ": " in line]
_SCALARS = st.one_of(
    st.sampled_from(
        [
            "",
            "~",
            "true",
            "no",
            "on",
            ".nan",
            "-.inf",
            "1e3",
            "0777",
            "1:30",
            "[]",
            "{}",
            "[1, [2]]",
            "{a: 1}",
            "'x'",
            "-0",
            "9" * 400,
            "C30/37",
            "6.10",
        ]
    ),
    st.integers(-(10**6), 10**6).map(str),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=12),
)


@settings(max_examples=150, deadline=None)
@given(index=st.integers(0, len(_VALUES) - 1), value=_SCALARS)
def test_any_single_value_edit_gives_clean_errors(index: int, value: str) -> None:
    """Invariant: whatever one value is replaced by, the reader either builds a project or
    raises ProjectError lines of the form 'file:line: key: reason; fix' (never another
    exception, never a multi-line message)."""
    lines = BASE.splitlines()
    hits = [k for k, line in enumerate(lines) if ": " in line]
    k = hits[index]
    head = lines[k].split(": ", 1)[0]
    lines[k] = f"{head}: {value}"
    try:
        parse_project("\n".join(lines) + "\n", "fuzz.yaml")
    except ProjectError as exc:
        for e in getattr(exc, "errors", (exc,)):
            text = str(e)
            assert "\n" not in text and "\r" not in text
            assert text.startswith("fuzz.yaml:") and e.line is not None and e.line >= 1
            assert "; " in text
