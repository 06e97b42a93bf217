"""Code-neutral seam between the slab pipeline and a design code.

The pipeline (design, curtailment, self-check, report) talks to a design code only through
the :class:`DesignCode` protocol and the frozen result types below, so that a second code
(ACI 318) can be added as another module under ``detailer/codes/`` without touching the
pipeline. A code object is passed explicitly; there is no global "current code".

Units, for every member of the protocol: lengths and bar diameters in mm, stresses in
N/mm2 (MPa), areas in mm2 (over the width ``b_mm`` passed in; per metre width when
``b_mm = 1000``), moments in kNm over that width, shear resistances in kN per metre width.
Inside the clause layer, names are the code's own symbols (``f_ck``, ``l_b_rqd``); each
field's unit is stated beside it.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass
from typing import Protocol, runtime_checkable

# --------------------------------------------------------------------------- errors


class DesignCodeError(ValueError):
    """A value the design code cannot accept; the message is one readable line."""


class CompressionSteelRequired(DesignCodeError):
    """The section needs compression steel (K > K'); slabs here are singly reinforced."""


class OutsideCodeScope(DesignCodeError):
    """The request is outside the range the implemented clauses cover."""


# --------------------------------------------------------------------------- enums


class SpanType(enum.Enum):
    """Structural system of a span, as used by span/depth rules."""

    SIMPLY_SUPPORTED = "simply_supported"
    END_SPAN = "end_span"  # one end continuous
    INTERIOR_SPAN = "interior_span"  # both ends continuous
    CANTILEVER = "cantilever"


class BondCondition(enum.Enum):
    """Bond (casting-position) condition of a bar."""

    GOOD = "good"
    POOR = "poor"


class Layer(enum.Enum):
    """Face of the slab a bar layer sits at."""

    BOTTOM = "bottom"
    TOP = "top"


class BarShape(enum.Enum):
    """Shape of the anchored end of a bar."""

    STRAIGHT = "straight"
    BENT = "bent"  # standard bend or hook
    LOOP = "loop"


# --------------------------------------------------------------------------- materials


@dataclass(frozen=True, slots=True)
class ConcreteSteel:
    """Design material values for one concrete class with one reinforcing steel."""

    concrete_class: str  # e.g. "C30/37"
    f_ck: float  # characteristic cylinder strength, N/mm2
    f_ck_cube: float  # characteristic cube strength, N/mm2
    f_cm: float  # mean cylinder strength, N/mm2
    f_cd: float  # design compressive strength, N/mm2
    f_ctm: float  # mean axial tensile strength, N/mm2
    f_ctk_005: float  # 5 % fractile tensile strength, N/mm2
    f_ctd: float  # design tensile strength, N/mm2
    E_cm: float  # secant modulus of concrete, N/mm2
    eps_cu2: float  # ultimate compressive strain, - (e.g. 0.0035)
    f_yk: float  # characteristic yield strength of steel, N/mm2
    f_yd: float  # design yield strength of steel, N/mm2
    E_s: float  # modulus of steel, N/mm2
    ductility_class: str  # steel ductility class, "A", "B" or "C"
    gamma_c: float  # partial factor for concrete, -
    gamma_s: float  # partial factor for steel, -


# --------------------------------------------------------------------------- ULS results


@dataclass(frozen=True, slots=True)
class FlexureResult:
    """Singly reinforced rectangular section in bending."""

    m_ed_knm: float  # design moment on the width b, kNm
    b: float  # width, mm
    d: float  # effective depth, mm
    delta: float  # redistribution ratio used, -
    K: float  # normalised moment M/(b d^2 f_ck), -
    K_prime: float  # limit of K for a singly reinforced section, -
    z: float  # lever arm, mm
    z_over_d: float  # -
    x_u_over_d: float  # neutral-axis depth ratio at ULS, -
    A_s_req: float  # required tension steel over the width b, mm2
    notes: tuple[str, ...] = ()  # guidance remarks for the calc report


@dataclass(frozen=True, slots=True)
class RedistributionLimits:
    """Limits on moment redistribution: delta >= max(k1 + k2 x_u/d, delta_min_ductility)."""

    k1: float  # -
    k2: float  # -
    delta_min_ductility: float  # lowest delta allowed by the steel ductility class, -
    span_ratio_min: float  # lowest ratio of adjacent spans for redistribution, -
    span_ratio_max: float  # highest ratio of adjacent spans for redistribution, -

    def delta_min(self, x_u_over_d: float) -> float:
        """Lowest redistribution ratio allowed at a section with this x_u/d."""
        return max(self.k1 + self.k2 * x_u_over_d, self.delta_min_ductility)

    def spans_ok(self, l_1_mm: float, l_2_mm: float) -> bool:
        """True when two adjacent spans are within the ratio limits for redistribution."""
        ratio = l_1_mm / l_2_mm
        return self.span_ratio_min <= ratio <= self.span_ratio_max


# --------------------------------------------------------------------------- SLS results


@dataclass(frozen=True, slots=True)
class CrackLimits:
    """Bar-size and spacing limits for crack control without direct calculation.

    ``phi_max`` or ``s_max`` is None where the table gives no value (steel stress too high
    for that crack width); the check then needs the other route or a direct calculation.
    """

    sigma_s: float  # steel stress under the quasi-permanent combination, N/mm2
    w_max: float  # limiting crack width, mm
    phi_max: float | None  # largest bar diameter, mm
    s_max: float | None  # largest bar spacing, mm
    exempt: bool  # no specific crack-control measures needed
    basis: str  # one line saying where the limits come from

    def satisfied(self, phi_mm: float, spacing_mm: float) -> bool:
        """True when the bars satisfy the bar-size limit or the spacing limit."""
        if self.exempt:
            return True
        by_size = self.phi_max is not None and phi_mm <= self.phi_max
        by_spacing = self.s_max is not None and spacing_mm <= self.s_max
        return by_size or by_spacing


@dataclass(frozen=True, slots=True)
class SpanDepthResult:
    """Limiting span/effective-depth ratio."""

    span_type: SpanType
    K: float  # structural system factor, -
    rho: float  # tension steel ratio A_s,req/(b d), -
    rho_0: float  # reference steel ratio, -
    l_d_basic: float  # basic span/depth ratio, -
    F_steel: float  # factor for steel stress (A_s,prov/A_s,req), -
    F_span: float  # factor for long spans, -
    l_d_limit: float  # permitted span/depth ratio, -

    def ok(self, l_eff_mm: float, d_mm: float) -> bool:
        """True when the actual span/depth ratio does not exceed the limit."""
        return l_eff_mm / d_mm <= self.l_d_limit


# --------------------------------------------------------------------------- bars


@dataclass(frozen=True, slots=True)
class AnchorageCase:
    """A bar to be anchored or lapped: what the anchorage length depends on."""

    phi: float  # bar diameter, mm
    sigma_sd: float  # design stress to be anchored (e.g. f_yd A_s,req/A_s,prov), N/mm2
    bond: BondCondition
    c_d: float  # cover/spacing dimension governing splitting, mm
    shape: BarShape = BarShape.STRAIGHT
    compression: bool = False
    welded_transverse_bar: bool = False
    p_transverse: float = 0.0  # transverse pressure along the anchorage, N/mm2


@dataclass(frozen=True, slots=True)
class AnchorageResult:
    """Design anchorage length of one bar."""

    eta_1: float  # bond-condition factor, -
    eta_2: float  # bar-size factor, -
    f_bd: float  # design bond stress, N/mm2
    l_b_rqd: float  # basic required anchorage length, mm
    alpha_1: float  # shape, -
    alpha_2: float  # cover, -
    alpha_3: float  # confinement by transverse steel, -
    alpha_4: float  # welded transverse bars, -
    alpha_5: float  # transverse pressure, -
    l_b_min: float  # minimum anchorage length, mm
    l_bd: float  # design anchorage length, mm


@dataclass(frozen=True, slots=True)
class LapResult:
    """Design lap length of one bar."""

    anchorage: AnchorageResult  # the anchorage terms the lap is built from
    percent_lapped: float  # share of bars lapped within the lap zone, %
    alpha_6: float  # lap factor, -
    l_0_min: float  # minimum lap length, mm
    l_0: float  # design lap length, mm


# --------------------------------------------------------------------------- cover


@dataclass(frozen=True, slots=True)
class CoverRequirement:
    """Required nominal cover to one bar."""

    phi: float  # bar diameter, mm
    exposure: str  # exposure class, e.g. "XC1"
    structural_class: str  # e.g. "S4"
    c_min_b: float  # minimum cover for bond, mm
    c_min_dur: float  # minimum cover for durability, mm
    c_min: float  # minimum cover, mm
    delta_c_dev: float  # allowance for deviation, mm
    c_nom: float  # required nominal cover, mm
    basis: str  # one line naming the durability table used


@dataclass(frozen=True, slots=True)
class CoverCheck:
    """Provided nominal cover against the requirement."""

    ok: bool
    c_nom_provided: float  # mm
    required: CoverRequirement
    message: str  # one readable line, for the user and the calc report


# --------------------------------------------------------------------------- detailing


@dataclass(frozen=True, slots=True)
class SlabDetailingRules:
    """Fractions and extents a curtailment module applies to a one-way slab.

    All fractions are of the steel area (or moment) named; extents are fractions of the
    adjacent span measured from the face of the support; the shift of the moment curve is
    ``a_l_over_d * d``.
    """

    simple_support_bottom_fraction: float  # of max span steel carried into a simple support
    partial_fixity_top_fraction: float  # of max adjacent span moment, top steel at supports
    end_support_top_fraction: float  # reduced value of the above at end supports
    top_extent_over_adjacent_span: float  # top steel extent from the face, / adjacent span
    internal_support_bottom_fraction: float  # of span steel carried into internal supports
    internal_support_anchorage_phi: float  # straight-bar embedment past the face, / phi
    secondary_fraction: float  # transverse steel, / principal steel
    a_l_over_d: float  # shift of the moment curve, / d


# --------------------------------------------------------------------------- protocol


@runtime_checkable
class DesignCode(Protocol):
    """What the pipeline needs from a design code (see the module docstring for units)."""

    @property
    def name(self) -> str:
        """Short name of the code and annex, e.g. 'EN 1992-1-1:2004 + UK NA'."""
        ...

    # materials and ULS
    def materials(
        self, concrete_class: str, f_yk: float = 500.0, ductility_class: str = "B"
    ) -> ConcreteSteel: ...

    def flexure(
        self, m_ed_knm: float, b_mm: float, d_mm: float, mat: ConcreteSteel, delta: float = 1.0
    ) -> FlexureResult: ...

    def moment_resistance(
        self, as_mm2: float, b_mm: float, d_mm: float, mat: ConcreteSteel
    ) -> float: ...

    def v_rd_c(self, d_mm: float, rho_l: float, mat: ConcreteSteel) -> float: ...

    def redistribution_limits(self, mat: ConcreteSteel) -> RedistributionLimits: ...

    # reinforcement limits and detailing data
    def as_min(self, b_mm: float, d_mm: float, h_mm: float, mat: ConcreteSteel) -> float: ...

    def as_max(self, b_mm: float, h_mm: float) -> float: ...

    def max_spacing(self, h_mm: float, principal: bool, high_moment_zone: bool) -> float: ...

    def secondary_min(self, as_principal: float) -> float: ...

    def mandrel_diameter(self, phi_mm: float) -> float: ...

    def detailing_rules(self) -> SlabDetailingRules: ...

    # serviceability
    def w_max(self, exposure: str) -> float: ...

    def steel_stress_qp(
        self,
        mat: ConcreteSteel,
        m_qp_knm: float,
        m_ed_knm: float,
        as_req: float,
        as_prov: float,
        delta: float = 1.0,
    ) -> float: ...

    def crack_limits(
        self,
        sigma_s: float,
        w_max: float,
        h_mm: float,
        d_mm: float | None = None,
        f_ct_eff: float | None = None,
    ) -> CrackLimits: ...

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
    ) -> SpanDepthResult: ...

    # bars: bond, anchorage, laps, cover
    def bond_condition(self, h_mm: float, layer: Layer) -> BondCondition: ...

    def anchorage(self, case: AnchorageCase, mat: ConcreteSteel) -> AnchorageResult: ...

    def lap(self, case: AnchorageCase, mat: ConcreteSteel, percent_lapped: float) -> LapResult: ...

    def cover(
        self, phi_mm: float, exposure: str, structural_class: str = "S4", d_g_mm: float = 20.0
    ) -> CoverRequirement: ...

    def check_cover(self, c_nom_provided_mm: float, required: CoverRequirement) -> CoverCheck: ...
