"""Bar areas and masses against BS 4449's nominal tables.

Sources:

* BS 4449:1997, Table 1 (nominal cross-sectional area and mass per metre), as reproduced by
  ff.com.pk and identical at midlandsteelsupplies.ie and midlandrapid.co.uk (shared reference
  notes 2.1). Areas are printed to 0.1 mm2, masses to 0.001 kg/m.
* BS 4449:2005 prints the masses to three significant figures (0.617 for 10 mm, 1.58 for
  16 mm ...): values from memory.

Why two tolerances: the 1997 masses are 0.00785 kg/(m mm2) times the area already rounded to
0.1 mm2 (e.g. 78.5 x 0.00785 = 0.6162 -> 0.616), while the exact 7850 kg/m3 mass of a 10 mm bar
is 0.6165 kg/m, printed 0.617 in 2005. An absolute tolerance of 0.001 kg/m (one unit in the
1997 table's last place) admits both editions' 10 mm value; the 2005 three-figure values are
checked to half a unit in their last figure.
"""

from __future__ import annotations

import math

import pytest

from detailer.bars import (
    STEEL_DENSITY_KG_PER_M3,
    UK_BAR_SIZES_MM,
    BarSize,
    BarSizeError,
    bar_area_mm2,
    bar_size,
    is_standard_size,
    mass_kg_per_m,
)

# BS 4449:1997, Table 1: d (mm) -> (area mm2, mass kg/m).
TABLE_1_1997 = {
    6: (28.3, 0.222),
    8: (50.3, 0.395),
    10: (78.5, 0.616),
    12: (113.1, 0.888),
    16: (201.1, 1.579),
    20: (314.2, 2.466),
    25: (490.9, 3.854),
    32: (804.2, 6.313),
    40: (1256.6, 9.864),
    50: (1963.5, 15.413),
}

# BS 4449:2005 nominal masses, three significant figures (from memory).
MASS_2005_FROM_MEMORY = {10: 0.617, 16: 1.58, 20: 2.47, 25: 3.85, 32: 6.31, 40: 9.86, 50: 15.4}


def test_standard_sizes_are_the_uk_preferred_sizes():
    # BS 4449:1997 Table 1 lists exactly these sizes (also BS 8666:2005 Table 2).
    assert UK_BAR_SIZES_MM == tuple(TABLE_1_1997)


@pytest.mark.parametrize(("d", "area"), [(d, v[0]) for d, v in TABLE_1_1997.items()])
def test_table_1_area(d, area):
    # BS 4449:1997, Table 1: printed to 0.1 mm2.
    assert bar_area_mm2(d) == pytest.approx(area, abs=0.05)


@pytest.mark.parametrize(("d", "mass"), [(d, v[1]) for d, v in TABLE_1_1997.items()])
def test_table_1_mass(d, mass):
    # BS 4449:1997, Table 1, within 0.001 kg/m (see module docstring).
    assert mass_kg_per_m(d) == pytest.approx(mass, abs=0.001)


@pytest.mark.parametrize(("d", "mass"), sorted(MASS_2005_FROM_MEMORY.items()))
def test_2005_three_figure_mass(d, mass):
    # BS 4449:2005 nominal mass (from memory): half a unit in the last printed figure.
    half_unit = 0.5 * 10 ** (math.floor(math.log10(mass)) - 2)
    assert mass_kg_per_m(d) == pytest.approx(mass, abs=half_unit + 1e-12)


def test_10mm_mass_admits_both_editions():
    # 0.616 (BS 4449:1997, Table 1) and 0.617 (BS 4449:2005, from memory).
    assert mass_kg_per_m(10) == pytest.approx(0.616, abs=0.001)
    assert mass_kg_per_m(10) == pytest.approx(0.617, abs=0.001)
    assert mass_kg_per_m(10) == pytest.approx(0.6165, abs=0.00005)


@pytest.mark.parametrize("d", UK_BAR_SIZES_MM)
def test_1997_masses_come_from_the_rounded_area(d):
    # Derived explanation of BS 4449:1997, Table 1: mass = round(area to 0.1 mm2) x 0.00785.
    area_printed, mass_printed = TABLE_1_1997[d]
    assert round(bar_area_mm2(d), 1) == pytest.approx(area_printed)
    rounded_area_mass = round(area_printed * STEEL_DENSITY_KG_PER_M3 / 1e6, 3)
    assert rounded_area_mass == pytest.approx(mass_printed, abs=1e-9)


def test_mass_is_area_times_density():
    # 7850 kg/m3 x pi 0.012^2 / 4 m2 = 0.8878 kg/m (BS 4449 density basis).
    assert mass_kg_per_m(12) == pytest.approx(7850.0 * math.pi * 0.012**2 / 4.0, rel=1e-12)
    # Shortcut d^2/162.2 agrees to 4 significant figures (shared reference notes 2.1).
    assert mass_kg_per_m(25) == pytest.approx(25.0**2 / 162.2, rel=2e-4)


def test_bar_size_dataclass():
    h16 = bar_size(16)
    assert h16 == BarSize(16)
    assert h16.area_mm2 == pytest.approx(201.1, abs=0.05)  # BS 4449:1997, Table 1
    assert h16.mass_kg_per_m == pytest.approx(1.579, abs=0.001)  # BS 4449:1997, Table 1
    with pytest.raises(AttributeError):
        h16.diameter_mm = 20  # type: ignore[misc]


@pytest.mark.parametrize("bad", [14, 28, 0, -12, 12.5, True])
def test_non_standard_sizes_rejected(bad):
    # 14 and 28 are BS 4449:2005 non-preferred sizes (from memory); not in Table 1.
    assert not is_standard_size(bad)
    with pytest.raises(BarSizeError, match="not a standard UK size"):
        BarSize(bad)


@pytest.mark.parametrize("bad", [0, -1.0, float("nan"), float("inf"), True, "12"])
def test_area_rejects_nonsense(bad):
    with pytest.raises(BarSizeError):
        bar_area_mm2(bad)


def test_area_of_a_non_preferred_size_is_still_computed():
    # pi 14^2 / 4 = 153.94 mm2 (closed form).
    assert bar_area_mm2(14) == pytest.approx(153.938, abs=1e-3)
