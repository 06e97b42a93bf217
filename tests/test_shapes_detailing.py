"""Detailing helpers: straight bars, L-bars, U-bars at free edges, cranks; fits_section.

Sources: BS 8666:2005 standard shapes table (Table 3, from memory) for the codes and length
formulas; BS 8666:2005, Table 2 for r and P; Figure 6 for the 4d straight between bends.
Out-to-out dimensions are the BS 8666 convention. Inclined-bend deductions for code 99 cranks
are derived geometry (centre-line radius r + d/2), worked by hand below.
"""

from __future__ import annotations

import math

import pytest

from detailer.shapes import (
    ShapeError,
    cranked,
    fits_section,
    l_bar,
    make_shape,
    straight,
    u_bar,
)


def test_straight_cut_and_stock():
    # Code 00 cut to length; code 01 for a 12 m stock length (BS 8666:2005, Note 4).
    assert straight(12, 4200).code == "00"
    assert straight(16, 12000).code == "01"
    assert straight(16, 11998).code == "01"  # rounded up to 12000 first
    assert straight(10, 3001).length_mm == 3005


def test_l_bar_into_an_edge_beam():
    # Code 11, H12, A = 2400 along the slab, (B) = 350 into the beam:
    # 2400 + 350 - 12 - 12 = 2726 -> 2730.
    bar = l_bar(12, 2400, 350)
    assert (bar.code, bar.dims_mm, bar.length_mm) == ("11", (("A", 2400), ("B", 350)), 2730)
    # Legs are rounded up to 5 mm: 2398 -> 2400, 348 -> 350.
    assert l_bar(12, 2398, 348) == bar


def test_l_bar_leg_too_short():
    with pytest.raises(ShapeError, match="B = 100 mm is less than the minimum end projection"):
        l_bar(12, 2400, 100)  # P = 125 for H12 (BS 8666:2005, Table 2)


def test_u_bar_at_a_free_edge():
    # Code 21, H10 in h = 200 with covers 25 / 30: B = 200 - 25 - 30 = 145; legs 400:
    # L = 400 + 145 + 400 - 20 - 20 = 905.
    bar = u_bar(10, 200, 25, 30, 400)
    assert bar.code == "21"
    assert bar.dims_mm == (("A", 400), ("B", 145), ("C", 400))
    assert bar.length_mm == 905
    assert fits_section(bar, 200, 25, 30) == 0


def test_u_bar_height_rounds_down_to_fit():
    # h = 223, covers 25 + 25: 173 available -> B = 170, 3 mm spare.
    bar = u_bar(12, 223, 25, 25, 500, 600)
    assert bar.dim("B") == 170
    assert (bar.dim("A"), bar.dim("C")) == (500, 600)
    assert fits_section(bar, 223, 25, 25) == 3


def test_u_bar_slab_too_thin_for_the_bar():
    # H16 needs B >= 10d = 160 (BS 8666:2005, Fig. 6); h = 200 with 25 + 25 covers gives 150.
    with pytest.raises(ShapeError, match="B = 150 mm is less than the minimum leg between bends"):
        u_bar(16, 200, 25, 25, 500)


def test_fits_section_rejects_a_taller_u_bar():
    # A U made for h = 250 (B = 200) does not fit h = 200 with 25 + 25 covers (150 mm).
    bar = u_bar(12, 250, 25, 25, 400)
    with pytest.raises(ShapeError) as info:
        fits_section(bar, 200, 25, 25)
    assert str(info.value) == (
        "shape code 21 H12: B = 200 mm does not fit in h = 200 mm less covers 25 + 25 mm "
        "(150 mm); make B at most 150 mm, use a smaller bar or a deeper section"
    )


def test_fits_section_l_bar_and_straight():
    assert fits_section(l_bar(12, 1000, 150), 200, 25, 25) == 0
    with pytest.raises(ShapeError, match="does not fit"):
        fits_section(l_bar(12, 1000, 155), 200, 25, 25)
    assert fits_section(straight(12, 3000), 200, 25, 25) == 138  # 150 - d
    with pytest.raises(ShapeError, match="does not know"):
        fits_section(make_shape("51", 10, {"A": 400, "B": 200, "C": 120}), 200, 25, 25)
    with pytest.raises(ShapeError, match="leave no depth"):
        fits_section(straight(12, 3000), 50, 25, 25)


def test_crank_90_is_code_23():
    # Z, H12: A = 1000, B = 150, (C) = 800: 1950 - 24 - 24 = 1902 -> 1905.
    bar = cranked(12, 1000, 150, 800)
    assert (bar.code, bar.dims_mm, bar.length_mm) == (
        "23",
        (("A", 1000), ("B", 150), ("C", 800)),
        1905,
    )


def test_crank_90_with_legs_is_code_41():
    # H12: 200 + 1000 + 150 + 1000 + 200 - 2 x 24 - 4 x 12 = 2454 -> 2455.
    bar = cranked(12, 1000, 150, 1000, first_leg_mm=200, second_leg_mm=200)
    assert bar.code == "41" and bar.length_mm == 2455 and bar.free_dims == ("E",)


def test_crank_45_is_code_26():
    # H12, offset 150 out-to-out: B = (150 - 12) / sin 45 = 195.2 -> 200; L = A + B + C.
    bar = cranked(12, 1000, 150, 1000, angle_deg=45)
    assert bar.code == "26"
    assert bar.dims_mm == (("A", 1000), ("B", 200), ("C", 1000), ("D", 150))
    assert bar.length_mm == 2200


def test_crank_60_is_code_99_with_centre_line_length():
    # H12, rho = 24 + 6 = 30; B = 138 / sin 60 = 159.3 -> 160. Each 60 deg bend deducts
    # 2 x 30 x tan 30 - 30 x pi/3 = 3.225 mm: L = 2160 - 6.450 = 2153.55 -> 2155.
    bar = cranked(12, 1000, 150, 1000, angle_deg=60)
    assert bar.code == "99"
    by_hand = 2160 - 2 * (2 * 30 * math.tan(math.radians(30)) - 30 * math.pi / 3)
    assert bar.length_exact_mm == pytest.approx(by_hand)
    assert bar.length_exact_mm == pytest.approx(2153.55, abs=0.01)
    assert bar.length_mm == 2155
    assert bar.free_dims == ("C",)
    assert "60 deg" in bar.shape.sketch_ref


def test_crank_90_with_one_leg_is_code_99():
    # Three 90 deg bends, each 0.5r + d as in code 11: 200 + 1000 + 150 + 1000 - 3 x 24 = 2278.
    bar = cranked(12, 1000, 150, 1000, first_leg_mm=200)
    assert bar.code == "99" and bar.length_mm == 2280
    assert bar.dims_mm == (("A", 200), ("B", 1000), ("C", 150), ("D", 1000))


def test_crank_rejects_short_parts():
    with pytest.raises(ShapeError, match="end projection"):
        cranked(12, 1000, 150, 1000, angle_deg=60, first_leg_mm=100, second_leg_mm=200)
    with pytest.raises(ShapeError, match="4d straight"):
        cranked(25, 1000, 300, 1000, first_leg_mm=300)  # 13d = 325 between 90 deg bends
    with pytest.raises(ShapeError, match="<= 90"):
        cranked(12, 1000, 150, 1000, angle_deg=120)


@pytest.mark.parametrize(
    "call",
    [
        lambda: l_bar(12, -5, 300),
        lambda: u_bar(12, 200, -5, 25, 400),
        lambda: u_bar(12, 40, 25, 25, 400),
        lambda: straight(12, float("nan")),
        lambda: cranked(12, 1000, 10, 1000, angle_deg=30),
    ],
)
def test_helpers_reject_nonsense(call):
    with pytest.raises(ShapeError):
        call()
