"""The calculation report (HTML): well formed, complete, and its numbers are the record's.

Sources: the HTML syntax (WHATWG HTML, void elements; parsed with Python's ``html.parser``);
EN 1990:2002, Table A1.2(B) with the UK NA (gamma_G = 1.35, gamma_Q = 1.5, xi = 0.925) and
Table A1.1 (psi_0 = 0.7 for category A). The main check is an invariant: every number the
report keys with ``data-key`` equals the value in the record JSON written from the same issue
(``<project-id>-record.json``), formatted as that file writes it. The plots themselves are
checked in ``tests/test_report_plots.py``.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import subprocess
import sys
from dataclasses import dataclass, field
from html.parser import HTMLParser
from pathlib import Path

import pytest

from detailer import CAUTION
from detailer.build import make_issue
from detailer.io.json_writer import render_record_json
from detailer.project import load_project, parse_project
from detailer.report import render_report, report_file_name

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_projects" / "quayside-terrace.yaml"
VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source",
        "track", "wbr"}  # fmt: skip


@dataclass
class Built:
    html: bytes
    record: dict
    n_strips: int
    strip_ids: tuple[str, ...]
    input_sha256: str
    schedule_total_mass_kg: float


def _render(project, name: str, sha: str) -> tuple[bytes, dict, object]:
    """The report and the record JSON of one issue, as the build writes them."""
    issue = make_issue(project)
    record_json = json.loads(render_record_json(issue.record))
    html = render_report(
        issue.detail, issue.record, issue.schedule, input_name=name, input_sha256=sha
    )
    return html, record_json, issue


@pytest.fixture(scope="module")
def sample() -> Built:
    data = SAMPLE.read_bytes()
    sha = hashlib.sha256(data).hexdigest()
    html, rec, result = _render(load_project(SAMPLE), SAMPLE.name, sha)
    return Built(
        html,
        rec,
        len(rec["strips"]),
        tuple(s["id"] for s in rec["strips"]),
        sha,
        result.schedule.total_mass_kg,
    )


# ------------------------------------------------------------------------------- parsing


class StrictChecker(HTMLParser):
    """Fails on an end tag that does not close the innermost open element, or on elements left
    open at the end (void elements excepted; ``<x/>`` in SVG closes itself)."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, tuple[int, int]]] = []
        self.errors: list[str] = []

    def handle_starttag(self, tag, attrs):
        if tag not in VOID:
            self.stack.append((tag, self.getpos()))

    def handle_endtag(self, tag):
        if tag in VOID:
            self.errors.append(f"end tag for void element {tag} at {self.getpos()}")
        elif not self.stack or self.stack[-1][0] != tag:
            top = self.stack[-1] if self.stack else None
            self.errors.append(f"</{tag}> at {self.getpos()} does not close {top}")
        else:
            self.stack.pop()


@dataclass
class Collector(HTMLParser):
    """Texts of the elements carrying ``data-key``; SVGs and their ``data-plot`` per strip."""

    keyed: dict[str, list[str]] = field(default_factory=dict)
    plots: dict[str, list[str]] = field(default_factory=dict)
    attrs_seen: list[tuple[str, str, str]] = field(default_factory=list)
    _open: list[list] = field(default_factory=list)  # [key, depth, text parts]
    _depth: int = 0
    _strip: str | None = None
    _strip_depth: int = -1

    def __post_init__(self) -> None:
        HTMLParser.__init__(self, convert_charrefs=True)

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        for name, value in attrs:
            self.attrs_seen.append((tag, name, value or ""))
        if tag in VOID:
            return
        self._depth += 1
        if tag == "section" and "strip" in (a.get("class") or "").split():
            self._strip, self._strip_depth = a["id"].removeprefix("strip-"), self._depth
        if tag == "svg":
            self.plots.setdefault(self._strip or "", []).append(a.get("data-plot", ""))
        if "data-key" in a:
            self._open.append([a["data-key"], self._depth, []])

    def handle_startendtag(self, tag, attrs):
        for name, value in attrs:
            self.attrs_seen.append((tag, name, value or ""))

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        while self._open and self._open[-1][1] == self._depth:
            key, _, parts = self._open.pop()
            self.keyed.setdefault(key, []).append("".join(parts).strip())
        if tag == "section" and self._depth == self._strip_depth:
            self._strip, self._strip_depth = None, -1
        self._depth -= 1

    def handle_data(self, data):
        for entry in self._open:
            entry[2].append(data)


def _collect(html: bytes) -> Collector:
    col = Collector()
    col.feed(html.decode("utf-8"))
    col.close()
    return col


def _text(html: bytes) -> str:
    class Text(HTMLParser):
        def __init__(self):
            super().__init__(convert_charrefs=True)
            self.parts, self.skip = [], 0

        def handle_starttag(self, tag, attrs):
            self.skip += tag in ("style", "svg")

        def handle_endtag(self, tag):
            self.skip -= tag in ("style", "svg")

        def handle_data(self, data):
            if not self.skip:
                self.parts.append(data)

    t = Text()
    t.feed(html.decode("utf-8"))
    return " ".join(" ".join(t.parts).split())


# ------------------------------------------------------------------- expected record values


def _largest_shear(st: dict) -> float:
    return st["v_min_kn"] if abs(st["v_min_kn"]) >= abs(st["v_max_kn"]) else st["v_max_kn"]


def expected_values(rec: dict) -> dict[str, object]:
    """data-key -> value, read from the record JSON alone (docs/record-schema.md)."""
    out: dict[str, object] = {"total_mass_kg": rec["total_mass_kg"]}
    for s in rec["strips"]:
        sid = s["id"]
        for f, v in s["section"].items():
            if f != "effective_depths":
                out[f"{sid}/section/{f}"] = v
        out[f"{sid}/length_mm"] = s["length_mm"]
        out[f"{sid}/concrete_density_kn_per_m3"] = s["concrete_density_kn_per_m3"]
        env = s["envelope"]
        for sp in s["supports"]:
            key = f"{sid}/supports/{sp['label']}"
            out[f"{key}/x_mm"] = sp["x_mm"]
            out[f"{key}/width_mm"] = sp["width_mm"]
            at = [st for st in env if abs(st["x_mm"] - sp["x_mm"]) < 0.5]
            out[f"{key}/m_min_knm"] = min(st["m_min_knm"] for st in at)
            for side, name in ((-1, "v_left_kn"), (1, "v_right_kn")):
                for st in at:
                    if st["side"] == side:
                        out[f"{key}/{name}"] = _largest_shear(st)
        for g in s["segments"]:
            key = f"{sid}/segments/{g['index']}"
            for f in ("x_start_mm", "length_mm", "self_weight_kn_per_m2",
                      "g_k_superimposed_kn_per_m2", "g_k_kn_per_m2", "q_k_kn_per_m2"):  # fmt: skip
                out[f"{key}/{f}"] = g[f]
            here = [st for st in env if st["segment"] == g["index"]]
            peak = max(here, key=lambda st: st["m_max_knm"])
            if peak["m_max_knm"] > 0:
                out[f"{key}/m_max_knm"] = peak["m_max_knm"]
                out[f"{key}/x_m_max_mm"] = peak["x_mm"]
        a = s["actions"]
        for f in ("gamma_g_sup", "gamma_g_inf", "gamma_q", "psi_0", "psi_2", "xi"):
            out[f"{sid}/actions/{f}"] = a[f]
        for e in a["equations"]:
            out[f"{sid}/actions/equations/{e['name']}/gamma_g"] = e["gamma_g"]
            out[f"{sid}/actions/equations/{e['name']}/gamma_q"] = e["gamma_q"]
        utils = []
        for z in s["zones"]:
            key = f"{sid}/zones/{z['zone_id']}"
            for f, v in z.items():
                if isinstance(v, (int, float)) and not isinstance(v, bool) and f != "phi_mm":
                    out[f"{key}/{f}"] = v
            for i, ch in enumerate(z["checks"]):
                for f in ("demand", "capacity", "utilisation"):
                    out[f"{key}/checks/{i}/{f}"] = ch[f]
                utils.append(ch["utilisation"])
        for i, ch in enumerate(s["checks"]):
            for f in ("demand", "capacity", "utilisation"):
                out[f"{sid}/checks/{i}/{f}"] = ch[f]
            utils.append(ch["utilisation"])
        out[f"{sid}/selfcheck/utilisation_max"] = s["selfcheck"]["utilisation_max"]
        utils.append(s["selfcheck"]["utilisation_max"])
        out[f"{sid}/summary/utilisation_max"] = max(
            utils, key=lambda u: float("inf") if u is None else u
        )
        for an in s["anchorage"]:
            key = f"{sid}/anchorage/{an['layer']}/{an['phi_mm']}"
            for f in ("f_bd_mpa", "l_b_rqd_mm", "l_bd_mm", "l_0_mm"):
                out[f"{key}/{f}"] = an[f]
        for b in s["bar_sets"]:
            key = f"{sid}/bar_sets/{b['mark']}/{b['set_id']}"
            for f in ("x_start_mm", "x_end_mm", "mass_kg"):
                out[f"{key}/{f}"] = b[f]
    return out


def _as_written(value: object) -> str:
    """A record value as the JSON file writes it (an infinite value is null: shown as ∞)."""
    return "∞" if value is None else json.dumps(value)


def assert_numbers_are_the_records(html: bytes, rec: dict) -> Collector:
    col = _collect(html)
    expected = expected_values(rec)
    stray = sorted(set(col.keyed) - set(expected))
    assert not stray, f"keyed cells with no record value: {stray[:5]}"
    for key, texts in col.keyed.items():
        want = _as_written(expected[key])
        assert all(t == want for t in texts), f"{key}: report {texts} != record {want}"
    return col


# ---------------------------------------------------------------------------------- tests


def test_html_is_well_formed_and_self_contained(sample: Built):
    text = sample.html.decode("utf-8")
    assert text.startswith("<!DOCTYPE html>")
    checker = StrictChecker()
    checker.feed(text)
    checker.close()
    assert checker.errors == []
    assert checker.stack == [], f"unclosed: {checker.stack[:5]}"
    # No scripts, no external resources (network): nothing to fetch or to run.
    col = _collect(sample.html)
    assert not any(tag == "script" for tag, _, _ in col.attrs_seen)
    assert "<script" not in text.lower()
    fetched = [(t, n, v) for t, n, v in col.attrs_seen if n in ("src", "href", "xlink:href")]
    assert all(v.startswith("#") for _, _, v in fetched), fetched[:3]
    assert "@import" not in text
    assert text.count("url(") == text.count("url(#")  # only references inside the page
    # Printable on A4 with a page break before each strip.
    assert "size: A4" in text
    assert text.count('<section class="strip"') == sample.n_strips
    assert ".strip { break-before: page; }" in text


def test_every_strip_has_its_three_plots(sample: Built):
    col = _collect(sample.html)
    pid = sample.record["project_id"]
    for sid in sample.strip_ids:
        assert sorted(col.plots[sid]) == sorted(
            f"{pid}/{sid}/{kind}" for kind in ("moment", "shear", "curtailment")
        )
    assert sum(len(v) for v in col.plots.values()) == 3 * sample.n_strips
    # Each plot has its curves (not an empty frame), an accessible name and text labels.
    svgs = re.findall(r"<svg.*?</svg>", sample.html.decode("utf-8"), flags=re.DOTALL)
    assert len(svgs) == 3 * sample.n_strips
    for svg in svgs:
        curves = re.findall(r'<polyline data-series="[a-z_]+" points="([^"]+)"', svg)
        assert len(curves) >= 2 and all(len(pts.split()) > 5 for pts in curves)
        assert svg.count("<text") > 20 and 'role="img"' in svg and "<title>Strip " in svg


def test_numbers_equal_the_record(sample: Built):
    col = assert_numbers_are_the_records(sample.html, sample.record)
    # The key numbers are all there: support moments, A_s,req per zone, every utilisation.
    for s in sample.record["strips"]:
        sid = s["id"]
        for sp in s["supports"]:
            assert f"{sid}/supports/{sp['label']}/m_min_knm" in col.keyed
        for z in s["zones"]:
            assert f"{sid}/zones/{z['zone_id']}/as_req_mm2_per_m" in col.keyed
            for i, _ in enumerate(z["checks"]):
                assert f"{sid}/zones/{z['zone_id']}/checks/{i}/utilisation" in col.keyed
        for i, _ in enumerate(s["checks"]):
            assert f"{sid}/checks/{i}/utilisation" in col.keyed
        assert f"{sid}/selfcheck/utilisation_max" in col.keyed
        assert f"{sid}/summary/utilisation_max" in col.keyed
    assert col.keyed["total_mass_kg"] == [_as_written(sample.record["total_mass_kg"])]
    # The schedule's total (members included) is the record's total for the sample.
    assert round(sample.schedule_total_mass_kg, 3) == sample.record["total_mass_kg"]


def test_highest_utilisation_is_highlighted(sample: Built):
    text = sample.html.decode("utf-8")
    exp = expected_values(sample.record)
    for sid in sample.strip_ids:
        section = text.split(f'id="strip-{sid}"', 1)[1].split("</section>", 1)[0]
        summary = section.split("9. Summary of the checks", 1)[1]
        peak = _as_written(exp[f"{sid}/summary/utilisation_max"])
        rows = re.findall(r'<tr class="peak">(.*?)</tr>', summary, flags=re.DOTALL)
        assert rows, sid
        assert all(f">{peak}</td>" in r for r in rows)


def test_en1990_factors_are_shown(sample: Built):
    """EN 1990:2002 Table A1.2(B) + UK NA and Table A1.1 (category A): 6.10a applies
    1.35 G_k + 1.5 x 0.7 Q_k, 6.10b 0.925 x 1.35 G_k + 1.5 Q_k."""
    col = _collect(sample.html)
    sid = sample.strip_ids[0]
    eq = f"{sid}/actions/equations"
    assert float(col.keyed[f"{eq}/6.10a/gamma_g"][0]) == pytest.approx(1.35, abs=1e-4)
    assert float(col.keyed[f"{eq}/6.10a/gamma_q"][0]) == pytest.approx(1.5 * 0.7, abs=1e-4)
    assert float(col.keyed[f"{eq}/6.10b/gamma_g"][0]) == pytest.approx(0.925 * 1.35, abs=1e-4)
    assert float(col.keyed[f"{eq}/6.10b/gamma_q"][0]) == pytest.approx(1.5, abs=1e-4)
    assert col.keyed[f"{sid}/actions/xi"] == ["0.925"]
    assert col.keyed[f"{sid}/actions/psi_0"] == ["0.7"]
    text = _text(sample.html)
    assert "EN 1990:2002, Eq. (6.10a)" in text and "EN 1990:2002, Eq. (6.10b)" in text


def test_input_echo_names_the_file_and_its_hash(sample: Built):
    text = _text(sample.html)
    assert text.count(sample.input_sha256) >= 1 + sample.n_strips  # header and every strip
    assert SAMPLE.name in text


def test_caution_at_top_and_bottom(sample: Built):
    text = sample.html.decode("utf-8")
    body = text.split("<body>", 1)[1]
    assert body.count('<div class="caution"') == 2
    first = body.index(CAUTION)
    last = body.rindex(CAUTION)
    assert first < body.index('<section class="strip"')
    assert last > body.rindex('<section class="strip"')
    assert f'@bottom-left {{ content: "{CAUTION}"' in text  # every printed page


def test_same_input_same_bytes(sample: Built):
    again, _, _ = _render(load_project(SAMPLE), SAMPLE.name, sample.input_sha256)
    assert again == sample.html


def test_same_bytes_in_another_process(sample: Built):
    """Another interpreter, with its own string-hash randomisation (Python's default, so set
    order differs), writes the same bytes."""
    code = (
        "import hashlib, sys; from pathlib import Path\n"
        "from detailer.project import load_project; from detailer.build import make_issue\n"
        "from detailer.report import render_report\n"
        f"p = load_project({str(SAMPLE)!r}); r = make_issue(p)\n"
        "h = render_report(r.detail, r.record, r.schedule, "
        f"input_name={SAMPLE.name!r}, input_sha256={sample.input_sha256!r})\n"
        "sys.stdout.write(hashlib.sha256(h).hexdigest())\n"
    )
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = subprocess.run(
        [sys.executable, "-c", code],
        check=False,
        capture_output=True,
        text=True,
        env=env,
        timeout=120,
    )
    assert out.returncode == 0, out.stderr[-2000:]
    assert out.stdout == hashlib.sha256(sample.html).hexdigest()


def test_report_file_name():
    assert report_file_name("quayside-terrace-l2") == "quayside-terrace-l2-calcs.html"


# ------------------------------------------------------- strips not detailed in this issue

NOT_DETAILED = (
    ("S9", "span 1: A_s,req 2410 mm2/m > A_s,max; deepen the slab"),
    ("Süd & <Nord>", "deflection: l/d 41.2 > 30.1 (7.4.2)"),
)


def test_strips_not_detailed_are_listed_near_the_top():
    """An incomplete issue says so before any calculation (common practice: an issue that
    leaves members out states it at the top), with each strip's id and reason as given."""
    project = load_project(SAMPLE)
    issue = make_issue(project)
    args = (issue.detail, issue.record, issue.schedule)
    plain = render_report(*args, input_name="x", input_sha256="0" * 64)
    html = render_report(*args, input_name="x", input_sha256="0" * 64, not_detailed=NOT_DETAILED)
    assert "Strips not detailed in this issue" not in plain.decode("utf-8")
    again = render_report(*args, input_name="x", input_sha256="0" * 64, not_detailed=())
    assert again == plain
    text = html.decode("utf-8")
    checker = StrictChecker()
    checker.feed(text)
    checker.close()
    assert checker.errors == [] and checker.stack == []
    start = text.index('<section class="incomplete" id="not-detailed">')
    assert text.index("<h1>") < start < text.index('id="revisions"') < text.index('class="strip"')
    section = text[start : text.index("</section>", start)]
    body = _text(section.encode("utf-8"))
    assert "Strips not detailed in this issue" in body
    assert "This issue is incomplete." in body
    assert "no bars on the drawing or in the bar schedule" in body
    for sid, reason in NOT_DETAILED:
        assert f"{sid} {reason}" in body
    assert "Süd &amp; &lt;Nord&gt;" in section and "<Nord>" not in section
    # The overview lists them too (after the heading), and the detailed strips keep theirs.
    assert _text(html).count("not detailed in this issue") == 1 + len(NOT_DETAILED)
    assert text.count('<section class="strip"') == len(project.strips)


def test_a_strip_cannot_be_both_detailed_and_not():
    issue = make_issue(load_project(SAMPLE))
    with pytest.raises(ValueError, match="S1"):
        render_report(
            issue.detail, issue.record, issue.schedule, input_name="x", input_sha256="0" * 64,
            not_detailed=(("S1", "x"),),
        )  # fmt: skip


# ----------------------------------------------------------- another project, other branches

VARIANT = """
project: {id: variant-a, title: "Variant A", revision: P2, date: 2025-05-01, drawing: V-1}
design:
  combination: "6.10"
  arrangements: all-subsets
  redistribution_percent: 15
materials: {concrete: C30/37, f_yk: 500, bar_type: H, ductility_class: B, exposure: XC1}
defaults:
  cover: {top_mm: 25, bottom_mm: 25, side_mm: 25}
  support_widths_mm: 250
  loads: {category: B, g_k_kn_per_m2: 1.0, q_k_kn_per_m2: 2.5}
strips:
  - id: V1
    thickness_mm: 200
    panel_width_mm: 3000
    spans_mm: [4000, 4500]
    left_end: {cantilever_mm: 1200}
    right_end: pinned
"""


def test_other_combination_pattern_and_redistribution():
    project = parse_project(VARIANT, "variant.yaml")
    html, rec, _ = _render(project, "variant.yaml", "ab" * 32)
    checker = StrictChecker()
    checker.feed(html.decode("utf-8"))
    checker.close()
    assert checker.errors == [] and checker.stack == []
    col = assert_numbers_are_the_records(html, rec)
    assert len(col.plots["V1"]) == 3
    text = _text(html)
    assert "EN 1990:2002, Eq. (6.10)" in text and "(6.10b)" not in text
    # delta = 1 - 15 % = 0.85 (EN 1992-1-1:2004, 5.5); its limits are checked.
    assert rec["strips"][0]["actions"]["redistribution_delta"] == pytest.approx(0.85)
    assert "δ = 0.85" in text and "15.0 % redistribution" in text
    assert "every subset of loaded segments" in text
    assert any("5.5(4)" in ch["clause"] for ch in rec["strips"][0]["checks"])
