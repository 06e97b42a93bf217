"""Lap lengths, EN 1992-1-1:2004 8.7.3 (Eq. (8.10), Eq. (8.11), Table 8.3).

Sources:
* EN 1992-1-1:2004, 8.7.3(1), Eq. (8.10) and Eq. (8.11), as read in a published copy of
  the clause text: alpha_6 = (rho_1/25)^0.5 within 1.0..1.5; l_0,min =
  max(0.3 alpha_6 l_b,rqd, 15 phi, 200 mm).
* EN 1992-1-1:2004, Table 8.3 as reproduced in a published anchorage sheet:
  <= 25 % -> 1.0; 33 % -> 1.15; 50 % -> 1.4; > 50 % -> 1.5 (printed to 2 significant places).
* The published worked anchorage calculation of test_ec2_anchorage (C25/30, phi 12,
  c_d = 35: l_b,rqd = 484, alpha_2 = 0.71) for the inputs of the hand-worked lap below.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.codes import EC2UK, AnchorageCase, BondCondition, DesignCodeError
from detailer.codes.ec2_uk import laps, materials

F_YD = 500.0 / 1.15


@pytest.mark.parametrize(
    ("percent", "alpha_6", "tol"),
    [(10.0, 1.0, 1e-12), (25.0, 1.0, 1e-12), (33.0, 1.15, 0.005), (50.0, 1.4, 0.015),
     (60.0, 1.5, 1e-12), (100.0, 1.5, 1e-12)],
)  # fmt: skip
def test_table_8_3(percent: float, alpha_6: float, tol: float) -> None:
    # Table 8.3 (50 % prints 1.4 for sqrt(2) = 1.414).
    assert laps.alpha_6(percent) == pytest.approx(alpha_6, abs=tol)


def test_hand_worked_lap_c25_phi12() -> None:
    # Hand-worked from Eq. (8.10)/(8.11) with the published anchorage terms: l_b,rqd = 484,
    # alpha_2 = 0.7125, 50 % lapped -> alpha_6 = sqrt(2);
    # l_0 = 0.7125 x 1.414 x 484 = 488 mm; l_0,min = max(0.3 x 1.414 x 484 = 205, 180, 200).
    mat = materials.concrete_steel("C25/30")
    r = EC2UK().lap(AnchorageCase(12.0, F_YD, BondCondition.GOOD, c_d=35.0), mat, 50.0)
    assert r.alpha_6 == pytest.approx(math.sqrt(2.0))
    assert r.l_0 == pytest.approx(0.7125 * math.sqrt(2.0) * 484.0, abs=1.0)
    assert r.l_0_min == pytest.approx(0.3 * math.sqrt(2.0) * 484.0, abs=0.5)


def test_minimum_lap_governs() -> None:
    # Eq. (8.11): short laps are lifted to 200 mm or 15 phi.
    assert laps.l_0_min(1.0, 300.0, 10.0) == 200.0
    assert laps.l_0_min(1.0, 300.0, 16.0) == 240.0
    assert laps.l_0(300.0, alpha_2=0.7, l_0_min=laps.l_0_min(1.0, 300.0, 16.0)) == 240.0


def test_bad_percentage() -> None:
    with pytest.raises(DesignCodeError, match="lapped"):
        laps.alpha_6(120.0)


@settings(max_examples=50, deadline=None)
@given(
    percent=st.floats(min_value=0.0, max_value=100.0),
    c_d=st.floats(min_value=10.0, max_value=100.0),
)
def test_lap_not_shorter_than_anchorage(percent: float, c_d: float) -> None:
    # Invariant [D]: alpha_6 >= 1 and l_0,min >= l_b,min, so l_0 >= l_bd for the same bar.
    mat = materials.concrete_steel("C30/37")
    r = EC2UK().lap(AnchorageCase(16.0, F_YD, BondCondition.POOR, c_d), mat, percent)
    assert 1.0 <= r.alpha_6 <= 1.5
    assert r.l_0 >= r.anchorage.l_bd - 1e-9
