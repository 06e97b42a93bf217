"""`slabwright build` and `slabwright audit` as a user runs them: files, exit codes, messages.

Sources: the exit-code contract and the one-line error rule are the project's own (README);
that a failed run must leave earlier outputs untouched and write nothing partial is the
atomic-output rule of the README (common practice for build tools). The sample project is
`sample_projects/quayside-terrace.yaml`.
"""

from __future__ import annotations

import csv
import io
import re
import shutil
from pathlib import Path

import pytest

from detailer import CAUTION
from detailer.cli import main

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"
PID = "quayside-terrace-l2"
NAMES = (
    f"{PID}-schedule.csv",
    f"{PID}-record.json",
    f"{PID}-layout.dxf",
    f"{PID}-S1.png",
    f"{PID}-S2.png",
    f"{PID}-calcs.html",
)


@pytest.fixture(scope="module")
def built(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("build") / "out"
    assert main(["build", str(SAMPLE), "--out", str(out)]) == 0
    return out


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir()) if p.is_file()}


def test_build_writes_every_output_with_the_caution(built: Path) -> None:
    assert sorted(p.name for p in built.iterdir()) == sorted(NAMES)
    assert CAUTION.encode() in (built / f"{PID}-schedule.csv").read_bytes()
    assert CAUTION.encode() in (built / f"{PID}-record.json").read_bytes()
    assert b"competent engineer" in (built / f"{PID}-calcs.html").read_bytes()
    assert b"competent engineer" in (built / f"{PID}-layout.dxf").read_bytes()
    assert (built / f"{PID}-S1.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_build_twice_gives_identical_files(built: Path, tmp_path: Path) -> None:
    again = tmp_path / "again"
    assert main(["build", str(SAMPLE), "--out", str(again)]) == 0
    assert _snapshot(again) == _snapshot(built)


def test_input_error_exits_2_with_one_line_and_writes_nothing(tmp_path: Path, capsys) -> None:
    bad = tmp_path / "bad.yaml"
    text = SAMPLE.read_text(encoding="utf-8").replace("thickness_mm: 225", "thickness_mm: -225")
    bad.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    assert main(["build", str(bad), "--out", str(out)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "bad.yaml:" in err[0] and "thickness_mm" in err[0]
    assert "Traceback" not in err[0]
    assert not out.exists()


def test_failed_strip_exits_1_issues_the_others_and_keeps_earlier_outputs(
    built: Path, tmp_path: Path, capsys
) -> None:
    out = tmp_path / "out"
    shutil.copytree(built, out)
    before = _snapshot(out)
    # A 9 m span in a 150 mm slab cannot pass span/depth (EN 1992-1-1 7.4.2) or flexure.
    text = SAMPLE.read_text(encoding="utf-8")
    text = text.replace("spans_mm: [4200, 5600, 5100, 4600]", "spans_mm: [4200, 9000, 5100, 4600]")
    text = text.replace("thickness_mm: 225", "thickness_mm: 150")
    failing = tmp_path / "failing.yaml"
    failing.write_text(text, encoding="utf-8")
    assert main(["build", str(failing), "--out", str(out)]) == 1
    err = capsys.readouterr().err
    assert "strip S1" in err and "1 of 2 strip(s) cannot be designed" in err
    assert "Traceback" not in err
    assert _snapshot(out / "rev-P1") == before  # the earlier issue is kept, byte for byte
    now = _snapshot(out)
    assert f"{PID}-S1.png" not in now and f"{PID}-S2.png" in now  # nothing for S1
    assert b"Not detailed,S1," in now[f"{PID}-schedule.csv"]


def test_when_no_strip_can_be_designed_nothing_is_written(
    built: Path, tmp_path: Path, capsys
) -> None:
    out = tmp_path / "out"
    shutil.copytree(built, out)
    before = _snapshot(out)
    # Every strip gets a 9 m span in a 150 mm slab (EN 1992-1-1 7.4.2 and 6.1 cannot be met).
    text = re.sub(r"thickness_mm: \d+", "thickness_mm: 150", SAMPLE.read_text(encoding="utf-8"))
    text = text.replace("spans_mm: [", "spans_mm: [9000, ")
    text = text.replace("supports_mm: [0, ", "supports_mm: [-9000, 0, ").replace(
        "support_widths_mm: [215, ", "support_widths_mm: [215, 215, "
    )
    failing = tmp_path / "failing.yaml"
    failing.write_text(text, encoding="utf-8")
    assert main(["build", str(failing), "--out", str(out)]) == 1
    err = capsys.readouterr().err
    assert "2 strip(s) cannot be designed as given: S1, S2" in err
    assert "no files were written" in err and "Traceback" not in err
    assert _snapshot(out) == before


def test_audit_agrees_with_its_own_build(built: Path, capsys) -> None:
    code = main(["audit", str(built / f"{PID}-layout.dxf"), str(built / f"{PID}-schedule.csv")])
    assert code == 0
    assert "OK:" in capsys.readouterr().out


def test_audit_exits_1_on_an_edited_schedule(built: Path, tmp_path: Path, capsys) -> None:
    rows = list(csv.reader(io.StringIO((built / f"{PID}-schedule.csv").read_text("utf-8"))))
    header = next(i for i, r in enumerate(rows) if r[:2] == ["Member", "Bar mark"])
    row = rows[header + 1]
    total = row[5]
    row[5] = str(int(total) + 3)  # a changed total number of bars
    edited = tmp_path / "edited.csv"
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerows(rows)
    edited.write_text(buf.getvalue(), encoding="utf-8")
    code = main(["audit", str(built / f"{PID}-layout.dxf"), str(edited)])
    out = capsys.readouterr().out
    assert code == 1
    assert row[1] in out  # the mark that disagrees is named


def test_audit_of_a_missing_file_exits_2(tmp_path: Path, capsys) -> None:
    code = main(["audit", str(tmp_path / "none.dxf"), str(tmp_path / "none.csv")])
    assert code == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "none" in err[0]
