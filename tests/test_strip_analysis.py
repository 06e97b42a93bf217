"""Strip -> beam model, loads and envelopes, against closed forms and an independent FE oracle.

Sources:
* simply supported, fixed-fixed and propped-cantilever UDL moments (wL^2/8, wL^2/12, wL^2/24,
  wL^2/8 with 9wL^2/128 at 3L/8 from the prop): standard beam tables, e.g. the Steel
  Designers' Manual beam tables (from memory: the formulas are textbook statics);
* two equal spans: Clapeyron's three-moment equation, M_B = -(w1 + w2) L^2 / 16;
* cantilever root moment: statics;
* EN 1990:2002 Eq. (6.10a)/(6.10b) with the UK NA factors 1.35 / 1.5 / xi = 0.925;
  Eq. (6.16b) quasi-permanent G + psi_2 Q, psi_2 from EN 1990 Table A1.1;
* EN 1991-1-1:2002 Table A.1: reinforced concrete 25 kN/m3;
* anastruct (independent 2D frame FE library, test-only oracle) for the support moments and
  reactions of the sample strips under every arrangement, and (with the statics of span 1 as
  a simple beam between its end moments) for the sagging of the sample's end span;
* a monolithic end is enveloped FIXED and PINNED (common practice: partial fixity at
  monolithic edges), so a span with a monolithic end sags as much as the pinned idealisation
  gives and its monolithic support hogs as much as the fixed one gives.
"""

from __future__ import annotations

import dataclasses
import itertools
from pathlib import Path

import numpy as np
import pytest

from analysis.beam import PointLoad, Restraint, UniformLoad
from detailer.project import load_project, parse_project
from detailer.strip_analysis import analyse_strip, strip_beam_model, strip_loads

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "quayside-terrace.yaml"

G_SUP, G_Q, XI = 1.35, 1.5, 0.925  # EN 1990 Table A1.2(B), UK NA


def n_610a(g: float, q: float, psi_0: float = 0.7) -> float:
    return G_SUP * g + G_Q * psi_0 * q  # EN 1990 Eq. (6.10a)


def n_610b(g: float, q: float) -> float:
    return XI * G_SUP * g + G_Q * q  # EN 1990 Eq. (6.10b)


def one_strip(
    spans: str,
    left: str,
    right: str,
    *,
    g: float = 1.5,
    q: float = 2.0,
    h: int = 200,
    category: str = "A",
    design: str = "",
) -> str:
    return f"""\
project: {{id: t, title: T, revision: P1, date: 2025-01-01}}
materials: {{concrete: C30/37}}
{design}
strips:
  - id: S1
    thickness_mm: {h}
    cover: {{top_mm: 25, bottom_mm: 25, side_mm: 25}}
    panel_width_mm: 3000
    spans_mm: {spans}
    support_widths_mm: 0
    left_end: {left}
    right_end: {right}
    loads: {{category: {category}, g_k_kn_per_m2: {g}, q_k_kn_per_m2: {q}}}
"""


def analyse(text: str):
    project = parse_project(text, "t.yaml")
    return analyse_strip(project, project.strips[0])


# --- model and loads --------------------------------------------------------------------


def test_sample_beam_model_nodes_and_restraints() -> None:
    project = load_project(SAMPLE)
    s1, s2 = project.strips
    m1 = strip_beam_model(s1)
    # Hand sums of the file's spans 4200, 5600, 5100, 4600 and the 1500 balcony.
    assert m1.node_x_mm == (0.0, 4200.0, 9800.0, 14900.0, 19500.0, 21000.0)
    assert m1.restraints == (Restraint.FIXED,) + (Restraint.PINNED,) * 4 + (Restraint.FREE,)
    assert m1.support_width_mm == (300.0,) * 5 + (0.0,)
    m2 = strip_beam_model(s2)
    assert m2.node_x_mm == (0.0, 3600.0, 5400.0, 9000.0)
    assert m2.restraints == (Restraint.PINNED,) * 4
    assert m2.support_width_mm == (215.0, 300.0, 300.0, 215.0)


def test_left_cantilever_puts_origin_at_tip() -> None:
    model = strip_beam_model(
        parse_project(one_strip("[4000]", "{cantilever_mm: 1200}", "pinned"), "t").strips[0]
    )
    assert model.node_x_mm == (0.0, 1200.0, 5200.0)
    assert model.restraints == (Restraint.FREE, Restraint.PINNED, Restraint.PINNED)


def test_single_support_cantilever_is_fixed_at_root() -> None:
    model = strip_beam_model(
        parse_project(one_strip("[]", "monolithic", "{cantilever_mm: 1500}"), "t").strips[0]
    )
    assert model.node_x_mm == (0.0, 1500.0)
    assert model.restraints == (Restraint.FIXED, Restraint.FREE)


def test_ei_from_e_cm() -> None:
    # EN 1992-1-1 Table 3.1: C30/37 E_cm = 22 (38/10)^0.3 = 32.84 GPa (printed 33 GPa);
    # I = 1 m x 0.2^3 / 12 = 6.667e-4 m4 -> EI = 21 891 kNm2.
    strip = parse_project(one_strip("[4000]", "pinned", "pinned"), "t").strips[0]
    assert strip_beam_model(strip, f_ck=30.0).ei_knm2 == pytest.approx(21891.0, rel=1e-3)


def test_sample_loads_include_self_weight_and_line_loads() -> None:
    s1 = load_project(SAMPLE).strips[0]
    permanent, variable = strip_loads(s1)
    # Self-weight 0.225 m x 25 kN/m3 = 5.625 kN/m2 (EN 1991-1-1 Table A.1) + 1.5 finishes.
    udl = {ld.segment: ld.w_kn_per_m for ld in permanent if isinstance(ld, UniformLoad)}
    assert udl == pytest.approx({0: 7.125, 1: 7.125, 2: 7.125, 3: 7.125, 4: 5.625 + 1.2})
    points = sorted((ld.segment, ld.p_kn, ld.a_mm) for ld in permanent if isinstance(ld, PointLoad))
    assert points == [(2, 4.5, 2550.0), (4, 1.0, 1450.0)]
    q = {ld.segment: ld.w_kn_per_m for ld in variable}
    assert q == pytest.approx({0: 1.5, 1: 1.5, 2: 1.5, 3: 1.5, 4: 2.5})


# --- closed forms -----------------------------------------------------------------------


def test_simply_supported_span() -> None:
    g, q, L = 5.0 + 1.5, 2.0, 5.0  # h = 200 mm: 5.0 kN/m2 self-weight
    a = analyse(one_strip("[5000]", "pinned", "pinned"))
    n = max(n_610a(g, q), n_610b(g, q))
    assert n == pytest.approx(n_610b(g, q))  # 6.10b governs for this G/Q ratio
    (span,) = a.uls.span_summaries()
    assert span.m_max_knm == pytest.approx(n * L**2 / 8, rel=1e-9)
    assert span.x_mm == pytest.approx(2500.0, abs=1e-6)
    assert span.governing.equation == "6.10b"
    reactions = [s.reaction_max_kn for s in a.uls.support_summaries()]
    assert reactions == pytest.approx([n * L / 2] * 2, rel=1e-9)
    # Quasi-permanent: G + psi_2 Q with psi_2 = 0.3 (category A).
    (qp,) = a.sls_quasi_permanent.span_summaries()
    assert qp.m_max_knm == pytest.approx((g + 0.3 * q) * L**2 / 8, rel=1e-9)


def test_psi_2_follows_category() -> None:
    # Category C: psi_2 = 0.6 (EN 1990 Table A1.1).
    g, q, L = 6.5, 4.0, 5.0
    a = analyse(one_strip("[5000]", "pinned", "pinned", q=q, category="C"))
    assert a.factors.psi_2 == 0.6
    (qp,) = a.sls_quasi_permanent.span_summaries()
    assert qp.m_max_knm == pytest.approx((g + 0.6 * q) * L**2 / 8, rel=1e-9)


def test_fixed_fixed_span() -> None:
    # Both ends monolithic: every fixed/pinned combination is enveloped (standard beam tables):
    # fixed-fixed gives -wL^2/12 at the supports and wL^2/24 in the span; fixed-pinned gives
    # -wL^2/8 at the fixed end; pinned-pinned gives wL^2/8 in the span.
    g, q, L = 6.5, 2.0, 6.0
    a = analyse(one_strip("[6000]", "monolithic", "monolithic"))
    assert a.variants == (
        "A fixed, B fixed",
        "A fixed, B pinned",
        "A pinned, B fixed",
        "A pinned, B pinned",
    )
    n = n_610b(g, q)
    (span,) = a.uls.span_summaries()
    assert span.m_max_knm == pytest.approx(n * L**2 / 8, rel=1e-9)
    assert span.governing.label == "6.10b, Q on span 1 (A pinned, B pinned)"
    for s in a.uls.support_summaries():
        assert s.m_min_knm == pytest.approx(-n * L**2 / 8, rel=1e-9)
    assert a.uls.model_of("A fixed, B fixed").restraints == (Restraint.FIXED,) * 2
    assert a.uls.model_of("A pinned, B pinned").restraints == (Restraint.PINNED,) * 2
    mid = a.uls.stations.find(0, 3000.0)
    m_fixed, _ = a.uls.arrangement_values(
        dataclasses.replace(span.governing, variant="A fixed, B fixed"), np.array([mid])
    )
    assert m_fixed[0] == pytest.approx(n * L**2 / 24, rel=1e-9)
    ends, _ = a.uls.arrangement_values(
        dataclasses.replace(span.governing, variant="A fixed, B fixed"),
        np.array([a.uls.stations.find(0, 0.0)]),
    )
    assert ends[0] == pytest.approx(-n * L**2 / 12, rel=1e-9)


def test_propped_cantilever_span() -> None:
    # Monolithic A, pinned B: enveloped propped (9wL^2/128 at 3L/8 from the prop, -wL^2/8 at
    # A) and simply supported (wL^2/8 at L/2).
    g, q, L = 6.5, 2.0, 5.0
    a = analyse(one_strip("[5000]", "monolithic", "pinned"))
    assert a.variants == ("end A fixed", "end A pinned")
    assert a.uls.variants == a.sls_quasi_permanent.variants == a.variants
    n = n_610b(g, q)
    (span,) = a.uls.span_summaries()
    assert span.m_max_knm == pytest.approx(n * L**2 / 8, rel=1e-9)
    assert span.x_mm == pytest.approx(2500.0, abs=1e-6)
    assert span.governing.label == "6.10b, Q on span 1 (end A pinned)"
    fixed = a.uls.support_summaries()[0]
    assert fixed.m_min_knm == pytest.approx(-n * L**2 / 8, rel=1e-9)
    assert fixed.governing_m_min.label == "6.10b, Q on span 1 (end A fixed)"
    # The fixed idealisation of the same arrangement is the propped cantilever of the beam
    # tables, M(x) = -wL^2/8 + 5wLx/8 - wx^2/2 from the fixed end (peak 9wL^2/128 at 5L/8).
    m_prop, _ = a.uls.arrangement_values(dataclasses.replace(span.governing, variant="end A fixed"))
    x = a.uls.stations.x_mm / 1000.0
    np.testing.assert_allclose(
        m_prop, -n * L**2 / 8 + 5 * n * L * x / 8 - n * x**2 / 2, atol=1e-9 * n * L**2
    )
    assert m_prop.max() <= 9 * n * L**2 / 128 + 1e-9
    # Quasi-permanent G + psi_2 Q: simply supported wL^2/8 in the span, -wL^2/8 at A.
    w_qp = g + 0.3 * q
    (qp,) = a.sls_quasi_permanent.span_summaries()
    assert qp.m_max_knm == pytest.approx(w_qp * L**2 / 8, rel=1e-9)
    assert a.sls_quasi_permanent.node_m_min_knm[0] == pytest.approx(-w_qp * L**2 / 8, rel=1e-9)


def test_pinned_ends_have_one_model() -> None:
    a = analyse(one_strip("[5000]", "pinned", "pinned"))
    assert a.variants == () and a.uls.variants == ("",)
    assert "(" not in a.uls.span_summaries()[0].governing.label


def test_lone_cantilever_root_stays_fixed() -> None:
    # The only support of a cantilever cannot be released (statics: it carries the root
    # moment -w a^2 / 2).
    a = analyse(one_strip("[]", "monolithic", "{cantilever_mm: 1500}"))
    assert a.variants == ()
    (root,) = a.uls.support_summaries()
    assert root.m_min_knm == pytest.approx(-n_610b(6.5, 2.0) * 1.5**2 / 2, rel=1e-9)


@pytest.mark.parametrize("percent", [0, 15])
def test_two_equal_spans_uk_arrangements(percent: int) -> None:
    g, q, L = 6.5, 2.0, 4.0
    design = f"design: {{redistribution_percent: {percent}}}"
    a = analyse(one_strip("[4000, 4000]", "pinned", "pinned", design=design))
    delta = 1 - percent / 100
    assert a.uls.redistribution_delta == pytest.approx(delta)
    assert a.sls_quasi_permanent.redistribution_delta == 1.0
    # All spans loaded governs hogging at B: -w L^2 / 8, times delta (EN 1992-1-1 5.5).
    n = max(n_610a(g, q), n_610b(g, q))
    b = a.uls.support_summaries()[1]
    assert b.m_min_knm == pytest.approx(-delta * n * L**2 / 8, rel=1e-9)
    assert b.governing_m_min.loaded_segments == (0, 1)
    if percent == 0:
        # Span 1 alone carries Q (UK NA alternate spans): three-moment equation.
        best = 0.0
        for gg, gq in ((G_SUP, G_Q * 0.7), (XI * G_SUP, G_Q)):
            w1, w2 = gg * g + gq * q, gg * g
            m_b = -(w1 + w2) * L**2 / 16
            r_a = w1 * L / 2 + m_b / L
            best = max(best, r_a**2 / (2 * w1))
        span1 = a.uls.span_summaries()[0]
        assert span1.m_max_knm == pytest.approx(best, rel=1e-9)
        assert span1.governing.loaded_segments == (0,)


def test_sample_balcony_root_moment() -> None:
    # Statics of the 1.5 m balcony: G = (5.625 + 1.2) kN/m2 plus the 1.0 kN/m parapet at
    # 1.45 m, Q = 2.5 kN/m2; 6.10b governs: 1.24875 x 9.128 + 1.5 x 2.8125 = 15.62 kNm/m.
    project = load_project(SAMPLE)
    a = analyse_strip(project, project.strips[0])
    m_g = 6.825 * 1.5**2 / 2 + 1.0 * 1.45
    m_q = 2.5 * 1.5**2 / 2
    expected = -max(n_610a(m_g, m_q), n_610b(m_g, m_q))
    root = a.uls.support_summaries()[-1]
    assert root.m_min_knm == pytest.approx(expected, rel=1e-9)
    assert expected == pytest.approx(-15.62, abs=0.005)


# --- anastruct oracle -------------------------------------------------------------------


def _anastruct(nodes_m, restraints, udl, points):
    """Node moments (sagging +) and reactions (up +) by anastruct for one load case.

    nodes_m: node x in m (model nodes plus extra nodes under point loads / partial ends);
    restraints: {node index: Restraint}; udl: per element w (kN/m); points: {node: P kN}.
    """
    from anastruct import SystemElements

    ss = SystemElements(EI=1.0e4)
    for a, b in itertools.pairwise(nodes_m):
        ss.add_element([[a, 0.0], [b, 0.0]])
    first = True  # one hinge, rollers elsewhere: no axial restraint along the strip
    for i, r in sorted(restraints.items()):
        if r is Restraint.FIXED:
            ss.add_support_fixed(i + 1)
        elif first:
            ss.add_support_hinged(i + 1)
        else:
            ss.add_support_roll(i + 1)
        first = False
    for e, w in enumerate(udl):
        if w:
            ss.q_load(q=-w, element_id=e + 1)
    for i, p in points.items():
        ss.point_load(i + 1, Fy=-p)
    ss.solve()
    n_el = len(nodes_m) - 1
    m = [-ss.get_element_results(e + 1, verbose=True)["M"][0] for e in range(n_el)]
    m.append(-ss.get_element_results(n_el, verbose=True)["M"][-1])
    r = [-ss.get_node_results_system(i + 1)["Fy"] for i in range(len(nodes_m))]
    return np.array(m), np.array(r)


def test_corridor_strip_all_subsets_against_anastruct() -> None:
    text = SAMPLE.read_text(encoding="utf-8").replace(
        "arrangements: uk-simplified", "arrangements: all-subsets"
    )
    project = parse_project(text, "sample")
    a = analyse_strip(project, project.strips[1])
    # Elements of the oracle: A-B, B-(B+900), (B+900)-C, C-D; the service riser 2.0 kN/m2
    # covers the first 900 mm of span 2. G = 5.0 + 1.5 kN/m2, Q = 3.0 kN/m2.
    nodes = [0.0, 3.6, 4.5, 5.4, 9.0]
    restraints = {
        0: Restraint.PINNED,
        1: Restraint.PINNED,
        3: Restraint.PINNED,
        4: Restraint.PINNED,
    }
    elem_seg = [0, 1, 1, 2]
    g_el = [6.5, 6.5 + 2.0, 6.5, 6.5]
    moments, reactions = [], []
    for (gg, gq), loaded in itertools.product(
        ((G_SUP, G_Q * 0.7), (XI * G_SUP, G_Q)),
        [s for k in range(4) for s in itertools.combinations(range(3), k)],
    ):
        udl = [gg * g + (gq * 3.0 if elem_seg[e] in loaded else 0.0) for e, g in enumerate(g_el)]
        m, r = _anastruct(nodes, restraints, udl, {})
        moments.append(m[[0, 1, 3, 4]])
        reactions.append(r[[0, 1, 3, 4]])
    moments, reactions = np.array(moments), np.array(reactions)
    sup = a.uls.support_summaries()
    assert [s.m_min_knm for s in sup] == pytest.approx(list(moments.min(axis=0)), abs=1e-3)
    assert [s.reaction_max_kn for s in sup] == pytest.approx(list(reactions.max(axis=0)), rel=1e-5)
    # Adjacent spans 1 and 2 loaded give the worst hogging at B (not in the UK NA set).
    assert sup[1].governing_m_min.loaded_segments == (0, 1)


def test_balcony_strip_uk_arrangements_against_anastruct() -> None:
    project = load_project(SAMPLE)
    a = analyse_strip(project, project.strips[0])
    # The monolithic end A is enveloped fixed and pinned (module docstring).
    assert a.variants == ("end A fixed", "end A pinned")
    # Oracle nodes: the model nodes plus the partition (9800 + 2550) and parapet (19500 + 1450).
    nodes = [0.0, 4.2, 9.8, 12.35, 14.9, 19.5, 20.95, 21.0]
    elem_seg = [0, 1, 2, 2, 3, 4, 4]
    g_seg = [7.125, 7.125, 7.125, 7.125, 6.825]
    q_seg = [1.5, 1.5, 1.5, 1.5, 2.5]
    # UK NA to EN 1992-1-1 5.1.3(1): all segments loaded, or alternate segments loaded.
    sets = [(0, 1, 2, 3, 4), (0, 2, 4), (1, 3)]
    moments, reactions = [], []
    sagging_1 = {Restraint.FIXED: 0.0, Restraint.PINNED: 0.0}
    for end_a, (gg, gq), loaded in itertools.product(
        (Restraint.FIXED, Restraint.PINNED), ((G_SUP, G_Q * 0.7), (XI * G_SUP, G_Q)), sets
    ):
        restraints = {
            0: end_a,
            1: Restraint.PINNED,
            2: Restraint.PINNED,
            4: Restraint.PINNED,
            5: Restraint.PINNED,
        }
        udl = [gg * g_seg[s] + (gq * q_seg[s] if s in loaded else 0.0) for s in elem_seg]
        m, r = _anastruct(nodes, restraints, udl, {3: gg * 4.5, 6: gg * 1.0})
        moments.append(m[[0, 1, 2, 4, 5]])
        reactions.append(r[[0, 1, 2, 4, 5]])
        # Span 1 (4.2 m, UDL only) as a simple beam between the oracle's end moments: shear
        # at A = wL/2 + (M_B - M_A)/L, peak sagging M_A + V_A^2 / (2w) (statics).
        w1, span = udl[0], 4.2
        v_a = w1 * span / 2 + (m[1] - m[0]) / span
        sagging_1[end_a] = max(sagging_1[end_a], m[0] + v_a**2 / (2 * w1))
    moments, reactions = np.array(moments), np.array(reactions)
    sup = a.uls.support_summaries()
    assert [s.m_min_knm for s in sup] == pytest.approx(list(moments.min(axis=0)), abs=1e-3)
    assert [s.reaction_max_kn for s in sup] == pytest.approx(list(reactions.max(axis=0)), rel=1e-5)
    # Support A hogs only in the fixed idealisation.
    assert sup[0].governing_m_min.variant == "end A fixed"
    # Span 1 sags about twice as much with A pinned (14.5 against 7.5 kNm/m) and is designed
    # for it.
    span_1 = a.uls.span_summaries()[0]
    assert sagging_1[Restraint.PINNED] > 1.8 * sagging_1[Restraint.FIXED]
    assert span_1.m_max_knm == pytest.approx(sagging_1[Restraint.PINNED], abs=1e-3)
    assert span_1.governing.variant == "end A pinned"
