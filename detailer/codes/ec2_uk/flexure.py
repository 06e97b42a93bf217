"""Bending of singly reinforced rectangular sections: EN 1992-1-1:2004 6.1 with 3.1.7(3).

Method: the UK simplified rectangular-block method of the Concrete Centre guide "How to
design concrete structures using Eurocode 2" (alpha_cc = 0.85, gamma_c = 1.5, lambda = 0.8,
eta = 1, valid for f_ck <= 50 N/mm2):

* K = M / (b d^2 f_ck)
* K' = 0.598 delta - 0.18 delta^2 - 0.21 (the guide's 2nd-edition variant, pinned here;
  delta = 1 gives 0.208). It follows from the UK NA limit x_u/d <= delta - 0.4 of 5.5(4).
  The guide notes that K is often limited to 0.168 in the UK to ensure ductile failure;
  results above that carry a note.
* z = d [0.5 + sqrt(0.25 - K/1.134)] <= 0.95 d (the cap is the guide's good practice,
  not an EC2 rule).
* A_s = M / (f_yd z).

Moments are kNm acting on the width b (kNm per metre for a 1 m slab strip, b = 1000 mm).
"""

from __future__ import annotations

import math

from detailer.codes.base import (
    CompressionSteelRequired,
    DesignCodeError,
    FlexureResult,
    OutsideCodeScope,
)

Z_CAP_OVER_D = 0.95  # good practice cap on the lever arm (How-to guide)
K_UK_DUCTILITY = 0.168  # UK recommendation for ductile failure (How-to guide, Table note)
BLOCK_CONSTANT = 1.134  # 2 alpha_cc/gamma_c rounded as printed in the guide (0.567 x 2)
LAMBDA = 0.8  # depth factor of the rectangular stress block, f_ck <= 50


def K_factor(m_ed_knm: float, b: float, d: float, f_ck: float) -> float:
    """Normalised design moment K = M_Ed/(b d^2 f_ck), with M_Ed in kNm over width b (mm).

    EN 1992-1-1:2004, 6.1, 3.1.7(3).
    """
    return m_ed_knm * 1.0e6 / (b * d * d * f_ck)


def K_prime(delta: float) -> float:
    """Limit of K for a singly reinforced section: 0.598 delta - 0.18 delta^2 - 0.21.

    The delta used is capped at 1.0 (sections whose moment was increased keep the
    delta = 1 limit, x_u/d <= 0.6).

    EN 1992-1-1:2004, 5.5(4) + UK NA.
    """
    dl = min(delta, 1.0)
    return 0.598 * dl - 0.18 * dl * dl - 0.21


def lever_arm(d: float, K: float, cap_over_d: float | None = Z_CAP_OVER_D) -> float:
    """Lever arm z = d [0.5 + sqrt(0.25 - K/1.134)] in mm, capped at 0.95 d unless cap is None.

    EN 1992-1-1:2004, 3.1.7(3).
    """
    z = _lever_arm_uncapped(d, K)
    return z if cap_over_d is None else min(z, cap_over_d * d)


def _lever_arm_uncapped(d: float, K: float) -> float:
    root = 0.25 - K / BLOCK_CONSTANT
    if root < 0.0:
        raise CompressionSteelRequired(
            f"K = {K:.3f} exceeds the capacity of the concrete block; deepen the slab"
        )
    return d * (0.5 + math.sqrt(root))


def x_u_over_d(z: float, d: float) -> float:
    """Neutral-axis depth ratio x_u/d = (1 - z/d)/(lambda/2) for the uncapped lever arm z.

    EN 1992-1-1:2004, 3.1.7(3).
    """
    return (1.0 - z / d) / (LAMBDA / 2.0)


def A_s_required(m_ed_knm: float, f_yd: float, z: float) -> float:
    """Tension steel A_s = M_Ed/(f_yd z) in mm2, M_Ed in kNm over the section width.

    EN 1992-1-1:2004, 6.1.
    """
    return m_ed_knm * 1.0e6 / (f_yd * z)


def design_singly_reinforced(
    m_ed_knm: float, b: float, d: float, f_ck: float, f_yd: float, delta: float = 1.0
) -> FlexureResult:
    """Design a singly reinforced rectangular section; refuse when K > K'.

    ``m_ed_knm`` is the magnitude of the moment on width ``b`` (kNm per metre for a slab
    strip with b = 1000 mm). Raises :class:`CompressionSteelRequired` when K > K'.

    EN 1992-1-1:2004, 6.1, 3.1.7(3), 5.5(4) + UK NA.
    """
    if not math.isfinite(m_ed_knm) or m_ed_knm < 0.0:
        raise DesignCodeError(
            f"design moment {m_ed_knm} kNm: pass its magnitude (>= 0); the caller picks the face"
        )
    if b <= 0.0 or d <= 0.0:
        raise DesignCodeError(f"section b = {b} mm, d = {d} mm: both must be positive")
    if f_ck > 50.0:
        raise OutsideCodeScope(
            f"f_ck = {f_ck} N/mm2: the simplified K' method is implemented up to C50/60 only"
        )
    if not 0.7 <= delta <= 1.3:
        raise DesignCodeError(f"redistribution ratio delta = {delta} is outside 0.7..1.3")
    K = K_factor(m_ed_knm, b, d, f_ck)
    Kp = K_prime(delta)
    if K > Kp:
        raise CompressionSteelRequired(
            f"M_Ed = {m_ed_knm:.1f} kNm on b = {b:.0f} mm, d = {d:.0f} mm needs compression "
            f"steel (K = {K:.3f} > K' = {Kp:.3f}); increase the slab depth or the concrete class"
        )
    z_free = _lever_arm_uncapped(d, K)
    z = min(z_free, Z_CAP_OVER_D * d)
    notes: tuple[str, ...] = ()
    if K > K_UK_DUCTILITY:
        note = (
            f"K = {K:.3f} > {K_UK_DUCTILITY}: UK guidance recommends limiting K to "
            f"{K_UK_DUCTILITY} to ensure ductile failure"
        )
        notes = (note,)
    return FlexureResult(
        m_ed_knm=m_ed_knm,
        b=b,
        d=d,
        delta=delta,
        K=K,
        K_prime=Kp,
        z=z,
        z_over_d=z / d,
        x_u_over_d=x_u_over_d(z_free, d),
        A_s_req=A_s_required(m_ed_knm, f_yd, z),
        notes=notes,
    )
