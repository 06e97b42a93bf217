"""Bending resistance of a singly reinforced rectangular section with yielded steel.

EN 1992-1-1:2004, 3.1.7(3): rectangular stress block, lambda = 0.8 and eta = 1.0 for
f_ck <= 50 MPa, over the depth x; the steel at f_yd (6.1(2)P equilibrium). The lever arm is
capped at 0.95 d as in the design method, so that resistance and design are consistent.
"""

from __future__ import annotations

from detailer.codes.ec2_uk.flexure import Z_CAP_OVER_D

LAMBDA = 0.8  # depth factor of the rectangular stress block, f_ck <= 50 MPa
ETA = 1.0  # strength factor of the rectangular stress block, f_ck <= 50 MPa


def moment_resistance_knm(A_s: float, b: float, d: float, f_cd: float, f_yd: float) -> float:
    """M_Rd = A_s f_yd z with z = d - lambda x / 2, z <= 0.95 d; in kNm over the width b.

    EN 1992-1-1:2004, 3.1.7(3).
    """
    if A_s <= 0:
        return 0.0
    x = A_s * f_yd / (ETA * f_cd * LAMBDA * b)
    z = min(d - LAMBDA * x / 2.0, Z_CAP_OVER_D * d)
    return A_s * f_yd * max(z, 0.0) / 1.0e6
