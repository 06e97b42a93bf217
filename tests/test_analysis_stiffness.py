"""Stiffness solver: stations, statics and input errors.

Invariants (property tests, hypothesis) checked against statics, which holds for any beam:
sum of reactions = total load and sum of moments about the left end = 0 (equilibrium);
M = 0 at pinned and free ends; the jump of V at a support equals its reaction (less a point
load standing exactly on the node); M(x2) - M(x1) = integral of V (V = dM/dx, trapezoid
rule exact for V linear between stations); no deflection at a support, continuous across
nodes. Station rules are the engine's contract (spacing <= L/20, faces, load points).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.stiffness import CaseResults, solve
from tests.beam_strategies import spans_and_ends

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE


@st.composite
def strips(draw: st.DrawFn, max_spans: int = 5) -> tuple[BeamModel, list[list[Load]]]:
    spans, left, right = spans_and_ends(draw, max_spans=max_spans, shortest_span_mm=2000.0)
    width = draw(st.sampled_from([0.0, 200.0, 350.0]))
    model = BeamModel.from_spans(spans, left, right, support_width_mm=width)
    cases: list[list[Load]] = []
    for _ in range(draw(st.integers(1, 3))):
        loads: list[Load] = []
        for j, length in enumerate(spans):
            if draw(st.booleans()):
                loads.append(UniformLoad(j, draw(st.floats(0.5, 20.0))))
            if draw(st.booleans()):
                c = draw(st.floats(0.0, 0.8)) * length
                d = c + draw(st.floats(0.05, 1.0)) * (length - c)
                loads.append(UniformLoad(j, draw(st.floats(-5.0, 15.0)), c, d))
            if draw(st.booleans()):
                a = draw(st.sampled_from([0.0, 1.0, None])) if draw(st.booleans()) else None
                pos = draw(st.floats(0.0, 1.0)) * length if a is None else a * length
                loads.append(PointLoad(j, draw(st.floats(-10.0, 60.0)), pos))
        cases.append(loads)
    return model, cases


def _load_totals(model: BeamModel, loads: list[Load]) -> tuple[float, float]:
    """Total downward load (kN) and its moment about x = 0 (kNm)."""
    total = moment = 0.0
    for ld in loads:
        x0 = model.node_x_mm[ld.segment]
        length = model.segment_length_mm(ld.segment)
        if isinstance(ld, PointLoad):
            total += ld.p_kn
            moment += ld.p_kn * (x0 + ld.a_mm) / 1000.0
        else:
            c = 0.0 if ld.start_mm is None else ld.start_mm
            d = length if ld.end_mm is None else ld.end_mm
            f = ld.w_kn_per_m * (d - c) / 1000.0
            total += f
            moment += f * (x0 + (c + d) / 2) / 1000.0
    return total, moment


def _point_load_at_node(model: BeamModel, loads: list[Load], node: int) -> float:
    p = 0.0
    for ld in loads:
        if isinstance(ld, PointLoad):
            length = model.segment_length_mm(ld.segment)
            # positions within 1e-6 mm of a node count as on the node (the engine's tolerance)
            if (ld.segment == node and ld.a_mm <= 1e-6) or (
                ld.segment == node - 1 and ld.a_mm >= length - 1e-6
            ):
                p += ld.p_kn
    return p


@settings(max_examples=60, deadline=None)
@given(strips())
def test_equilibrium_and_statics(data: tuple[BeamModel, list[list[Load]]]) -> None:
    model, cases = data
    res = solve(model, cases)
    scale = 1.0 + max(abs(r) for r in res.reactions_kn.ravel())
    x_nodes = np.asarray(model.node_x_mm) / 1000.0
    st_ = res.stations
    for k, loads in enumerate(cases):
        total, moment = _load_totals(model, loads)
        r = res.reactions_kn[k]
        assert r.sum() == pytest.approx(total, abs=1e-9 * scale)
        # fixed ends add their reaction couples (counterclockwise +): -M(0) and +M(L)
        mn = res.node_moment_knm[k]
        couples = (-mn[0] if model.restraints[0] is FIX else 0.0) + (
            mn[-1] if model.restraints[-1] is FIX else 0.0
        )
        assert (r * x_nodes).sum() + couples == pytest.approx(moment, abs=1e-8 * scale)
        # M = 0 at pinned and free ends
        for node, idx in ((0, 0), (len(x_nodes) - 1, len(st_) - 1)):
            if model.restraints[node] is not FIX:
                assert res.m_knm[k, idx] == 0.0
                assert res.node_moment_knm[k, node] == 0.0
            if model.restraints[node] is FREE:
                assert r[node] == 0.0
        # V jumps at every node by the reaction, less a point load standing on the node
        for node in range(len(x_nodes)):
            v_right = res.v_kn[k, st_.start[node]] if node < model.n_segments else 0.0
            v_left = res.v_kn[k, st_.start[node] - 1] if node > 0 else 0.0
            jump = v_right - v_left
            expected = r[node] - _point_load_at_node(model, loads, node)
            assert jump == pytest.approx(expected, abs=1e-9 * scale)
        # V = dM/dx: trapezoid rule over each interval between stations
        for j in range(model.n_segments):
            sl = st_.of_segment(j)
            x = st_.local_mm[sl] / 1000.0
            m, v = res.m_knm[k, sl], res.v_kn[k, sl]
            h = np.diff(x)
            ok = h > 0
            dm = np.diff(m)[ok]
            trap = (0.5 * (v[:-1] + v[1:]) * h)[ok]
            np.testing.assert_allclose(dm, trap, atol=1e-8 * scale)
        # deflection: zero at supports, continuous across nodes, equal to the node values
        defl = res.deflection_mm[k]
        dscale = 1.0 + np.abs(defl).max()
        for node, r_ in enumerate(model.restraints):
            ends = []
            if node < model.n_segments:
                ends.append(defl[st_.start[node]])
            if node > 0:
                ends.append(defl[st_.start[node] - 1])
            np.testing.assert_allclose(ends, res.node_deflection_mm[k, node], atol=1e-8 * dscale)
            if r_ is not FREE:
                assert abs(res.node_deflection_mm[k, node]) < 1e-9 * dscale


@settings(max_examples=40, deadline=None)
@given(strips())
def test_stations_contract(data: tuple[BeamModel, list[list[Load]]]) -> None:
    model, cases = data
    res = solve(model, cases)
    st_ = res.stations
    for j in range(model.n_segments):
        sl = st_.of_segment(j)
        length = model.segment_length_mm(j)
        local = st_.local_mm[sl]
        assert local[0] == 0.0 and local[-1] == length
        assert st_.side[sl][0] == 1 and st_.side[sl][-1] == -1
        assert np.all(np.diff(local) >= 0.0)
        assert np.diff(local).max() <= length * model.station_spacing_fraction + 1e-9
        np.testing.assert_allclose(st_.x_mm[sl], model.node_x_mm[j] + local)
        assert np.all(res.segment[sl] == j)
        # support faces inside the segment
        for node, face in ((j, model.support_width_mm[j] / 2), (j + 1, None)):
            half = model.support_width_mm[node] / 2
            pos = half if face is not None else length - half
            if 1e-6 < half < length - 1e-6:
                assert st_.find(j, pos) is not None
    for loads in cases:
        for ld in loads:
            length = model.segment_length_mm(ld.segment)
            if isinstance(ld, PointLoad):
                i = st_.find(ld.segment, ld.a_mm)
                assert i is not None
                if 1e-6 < ld.a_mm < length - 1e-6:  # doubled: left and right limit
                    assert st_.side[i] == -1 and st_.side[i + 1] == 1
                    assert st_.local_mm[i + 1] == st_.local_mm[i]
            else:
                for pos in (ld.start_mm, ld.end_mm):
                    if pos is not None:
                        assert st_.find(ld.segment, pos) is not None


def test_support_appears_twice_for_left_and_right_shear() -> None:
    model = BeamModel.from_spans([4000.0, 5000.0])
    res = solve(model, [[UniformLoad(0, 10.0), UniformLoad(1, 10.0)]])
    i_end = res.stations.of_segment(0).stop - 1
    assert res.x_mm[i_end] == res.x_mm[i_end + 1] == 4000.0
    assert res.v_kn[0, i_end] < 0.0 < res.v_kn[0, i_end + 1]


@settings(max_examples=25, deadline=None)
@given(strips(max_spans=4))
def test_cases_solved_together_equal_cases_solved_alone(
    data: tuple[BeamModel, list[list[Load]]],
) -> None:
    # Linear elasticity: superposition, so the multi-RHS solve must equal separate solves.
    model, cases = data
    together = solve(model, cases)
    for k, loads in enumerate(cases):
        alone = solve(model, [loads])
        idx = [together.stations.find(s, x) for s, x in zip(alone.segment, alone.stations.local_mm)]
        assert None not in idx
        scale = 1.0 + np.abs(alone.m_knm).max()
        np.testing.assert_allclose(
            alone.reactions_kn[0], together.reactions_kn[k], atol=1e-9 * scale
        )
        np.testing.assert_allclose(
            alone.node_moment_knm[0], together.node_moment_knm[k], atol=1e-9 * scale
        )
        np.testing.assert_allclose(alone.m_knm[0], together.m_knm[k, idx], atol=1e-9 * scale)


def test_results_are_read_only() -> None:
    res = solve(BeamModel.from_spans([5000.0]), [[UniformLoad(0, 1.0)]])
    with pytest.raises(ValueError):
        res.m_knm[0, 0] = 1.0
    with pytest.raises(ValueError):
        res.x_mm[0] = 1.0
    with pytest.raises(AttributeError):
        res.m_knm = res.v_kn  # type: ignore[misc]


@pytest.mark.parametrize(
    ("load", "message"),
    [
        (UniformLoad(3, 1.0), "segment 3 does not exist"),
        (PointLoad(0, 5.0, 5200.0), "must lie on the segment"),
        (UniformLoad(0, 1.0, 3000.0, 3000.0), "start_mm < end_mm"),
        (UniformLoad(1, 1.0, -10.0, 2000.0), "outside the segment"),
        (UniformLoad(0, float("nan")), "finite"),
    ],
)
def test_bad_loads_give_one_line_errors(load: Load, message: str) -> None:
    model = BeamModel.from_spans([5000.0, 4000.0])
    with pytest.raises(ValueError, match=message) as err:
        solve(model, [[UniformLoad(0, 1.0)], [load]])
    assert "\n" not in str(err.value)
    assert str(err.value).startswith("case 1, load 0:")


def test_bad_model_errors() -> None:
    model = BeamModel((0.0, 4000.0, 8000.0), (PIN, FIX, PIN), (0.0, 0.0, 0.0))
    with pytest.raises(ValueError, match="interior supports"):
        solve(model, [[]])
    with pytest.raises(TypeError, match="UniformLoad or PointLoad"):
        solve(BeamModel.from_spans([4000.0]), [["10 kN/m"]])  # type: ignore[list-item]


def test_two_cantilevers_over_two_supports_are_stable() -> None:
    # Statics: symmetric strip with equal cantilevers, UDL everywhere; each support carries
    # half the load and the root moments are -w a^2 / 2.
    a, span, w = 1500.0, 6000.0, 7.0
    model = BeamModel.from_spans([a, span, a], FREE, FREE)
    res: CaseResults = solve(model, [[UniformLoad(j, w) for j in range(3)]])
    total = w * (2 * a + span) / 1000.0
    np.testing.assert_allclose(res.reactions_kn[0], [0.0, total / 2, total / 2, 0.0], rtol=1e-12)
    np.testing.assert_allclose(res.node_moment_knm[0, 1:3], [-w * 1.5**2 / 2] * 2, rtol=1e-12)
