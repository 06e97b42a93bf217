"""Clause formulas the tests check the pipeline against, written here from the standards
(each names its clause), not imported from ``detailer/codes``."""

from __future__ import annotations

import math

# --------------------------------------------------------------------------- clause formulas

GAMMA_C = 1.5  # EN 1992-1-1:2004, Table 2.1N (UK NA the same)
GAMMA_S = 1.15  # EN 1992-1-1:2004, Table 2.1N (UK NA the same)
ALPHA_CC = 0.85  # UK NA to EN 1992-1-1:2004, 3.1.6(1), flexure
F_YK = 500.0  # B500 to BS 4449


def f_ck_of(concrete: str) -> float:
    """f_ck from a class name such as "C30/37" (EN 1992-1-1:2004, Table 3.1)."""
    return float(concrete[1:].split("/")[0])


def f_ctm(f_ck: float) -> float:
    """f_ctm = 0.30 f_ck^(2/3) for <= C50/60 (EN 1992-1-1:2004, Table 3.1, formula value)."""
    return 0.30 * f_ck ** (2.0 / 3.0)


def f_yd() -> float:
    """f_yd = f_yk / gamma_s (EN 1992-1-1:2004, 3.2.7(2))."""
    return F_YK / GAMMA_S


def bar_area(phi_mm: float) -> float:
    """Nominal area pi phi^2 / 4, mm2 (BS 4449:1997, Table 1)."""
    return math.pi * phi_mm**2 / 4.0


def as_per_m(phi_mm: float, spacing_mm: float) -> float:
    """Area per metre width, (pi phi^2/4) 1000/s, mm2/m."""
    return bar_area(phi_mm) * 1000.0 / spacing_mm


def m_rd_knm(as_mm2: float, d_mm: float, f_ck: float, b_mm: float = 1000.0) -> float:
    """Rectangular block, steel yielded: x = A f_yd/(0.8 f_cd b), z = d - 0.4x <= 0.95 d.

    EN 1992-1-1:2004, 3.1.7(3) with f_cd = alpha_cc f_ck/gamma_c (3.1.6(1), UK NA alpha_cc
    0.85); the 0.95 d cap is the Concrete Centre "How to" good practice used in the design.
    """
    if as_mm2 <= 0:
        return 0.0
    f_cd = ALPHA_CC * f_ck / GAMMA_C
    x = as_mm2 * f_yd() / (0.8 * f_cd * b_mm)
    z = min(d_mm - 0.4 * x, 0.95 * d_mm)
    return as_mm2 * f_yd() * z / 1e6


def l_bd_mm(phi: float, f_ck: float, cover_mm: float, good_bond: bool) -> float:
    """Design anchorage length of a straight bar in tension at sigma_sd = f_yd.

    f_ctd = alpha_ct f_ctk,0.05/gamma_c with f_ctk,0.05 = 0.7 f_ctm (3.1.6(2), Table 3.1);
    f_bd = 2.25 eta_1 f_ctd (Eq. (8.2), eta_2 = 1 for phi <= 32); l_b,rqd = phi/4 f_yd/f_bd
    (Eq. (8.3)); alpha_2 = 1 - 0.15 (c_d - phi)/phi within 0.7..1 with c_d = cover (Table 8.2,
    Fig. 8.3: the cover governs c_d for slab bars at >= 2 c + phi centres); l_bd >= l_b,min =
    max(0.3 l_b,rqd, 10 phi, 100) (Eq. (8.4), (8.6)). EN 1992-1-1:2004, 8.4.
    """
    f_ctd = 1.0 * 0.7 * f_ctm(f_ck) / GAMMA_C
    f_bd = 2.25 * (1.0 if good_bond else 0.7) * f_ctd
    l_b_rqd = phi / 4.0 * f_yd() / f_bd
    alpha_2 = min(1.0, max(0.7, 1.0 - 0.15 * (cover_mm - phi) / phi))
    return max(alpha_2 * l_b_rqd, 0.3 * l_b_rqd, 10.0 * phi, 100.0)


def top_bond_good(h_mm: float) -> bool:
    """Horizontal bars in members h <= 250 mm are in good bond; in deeper slabs (h <= 600) the
    top bars lie more than 250 mm above the soffit, so poor (EN 1992-1-1:2004, Fig. 8.2)."""
    return h_mm <= 250.0


#: BS 8666:2005, Table 2: minimum scheduling radius r by bar size d, mm.
BS8666_R_MM = {6: 12, 8: 16, 10: 20, 12: 24, 16: 32, 20: 70, 25: 87, 32: 112, 40: 140, 50: 175}


def bs8666_length_mm(code: str, phi: int, dims: dict[str, int]) -> float:
    """Total length L along the centre line, BS 8666:2005 standard shapes table:
    00/01 L = A; 11 L = A + (B) - 0.5r - d; 21 L = A + B + (C) - r - 2d."""
    r = BS8666_R_MM[phi]
    if code in ("00", "01"):
        return float(dims["A"])
    if code == "11":
        return dims["A"] + dims["B"] - 0.5 * r - phi
    if code == "21":
        return dims["A"] + dims["B"] + dims["C"] - r - 2.0 * phi
    raise AssertionError(f"shape code {code} is not expected in a one-way slab strip")


def l_0_mm(phi: float, f_ck: float, cover_mm: float, good_bond: bool, alpha_6: float) -> float:
    """Design lap length l_0 = alpha_2 alpha_6 l_b,rqd >= l_0,min = max(0.3 alpha_6 l_b,rqd,
    15 phi, 200), l_b,rqd and alpha_2 as in ``l_bd_mm`` (alpha_1 = alpha_3 = alpha_5 = 1).

    EN 1992-1-1:2004, 8.7.3(1), Eq. (8.10), Eq. (8.11).
    """
    f_ctd = 0.7 * f_ctm(f_ck) / GAMMA_C
    l_b_rqd = phi / 4.0 * f_yd() / (2.25 * (1.0 if good_bond else 0.7) * f_ctd)
    alpha_2 = min(1.0, max(0.7, 1.0 - 0.15 * (cover_mm - phi) / phi))
    return max(alpha_2 * alpha_6 * l_b_rqd, 0.3 * alpha_6 * l_b_rqd, 15.0 * phi, 200.0)


def flexure_as_req(m_ed_knm: float, d_mm: float, f_ck: float) -> tuple[float, float, float]:
    """(K, z, A_s,req) by the Concrete Centre "How to design concrete structures using
    Eurocode 2" method (EN 1992-1-1:2004, 6.1, 3.1.7(3)): K = M/(b d^2 f_ck),
    z = d [0.5 + sqrt(0.25 - K/1.134)] <= 0.95 d, A_s = M/(f_yd z); b = 1000 mm."""
    k = m_ed_knm * 1e6 / (1000.0 * d_mm**2 * f_ck)
    z = min(d_mm * (0.5 + math.sqrt(0.25 - k / 1.134)), 0.95 * d_mm)
    return k, z, m_ed_knm * 1e6 / (f_yd() * z)


def spacing_limit_mm(h_mm: float, *, principal: bool, max_moment: bool) -> float:
    """EN 1992-1-1:2004, 9.3.1.1(3): principal 3h <= 400 (2h <= 250 in areas of maximum
    moment); secondary 3.5h <= 450 (3h <= 400 there)."""
    if principal:
        return min(2 * h_mm, 250.0) if max_moment else min(3 * h_mm, 400.0)
    return min(3 * h_mm, 400.0) if max_moment else min(3.5 * h_mm, 450.0)
