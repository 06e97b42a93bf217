"""A floor of strips solved at once (``analysis.floor``) and ``analyse_strips``.

Sources:
* anastruct (reference library: an independent 2D frame FE program, GPL-3.0, used only
  here as an oracle through its public API): support moments and reactions of floor strips
  under every unit case, one element per segment (split where a point load needs a node),
  to 1e-5 of the largest value of the case: anastruct itself is off statics by up to about
  2e-6 (the root moment w a^2 / 2 = 1.44 kNm of a 1.2 m cantilever under 2 kN/m comes out
  1.4399995, and 1.4399973 within a floor strip), so 1e-6 would test anastruct;
* standard beam tables (from memory: textbook statics): simply supported span wL^2/8 and
  wL/2 reactions, fixed-fixed span wL^2/12 at the supports and wL^2/24 at midspan, propped
  cantilever wL^2/8 at the fixed end with reactions 5wL/8 and 3wL/8, two equal spans
  wL^2/8 at the middle support (Clapeyron) with reactions 3wL/8, 10wL/8, 3wL/8, and a
  cantilever wa^2/2 at its root;
* numpy.linalg.solve (reference library) for the block-banded Cholesky factorisation;
* the single-strip solver (``analysis.stiffness``) and ``analyse_strip``: the floor must
  give every strip what solving it alone gives (a consistency check, not a source).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis.arrangements import ActionFactors, Combination, PatternRule
from analysis.banded import band_from_dense, cholesky_banded_blocks
from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.envelope import analyse_envelope_variants, unit_cases
from analysis.floor import solve_floor, solve_nodes_floor
from analysis.stiffness import solve, solve_nodes
from detailer.project import parse_project
from detailer.strip_analysis import (
    analyse_strip,
    analyse_strips,
    strip_loads,
    strip_model_variants,
)
from tests.beam_strategies import spans_and_ends
from tests.floor_factory import floor_yaml
from tests.strip_factory import build_project, strip_specs

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE
CASE_FIELDS = (
    "m_knm",
    "v_kn",
    "deflection_mm",
    "reactions_kn",
    "node_moment_knm",
    "node_deflection_mm",
    "node_rotation_rad",
)
NODE_FIELDS = ("node_moment_knm", "elastic_node_moment_knm", "reactions_kn", "node_v_m")
STATION_FIELDS = ("x_mm", "segment", "local_mm", "side", "start")


@st.composite
def strip_cases(draw: st.DrawFn) -> tuple[BeamModel, list[list[Load]]]:
    """One strip of a floor: 1-6 spans, pinned or fixed ends, cantilevers, support widths,
    EI and station spacing of its own; 0-5 cases of full, partial, point (also at and
    within the tolerance of the nodes) and negative loads."""
    spans, left, right = spans_and_ends(draw, max_spans=6, shortest_span_mm=1500.0)
    model = BeamModel.from_spans(
        spans,
        left,
        right,
        support_width_mm=draw(st.sampled_from([0.0, 200.0, 350.0])),
        ei_knm2=draw(st.sampled_from([1.5e4, 4.0e4, 1.0e5])),
        station_spacing_fraction=draw(st.sampled_from([1 / 20, 1 / 20, 1 / 10, 1 / 7])),
    )
    cases: list[list[Load]] = []
    for _ in range(draw(st.integers(0, 5))):
        loads: list[Load] = []
        for j, length in enumerate(spans):
            if draw(st.booleans()):
                loads.append(UniformLoad(j, draw(st.floats(0.5, 20.0))))
            if draw(st.integers(0, 3)) == 0:
                c = draw(st.floats(0.0, 0.8)) * length
                d = c + draw(st.floats(0.05, 1.0)) * (length - c)
                loads.append(UniformLoad(j, draw(st.floats(-5.0, 15.0)), c, d))
            if draw(st.integers(0, 3)) == 0:
                a = draw(st.sampled_from([0.0, 5e-7, length, length - 5e-7, None]))
                pos = draw(st.floats(0.0, 1.0)) * length if a is None else a
                loads.append(PointLoad(j, draw(st.floats(-10.0, 60.0)), pos))
        cases.append(loads)
    return model, cases


def _same(a: np.ndarray, b: np.ndarray) -> None:
    assert a.shape == b.shape
    np.testing.assert_allclose(a, b, rtol=1e-9, atol=1e-9)


def _identical(a: np.ndarray, b: np.ndarray) -> None:
    # Bit for bit: the floor's node solution is the single solver's (see analysis.floor).
    assert a.shape == b.shape and a.dtype == b.dtype
    assert np.ascontiguousarray(a).tobytes() == np.ascontiguousarray(b).tobytes()


@settings(max_examples=40, deadline=None)
@given(st.lists(strip_cases(), min_size=1, max_size=8))
def test_floor_gives_every_strip_its_own_solution(
    floor: list[tuple[BeamModel, list[list[Load]]]],
) -> None:
    models, cases = [m for m, _ in floor], [c for _, c in floor]
    nodes = solve_nodes_floor(models, cases)
    results = solve_floor(models, cases)
    assert len(nodes) == len(results) == len(floor)
    for (model, loads), sol, res in zip(floor, nodes, results):
        alone, alone_res = solve_nodes(model, loads), solve(model, loads)
        assert sol.model is model and sol.n_cases == res.n_cases == len(loads)
        for name in STATION_FIELDS:
            np.testing.assert_array_equal(
                getattr(sol.stations, name), getattr(alone.stations, name)
            )
            np.testing.assert_array_equal(
                getattr(res.stations, name), getattr(alone.stations, name)
            )
        for name in ("case", "station", "m0", "v0", "j0"):
            _identical(getattr(sol.free, name), getattr(alone.free, name))
        for name in NODE_FIELDS + ("node_theta_rad",):
            _identical(getattr(sol, name), getattr(alone, name))
        for name in CASE_FIELDS:
            _same(getattr(res, name), getattr(alone_res, name))
        # What NodeSolution works out per segment (the floor works it out for every strip
        # at once), and the same again after new moments (as redistribution gives them).
        for name in ("_seg_m0", "_seg_dm", "_length_m"):
            _identical(getattr(sol, name), getattr(alone, name))
        for ours, theirs in zip(sol._seg_y, alone._seg_y, strict=True):
            _identical(ours, theirs)
        moved = sol.with_moments(sol.node_moment_knm * 0.9, sol.reactions_kn.copy())
        moved_alone = alone.with_moments(alone.node_moment_knm * 0.9, alone.reactions_kn.copy())
        # Station values evaluated from the floor's node solution, as the envelopes do.
        for ours, theirs in zip(sol.evaluate(), alone.evaluate()):
            _identical(ours, theirs)
        for ours, theirs in zip(moved.evaluate(), moved_alone.evaluate()):
            _identical(ours, theirs)


def test_floor_of_textbook_beams() -> None:
    # Standard beam tables (from memory: textbook statics), w = 10 kN/m, L = 6 m.
    w, length = 10.0, 6000.0
    models = [
        BeamModel.from_spans([length], PIN, PIN),
        BeamModel.from_spans([length], FIX, FIX, ei_knm2=2.0e4),
        BeamModel.from_spans([length], FIX, PIN, support_width_mm=300.0),
        BeamModel.from_spans([length, length], PIN, PIN, ei_knm2=7.0e4),
        BeamModel.from_spans([1500.0], FIX, FREE),
    ]
    cases = [[[UniformLoad(j, w) for j in range(m.n_segments)]] for m in models]
    res = solve_floor(models, cases)
    wl2 = w * 6.0**2
    ss, ff, pc, two, cant = res
    assert ss.node_moment_knm[0] == pytest.approx([0.0, 0.0], abs=1e-9)
    assert ss.m_knm[0].max() == pytest.approx(wl2 / 8, rel=1e-12)
    assert ss.reactions_kn[0] == pytest.approx([w * 3.0, w * 3.0], rel=1e-12)
    assert ff.node_moment_knm[0] == pytest.approx([-wl2 / 12, -wl2 / 12], rel=1e-9)
    assert ff.m_knm[0].max() == pytest.approx(wl2 / 24, rel=1e-9)
    assert pc.node_moment_knm[0, 0] == pytest.approx(-wl2 / 8, rel=1e-9)
    assert pc.reactions_kn[0] == pytest.approx([5 * w * 6.0 / 8, 3 * w * 6.0 / 8], rel=1e-9)
    assert two.node_moment_knm[0, 1] == pytest.approx(-wl2 / 8, rel=1e-9)
    f = w * 6.0 / 8
    assert two.reactions_kn[0] == pytest.approx([3 * f, 10 * f, 3 * f], rel=1e-9)
    assert cant.node_moment_knm[0, 0] == pytest.approx(-w * 1.5**2 / 2, rel=1e-12)
    assert cant.reactions_kn[0] == pytest.approx([w * 1.5, 0.0], abs=1e-9)


# --------------------------------------------------------------------------- anastruct


def _anastruct(model: BeamModel, loads: list[Load]) -> tuple[np.ndarray, np.ndarray]:
    """Node moments (sagging +) and reactions (up +) at the model's nodes, for point loads
    and line loads over whole segments."""
    from anastruct import SystemElements

    x = model.node_x_mm
    cuts = [{0.0, x[j + 1] - x[j]} for j in range(len(x) - 1)]
    for ld in loads:
        if isinstance(ld, PointLoad):
            cuts[ld.segment].add(float(ld.a_mm))
        else:
            assert ld.start_mm is None and ld.end_mm is None
    ss = SystemElements(EI=model.ei_knm2, EA=1.0e9)
    segment_of: list[int] = []  # of each anastruct element
    first_element: list[int] = []  # of each segment
    node_of: dict[tuple[int, float], int] = {}  # (segment, a_mm) -> anastruct node id
    for j, c in enumerate(cuts):
        first_element.append(len(segment_of) + 1)
        for a, b in itertools.pairwise(sorted(c)):
            ss.add_element([[(x[j] + a) / 1000.0, 0.0], [(x[j] + b) / 1000.0, 0.0]])
            segment_of.append(j)
            node_of.setdefault((j, a), len(segment_of))
            node_of[(j, b)] = len(segment_of) + 1
    ids = [node_of[(j, 0.0)] for j in range(len(cuts))] + [len(segment_of) + 1]
    first = True
    for nid, r in zip(ids, model.restraints):
        if r is FIX:
            ss.add_support_fixed(nid)
        elif r is PIN:
            ss.add_support_hinged(nid) if first else ss.add_support_roll(nid)
            first = False
    q_on: dict[int, float] = {}  # anastruct keeps one q_load per element: sum them first
    for ld in loads:
        if isinstance(ld, PointLoad):
            ss.point_load(node_of[(ld.segment, float(ld.a_mm))], Fy=-ld.p_kn)
        else:
            for e, j in enumerate(segment_of, start=1):
                if j == ld.segment:
                    q_on[e] = q_on.get(e, 0.0) + ld.w_kn_per_m
    for e, q in sorted(q_on.items()):
        ss.q_load(q=-q, element_id=e, direction="y")
    ss.solve()
    # anastruct reports hogging as positive.
    m = [-ss.get_element_results(e, verbose=True)["M"][0] for e in first_element]
    m.append(-ss.get_element_results(len(segment_of), verbose=True)["M"][-1])
    r = [
        0.0 if rr is FREE else -ss.get_node_results_system(nid)["Fy"]
        for nid, rr in zip(ids, model.restraints)
    ]
    return np.array(m), np.array(r)


def test_floor_strips_against_anastruct() -> None:
    pytest.importorskip("anastruct")
    project = parse_project(floor_yaml(24), "floor.yaml")
    models, cases = [], []
    for strip in project.strips[::3]:  # a mix of ends, balconies and partition loads
        permanent, variable = strip_loads(strip)
        for _, model in strip_model_variants(strip, project.materials.f_ck):
            models.append(model)
            cases.append(unit_cases(permanent, variable)[0])
    assert any(isinstance(ld, PointLoad) for c in cases for case in c for ld in case)
    assert {FIX, FREE} <= {r for m in models for r in m.restraints}
    for model, loads, res in zip(models, cases, solve_floor(models, cases)):
        for k, case in enumerate(loads):
            m, r = _anastruct(model, case)
            scale_m = 1e-5 * max(1.0, np.abs(m).max())
            scale_r = 1e-5 * max(1.0, np.abs(r).max())
            np.testing.assert_allclose(res.node_moment_knm[k], m, rtol=0.0, atol=scale_m)
            np.testing.assert_allclose(res.reactions_kn[k], r, rtol=0.0, atol=scale_r)


# --------------------------------------------------------------------------- solver parts


def test_block_banded_cholesky_against_numpy() -> None:
    rng = np.random.default_rng(7)
    n_b, p, blocks = 9, 3, []
    for size in (9, 5, 1, 9):
        a = rng.normal(size=(size, size))
        dense = np.zeros((size, size))
        for k in range(1 - min(size, p + 1), min(size, p + 1)):  # a band, made SPD below
            dense += np.diag(np.diagonal(a, k), k)
        dense = dense + dense.T + 4.0 * (p + 1) * np.eye(size)
        blocks.append(dense)
    ab = np.zeros((p + 1, n_b, len(blocks)))
    rhs = np.zeros((n_b, len(blocks), 3))
    for i, dense in enumerate(blocks):
        size = dense.shape[0]
        ab[:, :size, i] = band_from_dense(dense, p)
        ab[0, size:, i] = 1.0  # identity padding
        rhs[:size, i] = rng.normal(size=(size, 3))
    factor, singular = cholesky_banded_blocks(ab)
    assert not singular.any()
    x = factor.solve(rhs)
    for i, dense in enumerate(blocks):
        size = dense.shape[0]
        np.testing.assert_allclose(x[:size, i], np.linalg.solve(dense, rhs[:size, i]), rtol=1e-12)
        np.testing.assert_array_equal(x[size:, i], 0.0)
    ab[:2, :2, 1] = [[1.0, 1.0], [1.0, 0.0]]  # block 1 now starts [[1, 1], [1, 1]]: singular
    assert list(cholesky_banded_blocks(ab)[1]) == [False, True, False, False]


# --------------------------------------------------------------------------- errors


def _mechanism() -> BeamModel:
    # BeamModel refuses a span pinned at one end and free at the other; built past its own
    # checks to reach the solver's (the factorisation finds the zero pivot).
    model = object.__new__(BeamModel)
    for name, value in (
        ("node_x_mm", (0.0, 3000.0)),
        ("restraints", (PIN, FREE)),
        ("support_width_mm", (0.0, 0.0)),
        ("ei_knm2", 1.0e5),
        ("station_spacing_fraction", 0.05),
    ):
        object.__setattr__(model, name, value)
    return model


def test_errors_name_the_first_bad_model() -> None:
    good = BeamModel.from_spans([4000.0, 4000.0])
    fixed_inside = BeamModel((0.0, 4000.0, 8000.0), (PIN, FIX, PIN), (0.0, 0.0, 0.0))
    udl = [[UniformLoad(0, 1.0)]]
    with pytest.raises(ValueError) as err:
        solve_floor([good, good, fixed_inside], [udl, udl, udl])
    assert str(err.value) == (
        "model 2: node 1: interior supports of a slab strip must be PINNED (got FIXED)"
    )
    with pytest.raises(ValueError) as err:
        solve_nodes_floor([good, good], [udl, [[UniformLoad(0, 1.0)], [UniformLoad(3, 1.0)]]])
    assert str(err.value).startswith("model 1: case 1, load 0: segment 3 does not exist")
    with pytest.raises(ValueError) as err:
        solve_floor([good, good, _mechanism()], [udl, udl, udl])
    assert str(err.value) == "model 2: the beam model is a mechanism (not enough supports)"
    with pytest.raises(ValueError) as err:
        solve_nodes(_mechanism(), udl)
    assert str(err.value) == "the beam model is a mechanism (not enough supports)"
    # The first bad model in the given order, whatever the order of the checks.
    bad_load = [[UniformLoad(5, 1.0)]]
    with pytest.raises(ValueError, match="^model 1: case 0, load 0: segment 5"):
        solve_floor([good, good, fixed_inside, _mechanism()], [udl, bad_load, udl, udl])
    with pytest.raises(TypeError, match="^model 0: case 0, load 0: expected UniformLoad"):
        solve_floor([good], [[["10 kN/m"]]])  # type: ignore[list-item]
    with pytest.raises(TypeError, match="^model 1: expected a BeamModel"):
        solve_floor([good, "beam"], [udl, udl])  # type: ignore[list-item]
    with pytest.raises(ValueError, match="2 models but 1 sets of cases"):
        solve_floor([good, good], [udl])


def test_results_are_read_only_and_an_empty_floor_is_empty() -> None:
    # The floor makes its per-strip objects as views of its read-only arrays, without
    # their __post_init__: every array must still refuse writes.
    res = solve_floor([BeamModel.from_spans([5000.0])], [[[UniformLoad(0, 1.0)]]])[0]
    with pytest.raises(ValueError):
        res.m_knm[0, 0] = 1.0
    with pytest.raises(ValueError):
        res.x_mm[0] = 1.0
    for name in CASE_FIELDS:
        assert not getattr(res, name).flags.writeable, name
    for name in STATION_FIELDS:
        assert not getattr(res.stations, name).flags.writeable, name
    sol = solve_nodes_floor([BeamModel.from_spans([5000.0])], [[[UniformLoad(0, 1.0)]]])[0]
    with pytest.raises(ValueError):
        sol.node_moment_knm[0, 0] = 1.0
    for name in NODE_FIELDS + ("node_theta_rad", "_seg_m0", "_seg_dm", "_length_m"):
        assert not getattr(sol, name).flags.writeable, name
    assert not any(a.flags.writeable for a in sol._seg_y)
    for name in ("case", "station", "m0", "v0", "j0"):
        assert not getattr(sol.free, name).flags.writeable, name
    assert solve_floor([], []) == () and solve_nodes_floor([], []) == ()


# --------------------------------------------------------------------------- envelopes


def _same_envelope(a, b) -> None:
    for name in (
        "m_max_knm",
        "m_min_knm",
        "v_max_kn",
        "v_min_kn",
        "node_m_max_knm",
        "node_m_min_knm",
        "reactions_max_kn",
        "reactions_min_kn",
    ):
        _same(getattr(a, name), getattr(b, name))
    if a.deflection_max_mm is None:
        assert b.deflection_max_mm is None
    else:
        _same(a.deflection_max_mm, b.deflection_max_mm)
        _same(a.deflection_min_mm, b.deflection_min_mm)
    assert a.variants == b.variants
    # Summaries carry the governing arrangements: equal to the last bit, labels included
    # (near ties between arrangements are decided the same way).
    assert a.span_summaries() == b.span_summaries()
    assert a.support_summaries() == b.support_summaries()
    for kind in ("m_max", "m_min", "v_max", "v_min"):
        assert a.governing_labels(kind) == b.governing_labels(kind)


def test_envelope_from_presolved_unit_cases() -> None:
    variants = (
        ("fixed", BeamModel.from_spans([4500.0, 5200.0, 1200.0], FIX, FREE, 250.0)),
        ("pinned", BeamModel.from_spans([4500.0, 5200.0, 1200.0], PIN, FREE, 250.0)),
    )
    permanent = [UniformLoad(j, 7.0) for j in range(3)] + [PointLoad(1, 4.0, 2600.0)]
    variable = [UniformLoad(j, 2.5) for j in range(3)]
    factors = ActionFactors(
        gamma_g_sup=1.35, gamma_g_inf=1.0, gamma_q=1.5, psi_0=0.7, psi_2=0.3, xi=0.925
    )
    cases = unit_cases(permanent, variable)[0]
    solved = solve_nodes_floor([m for _, m in variants], [cases, cases])
    for combination, delta in ((Combination.EQ_6_10AB, 0.85), (Combination.QUASI_PERMANENT, 1.0)):
        args = (variants, permanent, variable, factors, combination, PatternRule.ALL_SUBSETS, delta)
        _same_envelope(analyse_envelope_variants(*args), analyse_envelope_variants(*args, solved))
    args = (variants, permanent, variable, factors, Combination.EQ_6_10, PatternRule.ALL_SUBSETS)
    with pytest.raises(ValueError, match=r"solved\[0\] is not variant 'fixed'"):
        analyse_envelope_variants(*args, solved=solved[::-1])
    with pytest.raises(ValueError, match="1 solved variants for 2 models"):
        analyse_envelope_variants(*args, solved=solved[:1])


def _same_analysis(a, b) -> None:
    for name in ("strip_id", "model", "permanent", "variable", "factors", "combination"):
        assert getattr(a, name) == getattr(b, name)
    assert (a.pattern, a.redistribution_delta, a.variants) == (
        b.pattern,
        b.redistribution_delta,
        b.variants,
    )
    _same_envelope(a.uls, b.uls)
    _same_envelope(a.sls_quasi_permanent, b.sls_quasi_permanent)


@settings(max_examples=15, deadline=None)
@given(strip_specs())
def test_analyse_strips_equals_analyse_strip_on_generated_strips(spec) -> None:
    project = build_project(spec)
    (ours,) = analyse_strips(project, project.strips)
    _same_analysis(ours, analyse_strip(project, project.strips[0]))


def test_analyse_strips_equals_analyse_strip_on_a_floor() -> None:
    project = parse_project(floor_yaml(40), "floor.yaml")
    ours = analyse_strips(project, project.strips)
    assert len(ours) == 40
    assert any(a.variants for a in ours)  # monolithic ends: two restraint variants
    for a, strip in zip(ours, project.strips):
        _same_analysis(a, analyse_strip(project, strip))
    assert analyse_strips(project, []) == ()
