"""Continuous beams of 2 to 5 equal spans under uniform load: published coefficients.

Sources:

* [Hicks] T. G. Hicks, *Civil Engineering Formulas*, McGraw-Hill, Table 2.1 "Uniformly
  loaded continuous beams over equal spans" (read in a digital-library copy, p. 50). All spans
  loaded, pinned ends: support moments 1/8; 1/10; 3/28, 2/28; 4/38, 3/38 (x wL^2); greatest
  span moments 0.0703; 0.080, 0.025; 0.0772, 0.0364; 0.0779, 0.0332, 0.0461 (x wL^2);
  reactions 3/8, 10/8; 4/10, 11/10; 11/28, 32/28, 26/28; 15/38, 43/38, 37/38 (x wL).
* [PD] piping-designer.com beam-formula pages (reproducing the usual beam-diagram tables):
  "Two span ... uniform load on one span" (M_max = 49/512 wL^2, support wL^2/16,
  R1 = 7/16 wL); "Three span ... uniform load on two spans at each end" (R1 = 0.450 wL,
  M_max = 0.1013 wL^2); "Three span ... uniform load on two spans to one side"
  (R1 = 0.383 wL, so M_B = 0.383 - 0.5 = -0.117 wL^2; M_C = -0.0333 wL^2);
  "Four span ... uniform load on two spans" (spans 1 and 3: M_1 = 0.0996 wL^2, the other
  loaded span 0.0805 wL^2, printed there as "0.805"); "Four span ... uniform load on three
  spans" (spans 1, 2, 4: M_B = -0.1205 wL^2).
* The usual handbook "maximum moments for imposed load" coefficients (e.g. the continuous
  beam tables in Reynolds' Reinforced Concrete Designer's Handbook), from memory: 3 spans
  0.101 / 0.075 sagging, -0.117 hogging; 4 spans -0.107 at the middle support; 5 spans
  0.100 / 0.079 / 0.086 sagging, -0.120 / -0.111 hogging.

The pattern cases are the imposed-load-only worst patterns: no permanent load, the uniform
load w on every subset of spans (``PatternRule.ALL_SUBSETS``, characteristic combination
with gamma = 1), the value being the worst over subsets. Every coefficient is cross-checked
with the independent moment distribution in ``analysis.moment_distribution``.
"""

from __future__ import annotations

import numpy as np
import pytest

from analysis.arrangements import ActionFactors, Combination, PatternRule
from analysis.beam import BeamModel, Restraint, UniformLoad
from analysis.envelope import StripEnvelope, analyse_envelope
from analysis.moment_distribution import moment_in_segment, support_moments_md

L_MM = 6000.0
W = 10.0  # kN/m
WL2 = W * (L_MM / 1000.0) ** 2
WL = W * L_MM / 1000.0
TOL_4DP = 0.5e-4  # tables printed to 4 decimals
TOL_3DP = 0.5e-3  # tables printed to 3 decimals
PIN = Restraint.PINNED


def _model(n: int) -> BeamModel:
    return BeamModel.from_spans([L_MM] * n)


def _all_loaded(n: int) -> StripEnvelope:
    g = [UniformLoad(i, W) for i in range(n)]
    return analyse_envelope(
        _model(n), g, [], ActionFactors(), Combination.CHARACTERISTIC, PatternRule.ALL_SUBSETS
    )


def _pattern(n: int) -> StripEnvelope:
    q = [UniformLoad(i, W) for i in range(n)]
    return analyse_envelope(
        _model(n), [], q, ActionFactors(), Combination.CHARACTERISTIC, PatternRule.ALL_SUBSETS
    )


def _md_moments(n: int, loaded: tuple[int, ...]) -> tuple[float, ...]:
    return support_moments_md([L_MM] * n, PIN, PIN, [UniformLoad(i, W) for i in loaded])


def _md_span_max(n: int, loaded: tuple[int, ...], span: int) -> float:
    """Greatest sagging moment in a span by statics on the moment-distribution moments."""
    m = _md_moments(n, loaded)
    loads = [UniformLoad(span, W)] if span in loaded else []
    xs = np.linspace(0.0, L_MM, 6001)
    return max(moment_in_segment(L_MM, m[span], m[span + 1], loads, x) for x in xs)


# --- all spans loaded: Hicks Table 2.1 -------------------------------------------------------

HICKS = {
    # n: (support moments / wL^2 at interior supports, span maxima / wL^2, reactions / wL)
    2: ((-1 / 8,), (0.0703, 0.0703), (3 / 8, 10 / 8, 3 / 8)),
    3: ((-1 / 10, -1 / 10), (0.080, 0.025, 0.080), (4 / 10, 11 / 10, 11 / 10, 4 / 10)),
    4: (
        (-3 / 28, -2 / 28, -3 / 28),
        (0.0772, 0.0364, 0.0364, 0.0772),
        (11 / 28, 32 / 28, 26 / 28, 32 / 28, 11 / 28),
    ),
    5: (
        (-4 / 38, -3 / 38, -3 / 38, -4 / 38),
        (0.0779, 0.0332, 0.0461, 0.0332, 0.0779),
        (15 / 38, 43 / 38, 37 / 38, 37 / 38, 43 / 38, 15 / 38),
    ),
}


@pytest.mark.parametrize("n", sorted(HICKS))
def test_hicks_table_2_1_support_moments(n: int) -> None:
    supports, _, _ = HICKS[n]
    env = _all_loaded(n)
    got = np.array([s.m_min_knm for s in env.support_summaries()]) / WL2
    np.testing.assert_allclose(got[1:-1], supports, atol=1e-9)  # exact fractions in Hicks
    assert got[0] == 0.0 and got[-1] == 0.0  # pinned ends
    md = np.array(_md_moments(n, tuple(range(n)))) / WL2
    np.testing.assert_allclose(md[1:-1], supports, atol=1e-9)


@pytest.mark.parametrize("n", sorted(HICKS))
def test_hicks_table_2_1_span_moments(n: int) -> None:
    _, spans, _ = HICKS[n]
    env = _all_loaded(n)
    got = np.array([s.m_max_knm for s in env.span_summaries()]) / WL2
    np.testing.assert_allclose(got, spans, atol=TOL_4DP)
    md = [_md_span_max(n, tuple(range(n)), j) / WL2 for j in range(n)]
    np.testing.assert_allclose(md, spans, atol=TOL_4DP)


@pytest.mark.parametrize("n", sorted(HICKS))
def test_hicks_table_2_1_reactions(n: int) -> None:
    _, _, reactions = HICKS[n]
    env = _all_loaded(n)
    np.testing.assert_allclose(env.reactions_max_kn / WL, reactions, atol=1e-9)


def test_hicks_table_2_1_shears_three_spans() -> None:
    # Hicks Table 2.1, 3 spans: shear each side of the first interior support 6/10 and 5/10 wL.
    env = _all_loaded(3)
    st = env.stations
    end_of_span_1 = st.of_segment(0).stop - 1
    start_of_span_2 = st.of_segment(1).start
    assert env.v_min_kn[end_of_span_1] / WL == pytest.approx(-0.6, abs=1e-9)
    assert env.v_max_kn[start_of_span_2] / WL == pytest.approx(0.5, abs=1e-9)


def test_three_moment_location_of_peak_two_spans() -> None:
    # Hicks Table 2.1: the span maximum of two equal spans lies 0.375 L from the end support.
    env = _all_loaded(2)
    s = env.span_summaries()[0]
    assert s.x_mm / L_MM == pytest.approx(0.375, abs=1e-6)
    assert s.m_max_knm / WL2 == pytest.approx(9 / 128, abs=1e-9)  # refined between stations


# --- imposed load only, worst pattern ---------------------------------------------------------


def test_pd_two_spans_one_span_loaded() -> None:
    # [PD] two spans, one span loaded: M_max = 49/512 wL^2; all loaded: -wL^2/8 at the support.
    env = _pattern(2)
    spans = env.span_summaries()
    assert spans[0].m_max_knm / WL2 == pytest.approx(49 / 512, abs=1e-9)
    assert spans[0].governing.loaded_segments == (0,)
    assert env.support_summaries()[1].m_min_knm / WL2 == pytest.approx(-1 / 8, abs=1e-9)
    # [PD]: end reaction 7/16 wL with the adjacent span loaded alone
    assert env.reactions_max_kn[0] / WL == pytest.approx(7 / 16, abs=1e-9)
    assert _md_span_max(2, (0,), 0) / WL2 == pytest.approx(49 / 512, abs=1e-6)


def test_pattern_three_spans() -> None:
    # 0.101 end span (spans 1 and 3 loaded; [PD] 0.1013), 0.075 centre span (centre span
    # only; handbook value, from memory), -0.117 at an interior support (spans 1 and 2; [PD]).
    env = _pattern(3)
    spans = env.span_summaries()
    assert spans[0].m_max_knm / WL2 == pytest.approx(0.1013, abs=TOL_4DP)
    assert spans[0].governing.label == "characteristic, Q on spans 1, 3"
    assert spans[1].m_max_knm / WL2 == pytest.approx(0.075, abs=TOL_3DP)
    assert spans[1].governing.label == "characteristic, Q on span 2"
    sup = env.support_summaries()
    assert sup[1].m_min_knm / WL2 == pytest.approx(-0.117, abs=TOL_3DP)
    assert sup[1].governing_m_min.loaded_segments == (0, 1)
    # cross-checks by moment distribution
    assert _md_span_max(3, (0, 2), 0) / WL2 == pytest.approx(0.1013, abs=TOL_4DP)
    assert _md_span_max(3, (1,), 1) / WL2 == pytest.approx(0.075, abs=TOL_3DP)
    assert _md_moments(3, (0, 1))[1] / WL2 == pytest.approx(-0.117, abs=TOL_3DP)
    # [PD] two spans to one side loaded: moment at the far interior support -0.0333 wL^2
    assert _md_moments(3, (0, 1))[2] / WL2 == pytest.approx(-0.0333, abs=TOL_4DP)


def test_pattern_four_spans() -> None:
    # [PD]: end span 0.0996 (spans 1, 3), interior span 0.0805 (spans 2, 4), first interior
    # support -0.1205 (spans 1, 2, 4); middle support -0.107 (handbook, from memory).
    env = _pattern(4)
    spans = env.span_summaries()
    assert spans[0].m_max_knm / WL2 == pytest.approx(0.0996, abs=TOL_4DP)
    assert spans[1].m_max_knm / WL2 == pytest.approx(0.0805, abs=TOL_4DP)
    sup = env.support_summaries()
    assert sup[1].m_min_knm / WL2 == pytest.approx(-0.1205, abs=TOL_4DP)
    assert sup[1].governing_m_min.label == "characteristic, Q on spans 1, 2, 4"
    assert sup[2].m_min_knm / WL2 == pytest.approx(-0.107, abs=TOL_3DP)
    assert _md_span_max(4, (0, 2), 0) / WL2 == pytest.approx(0.0996, abs=TOL_4DP)
    assert _md_span_max(4, (1, 3), 1) / WL2 == pytest.approx(0.0805, abs=TOL_4DP)
    assert _md_moments(4, (0, 1, 3))[1] / WL2 == pytest.approx(-0.1205, abs=TOL_4DP)


def test_pattern_five_spans_from_memory() -> None:
    # Handbook imposed-load coefficients, from memory: 0.100, 0.079, 0.086; -0.120, -0.111.
    env = _pattern(5)
    spans = [s.m_max_knm / WL2 for s in env.span_summaries()]
    np.testing.assert_allclose(spans, [0.100, 0.079, 0.086, 0.079, 0.100], atol=TOL_3DP)
    sup = [s.m_min_knm / WL2 for s in env.support_summaries()]
    np.testing.assert_allclose(sup[1:-1], [-0.120, -0.111, -0.111, -0.120], atol=TOL_3DP)
    assert _md_span_max(5, (0, 2, 4), 2) / WL2 == pytest.approx(0.086, abs=TOL_3DP)
    assert _md_moments(5, (0, 1, 3))[1] / WL2 == pytest.approx(-0.120, abs=TOL_3DP)


def test_uk_alternate_rule_misses_adjacent_span_hogging() -> None:
    # UK NA to EN 1992-1-1 5.1.3(1): all-and-alternate spans only. Imposed load alone on
    # three spans gives -0.100 wL^2 at the interior support (all loaded, Hicks), not the
    # -0.117 of two adjacent spans loaded ([PD]), which that rule does not consider.
    q = [UniformLoad(i, W) for i in range(3)]
    rule = PatternRule.ALL_AND_ALTERNATE
    env = analyse_envelope(_model(3), [], q, ActionFactors(), Combination.CHARACTERISTIC, rule)
    assert env.support_summaries()[1].m_min_knm / WL2 == pytest.approx(-0.100, abs=1e-9)
    assert env.span_summaries()[0].m_max_knm / WL2 == pytest.approx(0.1013, abs=TOL_4DP)
