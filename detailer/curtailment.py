"""Curtailment: where each group of bars starts and stops, how it is anchored, and laps.

Envelope method (EN 1992-1-1:2004, 9.2.1.3 with 9.3.1.1(4)): the moment demand shifted by
a_l = d is compared with the resistance of the bars that remain; a group of bars may stop where
the remaining bars suffice, plus l_bd. Where it saves steel a zone's bars are laid in two
alternate groups (each at twice the spacing): group "a" runs the whole zone and into the
supports, group "b" only where the demand needs it. Detailing rules applied here:

* bottom bars at end supports: group a (at least half the span steel) carried to the support
  and anchored from the face of the support for F_E = |V_Ed| a_l / z (9.3.1.2(1), 9.2.1.4(2),
  (3));
* bottom bars at internal supports: group a carried past the face by at least 10 phi
  (9.2.1.5(1));
* top bars at monolithic ends and over pinned ends: turned down into the support as L-bars;
* cantilevers: top bars run to the free edge and back past the shifted point of contraflexure
  plus l_bd; a U-bar closes the free edge (9.3.1.4);
* bar runs longer than the stock length are split in ``detailer.laps``; U-bars and
  distribution bars are in ``detailer.secondary``.

Everything here is geometry along the strip (x in mm) and bar sets; the code's numbers come in
through the ``DesignCode`` and the anchorage table.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from detailer import simplified
from detailer.codes.base import ConcreteSteel, DesignCode
from detailer.demand import DemandCurve, intervals_above
from detailer.design import B_MM, ZoneSpec, as_per_m
from detailer.layout import BarRole, BarSet, Face, ZoneDesign
from detailer.model import Strip
from detailer.schedule import bar_count, principal_bar_count
from detailer.shapes import detailing as shape_helpers
from detailer.shapes.bs8666 import ScheduledShape, make_shape
from detailer.shapes.table2 import bending_limits

#: A staged (alternate-bar) layout is used only when group b is at most this share of group a's
#: length; otherwise one group runs the whole zone (common practice: the saving must be real).
STAGING_MAX_LENGTH_RATIO = 0.85
#: The area of maximum moment, where the tighter spacing limit of 9.3.1.1(3) applies, is taken as
#: where the demand is at least this share of the zone's peak (common practice).
MAX_MOMENT_AREA_SHARE = 0.5
#: Sagging demand (kNm per m) near an internal support above which bottom bars are lapped
#: across it rather than stopped 10 phi past the faces (below it: rounding noise).
SAGGING_AT_SUPPORT_KNM = 0.05
#: U-bars at a free edge: legs of 2h along the slab (EN 1992-1-1 Fig. 9.8; from memory).
U_BAR_LEG_OVER_H = 2.0


@dataclass(frozen=True, slots=True)
class BarEnds:
    """How a run of principal bars ends: a leg turned at the left/right end (0 = straight)."""

    left_leg_mm: float = 0.0
    right_leg_mm: float = 0.0


@dataclass(frozen=True, slots=True)
class Run:
    """A run of bars in one group before it is turned into shapes and split for stock."""

    set_id: str
    zone_id: str
    face: Face
    layer: str
    phi_mm: int
    spacing_mm: int
    offset_mm: float
    x_start_mm: float
    x_end_mm: float
    ends: BarEnds
    note: str = ""


@dataclass(frozen=True, slots=True)
class StripGeometry:
    """Ends of the concrete along the strip and the bar end positions inside the cover."""

    slab_left_mm: float
    slab_right_mm: float
    bar_left_mm: float
    bar_right_mm: float
    check_left_mm: float  # inner face of an end support (the slab end at a cantilever tip)
    check_right_mm: float

    @classmethod
    def of(cls, strip: Strip) -> StripGeometry:
        nodes = strip.node_x_mm
        sups = strip.supports
        left = nodes[0] if strip.has_left_cantilever else sups[0].x_mm - sups[0].width_mm / 2
        right = nodes[-1] if strip.has_right_cantilever else sups[-1].x_mm + sups[-1].width_mm / 2
        c = strip.cover_side_mm
        check_left = left + c if strip.has_left_cantilever else sups[0].x_mm + sups[0].width_mm / 2
        check_right = (
            right - c if strip.has_right_cantilever else sups[-1].x_mm - sups[-1].width_mm / 2
        )
        return cls(left, right, left + c, right - c, check_left, check_right)


@dataclass(frozen=True, slots=True)
class Anchorages:
    """Design anchorage (l_bd) and lap (l_0) lengths per bar size and face, mm."""

    l_bd: dict  # (phi, face) -> mm
    l_0: dict  # (phi, face) -> mm, laps staggered: at most 50 % lapped at a section
    l_0_all: dict  # (phi, face) -> mm, every bar lapped at one section (distribution bars)

    def lbd(self, phi: int, face: Face) -> float:
        return self.l_bd[(phi, face)]

    def l0(self, phi: int, face: Face) -> float:
        return self.l_0[(phi, face)]

    def l0_all(self, phi: int, face: Face) -> float:
        return self.l_0_all[(phi, face)]


def m_rd_knm_per_m(code: DesignCode, mat: ConcreteSteel, as_mm2_per_m: float, d_mm: float) -> float:
    """Moment resistance of a layer of bars (per metre), through the design code."""
    if as_mm2_per_m <= 0:
        return 0.0
    return code.moment_resistance(as_mm2_per_m, B_MM, d_mm, mat)


def leg_mm(strip: Strip, phi_mm: int) -> float:
    """Out-to-out leg of an L-bar turned into an end support: the slab depth less both covers,
    but never shorter than the minimum end projection P of BS 8666:2005, Table 2 (a longer
    leg runs on into the beam or wall below the slab)."""
    inside = 5.0 * math.floor(
        (strip.thickness_mm - strip.cover_top_mm - strip.cover_bottom_mm) / 5.0
    )
    return max(inside, float(bending_limits(int(phi_mm)).p_mm))


def end_face_mm(strip: Strip, i: int) -> float:
    """Inner face of end support i (where anchorage is measured from, 9.2.1.4(3))."""
    sup = strip.supports[i]
    return sup.x_mm + sup.width_mm / 2 if i == 0 else sup.x_mm - sup.width_mm / 2


def straight_past_face_mm(strip: Strip, geom: StripGeometry, i: int) -> float:
    """Length of bar from the inner face of end support i to the bar end inside the cover."""
    face = end_face_mm(strip, i)
    return face - geom.bar_left_mm if i == 0 else geom.bar_right_mm - face


def _interval_containing(
    curve: DemandCurve, level: float, x_mm: float
) -> tuple[float, float] | None:
    for x0, x1 in intervals_above(curve.x_mm, curve.m_shifted_knm_per_m, level):
        if x0 - 1e-6 <= x_mm <= x1 + 1e-6:
            return x0, x1
    return None


def _union_in(
    curve: DemandCurve, level: float, x_from: float, x_to: float
) -> tuple[float, float] | None:
    """Hull of the intervals where the shifted demand exceeds level, within [x_from, x_to]."""
    parts = [
        (max(a, x_from), min(b, x_to))
        for a, b in intervals_above(curve.x_mm, curve.m_shifted_knm_per_m, level)
        if b >= x_from and a <= x_to
    ]
    if not parts:
        return None
    return min(p[0] for p in parts), max(p[1] for p in parts)


def principal_runs(
    spec: ZoneSpec,
    zone: ZoneDesign,
    *,
    strip: Strip,
    geom: StripGeometry,
    curve: DemandCurve,
    code: DesignCode,
    mat: ConcreteSteel,
    anch: Anchorages,
    as_min_mm2_per_m: float,
    simplified_rules: bool = False,
) -> tuple[Run, ...]:
    """The group-a (and, where staged, group-b) runs of one zone.

    With ``simplified_rules`` the extents of span bottoms and internal-support tops come from
    the fixed fractions of ``detailer.simplified`` instead of the shifted envelope.
    """
    phi, s = zone.phi_mm, zone.spacing_mm
    face = zone.face
    l_bd = anch.lbd(phi, face)
    layer = "T1" if face is Face.TOP else "B1"
    sups = strip.supports
    leg = leg_mm(strip, phi)
    rules = code.detailing_rules()

    # --- group a extent and end details
    if spec.kind == "span":
        seg = strip.segments[spec.segment]
        left_sup = _support_at(strip, seg.x_start_mm)
        right_sup = _support_at(strip, seg.x_end_mm)
        ends = {
            "strip": strip,
            "geom": geom,
            "phi": phi,
            "curve": curve,
            "code": code,
            "mat": mat,
            "anch": anch,
            "d_mm": zone.d_mm,
            "half_as": as_per_m(phi, 2 * s),
        }
        a0, left_leg = _bottom_end(i=left_sup, side="left", **ends)
        a1, right_leg = _bottom_end(i=right_sup, side="right", **ends)
    elif spec.kind == "cantilever-bottom":
        seg = strip.segments[spec.segment]
        if seg.index == 0:  # left cantilever: tip on the left, root support on the right
            root = sups[0]
            a0, a1 = geom.bar_left_mm, root.x_mm + root.width_mm / 2 + 10 * phi
        else:
            root = sups[-1]
            a0, a1 = root.x_mm - root.width_mm / 2 - 10 * phi, geom.bar_right_mm
        left_leg = right_leg = 0.0
    elif spec.kind == "end-fixity":
        sup_i = spec.supports[0]
        if sup_i == 0:
            a0, a1 = geom.bar_left_mm, spec.x_to_mm
            left_leg, right_leg = leg, 0.0
        else:
            a0, a1 = spec.x_from_mm, geom.bar_right_mm
            left_leg, right_leg = 0.0, leg
    else:  # top over supports: shifted hogging region plus l_bd
        region = _interval_containing(curve, 1e-6, zone.x_peak_mm) or (spec.x_from_mm, spec.x_to_mm)
        a0, a1 = region[0] - l_bd, region[1] + l_bd
        # 9.3.1.2(2)-style minimum reach of top bars at monolithic ends: 0.2 x adjacent span.
        left_leg = right_leg = 0.0
        if a0 <= geom.bar_left_mm + 1e-6:
            a0 = geom.bar_left_mm
            left_leg = 0.0 if strip.has_left_cantilever else leg
        if a1 >= geom.bar_right_mm - 1e-6:
            a1 = geom.bar_right_mm
            right_leg = 0.0 if strip.has_right_cantilever else leg
        for i in spec.supports:
            sup = sups[i]
            end = (i == 0 and not strip.has_left_cantilever) or (
                i == len(sups) - 1 and not strip.has_right_cantilever
            )
            if end:
                seg = _adjacent_span(strip, i)
                reach = rules.top_extent_over_adjacent_span * seg.length_mm
                if i == 0:
                    a1 = max(a1, sup.x_mm + sup.width_mm / 2 + reach)
                else:
                    a0 = min(a0, sup.x_mm - sup.width_mm / 2 - reach)
    a0, a1 = max(a0, geom.bar_left_mm), min(a1, geom.bar_right_mm)

    s_general = code.max_spacing(strip.thickness_mm, principal=True, high_moment_zone=False)
    half_as = as_per_m(phi, 2 * s)
    if simplified_rules and spec.kind in ("span", "support"):
        simple = _simplified_runs(spec, zone, strip, geom, layer, a0, a1, left_leg, right_leg)
        if simple is not None:
            # The rules' extents are minimums: where the shifted envelope needs a bar further
            # (e.g. an interior span hogging under alternate-span loading), it goes further.
            env = principal_runs(
                spec,
                zone,
                strip=strip,
                geom=geom,
                curve=curve,
                code=code,
                mat=mat,
                anch=anch,
                as_min_mm2_per_m=as_min_mm2_per_m,
                simplified_rules=False,
            )
            env_a, env_b = env[0], env[-1]
            simple = tuple(
                _widen(r, e) for r, e in zip(simple, (env_a, env_b if len(env) == 2 else env_a))
            )
            if len(simple) == 2 and 2 * s > s_general + 1e-9:
                # alternate bars would be too far apart: all bars take the longer extent
                a = simple[0]
                return (replace(a, set_id=zone.zone_id, spacing_mm=s, note=""),)
            return simple

    # --- group b: where group a alone does not suffice (and the area of maximum moment)
    staged = (
        spec.kind in ("span", "support")
        and 2 * s <= s_general + 1e-9
        and half_as >= as_min_mm2_per_m - 1e-9
    )
    if staged:
        m_rd_a = m_rd_knm_per_m(code, mat, half_as, zone.d_mm)
        need = _union_in(curve, m_rd_a, a0, a1)
        peak_area = _union_in(curve, MAX_MOMENT_AREA_SHARE * zone.m_ed_knm_per_m, a0, a1)
        parts = [p for p in (need, peak_area) if p is not None]
        if parts:
            b0 = max(a0, min(p[0] for p in parts) - l_bd)
            b1 = min(a1, max(p[1] for p in parts) + l_bd)
        else:
            b0 = b1 = 0.5 * (a0 + a1)
        if (b1 - b0) > STAGING_MAX_LENGTH_RATIO * (a1 - a0) or b1 - b0 < 1.0:
            staged = False
    if not staged:
        return (
            Run(
                f"{zone.zone_id}",
                zone.zone_id,
                face,
                layer,
                phi,
                s,
                0.0,
                a0,
                a1,
                BarEnds(left_leg, right_leg),
            ),
        )
    legs_b = BarEnds(left_leg if b0 <= a0 + 1e-6 else 0.0, right_leg if b1 >= a1 - 1e-6 else 0.0)
    return _alternate_runs(zone, layer, (a0, a1, BarEnds(left_leg, right_leg)), (b0, b1, legs_b))


def _alternate_runs(
    zone: ZoneDesign,
    layer: str,
    a: tuple[float, float, BarEnds],
    b: tuple[float, float, BarEnds],
    note: str = "",
) -> tuple[Run, Run]:
    """Two alternate groups at twice the zone spacing: "a" full length, "b" curtailed."""
    phi, s = zone.phi_mm, zone.spacing_mm
    return (
        Run(f"{zone.zone_id}-a", zone.zone_id, zone.face, layer, phi, 2 * s, 0.0, a[0], a[1], a[2],
            "alternate bars, full length" + note),
        Run(f"{zone.zone_id}-b", zone.zone_id, zone.face, layer, phi, 2 * s, float(s), b[0], b[1],
            b[2], "alternate bars, curtailed" + note),
    )  # fmt: skip


def _widen(rule: Run, envelope: Run) -> Run:
    """A run of the simplified rules stretched to cover the envelope method's run."""
    x0 = min(rule.x_start_mm, envelope.x_start_mm)
    x1 = max(rule.x_end_mm, envelope.x_end_mm)
    if x0 >= rule.x_start_mm - 1e-6 and x1 <= rule.x_end_mm + 1e-6:
        return rule
    ends = BarEnds(
        envelope.ends.left_leg_mm if x0 < rule.x_start_mm else rule.ends.left_leg_mm,
        envelope.ends.right_leg_mm if x1 > rule.x_end_mm else rule.ends.right_leg_mm,
    )
    return replace(
        rule,
        x_start_mm=x0,
        x_end_mm=x1,
        ends=ends,
        note=rule.note + "; extended where the shifted envelope needs it",
    )


def _simplified_runs(spec, zone, strip, geom, layer, a0, a1, left_leg, right_leg):
    """Runs by the fixed fractions of detailer.simplified (None: zone not covered by them)."""
    phi = zone.phi_mm
    sups = strip.supports
    if spec.kind == "span":
        seg = strip.segments[spec.segment]
        stop = simplified.bottom_stop_mm(seg.length_mm)
        b0, b1 = seg.x_start_mm + stop, seg.x_end_mm - stop
    else:
        if any(_is_end_support(strip, i) for i in spec.supports) or not spec.supports:
            return None
        first, last = sups[spec.supports[0]], sups[spec.supports[-1]]
        span_l = first.x_mm - sups[spec.supports[0] - 1].x_mm
        span_r = sups[spec.supports[-1] + 1].x_mm - last.x_mm
        full_l, half_l = simplified.top_reach_mm(span_l, phi)
        full_r, half_r = simplified.top_reach_mm(span_r, phi)
        face_l = first.x_mm - first.width_mm / 2
        face_r = last.x_mm + last.width_mm / 2
        a0, a1 = max(face_l - half_l, geom.bar_left_mm), min(face_r + half_r, geom.bar_right_mm)
        b0, b1 = face_l - full_l, face_r + full_r
        left_leg = right_leg = 0.0
    note = f"simplified rules, {simplified.SIMPLIFIED_SOURCE}"
    return _alternate_runs(
        zone,
        layer,
        (a0, a1, BarEnds(left_leg, right_leg)),
        (max(b0, a0), min(b1, a1), BarEnds()),
        note="; " + note,
    )


def _support_at(strip: Strip, x_mm: float) -> int:
    for i, s in enumerate(strip.supports):
        if abs(s.x_mm - x_mm) < 1e-6:
            return i
    raise ValueError(f"no support at x = {x_mm}")


def _adjacent_span(strip: Strip, support_index: int):
    x = strip.supports[support_index].x_mm
    for seg in strip.segments:
        if not seg.is_cantilever and (
            abs(seg.x_start_mm - x) < 1e-6 or abs(seg.x_end_mm - x) < 1e-6
        ):
            return seg
    raise ValueError("end support without a span")


def _is_end_support(strip: Strip, i: int) -> bool:
    last = len(strip.supports) - 1
    return (i == 0 and not strip.has_left_cantilever) or (
        i == last and not strip.has_right_cantilever
    )


def _bottom_end(
    *,
    strip: Strip,
    geom: StripGeometry,
    i: int,
    phi: int,
    side: str,
    curve: DemandCurve,
    code: DesignCode,
    mat: ConcreteSteel,
    anch: Anchorages,
    d_mm: float,
    half_as: float,
) -> tuple[float, float]:
    """Where span bottom bars end at support i, and the leg turned up there (0: straight).

    End supports: to the slab end. The bars are turned up into an L where the demand at the
    face needs more anchorage than the straight length past the face gives, the resistance
    being built up over l_bd from the bar end (EN 1992-1-1:2004, 9.2.1.3(3), 9.2.1.4(3)).
    Internal supports: at least 10 phi past the face (9.2.1.5(1)); where the envelope sags at
    the support the bars of both spans run on to lap over it by l_0 (8.7.3), or, at a
    cantilever root, cross it to lap l_0 with the cantilever's bottom bars.
    """
    sup = strip.supports[i]
    l_bd = anch.lbd(phi, Face.BOTTOM)
    if _is_end_support(strip, i):
        face = end_face_mm(strip, i)
        demand = float(curve.shifted_at(face))
        straight = straight_past_face_mm(strip, geom, i)
        capacity = m_rd_knm_per_m(code, mat, half_as, d_mm) * min(1.0, straight / l_bd)
        leg = leg_mm(strip, phi) if demand > capacity + 1e-9 else 0.0
        return (geom.bar_left_mm if side == "left" else geom.bar_right_mm), leg
    reach = 10.0 * phi
    own_face = sup.x_mm - sup.width_mm / 2 if side == "right" else sup.x_mm + sup.width_mm / 2
    at_face = float(curve.shifted_at(own_face))
    sel = (curve.x_mm >= sup.x_mm - sup.width_mm / 2 - 1e-6) & (
        curve.x_mm <= sup.x_mm + sup.width_mm / 2 + 1e-6
    )
    within = float(np.max(curve.m_shifted_knm_per_m[sel])) if np.any(sel) else 0.0
    # bars stopped 10 phi past the face build up only 10 phi / l_bd of their resistance there
    carried = m_rd_knm_per_m(code, mat, half_as, d_mm) * min(1.0, reach / l_bd)
    if within > SAGGING_AT_SUPPORT_KNM or at_face > carried + 1e-9:
        lap = anch.l0_all(phi, Face.BOTTOM)
        last = len(strip.supports) - 1
        beyond_is_cantilever = (i == 0 and strip.has_left_cantilever) or (
            i == last and strip.has_right_cantilever
        )
        # between two spans both spans' bars run on, lapping l_0 over the support; at a
        # cantilever root the span's bars cross the support and lap l_0 with the cantilever's
        # nominal bottom bars beyond it
        reach = max(reach, sup.width_mm + lap if beyond_is_cantilever else (lap + sup.width_mm) / 2)
    if side == "left":
        return sup.x_mm + sup.width_mm / 2 - reach, 0.0
    return sup.x_mm - sup.width_mm / 2 + reach, 0.0


def run_shape(run: Run, bar_type: str, rules) -> ScheduledShape:
    """BS 8666 shape of a run: straight (00/01), an L (11) or a U with both legs turned (21)."""
    horizontal = run.x_end_mm - run.x_start_mm
    l, r = run.ends.left_leg_mm, run.ends.right_leg_mm
    if l <= 0 and r <= 0:
        return shape_helpers.straight(run.phi_mm, horizontal, bar_type=bar_type, rules=rules)
    if l > 0 and r > 0:
        dims = {"A": _r5(l), "B": _r5(horizontal), "C": _r5(r)}
        return make_shape("21", run.phi_mm, dims, bar_type, rules=rules)
    return shape_helpers.l_bar(run.phi_mm, horizontal, max(l, r), bar_type=bar_type, rules=rules)


def _r5(v: float) -> int:
    return int(5 * math.ceil(v / 5.0 - 1e-9))


def run_to_barset(run: Run, strip: Strip, bar_type: str, rules) -> BarSet:
    shape = run_shape(run, bar_type, rules)
    count = _principal_count(strip, run.spacing_mm, run.offset_mm)
    return BarSet(
        strip_id=strip.id,
        set_id=run.set_id,
        role=BarRole.PRINCIPAL,
        layer=run.layer,
        zone_id=run.zone_id,
        bar_type=bar_type,
        phi_mm=run.phi_mm,
        spacing_mm=run.spacing_mm,
        offset_mm=run.offset_mm,
        count=count,
        x_start_mm=round(run.x_start_mm, 1),
        x_end_mm=round(run.x_end_mm, 1),
        shape=shape,
        note=run.note,
    )


def _principal_count(strip: Strip, spacing_mm: float, offset_mm: float) -> int:
    if offset_mm <= 0:
        return principal_bar_count(strip.panel_width_mm, strip.cover_side_mm, spacing_mm)
    return bar_count(strip.panel_width_mm - 2 * strip.cover_side_mm - offset_mm, spacing_mm)


__all__ = [
    "Anchorages",
    "BarEnds",
    "Run",
    "StripGeometry",
    "end_face_mm",
    "leg_mm",
    "m_rd_knm_per_m",
    "principal_runs",
    "run_to_barset",
    "straight_past_face_mm",
]
