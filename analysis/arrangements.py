"""Load arrangements: combination equations and the spans that carry the variable load.

The factors arrive as numbers (``ActionFactors``); this module only knows how to combine
them. Defaults are the EN 1990 + UK NA values for buildings (EN 1990:2002, Table A1.2(B)
with the UK NA: gamma_G = 1.35 / 1.0, gamma_Q = 1.5, xi = 0.925; psi values of
EN 1990:2002, Table A1.1 for categories A/B: psi_0 = 0.7, psi_2 = 0.3).

Pattern rules:

* ``ALL_AND_ALTERNATE``: UK NA to EN 1992-1-1, 5.1.3(1): all spans loaded with
  gamma_G Gk + gamma_Q Qk, and each of the two alternate-span sets so loaded while the
  other spans carry gamma_G Gk; the same gamma_G on every span.
* ``ALL_SUBSETS``: every subset of loaded segments (the exact worst case at every station),
  found by superposing one permanent case and one variable case per segment.

Cantilevers are segments like any other: they can be loaded or not.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from dataclasses import dataclass, fields

from analysis.beam import BeamModel

__all__ = [
    "ActionFactors",
    "Arrangement",
    "Combination",
    "Equation",
    "PatternRule",
    "alternate_sets",
    "equations",
    "make_arrangement",
    "segment_name",
]


@dataclass(frozen=True, slots=True)
class ActionFactors:
    """Partial and combination factors (EN 1990 symbols)."""

    gamma_g_sup: float = 1.35  # unfavourable permanent
    gamma_g_inf: float = 1.0  # favourable permanent (for callers' checks; see module doc)
    gamma_q: float = 1.5  # variable
    psi_0: float = 0.7  # combination value
    psi_2: float = 0.3  # quasi-permanent value
    xi: float = 0.925  # reduction of unfavourable permanent actions in 6.10b

    def __post_init__(self) -> None:
        for f in fields(self):
            value = getattr(self, f.name)
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise TypeError(f"ActionFactors.{f.name} must be a number, got {value!r}")
            if not math.isfinite(value) or value < 0:
                raise ValueError(f"ActionFactors.{f.name} must be finite and >= 0, got {value}")
        for name in ("psi_0", "psi_2", "xi"):
            if getattr(self, name) > 1.0:
                raise ValueError(
                    f"ActionFactors.{name} must not exceed 1, got {getattr(self, name)}"
                )


class Combination(enum.Enum):
    """How permanent (G) and variable (Q) characteristic loads are combined."""

    EQ_6_10 = "6.10"  # EN 1990 Eq. (6.10): gamma_G Gk + gamma_Q Qk
    EQ_6_10AB = "6.10a/b"  # the less favourable of Eq. (6.10a) and (6.10b)
    CHARACTERISTIC = "characteristic"  # EN 1990 Eq. (6.14b): Gk + Qk
    QUASI_PERMANENT = "quasi-permanent"  # EN 1990 Eq. (6.16b): Gk + psi_2 Qk


class PatternRule(enum.Enum):
    """Which sets of segments carry the variable load."""

    ALL_AND_ALTERNATE = "all and alternate"
    ALL_SUBSETS = "all subsets"


@dataclass(frozen=True, slots=True)
class Equation:
    """One combination equation: total = gamma_g * G + gamma_q * Q on the loaded segments."""

    name: str  # "6.10", "6.10a", "6.10b", "characteristic", "quasi-permanent"
    gamma_g: float
    gamma_q: float


def equations(combination: Combination, factors: ActionFactors) -> tuple[Equation, ...]:
    """The equations a combination takes the worst of.

    EN 1990:2002, Eq. (6.10), (6.10a), (6.10b), (6.14b), (6.16b).
    """
    f = factors
    if combination is Combination.EQ_6_10:
        return (Equation("6.10", f.gamma_g_sup, f.gamma_q),)
    if combination is Combination.EQ_6_10AB:
        return (
            Equation("6.10a", f.gamma_g_sup, f.gamma_q * f.psi_0),
            Equation("6.10b", f.xi * f.gamma_g_sup, f.gamma_q),
        )
    if combination is Combination.CHARACTERISTIC:
        return (Equation("characteristic", 1.0, 1.0),)
    if combination is Combination.QUASI_PERMANENT:
        return (Equation("quasi-permanent", 1.0, f.psi_2),)
    raise ValueError(f"unknown combination {combination!r}")


def alternate_sets(n_segments: int) -> tuple[tuple[int, ...], ...]:
    """All segments, then the even-indexed and the odd-indexed ones (duplicates dropped).

    UK NA to EN 1992-1-1, 5.1.3(1).
    """
    out: list[tuple[int, ...]] = []
    for s in (
        tuple(range(n_segments)),
        tuple(range(0, n_segments, 2)),
        tuple(range(1, n_segments, 2)),
    ):
        if s not in out:
            out.append(s)
    return tuple(out)


def segment_name(
    segment: int, n_segments: int, left_cantilever: bool, right_cantilever: bool
) -> str:
    """ "span k" (1-based, counting spans only), "left cantilever" or "right cantilever"."""
    if left_cantilever and segment == 0:
        return "left cantilever"
    if right_cantilever and segment == n_segments - 1:
        return "right cantilever"
    return f"span {segment + (0 if left_cantilever else 1)}"


@dataclass(frozen=True, slots=True)
class Arrangement:
    """One load arrangement: an equation and the segments carrying the variable load.

    ``n_segments`` and the cantilever flags only serve the ``label``; build with
    ``make_arrangement`` to fill them from the model. ``variant`` names the restraint
    variant of the beam the arrangement acts on when an envelope covers several
    (``analysis.envelope.analyse_envelope_variants``); "" is the one and only model.
    """

    equation: str
    loaded_segments: tuple[int, ...]
    n_segments: int = 0
    left_cantilever: bool = False
    right_cantilever: bool = False
    variant: str = ""

    @property
    def label(self) -> str:
        """E.g. "6.10b, Q on spans 1, 3", "6.10, Q on left cantilever, span 2" or, with a
        variant, "6.10b, Q on spans 1, 3 (end A pinned)"."""
        base = self._loads_label()
        return f"{base} ({self.variant})" if self.variant else base

    def _loads_label(self) -> str:
        loaded = self.loaded_segments
        if not loaded:
            return f"{self.equation}, G only"
        n = self.n_segments
        n_cant = int(self.left_cantilever) + int(self.right_cantilever)
        if n and len(loaded) == n and n > 1:
            if n_cant == 0:
                return f"{self.equation}, Q on all spans"
            tail = "the cantilever" if n_cant == 1 else "both cantilevers"
            spans = "all spans and " if n > n_cant else ""
            return f"{self.equation}, Q on {spans}{tail}"
        names = [
            segment_name(s, max(n, 1 + max(loaded)), self.left_cantilever, self.right_cantilever)
            for s in loaded
        ]
        spans = [x[5:] for x in names if x.startswith("span ")]
        parts = [x for x in names if x == "left cantilever"]  # left to right
        if spans:
            parts.append(("span " if len(spans) == 1 else "spans ") + ", ".join(spans))
        parts += [x for x in names if x == "right cantilever"]
        return f"{self.equation}, Q on " + ", ".join(parts)


def make_arrangement(
    model: BeamModel, equation: str, loaded: Sequence[int], variant: str = ""
) -> Arrangement:
    """An ``Arrangement`` that knows the model's segments (for its label) and, optionally,
    the restraint variant it belongs to."""
    n = model.n_segments
    return Arrangement(
        equation=equation,
        loaded_segments=tuple(sorted(int(s) for s in loaded)),
        n_segments=n,
        left_cantilever=model.is_cantilever(0),
        right_cantilever=model.is_cantilever(n - 1),
        variant=variant,
    )
