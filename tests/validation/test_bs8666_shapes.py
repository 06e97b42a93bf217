"""Shape code lengths, hand-worked, against the BS 8666:2005 standard shapes table.

Source for every formula: BS 8666:2005 standard shapes table (Table 3, from memory), as
reproduced by several fabricators (obconstruction.co.uk, valbruna.co.uk, fendersteel.co.uk,
scribd doc 2547631 "BS 8666:2005 Standard Shapes"; shared reference notes 1.1). Source for r
and P: BS 8666:2005, Table 2. Each case works the formula by hand in its comment; the
scheduled length is rounded up to the next 5 mm (the project default, common practice).
"""

from __future__ import annotations

import pytest

from detailer.shapes import SHAPES, formula_length_mm, make_shape, shape_length_mm

# (code, d, dims, L by hand, scheduled length). H12: r = 24; H10: r = 20; H16: r = 32;
# H25: r = 87; H8: r = 16 (BS 8666:2005, Table 2).
CASES = [
    # 00: L = A.
    ("00", 12, {"A": 3250}, 3250.0, 3250),
    # 01: L = A, a stock length.
    ("01", 16, {"A": 12000}, 12000.0, 12000),
    # 11: A + (B) - 0.5r - d = 1000 + 300 - 0.5 x 24 - 12 = 1276.
    ("11", 12, {"A": 1000, "B": 300}, 1276.0, 1280),
    # 11, H25: 1500 + 400 - 0.5 x 87 - 25 = 1831.5.
    ("11", 25, {"A": 1500, "B": 400}, 1831.5, 1835),
    # 12: A + (B) - 0.43R - 1.2d = 800 + 500 - 0.43 x 150 - 1.2 x 16 = 1216.3.
    ("12", 16, {"A": 800, "B": 500, "R": 150}, 1216.3, 1220),
    # 13: A + 0.57B + (C) - 1.6d = 600 + 0.57 x 200 + 600 - 1.6 x 12 = 1294.8.
    ("13", 12, {"A": 600, "B": 200, "C": 600}, 1294.8, 1295),
    # 14: A + (C) - 4d = 500 + 600 - 40 = 1060.
    ("14", 10, {"A": 500, "B": 300, "C": 600}, 1060.0, 1060),
    # 15: A + (C) = 500 + 600 = 1100.
    ("15", 10, {"A": 500, "B": 300, "C": 600}, 1100.0, 1100),
    # 21: A + B + (C) - r - 2d = 400 + 150 + 400 - 24 - 24 = 902.
    ("21", 12, {"A": 400, "B": 150, "C": 400}, 902.0, 905),
    # 22: A + B + C + (D) - 1.5r - 3d = 300 + 400 + 150 + 250 - 30 - 30 = 1040.
    ("22", 10, {"A": 300, "B": 400, "C": 150, "D": 250}, 1040.0, 1040),
    # 23: A + B + (C) - r - 2d = 1200 + 300 + 800 - 32 - 32 = 2236.
    ("23", 16, {"A": 1200, "B": 300, "C": 800}, 2236.0, 2240),
    # 25: A + B + (E) = 400 + 500 + 700 = 1600.
    ("25", 12, {"A": 400, "B": 500, "E": 700}, 1600.0, 1600),
    # 26: A + B + (C) = 1000 + 200 + 1000 = 2200 (D = 150 is the offset, not in L).
    ("26", 12, {"A": 1000, "B": 200, "C": 1000, "D": 150}, 2200.0, 2200),
    # 31: A + B + C + (D) - 1.5r - 3d = 300 + 400 + 400 + 300 - 30 - 30 = 1340.
    ("31", 10, {"A": 300, "B": 400, "C": 400, "D": 300}, 1340.0, 1340),
    # 32: the same formula as 31.
    ("32", 10, {"A": 300, "B": 400, "C": 400, "D": 300}, 1340.0, 1340),
    # 33: 2A + 1.7B + 2(C) - 4d = 800 + 255 + 400 - 40 = 1415.
    ("33", 10, {"A": 400, "B": 150, "C": 200}, 1415.0, 1415),
    # 41: A + B + C + D + (E) - 2r - 4d = 200 + 1000 + 150 + 1000 + 200 - 48 - 48 = 2454.
    ("41", 12, {"A": 200, "B": 1000, "C": 150, "D": 1000, "E": 200}, 2454.0, 2455),
    # 51: 2(A + B + (C)) - 2.5r - 5d = 2 x (400 + 200 + 120) - 50 - 50 = 1340.
    ("51", 10, {"A": 400, "B": 200, "C": 120, "D": 120}, 1340.0, 1340),
    # 51, H8: 2 x (300 + 150 + 115) - 40 - 40 = 1050.
    ("51", 8, {"A": 300, "B": 150, "C": 115}, 1050.0, 1050),
]


@pytest.mark.parametrize(("code", "d", "dims", "by_hand", "scheduled"), CASES)
def test_hand_worked_length(code, d, dims, by_hand, scheduled):
    assert formula_length_mm(code, d, dims) == pytest.approx(by_hand, abs=1e-9)
    shape = make_shape(code, d, dims)
    assert shape.length_exact_mm == pytest.approx(by_hand, abs=1e-9)
    assert shape.length_mm == scheduled
    assert shape_length_mm(code, d, **dims) == scheduled


def test_every_required_code_has_a_hand_worked_case():
    required = {"00", "01", "11", "12", "13", "14", "15", "21", "22", "23", "25", "26", "31"}
    required |= {"32", "33", "41", "51"}
    assert required <= {case[0] for case in CASES}
    assert required | {"99"} == set(SHAPES)


def test_non_standard_radius_replaces_r():
    # BS 8666:2005 notation: R, a specified radius, in place of r. Code 21, H12, R = 50:
    # 400 + 300 + 400 - 50 - 2 x 12 = 1026.
    shape = make_shape("21", 12, {"A": 400, "B": 300, "C": 400, "R": 50})
    assert shape.length_exact_mm == pytest.approx(1026.0)
    # Code 11, H12, R = 60: 1000 + 300 - 30 - 12 = 1258.
    assert make_shape("11", 12, {"A": 1000, "B": 300, "R": 60}).length_mm == 1260


def test_code_51_schedules_d_equal_to_c():
    # BS 8666:2005 shape 51: "(C) and (D) shall be equal".
    shape = make_shape("51", 8, {"A": 300, "B": 150, "C": 115})
    assert shape.dims_mm == (("A", 300), ("B", 150), ("C", 115), ("D", 115))


def test_code_99_takes_the_sketch_length():
    # BS 8666:2005 code 99: length from the dimensioned sketch; 1234.4 rounds up to 1235.
    shape = make_shape(
        "99", 12, {"A": 500, "B": 300, "C": 450}, free_dim="C", sketch_ref="SK-01", length_mm=1234.4
    )
    assert shape.length_mm == 1235
    assert shape.free_dims == ("C",)
    assert shape.shape.sketch_ref == "SK-01"


# Free dimensions as printed in parentheses in the BS 8666:2005 standard shapes table.
FREE = {
    "00": (), "01": (), "11": ("B",), "12": ("B",), "13": ("C",), "14": ("C",), "15": ("C",),
    "21": ("C",), "22": ("D",), "23": ("C",), "25": ("E",), "26": ("C",), "31": ("D",),
    "32": ("D",), "33": ("C",), "41": ("E",), "51": ("C", "D"),
}  # fmt: skip


@pytest.mark.parametrize(("code", "free"), sorted(FREE.items()))
def test_free_dimension(code, free):
    assert SHAPES[code].free_dims == free


# Formulas as printed (ASCII minus), BS 8666:2005 standard shapes table.
PRINTED_FORMULA = {
    "11": "A + (B) - 0.5r - d", "12": "A + (B) - 0.43R - 1.2d", "13": "A + 0.57B + (C) - 1.6d",
    "14": "A + (C) - 4d", "15": "A + (C)", "21": "A + B + (C) - r - 2d",
    "22": "A + B + C + (D) - 1.5r - 3d", "23": "A + B + (C) - r - 2d", "25": "A + B + (E)",
    "26": "A + B + (C)", "31": "A + B + C + (D) - 1.5r - 3d", "32": "A + B + C + (D) - 1.5r - 3d",
    "33": "2A + 1.7B + 2(C) - 4d", "41": "A + B + C + D + (E) - 2r - 4d",
    "51": "2(A + B + (C)) - 2.5r - 5d",
}  # fmt: skip


@pytest.mark.parametrize(("code", "formula"), sorted(PRINTED_FORMULA.items()))
def test_printed_formula_text(code, formula):
    assert SHAPES[code].formula == formula


def test_note_1_approximate_formulas_flagged():
    # BS 8666:2005 standard shapes, Note 1 lists 14, 15, 25, 26, ... as approximate.
    flagged = {code for code, s in SHAPES.items() if s.approximate}
    assert {"14", "15", "25", "26"} <= flagged
    assert not flagged & {"11", "21", "23", "41", "51"}
