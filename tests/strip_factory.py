"""Random valid projects for the design and detailing tests, built from YAML text.

A ``StripSpec`` describes one strip in the terms of the project file (sample_projects/README.md);
``project_yaml`` writes the file and ``build_project`` reads it back through
``detailer.project.parse_project``, so every generated project is one a user could have typed.
``strip_specs()`` is the hypothesis strategy for the property tests.

Also here: small, independent clause formulas the tests check the pipeline against (each names
its clause); they are written from the standards, not imported from ``detailer/codes``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from hypothesis import strategies as st

from detailer.model import Project
from detailer.project import parse_project

# --------------------------------------------------------------------------- project files


@dataclass(frozen=True, slots=True)
class StripSpec:
    """One strip of a generated project; lengths in mm, area loads kN/m2, line loads kN/m."""

    spans_mm: tuple[int, ...]
    thickness_mm: int
    g_k_kn_per_m2: float  # superimposed permanent load (self-weight is added by the reader)
    q_k_kn_per_m2: float
    left_end: str = "pinned"  # "pinned", "monolithic" or "cantilever"
    right_end: str = "pinned"
    left_cantilever_mm: int = 0
    right_cantilever_mm: int = 0
    line_load: tuple[int, int, float] | None = None  # (span number, x_mm, g_k kN/m)
    concrete: str = "C30/37"
    cover_mm: int = 25
    support_width_mm: int = 250
    panel_width_mm: int = 5000
    stock_length_mm: int = 12000
    curtailment: str = "envelope"
    category: str = "A"


def _end(kind: str, cantilever_mm: int) -> str:
    return f"{{cantilever_mm: {cantilever_mm}}}" if kind == "cantilever" else kind


def project_yaml(spec: StripSpec, strip_id: str = "G1") -> str:
    """The project file for one generated strip (format: sample_projects/README.md)."""
    lines = [
        "project: {id: gen, title: \"Generated strip\", revision: P1, date: 2025-01-01, drawing: G-1}",
        f"materials: {{concrete: {spec.concrete}}}",
        "reinforcement:",
        f"  stock_length_mm: {spec.stock_length_mm}",
        f"  curtailment: {spec.curtailment}",
        "strips:",
        f"  - id: {strip_id}",
        f"    thickness_mm: {spec.thickness_mm}",
        f"    cover: {{top_mm: {spec.cover_mm}, bottom_mm: {spec.cover_mm}, side_mm: {spec.cover_mm}}}",
        f"    panel_width_mm: {spec.panel_width_mm}",
        f"    spans_mm: [{', '.join(str(s) for s in spec.spans_mm)}]",
        f"    support_widths_mm: {spec.support_width_mm}",
        f"    left_end: {_end(spec.left_end, spec.left_cantilever_mm)}",
        f"    right_end: {_end(spec.right_end, spec.right_cantilever_mm)}",
        "    loads:",
        f"      category: {spec.category}",
        f"      g_k_kn_per_m2: {spec.g_k_kn_per_m2:.2f}",
        f"      q_k_kn_per_m2: {spec.q_k_kn_per_m2:.2f}",
    ]
    if spec.line_load is not None:
        span, x_mm, g_k = spec.line_load
        lines.append(f"      line: [{{span: {span}, x_mm: {x_mm}, g_k_kn_per_m: {g_k:.2f}}}]")
    return "\n".join(lines) + "\n"


def build_project(spec: StripSpec) -> Project:
    """Parse the generated file exactly as a user's file would be parsed."""
    return parse_project(project_yaml(spec), "gen.yaml")


@st.composite
def strip_specs(draw: st.DrawFn) -> StripSpec:
    """2-5 spans of 2.5-7.5 m, h 175-300, g_k 0.5-3, q_k 1.5-5 kN/m2, optional cantilever
    (0.8-2 m), monolithic end and line load. h is drawn at least span/32 so that most strips
    are designable (the test still accepts a clean DesignError)."""
    n = draw(st.integers(2, 5))
    spans = tuple(draw(st.integers(50, 150)) * 50 for _ in range(n))
    h_low = max(175, 5 * math.ceil(max(spans) / 32 / 5))
    h = draw(st.integers(h_low // 5, 60)) * 5 if h_low <= 300 else 300
    ends = []
    cantilevers = []
    for _ in range(2):
        kind = draw(st.sampled_from(["pinned", "pinned", "monolithic", "cantilever"]))
        ends.append(kind)
        cantilevers.append(draw(st.integers(16, 40)) * 50 if kind == "cantilever" else 0)
    line = None
    if draw(st.booleans()):
        span = draw(st.integers(1, n))
        x = draw(st.integers(2, 8)) * spans[span - 1] // 10
        line = (span, x, draw(st.integers(4, 20)) / 2.0)
    return StripSpec(
        spans_mm=spans,
        thickness_mm=h,
        g_k_kn_per_m2=draw(st.integers(2, 12)) / 4.0,
        q_k_kn_per_m2=draw(st.integers(3, 10)) / 2.0,
        left_end=ends[0],
        right_end=ends[1],
        left_cantilever_mm=cantilevers[0],
        right_cantilever_mm=cantilevers[1],
        line_load=line,
        concrete=draw(st.sampled_from(["C25/30", "C30/37", "C32/40", "C35/45"])),
        cover_mm=draw(st.sampled_from([25, 30, 35])),
        support_width_mm=draw(st.integers(4, 7)) * 50,
        panel_width_mm=draw(st.integers(6, 16)) * 500,
    )


# --------------------------------------------------------------------------- clause formulas

GAMMA_C = 1.5  # EN 1992-1-1:2004, Table 2.1N (UK NA the same)
GAMMA_S = 1.15  # EN 1992-1-1:2004, Table 2.1N (UK NA the same)
ALPHA_CC = 0.85  # UK NA to EN 1992-1-1:2004, 3.1.6(1), flexure
F_YK = 500.0  # B500 to BS 4449


def f_ck_of(concrete: str) -> float:
    """f_ck from a class name such as "C30/37" (EN 1992-1-1:2004, Table 3.1)."""
    return float(concrete[1:].split("/")[0])


def f_ctm(f_ck: float) -> float:
    """f_ctm = 0.30 f_ck^(2/3) for <= C50/60 (EN 1992-1-1:2004, Table 3.1, formula value)."""
    return 0.30 * f_ck ** (2.0 / 3.0)


def f_yd() -> float:
    """f_yd = f_yk / gamma_s (EN 1992-1-1:2004, 3.2.7(2))."""
    return F_YK / GAMMA_S


def bar_area(phi_mm: float) -> float:
    """Nominal area pi phi^2 / 4, mm2 (BS 4449:1997, Table 1)."""
    return math.pi * phi_mm**2 / 4.0


def as_per_m(phi_mm: float, spacing_mm: float) -> float:
    """Area per metre width, (pi phi^2/4) 1000/s, mm2/m."""
    return bar_area(phi_mm) * 1000.0 / spacing_mm


def m_rd_knm(as_mm2: float, d_mm: float, f_ck: float, b_mm: float = 1000.0) -> float:
    """Rectangular block, steel yielded: x = A f_yd/(0.8 f_cd b), z = d - 0.4x <= 0.95 d.

    EN 1992-1-1:2004, 3.1.7(3) with f_cd = alpha_cc f_ck/gamma_c (3.1.6(1), UK NA alpha_cc
    0.85); the 0.95 d cap is the Concrete Centre "How to" good practice used in the design.
    """
    if as_mm2 <= 0:
        return 0.0
    f_cd = ALPHA_CC * f_ck / GAMMA_C
    x = as_mm2 * f_yd() / (0.8 * f_cd * b_mm)
    z = min(d_mm - 0.4 * x, 0.95 * d_mm)
    return as_mm2 * f_yd() * z / 1e6


def l_bd_mm(phi: float, f_ck: float, cover_mm: float, good_bond: bool) -> float:
    """Design anchorage length of a straight bar in tension at sigma_sd = f_yd.

    f_ctd = alpha_ct f_ctk,0.05/gamma_c with f_ctk,0.05 = 0.7 f_ctm (3.1.6(2), Table 3.1);
    f_bd = 2.25 eta_1 f_ctd (Eq. (8.2), eta_2 = 1 for phi <= 32); l_b,rqd = phi/4 f_yd/f_bd
    (Eq. (8.3)); alpha_2 = 1 - 0.15 (c_d - phi)/phi within 0.7..1 with c_d = cover (Table 8.2,
    Fig. 8.3: the cover governs c_d for slab bars at >= 2 c + phi centres); l_bd >= l_b,min =
    max(0.3 l_b,rqd, 10 phi, 100) (Eq. (8.4), (8.6)). EN 1992-1-1:2004, 8.4.
    """
    f_ctd = 1.0 * 0.7 * f_ctm(f_ck) / GAMMA_C
    f_bd = 2.25 * (1.0 if good_bond else 0.7) * f_ctd
    l_b_rqd = phi / 4.0 * f_yd() / f_bd
    alpha_2 = min(1.0, max(0.7, 1.0 - 0.15 * (cover_mm - phi) / phi))
    return max(alpha_2 * l_b_rqd, 0.3 * l_b_rqd, 10.0 * phi, 100.0)


def l_0_mm(phi: float, f_ck: float, cover_mm: float, good_bond: bool) -> float:
    """Lap length with all bars lapped at one section (alpha_6 = 1.5, Table 8.3 > 50 %):
    l_0 = alpha_2 alpha_6 l_b,rqd >= max(0.3 alpha_6 l_b,rqd, 15 phi, 200).

    EN 1992-1-1:2004, 8.7.3(1), Eq. (8.10), Eq. (8.11).
    """
    f_ctd = 0.7 * f_ctm(f_ck) / GAMMA_C
    f_bd = 2.25 * (1.0 if good_bond else 0.7) * f_ctd
    l_b_rqd = phi / 4.0 * f_yd() / f_bd
    alpha_2 = min(1.0, max(0.7, 1.0 - 0.15 * (cover_mm - phi) / phi))
    return max(alpha_2 * 1.5 * l_b_rqd, 0.3 * 1.5 * l_b_rqd, 15.0 * phi, 200.0)


def top_bond_good(h_mm: float) -> bool:
    """Horizontal bars in members h <= 250 mm are in good bond; top bars of deeper slabs
    (within 250 mm... of the top, h <= 600) are taken as poor (EN 1992-1-1:2004, Fig. 8.2)."""
    return h_mm <= 250.0


#: BS 8666:2005, Table 2: minimum scheduling radius r by bar size d, mm.
BS8666_R_MM = {6: 12, 8: 16, 10: 20, 12: 24, 16: 32, 20: 70, 25: 87, 32: 112, 40: 140, 50: 175}


def bs8666_length_mm(code: str, phi: int, dims: dict[str, int]) -> float:
    """Total length L along the centre line, BS 8666:2005 standard shapes table:
    00/01 L = A; 11 L = A + (B) - 0.5r - d; 21 L = A + B + (C) - r - 2d."""
    r = BS8666_R_MM[phi]
    if code in ("00", "01"):
        return float(dims["A"])
    if code == "11":
        return dims["A"] + dims["B"] - 0.5 * r - phi
    if code == "21":
        return dims["A"] + dims["B"] + dims["C"] - r - 2.0 * phi
    raise AssertionError(f"shape code {code} is not expected in a one-way slab strip")



# --------------------------------------------------------------------------- independent checks
# Each check reads only the public results (zones, bar sets, the analysis envelope) and the
# clause formulas above; it returns one line per violation so a test can print them all.

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


def l_0_of(project, strip, phi: int, top: bool) -> float:
    """Independent l_0 of one bar size in one face (``l_0_mm``)."""
    cover = strip.cover_top_mm if top else strip.cover_bottom_mm
    good = top_bond_good(strip.thickness_mm) if top else True
    return l_0_mm(phi, f_ck_project(project), cover, good)


def end_legs(bar, ends: SlabEnds, cover_side_mm: float) -> tuple[float, float]:
    """Legs turned down at the left/right ends (they count as anchorage along the bar)."""
    code = bar.shape.code
    if code == "11":
        at_left = abs(bar.x_start_mm - (ends.left_mm + cover_side_mm)) < 1.0
        leg = float(bar.shape.dim("B"))
        return (leg, 0.0) if at_left else (0.0, leg)
    if code == "21" and not is_u_bar(bar):
        return float(bar.shape.dim("A")), float(bar.shape.dim("C"))
    return 0.0, 0.0


def resistance_knm(project, detail, top: bool, x_mm: np.ndarray, exclude=()) -> np.ndarray:
    """M_Rd(x) of the principal bars of one face, kNm/m.

    Each bar set counts with its full area where it has l_bd of bar (legs included) on both
    sides of x, and linearly less within l_bd of an end (EN 1992-1-1:2004, 9.2.1.3(3), Fig. 9.2);
    the resistance is that of the total area at its centroid (``m_rd_knm``). U-bars at free
    edges are left out (on the safe side).
    """
    strip = detail.strip
    ends = slab_ends(strip)
    cover = strip.cover_top_mm if top else strip.cover_bottom_mm
    area = np.zeros_like(x_mm)
    area_d = np.zeros_like(x_mm)
    for b in principal_bars(detail, top):
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


def flexure_as_req(m_ed_knm: float, d_mm: float, f_ck: float) -> tuple[float, float, float]:
    """(K, z, A_s,req) by the Concrete Centre "How to design concrete structures using
    Eurocode 2" method (EN 1992-1-1:2004, 6.1, 3.1.7(3)): K = M/(b d^2 f_ck),
    z = d [0.5 + sqrt(0.25 - K/1.134)] <= 0.95 d, A_s = M/(f_yd z); b = 1000 mm."""
    k = m_ed_knm * 1e6 / (1000.0 * d_mm**2 * f_ck)
    z = min(d_mm * (0.5 + math.sqrt(0.25 - k / 1.134)), 0.95 * d_mm)
    return k, z, m_ed_knm * 1e6 / (f_yd() * z)


def is_end_fixity_zone(zone) -> bool:
    """Top steel over a pinned end for the partial fixity the analysis ignores (9.3.1.2(2))."""
    return zone.description.endswith("(end), top")


def is_nominal_zone(zone) -> bool:
    """Nominal bottom bars of a cantilever (common practice): no designed moment."""
    return "nominal" in zone.description


def spacing_limit_mm(h_mm: float, *, principal: bool, max_moment: bool) -> float:
    """EN 1992-1-1:2004, 9.3.1.1(3): principal 3h <= 400 (2h <= 250 in areas of maximum
    moment); secondary 3.5h <= 450 (3h <= 400 there)."""
    if principal:
        return min(2 * h_mm, 250.0) if max_moment else min(3 * h_mm, 400.0)
    return min(3 * h_mm, 400.0) if max_moment else min(3.5 * h_mm, 450.0)


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
    for b in principal_bars(detail, True) + principal_bars(detail, False):
        if b.spacing_mm > general:
            out.append(f"9.3.1.1(3): set {b.set_id} at {b.spacing_mm} > {general:g} mm")
    return out


def check_distribution(project, detail) -> list[str]:
    """Transverse bars >= 20 % of the principal steel (9.3.1.1(2)), spacing <= 3.5h <= 450
    (9.3.1.1(3)); every zone's principal bars have them over their extent (common practice)."""
    strip = detail.strip
    out = []
    for z in detail.zones:
        dist = [b for b in detail.bar_sets if b.role.value == "distribution" and b.zone_id == z.zone_id]
        if not dist:
            out.append(f"9.3.1.1(2): zone {z.zone_id} has no distribution bars")
            continue
        main = [b for b in detail.bar_sets if b.role.value == "principal" and b.zone_id == z.zone_id]
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
            if shape.length_mm > across + 1e-6 and len(
                [x for x in detail.bar_sets if x.zone_id == b.zone_id and x.role is b.role]
            ) == 1:
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
        if vertical and dims[vertical] > depth + 1e-6:
            out.append(f"{b.set_id}: leg {dims[vertical]} mm deeper than h less covers {depth:g}")
    return out


def lap_partners(detail, bar):
    """Other pieces of the same lapped run (same zone, layer, size, spacing and offset)."""
    return [
        o
        for o in detail.bar_sets
        if o is not bar
        and o.role is bar.role
        and o.zone_id == bar.zone_id
        and o.layer == bar.layer
        and o.phi_mm == bar.phi_mm
        and o.spacing_mm == bar.spacing_mm
        and abs(o.offset_mm - bar.offset_mm) < 1e-6
        and o.x_start_mm < bar.x_end_mm
        and o.x_end_mm > bar.x_start_mm
    ]


def check_laps(project, detail) -> list[str]:
    """Lapped pieces of principal bars overlap by >= l_0 (EN 1992-1-1:2004, 8.7.3(1), all bars
    lapped at one section: alpha_6 = 1.5)."""
    strip = detail.strip
    out = []
    for b in detail.bar_sets:
        if b.role.value != "principal":
            continue
        need = l_0_of(project, strip, b.phi_mm, is_top(b))
        for o in lap_partners(detail, b):
            if o.x_start_mm <= b.x_start_mm:
                continue  # each pair once, from its left piece
            overlap = b.x_end_mm - o.x_start_mm
            if overlap < need - 0.5:
                out.append(f"8.7.3: {b.set_id}/{o.set_id} lap {overlap:.0f} < l_0 {need:.0f} mm")
    return out


def _at_internal_support(strip, x_mm: float, phi: int) -> bool:
    """Within 10 phi (plus the support) of an internal support: a bottom bar stopping here
    is governed by 9.2.1.5(1) and the Fig. 9.2 resistance envelope, not by curtailment."""
    internal = [
        s
        for k, s in enumerate(strip.supports)
        if k not in end_support_indices(strip)
    ]
    return any(abs(x_mm - s.x_mm) <= s.width_mm / 2 + 10 * phi + 1.0 for s in internal)


def check_curtailment(project, detail) -> list[str]:
    """Bars stop only where they are no longer needed, plus l_bd (EN 1992-1-1:2004, 9.2.1.3(3)
    and Fig. 9.2, the stopped bar's own anchorage length not counted): over the last l_bd of
    every bar end inside the concrete (not at a slab end, not a lap, not a bottom bar ending
    at an internal support) the other bars of that face, with their own build-up over l_bd,
    resist the shifted M_Ed. So where a bar stops, the point where it is no longer needed lies
    at least l_bd before its end."""
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
    """The l_bd and l_0 the pipeline reports against the ones computed here (8.4.4, 8.7.3)."""
    out = []
    for a in detail.anchorage:
        top = a.layer.startswith("T")
        for name, got, want in (
            ("l_bd", a.l_bd_mm, l_bd_of(project, detail.strip, a.phi_mm, top)),
            ("l_0", a.l_0_mm, l_0_of(project, detail.strip, a.phi_mm, top)),
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
