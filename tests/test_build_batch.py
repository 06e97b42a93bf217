"""Whole floors in one `slabwright build`: worker processes, strips that fail, progress bars.

Sources: the exit-code contract (0 written, 1 a strip cannot be designed, 2 input error) and
the rule that a failing strip is reported by id and the others still issued are the
project's own (README, "Batch builds"). That an incomplete issue must say so on every output
a fabricator or checker reads (schedule header, record, report) is common practice for
drawing issues. The floors are synthetic (tests/floor_factory.py); the failing strip has a
9 m span in a 150 mm slab, beyond any allowed bar arrangement (EN 1992-1-1 7.4.2 and 6.1).
"""

from __future__ import annotations

import contextlib
import csv
import io
import json
from pathlib import Path

import ezdxf
import pytest

from detailer.build import BuildOptions, build_outputs
from detailer.cli import main
from detailer.parallel import PARALLEL_FROM_STRIPS, map_indexed, worker_count
from detailer.project import parse_project
from tests.floor_factory import floor_yaml

N = 12
FAIL = "F004"
PID = f"floor-{N}"


def _write(folder: Path, text: str, name: str = "floor.yaml") -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir()) if p.is_file()}


@pytest.fixture(scope="module")
def failing_build(tmp_path_factory) -> tuple[Path, int, str, str]:
    root = tmp_path_factory.mktemp("batch")
    path = _write(root, floor_yaml(N, failing=(FAIL,)))
    out = root / "out"
    err, std = io.StringIO(), io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(std):
        code = main(["build", str(path), "--out", str(out), "--jobs", "2", "--no-progress"])
    return out, code, std.getvalue(), err.getvalue()


def test_a_failing_strip_is_reported_and_the_others_are_issued(failing_build) -> None:
    out, code, std, err = failing_build
    assert code == 1
    lines = err.strip().splitlines()
    # one line for the failing strip's reason, one summary line; no traceback
    assert len(lines) == 2 and "Traceback" not in err
    assert lines[0].startswith(f"strip {FAIL}:")
    assert f"1 of {N} strip(s) cannot be designed" in lines[1] and FAIL in lines[1]
    assert f"the other {N - 1} were written" in lines[1]
    assert "INCOMPLETE ISSUE" in std and "competent engineer" in std
    names = sorted(p.name for p in out.iterdir())
    assert names == sorted(
        [f"{PID}-schedule.csv", f"{PID}-record.json", f"{PID}-layout.dxf", f"{PID}-calcs.html"]
    )  # no PNG previews above PREVIEW_MAX_STRIPS strips, and nothing for the failing strip


def test_the_incomplete_issue_says_so_in_schedule_and_record(failing_build) -> None:
    out = failing_build[0]
    rows = list(csv.reader(io.StringIO((out / f"{PID}-schedule.csv").read_text("utf-8"))))
    members = [r[1] for r in rows if r and r[0] == "Member ref"]
    assert FAIL not in members and len(members) == N - 1
    not_detailed = [r for r in rows if r and r[0] == "Not detailed"]
    assert [r[1] for r in not_detailed] == [FAIL]
    assert not_detailed[0][2].startswith(f"strip {FAIL}:")
    assert any(r and r[0] == "Incomplete" for r in rows)
    start = next(i for i, r in enumerate(rows) if r[:2] == ["Member", "Bar mark"])
    body = [r for r in rows[start + 1 :] if r and r[0].startswith("F")]
    assert body and all(r[0] != FAIL for r in body)
    record = json.loads((out / f"{PID}-record.json").read_text("utf-8"))
    assert [s["id"] for s in record["strips"]] == [f"F{i:03d}" for i in range(1, N + 1) if i != 4]
    assert [n["strip_id"] for n in record["not_detailed"]] == [FAIL]
    assert record["not_detailed"][0]["reason"].startswith(f"strip {FAIL}:")
    report = (out / f"{PID}-calcs.html").read_text("utf-8")
    assert "Strips not detailed in this issue" in report and FAIL in report


def test_the_drawing_has_a_sheet_for_every_detailed_strip_only(failing_build) -> None:
    out = failing_build[0]
    doc = ezdxf.readfile(out / f"{PID}-layout.dxf")
    sheets = sorted(n for n in doc.layout_names() if n != "Model")
    assert sheets == sorted(f"Strip F{i:03d}" for i in range(1, N + 1) if i != 4)
    code = main(["audit", str(out / f"{PID}-layout.dxf"), str(out / f"{PID}-schedule.csv")])
    assert code == 0
    # Every sheet says the issue is incomplete and names the strip left out, first of its
    # general notes: a sheet is often read on its own, away from the schedule and report.
    for name in sheets:
        texts = [e.dxf.text for e in doc.layouts.get(name).query("TEXT")]
        at = next(i for i, t in enumerate(texts) if t.startswith("INCOMPLETE ISSUE"))
        assert texts[at - 1] == "GENERAL NOTES" and FAIL in " ".join(texts[at : at + 3])


def test_a_complete_issue_has_no_incomplete_note(tmp_path: Path) -> None:
    project = parse_project(floor_yaml(3), "floor.yaml")
    result = build_outputs(project, options=BuildOptions(workers=0, previews=False))
    dxf = dict(result.files)["floor-3-layout.dxf"].decode("utf-8")
    assert "GENERAL NOTES" in dxf and "INCOMPLETE" not in dxf


def test_workers_do_not_change_a_single_byte() -> None:
    """Deterministic outputs: 0 and 2 worker processes give byte-identical files."""
    project = parse_project(floor_yaml(N), "floor.yaml")
    serial = build_outputs(project, options=BuildOptions(workers=0, previews=False))
    parallel = build_outputs(project, options=BuildOptions(workers=2, previews=False))
    assert [n for n, _ in serial.files] == [n for n, _ in parallel.files]
    for (name, a), (_, b) in zip(serial.files, parallel.files, strict=True):
        assert a == b, name
    assert not serial.not_detailed


def test_building_twice_gives_identical_csv_json_and_dxf(tmp_path: Path) -> None:
    path = _write(tmp_path, floor_yaml(N, key=7))
    a, b = tmp_path / "a", tmp_path / "b"
    for folder in (a, b):
        assert main(["build", str(path), "--out", str(folder), "--no-progress"]) == 0
    snap_a, snap_b = _snapshot(a), _snapshot(b)
    assert snap_a == snap_b
    assert {n.rsplit(".", 1)[1] for n in snap_a} == {"csv", "json", "dxf", "html"}


def test_when_every_strip_fails_nothing_is_written(tmp_path: Path, capsys) -> None:
    ids = tuple(f"F{i:03d}" for i in range(1, 4))
    path = _write(tmp_path, floor_yaml(3, failing=ids))
    out = tmp_path / "out"
    assert main(["build", str(path), "--out", str(out)]) == 1
    err = capsys.readouterr().err
    assert "3 strip(s) cannot be designed as given" in err and "no files were written" in err
    assert not out.exists()


def test_a_strip_failing_at_a_reissue_is_withdrawn_and_the_old_issue_kept(
    tmp_path: Path, capsys
) -> None:
    out = tmp_path / "out"
    first = _write(tmp_path, floor_yaml(4, project_id="four"), "four.yaml")
    assert main(["build", str(first), "--out", str(out)]) == 0
    before = _snapshot(out)
    assert "four-F002.png" in before
    second = _write(tmp_path, floor_yaml(4, project_id="four", failing=("F002",)), "four.yaml")
    assert main(["build", str(second), "--out", str(out)]) == 1
    capsys.readouterr()
    assert _snapshot(out / "rev-P1") == before  # the earlier issue kept, byte for byte
    now = _snapshot(out)
    assert "four-F002.png" not in now and "four-F001.png" in now
    record = json.loads(now["four-record.json"])
    assert record["revision"] == "P2"
    old = json.loads(before["four-record.json"])

    def marks(rec: dict, strip_ids: set[str]) -> set[str]:
        return {b["mark"] for s in rec["strips"] if s["id"] in strip_ids for b in s["bar_sets"]}

    only_f2 = marks(old, {"F002"}) - marks(record, {"F001", "F003", "F004"})
    assert only_f2 and only_f2 <= set(record["withdrawn_marks"])
    assert [n["strip_id"] for n in record["not_detailed"]] == ["F002"]
    assert "four-changes.md" in now


def test_progress_bars_show_each_stage_on_stderr(tmp_path: Path, capsys) -> None:
    path = _write(tmp_path, floor_yaml(PARALLEL_FROM_STRIPS + 1))
    out = tmp_path / "out"
    args = ["build", str(path), "--out", str(out), "--progress", "--jobs", "2", "--no-previews"]
    assert main(args) == 0
    err = capsys.readouterr().err
    n = PARALLEL_FROM_STRIPS + 1
    for stage in ("detailing", "sheets", "report"):
        assert stage in err
    assert f"{n}/{n}" in err and "100%" in err


def test_no_progress_bars_when_not_asked(tmp_path: Path, capsys) -> None:
    path = _write(tmp_path, floor_yaml(2))
    assert main(["build", str(path), "--out", str(tmp_path / "o"), "--no-previews"]) == 0
    assert capsys.readouterr().err == ""  # stderr is not a terminal under pytest


@pytest.mark.parametrize(
    ("n", "requested", "expected_max"),
    [(1, None, 0), (PARALLEL_FROM_STRIPS, None, 0), (50, 1, 0), (50, 3, 3), (2, 8, 2)],
)
def test_worker_count(n: int, requested: int | None, expected_max: int) -> None:
    assert worker_count(n, requested) == expected_max


def test_worker_count_uses_the_cpus_for_a_floor() -> None:
    import os

    cpus = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    expected = min(cpus or 1, 500) if (cpus or 1) > 1 else 0
    assert worker_count(500) == expected


def _square(context: int, index: int) -> int:
    return context * index * index


def test_map_indexed_keeps_order_over_processes() -> None:
    done: list[int] = []
    out = map_indexed(_square, 3, 40, workers=2, on_done=done.append)
    assert out == [3 * i * i for i in range(40)] and done == list(range(40))


def test_bad_jobs_value_is_a_usage_error(tmp_path: Path, capsys) -> None:
    path = _write(tmp_path, floor_yaml(2))
    with pytest.raises(SystemExit) as exc:
        main(["build", str(path), "--jobs", "0"])
    assert exc.value.code == 2
    assert "--jobs" in capsys.readouterr().err


def test_a_big_drawing_is_split_into_files_that_keep_the_sheet_numbers(
    tmp_path: Path, monkeypatch
) -> None:
    """More strips than SHEETS_PER_FILE: files of at most that many sheets, in strip order,
    sheets numbered in the whole set; 0 and 2 workers give the same bytes; `slabwright
    audit` reads the files together against the schedule."""
    import detailer.drawing_set as ds

    monkeypatch.setattr(ds, "SHEETS_PER_FILE", 5)
    project = parse_project(floor_yaml(N), "floor.yaml")
    serial = build_outputs(project, options=BuildOptions(workers=0, previews=False))
    parallel = build_outputs(project, options=BuildOptions(workers=2, previews=False))
    assert serial.files == parallel.files
    names = [n for n, _ in serial.files if n.endswith(".dxf")]
    assert names == [f"{PID}-layout-01.dxf", f"{PID}-layout-02.dxf", f"{PID}-layout-03.dxf"]
    files = dict(serial.files)
    seen = []
    for name in names:
        doc = ezdxf.read(io.StringIO(files[name].decode("utf-8")))
        sheets = [n for n in doc.layout_names() if n != "Model"]
        assert 1 <= len(sheets) <= 5
        seen += sheets
        assert not doc.audit().has_errors
        for sheet in sheets:
            texts = [e.dxf.text for e in doc.layouts.get(sheet).query("TEXT")]
            number = 1 + [f"Strip F{i:03d}" for i in range(1, N + 1)].index(sheet)
            assert any(f"sheet {number} of {N}" in t for t in texts), sheet
    assert sorted(seen) == sorted(f"Strip F{i:03d}" for i in range(1, N + 1))
    for name, data in serial.files:
        (tmp_path / name).write_bytes(data)
    drawings = [str(tmp_path / n) for n in names]
    assert main(["audit", *drawings, str(tmp_path / f"{PID}-schedule.csv")]) == 0
    # one file alone misses the other files' bars: the audit says so
    assert main(["audit", drawings[0], str(tmp_path / f"{PID}-schedule.csv")]) == 1


def test_drawing_file_names() -> None:
    from detailer.drawing_set import SHEETS_PER_FILE, drawing_file_names

    assert drawing_file_names("p", SHEETS_PER_FILE) == (("p-layout.dxf", range(SHEETS_PER_FILE)),)
    parts = drawing_file_names("p", 500)
    assert len(parts) == -(-500 // SHEETS_PER_FILE)
    assert [n for n, _ in parts][:2] == ["p-layout-01.dxf", "p-layout-02.dxf"]
    covered = [i for _, r in parts for i in r]
    assert covered == list(range(500)) and max(len(r) for _, r in parts) <= SHEETS_PER_FILE


def test_an_interrupted_build_says_so_in_one_line_and_changes_nothing(
    tmp_path: Path, monkeypatch, capsys
) -> None:
    """Ctrl-C during a build: one line, exit 130 (128 + SIGINT, the shells' convention:
    common practice), earlier outputs untouched (they are written all at once at the end)."""
    import detailer.build as build_module

    path = _write(tmp_path, floor_yaml(2))
    out = tmp_path / "out"
    assert main(["build", str(path), "--out", str(out), "--no-previews"]) == 0
    before = _snapshot(out)
    capsys.readouterr()

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(build_module, "make_issue", interrupted)
    assert main(["build", str(path), "--out", str(out)]) == 130
    err = capsys.readouterr().err.strip().splitlines()
    assert err == ["interrupted: no output files were changed"]
    assert _snapshot(out) == before


@pytest.mark.parametrize("sheets_per_file", [50, 5])
def test_the_build_audits_its_own_drawing_against_its_schedule(
    monkeypatch, sheets_per_file: int
) -> None:
    """A schedule that lost a row no longer matches the drawing: the build refuses to issue
    (in one file, audited in this process; split into files, audited in each file's worker)."""
    import detailer.build as build_module
    import detailer.drawing_set as ds
    from detailer.errors import DesignError

    monkeypatch.setattr(ds, "SHEETS_PER_FILE", sheets_per_file)
    real = build_module.render_schedule_csv

    def lossy(*args, **kwargs) -> bytes:
        lines = real(*args, **kwargs).decode("utf-8").splitlines(keepends=True)
        head = next(i for i, line in enumerate(lines) if line.startswith("Member,Bar mark"))
        return "".join(lines[: head + 1] + lines[head + 2 :]).encode("utf-8")

    monkeypatch.setattr(build_module, "render_schedule_csv", lossy)
    project = parse_project(floor_yaml(N), "floor.yaml")
    with pytest.raises(DesignError, match="disagrees with the schedule"):
        build_outputs(project, options=BuildOptions(workers=2, previews=False))


def test_the_incomplete_note_names_a_dozen_strips_and_counts_the_rest() -> None:
    from detailer.io.dxf_sheet import NOT_DETAILED_NAMED, general_notes

    project = parse_project(floor_yaml(3), "floor.yaml")
    detail = build_outputs(project, options=BuildOptions(workers=0, previews=False)).detail
    missing = tuple(f"X{i:03d}" for i in range(NOT_DETAILED_NAMED + 8))
    notes = general_notes(detail.project, detail.strips[0], not_detailed=missing)
    assert notes[0] == "GENERAL NOTES" and notes[1].startswith("INCOMPLETE ISSUE")
    assert f"X{NOT_DETAILED_NAMED - 1:03d} and 8 more" in notes[1]
    assert f"X{NOT_DETAILED_NAMED:03d}" not in notes[1]
    assert notes[-1].startswith("Caution")  # the usual caution stays last
