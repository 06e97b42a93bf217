"""Moment redistribution, EN 1992-1-1 5.5: support moments times delta, equilibrium kept.

Checks: the redistributed support moments are exactly delta times the elastic ones
(EN 1992-1-1 5.5(4) defines delta as that ratio); each load case stays in equilibrium with
its own loads (statics: sum of reactions, V jumps, V = dM/dx); statically determinate
moments (cantilever roots, pinned ends) do not change; redistribution is linear, so doing it
on the unit cases before superposition equals doing it on every arrangement (brute force).
Two equal spans with delta = 0.8 by statics: M_B = -0.1 wL^2, R_A = 0.4 wL, span maximum
0.08 wL^2 (the three-span elastic coefficients of Hicks, Civil Engineering Formulas,
Table 2.1, reached here by redistribution: a textbook illustration).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis.arrangements import ActionFactors, Combination, PatternRule
from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.envelope import analyse_envelope
from analysis.redistribution import check_delta, redistributable_nodes, redistribute
from analysis.stiffness import CaseResults, solve

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE


@st.composite
def strip_and_loads(draw: st.DrawFn) -> tuple[BeamModel, list[list[Load]]]:
    n = draw(st.integers(2, 5))
    spans = [draw(st.integers(40, 180)) * 50.0 for _ in range(n)]
    left = draw(st.sampled_from([PIN, FIX, FREE]))
    right = draw(st.sampled_from([PIN, FIX, FREE]))
    if left is FREE:
        spans.insert(0, draw(st.integers(10, 40)) * 50.0)
    if right is FREE:
        spans.append(draw(st.integers(10, 40)) * 50.0)
    model = BeamModel.from_spans(spans, left, right, support_width_mm=250.0)
    cases = []
    for _ in range(draw(st.integers(1, 3))):
        loads: list[Load] = []
        for j, length in enumerate(spans):
            if draw(st.booleans()):
                loads.append(UniformLoad(j, draw(st.floats(0.5, 20.0))))
            if draw(st.booleans()):
                loads.append(
                    PointLoad(j, draw(st.floats(1.0, 40.0)), length * draw(st.floats(0, 1)))
                )
        cases.append(loads)
    return model, cases


@settings(max_examples=40, deadline=None)
@given(strip_and_loads(), st.floats(0.7, 1.0))
def test_support_moments_scaled_and_equilibrium_kept(
    data: tuple[BeamModel, list[list[Load]]], delta: float
) -> None:
    model, cases = data
    el = solve(model, cases)
    rd = redistribute(el, model, delta)
    mask = redistributable_nodes(model)
    np.testing.assert_allclose(rd.node_moment_knm[:, mask], delta * el.node_moment_knm[:, mask])
    np.testing.assert_array_equal(rd.node_moment_knm[:, ~mask], el.node_moment_knm[:, ~mask])
    scale = 1.0 + np.abs(el.m_knm).max() + np.abs(el.v_kn).max()
    st_ = el.stations
    # same total reaction as the elastic case: equilibrium with the same loads
    np.testing.assert_allclose(
        rd.reactions_kn.sum(axis=1), el.reactions_kn.sum(axis=1), atol=1e-9 * scale
    )
    for j in range(model.n_segments):
        sl = st_.of_segment(j)
        x = st_.local_mm[sl] / 1000.0
        h = np.diff(x)
        ok = h > 0
        for k in range(len(cases)):
            m, v = rd.m_knm[k, sl], rd.v_kn[k, sl]
            np.testing.assert_allclose(
                np.diff(m)[ok], (0.5 * (v[:-1] + v[1:]) * h)[ok], atol=1e-8 * scale
            )
            # the change in moment is the straight line between the changes at the ends
            dm = rd.m_knm[k, sl] - el.m_knm[k, sl]
            d0 = rd.node_moment_knm[k, j] - el.node_moment_knm[k, j]
            d1 = rd.node_moment_knm[k, j + 1] - el.node_moment_knm[k, j + 1]
            np.testing.assert_allclose(dm, d0 + (d1 - d0) * x / x[-1], atol=1e-9 * scale)
    # V jumps at interior supports still equal the (new) reactions
    for node in range(1, model.n_segments):
        jump = rd.v_kn[:, st_.start[node]] - rd.v_kn[:, st_.start[node] - 1]
        pts = [
            sum(
                ld.p_kn
                for ld in loads
                if isinstance(ld, PointLoad)
                and (
                    (ld.segment == node and ld.a_mm <= 1e-6)
                    or (
                        ld.segment == node - 1
                        and ld.a_mm >= model.segment_length_mm(node - 1) - 1e-6
                    )
                )
            )
            for loads in cases
        ]
        np.testing.assert_allclose(
            jump, rd.reactions_kn[:, node] - np.array(pts), atol=1e-9 * scale
        )
    # deflection stays elastic
    np.testing.assert_array_equal(rd.deflection_mm, el.deflection_mm)


def test_two_spans_delta_08_by_statics() -> None:
    w, span = 10.0, 6000.0
    wl, wl2 = w * 6.0, w * 36.0
    model = BeamModel.from_spans(
        [span, span], support_width_mm=0.0, station_spacing_fraction=1 / 100
    )
    el = solve(model, [[UniformLoad(0, w), UniformLoad(1, w)]])
    rd = redistribute(el, model, 0.8)
    assert el.node_moment_knm[0, 1] == pytest.approx(-wl2 / 8, rel=1e-12)
    assert rd.node_moment_knm[0, 1] == pytest.approx(-0.1 * wl2, rel=1e-12)
    np.testing.assert_allclose(rd.reactions_kn[0], [0.4 * wl, 1.2 * wl, 0.4 * wl], rtol=1e-12)
    assert rd.m_knm[0].max() == pytest.approx(0.08 * wl2, rel=1e-12)  # at 0.4 L
    with pytest.raises(ValueError):
        rd.m_knm[0, 0] = 1.0


def test_cantilever_root_is_not_redistributed() -> None:
    model = BeamModel.from_spans([2000.0, 5000.0, 5000.0], FREE, FIX)
    assert redistributable_nodes(model).tolist() == [False, False, True, True]
    el = solve(model, [[UniformLoad(j, 5.0) for j in range(3)]])
    rd = redistribute(el, model, 0.7)
    assert rd.node_moment_knm[0, 1] == el.node_moment_knm[0, 1] == pytest.approx(-10.0)


def test_redistributing_unit_cases_equals_redistributing_each_arrangement() -> None:
    # Linearity: the envelope (which redistributes its unit cases) equals the brute-force
    # envelope of every subset redistributed on its own.
    model = BeamModel.from_spans([4000.0, 6500.0, 5000.0, 3000.0], PIN, FIX, support_width_mm=300.0)
    g = [UniformLoad(j, 6.0) for j in range(4)]
    q = [UniformLoad(j, 4.0) for j in range(4)] + [PointLoad(1, 15.0, 2500.0)]
    delta = 0.75
    env = analyse_envelope(
        model, g, q, ActionFactors(), Combination.EQ_6_10, PatternRule.ALL_SUBSETS, delta
    )
    cases = []
    for r in range(5):
        for sub in itertools.combinations(range(4), r):
            cases.append(
                [UniformLoad(j, 1.35 * 6.0) for j in range(4)]
                + [UniformLoad(j, 1.5 * 4.0 if j in sub else 0.0) for j in range(4)]
                + [PointLoad(1, 1.5 * 15.0 if 1 in sub else 0.0, 2500.0)]
            )
    brute: CaseResults = redistribute(solve(model, cases), model, delta)
    assert np.array_equal(brute.x_mm, env.stations.x_mm)
    np.testing.assert_allclose(brute.m_knm.max(axis=0), env.m_max_knm, atol=1e-9)
    np.testing.assert_allclose(brute.m_knm.min(axis=0), env.m_min_knm, atol=1e-9)
    np.testing.assert_allclose(brute.v_kn.max(axis=0), env.v_max_kn, atol=1e-9)
    np.testing.assert_allclose(brute.v_kn.min(axis=0), env.v_min_kn, atol=1e-9)
    np.testing.assert_allclose(brute.reactions_kn.max(axis=0), env.reactions_max_kn, atol=1e-9)
    # and the support moments of the envelope are delta times the elastic ones
    el = analyse_envelope(
        model, g, q, ActionFactors(), Combination.EQ_6_10, PatternRule.ALL_SUBSETS
    )
    np.testing.assert_allclose(env.node_m_min_knm[1:], delta * el.node_m_min_knm[1:], rtol=1e-12)


@pytest.mark.parametrize("bad", [0.0, -0.2, 1.01, float("nan"), float("inf")])
def test_delta_must_be_in_zero_one(bad: float) -> None:
    with pytest.raises(ValueError, match="0 < delta <= 1"):
        check_delta(bad)
    with pytest.raises(TypeError):
        check_delta("0.8")  # type: ignore[arg-type]
    assert check_delta(1) == 1.0
