"""Envelopes over restraint variants of one beam (``analyse_envelope_variants``).

Sources:
* brute force: each variant enveloped on its own (``analyse_envelope``, itself checked against
  every arrangement solved separately in test_analysis_envelope.py) and, independently, every
  (equation, loaded subset) of every variant solved as its own load case; the variant envelope
  is their elementwise max/min;
* single span under a UDL w, standard beam tables (e.g. the Steel Designers' Manual; from
  memory, the formulas are textbook statics): simply supported M = wL^2/8 at L/2, reactions
  wL/2, deflection 5wL^4/(384EI); propped cantilever (fixed-pinned) M_fixed = -wL^2/8,
  M_span = 9wL^2/128 at 3L/8 from the prop, reactions 5wL/8 (fixed) and 3wL/8 (prop);
* EN 1990:2002 Eq. (6.10a)/(6.10b) and (6.14b) with the UK NA factors (ActionFactors defaults).
The envelope of the fixed and pinned idealisations of a monolithic end: common practice.
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
    Arrangement,
    Combination,
    PatternRule,
    equations,
    make_arrangement,
)
from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.envelope import StripEnvelope, analyse_envelope, analyse_envelope_variants
from analysis.stiffness import solve
from detailer.strip_analysis import analyse_strip
from tests.strip_factory import build_project, strip_specs

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE
F = ActionFactors()
ARRAYS = (
    ("m_max_knm", np.maximum),
    ("m_min_knm", np.minimum),
    ("v_max_kn", np.maximum),
    ("v_min_kn", np.minimum),
    ("node_m_max_knm", np.maximum),
    ("node_m_min_knm", np.minimum),
    ("reactions_max_kn", np.maximum),
    ("reactions_min_kn", np.minimum),
)


def _released(model: BeamModel, ends: tuple[int, ...]) -> BeamModel:
    r = list(model.restraints)
    for e in ends:
        r[e] = PIN
    return dataclasses.replace(model, restraints=tuple(r))


def _two_span() -> tuple[BeamModel, BeamModel, list[Load], list[Load]]:
    fixed = BeamModel.from_spans([4500.0, 6000.0], FIX, PIN, support_width_mm=300.0)
    g: list[Load] = [UniformLoad(0, 6.0), UniformLoad(1, 7.0), PointLoad(1, 5.0, 2000.0)]
    q: list[Load] = [UniformLoad(0, 3.0), UniformLoad(1, 2.5, 1000.0, 4000.0)]
    return fixed, _released(fixed, (0,)), g, q


def _check_is_max_min(env: StripEnvelope, singles: list[StripEnvelope]) -> None:
    for s in singles:
        assert np.array_equal(s.stations.x_mm, env.stations.x_mm)
    for name, op in ARRAYS:
        expected = getattr(singles[0], name)
        for s in singles[1:]:
            expected = op(expected, getattr(s, name))
        np.testing.assert_array_equal(getattr(env, name), expected, err_msg=name)
    if singles[0].deflection_max_mm is not None:
        assert env.deflection_max_mm is not None and env.deflection_min_mm is not None
        d_max = np.max([s.deflection_max_mm for s in singles], axis=0)
        d_min = np.min([s.deflection_min_mm for s in singles], axis=0)
        np.testing.assert_array_equal(env.deflection_max_mm, d_max)
        np.testing.assert_array_equal(env.deflection_min_mm, d_min)
    else:
        assert env.deflection_max_mm is None


def _check_governing(env: StripEnvelope) -> None:
    """Every governing arrangement reproduces the envelope value it is reported for."""
    scale = 1e-9 * (1.0 + np.abs(env.m_min_knm).max() + np.abs(env.v_min_kn).max())
    values = {
        "m_max": env.m_max_knm,
        "m_min": env.m_min_knm,
        "v_max": env.v_max_kn,
        "v_min": env.v_min_kn,
    }
    for i in range(len(env.stations)):
        for kind, arr in values.items():
            gov = env.governing(kind, i)  # type: ignore[arg-type]
            assert gov.variant in env.variants
            m, v = env.arrangement_values(gov, np.array([i]))
            got = m[0] if kind.startswith("m") else v[0]
            assert got == pytest.approx(arr[i], abs=scale), (kind, i, gov.label)
    for node in range(len(env.model.node_x_mm)):
        for kind, arr in (("r_max", env.reactions_max_kn), ("r_min", env.reactions_min_kn)):
            gov = env.governing_at_node(kind, node)  # type: ignore[arg-type]
            assert env.arrangement_reactions(gov)[node] == pytest.approx(arr[node], abs=scale)


def _brute(models: list[BeamModel], g: list[Load], q: list[Load], comb: Combination):
    """Every (equation, loaded subset) of every model solved as its own load case."""
    n = models[0].n_segments
    subsets = [s for r in range(n + 1) for s in itertools.combinations(range(n), r)]
    cases = []
    for eq in equations(comb, F):
        for sub in subsets:
            loads = [_scaled(ld, eq.gamma_g) for ld in g]
            loads += [_scaled(ld, eq.gamma_q if ld.segment in sub else 0.0) for ld in q]
            cases.append(loads)
    return [solve(m, cases) for m in models]


def _scaled(load: Load, factor: float) -> Load:
    if isinstance(load, PointLoad):
        return dataclasses.replace(load, p_kn=load.p_kn * factor)
    return dataclasses.replace(load, w_kn_per_m=load.w_kn_per_m * factor)


# --- two spans, end A fixed or pinned ---------------------------------------------------


@pytest.mark.parametrize("pattern", list(PatternRule))
@pytest.mark.parametrize("delta", [1.0, 0.8])
def test_two_span_variants_are_the_max_min_of_the_single_envelopes(
    pattern: PatternRule, delta: float
) -> None:
    fixed, pinned, g, q = _two_span()
    args = (g, q, F, Combination.EQ_6_10AB, pattern, delta)
    env = analyse_envelope_variants([("A fixed", fixed), ("A pinned", pinned)], *args)
    singles = [analyse_envelope(fixed, *args), analyse_envelope(pinned, *args)]
    _check_is_max_min(env, singles)
    assert env.variants == ("A fixed", "A pinned")
    assert env.model is fixed and env.model_of("A pinned") is pinned
    assert env.redistribution_delta == delta and env.pattern is pattern
    _check_governing(env)
    # The two idealisations really differ: the fixed end hogs only when fixed, span 1 sags
    # more when pinned (so neither variant alone is the envelope).
    a_fixed, a_pinned = singles
    assert env.node_m_min_knm[0] == a_fixed.node_m_min_knm[0] < -1.0
    sl = env.stations.of_segment(0)
    assert env.m_max_knm[sl].max() == a_pinned.m_max_knm[sl].max() > a_fixed.m_max_knm[sl].max()


def test_two_span_variants_against_every_arrangement_solved_alone() -> None:
    fixed, pinned, g, q = _two_span()
    comb = Combination.EQ_6_10AB
    env = analyse_envelope_variants(
        [("A fixed", fixed), ("A pinned", pinned)], g, q, F, comb, PatternRule.ALL_SUBSETS
    )
    res = _brute([fixed, pinned], g, q, comb)
    for r in res:
        assert np.array_equal(r.x_mm, env.stations.x_mm)
    m = np.concatenate([r.m_knm for r in res])
    v = np.concatenate([r.v_kn for r in res])
    reac = np.concatenate([r.reactions_kn for r in res])
    tol = 1e-9 * (1.0 + np.abs(m).max() + np.abs(v).max())
    np.testing.assert_allclose(env.m_max_knm, m.max(axis=0), atol=tol)
    np.testing.assert_allclose(env.m_min_knm, m.min(axis=0), atol=tol)
    np.testing.assert_allclose(env.v_max_kn, v.max(axis=0), atol=tol)
    np.testing.assert_allclose(env.v_min_kn, v.min(axis=0), atol=tol)
    np.testing.assert_allclose(env.reactions_max_kn, reac.max(axis=0), atol=tol)
    np.testing.assert_allclose(env.reactions_min_kn, reac.min(axis=0), atol=tol)


# --- one span: propped cantilever and simply supported ----------------------------------


L_M, G_K, Q_K, EI = 6.0, 5.0, 3.0, 2.0e4
W = G_K + Q_K  # characteristic, EN 1990 Eq. (6.14b): Gk + Qk on the one span


def _one_span(comb: Combination = Combination.CHARACTERISTIC) -> StripEnvelope:
    fixed = BeamModel.from_spans([L_M * 1000.0], FIX, PIN, ei_knm2=EI)
    return analyse_envelope_variants(
        [("end A fixed", fixed), ("end A pinned", _released(fixed, (0,)))],
        [UniformLoad(0, G_K)],
        [UniformLoad(0, Q_K)],
        F,
        comb,
        PatternRule.ALL_SUBSETS,
    )


def test_single_span_beam_tables() -> None:
    fixed = BeamModel.from_spans([L_M * 1000.0], FIX, PIN, ei_knm2=EI)
    g, q = [UniformLoad(0, G_K)], [UniformLoad(0, Q_K)]
    alone = analyse_envelope(fixed, g, q, F, Combination.CHARACTERISTIC, PatternRule.ALL_SUBSETS)
    (prop,) = alone.span_summaries()
    assert prop.m_max_knm == pytest.approx(9 * W * L_M**2 / 128, rel=1e-9)  # 9wL^2/128
    assert prop.x_mm == pytest.approx(5 / 8 * L_M * 1000.0, abs=0.5)  # 3L/8 from the prop
    env = _one_span()
    (span,) = env.span_summaries()
    assert span.m_max_knm == pytest.approx(W * L_M**2 / 8, rel=1e-9)  # wL^2/8, pinned
    assert span.x_mm == pytest.approx(L_M * 500.0, abs=1e-6)
    assert span.governing.label == "characteristic, Q on span 1 (end A pinned)"
    a, b = env.support_summaries()
    assert a.m_min_knm == pytest.approx(-W * L_M**2 / 8, rel=1e-9)  # -wL^2/8, fixed
    assert a.governing_m_min.label == "characteristic, Q on span 1 (end A fixed)"
    assert a.restraint is FIX  # the first variant's model
    assert b.m_min_knm == pytest.approx(0.0, abs=1e-9)
    # Reactions: 5wL/8 at the fixed end (fixed), wL/2 at the prop (pinned); least with G only.
    assert a.reaction_max_kn == pytest.approx(5 * W * L_M / 8, rel=1e-9)
    assert b.reaction_max_kn == pytest.approx(W * L_M / 2, rel=1e-9)
    assert a.governing_reaction_max.variant == "end A fixed"
    assert b.governing_reaction_max.variant == "end A pinned"
    assert a.reaction_min_kn == pytest.approx(G_K * L_M / 2, rel=1e-9)
    assert b.reaction_min_kn == pytest.approx(3 * G_K * L_M / 8, rel=1e-9)
    # Shears at the ends: 5wL/8 (fixed) just right of A, -wL/2 (pinned) just left of B.
    assert span.v_start_max_kn == pytest.approx(5 * W * L_M / 8, rel=1e-9)
    assert span.v_end_min_kn == pytest.approx(-W * L_M / 2, rel=1e-9)
    # Deflection: the simply supported 5wL^4/(384EI) exceeds the propped wL^4/(185EI).
    assert env.deflection_max_mm is not None
    assert env.deflection_max_mm.max() == pytest.approx(
        5 * W * L_M**4 / (384 * EI) * 1000.0, rel=1e-9
    )
    _check_governing(env)


def test_single_span_ultimate_with_610ab() -> None:
    env = _one_span(Combination.EQ_6_10AB)
    n = max(1.35 * G_K + 1.5 * 0.7 * Q_K, 0.925 * 1.35 * G_K + 1.5 * Q_K)  # Eq. (6.10a/b)
    (span,) = env.span_summaries()
    assert span.m_max_knm == pytest.approx(n * L_M**2 / 8, rel=1e-9)
    assert span.governing.label == "6.10b, Q on span 1 (end A pinned)"
    assert env.support_summaries()[0].m_min_knm == pytest.approx(-n * L_M**2 / 8, rel=1e-9)
    assert env.deflection_max_mm is None


# --- labels and arguments ---------------------------------------------------------------


def test_labels_name_the_variant() -> None:
    model = BeamModel.from_spans([4000.0] * 4)
    assert make_arrangement(model, "6.10b", (0, 2), "end A pinned").label == (
        "6.10b, Q on spans 1, 3 (end A pinned)"
    )
    assert make_arrangement(model, "6.10", (), "end A fixed").label == "6.10, G only (end A fixed)"
    assert make_arrangement(model, "6.10", range(4), "x").label == "6.10, Q on all spans (x)"
    # The default variant keeps the label as it was.
    assert make_arrangement(model, "6.10b", (0, 2)).label == "6.10b, Q on spans 1, 3"
    assert Arrangement("6.10", (1,)).variant == ""


def test_one_variant_is_the_plain_envelope() -> None:
    fixed, _, g, q = _two_span()
    args = (g, q, F, Combination.EQ_6_10, PatternRule.ALL_AND_ALTERNATE)
    env = analyse_envelope_variants([("", fixed)], *args)
    plain = analyse_envelope(fixed, *args)
    _check_is_max_min(env, [plain])
    assert env.variants == plain.variants == ("",)
    assert env.governing("m_max", 5).label == plain.governing("m_max", 5).label
    assert "(" not in plain.governing("m_max", 5).label


def test_bad_variants() -> None:
    fixed, pinned, g, q = _two_span()
    args = (g, q, F, Combination.EQ_6_10, PatternRule.ALL_SUBSETS)
    with pytest.raises(TypeError, match="non-empty sequence"):
        analyse_envelope_variants([], *args)
    with pytest.raises(TypeError, match=r"models\[0\]"):
        analyse_envelope_variants([fixed], *args)  # type: ignore[list-item]
    with pytest.raises(ValueError, match="appears twice"):
        analyse_envelope_variants([("a", fixed), ("a", pinned)], *args)
    longer = BeamModel.from_spans([4500.0, 6500.0], FIX, PIN, support_width_mm=300.0)
    with pytest.raises(ValueError, match="only end restraints may differ"):
        analyse_envelope_variants([("a", fixed), ("b", longer)], *args)
    cant = BeamModel.from_spans([4500.0, 6000.0], FIX, FREE, support_width_mm=300.0)
    cant = dataclasses.replace(cant, support_width_mm=fixed.support_width_mm)
    with pytest.raises(ValueError, match="free end"):
        analyse_envelope_variants([("a", fixed), ("b", cant)], *args)
    env = analyse_envelope_variants([("a", fixed), ("b", pinned)], *args)
    with pytest.raises(ValueError, match="variant '' is not one of"):
        env.arrangement_values(make_arrangement(fixed, "6.10", (0,)))
    with pytest.raises(ValueError, match="equation '6.10b' is not one of"):
        env.arrangement_reactions(make_arrangement(fixed, "6.10b", (0,), "a"))


# --- property: any strip with fixed ends, released one end at a time or both -------------


@st.composite
def fixed_strips(draw: st.DrawFn) -> tuple[BeamModel, list[Load], list[Load]]:
    spans = [draw(st.integers(40, 160)) * 50.0 for _ in range(draw(st.integers(1, 4)))]
    right_cant = draw(st.booleans())
    right = FIX
    if right_cant and len(spans) > 1:
        spans.append(draw(st.integers(10, 40)) * 50.0)
        right = FREE
    model = BeamModel.from_spans(spans, FIX, right, support_width_mm=250.0)
    g: list[Load] = [UniformLoad(j, draw(st.floats(3.0, 9.0))) for j in range(len(spans))]
    q: list[Load] = []
    for j, length in enumerate(spans):
        if draw(st.booleans()) or j == 0:
            q.append(UniformLoad(j, draw(st.floats(1.0, 10.0))))
        if draw(st.booleans()):
            q.append(PointLoad(j, draw(st.floats(1.0, 30.0)), draw(st.floats(0.0, 1.0)) * length))
    return model, g, q


@settings(max_examples=25, deadline=None)
@given(
    fixed_strips(),
    st.sampled_from(list(PatternRule)),
    st.sampled_from([Combination.EQ_6_10AB, Combination.QUASI_PERMANENT]),
    st.sampled_from([1.0, 0.85]),
)
def test_variant_envelope_bounds_every_variant(
    data: tuple[BeamModel, list[Load], list[Load]],
    pattern: PatternRule,
    comb: Combination,
    delta: float,
) -> None:
    model, g, q = data
    ends = (0,) if model.restraints[-1] is FREE else (0, -1)
    variants = [("fixed", model), ("pinned", _released(model, ends))]
    if len(ends) == 2:
        variants.append(("A pinned", _released(model, (0,))))
    args = (g, q, F, comb, pattern, delta)
    env = analyse_envelope_variants(variants, *args)
    _check_is_max_min(env, [analyse_envelope(m, *args) for _, m in variants])
    for s in env.span_summaries():  # summaries run and agree with the envelope arrays
        sl = env.stations.of_segment(s.segment)
        assert s.m_max_knm >= env.m_max_knm[sl].max() - 1e-12
        assert s.governing.variant in env.variants
    assert len(env.support_summaries()) == len(model.node_x_mm) - (ends == (0,))
    for i in range(0, len(env.stations), 5):
        for kind, arr in (("m_max", env.m_max_knm), ("m_min", env.m_min_knm)):
            gov = env.governing(kind, i)
            m, _ = env.arrangement_values(gov, np.array([i]))
            assert m[0] == pytest.approx(arr[i], abs=1e-9 * (1 + np.abs(arr).max()))


@settings(max_examples=15, deadline=None)
@given(spec=strip_specs())
def test_governing_labels_of_all_stations_match_station_by_station(spec) -> None:
    """The vectorised labels (used by the record) equal ``governing(kind, i).label`` at every
    station, for strips with and without monolithic ends (several restraint variants)."""
    project = build_project(spec)
    analysis = analyse_strip(project, project.strips[0])
    for env in (analysis.uls, analysis.sls_quasi_permanent):
        for kind in ("m_max", "m_min", "v_max", "v_min"):
            fast = env.governing_labels(kind)
            slow = tuple(env.governing(kind, i).label for i in range(len(env.stations)))
            assert fast == slow
