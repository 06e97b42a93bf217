"""Envelopes against brute force: every arrangement solved on its own.

Sources: EN 1990:2002 Eq. (6.10), (6.10a), (6.10b), (6.14b), (6.16b) with the UK NA factors
(gamma_G = 1.35, gamma_Q = 1.5, xi = 0.925, psi_0 = 0.7, psi_2 = 0.3: EN 1990 Table A1.2(B)
and Table A1.1); the UK NA to EN 1992-1-1 5.1.3(1) arrangements (all spans, and alternate
spans, loaded with gamma_G Gk + gamma_Q Qk, other spans gamma_G Gk); EN 1992-1-1 5.3.2.2(4)
support moment reduction Delta M = F_Ed,sup t / 8. The brute force (all 2^n subsets of
loaded segments, each solved as its own load case) is the outside reference for the
superposition; statics (wL^2/8) for the single-span checks.
"""

from __future__ import annotations

import dataclasses
import itertools

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis.arrangements import (
    ActionFactors,
    Combination,
    PatternRule,
    alternate_sets,
    equations,
    make_arrangement,
)
from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.envelope import StripEnvelope, analyse_envelope
from analysis.stiffness import CaseResults, solve

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE
F = ActionFactors()


@st.composite
def strips_with_actions(
    draw: st.DrawFn, max_segments: int = 6
) -> tuple[BeamModel, list[Load], list[Load]]:
    left_cant = draw(st.booleans())
    right_cant = draw(st.booleans())
    n_spans = draw(st.integers(1, max_segments - int(left_cant) - int(right_cant)))
    spans = [draw(st.integers(40, 180)) * 50.0 for _ in range(n_spans)]
    left = FREE if left_cant else draw(st.sampled_from([PIN, FIX]))
    right = FREE if right_cant else draw(st.sampled_from([PIN, FIX]))
    if left_cant:
        spans.insert(0, draw(st.integers(10, 50)) * 50.0)
    if right_cant:
        spans.append(draw(st.integers(10, 50)) * 50.0)
    if n_spans == 1 and left_cant and right_cant:
        spans, left, right = spans[:2], FREE, FIX
    elif n_spans == 1 and (left_cant or right_cant) and FIX not in (left, right):
        left, right = (FREE, FIX) if left_cant else (FIX, FREE)
        spans = spans[:2]
    model = BeamModel.from_spans(spans, left, right, support_width_mm=300.0)
    g: list[Load] = [UniformLoad(j, draw(st.floats(3.0, 9.0))) for j in range(len(spans))]
    q: list[Load] = []
    for j, length in enumerate(spans):
        if draw(st.booleans()) or j == 0:
            q.append(UniformLoad(j, draw(st.floats(1.0, 10.0))))
        if draw(st.booleans()):
            q.append(PointLoad(j, draw(st.floats(1.0, 30.0)), draw(st.floats(0.0, 1.0)) * length))
        if draw(st.booleans()):
            c = draw(st.floats(0.0, 0.7)) * length
            q.append(UniformLoad(j, draw(st.floats(1.0, 8.0)), c, c + 0.3 * length))
    return model, g, q


def _scaled(load: Load, factor: float) -> Load:
    if isinstance(load, PointLoad):
        return dataclasses.replace(load, p_kn=load.p_kn * factor)
    return dataclasses.replace(load, w_kn_per_m=load.w_kn_per_m * factor)


def _brute(
    model: BeamModel,
    g: list[Load],
    q: list[Load],
    combination: Combination,
    subsets: list[tuple[int, ...]],
) -> tuple[CaseResults, list[tuple[str, tuple[int, ...]]]]:
    """Every (equation, subset) as its own case; unloaded Q kept at zero intensity so that
    the stations are the same as the envelope's."""
    cases, keys = [], []
    for eq in equations(combination, F):
        for sub in subsets:
            loads = [_scaled(ld, eq.gamma_g) for ld in g]
            loads += [_scaled(ld, eq.gamma_q if ld.segment in sub else 0.0) for ld in q]
            cases.append(loads)
            keys.append((eq.name, sub))
    return solve(model, cases), keys


def _all_subsets(n: int) -> list[tuple[int, ...]]:
    return [s for r in range(n + 1) for s in itertools.combinations(range(n), r)]


def _check_bounds(env: StripEnvelope, res: CaseResults, tight: bool) -> None:
    assert np.array_equal(env.stations.x_mm, res.x_mm)
    scale_m = 1.0 + np.abs(res.m_knm).max()
    scale_v = 1.0 + np.abs(res.v_kn).max()
    tol_m, tol_v = 1e-9 * scale_m, 1e-9 * scale_v
    assert np.all(res.m_knm <= env.m_max_knm + tol_m)
    assert np.all(res.m_knm >= env.m_min_knm - tol_m)
    assert np.all(res.v_kn <= env.v_max_kn + tol_v)
    assert np.all(res.v_kn >= env.v_min_kn - tol_v)
    assert np.all(res.reactions_kn <= env.reactions_max_kn + tol_v)
    assert np.all(res.reactions_kn >= env.reactions_min_kn - tol_v)
    if tight:  # the envelope is attained by one of the arrangements
        np.testing.assert_allclose(res.m_knm.max(axis=0), env.m_max_knm, atol=tol_m)
        np.testing.assert_allclose(res.m_knm.min(axis=0), env.m_min_knm, atol=tol_m)
        np.testing.assert_allclose(res.v_kn.max(axis=0), env.v_max_kn, atol=tol_v)
        np.testing.assert_allclose(res.v_kn.min(axis=0), env.v_min_kn, atol=tol_v)
        np.testing.assert_allclose(res.reactions_kn.max(axis=0), env.reactions_max_kn, atol=tol_v)
        np.testing.assert_allclose(res.node_moment_knm.min(axis=0), env.node_m_min_knm, atol=tol_m)


@settings(max_examples=40, deadline=None)
@given(strips_with_actions(), st.sampled_from(list(Combination)))
def test_full_envelope_equals_brute_force_over_all_subsets(
    data: tuple[BeamModel, list[Load], list[Load]], combination: Combination
) -> None:
    model, g, q = data
    env = analyse_envelope(model, g, q, F, combination, PatternRule.ALL_SUBSETS)
    res, keys = _brute(model, g, q, combination, _all_subsets(model.n_segments))
    _check_bounds(env, res, tight=True)
    if env.deflection_max_mm is not None:
        np.testing.assert_allclose(
            res.deflection_mm.max(axis=0),
            env.deflection_max_mm,
            atol=1e-9 * (1 + np.abs(res.deflection_mm).max()),
        )
    # The governing arrangement reported at a station attains the envelope there.
    rows = {k: i for i, k in enumerate(keys)}
    for i in range(0, len(env.stations), 7):
        for kind, arr in (("m_max", res.m_knm), ("m_min", res.m_knm), ("v_max", res.v_kn)):
            gov = env.governing(kind, i)  # type: ignore[arg-type]
            value = {"m_max": env.m_max_knm, "m_min": env.m_min_knm, "v_max": env.v_max_kn}[kind]
            assert arr[rows[(gov.equation, gov.loaded_segments)], i] == pytest.approx(
                value[i], abs=1e-9 * (1 + np.abs(arr).max())
            )


@settings(max_examples=40, deadline=None)
@given(strips_with_actions(), st.sampled_from([Combination.EQ_6_10, Combination.EQ_6_10AB]))
def test_uk_alternate_rule_matches_its_three_sets_and_lies_inside_full(
    data: tuple[BeamModel, list[Load], list[Load]], combination: Combination
) -> None:
    model, g, q = data
    uk = analyse_envelope(model, g, q, F, combination, PatternRule.ALL_AND_ALTERNATE)
    full = analyse_envelope(model, g, q, F, combination, PatternRule.ALL_SUBSETS)
    sets = list(alternate_sets(model.n_segments))
    res, _ = _brute(model, g, q, combination, sets)
    _check_bounds(uk, res, tight=True)
    tol = 1e-9 * (1.0 + np.abs(full.m_min_knm).max() + np.abs(full.v_min_kn).max())
    assert np.all(uk.m_max_knm <= full.m_max_knm + tol)
    assert np.all(uk.m_min_knm >= full.m_min_knm - tol)
    assert np.all(uk.v_max_kn <= full.v_max_kn + tol)
    assert np.all(uk.v_min_kn >= full.v_min_kn - tol)
    assert np.all(uk.reactions_max_kn <= full.reactions_max_kn + tol)


def test_alternate_sets_include_cantilevers() -> None:
    # UK NA 5.1.3(1) with cantilevers counted as segments: left cantilever + 3 spans.
    assert alternate_sets(4) == ((0, 1, 2, 3), (0, 2), (1, 3))
    assert alternate_sets(1) == ((0,), ())


@pytest.mark.parametrize(
    ("gk", "qk", "governs"),
    [
        (6.0, 2.5, "6.10b"),  # the usual UK case: "(6.10b) governs" (UK worked example)
        (10.0, 1.0, "6.10a"),  # heavy permanent, light imposed load
    ],
)
def test_610a_610b_single_span(gk: float, qk: float, governs: str) -> None:
    n_a = 1.35 * gk + 1.5 * 0.7 * qk  # EN 1990 Eq. (6.10a)
    n_b = 0.925 * 1.35 * gk + 1.5 * qk  # EN 1990 Eq. (6.10b)
    span = 5000.0
    model = BeamModel.from_spans([span])
    env = analyse_envelope(
        model,
        [UniformLoad(0, gk)],
        [UniformLoad(0, qk)],
        F,
        Combination.EQ_6_10AB,
        PatternRule.ALL_AND_ALTERNATE,
    )
    s = env.span_summaries()[0]
    assert s.m_max_knm == pytest.approx(max(n_a, n_b) * 5.0**2 / 8, rel=1e-12)  # wL^2/8
    assert s.governing.equation == governs
    assert s.governing.label == f"{governs}, Q on span 1"
    assert env.reactions_max_kn[0] == pytest.approx(max(n_a, n_b) * 2.5, rel=1e-12)
    # least moment: the G-only arrangement does not exist for one span under the UK rule
    # (its alternate sets are "span 1" and "none"): "none" gives gamma_G G only.
    assert s.m_min_knm == pytest.approx(0.0)
    mid = env.stations.find(0, span / 2)
    assert env.m_min_knm[mid] == pytest.approx(min(1.35, 0.925 * 1.35) * gk * 25 / 8, rel=1e-12)


def test_quasi_permanent_and_characteristic_single_span() -> None:
    # EN 1990 Eq. (6.14b) Gk + Qk and (6.16b) Gk + psi_2 Qk; deflection 5wL^4/(384EI)
    # (standard beam tables, from memory).
    model = BeamModel.from_spans([6000.0], ei_knm2=3.0e4)
    g, q = [UniformLoad(0, 5.0)], [UniformLoad(0, 4.0)]
    for comb, w in ((Combination.CHARACTERISTIC, 9.0), (Combination.QUASI_PERMANENT, 6.2)):
        env = analyse_envelope(model, g, q, F, comb, PatternRule.ALL_SUBSETS)
        mid = env.stations.find(0, 3000.0)
        assert env.m_max_knm[mid] == pytest.approx(w * 36 / 8, rel=1e-12)
        assert env.deflection_max_mm is not None
        assert env.deflection_max_mm[mid] == pytest.approx(
            5 * w * 6.0**4 / (384 * 3.0e4) * 1e3, rel=1e-12
        )
        assert env.span_summaries()[0].governing.equation == comb.value
    uls = analyse_envelope(model, g, q, F, Combination.EQ_6_10, PatternRule.ALL_SUBSETS)
    assert uls.deflection_max_mm is None  # deflection is given for SLS combinations only


def test_summaries_of_a_strip_with_a_cantilever() -> None:
    model = BeamModel.from_spans([1500.0, 5000.0, 4500.0], FREE, PIN, support_width_mm=300.0)
    g = [UniformLoad(j, 6.0) for j in range(3)]
    q = [UniformLoad(j, 3.0) for j in range(3)]
    env = analyse_envelope(model, g, q, F, Combination.EQ_6_10AB, PatternRule.ALL_SUBSETS)
    spans = env.span_summaries()
    assert [s.name for s in spans] == ["left cantilever", "span 1", "span 2"]
    st_ = env.stations
    for s in spans:
        sl = st_.of_segment(s.segment)
        assert s.m_max_knm >= env.m_max_knm[sl].max() - 1e-12  # refined between stations
        assert s.m_max_knm <= env.m_max_knm[sl].max() * 1.003 + 1e-12  # by < 0.25 % at L/20
        assert s.v_start_max_kn == env.v_max_kn[sl.start]
        assert s.v_end_min_kn == env.v_min_kn[sl.stop - 1]
    # span 1 sags most with the cantilever unloaded and span 1 loaded
    assert spans[1].governing.label == "6.10b, Q on span 1"
    sups = env.support_summaries()
    assert [s.node for s in sups] == [1, 2, 3]  # the free tip is not a support
    root = sups[0]
    # cantilever root: -w a^2/2 with the cantilever loaded, w = 1.35 G + 1.05 Q or 1.25 G + 1.5 Q
    w_cant = max(1.35 * 6 + 1.5 * 0.7 * 3, 0.925 * 1.35 * 6 + 1.5 * 3)
    assert root.m_min_knm == pytest.approx(-w_cant * 1.5**2 / 2, rel=1e-12)
    assert "left cantilever" in root.governing_m_min.label
    # EN 1992-1-1 5.3.2.2(4): Delta M = F_Ed,sup t / 8 with the reaction of the same arrangement
    for s in sups:
        if s.m_min_reduced_knm is not None:
            assert s.delta_m_knm == pytest.approx(s.reaction_for_m_min_kn * 0.3 / 8, rel=1e-12)
            assert s.m_min_reduced_knm == pytest.approx(s.m_min_knm + s.delta_m_knm, rel=1e-12)
    assert sups[-1].m_min_reduced_knm is None and sups[-1].delta_m_knm == 0.0  # end support
    # face moments are the envelope at the face stations
    i = st_.find(1, 150.0)
    assert root.m_right_face_knm == env.m_min_knm[i]
    j = st_.find(0, 1500.0 - 150.0)
    assert root.m_left_face_knm == env.m_min_knm[j]
    assert sups[-1].m_right_face_knm is None


def test_bad_arguments() -> None:
    model = BeamModel.from_spans([4000.0, 4000.0])
    g = [UniformLoad(0, 1.0)]
    with pytest.raises(ValueError, match="0 < delta <= 1"):
        analyse_envelope(model, g, [], F, Combination.EQ_6_10, PatternRule.ALL_SUBSETS, 1.2)
    with pytest.raises(TypeError, match="ActionFactors"):
        analyse_envelope(model, g, [], None, Combination.EQ_6_10, PatternRule.ALL_SUBSETS)  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="variable on segment 5, load 0: segment 5 does not"):
        analyse_envelope(
            model, g, [UniformLoad(5, 1.0)], F, Combination.EQ_6_10, PatternRule.ALL_SUBSETS
        )
    env = analyse_envelope(model, g, [], F, Combination.EQ_6_10, PatternRule.ALL_SUBSETS)
    with pytest.raises(ValueError, match="kind must be one of"):
        env.governing("m_mid", 0)  # type: ignore[arg-type]
    with pytest.raises(IndexError):
        env.governing("m_max", len(env.stations))
    with pytest.raises(ValueError):
        env.m_max_knm[0] = 0.0


@settings(max_examples=30, deadline=None)
@given(strips_with_actions(), st.sampled_from([1.0, 0.85, 0.7]), st.data())
def test_equilibrium_in_every_arrangement(
    data: tuple[BeamModel, list[Load], list[Load]], delta: float, pick: st.DataObject
) -> None:
    # Statics in each arrangement the envelope combines (redistributed or not): sum of
    # reactions = total factored load; M = 0 at pinned and free ends; the jump of V at an
    # interior support equals its reaction (no point load stands on a node here unless drawn).
    model, g, q = data
    env = analyse_envelope(
        model, g, q, F, Combination.EQ_6_10AB, PatternRule.ALL_AND_ALTERNATE, delta
    )
    st_ = env.stations
    n = model.n_segments
    subsets = list(alternate_sets(n)) + [tuple(sorted(pick.draw(st.sets(st.integers(0, n - 1)))))]
    for eq in equations(Combination.EQ_6_10AB, F):
        for sub in subsets:
            arr = make_arrangement(model, eq.name, sub)
            m, v = env.arrangement_values(arr)
            r = env.arrangement_reactions(arr)
            total = eq.gamma_g * _total(model, g) + eq.gamma_q * _total(
                model, [ld for ld in q if ld.segment in sub]
            )
            scale = 1.0 + abs(total)
            assert r.sum() == pytest.approx(total, abs=1e-9 * scale)
            for node, idx in ((0, 0), (n, len(st_) - 1)):
                if model.restraints[node] is not FIX:
                    assert m[idx] == pytest.approx(0.0, abs=1e-9 * scale)
            for node in range(1, n):
                on_node = sum(
                    eq.gamma_q * (ld.segment in sub) * ld.p_kn
                    for ld in q  # the permanent loads here are uniform
                    if isinstance(ld, PointLoad)
                    and (
                        (ld.segment == node and ld.a_mm <= 1e-6)
                        or (
                            ld.segment == node - 1
                            and ld.a_mm >= model.segment_length_mm(node - 1) - 1e-6
                        )
                    )
                )
                jump = v[st_.start[node]] - v[st_.start[node] - 1]
                assert jump == pytest.approx(r[node] - on_node, abs=1e-9 * scale)


def _total(model: BeamModel, loads: list[Load]) -> float:
    out = 0.0
    for ld in loads:
        if isinstance(ld, PointLoad):
            out += ld.p_kn
        else:
            length = model.segment_length_mm(ld.segment)
            c = 0.0 if ld.start_mm is None else ld.start_mm
            d = length if ld.end_mm is None else ld.end_mm
            out += ld.w_kn_per_m * (d - c) / 1000.0
    return out
