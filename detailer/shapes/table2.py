"""BS 8666:2005 Table 2 and Figure 6: bending radii, formers, end projections, bend spacing.

Values are those printed in BS 8666:2005, Table 2 (the 2020 edition keeps a Table 2 with the
same title; its values were not checked). r is the minimum radius for scheduling, M the minimum
diameter of the bending former, P the minimum end projection. The printed r for 25 mm is 87
(3.5d = 87.5); this module uses the printed value.
"""

from __future__ import annotations

__all__ = [
    "MAX_CONTINUOUS_MANDREL_MM",
    "TABLE_2",
    "BendingLimits",
    "bending_limits",
    "min_between_bends_mm",
    "min_straight_between_bends_mm",
]

import math
from dataclasses import dataclass
from types import MappingProxyType
from typing import Final

from detailer.bars import UK_BAR_SIZES_MM, BarSizeError

#: Largest practical mandrel diameter for a continuous curve, mm (BS 8666:2005 shapes
#: table, Note 3: shapes 12, 13, 22, 33 and 47).
MAX_CONTINUOUS_MANDREL_MM: Final[int] = 400


@dataclass(frozen=True, slots=True)
class BendingLimits:
    """One row of BS 8666:2005, Table 2, for bar size d."""

    d_mm: int  # nominal bar size d
    r_mm: int  # r, minimum radius for scheduling
    former_mm: int  # M, minimum diameter of bending former
    p_mm: int  # P, minimum end projection, general (and links with bends >= 150 deg)
    p_link_mm: int  # P for links where the bend is < 150 deg
    max_bend_radius_mm: int | None  # larger radii are supplied straight (None: not printed)


def _row(d: int, r: int, m: int, p: int, p_link: int, max_r: int | None) -> BendingLimits:
    return BendingLimits(d, r, m, p, p_link, max_r)


#: BS 8666:2005, Table 2, keyed by bar size d in mm.
TABLE_2: Final = MappingProxyType(
    {
        row.d_mm: row
        for row in (
            _row(6, 12, 24, 110, 110, 2500),
            _row(8, 16, 32, 115, 115, 2750),
            _row(10, 20, 40, 120, 130, 3500),
            _row(12, 24, 48, 125, 160, 4250),
            _row(16, 32, 64, 130, 210, 7500),
            _row(20, 70, 140, 190, 290, 14000),
            _row(25, 87, 175, 240, 365, 30000),
            _row(32, 112, 224, 305, 465, 43000),
            _row(40, 140, 280, 380, 580, 58000),
            _row(50, 175, 350, 475, 725, None),
        )
    }
)
assert tuple(TABLE_2) == UK_BAR_SIZES_MM


def bending_limits(phi_mm: int) -> BendingLimits:
    """Minimum scheduling radius r, former M and end projection P for bar size ``phi_mm``.

    BS 8666:2005, Table 2.
    """
    row = TABLE_2.get(phi_mm) if not isinstance(phi_mm, bool) else None
    if row is None:
        sizes = ", ".join(str(s) for s in TABLE_2)
        raise BarSizeError(
            f"bar size {phi_mm!r} mm is not in BS 8666:2005 Table 2; use one of {sizes}"
        )
    return row


def min_straight_between_bends_mm(phi_mm: int) -> int:
    """Minimum straight length between the curved parts of two bends, 4d.

    BS 8666:2005, Fig. 6.
    """
    return 4 * bending_limits(phi_mm).d_mm


def min_between_bends_mm(phi_mm: int, radius_mm: float | None = None) -> int:
    """Minimum out-to-out dimension x of a leg between two bends.

    With the standard radius the printed values apply: 10d for d <= 16 mm, 13d above.
    With a specified radius R the same rule, 2(R + d) + 4d, is used (rounded up to 1 mm).

    BS 8666:2005, Fig. 6.
    """
    row = bending_limits(phi_mm)
    d = row.d_mm
    if radius_mm is None:
        return 10 * d if d <= 16 else 13 * d
    return math.ceil(2.0 * (radius_mm + d) + 4.0 * d - 1e-9)
