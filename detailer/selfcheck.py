"""Self-check of the final bar layout: M_Rd(x) >= shifted M_Ed(x) on both faces.

Computed from the bar sets alone (not from the zone design): each principal bar set counts
with its area per metre, built up linearly over l_bd from each of its ends (an end turned into
a leg starts its build-up the leg's length earlier, the leg being part of the anchorage). The
demand is the shifted envelope (EN 1992-1-1:2004, 9.2.1.3(2)); the resistance at each point
comes from the design code's section resistance for the total area at its mean depth.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from detailer.codes.base import ConcreteSteel, DesignCode
from detailer.curtailment import Anchorages, StripGeometry
from detailer.demand import DemandCurve
from detailer.design import B_MM, as_per_m, effective_depth_mm
from detailer.layout import BarRole, BarSet, Face, SelfCheck
from detailer.model import Strip

#: Demands below this are treated as zero (kNm per m): rounding noise at contraflexure.
NEGLIGIBLE_KNM = 0.05


@dataclass(frozen=True, slots=True)
class FaceResistance:
    face: Face
    x_mm: np.ndarray
    m_rd_knm_per_m: np.ndarray
    m_ed_shifted_knm_per_m: np.ndarray

    @property
    def utilisation(self) -> np.ndarray:
        demand = np.where(
            self.m_ed_shifted_knm_per_m > NEGLIGIBLE_KNM, self.m_ed_shifted_knm_per_m, 0.0
        )
        with np.errstate(divide="ignore", invalid="ignore"):
            u = np.where(demand > 0, demand / np.maximum(self.m_rd_knm_per_m, 1e-12), 0.0)
        return u


def _leg_at_ends(bar: BarSet, geom: StripGeometry) -> tuple[float, float]:
    """Leg lengths at the left and right ends, read from the shape and where the bar ends."""
    code = bar.shape.code
    if code == "11":
        leg = float(bar.shape.dim("B"))
        if abs(bar.x_start_mm - geom.bar_left_mm) < 1.0:
            return leg, 0.0
        return 0.0, leg
    if code == "21" and bar.set_id.endswith("-U"):
        # U-bar at a free edge: its top leg is anchored at the edge by the bend and bottom leg.
        rest = float(bar.shape.dim("B") + bar.shape.dim("C"))
        if abs(bar.x_start_mm - geom.bar_left_mm) < 1.0:
            return rest, 0.0
        return 0.0, rest
    if code == "21":
        return float(bar.shape.dim("A")), float(bar.shape.dim("C"))
    return 0.0, 0.0


def face_resistance(
    bars: tuple[BarSet, ...],
    face: Face,
    curve: DemandCurve,
    *,
    strip: Strip,
    geom: StripGeometry,
    code: DesignCode,
    mat: ConcreteSteel,
    anch: Anchorages,
) -> FaceResistance:
    layer = "T1" if face is Face.TOP else "B1"
    cover = strip.cover_top_mm if face is Face.TOP else strip.cover_bottom_mm
    x = curve.x_mm
    area = np.zeros_like(x)
    area_d = np.zeros_like(x)
    for bar in bars:
        if bar.role is not BarRole.PRINCIPAL or bar.layer != layer:
            continue
        a = as_per_m(bar.phi_mm, bar.spacing_mm)
        l_bd = anch.lbd(bar.phi_mm, face)
        left_leg, right_leg = _leg_at_ends(bar, geom)
        left_eff = bar.x_start_mm - left_leg
        right_eff = bar.x_end_mm + right_leg
        inside = (x >= bar.x_start_mm - 1e-6) & (x <= bar.x_end_mm + 1e-6)
        frac = np.clip(np.minimum(x - left_eff, right_eff - x) / l_bd, 0.0, 1.0) * inside
        d = effective_depth_mm(strip.thickness_mm, cover, bar.phi_mm)
        area += a * frac
        area_d += a * frac * d
    m_rd = np.zeros_like(x)
    nz = np.flatnonzero(area > 1e-9)
    if len(nz):
        # The area is constant along most of the strip: one resistance per distinct
        # (area, depth) pair, rounded far below any engineering significance.
        pairs = np.round(np.column_stack((area[nz], area_d[nz] / area[nz])), 6)
        unique, inverse = np.unique(pairs, axis=0, return_inverse=True)
        values = np.array(
            [code.moment_resistance(float(a), B_MM, float(d), mat) for a, d in unique]
        )
        m_rd[nz] = values[inverse.reshape(-1)]
    # Inside an end support the moment passes into the support at its face: no check there.
    demand = np.where(
        (x >= geom.check_left_mm - 1e-6) & (x <= geom.check_right_mm + 1e-6),
        curve.m_shifted_knm_per_m,
        0.0,
    )
    return FaceResistance(face, x, m_rd, demand)


def self_check(top: FaceResistance, bottom: FaceResistance) -> SelfCheck:
    """Largest utilisation over both faces and where it occurs."""
    best = (0.0, 0.0, Face.BOTTOM)
    for fr in (bottom, top):
        u = fr.utilisation
        if len(u) == 0:
            continue
        i = int(np.argmax(u))
        if u[i] > best[0]:
            best = (float(u[i]), float(fr.x_mm[i]), fr.face)
    return SelfCheck(
        utilisation_max=best[0], x_at_mm=best[1], face=best[2], ok=best[0] <= 1.0 + 1e-6
    )
