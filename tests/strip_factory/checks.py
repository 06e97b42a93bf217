"""Independent checks of a detailed strip against EN 1992-1-1 and BS 8666.

Each check reads only public results (zones, bar sets, the analysis envelope, the demand curve
the self-check used) and the formulas of ``clauses``; it returns one line per violation so a
test can print them all. ``check_detail`` runs them all.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from detailer.shapes.table2 import bending_limits
from tests.strip_factory.clauses import (
    F_YK,
    as_per_m,
    bs8666_length_mm,
    f_ck_of,
    f_ctm,
    flexure_as_req,
    l_0_mm,
    l_bd_mm,
    m_rd_knm,
    spacing_limit_mm,
    top_bond_good,
)

TOL_KNM = 0.02  # kNm/m: demand and resistance are sampled on a 10 mm grid
TOL_REL = 2e-3


@dataclass(frozen=True, slots=True)
class SlabEnds:
    """Concrete ends along the strip and where the moment must be resisted."""

    left_mm: float  # free tip of a left cantilever, else outer face of the first support
    right_mm: float
    check_left_mm: float  # inner face of an end support (the tension passes into the support
    check_right_mm: float  # at its face, EN 1992-1-1:2004, 9.2.1.4(3)); a tip less the cover


def slab_ends(strip) -> SlabEnds:
    """From the strip model (x from a left tip, else from the first support centreline)."""
    first, last = strip.supports[0], strip.supports[-1]
    left = 0.0 if strip.has_left_cantilever else first.x_mm - first.width_mm / 2
    if strip.has_right_cantilever:
        right = last.x_mm + strip.right_end.cantilever_mm
    else:
        right = last.x_mm + last.width_mm / 2
    c = strip.cover_side_mm  # at a free edge no bar can reach into the cover
    c_left = left + c if strip.has_left_cantilever else first.x_mm + first.width_mm / 2
    c_right = right - c if strip.has_right_cantilever else last.x_mm - last.width_mm / 2
    return SlabEnds(left, right, c_left, c_right)


def f_ck_project(project) -> float:
    return f_ck_of(project.materials.concrete_class)


def is_top(bar) -> bool:
    return bar.layer.startswith("T")


def is_u_bar(bar) -> bool:
    """A free-edge U (code 21 lying along the slab: its horizontal extent is leg A)."""
    return bar.shape.code == "21" and abs((bar.x_end_mm - bar.x_start_mm) - bar.shape.dim("A")) <= 5


def principal_bars(detail, top: bool, *, with_u: bool = False):
    """Principal bar sets of one face, U-bars left out unless asked for."""
    return [
        b
        for b in detail.bar_sets
        if b.role.value == "principal" and is_top(b) == top and (with_u or not is_u_bar(b))
    ]


def l_bd_of(project, strip, phi: int, top: bool) -> float:
    """Independent l_bd of one bar size in one face (``l_bd_mm``)."""
    cover = strip.cover_top_mm if top else strip.cover_bottom_mm
    good = top_bond_good(strip.thickness_mm) if top else True
    return l_bd_mm(phi, f_ck_project(project), cover, good)


def end_legs(bar, ends: SlabEnds, cover_side_mm: float) -> tuple[float, float]:
    """Legs turned down at the left/right ends (they count as anchorage along the bar)."""
    code = bar.shape.code
    if code == "11":
        at_left = abs(bar.x_start_mm - (ends.left_mm + cover_side_mm)) < 1.0
        leg = float(bar.shape.dim("B"))
        return (leg, 0.0) if at_left else (0.0, leg)
    if code == "21" and not is_u_bar(bar):
        return float(bar.shape.dim("A")), float(bar.shape.dim("C"))
    if code == "21":  # U-bar: the rest of the U lies beyond the free-edge end of its top leg
        rest = bar.shape.length_exact_mm - bar.shape.dim("A")
        at_left = abs(bar.x_start_mm - (ends.left_mm + cover_side_mm)) < 1.0
        return (rest, 0.0) if at_left else (0.0, rest)
    return 0.0, 0.0


def resistance_knm(project, detail, top: bool, x_mm: np.ndarray, exclude=()) -> np.ndarray:
    """M_Rd(x) of the principal bars of one face, kNm/m.

    Each bar set counts with its full area where it has l_bd of bar on both sides of x, and
    linearly less within l_bd of an end (EN 1992-1-1:2004, 9.2.1.3(3), Fig. 9.2), the length
    measured along the bar through bends (8.4.4, Fig. 8.1): a leg turned down into a support,
    and for a U-bar at a free edge its bend and bottom leg; the resistance is that of the total
    area at its centroid (``m_rd_knm``).
    """
    strip = detail.strip
    ends = slab_ends(strip)
    cover = strip.cover_top_mm if top else strip.cover_bottom_mm
    area = np.zeros_like(x_mm)
    area_d = np.zeros_like(x_mm)
    for b in principal_bars(detail, top, with_u=True):
        if b.set_id in exclude:
            continue
        lbd = l_bd_of(project, strip, b.phi_mm, top)
        left_leg, right_leg = end_legs(b, ends, strip.cover_side_mm)
        inside = (x_mm >= b.x_start_mm - 1e-6) & (x_mm <= b.x_end_mm + 1e-6)
        developed = np.minimum(x_mm - b.x_start_mm + left_leg, b.x_end_mm - x_mm + right_leg)
        a = as_per_m(b.phi_mm, b.spacing_mm) * np.clip(developed / lbd, 0.0, 1.0) * inside
        area += a
        area_d += a * (strip.thickness_mm - cover - b.phi_mm / 2)
    f_ck = f_ck_project(project)
    out = np.zeros_like(x_mm)
    for i in np.flatnonzero(area > 1e-9):
        out[i] = m_rd_knm(float(area[i]), float(area_d[i] / area[i]), f_ck)
    return out


def _face(detail, top: bool):
    """The pipeline's demand curve (shifted M_Ed on its grid) for one face."""
    fr = detail.resistance[0] if top else detail.resistance[1]
    assert (fr.face.value == "top") == top
    return fr


def check_selfcheck(project, detail) -> list[str]:
    """M_Rd(x) >= shifted M_Ed(x) on both faces, the resistance recomputed here."""
    out = []
    sc = detail.selfcheck
    if not (sc.ok and sc.utilisation_max <= 1.0 + 1e-6):
        out.append(f"pipeline self-check: {sc}")
    for top in (True, False):
        fr = _face(detail, top)
        m_rd = resistance_knm(project, detail, top, fr.x_mm)
        short = fr.m_ed_shifted_knm_per_m * (1 - TOL_REL) - TOL_KNM > m_rd
        for i in np.flatnonzero(short)[:3]:
            out.append(
                f"9.2.1.3: {'top' if top else 'bottom'} M_Rd {m_rd[i]:.2f} < shifted M_Ed "
                f"{fr.m_ed_shifted_knm_per_m[i]:.2f} kNm/m at x = {fr.x_mm[i]:.0f}"
            )
    return out


def check_shift(project, detail) -> list[str]:
    """The demand is the envelope shifted by a_l = d (EN 1992-1-1:2004, 9.2.1.3(2), 9.3.1.1(4)):
    shifted M_Ed(x) >= M_Ed(t) for |t - x| <= d, t outside the supports (where the design may
    use the face moment, 5.3.2.2(3)), x between the inner faces of the end supports."""
    strip = detail.strip
    env = detail.analysis.uls
    xs = env.stations.x_mm
    ends = slab_ends(strip)
    out = []
    for top in (True, False):
        fr = _face(detail, top)
        raw = np.maximum(-env.m_min_knm, 0.0) if top else np.maximum(env.m_max_knm, 0.0)
        bars = principal_bars(detail, top)
        cover = strip.cover_top_mm if top else strip.cover_bottom_mm
        d = strip.thickness_mm - cover - max(b.phi_mm for b in bars) / 2
        off_support = np.ones_like(xs, dtype=bool)
        for s in strip.supports:
            off_support &= np.abs(xs - s.x_mm) > s.width_mm / 2 + 1.0
        region = (fr.x_mm >= ends.check_left_mm + 1) & (fr.x_mm <= ends.check_right_mm - 1)
        for i in np.flatnonzero(region):
            near = off_support & (np.abs(xs - fr.x_mm[i]) <= d - 10.0)
            if not np.any(near):
                continue
            need = float(raw[near].max())
            if fr.m_ed_shifted_knm_per_m[i] < need * (1 - 5e-3) - 0.05:
                out.append(
                    f"9.2.1.3(2): {'top' if top else 'bottom'} shifted M_Ed "
                    f"{fr.m_ed_shifted_knm_per_m[i]:.2f} < M_Ed {need:.2f} within a_l = d of "
                    f"x = {fr.x_mm[i]:.0f}"
                )
                break
    return out


def is_end_fixity_zone(zone) -> bool:
    """Top steel over a pinned end for the partial fixity the analysis ignores (9.3.1.2(2))."""
    return zone.description.endswith("(end), top")


def is_nominal_zone(zone) -> bool:
    """Nominal bottom bars of a cantilever (common practice): no designed moment."""
    return "nominal" in zone.description


def check_zones(project, detail) -> list[str]:
    """Per zone: A_s,req by hand; A_s,prov >= A_s,req; A_s,min <= A_s,prov <= A_s,max
    (9.2.1.1(1), (3)); spacing (9.3.1.1(3)), also at the zone's peak with staged groups."""
    strip = detail.strip
    h = strip.thickness_mm
    f_ck = f_ck_project(project)
    out = []
    for z in detail.zones:
        top = z.face.value == "top"
        cover = strip.cover_top_mm if top else strip.cover_bottom_mm
        d = h - cover - z.phi_mm / 2
        name = z.zone_id
        prov = as_per_m(z.phi_mm, z.spacing_mm)
        if abs(prov - z.as_prov_mm2_per_m) > 1e-6 * prov or abs(d - z.d_mm) > 1e-6:
            out.append(f"{name}: A_s,prov {z.as_prov_mm2_per_m:.1f} or d {z.d_mm} not of the bars")
        req = flexure_as_req(z.m_ed_knm_per_m, d, f_ck)[2] if z.m_ed_knm_per_m > 0 else 0.0
        if abs(req - z.as_req_mm2_per_m) > 5e-3 * max(req, 1.0):
            out.append(f"{name}: A_s,req {z.as_req_mm2_per_m:.1f} differs from {req:.1f} by hand")
        if prov < req * (1 - 1e-9):
            out.append(f"6.1: {name} A_s,prov {prov:.1f} < A_s,req {req:.1f} mm2/m")
        as_min = max(0.26 * f_ctm(f_ck) / F_YK, 0.0013) * 1000.0 * d
        if not is_end_fixity_zone(z) and prov < as_min * (1 - 5e-3):
            out.append(f"9.2.1.1(1): {name} A_s,prov {prov:.1f} < A_s,min {as_min:.1f} mm2/m")
        if prov > 0.04 * 1000.0 * h:
            out.append(f"9.2.1.1(3): {name} A_s,prov {prov:.1f} > 0.04 A_c")
        max_moment = z.m_ed_knm_per_m > 0.05 and not (is_end_fixity_zone(z) or is_nominal_zone(z))
        limit = spacing_limit_mm(h, principal=True, max_moment=max_moment)
        if z.spacing_mm > limit:
            out.append(f"9.3.1.1(3): {name} spacing {z.spacing_mm} > {limit:g} mm")
        if z.m_ed_knm_per_m <= 0.05:
            continue
        ends = slab_ends(strip)
        c = strip.cover_side_mm
        peak = min(max(z.x_peak_mm, ends.left_mm + c), ends.right_mm - c)  # not in the cover
        covering = [
            b
            for b in principal_bars(detail, top)
            if b.zone_id == z.zone_id and b.x_start_mm - 1e-6 <= peak <= b.x_end_mm + 1e-6
        ]
        if not covering:
            out.append(f"{name}: no bars of the zone at its peak x = {z.x_peak_mm:.0f}")
            continue
        effective = 1.0 / sum(1.0 / b.spacing_mm for b in covering)
        if effective > limit + 1e-6:
            out.append(f"9.3.1.1(3): {name} bars at {effective:.0f} mm at the peak > {limit:g}")
    general = spacing_limit_mm(h, principal=True, max_moment=False)
    for z in detail.zones:
        sets = [b for b in principal_bars(detail, z.face.value == "top") if b.zone_id == z.zone_id]
        x0, x1 = min(b.x_start_mm for b in sets), max(b.x_end_mm for b in sets)
        for x in np.linspace(x0, x1, 200):
            here = [b for b in sets if b.x_start_mm - 1e-6 <= x <= b.x_end_mm + 1e-6]
            spacing = 1.0 / sum(1.0 / b.spacing_mm for b in here) if here else math.inf
            if spacing > general + 1e-6:
                out.append(
                    f"9.3.1.1(3): {z.zone_id} bars at {spacing:.0f} > {general:g} mm at x = {x:.0f}"
                )
                break
    return out


def check_distribution(project, detail) -> list[str]:
    """Transverse bars >= 20 % of the principal steel (9.3.1.1(2)), spacing <= 3.5h <= 450
    (9.3.1.1(3)); every zone's principal bars have them over their extent (common practice)."""
    strip = detail.strip
    out = []
    for z in detail.zones:
        dist = [
            b for b in detail.bar_sets if b.role.value == "distribution" and b.zone_id == z.zone_id
        ]
        if not dist:
            out.append(f"9.3.1.1(2): zone {z.zone_id} has no distribution bars")
            continue
        main = [
            b for b in detail.bar_sets if b.role.value == "principal" and b.zone_id == z.zone_id
        ]
        for b in dist:
            a = as_per_m(b.phi_mm, b.spacing_mm)
            if a < 0.2 * z.as_prov_mm2_per_m * (1 - 1e-9):
                out.append(f"9.3.1.1(2): {b.set_id} {a:.0f} < 20 % of {z.as_prov_mm2_per_m:.0f}")
            limit = spacing_limit_mm(strip.thickness_mm, principal=False, max_moment=False)
            if b.spacing_mm > limit:
                out.append(f"9.3.1.1(3): {b.set_id} spacing {b.spacing_mm} > {limit:g}")
            if main and (
                b.x_start_mm > min(m.x_start_mm for m in main) + 0.5
                or b.x_end_mm < max(m.x_end_mm for m in main) - 0.5
            ):
                out.append(f"{b.set_id} does not cover the principal bars of {z.zone_id}")
    return out


def _span_zone(detail, seg):
    return next(z for z in detail.zones if z.zone_id == f"S{seg.span_number}-B")


def _spans_at(strip, k: int):
    """(span ending at support k, span starting at support k); None where there is none."""
    x = strip.supports[k].x_mm
    left = right = None
    for seg in strip.segments:
        if seg.is_cantilever:
            continue
        if abs(seg.x_end_mm - x) < 1e-6:
            left = seg
        if abs(seg.x_start_mm - x) < 1e-6:
            right = seg
    return left, right


def end_support_indices(strip) -> list[int]:
    """Supports at a strip end with no cantilever beyond them."""
    out = []
    if not strip.has_left_cantilever:
        out.append(0)
    if not strip.has_right_cantilever:
        out.append(len(strip.supports) - 1)
    return out


def check_supports(project, detail) -> list[str]:
    """Bottom steel into end supports (>= half the span steel, to the slab end: 9.3.1.2(1));
    bottom bars past internal support faces by >= 10 phi, at least beta_2 = 0.25 of the span
    steel (9.2.1.5(1) with 9.2.1.4(1)); top bars at pinned ends >= 0.2 x the adjacent span from
    the face, resisting >= 15 % of the span moment (9.3.1.2(2))."""
    strip = detail.strip
    ends = slab_ends(strip)
    c = strip.cover_side_mm
    f_ck = f_ck_project(project)
    env = detail.analysis.uls
    bottom = principal_bars(detail, False)
    top = principal_bars(detail, True)
    out = []
    end_idx = end_support_indices(strip)
    for k, sup in enumerate(strip.supports):
        left_span, right_span = _spans_at(strip, k)
        for seg, side in ((left_span, "left"), (right_span, "right")):
            if seg is None:
                continue
            zone = _span_zone(detail, seg)
            # the face this span's bottom bars cross, and the bars of that span crossing it
            if side == "left":  # the support is at the span's right end
                face = sup.x_mm - sup.width_mm / 2
                reach = [(b.x_end_mm - face, b) for b in bottom if b.zone_id == zone.zone_id]
            else:
                face = sup.x_mm + sup.width_mm / 2
                reach = [(face - b.x_start_mm, b) for b in bottom if b.zone_id == zone.zone_id]
            if k in end_idx:
                inner = sup.x_mm + sup.width_mm / 2 if k == 0 else sup.x_mm - sup.width_mm / 2
                into = [
                    b
                    for b in bottom
                    if (k == 0 and b.x_start_mm <= ends.left_mm + c + 1 and b.x_end_mm > inner)
                    or (k > 0 and b.x_end_mm >= ends.right_mm - c - 1 and b.x_start_mm < inner)
                ]
                area = sum(as_per_m(b.phi_mm, b.spacing_mm) for b in into)
                if area < 0.5 * zone.as_prov_mm2_per_m * (1 - 1e-9):
                    out.append(
                        f"9.3.1.2(1): {area:.0f} mm2/m of bottom steel reaches end support "
                        f"{sup.label}, less than half of {zone.as_prov_mm2_per_m:.0f}"
                    )
                continue
            passing = [b for r, b in reach if r >= 10 * b.phi_mm - 0.5]
            area = sum(as_per_m(b.phi_mm, b.spacing_mm) for b in passing)
            if area < 0.25 * zone.as_prov_mm2_per_m * (1 - 1e-9):
                out.append(
                    f"9.2.1.5(1): bottom bars of {zone.zone_id} pass the face of {sup.label} "
                    f"by < 10 phi (reach {[round(r) for r, _ in reach]})"
                )
    for k in end_idx:
        end = strip.left_end if k == 0 else strip.right_end
        if end.kind.value != "pinned":
            continue
        sup = strip.supports[k]
        left_span, right_span = _spans_at(strip, k)
        seg = right_span if k == 0 else left_span
        if k == 0:
            face = sup.x_mm + sup.width_mm / 2
            over = [b for b in top if b.x_start_mm <= face]
            reach = max((b.x_end_mm - face for b in over), default=0.0)
        else:
            face = sup.x_mm - sup.width_mm / 2
            over = [b for b in top if b.x_end_mm >= face]
            reach = max((face - b.x_start_mm for b in over), default=0.0)
        if reach < 0.2 * seg.length_mm - 0.5:
            out.append(
                f"9.3.1.2(2): top bars at pinned end {sup.label} reach {reach:.0f} mm from the "
                f"face, < 0.2 x {seg.length_mm:.0f}"
            )
        sel = env.stations.segment == seg.index
        m_span = float(np.max(env.m_max_knm[sel]))
        cover = strip.cover_top_mm
        area = sum(as_per_m(b.phi_mm, b.spacing_mm) for b in over)
        d = strip.thickness_mm - cover - max((b.phi_mm for b in over), default=0) / 2
        if m_rd_knm(area, d, f_ck) < 0.15 * m_span * (1 - 5e-3):
            out.append(
                f"9.3.1.2(2): top bars at pinned end {sup.label} resist "
                f"{m_rd_knm(area, d, f_ck):.2f} < 0.15 x {m_span:.2f} kNm/m"
            )
    return out


def check_bars(project, detail) -> list[str]:
    """Every bar: length <= stock length; inside the concrete (within the slab ends less the
    side cover; legs within h less both covers); scheduled length = BS 8666:2005 formula
    rounded up to 5 mm (the rounding is common practice); A = the run length rounded up."""
    strip = detail.strip
    ends = slab_ends(strip)
    c = strip.cover_side_mm
    depth = strip.thickness_mm - strip.cover_top_mm - strip.cover_bottom_mm
    stock = project.reinforcement.stock_length_mm
    across = strip.panel_width_mm - 2 * c
    out = []
    for b in detail.bar_sets:
        shape = b.shape
        dims = dict(shape.dims_mm)
        formula = bs8666_length_mm(shape.code, b.phi_mm, dims)
        if abs(shape.length_exact_mm - formula) > 1e-6:
            out.append(f"BS 8666: {b.set_id} L {shape.length_exact_mm} != formula {formula}")
        if shape.length_mm != 5 * math.ceil(formula / 5 - 1e-9):
            out.append(f"{b.set_id}: scheduled {shape.length_mm} != {formula:.1f} rounded up")
        if shape.length_mm > stock:
            out.append(f"{b.set_id}: {shape.length_mm} mm is longer than the {stock:g} mm stock")
        if b.role.value == "distribution":
            if (
                shape.length_mm > across + 1e-6
                and len([x for x in detail.bar_sets if x.zone_id == b.zone_id and x.role is b.role])
                == 1
            ):
                out.append(f"{b.set_id}: {shape.length_mm} mm is wider than the panel less cover")
            continue
        if b.x_start_mm < ends.left_mm + c - 0.5 or b.x_end_mm > ends.right_mm - c + 0.5:
            out.append(f"{b.set_id}: x {b.x_start_mm}..{b.x_end_mm} outside the concrete")
        run = b.x_end_mm - b.x_start_mm
        horizontal = dims["A"] if shape.code in ("00", "01", "11") else dims["B"]
        if is_u_bar(b):
            horizontal = dims["A"]
        if not 0 <= horizontal - run < 5.0 + 0.2:
            out.append(f"{b.set_id}: horizontal {horizontal} for a run of {run:.1f} mm")
        vertical = {"11": "B", "21": "A" if not is_u_bar(b) else "B"}.get(shape.code)
        # A U-bar at a free edge must fit between the covers; an L-bar's leg turned into an
        # end support may run on below the slab into the beam or wall, but only as far as the
        # minimum end projection P of BS 8666:2005 Table 2 needs.
        limit = depth if is_u_bar(b) else max(depth, bending_limits(b.phi_mm).p_mm)
        if vertical and dims[vertical] > limit + 1e-6:
            out.append(f"{b.set_id}: leg {dims[vertical]} mm deeper than {limit:g} mm")
    return out


def lap_partners(detail, bar):
    """Other pieces of the same lapped run (same zone, layer, size, spacing and offset)."""
    if is_u_bar(bar):
        return []
    return [
        o
        for o in detail.bar_sets
        if o is not bar
        and not is_u_bar(o)
        and o.role is bar.role
        and o.zone_id == bar.zone_id
        and o.layer == bar.layer
        and o.phi_mm == bar.phi_mm
        and o.spacing_mm == bar.spacing_mm
        and abs(o.offset_mm - bar.offset_mm) < 1e-6
        and o.x_start_mm < bar.x_end_mm
        and o.x_end_mm > bar.x_start_mm
    ]


def l_0_for(project, strip, phi: int, top: bool, alpha_6: float) -> float:
    """Independent l_0 of one bar size in one face (``l_0_mm``)."""
    cover = strip.cover_top_mm if top else strip.cover_bottom_mm
    good = top_bond_good(strip.thickness_mm) if top else True
    return l_0_mm(phi, f_ck_project(project), cover, good, alpha_6)


def laps(detail, top: bool) -> list[tuple[object, object, float, float]]:
    """(left piece, right piece, centre, overlap) of every lap of principal bars on a face."""
    out = []
    for b in principal_bars(detail, top):
        for o in lap_partners(detail, b):
            if o.x_start_mm > b.x_start_mm:
                lo, hi = o.x_start_mm, min(b.x_end_mm, o.x_end_mm)
                out.append((b, o, 0.5 * (lo + hi), hi - lo))
    return out


def check_laps(project, detail) -> list[str]:
    """Laps of principal bars overlap by >= l_0 with alpha_6 from the share rho_1 of the steel
    lapped within 0.65 l_0 of the lap's centre, found from the layout (EN 1992-1-1:2004,
    8.7.2(3), 8.7.3(1), Eq. (8.10), Table 8.3: alpha_6 = (rho_1/25)^0.5 within 1.0..1.5);
    distribution bars, all lapped at one section, by l_0 with alpha_6 = 1.5."""
    strip = detail.strip
    out = []
    for top in (True, False):
        all_laps = laps(detail, top)
        bars = principal_bars(detail, top)
        for b, o, centre, overlap in all_laps:
            need = l_0_for(project, strip, b.phi_mm, top, 1.5)
            for _ in range(3):  # window 0.65 l_0 and l_0 depend on each other: iterate
                window = 0.65 * need
                lapped = sum(
                    as_per_m(p.phi_mm, p.spacing_mm)
                    for p, _, c, _ in all_laps
                    if abs(c - centre) <= window
                )
                total = sum(
                    as_per_m(p.phi_mm, p.spacing_mm)
                    for p in bars
                    if p.x_start_mm <= centre <= p.x_end_mm
                ) - sum(
                    as_per_m(p.phi_mm, p.spacing_mm)
                    for p, q, _, _ in all_laps
                    if q.x_start_mm <= centre <= p.x_end_mm
                )
                rho_1 = 100.0 * lapped / total
                alpha_6 = min(1.5, max(1.0, math.sqrt(rho_1 / 25.0)))
                need = l_0_for(project, strip, b.phi_mm, top, alpha_6)
            if overlap < need - 0.5:
                out.append(
                    f"8.7.3: {b.set_id}/{o.set_id} lap {overlap:.0f} < l_0 {need:.0f} mm "
                    f"(rho_1 {rho_1:.0f} %)"
                )
    across = strip.panel_width_mm - 2 * strip.cover_side_mm
    for z in detail.zones:
        dist = [
            b for b in detail.bar_sets if b.role.value == "distribution" and b.zone_id == z.zone_id
        ]
        if len(dist) < 2:
            continue
        top = z.face.value == "top"
        lap = (sum(b.shape.length_mm for b in dist) - across) / (len(dist) - 1)
        need = l_0_for(project, strip, dist[0].phi_mm, top, 1.5)
        if lap < need - 0.5:
            out.append(f"8.7.3: distribution bars of {z.zone_id} lapped {lap:.0f} < {need:.0f}")
    return out


def _at_internal_support(strip, x_mm: float, phi: int) -> bool:
    """Within 10 phi (plus the support) of an internal support: a bottom bar stopping here
    is governed by 9.2.1.5(1) and the Fig. 9.2 resistance envelope, not by curtailment."""
    internal = [s for k, s in enumerate(strip.supports) if k not in end_support_indices(strip)]
    return any(abs(x_mm - s.x_mm) <= s.width_mm / 2 + 10 * phi + 1.0 for s in internal)


def check_curtailment(project, detail) -> list[str]:
    """Bars stop only where they are no longer needed, plus l_bd: over the last l_bd of every
    bar end inside the concrete (not at a slab end, not a lap, not a bottom bar ending at an
    internal support) the other bars of that face, with their own build-up over l_bd, resist
    the shifted M_Ed; so the point where a bar is no longer needed lies >= l_bd before its end.

    This is the stricter reading of EN 1992-1-1:2004, 9.2.1.3(3) and Fig. 9.2 (the stopped bar's
    own anchorage length not counted, "as a conservative simplification"), which the envelope
    method states for its cut-offs. The clause itself allows the linear build-up within l_bd;
    that exact rule is ``check_selfcheck``, the only one applied to the simplified rules."""
    if project.reinforcement.curtailment.value != "envelope":
        return []
    strip = detail.strip
    ends = slab_ends(strip)
    c = strip.cover_side_mm
    out = []
    for top in (True, False):
        fr = _face(detail, top)
        x = fr.x_mm
        demand = fr.m_ed_shifted_knm_per_m
        for b in principal_bars(detail, top):
            lbd = l_bd_of(project, strip, b.phi_mm, top)
            partners = lap_partners(detail, b)
            others = None
            for e, sign in ((b.x_start_mm, +1), (b.x_end_mm, -1)):
                if abs(e - (ends.left_mm + c)) < 1.0 or abs(e - (ends.right_mm - c)) < 1.0:
                    continue
                if any(o.x_start_mm < e < o.x_end_mm for o in partners):
                    continue
                if not top and _at_internal_support(strip, e, b.phi_mm):
                    continue
                lo, hi = (e, e + lbd) if sign > 0 else (e - lbd, e)
                sel = (x >= lo - 1e-6) & (x <= hi + 1e-6)
                if not np.any(sel & (demand > TOL_KNM)):
                    continue
                if others is None:
                    others = resistance_knm(project, detail, top, x, exclude=(b.set_id,))
                short = sel & (demand * (1 - TOL_REL) - TOL_KNM > others)
                if np.any(short):
                    i = int(np.flatnonzero(short)[0])
                    out.append(
                        f"9.2.1.3(3): {b.set_id} stops at x = {e:.0f} but the other bars give "
                        f"{others[i]:.2f} < {demand[i]:.2f} kNm/m at x = {x[i]:.0f} "
                        f"(within l_bd = {lbd:.0f})"
                    )
    return out


def check_anchorage_table(project, detail) -> list[str]:
    """The l_bd the pipeline reports against the one computed here (8.4.4)."""
    out = []
    for a in detail.anchorage:
        top = a.layer.startswith("T")
        for name, got, want in (
            ("l_bd", a.l_bd_mm, l_bd_of(project, detail.strip, a.phi_mm, top)),
        ):
            if abs(got - want) > 5e-3 * want:
                out.append(f"{name} of H{a.phi_mm} {a.layer}: {got:.1f} against {want:.1f} mm")
    return out


ALL_CHECKS = (
    check_selfcheck,
    check_shift,
    check_zones,
    check_distribution,
    check_supports,
    check_bars,
    check_laps,
    check_curtailment,
    check_anchorage_table,
)


def check_detail(project, detail) -> list[str]:
    """Every independent check on one detailed strip; an empty list when all hold."""
    return [line for check in ALL_CHECKS for line in check(project, detail)]
