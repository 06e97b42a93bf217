"""The report's plots (hand-written SVG): valid, accessible, and drawn to the scale they show.

Sources: SVG 1.1 Second Edition (W3C Recommendation, 16 August 2011): the ``svg`` root in the
namespace ``http://www.w3.org/2000/svg``, ``polyline``/``path`` geometry, ``title``/``desc``
for an accessible name and description; XML 1.0 (Fifth Edition) for well-formedness (parsed
with ``xml.etree.ElementTree``). Tick steps of 1, 2, 2.5 or 5 x 10^k: P. S. Heckbert, "Nice
numbers for graph labels", Graphics Gems (1990), which uses 1, 2 and 5 (from memory; 2.5 is
common practice in engineering charts). The thinning bound: D. H. Douglas and T. K. Peucker
(1973), The Canadian Cartographer 10(2), every dropped point lies within the tolerance of the
line kept. The UK convention of drawing moments on the tension side, sagging below the axis:
common practice.

The geometry checks read the plot as a person does: the scale comes from the tick marks and
their labels (a straight-line fit through them), and the curves, bars and supports must sit
where that scale puts the data (to the drawing's 0.1-unit rounding plus the thinning).
"""

from __future__ import annotations

import itertools
import math
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.build import make_issue
from detailer.project import load_project
from detailer.record import record_to_jsonable
from detailer.report import plots
from detailer.report.design_sections import curtailment_data
from detailer.report.svg import nice_step, nice_ticks, simplify

SVG_NS = "http://www.w3.org/2000/svg"
NS = {"s": SVG_NS}
ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_projects" / "quayside-terrace.yaml"
#: Drawing rounding (0.1 unit) plus the thinning tolerance, with a little to spare.
PX_TOL = 0.3


# ----------------------------------------------------------------------------- reading


def parse(svg: str) -> ET.Element:
    root = ET.fromstring(svg)
    assert root.tag == f"{{{SVG_NS}}}svg"
    return root


def _path_segments(d: str) -> list[tuple[float, float, float, float]]:
    """Segments of a path written as ``M x y`` followed by one ``V``, ``H`` or ``L``."""
    out = []
    for m in re.finditer(r"M(-?[\d.]+) (-?[\d.]+)([VHL])(-?[\d.]+)(?: (-?[\d.]+))?", d):
        x, y, op, a, b = m.groups()
        x, y = float(x), float(y)
        if op == "V":
            out.append((x, y, x, float(a)))
        elif op == "H":
            out.append((x, y, float(a), y))
        else:
            out.append((x, y, float(a), float(b)))
    return out


def _points(el: ET.Element) -> np.ndarray:
    pts = [tuple(float(v) for v in p.split(",")) for p in el.get("points", "").split()]
    return np.array(pts, dtype=float).reshape(-1, 2)


def _label_value(text: str) -> float:
    return float(text.replace("\u2212", "-"))


def _find(root: ET.Element, tag: str, cls: str) -> ET.Element:
    el = root.find(f".//s:{tag}[@class='{cls}']", NS)
    assert el is not None, f"no {tag}.{cls}"
    return el


def y_scale(root: ET.Element) -> tuple[np.ndarray, list[float], np.ndarray]:
    """(value = a y + b as [a, b], the tick values, the tick y positions) from the y ticks."""
    ys = [s[1] for s in _path_segments(_find(root, "path", "y-ticks").get("d", ""))]
    labels = [_label_value(t.text or "") for t in _find(root, "g", "y-labels")]
    assert len(ys) == len(labels) >= 2
    fit = np.polyfit(ys, labels, 1)
    assert np.max(np.abs(np.polyval(fit, ys) - labels)) < 1e-6 + abs(fit[0]) * 0.1
    return fit, labels, np.array(ys)


def x_scale(root: ET.Element) -> tuple[np.ndarray, list[float]]:
    """(x_mm = a x + b as [a, b], the tick values in m) from the x ticks."""
    xs = [s[0] for s in _path_segments(_find(root, "path", "x-ticks").get("d", ""))]
    labels = [_label_value(t.text or "") for t in _find(root, "g", "x-labels")]
    assert len(xs) == len(labels) >= 2
    fit = np.polyfit(xs, [v * 1000.0 for v in labels], 1)
    return fit, labels


def series(root: ET.Element, name: str) -> np.ndarray:
    el = root.find(f".//s:polyline[@data-series='{name}']", NS)
    assert el is not None, name
    return _points(el)


def bar_run(pts: np.ndarray) -> tuple[float, float, float]:
    """(y, x from, x to) of the horizontal run of a drawn bar (its legs left aside)."""
    for a, b in itertools.pairwise(pts):
        if a[1] == b[1] and a[0] != b[0]:
            return float(a[1]), float(min(a[0], b[0])), float(max(a[0], b[0]))
    raise AssertionError(f"no horizontal run in {pts}")


def zero_y(root: ET.Element) -> float:
    line = _find(root, "line", "zero")
    assert line.get("y1") == line.get("y2")
    return float(line.get("y1", "nan"))


def is_nice(step: float) -> bool:
    mant = step / 10.0 ** math.floor(math.log10(step))
    return any(abs(mant - m) < 1e-9 for m in (1.0, 2.0, 2.5, 5.0, 10.0))


def assert_nice_and_covering(labels: list[float], lo: float, hi: float) -> float:
    steps = np.diff(labels)
    step = abs(float(steps[0]))
    assert np.allclose(np.abs(steps), step, rtol=1e-9, atol=1e-9), labels
    assert is_nice(step), step
    lowest, highest = min(labels), max(labels)
    fuzz = 1e-6 * step  # a millionth of a step: nothing a drawing shows
    lo, hi = min(lo, 0.0), max(hi, 0.0)
    assert lowest <= lo + fuzz and highest >= hi - fuzz, (labels, lo, hi)
    if hi - lo > 1e-6:  # all zero: the axis shows -1 to 1
        assert lowest > lo - step - fuzz and highest < hi + step + fuzz, (labels, lo, hi)
    return step


# ----------------------------------------------------------------------------- fixtures


@pytest.fixture(scope="module")
def sample():
    issue = make_issue(load_project(SAMPLE))
    return issue, record_to_jsonable(issue.record)


def _sine_envelope(peak_sag: float = 10.0, peak_hog: float = -6.0) -> plots.EnvelopeData:
    x = np.linspace(0.0, 5000.0, 51)
    sag = peak_sag * np.sin(np.pi * x / 5000.0)
    hog = peak_hog * np.sin(np.pi * x / 5000.0)
    supports = (plots.SupportMark("A", 0.0, 300.0), plots.SupportMark("B", 5000.0, 300.0))
    notes = (plots.Annotation(2500.0, peak_sag, f"{peak_sag:g}"),)
    return plots.EnvelopeData(x, sag, hog, supports, notes)


# ------------------------------------------------------------------------------- tests


def test_sagging_is_drawn_below_the_axis():
    """UK convention (common practice): a sagging span moment lies below the zero line and a
    hogging one above it (SVG y grows down)."""
    root = parse(plots.moment_svg(_sine_envelope(), title="t", salt="test/moment"))
    y0 = zero_y(root)
    sag, hog = series(root, "m_max"), series(root, "m_min")
    assert len(sag) > 10 and len(hog) > 10
    assert sag[:, 1].max() > y0 + 20 and sag[:, 1].min() >= y0 - PX_TOL
    assert hog[:, 1].min() < y0 - 10 and hog[:, 1].max() <= y0 + PX_TOL
    # The scale read from the ticks agrees: the zero line is at value 0, sagging values grow down.
    fit, _, _ = y_scale(root)
    assert np.polyval(fit, y0) == pytest.approx(0.0, abs=abs(fit[0]) * PX_TOL)
    assert fit[0] > 0


def test_shear_is_drawn_positive_up():
    data = _sine_envelope(8.0, -4.0)
    root = parse(plots.shear_svg(data, title="t", salt="test/shear"))
    fit, _, _ = y_scale(root)
    assert fit[0] < 0  # value grows upwards
    top = series(root, "v_max")
    assert np.polyval(fit, top[:, 1].min()) == pytest.approx(8.0, abs=abs(fit[0]) * PX_TOL)


def test_moment_plot_is_to_scale_of_the_record(sample):
    """Strip S1 of the sample: the curves' extremes, read through the tick scale, are the
    record's M_Ed,max and M_Ed,min (docs/record-schema.md: envelope stations), and each
    support's dashed centreline is at the record's support x."""
    issue, rec = sample
    from detailer.report.input_sections import analysis_section

    s, sd = rec["strips"][0], issue.detail.strips[0]
    html = analysis_section(s, sd, issue.detail.project.analysis, salt="t")
    svgs = re.findall(r"<svg.*?</svg>", html, flags=re.DOTALL)
    moment, shear = parse(svgs[0]), parse(svgs[1])
    m_max = max(st["m_max_knm"] for st in s["envelope"])
    m_min = min(st["m_min_knm"] for st in s["envelope"])
    fit, labels, _ = y_scale(moment)
    tol = abs(fit[0]) * PX_TOL
    assert np.polyval(fit, series(moment, "m_max")[:, 1].max()) == pytest.approx(m_max, abs=tol)
    assert np.polyval(fit, series(moment, "m_min")[:, 1].min()) == pytest.approx(m_min, abs=tol)
    assert_nice_and_covering(labels, m_min, m_max)
    xfit, xlabels = x_scale(moment)
    step_m = assert_nice_and_covering(xlabels, min(xlabels), max(xlabels))
    assert min(xlabels) <= 0.0 and max(xlabels) >= s["length_mm"] / 1000.0 - step_m
    lines = _path_segments(_find(moment, "path", "supports").get("d", ""))
    xs = sorted(np.polyval(xfit, seg[0]) for seg in lines)
    want = sorted(sp["x_mm"] for sp in s["supports"])
    assert xs == pytest.approx(want, abs=abs(xfit[0]) * PX_TOL)
    labels_text = [t.text for t in _find(moment, "g", "support-labels")]
    assert labels_text == [sp["label"] for sp in s["supports"]]
    v_max = max(st["v_max_kn"] for st in s["envelope"])
    v_min = min(st["v_min_kn"] for st in s["envelope"])
    vfit, vlabels, _ = y_scale(shear)
    vtol = abs(vfit[0]) * PX_TOL
    assert np.polyval(vfit, series(shear, "v_max")[:, 1].min()) == pytest.approx(v_max, abs=vtol)
    assert np.polyval(vfit, series(shear, "v_min")[:, 1].max()) == pytest.approx(v_min, abs=vtol)
    assert_nice_and_covering(vlabels, v_min, v_max)


def test_peak_values_are_written_beside_their_points():
    data = _sine_envelope(12.5, -7.0)
    root = parse(plots.moment_svg(data, title="t", salt="s"))
    notes = _find(root, "g", "values").findall("s:text", NS)
    assert [n.text for n in notes] == ["12.5"]
    xfit, _ = x_scale(root)
    fit, _, _ = y_scale(root)
    x_text = np.polyval(xfit, float(notes[0].get("x", "nan")))
    assert x_text == pytest.approx(2500.0, abs=abs(xfit[0]) * 1.0)
    # Below the sagging peak (tension side), within a line of text of it.
    peak_y = (12.5 - fit[1]) / fit[0]
    assert peak_y < float(notes[0].get("y", "nan")) < peak_y + 25.0
    desc = root.find("s:desc", NS)
    assert desc is not None and "12.5 at x = 2.50 m" in (desc.text or "")


def _curtailment(sample) -> tuple[ET.Element, plots.CurtailmentData]:
    issue, _ = sample
    data = curtailment_data(issue.detail.strips[0])
    assert data is not None
    return parse(plots.curtailment_svg(data, title="t", salt="s")), data


def test_curtailment_curves_and_bars_to_scale(sample):
    """Resistance and shifted demand per face at the record's magnitudes (top face drawn
    above the axis), and every principal bar from its x_start to its x_end."""
    root, data = _curtailment(sample)
    fit, labels, _ = y_scale(root)
    tol = abs(fit[0]) * PX_TOL
    top_rd = np.polyval(fit, series(root, "m_rd_top")[:, 1])
    bot_rd = np.polyval(fit, series(root, "m_rd_bottom")[:, 1])
    assert top_rd.min() == pytest.approx(-float(np.max(data.m_rd_top)), abs=tol)
    assert bot_rd.max() == pytest.approx(float(np.max(data.m_rd_bottom)), abs=tol)
    top_ed = np.polyval(fit, series(root, "m_ed_top")[:, 1])
    assert top_ed.min() == pytest.approx(-float(np.max(data.m_ed_top)), abs=tol)
    assert_nice_and_covering(labels, -float(np.max(data.m_rd_top)), float(np.max(data.m_rd_bottom)))
    xfit, _ = x_scale(root)
    xtol = abs(xfit[0]) * PX_TOL
    axis_y = float(_find(root, "line", "lanes-axis").get("y1", "nan"))  # between T1 and B1
    bars = root.findall(".//s:g[@class='bar']", NS)
    assert len(bars) == len(data.bars)
    by_lane: dict[tuple[str, float], list[tuple[float, float]]] = {}
    for g in bars:
        line = _points(g.find("s:polyline", NS))
        y, a, b = bar_run(line)
        x0, x1 = np.polyval(xfit, a), np.polyval(xfit, b)
        mark, layer = g.get("data-mark"), g.get("data-layer")
        match = [
            b for b in data.bars if b.mark == mark and b.layer == layer
            and abs(b.x_start_mm - x0) <= xtol and abs(b.x_end_mm - x1) <= xtol
        ]  # fmt: skip
        assert match, (mark, x0, x1)
        assert (y < axis_y) if layer == "T1" else (y > axis_y)
        label = g.find("s:text", NS)
        assert label is not None and label.text == match[0].label
        # A leg turns from the bar end towards the other face.
        legs = line[line[:, 1] != y]
        assert np.all(np.abs(legs[:, 1] - axis_y) < abs(y - axis_y))
        assert len(legs) == int(match[0].leg_left) + int(match[0].leg_right)
        by_lane.setdefault((layer, y), []).append((a, b))
    for spans in by_lane.values():  # bars sharing a lane do not overlap
        spans.sort()
        assert all(a[1] < b[0] for a, b in itertools.pairwise(spans))


def test_curtailment_lanes_separate_overlapping_bars():
    """Three overlapping top bars take three lanes; a bar clear of the others shares one."""
    x = np.linspace(0.0, 6000.0, 61)
    bars = (
        plots.BarLine("01", "10H12-01-200", "T1", 0.0, 3000.0),
        plots.BarLine("02", "10H12-02-200", "T1", 1000.0, 4000.0),
        plots.BarLine("03", "10H12-03-200", "T1", 2000.0, 5000.0),
        plots.BarLine("04", "10H12-04-200", "T1", 4800.0, 6000.0, leg_right=True),
        plots.BarLine("05", "10H12-05-200", "B1", 0.0, 6000.0, leg_left=True),
    )
    data = plots.CurtailmentData(
        x, np.full_like(x, 5.0), np.full_like(x, 8.0), x, np.full_like(x, 6.0),
        np.full_like(x, 9.0), bars, (plots.SupportMark("A", 0.0, 200.0),),
    )  # fmt: skip
    root = parse(plots.curtailment_svg(data, title="t", salt="s"))
    ys = {}
    for g in root.findall(".//s:g[@class='bar']", NS):
        pts = _points(g.find("s:polyline", NS))
        ys[g.get("data-mark")] = bar_run(pts)[0]
        if g.get("data-mark") in ("04", "05"):
            assert len(pts) == 3  # the leg
    assert len({ys["01"], ys["02"], ys["03"]}) == 3
    assert ys["04"] == ys["01"]  # first lane free again after bar 01 (and its label) end
    assert ys["05"] > max(ys["01"], ys["02"], ys["03"])


_bar = st.tuples(
    st.sampled_from(["T1", "B1"]),
    st.floats(0.0, 20000.0),
    st.floats(200.0, 12000.0),
    st.booleans(),
)


@settings(max_examples=30, deadline=None)
@given(bars=st.lists(_bar, min_size=1, max_size=14))
def test_any_bars_get_lanes_without_clashes(bars):
    """Property: bars of one layer drawn in one lane never overlap, T1 lanes lie above the
    line between the layers and B1 lanes below, and every bar is drawn."""
    lines = tuple(
        plots.BarLine(f"{i:02d}", f"12H10-{i:02d}-200", layer, x0, x0 + length, leg, leg)
        for i, (layer, x0, length, leg) in enumerate(bars)
    )
    x = np.linspace(0.0, 32000.0, 200)
    curve = np.full_like(x, 10.0)
    data = plots.CurtailmentData(x, curve, curve, x, curve, curve, lines, ())
    root = parse(plots.curtailment_svg(data, title="t", salt="s"))
    axis_y = float(_find(root, "line", "lanes-axis").get("y1", "nan"))
    xfit, _ = x_scale(root)
    lanes: dict[float, list[tuple[float, float]]] = {}
    drawn = root.findall(".//s:g[@class='bar']", NS)
    assert sorted(g.get("data-mark") for g in drawn) == sorted(b.mark for b in lines)
    for g in drawn:
        y, a, b = bar_run(_points(g.find("s:polyline", NS)))
        bar = next(b for b in lines if b.mark == g.get("data-mark"))
        assert (y < axis_y) == (bar.layer == "T1")
        x0, x1 = np.polyval(xfit, [a, b])
        assert x0 == pytest.approx(bar.x_start_mm, abs=abs(xfit[0]) * PX_TOL)
        assert x1 == pytest.approx(bar.x_end_mm, abs=abs(xfit[0]) * PX_TOL)
        lanes.setdefault(y, []).append((a, b))
    for spans in lanes.values():
        spans.sort()
        assert all(a[1] < b[0] for a, b in itertools.pairwise(spans))


def test_text_is_escaped_and_the_svg_is_self_contained():
    title = 'Strip A&B <1> "east" – Überbau\x07'
    data = _sine_envelope()
    data = plots.EnvelopeData(
        data.x_mm, data.upper, data.lower, (plots.SupportMark("S<&>", 0.0, 0.0),),
        (plots.Annotation(2500.0, 10.0, "10 & <more>"),),
    )  # fmt: skip
    for fn in (plots.moment_svg, plots.shear_svg):
        svg = fn(data, title=title, salt="p&q/<1>")
        root = parse(svg)  # well-formed XML, escaped text
        assert root.get("version") == "1.1" and root.get("role") == "img"
        assert root.get("aria-label") == title.replace("\x07", "")
        assert root.findtext("s:title", namespaces=NS) == title.replace("\x07", "")
        assert root.get("data-plot") == "p&q/<1>"
        texts = ["".join(t.itertext()) for t in root.iter(f"{{{SVG_NS}}}text")]
        assert "S<&>" in texts and "10 & <more>" in texts
        assert not re.search(r"(?:href|url\(|@import|<script|<image|<foreignObject)", svg)


def test_numbers_have_at_most_one_decimal_and_output_is_stable(sample):
    root_svg = plots.moment_svg(_sine_envelope(), title="t", salt="s")
    again = plots.moment_svg(_sine_envelope(), title="t", salt="s")
    assert root_svg == again
    coords = re.findall(r'\s(?:points|d|x|y|x1|y1|x2|y2|width|height)="([^"]*)"', root_svg)
    assert coords and not any(re.search(r"\d\.\d\d", c) for c in coords)
    curt, _ = _curtailment(sample)
    for el in curt.iter():
        for key in ("points", "d", "x", "y"):
            assert not re.search(r"\d\.\d\d", el.get(key, ""))


def test_the_report_path_imports_no_plotting_library():
    """Rendering the sample's report imports neither matplotlib nor any of its parts."""
    import subprocess
    import sys

    code = (
        "import sys; from pathlib import Path\n"
        "from detailer.project import load_project; from detailer.build import make_issue\n"
        "from detailer.report import render_report\n"
        f"i = make_issue(load_project(Path({str(SAMPLE)!r})))\n"
        "h = render_report(i.detail, i.record, i.schedule, input_name='x', input_sha256='0')\n"
        "assert h.count(b'<svg') == 3 * len(i.detail.strips)\n"
        "print(sorted(m for m in sys.modules if m.split('.')[0] == 'matplotlib'))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=120, cwd=ROOT,
        check=False,
    )  # fmt: skip
    assert out.returncode == 0, out.stderr[-2000:]
    assert out.stdout.strip() == "[]"


# ------------------------------------------------------------------ ticks and thinning


@pytest.mark.parametrize(
    ("span", "target", "step"),
    [(49.8, 5, 10.0), (49.8, 4, 20.0), (7.3, 5, 2.0), (1.0, 4, 0.25), (330.0, 6, 100.0)],
)
def test_nice_step(span, target, step):
    """The smallest of 1, 2, 2.5, 5 x 10^k at or above span/target (Heckbert 1990, with 2.5)."""
    assert nice_step(span, target) == pytest.approx(step)


def test_nice_ticks_cover_the_range():
    assert nice_ticks(-30.94, 18.86, 10.0) == [-40.0, -30.0, -20.0, -10.0, 0.0, 10.0, 20.0]
    assert nice_ticks(0.0, 0.75, 0.25) == [0.0, 0.25, 0.5, 0.75]


@settings(max_examples=40, deadline=None)
@given(
    sag=st.floats(0.0, 500.0),
    hog=st.floats(-500.0, 0.0),
    length_mm=st.floats(800.0, 60000.0),
    n=st.integers(2, 300),
)
def test_any_envelope_is_drawn_to_its_ticks(sag, hog, length_mm, n):
    """Property: for any envelope the y ticks are evenly spaced nice numbers covering the
    values and zero, the x ticks nice steps in metres, and the curve extremes map back to the
    data extremes through that scale."""
    x = np.linspace(0.0, length_mm, n)
    shape = np.sin(np.pi * x / length_mm) ** 2
    data = plots.EnvelopeData(x, sag * shape, hog * shape, (plots.SupportMark("A", 0.0, 200.0),))
    root = parse(plots.moment_svg(data, title="t", salt="s"))
    fit, labels, _ = y_scale(root)
    lo, hi = float(np.min(hog * shape)), float(np.max(sag * shape))
    assert_nice_and_covering(labels, lo, hi)
    tol = abs(fit[0]) * PX_TOL
    assert np.polyval(fit, series(root, "m_max")[:, 1].max()) == pytest.approx(hi, abs=tol)
    assert np.polyval(fit, series(root, "m_min")[:, 1].min()) == pytest.approx(lo, abs=tol)
    xfit, xlabels = x_scale(root)
    assert is_nice(abs(xlabels[1] - xlabels[0]))
    ends = np.polyval(xfit, series(root, "m_max")[[0, -1], 0])
    assert ends == pytest.approx([0.0, length_mm], abs=abs(xfit[0]) * PX_TOL)


def _distances_to_polyline(pts: np.ndarray, line: np.ndarray) -> np.ndarray:
    """Distance of each point to the nearest segment of ``line`` (plain geometry)."""
    a, b = line[:-1][None, :, :], line[1:][None, :, :]
    p = pts[:, None, :]
    d = b - a
    dd = np.einsum("ijk,ijk->ij", d, d)
    t = np.where(dd > 0, np.einsum("ijk,ijk->ij", p - a, d) / np.where(dd > 0, dd, 1.0), 0.0)
    near = a + np.clip(t, 0.0, 1.0)[..., None] * d
    return np.min(np.hypot(*(near - p).transpose(2, 0, 1)), axis=1)


@settings(max_examples=40, deadline=None)
@given(
    n=st.integers(3, 2500),
    stream=st.integers(0, 2**32 - 1),
    kind=st.sampled_from(["walk", "smooth", "steps"]),
    tol=st.sampled_from([0.05, 0.12, 1.0]),
)
def test_thinning_stays_within_the_tolerance(n, stream, kind, tol):
    """Douglas and Peucker (1973): the ends are kept and every point dropped lies within the
    tolerance of the line kept (checked here against the drawn polyline). Long curves (over
    the 400 points from which the full thinning runs) as well as short ones."""
    rng = np.random.default_rng(stream)
    x = np.linspace(0.0, 650.0, n)
    if kind == "walk":
        y = np.cumsum(rng.normal(0.0, 1.0, n))
    elif kind == "smooth":
        y = 80.0 * np.sin(x / rng.uniform(20.0, 200.0)) + rng.normal(0.0, 0.01, n)
    else:  # plateaus and ramps, like a resistance curve
        y = np.round(np.cumsum(rng.normal(0.0, 2.0, n)) / 10.0) * 10.0
    xy = np.column_stack([x, y])
    kept = simplify(xy, tol)
    assert np.array_equal(kept[0], xy[0]) and np.array_equal(kept[-1], xy[-1])
    assert len(kept) <= len(xy)
    assert float(np.max(_distances_to_polyline(xy, kept))) <= tol + 1e-9
    if kind == "smooth" and n > 1000:
        assert len(kept) < n / 2  # and it does thin
