"""Single-span cases against the standard beam tables (shear, moment, deflection formulas).

Source: the beam-diagram tables every handbook carries, e.g. AISC Steel Construction Manual
Table 3-23 "Shears, moments and deflections" or the Steel Designers' Manual beam tables
(formulas from memory; they are textbook statics and elastic-beam theory):

* simple beam: wL^2/8, wL/2, 5wL^4/(384EI); point load Pab/L, Pa^2b^2/(3EIL) under the load;
  partial uniform load: R1 = wb(2c + b)/(2L), M_max = R1 (a + R1/(2w));
* both ends fixed: -wL^2/12 at the ends, +wL^2/24 at midspan, wL^4/(384EI); point load
  -Pab^2/L^2, -Pa^2b/L^2, 2Pa^2b^2/L^3 under the load, R1 = Pb^2(3a + b)/L^3;
  uniform load on the left half: 11wL^2/192 and 5wL^2/192 (fixed-end moment table);
* propped cantilever: -wL^2/8 at the fixed end, 9wL^2/128 at 3L/8 from the prop,
  reactions 5wL/8 and 3wL/8, greatest deflection wL^4/(185EI) at 0.4215L from the prop;
* cantilever: -wL^2/2, tip deflection wL^4/(8EI), tip slope wL^3/(6EI); tip load -PL and
  PL^3/(3EI);
* beam overhanging one support, load on the overhang only: far reaction -wa^2/(2L).
"""

from __future__ import annotations

import numpy as np
import pytest

from analysis.beam import BeamModel, PointLoad, Restraint, UniformLoad
from analysis.moment_distribution import fixed_end_moments, support_moments_md
from analysis.stiffness import CaseResults, solve

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE
L_MM = 7200.0
L = L_MM / 1000.0
W = 8.5  # kN/m
P = 42.0  # kN
EI = 2.4e4  # kNm2
REL = 1e-9


def _single(
    left: Restraint, right: Restraint, loads: list, fraction: float = 1 / 20
) -> CaseResults:
    model = BeamModel.from_spans([L_MM], left, right, ei_knm2=EI, station_spacing_fraction=fraction)
    return solve(model, [loads])


def _at(res: CaseResults, x_mm: float) -> int:
    i = int(np.argmin(np.abs(res.x_mm - x_mm)))
    assert abs(res.x_mm[i] - x_mm) < 1e-6
    return i


def test_simple_beam_udl() -> None:
    r = _single(PIN, PIN, [UniformLoad(0, W)])
    mid = _at(r, L_MM / 2)
    assert r.m_knm[0, mid] == pytest.approx(W * L**2 / 8, rel=REL)
    assert r.deflection_mm[0, mid] == pytest.approx(5 * W * L**4 / (384 * EI) * 1e3, rel=REL)
    np.testing.assert_allclose(r.reactions_kn[0], [W * L / 2, W * L / 2], rtol=REL)
    assert r.v_kn[0, 0] == pytest.approx(W * L / 2, rel=REL)
    assert r.v_kn[0, -1] == pytest.approx(-W * L / 2, rel=REL)
    assert r.node_rotation_rad[0, 0] == pytest.approx(W * L**3 / (24 * EI), rel=REL)


def test_simple_beam_point_load() -> None:
    a_mm = 2600.0
    a, b = a_mm / 1000, L - a_mm / 1000
    r = _single(PIN, PIN, [PointLoad(0, P, a_mm)])
    i = _at(r, a_mm)
    assert r.m_knm[0, i] == pytest.approx(P * a * b / L, rel=REL)
    assert r.deflection_mm[0, i] == pytest.approx(P * a**2 * b**2 / (3 * EI * L) * 1e3, rel=REL)
    np.testing.assert_allclose(r.reactions_kn[0], [P * b / L, P * a / L], rtol=REL)
    # the load position is doubled: shear just left and just right of the load
    assert r.v_kn[0, i] == pytest.approx(P * b / L, rel=REL)
    assert r.v_kn[0, i + 1] == pytest.approx(-P * a / L, rel=REL)
    assert r.x_mm[i + 1] == r.x_mm[i]


def test_simple_beam_partial_udl() -> None:
    a_mm, b_mm = 1500.0, 3000.0  # load starts a from the left and covers b
    a, b = a_mm / 1000, b_mm / 1000
    c = L - a - b
    r = _single(PIN, PIN, [UniformLoad(0, W, a_mm, a_mm + b_mm)], fraction=1 / 400)
    r1 = W * b * (2 * c + b) / (2 * L)
    assert r.reactions_kn[0, 0] == pytest.approx(r1, rel=REL)
    assert r.m_knm[0].max() == pytest.approx(r1 * (a + r1 / (2 * W)), rel=1e-5)


def test_fixed_fixed_udl() -> None:
    r = _single(FIX, FIX, [UniformLoad(0, W)])
    mid = _at(r, L_MM / 2)
    np.testing.assert_allclose(r.node_moment_knm[0], [-W * L**2 / 12] * 2, rtol=REL)
    assert r.m_knm[0, mid] == pytest.approx(W * L**2 / 24, rel=REL)
    assert r.deflection_mm[0, mid] == pytest.approx(W * L**4 / (384 * EI) * 1e3, rel=REL)
    np.testing.assert_allclose(r.reactions_kn[0], [W * L / 2] * 2, rtol=REL)
    # moment distribution fixed-end moments (clockwise +): -wL^2/12, +wL^2/12
    fa, fb = fixed_end_moments(L_MM, [UniformLoad(0, W)])
    assert (fa, fb) == (pytest.approx(-W * L**2 / 12), pytest.approx(W * L**2 / 12))


def test_fixed_fixed_point_load() -> None:
    a_mm = 2000.0
    a, b = a_mm / 1000, L - a_mm / 1000
    r = _single(FIX, FIX, [PointLoad(0, P, a_mm)])
    m_a, m_b = -P * a * b**2 / L**2, -P * a**2 * b / L**2
    np.testing.assert_allclose(r.node_moment_knm[0], [m_a, m_b], rtol=REL)
    assert r.m_knm[0, _at(r, a_mm)] == pytest.approx(2 * P * a**2 * b**2 / L**3, rel=REL)
    assert r.reactions_kn[0, 0] == pytest.approx(P * b**2 * (3 * a + b) / L**3, rel=REL)
    fa, fb = fixed_end_moments(L_MM, [PointLoad(0, P, a_mm)])
    assert (fa, fb) == (pytest.approx(m_a), pytest.approx(-m_b))
    md = support_moments_md([L_MM], FIX, FIX, [PointLoad(0, P, a_mm)])
    np.testing.assert_allclose(md, [m_a, m_b], rtol=REL)


def test_fixed_end_moments_udl_on_left_half() -> None:
    load = [UniformLoad(0, W, 0.0, L_MM / 2)]
    r = _single(FIX, FIX, load)
    np.testing.assert_allclose(
        r.node_moment_knm[0], [-11 * W * L**2 / 192, -5 * W * L**2 / 192], rtol=REL
    )
    fa, fb = fixed_end_moments(L_MM, load)
    assert (fa, fb) == (pytest.approx(-11 * W * L**2 / 192), pytest.approx(5 * W * L**2 / 192))


def test_propped_cantilever_udl() -> None:
    r = _single(FIX, PIN, [UniformLoad(0, W)], fraction=1 / 1000)
    assert r.node_moment_knm[0, 0] == pytest.approx(-W * L**2 / 8, rel=REL)
    np.testing.assert_allclose(r.reactions_kn[0], [5 * W * L / 8, 3 * W * L / 8], rtol=REL)
    i = _at(r, L_MM - 3 * L_MM / 8)
    assert r.m_knm[0, i] == pytest.approx(9 * W * L**2 / 128, rel=REL)
    assert r.m_knm[0].max() == pytest.approx(9 * W * L**2 / 128, rel=REL)
    j = int(np.argmax(r.deflection_mm[0]))
    # the table rounds the divisor to 185 (exactly 184.6...): half a unit is 0.27 %
    assert r.deflection_mm[0, j] == pytest.approx(W * L**4 / (185 * EI) * 1e3, rel=2.7e-3)
    assert (L_MM - r.x_mm[j]) / L_MM == pytest.approx(0.4215, abs=1e-3)
    md = support_moments_md([L_MM], FIX, PIN, [UniformLoad(0, W)])
    assert md[0] == pytest.approx(-W * L**2 / 8, rel=REL)


def test_cantilever_udl_and_tip_load() -> None:
    r = _single(FIX, FREE, [UniformLoad(0, W)])
    assert r.node_moment_knm[0, 0] == pytest.approx(-W * L**2 / 2, rel=REL)
    assert r.deflection_mm[0, -1] == pytest.approx(W * L**4 / (8 * EI) * 1e3, rel=REL)
    assert r.node_rotation_rad[0, -1] == pytest.approx(W * L**3 / (6 * EI), rel=REL)
    assert r.reactions_kn[0, 0] == pytest.approx(W * L, rel=REL)
    assert r.m_knm[0, -1] == 0.0 and r.reactions_kn[0, 1] == 0.0
    t = _single(FREE, FIX, [PointLoad(0, P, 0.0)])  # tip on the left
    assert t.node_moment_knm[0, 1] == pytest.approx(-P * L, rel=REL)
    assert t.deflection_mm[0, 0] == pytest.approx(P * L**3 / (3 * EI) * 1e3, rel=REL)
    assert t.v_kn[0, 0] == pytest.approx(-P, rel=REL)  # V = dM/dx, just right of the tip
    md = support_moments_md([L_MM], FREE, FIX, [PointLoad(0, P, 0.0)])
    assert md == (0.0, pytest.approx(-P * L, rel=REL))


def test_overhang_loaded_alone() -> None:
    a_mm = 1800.0
    a = a_mm / 1000
    model = BeamModel.from_spans([L_MM, a_mm], PIN, FREE, ei_knm2=EI)
    r = solve(model, [[UniformLoad(1, W)]])
    assert r.reactions_kn[0, 0] == pytest.approx(-W * a**2 / (2 * L), rel=REL)
    assert r.reactions_kn[0, 1] == pytest.approx(W * a * (2 * L + a) / (2 * L), rel=REL)
    assert r.node_moment_knm[0, 1] == pytest.approx(-W * a**2 / 2, rel=REL)
