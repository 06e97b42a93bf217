"""Strip-level checks of the design: deflection, shear, anchorage into end supports, cover
and redistribution limits, each as ``detailer.layout.Check`` objects with their clause."""

from __future__ import annotations

import itertools
from dataclasses import replace

import numpy as np

from detailer.codes.base import AnchorageCase, Layer, SpanType
from detailer.curtailment import end_face_mm, leg_mm, straight_past_face_mm
from detailer.design import B_MM, ZoneSpec, choose_bars
from detailer.layout import Check, Face
from detailer.model import EndKind, Strip


def span_type_of(strip: Strip, seg) -> SpanType:
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


def end_anchorage_rule(spec, strip, geom, top, bottom, code, mat, anch):
    """Check for bars ending in an end support: the resistance they build up from the bar end
    over l_bd, through the straight length past the face plus a leg turned into the support,
    must carry the shifted demand at the face (EN 1992-1-1:2004, 9.2.1.3(3) with 9.2.1.4(3))."""
    last = len(strip.supports) - 1
    ends = [i for i in (0, last) if is_end(strip, i)]
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


def is_end(strip: Strip, i: int) -> bool:
    last = len(strip.supports) - 1
    return (i == 0 and not strip.has_left_cantilever) or (
        i == last and not strip.has_right_cantilever
    )


def deflection_segment(strip: Strip, spec: ZoneSpec):
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


def deflection(spec, choice, seg, strip, project, code, mat, delta, can_add=True):
    """Span/effective depth, 7.4.2; where it fails, more steel (F_steel up to 1.5) is tried."""
    span_type = span_type_of(strip, seg)
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


def end_anchorage_checks(strip, sa, code, mat, zones, bar_sets, geom, anch) -> list[Check]:
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


def shear_checks(strip, sa, code, mat, zones) -> list[Check]:
    """V_Ed at d from the support faces against V_Rd,c, EN 1992-1-1:2004, 6.2.2(1) with 6.2.1(8)."""
    checks: list[Check] = []
    st = sa.uls.stations
    x = st.x_mm
    v_abs = [max(abs(a), abs(b)) for a, b in zip(sa.uls.v_max_kn, sa.uls.v_min_kn)]

    v_abs = np.asarray(v_abs)
    for k, sup in enumerate(strip.supports):
        for side in (-1, 1):
            face = sup.x_mm + side * sup.width_mm / 2
            top_zone = zone_at(zones, Face.TOP, sup.x_mm)
            bot_zone = zone_at(zones, Face.BOTTOM, face + side * 1.0)
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


def zone_at(zones, face: Face, x_mm: float):
    for z in zones:
        if z.face is face and z.x_from_mm - 1 <= x_mm <= z.x_to_mm + 1:
            return z
    return None


def cover_checks(strip, project, code, bar_sets) -> list[Check]:
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


def redistribution_checks(strip, project, code, mat, zones) -> list[Check]:
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
