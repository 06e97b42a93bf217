"""Project files whose strip geometry comes from a general-arrangement DXF.

Reference: the drawing is made by the test from strip S1 of the sample project (spans 4200,
5600, 5100, 4600 mm, 300 mm supports, 1500 mm balcony), so the project read through the DXF
must give the same supports, widths and cantilever as the same strip typed into the YAML
(within 1 mm: the drawing's own construction, common practice for CAD tolerances).
"""

from __future__ import annotations

import math

import pytest

from detailer.errors import ProjectError
from detailer.project import load_project
from tests.test_dxf_reader import Layout, draw

YAML = """\
project: {{id: ga-test, title: GA test, revision: P1, date: 2025-03-14, drawing: GA-1}}
materials: {{concrete: C32/40}}
geometry:
  dxf: {dxf}
strips:
  - id: S1
    thickness_mm: 225
    cover: {{top_mm: 30, bottom_mm: 25, side_mm: 25}}
{extra}    left_end: monolithic
    loads: {{category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5}}
"""


def write(tmp_path, extra="    panel_width_mm: 6200\n", strip="line", theta=0.3):
    draw(tmp_path / "ga.dxf", Layout(), theta=theta, offset_mm=(12000.0, -3000.0), strip=strip)
    p = tmp_path / "p.yaml"
    p.write_text(YAML.format(dxf="ga.dxf", extra=extra), encoding="utf-8")
    return p


def test_strip_geometry_comes_from_the_drawing(tmp_path):
    project = load_project(write(tmp_path))
    s = project.strip("S1")
    spans = [b.x_mm - a.x_mm for a, b in zip(s.supports, s.supports[1:])]
    assert spans == pytest.approx([4200.0, 5600.0, 5100.0, 4600.0], abs=1.0)
    assert [sup.width_mm for sup in s.supports] == pytest.approx([300.0] * 5, abs=1.0)
    assert s.right_end.cantilever_mm == pytest.approx(1500.0, abs=1.0)
    assert s.left_end.kind.value == "monolithic"
    assert s.panel_width_mm == 6200.0


def test_band_gives_the_panel_width(tmp_path):
    project = load_project(write(tmp_path, extra="", strip="band", theta=math.pi / 5))
    assert project.strip("S1").panel_width_mm == pytest.approx(6200.0, abs=1.0)


def test_spans_in_the_file_as_well_as_the_drawing_are_refused(tmp_path):
    p = write(tmp_path, extra="    panel_width_mm: 6200\n    spans_mm: [4200]\n")
    with pytest.raises(ProjectError) as err:
        load_project(p)
    text = str(err.value)
    assert "spans_mm" in text and "general arrangement" in text and "\n" not in text
    assert "p.yaml:" in text


def test_unknown_strip_id_lists_the_drawing_s_strips(tmp_path):
    p = write(tmp_path)
    p.write_text(p.read_text().replace("id: S1", "id: S9"), encoding="utf-8")
    with pytest.raises(ProjectError, match=r"strip 'S9' is not in ga.dxf \(it has S1\)"):
        load_project(p)


def test_missing_drawing_is_one_line(tmp_path):
    p = write(tmp_path)
    (tmp_path / "ga.dxf").unlink()
    with pytest.raises(ProjectError) as err:
        load_project(p)
    assert "ga.dxf" in str(err.value) and "\n" not in str(err.value)


def _drop_entities_endsec(path) -> None:
    """Damage the drawing as in tests/test_dxf_reader.py: the ENDSEC of ENTITIES removed,
    which ezdxf's recovery repairs (ezdxf docs, recover module)."""
    lines = path.read_text().split("\n")
    i = lines.index("ENTITIES")
    j = next(k for k in range(i, len(lines)) if lines[k] == "ENDSEC")
    path.write_text("\n".join(lines[: j - 1] + lines[j + 1 :]))


def test_repairs_to_a_damaged_drawing_reach_the_user(tmp_path, capsys):
    # The project's own rule (README, on input mistakes): what recovery repaired is shown,
    # one line each, and the build goes on; a sound drawing gives no note.
    from detailer.cli import main

    p = write(tmp_path)
    assert load_project(p).input_notes == ()
    _drop_entities_endsec(tmp_path / "ga.dxf")
    project = load_project(p)
    assert project.input_notes and all("ga.dxf" in n for n in project.input_notes)
    code = main(["build", str(p), "--out", str(tmp_path / "out"), "--no-previews"])
    err = capsys.readouterr().err
    notes = [line for line in err.splitlines() if line.startswith("note: ")]
    assert code == 0 and notes and any("ENDSEC" in n for n in notes)
    assert "Traceback" not in err
    assert (tmp_path / "out" / "ga-test-layout.dxf").is_file()
