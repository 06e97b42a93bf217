"""Three independent routes to the same beam: stiffness (this package), moment distribution
(Hardy Cross, ``analysis.moment_distribution``) and anastruct (an open 2D frame FE library,
GPL-3.0, used here only as a test oracle through its public API).

Random unequal-span strips (hypothesis): 2-6 spans of 2-9 m, pinned or fixed ends, optional
cantilevers, full and partial uniform loads and point loads. Support moments, span
moments and reactions agree with anastruct within 0.5 % of the strip's largest value
(anastruct samples moments along each element) and with moment distribution to its
iteration tolerance.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.moment_distribution import moment_in_segment, support_moments_md
from analysis.stiffness import solve

anastruct = pytest.importorskip("anastruct")

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE
EI = 4.0e4  # kNm2


@st.composite
def strips(draw: st.DrawFn) -> tuple[list[float], Restraint, Restraint, list[Load]]:
    n = draw(st.integers(2, 6))
    spans = [draw(st.integers(20, 90)) * 100.0 for _ in range(n)]  # 2 .. 9 m
    left = draw(st.sampled_from([PIN, FIX]))
    right = draw(st.sampled_from([PIN, FIX]))
    cant = draw(st.sampled_from(["none", "left", "right"]))
    if cant == "left":
        spans.insert(0, draw(st.integers(5, 25)) * 100.0)
        left = FREE
    elif cant == "right":
        spans.append(draw(st.integers(5, 25)) * 100.0)
        right = FREE
    loads: list[Load] = []
    for j, length in enumerate(spans):
        loads.append(UniformLoad(j, draw(st.integers(2, 30)) * 0.5))
        if draw(st.booleans()):
            a = draw(st.integers(1, 9)) * length / 10
            loads.append(PointLoad(j, draw(st.integers(5, 60)) * 1.0, a))
        if draw(st.booleans()):
            c = draw(st.integers(0, 5)) * length / 10
            loads.append(UniformLoad(j, draw(st.integers(1, 20)) * 0.5, c, c + 0.4 * length))
    return spans, left, right, loads


def _anastruct(spans: list[float], left: Restraint, right: Restraint, loads: list[Load]):
    """Node moments (sagging +), the greatest sagging moment per segment, reactions."""
    from anastruct import SystemElements

    x_nodes = np.concatenate([[0.0], np.cumsum(spans)])
    cuts: list[list[float]] = [[0.0, s] for s in spans]  # breakpoints within each segment
    for ld in loads:
        if isinstance(ld, PointLoad):
            cuts[ld.segment].append(ld.a_mm)
        else:
            cuts[ld.segment] += [ld.start_mm or 0.0, ld.end_mm or spans[ld.segment]]
    ss = SystemElements(EI=EI, EA=1.0e9, mesh=100)
    elements: list[tuple[int, float, float]] = []  # (segment, x0, x1) in mm
    for j, c in enumerate(cuts):
        pts = sorted({round(v, 6) for v in c})
        for a, b in itertools.pairwise(pts):
            x0, x1 = x_nodes[j] + a, x_nodes[j] + b
            ss.add_element([[x0 / 1000, 0.0], [x1 / 1000, 0.0]])
            elements.append((j, a, b))
    node_at = {}  # global x (mm, rounded) -> anastruct node id
    for e, (j, a, b) in enumerate(elements, start=1):
        node_at.setdefault(round(x_nodes[j] + a, 3), e)
        node_at.setdefault(round(x_nodes[j] + b, 3), e + 1)
    restraints = [PIN] * len(x_nodes)
    restraints[0], restraints[-1] = left, right
    has_fixed = FIX in restraints
    first_pin = True
    for i, r in enumerate(restraints):
        nid = node_at[round(x_nodes[i], 3)]
        if r is FIX:
            ss.add_support_fixed(nid)
        elif r is PIN:
            if first_pin and not has_fixed:
                ss.add_support_hinged(nid)
            else:
                ss.add_support_roll(nid)
            first_pin = False
    q_by_element: dict[int, float] = {}  # anastruct keeps the last q_load per element: sum first
    for ld in loads:
        if isinstance(ld, PointLoad):
            ss.point_load(node_at[round(x_nodes[ld.segment] + ld.a_mm, 3)], Fy=-ld.p_kn)
        else:
            c = ld.start_mm or 0.0
            d = ld.end_mm or spans[ld.segment]
            for e, (j, a, b) in enumerate(elements, start=1):
                if j == ld.segment and a >= c - 1e-6 and b <= d + 1e-6:
                    q_by_element[e] = q_by_element.get(e, 0.0) + ld.w_kn_per_m
    for e, q in sorted(q_by_element.items()):
        ss.q_load(q=-q, element_id=e, direction="y")
    ss.solve()
    node_m = np.zeros(len(x_nodes))
    seg_max = np.full(len(spans), -np.inf)
    for e, (j, a, b) in enumerate(elements, start=1):
        m = -np.asarray(ss.get_element_results(e, verbose=True)["M"])  # hogging + in anastruct
        seg_max[j] = max(seg_max[j], m.max())
        if a == 0.0:
            node_m[j] = m[0]
        if b == spans[j]:
            node_m[j + 1] = m[-1]
    reactions = np.zeros(len(x_nodes))
    for i, r in enumerate(restraints):
        if r is not FREE:
            nid = node_at[round(x_nodes[i], 3)]
            reactions[i] = -ss.get_node_results_system(nid)["Fy"]
    return node_m, seg_max, reactions


@settings(max_examples=40, deadline=None)
@given(strips())
def test_stiffness_moment_distribution_and_anastruct_agree(
    data: tuple[list[float], Restraint, Restraint, list[Load]],
) -> None:
    spans, left, right, loads = data
    model = BeamModel.from_spans(spans, left, right, ei_knm2=EI, station_spacing_fraction=1 / 200)
    res = solve(model, [loads])
    ours_nodes = res.node_moment_knm[0]
    ours_span = np.array(
        [res.m_knm[0, res.stations.of_segment(j)].max() for j in range(len(spans))]
    )
    scale = np.abs(res.m_knm).max()

    # moment distribution: support moments, and span moments by statics on them
    md = np.array(support_moments_md(spans, left, right, loads))
    np.testing.assert_allclose(ours_nodes, md, atol=1e-7 * scale)
    for j, length in enumerate(spans):
        own = [ld for ld in loads if ld.segment == j]
        xs = np.linspace(0.0, length, 401)
        md_max = max(moment_in_segment(length, md[j], md[j + 1], own, x) for x in xs)
        assert ours_span[j] == pytest.approx(md_max, abs=2e-4 * scale)  # both sampled

    # anastruct: within 0.5 % of the strip's largest moment / reaction
    a_nodes, a_span, a_react = _anastruct(spans, left, right, loads)
    np.testing.assert_allclose(ours_nodes, a_nodes, atol=0.005 * scale)
    np.testing.assert_allclose(ours_span, a_span, atol=0.005 * scale)
    np.testing.assert_allclose(
        res.reactions_kn[0], a_react, atol=0.005 * np.abs(res.reactions_kn).max()
    )
