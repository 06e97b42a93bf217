"""Serviceability: crack control without direct calculation (7.3.3) and span/depth (7.4.2).

Crack control: Table 7.2N (largest bar diameter) and Table 7.3N (largest bar spacing) by
steel stress under the quasi-permanent combination and limiting crack width, linearly
interpolated in both; one of the two limits must be met (7.3.3(2)). Stresses below the
first column use that column; a "-" cell (or a stress beyond the last column) gives no
limit by that route. Slabs in buildings in bending with h <= 200 mm, detailed to 9.3, need
no specific measures (7.3.3(1)). Optionally the bar-size limit is adjusted to the section
by Eq. (7.6N) (k_c = 0.4, h_cr = h/2 for rectangular sections in bending).

Table 7.2N is as read in a published copy of the EN text; Table 7.3N and Table 7.1N are
from memory (consistent with two published UK worked examples).

Span/depth: Eq. (7.16a/b) with K of Table 7.4N, times F_steel = 310/sigma_s =
500/(f_yk A_s,req/A_s,prov) capped at 1.5 (UK NA), times 7/l_eff for spans over 7 m.
"""

from __future__ import annotations

import itertools
import math

from detailer.codes.base import (
    CrackLimits,
    DesignCodeError,
    OutsideCodeScope,
    SpanDepthResult,
    SpanType,
)

# Table 7.2N: steel stress (N/mm2) -> largest bar diameter (mm) for w_k 0.4/0.3/0.2 mm.
TABLE_7_2N_SIGMA: tuple[float, ...] = (160, 200, 240, 280, 320, 360, 400, 450)
TABLE_7_2N: dict[float, tuple[float | None, ...]] = {
    0.4: (40, 32, 20, 16, 12, 10, 8, 6),
    0.3: (32, 25, 16, 12, 10, 8, 6, 5),
    0.2: (25, 16, 12, 8, 6, 5, 4, None),
}
# Table 7.3N: steel stress (N/mm2) -> largest bar spacing (mm), from memory.
TABLE_7_3N_SIGMA: tuple[float, ...] = (160, 200, 240, 280, 320, 360)
TABLE_7_3N: dict[float, tuple[float | None, ...]] = {
    0.4: (300, 300, 250, 200, 150, 100),
    0.3: (300, 250, 200, 150, 100, 50),
    0.2: (200, 150, 100, 50, None, None),
}
# Table 7.1N, reinforced members, quasi-permanent combination (EN recommended; the UK NA
# values were not available and are not implemented), from memory.
TABLE_7_1N: dict[str, float] = {
    "X0": 0.4,
    "XC1": 0.4,
    **{c: 0.3 for c in ("XC2", "XC3", "XC4", "XD1", "XD2", "XD3", "XS1", "XS2", "XS3")},
}

# Table 7.4N structural system factor K.
K_TABLE_7_4N: dict[SpanType, float] = {
    SpanType.SIMPLY_SUPPORTED: 1.0,
    SpanType.END_SPAN: 1.3,
    SpanType.INTERIOR_SPAN: 1.5,
    SpanType.CANTILEVER: 0.4,
}
F_STEEL_CAP = 1.5  # UK NA cap on 310/sigma_s
CRACK_EXEMPT_H = 200.0  # mm, 7.3.3(1)


# ----------------------------------------------------------------------------- cracking


def _interp_row(sigmas: tuple[float, ...], row: tuple[float | None, ...], s: float) -> float | None:
    if s <= sigmas[0]:
        return row[0]
    for i in range(1, len(sigmas)):
        if s <= sigmas[i]:
            lo, hi = row[i - 1], row[i]
            if lo is None or hi is None:
                return None
            t = (s - sigmas[i - 1]) / (sigmas[i] - sigmas[i - 1])
            return lo + t * (hi - lo)
    return None


def _interp_table(
    sigmas: tuple[float, ...], table: dict[float, tuple[float | None, ...]], s: float, w: float
) -> float | None:
    if w < 0.2 - 1e-9:
        raise OutsideCodeScope(
            f"crack width w_max = {w} mm is below the 0.2 mm of Tables 7.2N/7.3N; "
            "calculate crack widths directly (7.3.4)"
        )
    w = min(w, 0.4)  # the tables stop at 0.4 mm: larger limits use that row (safe side)
    rows = sorted(table)
    for w_lo, w_hi in itertools.pairwise(rows):
        if w_lo - 1e-9 <= w <= w_hi + 1e-9:
            v_lo = _interp_row(sigmas, table[w_lo], s)
            v_hi = _interp_row(sigmas, table[w_hi], s)
            if abs(w - w_lo) < 1e-9:
                return v_lo
            if abs(w - w_hi) < 1e-9:
                return v_hi
            if v_lo is None or v_hi is None:
                return None
            return v_lo + (w - w_lo) / (w_hi - w_lo) * (v_hi - v_lo)
    raise AssertionError("unreachable: w clamped to the table range")


def phi_s_max_table(sigma_s: float, w_k: float) -> float | None:
    """Largest bar diameter phi*_s (mm) from Table 7.2N, interpolated; None where none.

    EN 1992-1-1:2004, Table 7.2N.
    """
    return _interp_table(TABLE_7_2N_SIGMA, TABLE_7_2N, sigma_s, w_k)


def s_max_table(sigma_s: float, w_k: float) -> float | None:
    """Largest bar spacing (mm) from Table 7.3N, interpolated; None where none.

    EN 1992-1-1:2004, Table 7.3N.
    """
    return _interp_table(TABLE_7_3N_SIGMA, TABLE_7_3N, sigma_s, w_k)


def phi_s_modified(
    phi_star: float,
    h: float,
    d: float,
    f_ct_eff: float,
    k_c: float = 0.4,
    h_cr: float | None = None,
) -> float:
    """Bar-size limit adjusted to the section in bending: phi*_s (f_ct,eff/2.9) k_c h_cr/(2(h-d)).

    h_cr (depth of the tension zone just before cracking) defaults to h/2.

    EN 1992-1-1:2004, Eq. (7.6N).
    """
    if not 0.0 < d < h:
        raise DesignCodeError(f"effective depth d = {d} mm must lie within h = {h} mm")
    depth_cr = 0.5 * h if h_cr is None else h_cr
    return phi_star * (f_ct_eff / 2.9) * k_c * depth_cr / (2.0 * (h - d))


def crack_control_exempt(h: float) -> bool:
    """True for slabs in buildings in bending with h <= 200 mm (detailed to 9.3).

    EN 1992-1-1:2004, 7.3.3(1).
    """
    return h <= CRACK_EXEMPT_H


def w_max_recommended(exposure: str) -> float:
    """Limiting crack width (mm) for reinforced members under quasi-permanent loads.

    EN recommended values; UK NA values not implemented.

    EN 1992-1-1:2004, Table 7.1N.
    """
    key = exposure.strip().upper()
    if key not in TABLE_7_1N:
        raise DesignCodeError(
            f"exposure class {exposure!r} not known; use one of {', '.join(TABLE_7_1N)}"
        )
    return TABLE_7_1N[key]


def crack_limits(
    sigma_s: float,
    w_max: float,
    h: float,
    d: float | None = None,
    f_ct_eff: float | None = None,
) -> CrackLimits:
    """Bar-size and spacing limits for crack control, with the h <= 200 mm exemption.

    When ``d`` and ``f_ct_eff`` are given the bar-size limit is adjusted by Eq. (7.6N).

    EN 1992-1-1:2004, 7.3.3(1), 7.3.3(2), Table 7.2N, Table 7.3N.
    """
    if sigma_s < 0.0 or w_max <= 0.0:
        raise DesignCodeError(
            f"steel stress {sigma_s} N/mm2 and crack width {w_max} mm must be positive"
        )
    phi = phi_s_max_table(sigma_s, w_max)
    basis = "Tables 7.2N/7.3N"
    if phi is not None and d is not None and f_ct_eff is not None:
        phi = phi_s_modified(phi, h, d, f_ct_eff)
        basis = "Table 7.2N with Eq. (7.6N), Table 7.3N"
    exempt = crack_control_exempt(h)
    if exempt:
        basis = f"7.3.3(1): h = {h:.0f} mm <= 200 mm, no specific measures ({basis} for info)"
    return CrackLimits(
        sigma_s=sigma_s,
        w_max=w_max,
        phi_max=phi,
        s_max=s_max_table(sigma_s, w_max),
        exempt=exempt,
        basis=basis,
    )


def steel_stress_qp(
    f_yk: float,
    gamma_s: float,
    m_qp: float,
    m_ed: float,
    A_s_req: float,
    A_s_prov: float,
    delta: float = 1.0,
) -> float:
    """Steel stress under quasi-permanent loads, N/mm2 (common UK simplification).

    sigma_s = (f_yk/gamma_s)(M_qp/M_Ed)(A_s,req/A_s,prov)/delta: the design stress scaled by
    the ratio of quasi-permanent to ULS moment and by the steel provided (Concrete Centre
    "How to design concrete structures using Eurocode 2"; the 1/delta term, from memory,
    undoes redistribution when M_Ed is the redistributed moment and M_qp is elastic, so
    leave delta = 1 when both are elastic or both redistributed).

    EN 1992-1-1:2004, 7.3.3(2).
    """
    if m_ed <= 0.0 or m_qp < 0.0 or A_s_req < 0.0 or A_s_prov <= 0.0 or delta <= 0.0:
        raise DesignCodeError(
            "steel stress: M_Ed, A_s,prov and delta must be positive, M_qp and A_s,req >= 0"
        )
    return f_yk / gamma_s * (m_qp / m_ed) * (A_s_req / A_s_prov) / delta


# ----------------------------------------------------------------------------- deflection


def rho_0(f_ck: float) -> float:
    """Reference reinforcement ratio rho_0 = sqrt(f_ck) x 10^-3.

    EN 1992-1-1:2004, 7.4.2(2).
    """
    return math.sqrt(f_ck) * 1.0e-3


def l_d_basic(K: float, rho: float, f_ck: float, rho_prime: float = 0.0) -> float:
    """Basic span/effective-depth ratio from Eq. (7.16a) (rho <= rho_0) or (7.16b) (rho > rho_0).

    rho = A_s,req/(b d) at mid-span (at the support for cantilevers), rho_prime the
    compression steel ratio, both as fractions.

    EN 1992-1-1:2004, Eq. (7.16a), Eq. (7.16b).
    """
    if rho <= 0.0 or rho_prime < 0.0:
        raise DesignCodeError(f"steel ratios rho = {rho}, rho' = {rho_prime}: rho must be > 0")
    r0 = rho_0(f_ck)
    sq = math.sqrt(f_ck)
    if rho <= r0:
        return K * (11.0 + 1.5 * sq * r0 / rho + 3.2 * sq * (r0 / rho - 1.0) ** 1.5)
    if rho <= rho_prime:
        raise DesignCodeError(f"rho' = {rho_prime} must be below rho = {rho} in Eq. (7.16b)")
    return K * (11.0 + 1.5 * sq * r0 / (rho - rho_prime) + sq * math.sqrt(rho_prime / r0) / 12.0)


def F_steel(f_yk: float, A_s_req: float, A_s_prov: float) -> float:
    """Steel-stress factor 310/sigma_s = 500/(f_yk A_s,req/A_s,prov), capped at 1.5 (UK NA).

    EN 1992-1-1:2004, Eq. (7.17), 7.4.2(2) + UK NA.
    """
    if A_s_req <= 0.0 or A_s_prov <= 0.0:
        raise DesignCodeError("span/depth: A_s,req and A_s,prov must be positive")
    return min(500.0 / (f_yk * A_s_req / A_s_prov), F_STEEL_CAP)


def F_span(l_eff: float) -> float:
    """Long-span factor 7/l_eff (l_eff in m) for spans over 7 m, else 1.0; l_eff in mm.

    Applies where the span supports partitions liable to be damaged by deflection.

    EN 1992-1-1:2004, 7.4.2(2).
    """
    return 7000.0 / l_eff if l_eff > 7000.0 else 1.0


def span_depth_limit(
    span_type: SpanType,
    f_ck: float,
    f_yk: float,
    A_s_req: float,
    A_s_prov: float,
    b: float,
    d: float,
    l_eff: float,
    A_s_comp: float = 0.0,
    partitions_liable_to_damage: bool = True,
) -> SpanDepthResult:
    """Permitted span/effective-depth ratio of a slab span (lengths mm, areas mm2 over b).

    The 7/l_eff factor applies to spans over 7 m carrying partitions liable to damage
    (default, on the safe side).

    EN 1992-1-1:2004, 7.4.2, Eq. (7.16a), Eq. (7.16b), Table 7.4N + UK NA.
    """
    K = K_TABLE_7_4N[span_type]
    rho = A_s_req / (b * d)
    basic = l_d_basic(K, rho, f_ck, A_s_comp / (b * d))
    fs = F_steel(f_yk, A_s_req, A_s_prov)
    fl = F_span(l_eff) if partitions_liable_to_damage else 1.0
    return SpanDepthResult(
        span_type=span_type,
        K=K,
        rho=rho,
        rho_0=rho_0(f_ck),
        l_d_basic=basic,
        F_steel=fs,
        F_span=fl,
        l_d_limit=basic * fs * fl,
    )
