"""The build record: what was designed and detailed, and from what, as typed data.

:func:`build_record` gathers a detailed project (:class:`detailer.layout.ProjectDetail`) into
frozen record objects; :func:`record_to_jsonable` turns them into plain dicts and lists ready
for ``json.dumps`` (rounded by unit, NumPy scalars made Python floats, keys in field order).
The mark table it stores is read back by :func:`detailer.io.json_writer.previous_marks`, so a
later issue can keep the marks of unchanged bars. Every field is described in
``docs/record-schema.md``.

Pure: no I/O, no design computation (values are copied from the pipeline's results), except
the depth of an inner (T2/B2) layer, which is geometry: h - c_nom - phi_outer - phi / 2.
"""

from __future__ import annotations

__all__ = [
    "bar_set_record",
    "build_record",
    "mark_records",
    "record_to_jsonable",
    "station_labels",
]

import math
from collections.abc import Iterable, Mapping, Sequence
from typing import Final

from analysis.arrangements import PatternRule as AnalysisPatternRule
from analysis.arrangements import alternate_sets, equations, make_arrangement
from detailer import CAUTION
from detailer.layout import (
    BarSet,
    Face,
    ProjectDetail,
    StripDetail,
)
from detailer.marks import layer_sort_key, mark_table
from detailer.record_json import record_to_jsonable
from detailer.record_types import (
    SCHEMA_VERSION,
    ActionsRecord,
    BarSetRecord,
    EndRecord,
    EquationRecord,
    LayerDepthRecord,
    LineLoadRecord,
    MarkRecord,
    MaterialsRecord,
    NotDetailedRecord,
    PartialLoadRecord,
    ProjectRecord,
    RevisionRecord,
    ScheduleRowRecord,
    SectionRecord,
    SegmentRecord,
    StationRecord,
    StripRecord,
    SupportRecord,
)
from detailer.schedule import Schedule, schedule_rows, summarise

# --------------------------------------------------------------------------------------------
# Building


def _layer_depths(detail: StripDetail) -> tuple[LayerDepthRecord, ...]:
    """Effective depth of each (layer, bar size) in use.

    Outer layers (T1, B1): the d the zone designs used. Inner layers (T2, B2): h - c_nom -
    largest outer bar on that face - phi / 2 (the layer's centroid from the far face).
    """
    strip = detail.strip
    h = strip.thickness_mm
    cover = {Face.TOP: strip.cover_top_mm, Face.BOTTOM: strip.cover_bottom_mm}
    d_zone: dict[tuple[Face, int], float] = {}
    for z in detail.zones:
        key = (z.face, z.phi_mm)
        d_zone[key] = min(d_zone.get(key, z.d_mm), z.d_mm)
    used = sorted(
        {(b.layer, b.phi_mm) for b in detail.bar_sets},
        key=lambda lp: (layer_sort_key(lp[0]), lp[1]),
    )
    outer_max = {
        face: max((p for layer, p in used if layer == f"{face_letter}1"), default=0)
        for face, face_letter in ((Face.TOP, "T"), (Face.BOTTOM, "B"))
    }
    out = []
    for layer, phi in used:
        face = Face.TOP if layer.startswith("T") else Face.BOTTOM
        if layer.endswith("1") and (face, phi) in d_zone:
            d, source = d_zone[(face, phi)], "zone design"
        elif layer.endswith("1"):
            d, source = h - cover[face] - phi / 2.0, "h - c_nom - phi/2"
        else:
            d = h - cover[face] - outer_max[face] - phi / 2.0
            source = "h - c_nom - phi_outer - phi/2"
        out.append(LayerDepthRecord(layer=layer, phi_mm=phi, d_mm=d, source=source))
    return tuple(out)


def _section(detail: StripDetail) -> SectionRecord:
    s = detail.strip
    return SectionRecord(
        thickness_mm=s.thickness_mm,
        cover_top_mm=s.cover_top_mm,
        cover_bottom_mm=s.cover_bottom_mm,
        cover_side_mm=s.cover_side_mm,
        panel_width_mm=s.panel_width_mm,
        effective_depths=_layer_depths(detail),
    )


def _segments(detail: StripDetail) -> tuple[SegmentRecord, ...]:
    strip = detail.strip
    g_sw = strip.self_weight_kn_per_m2
    out = []
    for seg in strip.segments:
        loads = seg.loads
        out.append(
            SegmentRecord(
                index=seg.index,
                label=seg.label,
                kind=seg.kind.value,
                span_number=seg.span_number,
                x_start_mm=seg.x_start_mm,
                x_end_mm=seg.x_end_mm,
                length_mm=seg.length_mm,
                self_weight_kn_per_m2=g_sw,
                g_k_superimposed_kn_per_m2=loads.g_k_kn_per_m2,
                g_k_kn_per_m2=strip.g_k_total_kn_per_m2(seg.index),
                q_k_kn_per_m2=loads.q_k_kn_per_m2,
                partial_loads=tuple(
                    PartialLoadRecord(
                        start_mm=p.start_mm,
                        end_mm=p.end_mm,
                        g_k_kn_per_m2=p.g_k_kn_per_m2,
                        q_k_kn_per_m2=p.q_k_kn_per_m2,
                        description=p.description,
                    )
                    for p in loads.partial
                ),
                line_loads=tuple(
                    LineLoadRecord(
                        a_mm=ln.a_mm,
                        g_k_kn_per_m=ln.g_k_kn_per_m,
                        q_k_kn_per_m=ln.q_k_kn_per_m,
                        description=ln.description,
                    )
                    for ln in loads.line
                ),
            )
        )
    return tuple(out)


def _actions(detail: StripDetail) -> ActionsRecord:
    an = detail.analysis
    env = an.uls
    f = an.factors
    eqs = equations(an.combination, f)
    if an.pattern is AnalysisPatternRule.ALL_AND_ALTERNATE:
        sets = alternate_sets(an.model.n_segments)
        labels = tuple(
            make_arrangement(an.model, e.name, s, variant=v).label
            for v in (an.variants or ("",))
            for e in eqs
            for s in sets
        )
    else:
        labels = ()  # every subset of loaded segments: too many to list
    return ActionsRecord(
        combination=an.combination.value,
        equations=tuple(
            EquationRecord(name=e.name, gamma_g=e.gamma_g, gamma_q=e.gamma_q) for e in eqs
        ),
        gamma_g_sup=f.gamma_g_sup,
        gamma_g_inf=f.gamma_g_inf,
        gamma_q=f.gamma_q,
        psi_0=f.psi_0,
        psi_2=f.psi_2,
        xi=f.xi,
        pattern=an.pattern.value,
        arrangements=labels,
        redistribution_delta=env.redistribution_delta,
        restraint_variants=tuple(an.variants),
    )


#: The station quantities whose governing arrangement the record names.
LABELLED: Final = ("m_max", "m_min", "v_max", "v_min")


def station_labels(detail: StripDetail) -> dict[str, tuple[str, ...]]:
    """The governing arrangement's label at every ULS station, per quantity of
    :data:`LABELLED` (the costly part of a strip's record: worth working out beside the
    strip's design, in its worker, and passing to :func:`build_record`)."""
    env = detail.analysis.uls
    return {kind: env.governing_labels(kind) for kind in LABELLED}


def _stations(
    detail: StripDetail, labels: Mapping[str, tuple[str, ...]] | None = None
) -> tuple[StationRecord, ...]:
    env = detail.analysis.uls
    st = env.stations
    by = labels if labels is not None else station_labels(detail)
    out = []
    for i in range(len(st)):
        out.append(
            StationRecord(
                x_mm=float(st.x_mm[i]),
                segment=int(st.segment[i]),
                side=int(st.side[i]),
                m_max_knm=float(env.m_max_knm[i]),
                m_min_knm=float(env.m_min_knm[i]),
                v_max_kn=float(env.v_max_kn[i]),
                v_min_kn=float(env.v_min_kn[i]),
                m_max_by=by["m_max"][i],
                m_min_by=by["m_min"][i],
                v_max_by=by["v_max"][i],
                v_min_by=by["v_min"][i],
            )
        )
    return tuple(out)


def bar_set_record(b: BarSet) -> BarSetRecord:
    """The record of one (marked) bar set."""
    shape = b.shape
    return BarSetRecord(
        mark=b.mark,
        set_id=b.set_id,
        role=b.role.value,
        layer=b.layer,
        zone_id=b.zone_id,
        type_and_size=f"{b.bar_type}{b.phi_mm}",
        bar_type=b.bar_type,
        phi_mm=b.phi_mm,
        spacing_mm=b.spacing_mm,
        offset_mm=b.offset_mm,
        count=b.count,
        x_start_mm=b.x_start_mm,
        x_end_mm=b.x_end_mm,
        shape_code=shape.code,
        dims_mm=tuple(shape.dims_mm),
        free_dims=tuple(shape.free_dims),
        sketch_ref=shape.shape.sketch_ref,
        length_mm=shape.length_mm,
        length_exact_mm=shape.length_exact_mm,
        mass_kg=b.count * shape.mass_kg,
        callout=b.callout,
        note=b.note,
    )


def _strip(detail: StripDetail, labels: Mapping[str, tuple[str, ...]] | None = None) -> StripRecord:
    s = detail.strip
    return StripRecord(
        id=s.id,
        description=s.description,
        section=_section(detail),
        left_end=EndRecord(kind=s.left_end.kind.value, cantilever_mm=s.left_end.cantilever_mm),
        right_end=EndRecord(kind=s.right_end.kind.value, cantilever_mm=s.right_end.cantilever_mm),
        supports=tuple(
            SupportRecord(label=x.label, x_mm=x.x_mm, width_mm=x.width_mm) for x in s.supports
        ),
        spans_mm=tuple(s.spans_mm),
        length_mm=s.length_mm,
        load_category=s.load_category,
        concrete_density_kn_per_m3=s.concrete_density_kn_per_m3,
        segments=_segments(detail),
        actions=_actions(detail),
        envelope=_stations(detail, labels),
        zones=detail.zones,
        bar_sets=tuple(bar_set_record(b) for b in detail.bar_sets),
        anchorage=detail.anchorage,
        selfcheck=detail.selfcheck,
        checks=detail.checks,
    )


def mark_records(strips_bar_sets: Iterable[Iterable[BarSet]]) -> tuple[MarkRecord, ...]:
    """The project's mark table as records (one per mark, in mark order)."""
    return tuple(
        MarkRecord(
            mark=e.mark,
            type_and_size=e.identity.type_and_size,
            bar_type=e.identity.bar_type,
            phi_mm=e.identity.phi_mm,
            shape_code=e.identity.shape_code,
            dims_mm=e.identity.dims_mm,
            free_dims=e.identity.free_dims,
            sketch_ref=e.identity.sketch_ref,
            length_mm=e.identity.length_mm,
        )
        for e in mark_table(strips_bar_sets)
    )


def build_record(
    detail: ProjectDetail,
    *,
    withdrawn_marks: Sequence[str] = (),
    schedule: Schedule | None = None,
    history: Sequence[RevisionRecord] = (),
    description: str = "first issue",
    not_detailed: Sequence[tuple[str, str]] = (),
    station_labels: Mapping[str, Mapping[str, tuple[str, ...]]] | None = None,
) -> ProjectRecord:
    """The record of a detailed project whose bar sets carry their marks.

    ``withdrawn_marks``: marks issued before and no longer used (kept so they are never given
    to another bar; see :func:`detailer.marks.withdrawn_marks`). ``schedule``: the issued
    schedule, whose rows (with their revision letters) are recorded; ``history``: the earlier
    issues, to which this one is added with ``description``; ``not_detailed``: (strip id,
    reason) of the strips that could not be designed and are left out of this issue;
    ``station_labels``: :func:`station_labels` of some or all strips, by strip id, when
    already worked out.
    """
    labels = station_labels or {}
    p = detail.project
    m = p.materials
    bar_sets = [s.bar_sets for s in detail.strips]
    all_sets = [b for s in detail.strips for b in s.bar_sets]
    rows = (
        schedule.rows
        if schedule is not None
        else schedule_rows(
            all_sets, revision=p.revision, members={s.id: s.members for s in p.strips}
        )
    )
    summary = summarise(rows)
    return ProjectRecord(
        schema_version=SCHEMA_VERSION,
        project_id=p.id,
        title=p.title,
        revision=p.revision,
        date=p.date,
        drawing_ref=p.drawing_ref,
        design_code=p.code_id,
        caution=CAUTION,
        materials=MaterialsRecord(
            concrete_class=m.concrete_class,
            f_ck_mpa=m.f_ck,
            f_ck_cube_mpa=m.f_ck_cube,
            f_yk_mpa=m.f_yk,
            bar_type=m.bar_type,
            ductility_class=m.ductility_class,
            exposure_class=m.exposure_class,
            density_kn_per_m3=m.density_kn_per_m3,
        ),
        strips=tuple(_strip(s, labels.get(s.strip.id)) for s in detail.strips),
        marks=mark_records(bar_sets),
        withdrawn_marks=tuple(withdrawn_marks),
        total_mass_kg=math.fsum(line.mass_kg for line in summary),
        revisions=(
            *history,
            RevisionRecord(revision=p.revision, date=p.date, description=description),
        ),
        schedule=tuple(
            ScheduleRowRecord(
                member=r.member,
                mark=r.mark,
                type_and_size=r.type_and_size,
                n_members=r.n_members,
                n_bars_each=r.n_bars_each,
                length_mm=r.length_mm,
                mass_kg=r.mass_kg,
                revision=r.revision,
            )
            for r in rows
        ),
        not_detailed=tuple(NotDetailedRecord(strip_id=i, reason=r) for i, r in not_detailed),
    )
