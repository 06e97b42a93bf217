"""Shear resistance without shear reinforcement, EN 1992-1-1:2004 6.2.2.

Sources:
* structuralcodes 0.7, ``structuralcodes.codes.ec2_2004.VRdc`` (Eq. (6.2), returns N for
  the width b_w) and ``shear.vmin`` (Eq. (6.3N)), used as an oracle (sigma_cp = 0).
* Hand calculations from Eq. (6.2.a/b) and (6.3N), written out below.
* UK NA: the shear strength of concrete above C50/60 is limited to that of C50/60 (read in a
  published summary of the UK NA).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from structuralcodes.codes import ec2_2004 as sc
from structuralcodes.codes.ec2_2004 import shear as sc_shear

from detailer.codes import EC2UK, DesignCodeError
from detailer.codes.ec2_uk import shear


def _oracle_kn_per_m(d: float, rho_l: float, f_ck: float) -> float:
    fcd = sc.fcd(f_ck, alpha_cc=0.85, gamma_c=1.5)
    asl = rho_l * 1000.0 * d
    return sc.VRdc(f_ck, d, asl, 1000.0, 0.0, 1000.0 * (d + 40.0), fcd) / 1000.0


@settings(max_examples=60, deadline=None)
@given(
    d=st.floats(min_value=60.0, max_value=900.0),
    rho_l=st.floats(min_value=0.0005, max_value=0.03),
    f_ck=st.sampled_from([20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0]),
)
def test_against_structuralcodes(d: float, rho_l: float, f_ck: float) -> None:
    # structuralcodes VRdc, which also caps k at 2 and rho_l at 0.02; C_Rd,c = 0.18/1.5.
    assert shear.v_rd_c_kn_per_m(d, rho_l, f_ck) == pytest.approx(
        _oracle_kn_per_m(d, rho_l, f_ck), rel=1e-9
    )


@pytest.mark.parametrize(("d", "f_ck"), [(100.0, 25.0), (170.0, 30.0), (500.0, 40.0)])
def test_v_min_against_structuralcodes(d: float, f_ck: float) -> None:
    # structuralcodes shear.vmin, Eq. (6.3N).
    assert shear.v_min(shear.k_size(d), f_ck) == pytest.approx(sc_shear.vmin(f_ck, d), rel=1e-12)


def test_hand_calculation_v_min_governs() -> None:
    # H12 at 200 (565 mm2/m), d = 170, C30/37:
    # k = 1 + sqrt(200/170) = 2.085 -> 2.0; rho = 565/170000 = 0.00332;
    # v = 0.12 x 2.0 x (100 x 0.00332 x 30)^(1/3) = 0.517 N/mm2;
    # v_min = 0.035 x 2.0^1.5 x 30^0.5 = 0.542 N/mm2 governs -> V = 0.542 x 170 = 92.2 kN/m.
    v_c = 0.12 * 2.0 * (100.0 * 565.0 / 170_000.0 * 30.0) ** (1.0 / 3.0)
    v_min = 0.035 * 2.0**1.5 * math.sqrt(30.0)
    assert v_c == pytest.approx(0.517, abs=5e-4) and v_min == pytest.approx(0.542, abs=5e-4)
    assert shear.v_rd_c_kn_per_m(170.0, 565.0 / 170_000.0, 30.0) == pytest.approx(92.2, abs=0.05)


def test_hand_calculation_steel_term_governs() -> None:
    # d = 200, rho = 1 %, C30/37: k = 2.0; v = 0.12 x 2 x (100 x 0.01 x 30)^(1/3)
    # = 0.24 x 3.107 = 0.746 N/mm2 > v_min 0.542 -> V = 0.746 x 200 = 149.1 kN/m.
    assert shear.v_rd_c_stress(200.0, 0.01, 30.0) == pytest.approx(0.7457, abs=5e-4)
    assert shear.v_rd_c_kn_per_m(200.0, 0.01, 30.0) == pytest.approx(149.1, abs=0.1)


def test_size_factor_and_caps() -> None:
    # EN 1992-1-1:2004, 6.2.2(1): k <= 2.0 (d <= 200 mm); rho_l <= 0.02.
    assert shear.k_size(150.0) == 2.0
    assert shear.k_size(800.0) == pytest.approx(1.5)
    assert shear.v_rd_c_stress(300.0, 0.05, 30.0) == shear.v_rd_c_stress(300.0, 0.02, 30.0)


def test_uk_cap_on_f_ck() -> None:
    # UK NA: C60/75 gets the shear strength of C50/60; structuralcodes (no UK cap) gives more.
    ours = shear.v_rd_c_kn_per_m(250.0, 0.01, 60.0)
    assert ours == pytest.approx(_oracle_kn_per_m(250.0, 0.01, 50.0), rel=1e-9)
    assert ours < _oracle_kn_per_m(250.0, 0.01, 60.0)


def test_interface_and_errors() -> None:
    code = EC2UK()
    mat = code.materials("C30/37")
    assert code.v_rd_c(170.0, 565.0 / 170_000.0, mat) == pytest.approx(92.2, abs=0.05)
    with pytest.raises(DesignCodeError, match="effective depth"):
        shear.v_rd_c_stress(0.0, 0.01, 30.0)
