"""Flexural design of a strip's zones: design moments, A_s,req and the choice of bars.

Zones (common practice for one-way slabs): the bottom of every span; the top over every
hogging region (internal supports, monolithic ends, cantilever roots; a region spanning
several supports is one zone); the top at a pinned end support for the partial fixity that the
analysis ignores (EN 1992-1-1 9.3.1.2(2)); nominal bottom bars in a cantilever.

Bars are chosen from the project's sizes and spacings so that A_s,prov >= the governing
requirement at least steel area (hence least mass), within the spacing rules
(EN 1992-1-1 9.3.1.1(3)) and the crack-control tables (7.3.3). Ties go to the wider spacing
(fewer bars to fix), then the smaller bar.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from detailer.bars import bar_area_mm2
from detailer.codes.base import (
    CompressionSteelRequired,
    ConcreteSteel,
    DesignCode,
    FlexureResult,
)
from detailer.demand import DemandCurve, intervals_above
from detailer.errors import DesignError
from detailer.layout import Check, Face, ZoneDesign
from detailer.model import EndKind, Project, Strip

B_MM = 1000.0  # design width: one metre of slab


@dataclass(frozen=True, slots=True)
class ZoneSpec:
    """A zone before its bars are chosen."""

    zone_id: str
    description: str
    face: Face
    kind: str  # "span", "support", "end-fixity", "cantilever-bottom"
    x_from_mm: float  # extent of the zone's demand region
    x_to_mm: float
    x_peak_mm: float
    m_ed_knm_per_m: float
    m_qp_knm_per_m: float
    supports: tuple[int, ...]  # support indices inside the zone
    segment: int | None  # the span or cantilever for span and cantilever zones
    min_as_reason: str = ""  # detailing rule that sets a minimum moment, if any


@dataclass(frozen=True, slots=True)
class BarChoice:
    phi_mm: int
    spacing_mm: int
    d_mm: float
    flexure: FlexureResult | None
    as_req_mm2_per_m: float
    as_min_mm2_per_m: float
    as_max_mm2_per_m: float
    as_design_mm2_per_m: float
    governing: str
    as_prov_mm2_per_m: float
    checks: tuple[Check, ...]


def as_per_m(phi_mm: float, spacing_mm: float) -> float:
    """Area of bars of size phi at a spacing, mm2 per metre width."""
    return bar_area_mm2(int(phi_mm)) * 1000.0 / spacing_mm


def effective_depth_mm(h_mm: float, cover_mm: float, phi_mm: float) -> float:
    """d of an outer-layer bar: h - c_nom - phi/2."""
    return h_mm - cover_mm - phi_mm / 2.0


def zone_specs(
    strip: Strip,
    top: DemandCurve,
    bottom: DemandCurve,
    top_qp: DemandCurve,
    bottom_qp: DemandCurve,
    end_top_fraction: float,
    top_extent_over_span: float,
) -> tuple[ZoneSpec, ...]:
    """The strip's zones in a stable order: bottom zones left to right, then top zones."""
    specs: list[ZoneSpec] = []
    segs = strip.segments
    sups = strip.supports
    for seg in segs:
        if seg.is_cantilever:
            specs.append(
                ZoneSpec(
                    zone_id=f"{seg.label}-B",
                    description=f"cantilever {seg.label}, bottom (nominal)",
                    face=Face.BOTTOM,
                    kind="cantilever-bottom",
                    x_from_mm=seg.x_start_mm,
                    x_to_mm=seg.x_end_mm,
                    x_peak_mm=0.5 * (seg.x_start_mm + seg.x_end_mm),
                    m_ed_knm_per_m=0.0,
                    m_qp_knm_per_m=0.0,
                    supports=(),
                    segment=seg.index,
                    min_as_reason="nominal bottom bars in a cantilever (common practice)",
                )
            )
            continue
        m, x = bottom.peak_in(seg.x_start_mm, seg.x_end_mm)
        mq, _ = bottom_qp.peak_in(seg.x_start_mm, seg.x_end_mm)
        specs.append(
            ZoneSpec(
                zone_id=f"S{seg.span_number}-B",
                description=f"span {seg.span_number} ({seg.label}), bottom",
                face=Face.BOTTOM,
                kind="span",
                x_from_mm=seg.x_start_mm,
                x_to_mm=seg.x_end_mm,
                x_peak_mm=x,
                m_ed_knm_per_m=m,
                m_qp_knm_per_m=mq,
                supports=(),
                segment=seg.index,
            )
        )
    # Top zones: hogging regions of the (capped) demand.
    covered: set[int] = set()
    # Regions of the shifted curve: two supports whose shifted hogging joins share one zone
    # (their bars would otherwise run over each other).
    for x0, x1 in intervals_above(top.x_mm, top.m_shifted_knm_per_m, 1e-6):
        inside = tuple(
            i
            for i, s in enumerate(sups)
            if x0 - s.width_mm / 2 - 1 <= s.x_mm <= x1 + s.width_mm / 2 + 1
        )
        m, x = top.peak_in(x0, x1)
        mq, _ = top_qp.peak_in(x0, x1)
        if m < 0.05:  # numerical noise, not a hogging region
            continue
        covered.update(inside)
        name = "-".join(sups[i].label for i in inside) if inside else f"x{x:.0f}"
        desc = (
            "support " + ", ".join(sups[i].label for i in inside) + ", top"
            if inside
            else f"hogging near x = {x:.0f} mm, top"
        )
        specs.append(
            ZoneSpec(
                zone_id=f"{name}-T",
                description=desc,
                face=Face.TOP,
                kind="support",
                x_from_mm=x0,
                x_to_mm=x1,
                x_peak_mm=x,
                m_ed_knm_per_m=m,
                m_qp_knm_per_m=mq,
                supports=inside,
                segment=None,
            )
        )
    # Pinned end supports: top steel for the partial fixity not designed for, 9.3.1.2(2).
    for end_idx, end in ((0, strip.left_end), (len(sups) - 1, strip.right_end)):
        if end.kind is not EndKind.PINNED or end_idx in covered:
            continue
        sup = sups[end_idx]
        seg = _span_next_to(strip, end_idx)
        if seg is None:
            continue
        m_span, _ = bottom.peak_in(seg.x_start_mm, seg.x_end_mm)
        reach = top_extent_over_span * seg.length_mm
        if end_idx == 0:
            x0, x1 = sup.x_mm - sup.width_mm / 2, sup.x_mm + sup.width_mm / 2 + reach
        else:
            x0, x1 = sup.x_mm - sup.width_mm / 2 - reach, sup.x_mm + sup.width_mm / 2
        specs.append(
            ZoneSpec(
                zone_id=f"{sup.label}-T",
                description=f"support {sup.label} (end), top",
                face=Face.TOP,
                kind="end-fixity",
                x_from_mm=x0,
                x_to_mm=x1,
                x_peak_mm=sup.x_mm,
                m_ed_knm_per_m=end_top_fraction * m_span,
                m_qp_knm_per_m=0.0,
                supports=(end_idx,),
                segment=seg.index,
                min_as_reason=(
                    f"{end_top_fraction:.0%} of the adjacent span moment, "
                    "EN 1992-1-1:2004, 9.3.1.2(2)"
                ),
            )
        )
    specs.sort(key=lambda z: (z.face is Face.TOP, z.x_from_mm))
    return tuple(specs)


def _span_next_to(strip: Strip, support_index: int):
    """The span (not cantilever) adjacent to an end support."""
    x = strip.supports[support_index].x_mm
    for seg in strip.segments:
        if seg.is_cantilever:
            continue
        if abs(seg.x_start_mm - x) < 1e-6 or abs(seg.x_end_mm - x) < 1e-6:
            return seg
    return None


def choose_bars(
    spec: ZoneSpec,
    *,
    strip: Strip,
    project: Project,
    code: DesignCode,
    mat: ConcreteSteel,
    delta: float,
    as_extra_mm2_per_m: float = 0.0,
    extra_reason: str = "",
    fixed: tuple[int, int] | None = None,
    extra_checks: Callable[[int, int, float, float], list[Check]] | None = None,
) -> BarChoice:
    """Pick the bars of one zone (or check the user's fixed bars).

    ``extra_checks(phi, spacing, as_prov, d)`` adds checks that depend on the bars (e.g. the
    anchorage at an end support); a candidate must pass them too.
    """
    h = strip.thickness_mm
    cover = strip.cover_top_mm if spec.face is Face.TOP else strip.cover_bottom_mm
    opts = project.reinforcement
    s_max = code.max_spacing(h, principal=True, high_moment_zone=spec.kind in ("span", "support"))
    w_max = code.w_max(project.materials.exposure_class)
    as_max = code.as_max(B_MM, h)
    candidates = [fixed] if fixed else [(p, s) for p in opts.diameters_mm for s in opts.spacings_mm]
    best: tuple[tuple, BarChoice] | None = None
    reasons: list[str] = []
    for phi, s in candidates:
        d = effective_depth_mm(h, cover, phi)
        flex: FlexureResult | None = None
        as_req = 0.0
        if spec.m_ed_knm_per_m > 0:
            try:
                flex = code.flexure(
                    spec.m_ed_knm_per_m, B_MM, d, mat, delta if spec.kind == "support" else 1.0
                )
            except CompressionSteelRequired as exc:
                reasons.append(str(exc))
                continue
            as_req = flex.A_s_req
        as_min = code.as_min(B_MM, d, h, mat) if spec.kind != "end-fixity" else 0.0
        needs = [(as_req, "flexure"), (as_min, "A_s,min, EN 1992-1-1:2004, 9.2.1.1(1)")]
        if as_extra_mm2_per_m > 0:
            needs.append((as_extra_mm2_per_m, extra_reason))
        as_design, governing = max(needs, key=lambda t: t[0])
        if spec.min_as_reason and spec.kind != "span" and as_design == as_req:
            governing = spec.min_as_reason
        as_prov = as_per_m(phi, s)
        checks = [
            Check(
                "A_s,prov >= A_s,design",
                "EN 1992-1-1:2004, 9.2.1.1(1)"
                if governing.startswith("A_s,min")
                else "EN 1992-1-1:2004, 6.1",
                as_design,
                as_prov,
                "mm2/m",
                as_prov >= as_design - 1e-9,
            ),
            Check(
                "A_s,prov <= A_s,max",
                "EN 1992-1-1:2004, 9.2.1.1(3)",
                as_prov,
                as_max,
                "mm2/m",
                as_prov <= as_max,
            ),
            Check("bar spacing", "EN 1992-1-1:2004, 9.3.1.1(3)", s, s_max, "mm", s <= s_max + 1e-9),
        ]
        need_cover = code.cover(
            phi, project.materials.exposure_class, "S4", opts.max_aggregate_mm
        ).c_nom
        checks.append(
            Check(
                "nominal cover for the bar size",
                "EN 1992-1-1:2004, 4.4.1",
                need_cover,
                cover,
                "mm",
                need_cover <= cover + 1e-9,
            )
        )
        if extra_checks is not None:
            checks.extend(extra_checks(phi, s, as_per_m(phi, s), d))
        if spec.m_ed_knm_per_m > 0 and spec.m_qp_knm_per_m > 0 and as_req > 0:
            sigma_s = code.steel_stress_qp(
                mat, spec.m_qp_knm_per_m, spec.m_ed_knm_per_m, as_req, as_prov, delta
            )
            lim = code.crack_limits(sigma_s, w_max, h, d)
            checks.append(_crack_check(lim, phi, s, sigma_s, w_max))
        ok = all(c.ok for c in checks)
        choice = BarChoice(
            phi_mm=phi,
            spacing_mm=s,
            d_mm=d,
            flexure=flex,
            as_req_mm2_per_m=as_req,
            as_min_mm2_per_m=as_min,
            as_max_mm2_per_m=as_max,
            as_design_mm2_per_m=as_design,
            governing=governing,
            as_prov_mm2_per_m=as_prov,
            checks=tuple(checks),
        )
        if fixed:
            if not ok:
                failed = "; ".join(c.name for c in checks if not c.ok)
                raise DesignError(
                    f"strip {strip.id}: zone {spec.zone_id}: the fixed bars {project.materials.bar_type}{phi}@{s} fail {failed}; "
                    "choose larger bars or a closer spacing in the project file"
                )
            return choice
        if not ok:
            continue
        key = (round(as_prov, 6), -s, phi)
        if best is None or key < best[0]:
            best = (key, choice)
    if best is None:
        why = (
            reasons[0]
            if reasons
            else "no allowed size and spacing satisfies area, spacing and crack rules"
        )
        raise DesignError(
            f"strip {strip.id}: zone {spec.zone_id} ({spec.description}), M_Ed = "
            f"{spec.m_ed_knm_per_m:.1f} kNm/m: {why}; thicken the slab or allow more bar sizes and spacings"
        )
    return best[1]


def _crack_check(lim, phi: int, s: int, sigma_s: float, w_max: float) -> Check:
    """Crack control without direct calculation, 7.3.3: the bar size limit (Table 7.2N) or
    the spacing limit (Table 7.3N), whichever the bars satisfy better."""
    name = "crack control (bar size or spacing)"
    clause = "EN 1992-1-1:2004, 7.3.3"
    if lim.exempt:
        return Check(name, clause + "(1)", 0.0, 1.0, "-", True, note="h <= 200 mm: exempt")
    options = []
    if lim.phi_max is not None:
        options.append((phi / lim.phi_max, phi, lim.phi_max, "mm bar size", "Table 7.2N"))
    if lim.s_max is not None:
        options.append((s / lim.s_max, s, lim.s_max, "mm spacing", "Table 7.3N"))
    stress = f"sigma_s = {sigma_s:.0f} N/mm2 (quasi-permanent), w_max = {w_max:g} mm"
    if not options:
        return Check(
            name, clause, sigma_s, 0.0, "N/mm2", False, note=stress + ": beyond the tables"
        )
    _, demand, limit, unit, table = min(options)
    return Check(
        name,
        f"{clause}, {table}",
        float(demand),
        round(float(limit), 1),
        unit,
        demand <= limit + 1e-9,
        note=stress,
    )


def zone_design(spec: ZoneSpec, choice: BarChoice, user_fixed: bool) -> ZoneDesign:
    flex = choice.flexure
    return ZoneDesign(
        zone_id=spec.zone_id,
        description=spec.description,
        face=spec.face,
        x_from_mm=spec.x_from_mm,
        x_to_mm=spec.x_to_mm,
        x_peak_mm=spec.x_peak_mm,
        m_ed_knm_per_m=spec.m_ed_knm_per_m,
        d_mm=choice.d_mm,
        k=flex.K if flex else 0.0,
        k_prime=flex.K_prime if flex else 0.0,
        z_mm=flex.z if flex else 0.95 * choice.d_mm,
        as_req_mm2_per_m=choice.as_req_mm2_per_m,
        as_min_mm2_per_m=choice.as_min_mm2_per_m,
        as_max_mm2_per_m=choice.as_max_mm2_per_m,
        as_design_mm2_per_m=choice.as_design_mm2_per_m,
        governing=choice.governing,
        phi_mm=choice.phi_mm,
        spacing_mm=choice.spacing_mm,
        as_prov_mm2_per_m=choice.as_prov_mm2_per_m,
        user_fixed=user_fixed,
        checks=choice.checks,
    )


def ceil_to(value: float, step: float) -> float:
    return math.ceil(value / step - 1e-9) * step
