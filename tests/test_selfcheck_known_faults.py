"""Regression tests for detailing faults once found: strips the pipeline refused with its own
"self-check fails ... this is a detailing fault, please report it" message. Each test is the
smallest reproduction found (one regression test per fixed fault), and a random-strip test
checks that no strip meets that refusal again.

Expected behaviour, EN 1992-1-1:2004, 9.2.1.3(1)-(3) with Fig. 9.2: the resistance envelope of
the bars provided, built up over l_bd from each bar end (measured from the face where a bar
passes into a support, 9.2.1.4(3)), covers the tensile-force envelope (the M_Ed envelope
shifted by a_l = d). Otherwise the pipeline should choose other bars or details, or refuse with
a message naming a user action, never "this is a detailing fault".
"""

from __future__ import annotations

import numpy as np
from hypothesis import Phase, given, settings

from detailer.errors import DesignError
from detailer.pipeline import default_code, detail_strip
from tests.strip_factory import StripSpec, build_project, strip_specs

FAULT = "this is a detailing fault"


def _run(spec: StripSpec):
    project = build_project(spec)
    return project, detail_strip(project, project.strips[0], default_code(project))


def _envelope_at(spec: StripSpec, x_mm: float) -> tuple[float, float]:
    """(max, min) ULS moment at x from the analysis (the analysis is not under test here)."""
    from detailer.strip_analysis import analyse_strip

    project = build_project(spec)
    env = analyse_strip(project, project.strips[0]).uls
    xs = env.stations.x_mm
    i = int(np.argmin(np.abs(xs - x_mm)))
    return float(env.m_max_knm[i]), float(env.m_min_knm[i])


# Fault 1: three pinned spans 2.5, 3.0, 6.0 m. Loading the long span lifts the short ones: the
# ULS envelope sags at support B (m_max(B) = +1.8 kNm/m). The bottom bars of spans 1 and 2
# both stop 10 phi past the faces of B (9.2.1.5(1)), i.e. butt at the centreline x = 2500,
# so M_Rd = 0 where the shifted M_Ed is 4.0 kNm/m.
FAULT_1 = StripSpec(
    spans_mm=(2500, 3000, 6000), thickness_mm=200, g_k_kn_per_m2=1.0, q_k_kn_per_m2=3.0,
    support_width_mm=200,
)  # fmt: skip


def test_fault_1_premise_sagging_at_internal_support():
    m_max, _ = _envelope_at(FAULT_1, 2500.0)
    assert m_max > 1.0  # sagging at the support: bottom steel is needed across it


def test_fault_1_bottom_steel_across_a_sagging_internal_support():
    _, detail = _run(FAULT_1)
    assert detail.selfcheck.ok


# Fault 2: a monolithic end with h = 260 (top bars in poor bond, Fig. 8.2): top H12@200 L-bars
# with 225 mm of bar from the slab end to the face plus a 210 mm leg, 435 mm < l_bd = 513 mm,
# give 45.3 kNm/m at the face of A (x = 125) against the design moment 52.4 kNm/m.
FAULT_2 = StripSpec(
    spans_mm=(7000, 7000), thickness_mm=260, g_k_kn_per_m2=1.5, q_k_kn_per_m2=3.0,
    left_end="monolithic",
)  # fmt: skip


def test_fault_2_top_bars_anchored_at_monolithic_end():
    _, detail = _run(FAULT_2)
    assert detail.selfcheck.ok


# Fault 3: a 2.5 m span fixed at its far end beside a 7 m span: loading the long span makes the
# fixed end C sag (m_max(C) = +27.2 kNm/m). Straight bottom bars H10@225 have 225 mm from the
# face of C to their end, < l_bd = 277 mm: 25.8 < 27.2 kNm/m at the face (x = 9375).
FAULT_3 = StripSpec(
    spans_mm=(7000, 2500), thickness_mm=250, g_k_kn_per_m2=1.5, q_k_kn_per_m2=3.0,
    right_end="monolithic",
)  # fmt: skip


def test_fault_3_premise_fixed_end_sags():
    m_max, _ = _envelope_at(FAULT_3, 9500.0)
    assert m_max > 20.0


def test_fault_3_bottom_bars_anchored_at_sagging_fixed_end():
    _, detail = _run(FAULT_3)
    assert detail.selfcheck.ok


@settings(max_examples=40, phases=[Phase.explicit, Phase.generate])  # no shrinking
@given(strip_specs())
def test_no_random_strip_meets_a_detailing_fault(spec):
    project = build_project(spec)
    try:
        detail_strip(project, project.strips[0], default_code(project))
    except DesignError as exc:
        assert FAULT not in str(exc), str(exc)


# Fault 4: a span sagging at a cantilever root (left balcony 800 mm, spans 6.25 / 2.5 m): the
# span's bottom bars were lapped half over the root support, leaving too little overlap with
# the balcony's bottom bars at the face; they now cross the support and lap l_0 beyond it.
FAULT_4 = StripSpec(
    spans_mm=(6250, 2500), thickness_mm=205, g_k_kn_per_m2=0.5, q_k_kn_per_m2=3.5,
    left_end="cantilever", right_end="pinned", left_cantilever_mm=800, concrete="C25/30",
    cover_mm=25, support_width_mm=200, panel_width_mm=3000, stock_length_mm=6000,
)  # fmt: skip


def test_fault_4_span_bars_lap_past_a_cantilever_root():
    from tests.strip_factory.checks import check_detail

    project, detail = _run(FAULT_4)
    assert check_detail(project, detail) == []
