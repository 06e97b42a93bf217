"""Detailing of one-way solid slabs: EN 1992-1-1:2004 8.3, 9.2.1 and 9.3.

Reinforcement limits (9.2.1.1 via 9.3.1.1(1)), bar spacing (9.3.1.1(3)), secondary steel
(9.3.1.1(2)), mandrel diameters (Table 8.1N), the shift rule (9.3.1.1(4) with 9.2.1.3(2)),
and the fractions a curtailment module applies (9.3.1.2, 9.2.1.4, 9.2.1.5).

Provenance of the clause texts behind :func:`slab_detailing_rules` (values used in
published UK worked examples; paragraph wording from memory): 9.3.1.2(1) half the span
steel to simple supports; 9.3.1.2(2) top steel for 25 % of the maximum adjacent span
moment where partial fixity is not allowed for, reducible to 15 % at an end support,
extending 0.2 x the adjacent span from the face; 9.2.1.5 bottom steel into internal
supports as 9.2.1.4(1) (beta_2 = 0.25, UK NA the same, from memory), anchored >= 10 phi.
The beam rule 9.2.1.2(1) (beta_1: EN recommends 0.15; the UK NA value is believed to be
0.25, from memory, not verified) is not used for slabs; the slab end-support fraction is
a parameter of :func:`slab_detailing_rules`.
"""

from __future__ import annotations

from detailer.codes.base import BarShape, DesignCodeError, SlabDetailingRules


def as_min(b_t: float, d: float, f_ctm: float, f_yk: float) -> float:
    """Minimum tension steel A_s,min = 0.26 (f_ctm/f_yk) b_t d >= 0.0013 b_t d, mm2.

    EN 1992-1-1:2004, Eq. (9.1N), 9.3.1.1(1) + UK NA.
    """
    return max(0.26 * f_ctm / f_yk, 0.0013) * b_t * d


def as_max(b: float, h: float) -> float:
    """Maximum tension (or compression) steel outside laps A_s,max = 0.04 A_c, mm2.

    EN 1992-1-1:2004, 9.2.1.1(3), 9.3.1.1(1) + UK NA.
    """
    return 0.04 * b * h


def max_spacing(h: float, principal: bool = True, high_moment_zone: bool = False) -> float:
    """Largest bar spacing in a slab of depth h (mm), mm.

    Principal bars 3h <= 400 (2h <= 250 in areas of maximum moment or concentrated load);
    secondary bars 3.5h <= 450 (3h <= 400 there). Crack control (7.3.3) may govern.

    EN 1992-1-1:2004, 9.3.1.1(3).
    """
    if h <= 0.0:
        raise DesignCodeError(f"slab depth h = {h} mm must be positive")
    if principal:
        return min(2.0 * h, 250.0) if high_moment_zone else min(3.0 * h, 400.0)
    return min(3.0 * h, 400.0) if high_moment_zone else min(3.5 * h, 450.0)


def secondary_min(as_principal: float) -> float:
    """Secondary (transverse) steel in one-way slabs >= 20 % of the principal steel, mm2.

    EN 1992-1-1:2004, 9.3.1.1(2).
    """
    return 0.2 * as_principal


def mandrel_diameter_min(phi: float) -> float:
    """Minimum mandrel diameter for bends, hooks and loops: 4 phi (phi <= 16), 7 phi above.

    EN 1992-1-1:2004, 8.3(2), Table 8.1N.
    """
    return 4.0 * phi if phi <= 16.0 else 7.0 * phi


def a_l_slab(d: float) -> float:
    """Shift of the moment curve for slabs without shear reinforcement: a_l = d, mm.

    EN 1992-1-1:2004, 9.3.1.1(4), 9.2.1.3(2).
    """
    return d


def internal_support_anchorage_min(phi: float, shape: BarShape = BarShape.STRAIGHT) -> float:
    """Embedment of bottom bars past the face of an internal support, mm.

    Straight bars 10 phi; hooks and bends one mandrel diameter for phi >= 16, two mandrel
    diameters otherwise (from memory).

    EN 1992-1-1:2004, 9.2.1.5(2).
    """
    if shape is BarShape.STRAIGHT:
        return 10.0 * phi
    mandrel = mandrel_diameter_min(phi)
    return mandrel if phi >= 16.0 else 2.0 * mandrel


def slab_detailing_rules(end_support_top_fraction: float = 0.15) -> SlabDetailingRules:
    """Fractions and extents for curtailing one-way slab reinforcement.

    ``end_support_top_fraction`` is the share of the maximum adjacent span moment the top
    steel at an end support resists (15 % allowed by 9.3.1.2(2); 0.25 is the general value).

    EN 1992-1-1:2004, 9.3.1.2(1), 9.3.1.2(2), 9.2.1.4(1), 9.2.1.5(1), 9.3.1.1(2), 9.3.1.1(4).
    """
    if not 0.15 <= end_support_top_fraction <= 1.0:
        raise DesignCodeError(
            f"end-support top-steel fraction {end_support_top_fraction} must be within 0.15..1.0"
        )
    return SlabDetailingRules(
        simple_support_bottom_fraction=0.5,
        partial_fixity_top_fraction=0.25,
        end_support_top_fraction=end_support_top_fraction,
        top_extent_over_adjacent_span=0.2,
        internal_support_bottom_fraction=0.25,
        internal_support_anchorage_phi=10.0,
        secondary_fraction=0.2,
        a_l_over_d=1.0,
    )
