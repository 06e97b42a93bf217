"""Zone design checked against strips designed by hand.

Method and formulas: The Concrete Centre, "How to design concrete structures using Eurocode 2"
(UK simplified rectangular block, EN 1992-1-1:2004 6.1 and 3.1.7(3)): K = M/(b d^2 f_ck),
z = d [0.5 + sqrt(0.25 - K/1.134)] <= 0.95 d, A_s = M/(f_yd z) with f_yd = 500/1.15.
Loads: EN 1990:2002 + UK NA, the less favourable of Eq. (6.10a) 1.35 G + 1.5 psi_0 Q
(psi_0 = 0.7, category A, Table A1.1) and Eq. (6.10b) 0.925 x 1.35 G + 1.5 Q; self-weight
h x 25 kN/m3 (EN 1991-1-1, Table A.1). Pattern loading, UK NA to EN 1992-1-1 5.1.3(1)P: all
spans loaded, or alternate spans loaded with the same gamma_G G on every span.
Beam moments: w L^2/8 (simply supported); two equal spans with loads w1, w2:
M_B = -(w1 + w2) L^2/16, span 1 peak (w1 L/2 - |M_B|/L)^2 / (2 w1) (statics).

The bars must be the least-area choice from the allowed sizes and spacings (default 10, 12, 16,
20 mm at 100-300 mm in 25 mm steps) meeting A_s >= max(A_s,req, A_s,min) (9.2.1.1(1)), the
spacing limit (9.3.1.1(3): 2h <= 250 in areas of maximum moment, else 3h <= 400); crack control
needs nothing for h <= 200 (7.3.3(1)); ties go to the wider spacing, then the smaller bar (the
design module's stated rule). Enumerated here independently.
"""

from __future__ import annotations

import math

import pytest

from detailer.pipeline import detail_project
from detailer.project import parse_project
from tests.strip_factory import as_per_m, check_detail, f_ctm, f_yd

F_CK = 30.0
H = 175.0
COVER = 25.0
G_K = 1.5 + H / 1000 * 25.0  # superimposed + self-weight, kN/m2
Q_K = 2.5
N_610A = 1.35 * G_K + 1.5 * 0.7 * Q_K  # 10.556 kN/m2
N_610B = 0.925 * 1.35 * G_K + 1.5 * Q_K  # 11.086 kN/m2, governs
N_ULS = max(N_610A, N_610B)
SIZES = (10, 12, 16, 20)
SPACINGS = tuple(range(100, 301, 25))


def _project(spans: str, widths: str):
    text = f"""
project: {{id: hand, title: "Hand check", revision: P1, date: 2025-01-01}}
materials: {{concrete: C30/37}}
strips:
  - id: W1
    thickness_mm: {H:g}
    cover: {{top_mm: {COVER:g}, bottom_mm: {COVER:g}, side_mm: {COVER:g}}}
    panel_width_mm: 4000
    spans_mm: {spans}
    support_widths_mm: {widths}
    left_end: pinned
    right_end: pinned
    loads: {{category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: {Q_K:g}}}
"""
    project = parse_project(text, "hand.yaml")
    return project, detail_project(project).strips[0]


def _by_hand(m_knm: float, d: float) -> tuple[float, float, float]:
    k = m_knm * 1e6 / (1000.0 * d * d * F_CK)
    z = min(d * (0.5 + math.sqrt(0.25 - k / 1.134)), 0.95 * d)
    return k, z, m_knm * 1e6 / (f_yd() * z)


def _least_area(m_knm: float, s_max: float, with_minimum: bool = True) -> tuple[int, int]:
    """Least-area bars from the allowed set, enumerated (ties: wider spacing, smaller bar)."""
    best = None
    for phi in SIZES:
        d = H - COVER - phi / 2
        need = _by_hand(m_knm, d)[2]
        if with_minimum:
            need = max(need, max(0.26 * f_ctm(F_CK) / 500.0, 0.0013) * 1000.0 * d)
        for s in SPACINGS:
            a = as_per_m(phi, s)
            if s <= s_max and need <= a <= 0.04 * 1000 * H:
                key = (round(a, 6), -s, phi)
                best = min(best, key) if best else key
    assert best is not None
    return best[2], -best[1]


def _zone(detail, zone_id):
    return next(z for z in detail.zones if z.zone_id == zone_id)


def test_load_combination_by_hand():
    """6.10b governs for G_k = 5.875, Q_k = 2.5 kN/m2: n = 1.24875 G_k + 1.5 Q_k = 11.086 kN/m2
    against 10.556 by (6.10a) [D]."""
    assert N_ULS == N_610B == pytest.approx(11.086, abs=5e-4)
    assert N_610A == pytest.approx(10.556, abs=5e-4)


def test_simply_supported_span():
    """4.0 m simply supported, h 175, C30/37: M = n L^2/8 = 22.17 kNm/m; with H10 (d = 145)
    K = 0.0352, z = 0.95 d = 137.75 (capped), A_s,req = 370.2 mm2/m -> H10@200 (393)."""
    project, detail = _project("[4000]", "200")
    zone = _zone(detail, "S1-B")
    m_hand = N_ULS * 4.0**2 / 8.0
    assert m_hand == pytest.approx(22.17, abs=0.01)
    assert zone.m_ed_knm_per_m == pytest.approx(m_hand, rel=5e-3)
    assert (zone.phi_mm, zone.spacing_mm) == _least_area(m_hand, min(2 * H, 250)) == (10, 200)
    k, z, a_s = _by_hand(zone.m_ed_knm_per_m, zone.d_mm)
    assert zone.d_mm == pytest.approx(145.0)
    assert zone.k == pytest.approx(k, rel=5e-3)
    assert zone.k == pytest.approx(0.0352, abs=1e-4)
    assert zone.z_mm == pytest.approx(z, rel=5e-3)
    assert zone.z_mm == pytest.approx(137.75, abs=0.01)
    assert zone.as_req_mm2_per_m == pytest.approx(a_s, rel=5e-3)
    assert zone.as_req_mm2_per_m == pytest.approx(370.2, abs=0.5)
    assert zone.governing == "flexure"
    assert check_detail(project, detail) == []


def test_pinned_end_top_steel():
    """Top steel at the pinned ends for 15 % of the span moment (EN 1992-1-1:2004, 9.3.1.2(2)):
    M = 3.33 kNm/m, A_s,req = 55.5 mm2/m, no A_s,min for this zone (the design module's rule);
    spacing <= 3h <= 400 -> the least area allowed is H10@300."""
    _, detail = _project("[4000]", "200")
    m_span = N_ULS * 4.0**2 / 8.0
    for zone_id in ("A-T", "B-T"):
        zone = _zone(detail, zone_id)
        assert zone.m_ed_knm_per_m == pytest.approx(0.15 * m_span, rel=5e-3)
        assert zone.as_req_mm2_per_m == pytest.approx(
            _by_hand(zone.m_ed_knm_per_m, zone.d_mm)[2], rel=5e-3
        )
        expected = _least_area(zone.m_ed_knm_per_m, min(3 * H, 400), with_minimum=False)
        assert (zone.phi_mm, zone.spacing_mm) == expected == (10, 300)


def test_two_equal_spans_knife_edge_middle_support():
    """Two 4.0 m spans, knife-edge middle support (no face reduction). All spans loaded:
    M_B = n L^2/8 = 22.17 kNm/m. Span 1 loaded (6.10b, 11.086), span 2 at 1.24875 G_k (7.336):
    M_B = -18.42, span peak 13.92 kNm/m (6.10a gives 12.88)."""
    project, detail = _project("[4000, 4000]", "[200, 0, 200]")
    support = _zone(detail, "B-T")
    assert support.m_ed_knm_per_m == pytest.approx(N_ULS * 16.0 / 8.0, rel=5e-3)
    w1, w2 = N_610B, 0.925 * 1.35 * G_K
    m_b = (w1 + w2) * 16.0 / 16.0
    r_a = w1 * 4.0 / 2 - m_b / 4.0
    m_span = r_a**2 / (2 * w1)
    assert m_span == pytest.approx(13.92, abs=0.01)
    for zone_id in ("S1-B", "S2-B"):
        span = _zone(detail, zone_id)
        assert span.m_ed_knm_per_m == pytest.approx(m_span, rel=5e-3)
    for zone in (support, _zone(detail, "S1-B")):
        k, z, a_s = _by_hand(zone.m_ed_knm_per_m, zone.d_mm)
        assert (zone.k, zone.z_mm, zone.as_req_mm2_per_m) == pytest.approx((k, z, a_s), rel=5e-3)
        assert (zone.phi_mm, zone.spacing_mm) == _least_area(zone.m_ed_knm_per_m, 250)
    assert check_detail(project, detail) == []
