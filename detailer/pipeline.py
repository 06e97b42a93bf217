"""The design and detailing pipeline for a project: analysis -> design -> curtailment -> check.

``detail_project(project, code)`` is pure: it returns a ``ProjectDetail`` or raises a
``DesignError`` (one line, naming the strip and zone and what to change).
"""

from __future__ import annotations

from detailer import simplified
from detailer import strip_checks as strip_rules
from detailer.codes.base import (
    AnchorageCase,
    ConcreteSteel,
    DesignCode,
    Layer,
)
from detailer.curtailment import (
    Anchorages,
    StripGeometry,
    principal_runs,
    run_to_barset,
)
from detailer.demand import build_curve, make_grid
from detailer.design import (
    ZoneSpec,
    choose_bars,
    effective_depth_mm,
    zone_design,
    zone_specs,
)
from detailer.errors import DesignError
from detailer.laps import split_zone_runs
from detailer.layout import (
    AnchorageLength,
    BarSet,
    Check,
    Face,
    ProjectDetail,
    StripDetail,
    ZoneDesign,
)
from detailer.model import Curtailment, Project, Strip
from detailer.secondary import distribution_set, u_bar_set
from detailer.selfcheck import face_resistance, self_check
from detailer.shapes.bs8666 import ShapeError
from detailer.strip_analysis import StripAnalysis, analyse_strip

#: Percentage of bars lapped at one section, 8.7.3(1): laps of alternate bars are staggered
#: (centres 1.3 l_0 apart), so half the bars are lapped at any section.
PERCENT_LAPPED = 50.0


def default_code(project: Project) -> DesignCode:
    """The design code object named by the project (only EN 1992-1-1 + UK NA so far)."""
    from detailer.codes.ec2_uk import EC2UK

    return EC2UK()


def detail_project(project: Project, code: DesignCode | None = None) -> ProjectDetail:
    code = code or default_code(project)
    strips = tuple(detail_strip(project, s, code) for s in project.strips)
    return ProjectDetail(project=project, strips=strips)


def _caps(
    strip: Strip, sa: StripAnalysis, project: Project
) -> tuple[tuple[float, float, float], ...]:
    """Top-demand caps over the supports: the design support moment (5.3.2.2(3)/(4))."""
    opts = project.analysis
    caps = []
    offset = 1 if strip.has_left_cantilever else 0
    summaries = {s.node: s for s in sa.uls.support_summaries()}
    for k, sup in enumerate(strip.supports):
        if sup.width_mm <= 0:
            continue
        node = k + offset
        sm = summaries[node]
        faces = [f for f in (sm.m_left_face_knm, sm.m_right_face_knm) if f is not None]
        centre = max(-sm.m_min_knm, 0.0)
        value = centre
        if opts.use_support_reduction and sm.m_min_reduced_knm is not None:
            value = max(-sm.m_min_reduced_knm, 0.0)
        elif opts.design_at_support_faces and faces:
            value = max(max(-f for f in faces), 0.0)
            # ... but not less than 0.65 of the fixed-end moment, EN 1992-1-1 5.3.2.2(3)
            value = max(value, min(centre, 0.65 * _fixed_end_moment(strip, sa, k)))
        caps.append((sup.x_mm - sup.width_mm / 2, sup.x_mm + sup.width_mm / 2, value))
    return tuple(caps)


def _fixed_end_moment(strip: Strip, sa: StripAnalysis, support_index: int) -> float:
    """Largest fixed-end moment w l^2 / 12 of the spans beside a support (uniform loads, ULS)."""
    f = sa.factors
    x = strip.supports[support_index].x_mm
    best = 0.0
    for seg in strip.segments:
        if seg.is_cantilever or not (
            abs(seg.x_start_mm - x) < 1e-6 or abs(seg.x_end_mm - x) < 1e-6
        ):
            continue
        w = (
            f.gamma_g_sup * strip.g_k_total_kn_per_m2(seg.index)
            + f.gamma_q * seg.loads.q_k_kn_per_m2
        )
        best = max(best, w * (seg.length_mm / 1000.0) ** 2 / 12.0)
    return best


def _anchorages(
    strip: Strip,
    project: Project,
    code: DesignCode,
    mat: ConcreteSteel,
    extra: tuple[int, ...] = (),
) -> Anchorages:
    """l_bd (full design stress, straight bar) and l_0 per allowed (or fixed) size and face."""
    l_bd, l_0, l_0_all = {}, {}, {}
    for face, layer, cover in (
        (Face.TOP, Layer.TOP, strip.cover_top_mm),
        (Face.BOTTOM, Layer.BOTTOM, strip.cover_bottom_mm),
    ):
        bond = code.bond_condition(strip.thickness_mm, layer)
        for phi in sorted(set(project.reinforcement.diameters_mm) | set(extra)):
            case = AnchorageCase(phi=phi, sigma_sd=mat.f_yd, bond=bond, c_d=cover)
            l_bd[(phi, face)] = code.anchorage(case, mat).l_bd
            l_0[(phi, face)] = code.lap(case, mat, PERCENT_LAPPED).l_0
            l_0_all[(phi, face)] = code.lap(case, mat, 100.0).l_0
    return Anchorages(l_bd, l_0, l_0_all)


def detail_strip(
    project: Project, strip: Strip, code: DesignCode, analysis: StripAnalysis | None = None
) -> StripDetail:
    """Design and detail one strip; ``analysis``: its analysis when already made (a floor's
    strips are analysed together, :func:`detailer.strip_analysis.analyse_strips`)."""
    sa = analysis if analysis is not None else analyse_strip(project, strip)
    m = project.materials
    mat = code.materials(m.concrete_class, m.f_yk, m.ductility_class)
    geom = StripGeometry.of(strip)
    grid = make_grid(geom.slab_left_mm, geom.slab_right_mm)
    phi_min = min(project.reinforcement.diameters_mm)
    rules_d = code.detailing_rules()
    d_top = effective_depth_mm(strip.thickness_mm, strip.cover_top_mm, phi_min)
    d_bot = effective_depth_mm(strip.thickness_mm, strip.cover_bottom_mm, phi_min)
    caps = _caps(strip, sa, project)
    st = sa.uls.stations
    qp = sa.sls_quasi_permanent
    top = build_curve(
        grid, st.x_mm, sa.uls.m_min_knm, hogging=True, caps=caps, a_l_mm=rules_d.a_l_over_d * d_top
    )
    bottom = build_curve(
        grid, st.x_mm, sa.uls.m_max_knm, hogging=False, caps=(), a_l_mm=rules_d.a_l_over_d * d_bot
    )
    top_qp = build_curve(grid, qp.stations.x_mm, qp.m_min_knm, hogging=True, caps=caps, a_l_mm=0.0)
    bottom_qp = build_curve(
        grid, qp.stations.x_mm, qp.m_max_knm, hogging=False, caps=(), a_l_mm=0.0
    )

    specs = zone_specs(
        strip,
        top,
        bottom,
        top_qp,
        bottom_qp,
        end_top_fraction=rules_d.end_support_top_fraction,
        top_extent_over_span=rules_d.top_extent_over_adjacent_span,
    )
    delta = project.analysis.redistribution_delta
    fixed = {f.zone_id: (f.phi_mm, f.spacing_mm) for f in strip.fixed_bars}
    unknown = sorted(set(fixed) - {s.zone_id for s in specs})
    if unknown:
        raise DesignError(
            f"strip {strip.id}: fixed_bars names zone {unknown[0]!r}, which this strip does not "
            f"have; its zones are {', '.join(s.zone_id for s in specs)}"
        )
    anch = _anchorages(strip, project, code, mat, tuple(p for p, _ in fixed.values()))
    strip_checks: list[Check] = []
    zones: list[ZoneDesign] = []
    spec_by_zone: dict[str, ZoneSpec] = {}
    for spec in specs:
        user = fixed.get(spec.zone_id)
        ends = strip_rules.end_anchorage_rule(spec, strip, geom, top, bottom, code, mat, anch)
        choice = choose_bars(
            spec,
            strip=strip,
            project=project,
            code=code,
            mat=mat,
            delta=delta,
            fixed=user,
            extra_checks=ends,
        )
        # Deflection, 7.4.2: span bottom zones and cantilever tops.
        seg = strip_rules.deflection_segment(strip, spec)
        if seg is not None:
            choice, chk = strip_rules.deflection(
                spec, choice, seg, strip, project, code, mat, delta, can_add=user is None
            )
            strip_checks.append(chk)
        zones.append(zone_design(spec, choice, user_fixed=user is not None))
        spec_by_zone[spec.zone_id] = spec

    simple = project.reinforcement.curtailment is Curtailment.SIMPLIFIED
    if simple:
        simplified.qualifies(strip)
    bar_type = m.bar_type
    shape_rules = _shape_rules(project)
    bar_sets: list[BarSet] = []
    opts_d = tuple(project.reinforcement.diameters_mm)
    try:
        for z in zones:
            spec = spec_by_zone[z.zone_id]
            curve = top if z.face is Face.TOP else bottom
            runs = principal_runs(
                spec,
                z,
                strip=strip,
                geom=geom,
                curve=curve,
                code=code,
                mat=mat,
                anch=anch,
                as_min_mm2_per_m=z.as_min_mm2_per_m,
                simplified_rules=simple,
            )
            pieces = split_zone_runs(
                runs,
                stock_mm=project.reinforcement.stock_length_mm,
                lap_mm=anch.l0(z.phi_mm, z.face),
                curve=curve,
                lap_all_mm=anch.l0_all(z.phi_mm, z.face),
            )
            for p in pieces:
                bar_sets.append(run_to_barset(p, strip, bar_type, shape_rules))
            if z.face is Face.TOP:
                if strip.has_left_cantilever and z.x_from_mm <= geom.slab_left_mm + 1.0:
                    bar_sets.append(u_bar_set(strip, z, geom, True, bar_type, shape_rules, opts_d))
                if strip.has_right_cantilever and z.x_to_mm >= geom.slab_right_mm - 1.0:
                    bar_sets.append(u_bar_set(strip, z, geom, False, bar_type, shape_rules, opts_d))
        bar_sets.extend(
            _distribution(strip, project, code, zones, bar_sets, anch, bar_type, shape_rules)
        )
    except ShapeError as exc:
        raise DesignError(f"strip {strip.id}: {exc}") from None

    strip_checks.extend(
        strip_rules.end_anchorage_checks(strip, sa, code, mat, zones, bar_sets, geom, anch)
    )
    strip_checks.extend(strip_rules.shear_checks(strip, sa, code, mat, zones))
    strip_checks.extend(strip_rules.cover_checks(strip, project, code, bar_sets))
    strip_checks.extend(strip_rules.redistribution_checks(strip, project, code, mat, zones))

    fr_top = face_resistance(
        tuple(bar_sets), Face.TOP, top, strip=strip, geom=geom, code=code, mat=mat, anch=anch
    )
    fr_bot = face_resistance(
        tuple(bar_sets), Face.BOTTOM, bottom, strip=strip, geom=geom, code=code, mat=mat, anch=anch
    )
    sc = self_check(fr_top, fr_bot)
    failed = [c for c in strip_checks if not c.ok] + [
        c for z in zones for c in z.checks if not c.ok
    ]
    if failed:
        c = failed[0]
        raise DesignError(
            f"strip {strip.id}: {c.name} fails ({c.clause}): {c.demand:.4g} against "
            f"{c.capacity:.4g} {c.unit}{'; ' + c.note if c.note else ''}"
        )
    if not sc.ok and simple:
        raise DesignError(
            f"strip {strip.id}: the simplified curtailment rules leave M_Rd below the shifted "
            f"M_Ed on the {sc.face.value} face at x = {sc.x_at_mm:.0f} mm (utilisation "
            f"{sc.utilisation_max:.2f}); use 'curtailment: envelope' for this slab"
        )
    if not sc.ok:
        raise DesignError(
            f"strip {strip.id}: self-check fails: M_Rd < shifted M_Ed on the {sc.face.value} face at "
            f"x = {sc.x_at_mm:.0f} mm (utilisation {sc.utilisation_max:.2f}); this is a detailing "
            "fault, please report it with the project file"
        )
    anchorage = tuple(
        AnchorageLength(
            phi_mm=phi,
            layer="T1" if face is Face.TOP else "B1",
            bond=code.bond_condition(
                strip.thickness_mm, Layer.TOP if face is Face.TOP else Layer.BOTTOM
            ).value,
            f_bd_mpa=_f_bd(code, mat, strip, face),
            l_b_rqd_mm=_l_b_rqd(code, mat, strip, face, phi),
            l_bd_mm=anch.lbd(phi, face),
            l_0_mm=anch.l0(phi, face),
        )
        for (phi, face) in sorted(
            {(b.phi_mm, Face.TOP if b.layer.startswith("T") else Face.BOTTOM) for b in bar_sets},
            key=lambda t: (t[1].value, t[0]),
        )
    )
    return StripDetail(
        strip=strip,
        analysis=sa,
        zones=tuple(zones),
        bar_sets=tuple(bar_sets),
        anchorage=anchorage,
        selfcheck=sc,
        checks=tuple(strip_checks),
        resistance=(fr_top, fr_bot),
    )


def _f_bd(code: DesignCode, mat: ConcreteSteel, strip: Strip, face: Face) -> float:
    layer = Layer.TOP if face is Face.TOP else Layer.BOTTOM
    bond = code.bond_condition(strip.thickness_mm, layer)
    case = AnchorageCase(phi=12, sigma_sd=mat.f_yd, bond=bond, c_d=strip.cover_top_mm)
    return code.anchorage(case, mat).f_bd


def _l_b_rqd(code: DesignCode, mat: ConcreteSteel, strip: Strip, face: Face, phi: int) -> float:
    layer = Layer.TOP if face is Face.TOP else Layer.BOTTOM
    bond = code.bond_condition(strip.thickness_mm, layer)
    cover = strip.cover_top_mm if face is Face.TOP else strip.cover_bottom_mm
    case = AnchorageCase(phi=phi, sigma_sd=mat.f_yd, bond=bond, c_d=cover)
    return code.anchorage(case, mat).l_b_rqd


def _shape_rules(project: Project):
    from detailer.shapes.bs8666 import DEFAULT_RULES

    return DEFAULT_RULES


def _distribution(strip, project, code, zones, bar_sets, anch, bar_type, rules) -> list[BarSet]:
    out: list[BarSet] = []
    for z in zones:
        principal = [b for b in bar_sets if b.zone_id == z.zone_id and not b.set_id.endswith("-U")]
        if not principal:
            continue
        x0 = min(b.x_start_mm for b in principal)
        x1 = max(b.x_end_mm for b in principal)
        out.extend(
            distribution_set(
                strip,
                project,
                code,
                set_id=f"{z.zone_id}-D",
                zone_id=z.zone_id,
                face=z.face,
                x_start_mm=x0,
                x_end_mm=x1,
                as_principal_mm2_per_m=z.as_prov_mm2_per_m,
                bar_type=bar_type,
                rules=rules,
                lap_for=anch.l0_all,
            )
        )
    return out


__all__ = ["default_code", "detail_project", "detail_strip"]
