"""BS 8666:2005 Table 2 (radii, formers, end projections) and Figure 6 (bars with two bends).

Sources:

* BS 8666:2005, Table 2, "Minimum scheduling radii, former diameters and bend allowances", as
  reproduced in scribd doc 48735499 "Steel Reinforcement For Concrete - BS 8666:2005" and at
  civilplanets.com (shared reference notes 1.2). Columns: r, M, P general, P links < 150 deg,
  and the largest radius to which bars are bent.
* BS 8666:2005, Figure 6, as tabulated at valbruna.co.uk (shape code limitations page 4):
  the overall dimension x of a leg between two bends is at least 10d (d <= 16) or 13d (d > 16).
"""

from __future__ import annotations

import math

import pytest

from detailer.shapes import (
    TABLE_2,
    bending_limits,
    min_between_bends_mm,
    min_straight_between_bends_mm,
)
from detailer.shapes.table2 import MAX_CONTINUOUS_MANDREL_MM

# d: (r, M, P general, P links < 150 deg, largest radius bent in mm or None) as printed.
PRINTED = {
    6: (12, 24, 110, 110, 2500),
    8: (16, 32, 115, 115, 2750),
    10: (20, 40, 120, 130, 3500),
    12: (24, 48, 125, 160, 4250),
    16: (32, 64, 130, 210, 7500),
    20: (70, 140, 190, 290, 14000),
    25: (87, 175, 240, 365, 30000),
    32: (112, 224, 305, 465, 43000),
    40: (140, 280, 380, 580, 58000),
    50: (175, 350, 475, 725, None),
}

# BS 8666:2005 Fig. 6 minimum x per size, as tabulated by valbruna.co.uk.
FIG_6_X = {6: 60, 8: 80, 10: 100, 12: 120, 16: 160, 20: 260, 25: 325, 32: 416, 40: 520}


@pytest.mark.parametrize("d", sorted(PRINTED))
def test_table_2_row(d):
    # BS 8666:2005, Table 2.
    r, m, p, p_link, max_r = PRINTED[d]
    row = bending_limits(d)
    assert (row.r_mm, row.former_mm, row.p_mm, row.p_link_mm) == (r, m, p, p_link)
    assert row.max_bend_radius_mm == max_r


def test_table_2_has_every_size_and_only_those():
    assert tuple(TABLE_2) == tuple(PRINTED)


@pytest.mark.parametrize("d", sorted(PRINTED))
def test_table_2_pattern(d):
    # Derived pattern reproducing BS 8666:2005 Table 2 (shared notes 1.2): r = 2d (d <= 16),
    # 3.5d (d >= 20, 87.5 printed as 87 for 25 mm); M = 2r (EC2 Table 8.1N mandrels, 4d / 7d).
    row = bending_limits(d)
    expected_r = 2 * d if d <= 16 else 3.5 * d
    assert row.r_mm == pytest.approx(expected_r, abs=0.5)
    assert row.former_mm == pytest.approx(2 * expected_r, abs=0.5)


@pytest.mark.parametrize("d", [16, 20, 25, 32, 40, 50])
def test_p_general_is_r_plus_6d_rounded_up(d):
    # Derived: P = r + d + 5d rounded up to 5 mm for the sizes whose P is not governed by the
    # practicalities of bending (Table 2 footnote marks 6 to 12 mm). 25 mm: 87.5 + 150 -> 240.
    r = 2 * d if d <= 16 else 3.5 * d
    assert bending_limits(d).p_mm == 5 * math.ceil((r + 6 * d) / 5)


@pytest.mark.parametrize("d", [10, 12, 16, 20, 25, 32, 40, 50])
def test_p_links_is_r_plus_11d_rounded_up(d):
    # Derived: P(links, bend < 150 deg) = r + d + 10d, rounded up to 5 mm.
    r = 2 * d if d <= 16 else 3.5 * d
    assert bending_limits(d).p_link_mm == 5 * math.ceil((r + 11 * d) / 5)


def test_25mm_radius_is_the_printed_87():
    # BS 8666:2005, Table 2 prints 87 for 3.5 x 25 = 87.5.
    assert bending_limits(25).r_mm == 87


@pytest.mark.parametrize(("d", "x"), sorted(FIG_6_X.items()))
def test_figure_6_minimum_between_bends(d, x):
    # BS 8666:2005, Figure 6 (valbruna.co.uk table).
    assert min_between_bends_mm(d) == x


@pytest.mark.parametrize("d", [6, 8, 10, 12, 16, 20, 32, 40])
def test_figure_6_is_two_bends_plus_4d(d):
    # Derived: x = 2(r + d) + 4d with Table 2's r (25 mm differs by the printed 87).
    row = bending_limits(d)
    assert min_between_bends_mm(d) == 2 * (row.r_mm + d) + 4 * d
    assert min_between_bends_mm(d, row.r_mm) == min_between_bends_mm(d)
    assert min_straight_between_bends_mm(d) == 4 * d


def test_figure_6_with_a_specified_radius():
    # 2(R + d) + 4d for H12 with R = 100: 2 x 112 + 48 = 272 (Fig. 6 geometry, derived).
    assert min_between_bends_mm(12, 100) == 272


def test_note_3_largest_mandrel():
    # BS 8666:2005 standard shapes table, Note 3: 400 mm for a continuous curve.
    assert MAX_CONTINUOUS_MANDREL_MM == 400


@pytest.mark.parametrize("bad", [14, 0, 12.5, True])
def test_unknown_size(bad):
    with pytest.raises(ValueError, match="not in BS 8666:2005 Table 2"):
        bending_limits(bad)
