"""The validated project model: typed, immutable data handed from the project reader onwards.

Units: mm for geometry, kN/m2 for area loads on the slab, kN/m for line loads across the strip
(kN per metre width of slab), MPa for strengths, kN/m3 for densities.

x along a strip is measured in mm from the free tip of a left cantilever when there is one,
otherwise from the centreline of the first support (the convention of ``analysis.beam``).
"""

from __future__ import annotations

__all__ = [
    "DEFAULT_CODE_ID",
    "AnalysisOptions",
    "Combination",
    "Curtailment",
    "EndKind",
    "FixedBars",
    "LineLoad",
    "Materials",
    "PartialLoad",
    "PatternRule",
    "Project",
    "ReinforcementOptions",
    "Segment",
    "SegmentKind",
    "SegmentLoads",
    "Strip",
    "StripEnd",
    "Support",
]

import enum
import itertools
from dataclasses import dataclass, field

from detailer.codes.en1990 import PsiFactors

#: Design code the project is checked against unless the file says otherwise.
DEFAULT_CODE_ID = "EN1992-1-1+UKNA"


class EndKind(enum.Enum):
    """How a strip ends at its first or last support."""

    PINNED = "pinned"  # simple support, free to rotate
    MONOLITHIC = "monolithic"  # built into an edge beam or wall: idealised as fixed
    CANTILEVER = "cantilever"  # the slab runs on past the end support to a free edge


class Combination(enum.Enum):
    """ULS combination of actions, EN 1990 6.4.3.2."""

    EQ_6_10 = "6.10"
    EQ_6_10AB = "6.10a/b"  # the less favourable of Eq. (6.10a) and (6.10b)


class PatternRule(enum.Enum):
    """Arrangements of the imposed load over the segments, EN 1992-1-1 5.1.3."""

    UK_SIMPLIFIED = "uk-simplified"  # UK NA to 5.1.3(1)P: all spans loaded, alternate spans loaded
    ALL_SUBSETS = "all-subsets"  # every combination of loaded segments (small strips only)


class Curtailment(enum.Enum):
    """How bar cut-off points are found."""

    ENVELOPE = "envelope"  # from the shifted moment envelope, EN 1992-1-1 9.2.1.3
    SIMPLIFIED = "simplified"  # fixed fractions of the span (common practice)


class SegmentKind(enum.Enum):
    SPAN = "span"
    LEFT_CANTILEVER = "left cantilever"
    RIGHT_CANTILEVER = "right cantilever"


@dataclass(frozen=True, slots=True, kw_only=True)
class Materials:
    concrete_class: str  # e.g. "C32/40"
    f_ck: float  # characteristic cylinder strength, MPa
    f_ck_cube: float  # characteristic cube strength, MPa
    f_yk: float = 500.0  # characteristic yield strength of reinforcement, MPa
    bar_type: str = "H"  # BS 8666 steel notation letter
    ductility_class: str = "B"  # EN 1992-1-1 Annex C
    exposure_class: str = "XC1"  # EN 1992-1-1 Table 4.1
    density_kn_per_m3: float = 25.0  # reinforced concrete, EN 1991-1-1 Table A.1


@dataclass(frozen=True, slots=True, kw_only=True)
class ReinforcementOptions:
    diameters_mm: tuple[int, ...] = (10, 12, 16, 20)  # bar sizes the designer may pick
    spacings_mm: tuple[int, ...] = tuple(range(100, 301, 25))  # centres the designer may pick
    stock_length_mm: float = 12000.0  # longest bar before a lap is needed
    curtailment: Curtailment = Curtailment.ENVELOPE
    max_aggregate_mm: float = 20.0  # d_g, for clear bar spacing (EN 1992-1-1 8.2(2))


@dataclass(frozen=True, slots=True, kw_only=True)
class AnalysisOptions:
    combination: Combination = Combination.EQ_6_10AB
    pattern: PatternRule = PatternRule.UK_SIMPLIFIED
    redistribution_delta: float = 1.0  # delta of EN 1992-1-1 5.5; 1.0 = linear elastic
    use_support_reduction: bool = False  # Delta M = F t / 8, EN 1992-1-1 5.3.2.2(4)
    design_at_support_faces: bool = True  # monolithic supports, EN 1992-1-1 5.3.2.2(3)


@dataclass(frozen=True, slots=True)
class Support:
    label: str  # "A", "B", ... left to right unless the file names them
    x_mm: float  # centreline position along the strip
    width_mm: float  # width of the supporting beam or wall (0 = knife edge)


@dataclass(frozen=True, slots=True)
class StripEnd:
    kind: EndKind
    cantilever_mm: float = 0.0  # overhang from the end support centreline to the free edge


@dataclass(frozen=True, slots=True)
class PartialLoad:
    """A uniform area load over part of a segment; positions from the segment's left end."""

    start_mm: float
    end_mm: float
    g_k_kn_per_m2: float = 0.0
    q_k_kn_per_m2: float = 0.0
    description: str = ""


@dataclass(frozen=True, slots=True)
class LineLoad:
    """A line load across the strip (a wall, a parapet) at ``a_mm`` from the segment's left end."""

    a_mm: float
    g_k_kn_per_m: float = 0.0
    q_k_kn_per_m: float = 0.0
    description: str = ""


@dataclass(frozen=True, slots=True)
class SegmentLoads:
    """Characteristic loads on one segment, self-weight excluded (the strip adds it)."""

    g_k_kn_per_m2: float  # superimposed permanent load over the whole segment
    q_k_kn_per_m2: float  # imposed load over the whole segment
    partial: tuple[PartialLoad, ...] = ()
    line: tuple[LineLoad, ...] = ()


@dataclass(frozen=True, slots=True)
class Segment:
    """A span (between two supports) or a cantilever, as the analysis sees it."""

    index: int  # 0-based, left to right, cantilevers included
    kind: SegmentKind
    label: str  # "A-B" for a span, "tip-A" / "E-tip" for cantilevers
    x_start_mm: float
    x_end_mm: float
    loads: SegmentLoads
    span_number: int | None = None  # 1-based among spans; None for a cantilever

    @property
    def length_mm(self) -> float:
        return self.x_end_mm - self.x_start_mm

    @property
    def is_cantilever(self) -> bool:
        return self.kind is not SegmentKind.SPAN


@dataclass(frozen=True, slots=True)
class FixedBars:
    """Bars fixed by the engineer for one zone instead of being chosen by the design."""

    zone_id: str  # as printed by ``slabwright check``, e.g. "S2-B" or "C-T"
    phi_mm: int
    spacing_mm: int


@dataclass(frozen=True, slots=True, kw_only=True)
class Strip:
    """A 1 m wide one-way slab strip over its supports."""

    id: str
    thickness_mm: float  # h
    cover_top_mm: float  # nominal cover c_nom to the top bars
    cover_bottom_mm: float  # nominal cover c_nom to the bottom bars
    cover_side_mm: float  # nominal cover at the free edges and ends of bars
    panel_width_mm: float  # width of slab this strip stands for (for bar counts)
    supports: tuple[Support, ...]
    left_end: StripEnd
    right_end: StripEnd
    segment_loads: tuple[SegmentLoads, ...]  # one per segment, left to right
    load_category: str  # imposed-load category A..H, EN 1991-1-1 Table 6.1
    psi: PsiFactors  # psi factors of that category, EN 1990 Table A1.1
    concrete_density_kn_per_m3: float = 25.0  # EN 1991-1-1 Table A.1
    description: str = ""
    members: int = 1  # identical members this strip stands for (schedule "No. of mbrs")
    fixed_bars: tuple[FixedBars, ...] = ()

    def __post_init__(self) -> None:
        # Programming errors only: the project reader reports user mistakes before this.
        if not self.supports:
            raise ValueError("a strip needs at least one support")
        if len(self.segment_loads) != self.n_segments:
            raise ValueError("segment_loads needs one entry per segment")

    @property
    def has_left_cantilever(self) -> bool:
        return self.left_end.kind is EndKind.CANTILEVER

    @property
    def has_right_cantilever(self) -> bool:
        return self.right_end.kind is EndKind.CANTILEVER

    @property
    def spans_mm(self) -> tuple[float, ...]:
        """Centreline-to-centreline spans between supports (cantilevers excluded)."""
        xs = [s.x_mm for s in self.supports]
        return tuple(b - a for a, b in itertools.pairwise(xs))

    @property
    def n_segments(self) -> int:
        return len(self.supports) - 1 + self.has_left_cantilever + self.has_right_cantilever

    @property
    def node_x_mm(self) -> tuple[float, ...]:
        """Positions of the analysis nodes: free tips and support centrelines."""
        xs = [s.x_mm for s in self.supports]
        if self.has_left_cantilever:
            xs.insert(0, 0.0)
        if self.has_right_cantilever:
            xs.append(self.supports[-1].x_mm + self.right_end.cantilever_mm)
        return tuple(xs)

    @property
    def length_mm(self) -> float:
        """Overall length from the left end node to the right end node."""
        nodes = self.node_x_mm
        return nodes[-1] - nodes[0]

    @property
    def self_weight_kn_per_m2(self) -> float:
        """g_sw = h x density; 25 kN/m3 for normal-weight reinforced concrete (EN 1991-1-1 A.1)."""
        return self.thickness_mm / 1000.0 * self.concrete_density_kn_per_m3

    @property
    def segments(self) -> tuple[Segment, ...]:
        nodes = self.node_x_mm
        labels = [s.label for s in self.supports]
        names: list[tuple[SegmentKind, str, int | None]] = []
        if self.has_left_cantilever:
            names.append((SegmentKind.LEFT_CANTILEVER, f"tip-{labels[0]}", None))
        for k, (a, b) in enumerate(itertools.pairwise(labels)):
            names.append((SegmentKind.SPAN, f"{a}-{b}", k + 1))
        if self.has_right_cantilever:
            names.append((SegmentKind.RIGHT_CANTILEVER, f"{labels[-1]}-tip", None))
        return tuple(
            Segment(
                index=i,
                kind=kind,
                label=label,
                x_start_mm=nodes[i],
                x_end_mm=nodes[i + 1],
                loads=self.segment_loads[i],
                span_number=number,
            )
            for i, (kind, label, number) in enumerate(names)
        )

    def g_k_total_kn_per_m2(self, segment: int) -> float:
        """Uniform permanent load on a segment: self-weight plus superimposed (partials excluded)."""
        return self.self_weight_kn_per_m2 + self.segment_loads[segment].g_k_kn_per_m2


@dataclass(frozen=True, slots=True, kw_only=True)
class Project:
    id: str  # short identifier, safe in file names
    title: str
    revision: str
    date: str  # ISO 8601 date from the file, so reruns produce identical output
    drawing_ref: str
    materials: Materials
    reinforcement: ReinforcementOptions = field(default_factory=ReinforcementOptions)
    analysis: AnalysisOptions = field(default_factory=AnalysisOptions)
    strips: tuple[Strip, ...] = ()
    code_id: str = DEFAULT_CODE_ID
    # What reading the input repaired (DXF recovery of a damaged general arrangement), for
    # the user to see; no part of the design.
    input_notes: tuple[str, ...] = ()

    def strip(self, strip_id: str) -> Strip:
        for s in self.strips:
            if s.id == strip_id:
                return s
        raise KeyError(strip_id)
