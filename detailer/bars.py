"""Reinforcing bar data: nominal sizes, cross-sectional area and mass per metre (BS 4449).

Nominal area is pi d^2 / 4 of the nominal size d; nominal mass per metre is that area times the
density of steel, 7850 kg/m3 (the basis of BS 4449's nominal mass table). Values are exact
(unrounded): printed tables round to 0.1 mm2 and 0.001 kg/m (BS 4449:1997) or to three
significant figures (BS 4449:2005), so compare against them with a tolerance.
"""

from __future__ import annotations

__all__ = [
    "MM2_PER_M2",
    "STEEL_DENSITY_KG_PER_M3",
    "UK_BAR_SIZES_MM",
    "BarSize",
    "BarSizeError",
    "bar_area_mm2",
    "bar_size",
    "is_standard_size",
    "mass_kg_per_m",
]

import math
from dataclasses import dataclass
from typing import Final

from detailer.errors import InputError

#: Density of reinforcing steel used for nominal mass, kg/m3 (BS 4449).
STEEL_DENSITY_KG_PER_M3: Final[float] = 7850.0

#: Unit conversion: square millimetres in one square metre.
MM2_PER_M2: Final[float] = 1.0e6

#: Preferred nominal bar sizes d in mm (BS 4449; BS 8666:2005, Table 2 lists the same sizes).
UK_BAR_SIZES_MM: Final[tuple[int, ...]] = (6, 8, 10, 12, 16, 20, 25, 32, 40, 50)


class BarSizeError(InputError, ValueError):
    """A bar size that is not a positive number, or not a standard UK size where one is needed."""


def _check_positive(phi_mm: float) -> float:
    if isinstance(phi_mm, bool) or not isinstance(phi_mm, (int, float)):
        raise BarSizeError(f"bar size must be a number in mm (got {phi_mm!r})")
    if not math.isfinite(phi_mm) or phi_mm <= 0:
        raise BarSizeError(f"bar size must be > 0 mm (got {phi_mm!r}); give the nominal size in mm")
    return float(phi_mm)


def bar_area_mm2(phi_mm: float) -> float:
    """Nominal cross-sectional area of one bar, pi phi^2 / 4, in mm2.

    BS 4449:1997, Table 1.
    """
    phi = _check_positive(phi_mm)
    return math.pi * phi * phi / 4.0


def mass_kg_per_m(phi_mm: float) -> float:
    """Nominal mass per metre of one bar, kg/m: area (mm2 -> m2) times 7850 kg/m3.

    BS 4449:1997, Table 1.
    """
    area_m2 = bar_area_mm2(phi_mm) / MM2_PER_M2
    return area_m2 * STEEL_DENSITY_KG_PER_M3  # m2 x kg/m3 = kg per metre of bar


def is_standard_size(phi_mm: float) -> bool:
    """True when ``phi_mm`` is one of the preferred UK sizes (``UK_BAR_SIZES_MM``)."""
    return not isinstance(phi_mm, bool) and phi_mm in UK_BAR_SIZES_MM


@dataclass(frozen=True, slots=True)
class BarSize:
    """A standard UK bar size (nominal diameter d in mm) with its nominal area and mass."""

    diameter_mm: int

    def __post_init__(self) -> None:
        if not is_standard_size(self.diameter_mm):
            sizes = ", ".join(str(s) for s in UK_BAR_SIZES_MM)
            raise BarSizeError(
                f"bar size {self.diameter_mm!r} mm is not a standard UK size; use one of {sizes}"
            )

    @property
    def area_mm2(self) -> float:
        """Nominal area, mm2."""
        return bar_area_mm2(self.diameter_mm)

    @property
    def mass_kg_per_m(self) -> float:
        """Nominal mass, kg/m."""
        return mass_kg_per_m(self.diameter_mm)


def bar_size(phi_mm: int) -> BarSize:
    """The standard bar size ``phi_mm``; raises ``BarSizeError`` for any other value."""
    return BarSize(phi_mm)
