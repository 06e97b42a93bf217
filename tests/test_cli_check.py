"""``slabwright check`` on the sample: tables, exit code, determinism, caution line.

Sources for the numbers checked: EN 1991-1-1:2002 Table A.1 (self-weight 0.225 x 25 =
5.625 kN/m2); EN 1990:2002 Table A1.1 (category A psi values) and Table A1.2(B) + UK NA
(factors); statics of the balcony cantilever (root moment 15.62 kNm/m, as in
test_strip_analysis.py).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from detailer import CAUTION, __version__
from detailer.cli import main

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_projects" / "quayside-terrace.yaml"


def _run(capsys, argv) -> tuple[int, str, str]:
    rc = main(argv)
    out = capsys.readouterr()
    return rc, out.out, out.err


def test_check_sample(capsys) -> None:
    rc, out, err = _run(capsys, ["check", str(SAMPLE)])
    assert rc == 0 and err == ""
    assert out.rstrip("\n").splitlines()[-1] == CAUTION
    assert "Strip S1" in out and "Strip S2" in out
    assert "self-weight 5.625 kN/m2" in out
    assert "psi_0 = 0.7, psi_1 = 0.5, psi_2 = 0.3" in out
    assert "gamma_G 1.35 (favourable 1.00), gamma_Q 1.50, xi 0.925" in out
    rows = [line.split() for line in out.splitlines() if line.startswith(("  span ", "  cant"))]
    # Segment table: g_k includes self-weight (5.625 + 1.5), balcony 5.625 + 1.2.
    assert ["span", "1", "A-B", "4200", "7.125", "1.50"] in rows
    assert ["cantilever", "E-tip", "1500", "6.825", "2.50"] == rows[4][:5]
    e_row = [line for line in out.splitlines() if line.startswith("  E ") and "-15.62" in line]
    assert len(e_row) == 1  # balcony root moment at the support table
    assert "M_face,left" in out and "R_max (kN/m)" in out


def test_check_is_deterministic(capsys) -> None:
    _, first, _ = _run(capsys, ["check", str(SAMPLE)])
    _, second, _ = _run(capsys, ["check", str(SAMPLE)])
    assert first == second


def test_version(capsys) -> None:
    rc, out, _ = _run(capsys, ["--version"])
    assert rc == 0
    assert out.splitlines() == [f"slabwright {__version__}", CAUTION]


def test_no_command_prints_help_and_caution(capsys) -> None:
    rc, out, _ = _run(capsys, [])
    assert rc == 0 and "check" in out and out.rstrip().endswith(CAUTION)


def test_caution_is_one_line() -> None:
    assert "\n" not in CAUTION and "competent engineer" in CAUTION


def test_python_m_detailer_bad_file(tmp_path: Path) -> None:
    bad = tmp_path / "bad.yaml"
    bad.write_text("project: {id: x}\nstrips: []\n", encoding="utf-8")
    proc = subprocess.run(
        [sys.executable, "-m", "detailer", "check", str(bad)],
        capture_output=True,
        text=True,
        cwd=ROOT,
        check=False,
    )
    assert proc.returncode == 2
    assert proc.stdout == ""
    assert "Traceback" not in proc.stderr
    assert all(line.startswith(f"{bad}:") for line in proc.stderr.splitlines())


def test_reader_closing_the_pipe_early_is_not_a_traceback(monkeypatch, tmp_path) -> None:
    # Regression: `slabwright ... | head -1` printed a BrokenPipeError traceback (common
    # practice for command-line tools: a closed pipe ends the output quietly).
    import sys

    from detailer.cli import main

    sink = open(tmp_path / "sink", "w")  # noqa: SIM115 - its descriptor is redirected

    class ClosedPipe:
        def write(self, text: str) -> int:
            raise BrokenPipeError(32, "Broken pipe")

        def flush(self) -> None:
            raise BrokenPipeError(32, "Broken pipe")

        def fileno(self) -> int:
            return sink.fileno()

    sample = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"
    monkeypatch.setattr(sys, "stdout", ClosedPipe())
    assert main(["check", str(sample)]) == 0
    sink.close()
