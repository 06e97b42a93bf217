"""Typed results of design and detailing: zones, bar sets and the detailed strip.

These objects are what the writers (record, schedule, drawing, report) format. Every length
is in mm along the strip (x from the strip's left end, as in ``analysis.beam``); areas are
mm2 per metre width; moments kNm per metre width.

Layers follow the trade's usual naming: T1 is the outer top layer, T2 the next one down;
B1 the outer bottom layer, B2 the next one up. In a one-way slab the principal bars sit in
T1/B1 and the transverse distribution bars in T2/B2 (common practice).
"""

from __future__ import annotations

import enum
from dataclasses import dataclass
from typing import TYPE_CHECKING

from detailer.shapes.bs8666 import ScheduledShape

if TYPE_CHECKING:
    from detailer.model import Project, Strip
    from detailer.strip_analysis import StripAnalysis


class Face(enum.Enum):
    TOP = "top"
    BOTTOM = "bottom"


class BarRole(enum.Enum):
    PRINCIPAL = "principal"  # along the strip, resisting the strip's moments
    DISTRIBUTION = "distribution"  # across the strip, EN 1992-1-1 9.3.1.1(2)


@dataclass(frozen=True, slots=True)
class Check:
    """One design check: demand against capacity or a limit, with its clause."""

    name: str
    clause: str  # e.g. "EN 1992-1-1:2004, 9.3.1.1(3)"
    demand: float
    capacity: float
    unit: str
    ok: bool
    note: str = ""

    @property
    def utilisation(self) -> float:
        """Demand over capacity (> 1 fails); 0 when the capacity is infinite or zero demand."""
        if self.capacity == 0:
            return float("inf") if self.demand > 0 else 0.0
        return abs(self.demand) / abs(self.capacity)


@dataclass(frozen=True, slots=True)
class ZoneDesign:
    """Flexural design of one zone: bottom of a span, or top over a support or cantilever."""

    zone_id: str  # e.g. "S2-B" (span 2 bottom), "C-T" (support C top)
    description: str  # e.g. "span 2, bottom", "support C, top"
    face: Face
    x_from_mm: float
    x_to_mm: float
    x_peak_mm: float
    m_ed_knm_per_m: float  # design moment (magnitude) used for the zone
    d_mm: float
    k: float
    k_prime: float
    z_mm: float
    as_req_mm2_per_m: float  # from flexure alone
    as_min_mm2_per_m: float
    as_max_mm2_per_m: float
    as_design_mm2_per_m: float  # governing requirement: max(flexure, minimum, detailing rules)
    governing: str  # which requirement governs as_design (e.g. "flexure", "A_s,min 9.2.1.1(1)")
    phi_mm: int
    spacing_mm: int
    as_prov_mm2_per_m: float
    user_fixed: bool
    checks: tuple[Check, ...]


@dataclass(frozen=True, slots=True)
class BarSet:
    """A set of identical bars laid at one spacing.

    Principal bars run along the strip from ``x_start_mm`` to ``x_end_mm`` and are repeated
    across the panel width at ``spacing_mm`` (``offset_mm`` shifts a staggered group across the
    panel). Distribution bars run across the panel and are repeated along the strip between
    ``x_start_mm`` and ``x_end_mm`` at ``spacing_mm``.
    """

    strip_id: str
    set_id: str  # stable, readable id within the strip, e.g. "S2-B-a" (before marks exist)
    role: BarRole
    layer: str  # "T1", "T2", "B1", "B2"
    zone_id: str
    bar_type: str  # e.g. "H" (BS 8666 notation of steel)
    phi_mm: int
    spacing_mm: int
    offset_mm: float
    count: int  # bars in one member (the strip's panel)
    x_start_mm: float
    x_end_mm: float
    shape: ScheduledShape
    mark: str = ""  # assigned by detailer.marks; the key joining drawing, schedule and record
    note: str = ""  # e.g. "alternate bars", "lapped with 05 over support C"

    @property
    def callout(self) -> str:
        """The trade's bar callout: number, type and size, mark, spacing, layer (e.g. 25H12-03-200 B1)."""
        return (
            f"{self.count}{self.bar_type}{self.phi_mm}-{self.mark}-{self.spacing_mm} {self.layer}"
        )


@dataclass(frozen=True, slots=True)
class AnchorageLength:
    """Anchorage and lap lengths used for one bar size in one layer."""

    phi_mm: int
    layer: str
    bond: str  # "good" or "poor", EN 1992-1-1 8.4.2(2)
    f_bd_mpa: float
    l_b_rqd_mm: float
    l_bd_mm: float
    l_0_mm: float  # lap length used where bars are lapped


@dataclass(frozen=True, slots=True)
class SelfCheck:
    """M_Rd(x) of the provided bars against the shifted M_Ed envelope, both faces."""

    utilisation_max: float
    x_at_mm: float
    face: Face
    ok: bool


@dataclass(frozen=True, slots=True)
class StripDetail:
    """Everything designed and detailed for one strip."""

    strip: Strip
    analysis: StripAnalysis
    zones: tuple[ZoneDesign, ...]
    bar_sets: tuple[BarSet, ...]
    anchorage: tuple[AnchorageLength, ...]
    selfcheck: SelfCheck
    checks: tuple[Check, ...]  # strip-level: deflection, shear, cover, redistribution limits
    resistance: tuple = ()  # (top, bottom) selfcheck.FaceResistance curves, for the report


@dataclass(frozen=True, slots=True)
class ProjectDetail:
    """The detailed project: the input model and one StripDetail per strip, in input order.

    ``not_detailed``: ids of the project's strips that could not be designed and are left
    out of this issue (the drawing's sheets then say the issue is incomplete)."""

    project: Project
    strips: tuple[StripDetail, ...]
    not_detailed: tuple[str, ...] = ()
