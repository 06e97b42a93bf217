"""EN 1992-1-1:2004 with the UK National Annex, for one-way solid slabs.

The clause functions live in one module per clause group (materials, flexure, shear,
redistribution, anchorage, laps, detailing, serviceability, cover). :class:`EC2UK` binds
them to the code-neutral :class:`~detailer.codes.base.DesignCode` interface.
"""

from __future__ import annotations

from detailer.codes.base import (
    AnchorageCase,
    AnchorageResult,
    BondCondition,
    ConcreteSteel,
    CoverCheck,
    CoverRequirement,
    CrackLimits,
    DesignCodeError,
    FlexureResult,
    LapResult,
    Layer,
    RedistributionLimits,
    SlabDetailingRules,
    SpanDepthResult,
    SpanType,
)
from detailer.codes.ec2_uk import (
    anchorage,
    cover,
    detailing,
    flexure,
    laps,
    materials,
    redistribution,
    resistance,
    serviceability,
    shear,
)

__all__ = ["EC2UK"]


class EC2UK:
    """EN 1992-1-1:2004 + UK NA behind the DesignCode interface.

    ``delta_c_dev_mm``: allowance for deviation in cover (10 mm; the NA permits less under
    a quality-assurance system). ``end_support_top_fraction``: top steel at end supports as
    a share of the adjacent span moment (0.15, 9.3.1.2(2)).
    """

    __slots__ = ("_delta_c_dev", "_end_top")

    def __init__(self, delta_c_dev_mm: float = 10.0, end_support_top_fraction: float = 0.15):
        if not 0.0 <= delta_c_dev_mm <= 10.0:
            raise DesignCodeError(f"delta_c_dev = {delta_c_dev_mm} mm must be within 0..10 mm")
        self._delta_c_dev = delta_c_dev_mm
        self._end_top = end_support_top_fraction
        detailing.slab_detailing_rules(end_support_top_fraction)  # validate now, fail early

    @property
    def name(self) -> str:
        """Code name for records and reports."""
        return "EN 1992-1-1:2004 + UK NA"

    def __repr__(self) -> str:
        return (
            f"EC2UK(delta_c_dev_mm={self._delta_c_dev}, end_support_top_fraction={self._end_top})"
        )

    # ------------------------------------------------------------------ materials and ULS

    def materials(
        self, concrete_class: str, f_yk: float = 500.0, ductility_class: str = "B"
    ) -> ConcreteSteel:
        """Design material values (formula values of Table 3.1).

        EN 1992-1-1:2004, Table 3.1, 3.1.6(1), 3.2.7(2) + UK NA.
        """
        return materials.concrete_steel(concrete_class, f_yk, ductility_class)

    def flexure(
        self, m_ed_knm: float, b_mm: float, d_mm: float, mat: ConcreteSteel, delta: float = 1.0
    ) -> FlexureResult:
        """Singly reinforced section; m_ed_knm acts on width b_mm (kNm/m when b_mm = 1000).

        Also refuses a delta below the steel ductility limit of 5.5(4).

        EN 1992-1-1:2004, 6.1, 3.1.7(3), 5.5(4) + UK NA.
        """
        lowest = redistribution.delta_min_ductility(mat.ductility_class)
        if delta < lowest - 1e-12:
            raise DesignCodeError(
                f"redistribution ratio delta = {delta} is below {lowest} allowed for "
                f"class {mat.ductility_class} steel"
            )
        return flexure.design_singly_reinforced(m_ed_knm, b_mm, d_mm, mat.f_ck, mat.f_yd, delta)

    def moment_resistance(
        self, as_mm2: float, b_mm: float, d_mm: float, mat: ConcreteSteel
    ) -> float:
        """Bending resistance of tension steel as_mm2 over width b_mm at depth d_mm, kNm.

        EN 1992-1-1:2004, 3.1.7(3).
        """
        return resistance.moment_resistance_knm(as_mm2, b_mm, d_mm, mat.f_cd, mat.f_yd)

    def v_rd_c(self, d_mm: float, rho_l: float, mat: ConcreteSteel) -> float:
        """Shear resistance without shear steel, kN per metre width.

        EN 1992-1-1:2004, Eq. (6.2.a), Eq. (6.2.b) + UK NA.
        """
        return shear.v_rd_c_kn_per_m(d_mm, rho_l, mat.f_ck, mat.gamma_c)

    def redistribution_limits(self, mat: ConcreteSteel) -> RedistributionLimits:
        """Limits on redistribution for these materials.

        EN 1992-1-1:2004, 5.5(4) + UK NA.
        """
        return redistribution.redistribution_limits(mat.f_ck, mat.eps_cu2, mat.ductility_class)

    # ------------------------------------------------------------------ limits, detailing

    def as_min(self, b_mm: float, d_mm: float, h_mm: float, mat: ConcreteSteel) -> float:
        """Minimum tension steel over width b_mm, mm2 (h_mm unused by this code).

        EN 1992-1-1:2004, Eq. (9.1N), 9.3.1.1(1) + UK NA.
        """
        return detailing.as_min(b_mm, d_mm, mat.f_ctm, mat.f_yk)

    def as_max(self, b_mm: float, h_mm: float) -> float:
        """Maximum steel outside laps over width b_mm, mm2.

        EN 1992-1-1:2004, 9.2.1.1(3) + UK NA.
        """
        return detailing.as_max(b_mm, h_mm)

    def max_spacing(self, h_mm: float, principal: bool, high_moment_zone: bool) -> float:
        """Largest bar spacing, mm.

        EN 1992-1-1:2004, 9.3.1.1(3).
        """
        return detailing.max_spacing(h_mm, principal, high_moment_zone)

    def secondary_min(self, as_principal: float) -> float:
        """Least transverse steel for a principal steel area (same units), mm2.

        EN 1992-1-1:2004, 9.3.1.1(2).
        """
        return detailing.secondary_min(as_principal)

    def mandrel_diameter(self, phi_mm: float) -> float:
        """Minimum mandrel diameter, mm.

        EN 1992-1-1:2004, Table 8.1N.
        """
        return detailing.mandrel_diameter_min(phi_mm)

    def detailing_rules(self) -> SlabDetailingRules:
        """Curtailment fractions and extents for one-way slabs.

        EN 1992-1-1:2004, 9.3.1.2(1), 9.3.1.2(2), 9.2.1.5(1), 9.3.1.1(4).
        """
        return detailing.slab_detailing_rules(self._end_top)

    # ------------------------------------------------------------------ serviceability

    def w_max(self, exposure: str) -> float:
        """Limiting crack width for an exposure class, mm (EN recommended values).

        EN 1992-1-1:2004, Table 7.1N.
        """
        return serviceability.w_max_recommended(exposure)

    def steel_stress_qp(
        self,
        mat: ConcreteSteel,
        m_qp_knm: float,
        m_ed_knm: float,
        as_req: float,
        as_prov: float,
        delta: float = 1.0,
    ) -> float:
        """Steel stress under quasi-permanent loads (UK simplification), N/mm2.

        EN 1992-1-1:2004, 7.3.3(2).
        """
        return serviceability.steel_stress_qp(
            mat.f_yk, mat.gamma_s, m_qp_knm, m_ed_knm, as_req, as_prov, delta
        )

    def crack_limits(
        self,
        sigma_s: float,
        w_max: float,
        h_mm: float,
        d_mm: float | None = None,
        f_ct_eff: float | None = None,
    ) -> CrackLimits:
        """Bar-size and spacing limits for crack control.

        EN 1992-1-1:2004, 7.3.3(1), 7.3.3(2), Table 7.2N, Table 7.3N.
        """
        return serviceability.crack_limits(sigma_s, w_max, h_mm, d_mm, f_ct_eff)

    def span_depth_limit(
        self,
        span_type: SpanType,
        mat: ConcreteSteel,
        as_req: float,
        as_prov: float,
        b_mm: float,
        d_mm: float,
        l_eff_mm: float,
        as_comp: float = 0.0,
    ) -> SpanDepthResult:
        """Permitted span/effective-depth ratio.

        EN 1992-1-1:2004, 7.4.2, Eq. (7.16a), Eq. (7.16b), Table 7.4N + UK NA.
        """
        return serviceability.span_depth_limit(
            span_type, mat.f_ck, mat.f_yk, as_req, as_prov, b_mm, d_mm, l_eff_mm, as_comp
        )

    # ------------------------------------------------------------------ bars and cover

    def bond_condition(self, h_mm: float, layer: Layer) -> BondCondition:
        """Bond condition of a horizontal slab layer.

        EN 1992-1-1:2004, 8.4.2(2), Fig. 8.2.
        """
        return anchorage.bond_condition(h_mm, layer)

    def anchorage(self, case: AnchorageCase, mat: ConcreteSteel) -> AnchorageResult:
        """Design anchorage length of one bar.

        EN 1992-1-1:2004, 8.4.2, 8.4.3, 8.4.4.
        """
        return anchorage.anchorage(case, mat.f_ctd)

    def lap(self, case: AnchorageCase, mat: ConcreteSteel, percent_lapped: float) -> LapResult:
        """Design lap length of one bar.

        EN 1992-1-1:2004, 8.7.3(1).
        """
        return laps.lap(case, mat.f_ctd, percent_lapped)

    def cover(
        self, phi_mm: float, exposure: str, structural_class: str = "S4", d_g_mm: float = 20.0
    ) -> CoverRequirement:
        """Required nominal cover to a bar.

        EN 1992-1-1:2004, 4.4.1, Eq. (4.1), Eq. (4.2), Table 4.4N.
        """
        return cover.cover_requirement(
            phi_mm, exposure, structural_class, d_g_mm, self._delta_c_dev
        )

    def check_cover(self, c_nom_provided_mm: float, required: CoverRequirement) -> CoverCheck:
        """Provided nominal cover against the requirement.

        EN 1992-1-1:2004, 4.4.1.1(2)P, Eq. (4.1).
        """
        return cover.check_nominal_cover(c_nom_provided_mm, required)
