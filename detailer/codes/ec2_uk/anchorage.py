"""Bond and anchorage of ribbed bars: EN 1992-1-1:2004 8.4.

f_bd = 2.25 eta_1 eta_2 f_ctd (8.2); l_b,rqd = (phi/4)(sigma_sd/f_bd) (8.3);
l_bd = alpha_1 alpha_2 alpha_3 alpha_4 alpha_5 l_b,rqd >= l_b,min (8.4) with the
coefficients of Table 8.2 and alpha_2 alpha_3 alpha_5 >= 0.7 (8.5);
l_b,min = max(0.3 l_b,rqd, 10 phi, 100) in tension (8.6), max(0.6 l_b,rqd, 10 phi, 100) in
compression (8.7). No UK NA parameters enter these rules.
"""

from __future__ import annotations

from detailer.codes.base import (
    AnchorageCase,
    AnchorageResult,
    BarShape,
    BondCondition,
    DesignCodeError,
    Layer,
)

ALPHA_MIN = 0.7  # lower limit of alpha_2, alpha_3, alpha_5 and of their product


def _clamp(value: float, lo: float = ALPHA_MIN, hi: float = 1.0) -> float:
    return max(lo, min(hi, value))


def eta_1(bond: BondCondition) -> float:
    """Bond-condition coefficient: 1.0 for good bond, 0.7 for all other conditions.

    EN 1992-1-1:2004, 8.4.2(2).
    """
    return 1.0 if bond is BondCondition.GOOD else 0.7


def eta_2(phi: float) -> float:
    """Bar-size coefficient: 1.0 for phi <= 32 mm, (132 - phi)/100 above.

    EN 1992-1-1:2004, 8.4.2(2).
    """
    return 1.0 if phi <= 32.0 else (132.0 - phi) / 100.0


def f_bd(f_ctd: float, eta_1: float, eta_2: float) -> float:
    """Ultimate bond stress f_bd = 2.25 eta_1 eta_2 f_ctd, N/mm2.

    EN 1992-1-1:2004, Eq. (8.2).
    """
    return 2.25 * eta_1 * eta_2 * f_ctd


def bond_condition_at(
    h: float, y_from_bottom: float, inclination_deg: float = 0.0
) -> BondCondition:
    """Bond condition of a bar at height y above the soffit of a member of depth h (mm).

    Good: bars inclined 45..90 degrees; horizontal bars in members with h <= 250 mm; in
    deeper members, bars within 250 mm of the bottom (h <= 600 mm) or more than 300 mm
    below the top (h > 600 mm). All others are poor.

    EN 1992-1-1:2004, 8.4.2(2), Fig. 8.2.
    """
    if h <= 0.0 or not 0.0 <= y_from_bottom <= h:
        raise DesignCodeError(f"bar level y = {y_from_bottom} mm must lie within h = {h} mm")
    if 45.0 <= inclination_deg <= 90.0 or h <= 250.0:
        return BondCondition.GOOD
    if h <= 600.0:
        return BondCondition.GOOD if y_from_bottom <= 250.0 else BondCondition.POOR
    return BondCondition.GOOD if y_from_bottom <= h - 300.0 else BondCondition.POOR


def bond_condition(h: float, layer: Layer) -> BondCondition:
    """Bond condition of a horizontal slab layer: bottom bars good; top bars good for h <= 250.

    Top bars in slabs deeper than 250 mm are taken as poor (they lie in the top zone of
    Fig. 8.2 unless the slab is barely over 250 mm; use :func:`bond_condition_at` for the
    exact level).

    EN 1992-1-1:2004, 8.4.2(2), Fig. 8.2.
    """
    if h <= 0.0:
        raise DesignCodeError(f"slab depth h = {h} mm must be positive")
    if layer is Layer.BOTTOM or h <= 250.0:
        return BondCondition.GOOD
    return BondCondition.POOR


def l_b_rqd(phi: float, sigma_sd: float, f_bd: float) -> float:
    """Basic required anchorage length l_b,rqd = (phi/4)(sigma_sd/f_bd), mm.

    EN 1992-1-1:2004, Eq. (8.3).
    """
    return phi / 4.0 * sigma_sd / f_bd


def c_d(a: float, c: float, c_1: float | None = None, shape: BarShape = BarShape.STRAIGHT) -> float:
    """Cover dimension c_d from clear spacing a, cover c and side cover c_1 (mm).

    Straight bars min(a/2, c_1, c); bends and hooks min(a/2, c_1); loops c. Where c_1 is
    not given (interior bars of a slab) it does not govern, except that bends and hooks
    then use min(a/2, c), which is on the safe side.

    EN 1992-1-1:2004, Fig. 8.3.
    """
    side = float("inf") if c_1 is None else c_1
    if shape is BarShape.LOOP:
        return c
    if shape is BarShape.BENT:
        return min(a / 2.0, side) if c_1 is not None else min(a / 2.0, c)
    return min(a / 2.0, side, c)


def alpha_1(shape: BarShape, c_d: float, phi: float, compression: bool = False) -> float:
    """Shape coefficient: 1.0 straight; other shapes in tension 0.7 if c_d > 3 phi, else 1.0.

    EN 1992-1-1:2004, Table 8.2.
    """
    if shape is BarShape.STRAIGHT or compression:
        return 1.0
    return 0.7 if c_d > 3.0 * phi else 1.0


def alpha_2(shape: BarShape, c_d: float, phi: float, compression: bool = False) -> float:
    """Cover coefficient: 1 - 0.15(c_d - phi)/phi straight, 1 - 0.15(c_d - 3 phi)/phi other.

    Limited to 0.7..1.0; 1.0 in compression.

    EN 1992-1-1:2004, Table 8.2.
    """
    if compression:
        return 1.0
    if shape is BarShape.STRAIGHT:
        return _clamp(1.0 - 0.15 * (c_d - phi) / phi)
    return _clamp(1.0 - 0.15 * (c_d - 3.0 * phi) / phi)


def alpha_3(K: float = 0.0, lam: float = 0.0, compression: bool = False) -> float:
    """Confinement by transverse steel not welded to the bar: 1 - K lambda, limited 0.7..1.0.

    Slabs without links have no such confinement: K lambda = 0 gives 1.0.

    EN 1992-1-1:2004, Table 8.2.
    """
    if compression:
        return 1.0
    return _clamp(1.0 - K * lam)


def alpha_4(welded_transverse_bar: bool) -> float:
    """Welded transverse bars along the anchorage: 0.7, otherwise 1.0.

    EN 1992-1-1:2004, Table 8.2.
    """
    return 0.7 if welded_transverse_bar else 1.0


def alpha_5(p: float = 0.0, compression: bool = False) -> float:
    """Transverse pressure p (N/mm2) along the anchorage: 1 - 0.04 p, limited 0.7..1.0.

    EN 1992-1-1:2004, Table 8.2.
    """
    if compression:
        return 1.0
    return _clamp(1.0 - 0.04 * p)


def l_b_min(l_b_rqd: float, phi: float, compression: bool = False) -> float:
    """Minimum anchorage length: max(0.3 l_b,rqd, 10 phi, 100) tension, 0.6 in compression, mm.

    EN 1992-1-1:2004, Eq. (8.6), Eq. (8.7).
    """
    factor = 0.6 if compression else 0.3
    return max(factor * l_b_rqd, 10.0 * phi, 100.0)


def l_bd(
    l_b_rqd: float,
    alpha_1: float = 1.0,
    alpha_2: float = 1.0,
    alpha_3: float = 1.0,
    alpha_4: float = 1.0,
    alpha_5: float = 1.0,
    l_b_min: float = 0.0,
) -> float:
    """Design anchorage length l_bd = alpha_1..alpha_5 l_b,rqd >= l_b,min, mm.

    The product alpha_2 alpha_3 alpha_5 is not taken below 0.7 (Eq. (8.5)).

    EN 1992-1-1:2004, Eq. (8.4), Eq. (8.5).
    """
    a235 = max(alpha_2 * alpha_3 * alpha_5, ALPHA_MIN)
    return max(alpha_1 * a235 * alpha_4 * l_b_rqd, l_b_min)


def anchorage(case: AnchorageCase, f_ctd: float) -> AnchorageResult:
    """All terms of the design anchorage length of one bar.

    EN 1992-1-1:2004, 8.4.2, 8.4.3, 8.4.4.
    """
    if case.phi <= 0.0 or case.sigma_sd < 0.0 or case.c_d < 0.0:
        raise DesignCodeError(
            f"anchorage of phi {case.phi} mm at sigma_sd {case.sigma_sd} N/mm2, c_d {case.c_d} mm:"
            " diameter must be positive, stress and c_d not negative"
        )
    e1 = eta_1(case.bond)
    e2 = eta_2(case.phi)
    fbd = f_bd(f_ctd, e1, e2)
    lbr = l_b_rqd(case.phi, case.sigma_sd, fbd)
    a1 = alpha_1(case.shape, case.c_d, case.phi, case.compression)
    a2 = alpha_2(case.shape, case.c_d, case.phi, case.compression)
    a3 = alpha_3(compression=case.compression)
    a4 = alpha_4(case.welded_transverse_bar)
    a5 = alpha_5(case.p_transverse, case.compression)
    lmin = l_b_min(lbr, case.phi, case.compression)
    return AnchorageResult(
        eta_1=e1,
        eta_2=e2,
        f_bd=fbd,
        l_b_rqd=lbr,
        alpha_1=a1,
        alpha_2=a2,
        alpha_3=a3,
        alpha_4=a4,
        alpha_5=a5,
        l_b_min=lmin,
        l_bd=l_bd(lbr, a1, a2, a3, a4, a5, lmin),
    )
