"""Types of the build record (:mod:`detailer.record` builds them): frozen dataclasses whose
field names carry units; ``docs/record-schema.md`` describes every field.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Final

from detailer.layout import AnchorageLength, Check, SelfCheck, ZoneDesign

__all__ = [
    "SCHEMA_VERSION",
    "ActionsRecord",
    "BarSetRecord",
    "EndRecord",
    "EquationRecord",
    "LayerDepthRecord",
    "LineLoadRecord",
    "MarkRecord",
    "MaterialsRecord",
    "NotDetailedRecord",
    "PartialLoadRecord",
    "ProjectRecord",
    "RevisionRecord",
    "ScheduleRowRecord",
    "SectionRecord",
    "SegmentRecord",
    "StationRecord",
    "StripRecord",
    "SupportRecord",
]

#: Version of the record's layout; raised when a field changes meaning or is removed.
SCHEMA_VERSION: Final = 1


@dataclass(frozen=True, slots=True, kw_only=True)
class MaterialsRecord:
    concrete_class: str
    f_ck_mpa: float
    f_ck_cube_mpa: float
    f_yk_mpa: float
    bar_type: str
    ductility_class: str
    exposure_class: str
    density_kn_per_m3: float


@dataclass(frozen=True, slots=True, kw_only=True)
class LayerDepthRecord:
    layer: str
    phi_mm: int
    d_mm: float
    source: str  # how d was found


@dataclass(frozen=True, slots=True, kw_only=True)
class SectionRecord:
    thickness_mm: float
    cover_top_mm: float
    cover_bottom_mm: float
    cover_side_mm: float
    panel_width_mm: float
    effective_depths: tuple[LayerDepthRecord, ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class EndRecord:
    kind: str
    cantilever_mm: float


@dataclass(frozen=True, slots=True, kw_only=True)
class SupportRecord:
    label: str
    x_mm: float
    width_mm: float


@dataclass(frozen=True, slots=True, kw_only=True)
class PartialLoadRecord:
    start_mm: float
    end_mm: float
    g_k_kn_per_m2: float
    q_k_kn_per_m2: float
    description: str


@dataclass(frozen=True, slots=True, kw_only=True)
class LineLoadRecord:
    a_mm: float
    g_k_kn_per_m: float
    q_k_kn_per_m: float
    description: str


@dataclass(frozen=True, slots=True, kw_only=True)
class SegmentRecord:
    index: int
    label: str
    kind: str
    span_number: int | None
    x_start_mm: float
    x_end_mm: float
    length_mm: float
    self_weight_kn_per_m2: float
    g_k_superimposed_kn_per_m2: float
    g_k_kn_per_m2: float  # uniform permanent, self-weight included
    q_k_kn_per_m2: float
    partial_loads: tuple[PartialLoadRecord, ...]
    line_loads: tuple[LineLoadRecord, ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class EquationRecord:
    name: str
    gamma_g: float
    gamma_q: float


@dataclass(frozen=True, slots=True, kw_only=True)
class ActionsRecord:
    combination: str
    equations: tuple[EquationRecord, ...]
    gamma_g_sup: float
    gamma_g_inf: float
    gamma_q: float
    psi_0: float
    psi_2: float
    xi: float
    pattern: str
    arrangements: tuple[str, ...]
    redistribution_delta: float
    restraint_variants: tuple[str, ...]  # idealisations enveloped (monolithic ends fixed/pinned)


@dataclass(frozen=True, slots=True, kw_only=True)
class StationRecord:
    x_mm: float
    segment: int
    side: int  # -1 limit from the left, +1 from the right, 0 continuous
    m_max_knm: float
    m_min_knm: float
    v_max_kn: float
    v_min_kn: float
    m_max_by: str
    m_min_by: str
    v_max_by: str
    v_min_by: str


@dataclass(frozen=True, slots=True, kw_only=True)
class BarSetRecord:
    mark: str
    set_id: str
    role: str
    layer: str
    zone_id: str
    type_and_size: str
    bar_type: str
    phi_mm: int
    spacing_mm: int
    offset_mm: float
    count: int
    x_start_mm: float
    x_end_mm: float
    shape_code: str
    dims_mm: tuple[tuple[str, int], ...]
    free_dims: tuple[str, ...]
    sketch_ref: str
    length_mm: int
    length_exact_mm: float
    mass_kg: float  # count x length x mass per metre
    callout: str
    note: str


@dataclass(frozen=True, slots=True, kw_only=True)
class StripRecord:
    id: str
    description: str
    section: SectionRecord
    left_end: EndRecord
    right_end: EndRecord
    supports: tuple[SupportRecord, ...]
    spans_mm: tuple[float, ...]
    length_mm: float
    load_category: str
    concrete_density_kn_per_m3: float
    segments: tuple[SegmentRecord, ...]
    actions: ActionsRecord
    envelope: tuple[StationRecord, ...]
    zones: tuple[ZoneDesign, ...]  # the design objects themselves (see detailer.layout)
    bar_sets: tuple[BarSetRecord, ...]
    anchorage: tuple[AnchorageLength, ...]
    selfcheck: SelfCheck
    checks: tuple[Check, ...]  # strip-level checks


@dataclass(frozen=True, slots=True, kw_only=True)
class MarkRecord:
    mark: str
    type_and_size: str
    bar_type: str
    phi_mm: int
    shape_code: str
    dims_mm: tuple[tuple[str, int], ...]
    free_dims: tuple[str, ...]
    sketch_ref: str
    length_mm: int


@dataclass(frozen=True, slots=True, kw_only=True)
class RevisionRecord:
    revision: str
    date: str
    description: str  # one line: what changed at this revision


@dataclass(frozen=True, slots=True, kw_only=True)
class NotDetailedRecord:
    strip_id: str
    reason: str  # one line: why the strip could not be designed as given


@dataclass(frozen=True, slots=True, kw_only=True)
class ScheduleRowRecord:
    member: str
    mark: str
    type_and_size: str
    n_members: int
    n_bars_each: int
    length_mm: int
    mass_kg: float
    revision: str  # revision letter of the issue that last changed this row


@dataclass(frozen=True, slots=True, kw_only=True)
class ProjectRecord:
    schema_version: int
    project_id: str
    title: str
    revision: str
    date: str
    drawing_ref: str
    design_code: str
    caution: str
    materials: MaterialsRecord
    strips: tuple[StripRecord, ...]
    marks: tuple[MarkRecord, ...]
    withdrawn_marks: tuple[str, ...]
    total_mass_kg: float
    revisions: tuple[RevisionRecord, ...] = ()  # every issue, oldest first, this one last
    schedule: tuple[ScheduleRowRecord, ...] = ()
    not_detailed: tuple[NotDetailedRecord, ...] = ()  # strips left out of this issue
