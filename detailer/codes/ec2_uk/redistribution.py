"""Limits on linear analysis with limited redistribution: EN 1992-1-1:2004 5.5(4) + UK NA.

delta >= k1 + k2 x_u/d (f_ck <= 50) or k3 + k4 x_u/d (f_ck > 50), and delta >= k5 (steel
class B or C) or k6 (class A). UK NA: k1 = k3 = 0.4, k2 = k4 = 0.6 + 0.0014/eps_cu2 (1.0 up
to C50/60), k5 = 0.7, k6 = 0.8 (the EN recommends k1 = 0.44, k2 = 1.25(0.6 + 0.0014/eps_cu2),
k3 = 0.54). The k1..k4 UK values are from memory, consistent with the UK K' formula; k5/k6
are read in a published UK guide. Redistribution applies to continuous beams and slabs
predominantly in flexure whose adjacent spans are in the ratio 0.5..2.
"""

from __future__ import annotations

from detailer.codes.base import DesignCodeError, RedistributionLimits

SPAN_RATIO_MIN = 0.5
SPAN_RATIO_MAX = 2.0


def k1_k2(f_ck: float, eps_cu2: float) -> tuple[float, float]:
    """UK NA coefficients (k1, k2), or (k3, k4) above C50/60, of the delta limit.

    EN 1992-1-1:2004, 5.5(4) + UK NA.
    """
    slope = 0.6 + 0.0014 / eps_cu2
    # UK NA: the same intercept 0.4 above and below C50/60 (k1 = k3).
    return 0.4, slope


def delta_min_ductility(ductility_class: str) -> float:
    """Lowest redistribution ratio for the steel class: 0.7 (B, C), 0.8 (A).

    EN 1992-1-1:2004, 5.5(4) + UK NA.
    """
    cls = ductility_class.strip().upper()
    if cls in ("B", "C"):
        return 0.7
    if cls == "A":
        return 0.8
    raise DesignCodeError(f"steel ductility class {ductility_class!r}: use 'A', 'B' or 'C'")


def delta_min(x_u_over_d: float, f_ck: float, eps_cu2: float, ductility_class: str) -> float:
    """Lowest redistribution ratio delta at a section with neutral-axis ratio x_u/d.

    EN 1992-1-1:2004, Eq. (5.10a), Eq. (5.10b), 5.5(4) + UK NA.
    """
    k1, k2 = k1_k2(f_ck, eps_cu2)
    return max(k1 + k2 * x_u_over_d, delta_min_ductility(ductility_class))


def span_ratio_ok(l_1: float, l_2: float) -> bool:
    """True when adjacent spans l_1, l_2 are in the ratio 0.5..2 required for redistribution.

    EN 1992-1-1:2004, 5.5(4).
    """
    if l_1 <= 0.0 or l_2 <= 0.0:
        raise DesignCodeError(f"spans {l_1} mm and {l_2} mm must be positive")
    return SPAN_RATIO_MIN <= l_1 / l_2 <= SPAN_RATIO_MAX


def redistribution_limits(
    f_ck: float, eps_cu2: float, ductility_class: str
) -> RedistributionLimits:
    """The redistribution limits as one value object.

    EN 1992-1-1:2004, 5.5(4) + UK NA.
    """
    k1, k2 = k1_k2(f_ck, eps_cu2)
    return RedistributionLimits(
        k1=k1,
        k2=k2,
        delta_min_ductility=delta_min_ductility(ductility_class),
        span_ratio_min=SPAN_RATIO_MIN,
        span_ratio_max=SPAN_RATIO_MAX,
    )
