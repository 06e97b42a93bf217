"""Concrete and steel properties against EN 1992-1-1:2004 Table 3.1 and structuralcodes.

Sources:
* EN 1992-1-1:2004, Table 3.1 (strength and deformation characteristics), as reproduced in
  a published copy of the table; values printed to 0.1 N/mm2 (f_ctm, f_ctk,0.05) and 1 GPa
  (E_cm). The design uses the unrounded formula values, so each check allows half a unit
  of the printed last digit.
* structuralcodes 0.7 (``structuralcodes.codes.ec2_2004``), an independent open
  implementation of the same formulas, used here as an oracle only.
* UK NA: alpha_cc = 0.85 (read in a published summary of the UK NA); gamma_c = 1.5,
  gamma_s = 1.15 (Table 2.1N, UK NA the same; from memory).
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from structuralcodes.codes import ec2_2004 as sc

from detailer.codes import DesignCodeError
from detailer.codes.ec2_uk import materials as m

# EN 1992-1-1:2004 Table 3.1, as printed: f_ck, f_ck,cube, f_cm, f_ctm, f_ctk,0.05, E_cm (GPa)
TABLE_3_1_PRINTED = [
    (12, 15, 20, 1.6, 1.1, 27),
    (16, 20, 24, 1.9, 1.3, 29),
    (20, 25, 28, 2.2, 1.5, 30),
    (25, 30, 33, 2.6, 1.8, 31),
    (30, 37, 38, 2.9, 2.0, 33),
    (35, 45, 43, 3.2, 2.2, 34),
    (40, 50, 48, 3.5, 2.5, 35),
    (45, 55, 53, 3.8, 2.7, 36),
    (50, 60, 58, 4.1, 2.9, 37),
]


@pytest.mark.parametrize(("f_ck", "cube", "fcm", "fctm", "fctk", "ecm_gpa"), TABLE_3_1_PRINTED)
def test_table_3_1_formula_values_round_to_printed(f_ck, cube, fcm, fctm, fctk, ecm_gpa) -> None:
    # EN 1992-1-1:2004, Table 3.1: formula values agree with the printed, rounded values.
    assert m.parse_concrete_class(f"C{f_ck}/{cube}") == (f_ck, cube)
    assert m.f_cm(f_ck) == fcm
    tensile = m.f_ctm(f_ck)
    assert tensile == pytest.approx(fctm, abs=0.05)
    assert m.f_ctk_005(tensile) == pytest.approx(fctk, abs=0.05)
    assert m.E_cm(m.f_cm(f_ck)) / 1000.0 == pytest.approx(ecm_gpa, abs=0.5)


@pytest.mark.parametrize(("f_ck", "cube", "fcm", "fctm", "fctk", "ecm_gpa"), TABLE_3_1_PRINTED)
def test_table_3_1_kept_as_printed(f_ck, cube, fcm, fctm, fctk, ecm_gpa) -> None:
    # EN 1992-1-1:2004, Table 3.1: the module's copy of the printed table.
    row = m.table_3_1_row(f_ck)
    assert (row.f_ck_cube, row.f_cm, row.f_ctm, row.f_ctk_005, row.E_cm_gpa) == (
        cube,
        fcm,
        fctm,
        fctk,
        ecm_gpa,
    )


def test_c30_37_unrounded_values() -> None:
    # Unrounded C30/37 values quoted for structuralcodes (libraries guide): 2.896, 2.028,
    # 32 837 N/mm2; the table prints 2.9 / 2.0 / 33 GPa.
    mat = m.concrete_steel("C30/37")
    assert mat.f_ctm == pytest.approx(2.896, abs=5e-4)
    assert mat.f_ctk_005 == pytest.approx(2.028, abs=5e-4)
    assert mat.E_cm == pytest.approx(32_837, abs=0.5)


@settings(max_examples=40, deadline=None)
@given(st.floats(min_value=12.0, max_value=90.0))
def test_against_structuralcodes(f_ck: float) -> None:
    # structuralcodes ec2_2004.fctm / fctk_5 / Ecm (Table 3.1 formulas), all classes.
    assert m.f_ctm(f_ck) == pytest.approx(sc.fctm(f_ck), rel=1e-12)
    assert m.f_ctk_005(m.f_ctm(f_ck)) == pytest.approx(sc.fctk_5(sc.fctm(f_ck)), rel=1e-12)
    assert m.E_cm(m.f_cm(f_ck)) == pytest.approx(sc.Ecm(sc.fcm(f_ck)), rel=1e-12)


@pytest.mark.parametrize("f_ck", [20.0, 30.0, 50.0])
def test_design_strengths_against_structuralcodes(f_ck: float) -> None:
    # structuralcodes ec2_2004.fcd / fctd with the UK alpha_cc = 0.85 and gamma_c = 1.5.
    assert m.f_cd(f_ck) == pytest.approx(sc.fcd(f_ck, alpha_cc=0.85, gamma_c=1.5), rel=1e-12)
    fctk = m.f_ctk_005(m.f_ctm(f_ck))
    assert m.f_ctd(fctk) == pytest.approx(sc.fctd(fctk, alpha_ct=1.0, gamma_c=1.5), rel=1e-12)


def test_uk_design_strengths() -> None:
    # UK NA alpha_cc = 0.85 with gamma_c = 1.5 gives f_cd = 0.567 f_ck; f_yd = 500/1.15.
    mat = m.concrete_steel("C30/37", f_yk=500.0)
    assert mat.f_cd / mat.f_ck == pytest.approx(0.567, abs=5e-4)
    assert mat.f_yd == pytest.approx(434.8, abs=0.05)
    assert mat.E_s == 200_000.0  # EN 1992-1-1:2004, 3.2.7(4)


@pytest.mark.parametrize(("f_ck", "eps_permille"), [(30, 3.5), (50, 3.5), (60, 2.9), (90, 2.6)])
def test_eps_cu2_table_3_1(f_ck: float, eps_permille: float) -> None:
    # EN 1992-1-1:2004, Table 3.1, eps_cu2 row (printed to 0.1 per mille), from memory.
    assert m.eps_cu2(f_ck) * 1000.0 == pytest.approx(eps_permille, abs=0.05)


@pytest.mark.parametrize("text", ["C31/38", "C30/40", "30/37", "", "C30-37"])
def test_bad_concrete_class_is_a_clear_error(text: str) -> None:
    with pytest.raises(DesignCodeError, match="concrete class"):
        m.concrete_steel(text)


def test_short_class_name_and_uk_intermediate_class() -> None:
    # 'C30' means C30/37; C32/40 is a BS 8500-1 class (from memory) not in Table 3.1.
    assert m.concrete_steel("C30").concrete_class == "C30/37"
    assert m.concrete_steel("c32/40").f_ck == 32.0


def test_steel_limits() -> None:
    # EN 1992-1-1:2004, 3.2.2(3)P: f_yk within 400..600 N/mm2.
    with pytest.raises(DesignCodeError, match="f_yk"):
        m.concrete_steel("C30/37", f_yk=250.0)
    with pytest.raises(DesignCodeError, match="ductility"):
        m.concrete_steel("C30/37", ductility_class="D")
