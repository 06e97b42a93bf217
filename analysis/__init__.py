"""Continuous-beam analysis of a one-way slab strip (knows no design code).

Input model and sign conventions: ``analysis.beam``. Solver: ``analysis.stiffness``
(banded direct stiffness, many load cases at once). Load arrangements and envelopes:
``analysis.arrangements``, ``analysis.envelope``. Moment redistribution:
``analysis.redistribution``. Independent check by moment distribution:
``analysis.moment_distribution``.
"""

from analysis.arrangements import (
    ActionFactors,
    Arrangement,
    Combination,
    Equation,
    PatternRule,
    make_arrangement,
)
from analysis.beam import BeamModel, Load, PointLoad, Restraint, UniformLoad
from analysis.envelope import SpanSummary, StripEnvelope, SupportSummary, analyse_envelope
from analysis.moment_distribution import support_moments_md
from analysis.redistribution import redistribute
from analysis.stations import Stations
from analysis.stiffness import CaseResults, solve

__all__ = [
    "ActionFactors",
    "Arrangement",
    "BeamModel",
    "CaseResults",
    "Combination",
    "Equation",
    "Load",
    "PatternRule",
    "PointLoad",
    "Restraint",
    "SpanSummary",
    "Stations",
    "StripEnvelope",
    "SupportSummary",
    "UniformLoad",
    "analyse_envelope",
    "make_arrangement",
    "redistribute",
    "solve",
    "support_moments_md",
]
