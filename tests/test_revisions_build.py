"""Re-issue through ``slabwright build`` and ``slabwright compare`` (two full builds).

Sources: common practice for re-issues (no new revision when nothing changed; the previous
revision's drawings and schedules are kept; the change list goes with the issue).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from detailer.cli import main

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"
PID = "quayside-terrace-l2"


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir()) if p.is_file()}


def test_rebuild_unchanged_then_changed(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "out"
    project = tmp_path / "q.yaml"
    project.write_text(SAMPLE.read_text(encoding="utf-8"), encoding="utf-8")
    assert main(["build", str(project), "--out", str(out)]) == 0
    first = _snapshot(out)
    assert f"{PID}-changes.md" not in first

    capsys.readouterr()
    assert main(["build", str(project), "--out", str(out)]) == 0
    assert "no change since revision P1" in capsys.readouterr().out
    assert _snapshot(out) == first  # byte-identical, nothing rewritten
    assert not [p for p in out.iterdir() if p.is_dir()]  # no archive folder

    text = project.read_text(encoding="utf-8")
    project.write_text(
        text.replace("spans_mm: [4200, 5600, 5100, 4600]", "spans_mm: [4200, 6000, 5100, 4600]"),
        encoding="utf-8",
    )
    assert main(["build", str(project), "--out", str(out)]) == 0
    printed = capsys.readouterr().out
    assert "revision P1 -> P2: span 2 of S1 lengthened by 400 mm" in printed
    archive = out / "rev-P1"
    assert _snapshot(archive) == first  # the previous issue kept as it was
    changes = (out / f"{PID}-changes.md").read_text(encoding="utf-8")
    assert "from revision P1 to P2" in changes

    assert (
        main(["compare", str(archive / f"{PID}-record.json"), str(out / f"{PID}-record.json")]) == 0
    )
    assert capsys.readouterr().out == changes


def test_compare_rejects_a_non_record(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "x.json"
    bad.write_text("not json", encoding="utf-8")
    assert main(["compare", str(bad), str(bad)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith(str(bad)) and "\n" not in err
