"""Design values of a strip read off its envelope: per segment (span or cantilever) and per
supported node, each with the arrangement that governs it (``analysis.envelope`` makes them:
``StripEnvelope.span_summaries`` and ``support_summaries``).
"""

from __future__ import annotations

from dataclasses import dataclass

from analysis.arrangements import Arrangement
from analysis.beam import Restraint

__all__ = ["SpanSummary", "SupportSummary"]


@dataclass(frozen=True, slots=True)
class SpanSummary:
    """Design values of one segment (a span or a cantilever)."""

    segment: int
    name: str  # "span 2", "left cantilever"
    length_mm: float
    m_max_knm: float  # greatest moment (sagging +), refined between stations at its peak
    x_mm: float  # where m_max occurs (global)
    governing: Arrangement  # for m_max
    m_min_knm: float  # least (most hogging) moment anywhere on the segment, ends included
    x_m_min_mm: float
    governing_m_min: Arrangement
    v_start_max_kn: float  # shear just right of the left node
    v_start_min_kn: float
    v_end_max_kn: float  # shear just left of the right node
    v_end_min_kn: float


@dataclass(frozen=True, slots=True)
class SupportSummary:
    """Design values at one supported node."""

    node: int
    x_mm: float
    restraint: Restraint
    width_mm: float
    m_min_knm: float  # at the centreline (most hogging)
    governing_m_min: Arrangement
    m_left_face_knm: float | None  # m_min at the left face (None: no segment there)
    m_right_face_knm: float | None
    reaction_for_m_min_kn: float  # F_Ed,sup of the arrangement governing m_min
    delta_m_knm: float  # F_Ed,sup t / 8, EN 1992-1-1 5.3.2.2(4) (0 at end supports)
    m_min_reduced_knm: float | None  # min(0, m_min + delta_m); interior supports only
    reaction_max_kn: float
    governing_reaction_max: Arrangement
    reaction_min_kn: float
    governing_reaction_min: Arrangement
