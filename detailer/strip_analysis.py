"""From a project strip to its analysis: beam model, characteristic loads, envelopes.

Pure functions, no I/O. The analysis package knows no design code; the factors it needs come
from ``detailer.codes.en1990`` here.

Monolithic ends. A slab end built into an edge beam or wall is only partly fixed: the beam
twists and cracks, so its true restraint lies between full fixity and none. Idealised as
FIXED alone, the end-support hogging is overstated and the end-span sagging understated
(a propped span gives 9 wL^2/128 sagging, a simply supported one wL^2/8). Common practice is
to design for the envelope of both idealisations; so a strip with a monolithic end is
analysed twice, with its monolithic ends FIXED and with the same ends PINNED, and every
envelope (ULS and quasi-permanent SLS) takes the worse of the two at each station: hogging at
the monolithic support from the fixed case, sagging and shears of the end span mostly from
the pinned one. A monolithic end that is the only support (the root of a lone cantilever)
stays fixed.
"""

from __future__ import annotations

__all__ = [
    "StripAnalysis",
    "action_factors",
    "analyse_strip",
    "analyse_strips",
    "flexural_stiffness_knm2",
    "strip_beam_model",
    "strip_loads",
    "strip_model_variants",
]

import itertools
from collections.abc import Sequence
from dataclasses import dataclass, replace

from analysis.arrangements import ActionFactors
from analysis.arrangements import Combination as AnalysisCombination
from analysis.arrangements import PatternRule as AnalysisPatternRule
from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.envelope import StripEnvelope, analyse_envelope_variants, unit_cases
from analysis.floor import solve_nodes_floor
from analysis.stiffness import NodeSolution
from detailer.codes.en1990 import partial_factors
from detailer.model import Combination, EndKind, PatternRule, Project, Strip

_RESTRAINT = {EndKind.PINNED: Restraint.PINNED, EndKind.MONOLITHIC: Restraint.FIXED}
_COMBINATION = {
    Combination.EQ_6_10: AnalysisCombination.EQ_6_10,
    Combination.EQ_6_10AB: AnalysisCombination.EQ_6_10AB,
}
_PATTERN = {
    PatternRule.UK_SIMPLIFIED: AnalysisPatternRule.ALL_AND_ALTERNATE,
    PatternRule.ALL_SUBSETS: AnalysisPatternRule.ALL_SUBSETS,
}


@dataclass(frozen=True, slots=True)
class StripAnalysis:
    """Envelopes of one strip and everything that produced them."""

    strip_id: str
    model: BeamModel  # monolithic ends FIXED (the first variant when there are several)
    permanent: tuple[Load, ...]  # characteristic G_k, self-weight included
    variable: tuple[Load, ...]  # characteristic Q_k
    factors: ActionFactors
    combination: AnalysisCombination  # ULS combination used for ``uls``
    pattern: AnalysisPatternRule  # arrangements of the variable load (ULS and SLS)
    redistribution_delta: float  # applied to ``uls`` only
    uls: StripEnvelope  # ULS, EN 1990 Eq. (6.10) or (6.10a/b)
    sls_quasi_permanent: StripEnvelope  # SLS quasi-permanent, EN 1990 Eq. (6.16b), elastic
    # Restraint variants both envelopes cover, e.g. ("end A fixed", "end A pinned") for a
    # monolithic end (see the module docstring); () when the strip has one model.
    variants: tuple[str, ...] = ()


def flexural_stiffness_knm2(strip: Strip, f_ck: float) -> float:
    """Uncracked short-term EI per metre width: E_cm x h^3 / 12, in kNm2.

    E_cm = 22 (f_cm / 10)^0.3 GPa with f_cm = f_ck + 8 MPa (EN 1992-1-1:2004, Table 3.1).
    Moments and shears of a prismatic strip do not depend on EI; deflections do.
    """
    e_cm_kn_per_m2 = 22.0 * ((f_ck + 8.0) / 10.0) ** 0.3 * 1.0e6
    h_m = strip.thickness_mm / 1000.0
    return e_cm_kn_per_m2 * h_m**3 / 12.0


def strip_beam_model(strip: Strip, f_ck: float = 30.0) -> BeamModel:
    """Nodes at the free tips and support centrelines; monolithic end FIXED, pinned PINNED."""
    nodes = strip.node_x_mm
    n = len(nodes)
    restraints = [Restraint.PINNED] * n
    widths = [0.0] * n
    offset = 1 if strip.has_left_cantilever else 0
    for k, support in enumerate(strip.supports):
        widths[offset + k] = support.width_mm
    if strip.has_left_cantilever:
        restraints[0] = Restraint.FREE
    else:
        restraints[0] = _RESTRAINT[strip.left_end.kind]
    if strip.has_right_cantilever:
        restraints[-1] = Restraint.FREE
    else:
        restraints[-1] = _RESTRAINT[strip.right_end.kind]
    return BeamModel(
        node_x_mm=nodes,
        restraints=tuple(restraints),
        support_width_mm=tuple(widths),
        ei_knm2=flexural_stiffness_knm2(strip, f_ck),
    )


def strip_loads(strip: Strip) -> tuple[tuple[Load, ...], tuple[Load, ...]]:
    """(permanent, variable) characteristic loads per segment; self-weight added to permanent.

    On a 1 m strip an area load in kN/m2 is a line load in kN/m and a line load across the
    strip in kN/m is a point load in kN.
    """
    g_sw = strip.self_weight_kn_per_m2
    permanent: list[Load] = []
    variable: list[Load] = []
    for seg in strip.segments:
        i, loads = seg.index, seg.loads
        permanent.append(UniformLoad(i, g_sw + loads.g_k_kn_per_m2))
        if loads.q_k_kn_per_m2 > 0:
            variable.append(UniformLoad(i, loads.q_k_kn_per_m2))
        for p in loads.partial:
            if p.g_k_kn_per_m2 > 0:
                permanent.append(UniformLoad(i, p.g_k_kn_per_m2, p.start_mm, p.end_mm))
            if p.q_k_kn_per_m2 > 0:
                variable.append(UniformLoad(i, p.q_k_kn_per_m2, p.start_mm, p.end_mm))
        for ln in loads.line:
            if ln.g_k_kn_per_m > 0:
                permanent.append(PointLoad(i, ln.g_k_kn_per_m, ln.a_mm))
            if ln.q_k_kn_per_m > 0:
                variable.append(PointLoad(i, ln.q_k_kn_per_m, ln.a_mm))
    return tuple(permanent), tuple(variable)


def action_factors(strip: Strip, national_annex: str = "UK") -> ActionFactors:
    """Partial factors (EN 1990 Table A1.2(B) + NA) and the strip's psi factors (Table A1.1)."""
    pf = partial_factors(national_annex)
    return ActionFactors(
        gamma_g_sup=pf.gamma_g_sup,
        gamma_g_inf=pf.gamma_g_inf,
        gamma_q=pf.gamma_q,
        psi_0=strip.psi.psi_0,
        psi_2=strip.psi.psi_2,
        xi=pf.xi,
    )


def _released_ends(strip: Strip) -> tuple[int, ...]:
    """Model node indices (0 first, -1 last) of the monolithic ends that may be released
    to pinned: not the root of a lone cantilever (the strip's only support)."""
    if len(strip.supports) < 2:
        return ()
    out: list[int] = []
    if not strip.has_left_cantilever and strip.left_end.kind is EndKind.MONOLITHIC:
        out.append(0)
    if not strip.has_right_cantilever and strip.right_end.kind is EndKind.MONOLITHIC:
        out.append(-1)
    return tuple(out)


def strip_model_variants(strip: Strip, f_ck: float = 30.0) -> tuple[tuple[str, BeamModel], ...]:
    """The restraint variants the strip is enveloped over, as (name, model) pairs.

    No monolithic end (or only a cantilever root): one pair ("", model). Otherwise every
    combination of its monolithic ends FIXED or PINNED, named after the support labels:
    "end A fixed" / "end A pinned"; with two such ends "A fixed, E fixed", "A fixed, E pinned",
    ... (common practice: partial fixity at monolithic edges, the envelope of the
    idealisations; one end fixed and the other pinned gives the largest hogging at the fixed
    end of a single span, wL^2/8 against wL^2/12).
    """
    fixed = strip_beam_model(strip, f_ck)
    ends = _released_ends(strip)
    if not ends:
        return (("", fixed),)
    labels = [strip.supports[0 if e == 0 else -1].label for e in ends]
    out: list[tuple[str, BeamModel]] = []
    for choice in itertools.product((Restraint.FIXED, Restraint.PINNED), repeat=len(ends)):
        restraints = list(fixed.restraints)
        for e, r in zip(ends, choice):
            restraints[e] = r
        words = [
            f"{lab} {'fixed' if r is Restraint.FIXED else 'pinned'}"
            for lab, r in zip(labels, choice)
        ]
        name = f"end {words[0]}" if len(words) == 1 else ", ".join(words)
        out.append((name, replace(fixed, restraints=tuple(restraints))))
    return tuple(out)


def analyse_strip(project: Project, strip: Strip) -> StripAnalysis:
    """ULS envelope (with the project's redistribution) and quasi-permanent SLS envelope.

    With a monolithic end both envelopes cover that end FIXED and PINNED
    (``strip_model_variants``; why: the module docstring).
    """
    variants = strip_model_variants(strip, project.materials.f_ck)
    return _analyse(project, strip, variants, strip_loads(strip), None)


def analyse_strips(project: Project, strips: Sequence[Strip]) -> tuple[StripAnalysis, ...]:
    """``analyse_strip`` of every strip, with the unit cases of every strip and restraint
    variant solved in one floor solve (``analysis.floor``); ULS and SLS share them (the
    same loads on the same models; redistribution is applied to a copy).

    A strip the floor solve refuses is analysed strip by strip, so the error is the one
    ``analyse_strip`` gives for the first bad strip.
    """
    strips = tuple(strips)
    f_ck = project.materials.f_ck
    prepared = [(strip_model_variants(s, f_ck), strip_loads(s)) for s in strips]
    models: list[BeamModel] = []
    cases: list[list[list[Load]]] = []
    names: list[list[str]] = []
    for variants, (permanent, variable) in prepared:
        unit, unit_names, _ = unit_cases(permanent, variable)
        for _, model in variants:
            models.append(model)
            cases.append(unit)
            names.append(unit_names)
    try:
        solved = solve_nodes_floor(models, cases, names)
    except (ValueError, TypeError):
        return tuple(analyse_strip(project, s) for s in strips)
    out, k = [], 0
    for strip, (variants, loads) in zip(strips, prepared):
        out.append(_analyse(project, strip, variants, loads, solved[k : k + len(variants)]))
        k += len(variants)
    return tuple(out)


def _analyse(
    project: Project,
    strip: Strip,
    variants: tuple[tuple[str, BeamModel], ...],
    loads: tuple[tuple[Load, ...], tuple[Load, ...]],
    solved: Sequence[NodeSolution] | None,
) -> StripAnalysis:
    model = variants[0][1]
    permanent, variable = loads
    factors = action_factors(strip)
    combination = _COMBINATION[project.analysis.combination]
    pattern = _PATTERN[project.analysis.pattern]
    delta = project.analysis.redistribution_delta
    uls = analyse_envelope_variants(
        variants,
        permanent,
        variable,
        factors,
        combination,
        pattern,
        redistribution_delta=delta,
        solved=solved,
    )
    sls = analyse_envelope_variants(
        variants,
        permanent,
        variable,
        factors,
        AnalysisCombination.QUASI_PERMANENT,
        pattern,
        redistribution_delta=1.0,
        solved=solved,
    )
    return StripAnalysis(
        strip_id=strip.id,
        model=model,
        permanent=permanent,
        variable=variable,
        factors=factors,
        combination=combination,
        pattern=pattern,
        redistribution_delta=delta,
        uls=uls,
        sls_quasi_permanent=sls,
        variants=tuple(name for name, _ in variants) if len(variants) > 1 else (),
    )
