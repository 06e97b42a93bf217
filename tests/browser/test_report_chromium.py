"""The calculation report in a real browser: headless Chromium paints it, prints it to A4 and
reports no console errors. Skipped when Chromium is not installed (Debian package
``chromium``).

Sources: ISO 216 (A4 = 210 x 297 mm = 595.3 x 841.9 pt); the PDF 1.7 reference (ISO 32000-1,
7.7.3.3: one ``/Type /Page`` object per page, ``/MediaBox`` in points); the PNG specification
(decoded here with ``matplotlib.image``). One browser launch per check.
"""

from __future__ import annotations

import hashlib
import os
import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest


def _chromium() -> str | None:
    found = shutil.which("chromium")
    if found:
        return found
    return "/usr/bin/chromium" if os.access("/usr/bin/chromium", os.X_OK) else None


CHROMIUM = _chromium()
pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed")
pytest.importorskip("matplotlib")

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "sample_projects" / "quayside-terrace.yaml"
FLAGS = (
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
)
# Pens of the plots (detailer.report.plots): only the plots paint in these colours.
PLOT_HOGGING = (0x1F, 0x5F, 0xA8)
PLOT_SHEAR = (0x7A, 0x3E, 0x9D)


def _browser(tmp: Path, name: str, *args: str) -> subprocess.CompletedProcess[str]:
    """One headless launch with a fresh profile; output and errors captured."""
    cmd = [CHROMIUM, *FLAGS, f"--user-data-dir={tmp / ('profile-' + name)}", *args]
    return subprocess.run(
        cmd, check=False, capture_output=True, text=True, timeout=180, stdin=subprocess.DEVNULL
    )


@pytest.fixture(scope="module")
def report(tmp_path_factory) -> tuple[Path, int]:
    """The sample's report written to a file; (path, number of strips)."""
    from detailer.build import build_outputs
    from detailer.project import load_project
    from detailer.record import build_record
    from detailer.report import render_report, report_file_name

    project = load_project(SAMPLE)
    result = build_outputs(project)
    html = render_report(
        result.detail,
        build_record(result.detail),
        result.schedule,
        input_name=SAMPLE.name,
        input_sha256=hashlib.sha256(SAMPLE.read_bytes()).hexdigest(),
    )
    folder = tmp_path_factory.mktemp("report")
    path = folder / report_file_name(project.id)
    path.write_bytes(html)
    return path, len(project.strips)


def _near(rgb: np.ndarray, colour: tuple[int, int, int], tol: float = 0.12) -> int:
    target = np.array(colour, dtype=float) / 255.0
    return int(np.all(np.abs(rgb - target) < tol, axis=-1).sum())


def test_screenshot_shows_the_page_and_its_plots(report, tmp_path):
    """The first strip's envelope plots are painted (a window tall enough to reach them)."""
    import matplotlib.image

    path, _ = report
    png = tmp_path / "shot.png"
    run = _browser(
        tmp_path, "shot", f"--screenshot={png}", "--window-size=1240,7000", path.as_uri()
    )
    assert png.exists(), run.stderr[-2000:]
    img = matplotlib.image.imread(png)
    assert img.shape[:2] == (7000, 1240)
    rgb = img[..., :3].astype(float)
    non_white = float((rgb.min(axis=-1) < 0.94).mean())
    assert non_white > 0.03, f"page looks blank ({non_white:.4f} of pixels drawn)"
    assert _near(rgb, PLOT_HOGGING) > 300, "no moment curves painted"
    assert _near(rgb, PLOT_SHEAR) > 150, "no shear curves painted"


def test_prints_to_a4_pages(report, tmp_path):
    path, n_strips = report
    pdf = tmp_path / "report.pdf"
    run = _browser(
        tmp_path, "pdf", "--no-pdf-header-footer", f"--print-to-pdf={pdf}", path.as_uri()
    )
    assert pdf.exists(), run.stderr[-2000:]
    data = pdf.read_bytes()
    assert data.startswith(b"%PDF-") and len(data) > 100_000
    pages = re.findall(rb"/Type\s*/Page(?![A-Za-z])", data)
    assert len(pages) > 2 * n_strips  # each strip starts a page and takes several
    boxes = re.findall(rb"/MediaBox\s*\[\s*0\s+0\s+([\d.]+)\s+([\d.]+)\s*\]", data)
    assert boxes
    for w, h in boxes:  # A4 portrait, 595.3 x 841.9 pt (ISO 216)
        assert float(w) == pytest.approx(595.3, abs=1.5)
        assert float(h) == pytest.approx(841.9, abs=1.5)


def _console_lines(stderr: str) -> list[str]:
    return [ln for ln in stderr.splitlines() if re.search(r":CONSOLE[:(]|Uncaught", ln)]


def test_dom_has_the_plots_and_the_console_is_quiet(report, tmp_path):
    path, n_strips = report
    run = _browser(tmp_path, "dom", "--enable-logging=stderr", "--v=0", "--dump-dom", path.as_uri())
    dom = run.stdout
    assert "</html>" in dom, run.stderr[-2000:]
    assert len(re.findall(r"<svg\b", dom)) == 3 * n_strips
    assert len(re.findall(r'<section class="strip"', dom)) == n_strips
    assert _console_lines(run.stderr) == []


def test_console_check_catches_a_script_error(tmp_path):
    """Control for the check above: a page that throws is caught by the same filter."""
    page = tmp_path / "bad.html"
    page.write_text(
        "<!DOCTYPE html><html><body><script>throw new Error('boom')</script></body></html>",
        encoding="utf-8",
    )
    run = _browser(tmp_path, "bad", "--enable-logging=stderr", "--v=0", "--dump-dom", page.as_uri())
    lines = _console_lines(run.stderr)
    assert any("boom" in ln for ln in lines), run.stderr[-2000:]
