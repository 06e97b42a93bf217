"""Shear resistance of members without shear reinforcement: EN 1992-1-1:2004 6.2.2.

V_Rd,c = [C_Rd,c k (100 rho_l f_ck)^(1/3)] b_w d >= v_min b_w d, no axial force
(sigma_cp = 0), C_Rd,c = 0.18/gamma_c, k = 1 + sqrt(200/d) <= 2.0, rho_l <= 0.02,
v_min = 0.035 k^1.5 f_ck^0.5. Under the UK NA the shear strength of concrete above C50/60
is limited to that of C50/60, so f_ck is capped at 50 N/mm2 here.
"""

from __future__ import annotations

import math

from detailer.codes.base import DesignCodeError
from detailer.codes.ec2_uk.materials import GAMMA_C

F_CK_SHEAR_CAP = 50.0  # UK NA, N/mm2
RHO_L_CAP = 0.02  # 6.2.2(1)


def k_size(d: float) -> float:
    """Size factor k = 1 + sqrt(200/d) <= 2.0, d in mm.

    EN 1992-1-1:2004, 6.2.2(1).
    """
    return min(1.0 + math.sqrt(200.0 / d), 2.0)


def C_Rd_c(gamma_c: float = GAMMA_C) -> float:
    """Coefficient C_Rd,c = 0.18/gamma_c.

    EN 1992-1-1:2004, 6.2.2(1) + UK NA.
    """
    return 0.18 / gamma_c


def v_min(k: float, f_ck: float) -> float:
    """Minimum shear strength v_min = 0.035 k^1.5 f_ck^0.5, N/mm2 (f_ck capped at 50).

    EN 1992-1-1:2004, Eq. (6.3N), 3.1.2(2)P + UK NA.
    """
    return 0.035 * k**1.5 * math.sqrt(min(f_ck, F_CK_SHEAR_CAP))


def v_rd_c_stress(d: float, rho_l: float, f_ck: float, gamma_c: float = GAMMA_C) -> float:
    """Shear strength v_Rd,c of a section without shear steel, N/mm2 (sigma_cp = 0).

    ``rho_l`` = A_sl/(b_w d) of tension steel anchored l_bd + d beyond the section; it is
    capped at 0.02 as the clause defines it. f_ck is capped at 50 N/mm2 (UK NA).

    EN 1992-1-1:2004, Eq. (6.2.a), Eq. (6.2.b), 3.1.2(2)P + UK NA.
    """
    if d <= 0.0:
        raise DesignCodeError(f"effective depth d = {d} mm must be positive")
    if rho_l < 0.0:
        raise DesignCodeError(f"tension steel ratio rho_l = {rho_l} must not be negative")
    k = k_size(d)
    fck = min(f_ck, F_CK_SHEAR_CAP)
    rho = min(rho_l, RHO_L_CAP)
    v_c = C_Rd_c(gamma_c) * k * (100.0 * rho * fck) ** (1.0 / 3.0)
    return max(v_c, v_min(k, fck))


def v_rd_c_kn_per_m(d: float, rho_l: float, f_ck: float, gamma_c: float = GAMMA_C) -> float:
    """Shear resistance V_Rd,c of a slab without shear steel, kN per metre width.

    EN 1992-1-1:2004, Eq. (6.2.a), Eq. (6.2.b), 3.1.2(2)P + UK NA.
    """
    # v (N/mm2) x 1000 mm x d (mm) = N per metre; / 1000 gives kN per metre.
    return v_rd_c_stress(d, rho_l, f_ck, gamma_c) * d
