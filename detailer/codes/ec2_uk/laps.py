"""Lap lengths of ribbed bars: EN 1992-1-1:2004 8.7.3.

l_0 = alpha_1 alpha_2 alpha_3 alpha_5 alpha_6 l_b,rqd >= l_0,min (8.10), with
alpha_6 = (rho_1/25)^0.5 limited to 1.0..1.5 (Table 8.3 prints 1.0 / 1.15 / 1.4 / 1.5 for
<= 25 / 33 / 50 / > 50 % lapped) and l_0,min = max(0.3 alpha_6 l_b,rqd, 15 phi, 200) (8.11).
alpha_1..alpha_5 are those of Table 8.2 (anchorage); the limit alpha_2 alpha_3 alpha_5 >= 0.7
of Eq. (8.5) is applied to laps too (from memory: Eq. (8.5) sits with Table 8.2, which
8.7.3(1) refers to). No UK NA parameters enter these rules.
"""

from __future__ import annotations

import math

from detailer.codes.base import AnchorageCase, DesignCodeError, LapResult
from detailer.codes.ec2_uk.anchorage import ALPHA_MIN, anchorage


def alpha_6(rho_1: float) -> float:
    """Lap coefficient alpha_6 = (rho_1/25)^0.5, limited 1.0..1.5; rho_1 in percent lapped.

    rho_1 is the share of bars lapped within 0.65 l_0 of the centre of the lap considered.

    EN 1992-1-1:2004, Eq. (8.10), Table 8.3.
    """
    if not 0.0 <= rho_1 <= 100.0:
        raise DesignCodeError(f"percentage of bars lapped {rho_1} must be within 0..100")
    return max(1.0, min(1.5, math.sqrt(rho_1 / 25.0)))


def l_0_min(alpha_6: float, l_b_rqd: float, phi: float) -> float:
    """Minimum lap length l_0,min = max(0.3 alpha_6 l_b,rqd, 15 phi, 200), mm.

    EN 1992-1-1:2004, Eq. (8.11).
    """
    return max(0.3 * alpha_6 * l_b_rqd, 15.0 * phi, 200.0)


def l_0(
    l_b_rqd: float,
    alpha_1: float = 1.0,
    alpha_2: float = 1.0,
    alpha_3: float = 1.0,
    alpha_5: float = 1.0,
    alpha_6: float = 1.0,
    l_0_min: float = 0.0,
) -> float:
    """Design lap length l_0 = alpha_1 alpha_2 alpha_3 alpha_5 alpha_6 l_b,rqd >= l_0,min, mm.

    EN 1992-1-1:2004, Eq. (8.10).
    """
    a235 = max(alpha_2 * alpha_3 * alpha_5, ALPHA_MIN)
    return max(alpha_1 * a235 * alpha_6 * l_b_rqd, l_0_min)


def lap(case: AnchorageCase, f_ctd: float, percent_lapped: float) -> LapResult:
    """All terms of the design lap length of one bar.

    EN 1992-1-1:2004, 8.7.3(1).
    """
    anch = anchorage(case, f_ctd)
    a6 = alpha_6(percent_lapped)
    lmin = l_0_min(a6, anch.l_b_rqd, case.phi)
    length = l_0(anch.l_b_rqd, anch.alpha_1, anch.alpha_2, anch.alpha_3, anch.alpha_5, a6, lmin)
    return LapResult(
        anchorage=anch, percent_lapped=percent_lapped, alpha_6=a6, l_0_min=lmin, l_0=length
    )
