"""The design and detailing pipeline for a project: analysis -> design -> curtailment -> check.

``detail_project(project, code)`` is pure: it returns a ``ProjectDetail`` or raises a
``DesignError`` (one line, naming the strip and zone and what to change).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import replace

from detailer import simplified
from detailer.codes.base import (
    AnchorageCase,
    BondCondition,
    ConcreteSteel,
    DesignCode,
    Layer,
    SpanType,
)
from detailer.curtailment import (
    Anchorages,
    StripGeometry,
    distribution_set,
    end_face_mm,
    leg_mm,
    principal_runs,
    run_to_barset,
    split_zone_runs,
    straight_past_face_mm,
    u_bar_set,
)
from detailer.demand import DemandCurve, build_curve, make_grid
from detailer.design import (
    B_MM,
    ZoneSpec,
    choose_bars,
    effective_depth_mm,
    zone_design,
    zone_specs,
)
from detailer.errors import DesignError
from detailer.layout import (
    AnchorageLength,
    BarSet,
    Check,
    Face,
    ProjectDetail,
    StripDetail,
    ZoneDesign,
)
from detailer.model import Curtailment, EndKind, Project, Strip
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


def _span_type(strip: Strip, seg) -> SpanType:
    if seg.is_cantilever:
        return SpanType.CANTILEVER
    sups = strip.supports
    i0 = next(i for i, s in enumerate(sups) if abs(s.x_mm - seg.x_start_mm) < 1e-6)
    i1 = i0 + 1
    last = len(sups) - 1

    def continuous(i: int) -> bool:
        if 0 < i < last:
            return True
        if i == 0:
            return strip.has_left_cantilever or strip.left_end.kind is EndKind.MONOLITHIC
        return strip.has_right_cantilever or strip.right_end.kind is EndKind.MONOLITHIC

    c0, c1 = continuous(i0), continuous(i1)
    interior = 0 < i0 and i1 < last
    if interior:
        return SpanType.INTERIOR_SPAN
    if c0 or c1:
        return SpanType.END_SPAN
    return SpanType.SIMPLY_SUPPORTED


def detail_strip(project: Project, strip: Strip, code: DesignCode) -> StripDetail:
    sa = analyse_strip(project, strip)
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
        ends = _end_anchorage_rule(spec, strip, geom, top, bottom, code, mat, anch)
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
        seg = _deflection_segment(strip, spec)
        if seg is not None:
            choice, chk = _deflection(
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

    strip_checks.extend(_end_anchorage_checks(strip, sa, code, mat, zones, bar_sets, geom, anch))
    strip_checks.extend(_shear_checks(strip, sa, code, mat, zones))
    strip_checks.extend(_cover_checks(strip, project, code, bar_sets))
    strip_checks.extend(_redistribution_checks(strip, project, code, mat, zones))

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


def _end_anchorage_rule(spec, strip, geom, top, bottom, code, mat, anch):
    """Check for bars ending in an end support: the resistance they build up from the bar end
    over l_bd, through the straight length past the face plus a leg turned into the support,
    must carry the shifted demand at the face (EN 1992-1-1:2004, 9.2.1.3(3) with 9.2.1.4(3))."""
    last = len(strip.supports) - 1
    ends = [i for i in (0, last) if _is_end(strip, i)]
    face_of = {i: end_face_mm(strip, i) for i in ends}
    touching = [i for i in ends if spec.x_from_mm - 1.0 <= face_of[i] <= spec.x_to_mm + 1.0]
    if not touching or spec.kind == "cantilever-bottom":
        return None
    curve = top if spec.face is Face.TOP else bottom

    def rule(phi: int, s: int, as_prov: float, d: float) -> list[Check]:
        out = []
        for i in touching:
            demand = float(curve.shifted_at(face_of[i]))
            if demand <= 0.05:
                continue
            length = straight_past_face_mm(strip, geom, i) + leg_mm(strip, phi)
            l_bd = anch.lbd(phi, spec.face)
            capacity = code.moment_resistance(as_prov, B_MM, d, mat) * min(1.0, length / l_bd)
            out.append(
                Check(
                    f"anchorage into end support {strip.supports[i].label}",
                    "EN 1992-1-1:2004, 9.2.1.3(3), 8.4.4",
                    round(demand, 3),
                    round(capacity, 3),
                    "kNm/m",
                    demand <= capacity + 1e-9,
                    note=f"{length:.0f} mm of bar past the face (with leg) against l_bd = {l_bd:.0f} mm",
                )
            )
        return out

    return rule


def _is_end(strip: Strip, i: int) -> bool:
    last = len(strip.supports) - 1
    return (i == 0 and not strip.has_left_cantilever) or (
        i == last and not strip.has_right_cantilever
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


def _deflection_segment(strip: Strip, spec: ZoneSpec):
    if spec.kind == "span":
        return strip.segments[spec.segment]
    if spec.kind == "support" and spec.face is Face.TOP:
        for seg in strip.segments:
            if (
                seg.is_cantilever
                and spec.x_from_mm <= 0.5 * (seg.x_start_mm + seg.x_end_mm) <= spec.x_to_mm
            ):
                return seg
    return None


def _deflection(spec, choice, seg, strip, project, code, mat, delta, can_add=True):
    """Span/effective depth, 7.4.2; where it fails, more steel (F_steel up to 1.5) is tried."""
    span_type = _span_type(strip, seg)
    l_eff = seg.length_mm
    as_req = max(choice.as_req_mm2_per_m, choice.as_design_mm2_per_m, 1e-6)

    def evaluate(ch):
        # rho from the governing requirement (A_s,min included): never below the real ratio.
        as_basis = max(ch.as_req_mm2_per_m, ch.as_design_mm2_per_m, 1e-6)
        res = code.span_depth_limit(
            span_type, mat, as_basis, ch.as_prov_mm2_per_m, B_MM, ch.d_mm, l_eff
        )
        return res, l_eff / ch.d_mm

    res, actual = evaluate(choice)
    if actual > res.l_d_limit:
        # The steel-stress factor grows with A_s,prov/A_s,req (UK NA cap 1.5): ask for more steel.
        base = res.l_d_limit / max(res.F_steel, 1e-9)
        need_factor = actual / base
        if can_add and need_factor <= 1.5 + 1e-9:
            extra = need_factor * as_req
            choice = choose_bars(
                spec,
                strip=strip,
                project=project,
                code=code,
                mat=mat,
                delta=delta,
                as_extra_mm2_per_m=extra,
                extra_reason="deflection, A_s,prov/A_s,req for EN 1992-1-1:2004, 7.4.2(2)",
            )
            res, actual = evaluate(choice)
    chk = Check(
        f"span/depth, {seg.label}",
        "EN 1992-1-1:2004, 7.4.2, Eq. (7.16)",
        round(actual, 3),
        round(res.l_d_limit, 3),
        "-",
        actual <= res.l_d_limit + 1e-9,
        note=f"{span_type.value}, K = {res.K:g}, F_steel = {res.F_steel:.2f}, F_span = {res.F_span:.2f}",
    )
    if not chk.ok:
        chk = replace(chk, note=chk.note + "; thicken the slab")
    return choice, chk


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


def _end_anchorage_checks(strip, sa, code, mat, zones, bar_sets, geom, anch) -> list[Check]:
    """Bottom bars at end supports: anchorage from the face for F_E = |V_Ed| a_l / z,
    EN 1992-1-1:2004, 9.2.1.4(2)-(3), with 9.3.1.2(1)."""
    checks: list[Check] = []
    offset = 1 if strip.has_left_cantilever else 0
    last = len(strip.supports) - 1
    ends = []
    if not strip.has_left_cantilever:
        ends.append((0, "left"))
    if not strip.has_right_cantilever:
        ends.append((last, "right"))
    bond = code.bond_condition(strip.thickness_mm, Layer.BOTTOM)
    for i, side in ends:
        sup = strip.supports[i]
        node = i + offset
        v_ed = abs(float(sa.uls.reactions_max_kn[node]))
        bars = [
            b
            for b in bar_sets
            if b.layer == "B1"
            and (
                (side == "left" and abs(b.x_start_mm - geom.bar_left_mm) < 1.0)
                or (side == "right" and abs(b.x_end_mm - geom.bar_right_mm) < 1.0)
            )
        ]
        if not bars:
            checks.append(
                Check(
                    f"bottom bars into end support {sup.label}",
                    "EN 1992-1-1:2004, 9.3.1.2(1)",
                    1,
                    0,
                    "-",
                    False,
                    "no bottom bars reach the support",
                )
            )
            continue
        b = bars[0]
        zone = next(z for z in zones if z.zone_id == b.zone_id)
        area = sum(x.phi_mm**2 * 3.141592653589793 / 4 * 1000.0 / x.spacing_mm for x in bars)
        share = area / zone.as_prov_mm2_per_m
        checks.append(
            Check(
                f"bottom steel carried into end support {sup.label}",
                "EN 1992-1-1:2004, 9.3.1.2(1)",
                0.5,
                round(share, 3),
                "share of span steel",
                share >= 0.5 - 1e-9,
            )
        )
        a_l = zone.d_mm
        f_e_kn = v_ed * a_l / zone.z_mm
        sigma = min(f_e_kn * 1000.0 / area, mat.f_yd)
        case = AnchorageCase(phi=b.phi_mm, sigma_sd=sigma, bond=bond, c_d=strip.cover_bottom_mm)
        need = code.anchorage(case, mat).l_bd
        available = sup.width_mm - strip.cover_side_mm
        checks.append(
            Check(
                f"anchorage of bottom bars at {sup.label}",
                "EN 1992-1-1:2004, 9.2.1.4(2)",
                round(need, 1),
                round(available, 1),
                "mm",
                available + 1e-6 >= need,
                note=f"F_E = {f_e_kn:.1f} kN/m, sigma_sd = {sigma:.0f} N/mm2, straight bar from the face",
            )
        )
    return checks


def _shear_checks(strip, sa, code, mat, zones) -> list[Check]:
    """V_Ed at d from the support faces against V_Rd,c, EN 1992-1-1:2004, 6.2.2(1) with 6.2.1(8)."""
    checks: list[Check] = []
    st = sa.uls.stations
    x = st.x_mm
    v_abs = [max(abs(a), abs(b)) for a, b in zip(sa.uls.v_max_kn, sa.uls.v_min_kn)]
    import numpy as np

    v_abs = np.asarray(v_abs)
    for k, sup in enumerate(strip.supports):
        for side in (-1, 1):
            face = sup.x_mm + side * sup.width_mm / 2
            top_zone = _zone_at(zones, Face.TOP, sup.x_mm)
            bot_zone = _zone_at(zones, Face.BOTTOM, face + side * 1.0)
            tension = top_zone or bot_zone
            if tension is None:
                continue
            d = tension.d_mm
            xs = face + side * d
            seg_sel = (x >= min(face, xs + side * 1e3) - 1) & (x <= max(face, xs + side * 1e3) + 1)
            if xs < x.min() or xs > x.max() or not np.any(seg_sel):
                continue
            # the segment on that side of the support
            segs = [s for s in strip.segments if s.x_start_mm - 1e-6 <= xs <= s.x_end_mm + 1e-6]
            if not segs:
                continue
            seg = segs[0]
            sel = st.segment == seg.index
            v_ed = float(np.interp(xs, x[sel], v_abs[sel]))
            rho = min(tension.as_prov_mm2_per_m / (B_MM * d), 0.02)
            v_rd = code.v_rd_c(d, rho, mat)
            checks.append(
                Check(
                    f"shear at d from the face of {sup.label} ({'left' if side < 0 else 'right'})",
                    "EN 1992-1-1:2004, 6.2.2(1), Eq. (6.2)",
                    round(v_ed, 2),
                    round(v_rd, 2),
                    "kN/m",
                    v_ed <= v_rd + 1e-9,
                    note=""
                    if v_ed <= v_rd
                    else "the slab would need shear reinforcement; thicken it",
                )
            )
    return checks


def _zone_at(zones, face: Face, x_mm: float):
    for z in zones:
        if z.face is face and z.x_from_mm - 1 <= x_mm <= z.x_to_mm + 1:
            return z
    return None


def _cover_checks(strip, project, code, bar_sets) -> list[Check]:
    """Nominal cover against c_nom = c_min + delta_c_dev, EN 1992-1-1:2004, 4.4.1."""
    checks = []
    exposure = project.materials.exposure_class
    for face, cover, layers in (
        ("top", strip.cover_top_mm, ("T1",)),
        ("bottom", strip.cover_bottom_mm, ("B1",)),
    ):
        phis = [b.phi_mm for b in bar_sets if b.layer in layers]
        if not phis:
            continue
        req = code.cover(max(phis), exposure, "S4", project.reinforcement.max_aggregate_mm)
        res = code.check_cover(cover, req)
        checks.append(
            Check(
                f"nominal cover, {face}",
                "EN 1992-1-1:2004, 4.4.1",
                req.c_nom,
                cover,
                "mm",
                res.ok,
                res.message,
            )
        )
    return checks


def _redistribution_checks(strip, project, code, mat, zones) -> list[Check]:
    """EN 1992-1-1:2004, 5.5(4) + UK NA: delta against ductility class, x_u/d and span ratios."""
    delta = project.analysis.redistribution_delta
    if delta >= 1.0:
        return []
    lim = code.redistribution_limits(mat)
    checks = [
        Check(
            "redistribution: steel ductility",
            "EN 1992-1-1:2004, 5.5(4)",
            lim.delta_min_ductility,
            delta,
            "delta",
            delta >= lim.delta_min_ductility - 1e-9,
        )
    ]
    spans = [s.length_mm for s in strip.segments if not s.is_cantilever]
    for a, b in itertools.pairwise(spans):
        ok = lim.spans_ok(a, b)
        checks.append(
            Check(
                "redistribution: adjacent span ratio",
                "EN 1992-1-1:2004, 5.5(4)",
                round(a / b, 3),
                lim.span_ratio_max if a > b else lim.span_ratio_min,
                "-",
                ok,
            )
        )
    for z in zones:
        if z.face is Face.TOP and z.k > 0:
            x_u_d = max(0.0, (z.d_mm - z.z_mm) / (0.4 * z.d_mm))
            need = lim.delta_min(x_u_d)
            checks.append(
                Check(
                    f"redistribution at {z.zone_id}: x_u/d",
                    "EN 1992-1-1:2004, 5.5(4)",
                    round(need, 3),
                    delta,
                    "delta",
                    delta >= need - 1e-9,
                )
            )
    return checks


__all__ = ["BondCondition", "DemandCurve", "default_code", "detail_project", "detail_strip", "math"]
