"""Input model of a continuous beam (a 1 m wide slab strip) for the analysis package.

Conventions (used by every module in ``analysis``):

* x is measured in mm along the strip from its left end (the free tip of a left cantilever,
  or the centreline of the first support).
* Loads act downwards and are positive; line loads are in kN/m of strip length (for a 1 m
  strip numerically equal to kN/m2), point loads in kN (kN per metre width of slab).
* Bending moments in kNm (per metre width), sagging positive; shear in kN, positive when
  the part to the left of a section is pushed up (V = dM/dx).
* Reactions in kN, upwards positive; deflections in mm, downwards positive.

The package knows no design code: load factors and combinations arrive as numbers.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from dataclasses import dataclass, field


class Restraint(enum.Enum):
    """Restraint at a node of the beam model."""

    FREE = "free"  # free end of a cantilever
    PINNED = "pinned"  # vertical support, free to rotate
    FIXED = "fixed"  # vertical support and full rotational restraint (monolithic end idealised)


@dataclass(frozen=True, slots=True)
class UniformLoad:
    """Uniform line load w (kN/m) on one segment, optionally partial.

    ``start_mm``/``end_mm`` are measured from the segment's left node; ``None`` means the
    whole segment.
    """

    segment: int
    w_kn_per_m: float
    start_mm: float | None = None
    end_mm: float | None = None


@dataclass(frozen=True, slots=True)
class PointLoad:
    """Concentrated load P (kN) on one segment at ``a_mm`` from the segment's left node.

    On a slab strip this is a line load across the strip (kN/m width) such as a wall.
    """

    segment: int
    p_kn: float
    a_mm: float


Load = UniformLoad | PointLoad


@dataclass(frozen=True, slots=True)
class BeamModel:
    """A continuous beam: nodes at ``node_x_mm`` joined by segments (spans or cantilevers).

    ``restraints[i]`` applies at node i. Interior nodes are PINNED (supports) in a slab
    strip; an end node may be PINNED, FIXED or FREE (cantilever tip). ``support_width_mm[i]``
    is the width of the support at node i (0 for a free end), used for face moments.
    ``ei_knm2`` is the constant flexural stiffness per metre width.
    """

    node_x_mm: tuple[float, ...]
    restraints: tuple[Restraint, ...]
    support_width_mm: tuple[float, ...]
    ei_knm2: float = 1.0e5
    station_spacing_fraction: float = field(default=1.0 / 20.0)

    def __post_init__(self) -> None:
        n = len(self.node_x_mm)
        if n < 2:
            raise ValueError("a beam needs at least two nodes")
        if len(self.restraints) != n or len(self.support_width_mm) != n:
            raise ValueError("restraints and support widths need one entry per node")
        for a, b in zip(self.node_x_mm, self.node_x_mm[1:]):
            if not (math.isfinite(a) and math.isfinite(b)) or b <= a:
                raise ValueError("node positions must be finite and strictly increasing")
        for i, r in enumerate(self.restraints):
            if r is Restraint.FREE and 0 < i < n - 1:
                raise ValueError("only an end node can be free")
        if self.restraints[0] is Restraint.FREE and self.restraints[-1] is Restraint.FREE and n < 4:
            # Two cantilevers need at least two supports between them.
            raise ValueError("both ends free over a single support: the beam is a mechanism")
        if n == 2 and Restraint.FREE in self.restraints and Restraint.FIXED not in self.restraints:
            raise ValueError("a single cantilever needs a fixed root")
        if not (self.ei_knm2 > 0 and math.isfinite(self.ei_knm2)):
            raise ValueError("EI must be positive")

    @classmethod
    def from_spans(
        cls,
        lengths_mm: Sequence[float],
        left: Restraint = Restraint.PINNED,
        right: Restraint = Restraint.PINNED,
        support_width_mm: float | Sequence[float] = 0.0,
        ei_knm2: float = 1.0e5,
        station_spacing_fraction: float = 1.0 / 20.0,
    ) -> BeamModel:
        """A model from segment lengths (left to right, x = 0 at the first node).

        Interior nodes are PINNED; a FREE end makes its end segment a cantilever. A single
        width applies to every supported node (a free end gets 0); a sequence gives one
        width per node.
        """
        x = [0.0]
        for length in lengths_mm:
            x.append(x[-1] + float(length))
        n = len(x)
        restraints = [Restraint.PINNED] * n
        restraints[0], restraints[-1] = left, right
        if isinstance(support_width_mm, (int, float)):
            widths = [float(support_width_mm)] * n
        else:
            widths = [float(w) for w in support_width_mm]
        for i in (0, n - 1):
            if restraints[i] is Restraint.FREE and len(widths) == n:
                widths[i] = 0.0
        return cls(
            tuple(x),
            tuple(restraints),
            tuple(widths),
            ei_knm2=ei_knm2,
            station_spacing_fraction=station_spacing_fraction,
        )

    @property
    def n_segments(self) -> int:
        return len(self.node_x_mm) - 1

    def segment_length_mm(self, i: int) -> float:
        return self.node_x_mm[i + 1] - self.node_x_mm[i]

    def is_cantilever(self, i: int) -> bool:
        """True when segment i ends at a free node."""
        return (i == 0 and self.restraints[0] is Restraint.FREE) or (
            i == self.n_segments - 1 and self.restraints[-1] is Restraint.FREE
        )
