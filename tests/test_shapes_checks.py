"""Bendability checks: each rule raises ShapeError with one readable line.

Sources: BS 8666:2005, Table 2 (r, P, largest radius bent); Figure 6 (4d straight between
bends: x >= 10d / 13d, valbruna.co.uk); the rules printed beside each code in the standard
shapes table (Table 3, from memory), e.g. code 13 "B >= 2(r + d); A, C >= B/2 + 5d".
Multiples of 5 mm for dimensions: schedule form footnote (from memory).
"""

from __future__ import annotations

import pytest

from detailer.errors import InputError
from detailer.shapes import ScheduleRules, ShapeError, make_shape


def _error(code, d, dims, **kw) -> ShapeError:
    with pytest.raises(ShapeError) as info:
        make_shape(code, d, dims, **kw)
    text = str(info.value)
    assert "\n" not in text
    assert ";" in text  # message; fix
    return info.value


def test_end_projection_below_p():
    # H12: P = 125 (BS 8666:2005, Table 2).
    err = _error("11", 12, {"A": 100, "B": 300})
    assert str(err) == (
        "shape code 11 H12: A = 100 mm is less than the minimum end projection P "
        "(BS 8666:2005, Table 2), 125 mm; make A at least 125 mm or use a smaller bar"
    )
    assert (err.code, err.phi_mm, err.dim, err.minimum_mm) == ("11", 12, "A", 125)
    assert isinstance(err, InputError)


def test_end_projection_at_p_is_accepted():
    # H25: P = 240 exactly (BS 8666:2005, Table 2).
    assert make_shape("11", 25, {"A": 240, "B": 240}).length_mm > 0


def test_free_leg_below_p_too():
    # "Neither A nor (B) shall be less than P": H20 P = 190.
    err = _error("11", 20, {"A": 500, "B": 185})
    assert err.dim == "B" and "190 mm" in str(err)


def test_leg_between_bends_below_figure_6():
    # H12 U-bar: B >= 10d = 120 (BS 8666:2005, Fig. 6).
    err = _error("21", 12, {"A": 300, "B": 115, "C": 300})
    assert err.dim == "B" and "120 mm" in str(err) and "Fig. 6" in str(err)
    assert make_shape("21", 12, {"A": 300, "B": 120, "C": 300}).length_mm > 0
    # H25: 13d = 325.
    assert _error("41", 25, {"A": 300, "B": 400, "C": 320, "D": 400, "E": 300}).dim == "C"


def test_code_13_rules():
    # B >= 2(r + d) = 72 for H12; A, C >= B/2 + 5d; B <= 400 + 2d (Note 3).
    assert _error("13", 12, {"A": 400, "B": 70, "C": 400}).dim == "B"
    err = _error("13", 12, {"A": 150, "B": 200, "C": 400})
    assert err.dim == "A" and "B/2 + 5d" in str(err) and "160 mm" in str(err)
    err = _error("13", 12, {"A": 500, "B": 430, "C": 500})
    assert err.dim == "B" and "Note 3" in str(err) and "99" in str(err)


def test_code_12_radius_rules():
    # R >= r (H16: 32); A, B >= R + 6d; mandrel 2R <= 400 (Note 3).
    assert _error("12", 16, {"A": 500, "B": 500, "R": 30}).dim == "R"
    err = _error("12", 16, {"A": 240, "B": 500, "R": 150})  # R + 6d = 246
    assert err.dim == "A" and "R + 6d" in str(err) and "250 mm" in str(err)
    assert _error("12", 16, {"A": 800, "B": 800, "R": 205}).dim == "R"
    assert "missing R" in str(_error("12", 16, {"A": 800, "B": 800}))  # R is required


def test_code_22_rules():
    # (D) >= C/2 + 5d: H10, C = 150 -> 125; C >= 2(r + d) = 60.
    assert _error("22", 10, {"A": 300, "B": 400, "C": 150, "D": 120}).dim == "D"
    assert _error("22", 10, {"A": 300, "B": 400, "C": 55, "D": 250}).dim == "C"


def test_code_33_rules():
    # A >= 12d + 30 = 150 for H10; (C) >= B/2 + 5d = 125 for B = 150.
    assert _error("33", 10, {"A": 145, "B": 150, "C": 200}).dim == "A"
    err = _error("33", 10, {"A": 400, "B": 150, "C": 120})
    assert err.dim == "C" and "125 mm" in str(err)


def test_code_26_crank_rules():
    # Offset below the incline; angle <= 45 deg (Note 1).
    assert _error("26", 12, {"A": 500, "B": 150, "C": 500, "D": 150}).dim == "D"
    err = _error("26", 12, {"A": 500, "B": 160, "C": 500, "D": 150})  # asin(138/160) = 59.6 deg
    assert "45 deg" in str(err) and "99" in str(err)


def test_code_51_rules():
    # (C) and (D) equal and not longer than the sides (BS 8666:2005 shape 51).
    assert _error("51", 10, {"A": 400, "B": 200, "C": 120, "D": 130}).dim == "D"
    assert _error("51", 10, {"A": 400, "B": 200, "C": 205}).dim == "C"
    assert _error("51", 10, {"A": 400, "B": 200, "C": 115}).dim == "C"  # P = 120


def test_specified_radius_rules():
    # R < r (H12: 24); R above the largest radius bent (H12: 4.25 m, Table 2).
    assert _error("11", 12, {"A": 500, "B": 500, "R": 20}).dim == "R"
    err = _error("11", 12, {"A": 5000, "B": 5000, "R": 4300})
    assert err.dim == "R" and "supplied straight" in str(err)


@pytest.mark.parametrize(
    ("dims", "fragment"),
    [
        ({"A": 1003, "B": 300}, "not a multiple of 5 mm"),
        ({"A": 1000.5, "B": 300}, "not whole mm"),
        ({"A": -1000, "B": 300}, "must be a length > 0 mm"),
        ({"A": True, "B": 300}, "must be a length > 0 mm"),
        ({"A": float("nan"), "B": 300}, "must be a length > 0 mm"),
        ({"A": 1000}, "missing B"),
        ({"A": 1000, "B": 300, "C": 300}, "unexpected C"),
        ({"A": 1000, "B": 300, "F": 300}, "unknown dimension 'F'"),
    ],
)
def test_bad_dimensions(dims, fragment):
    assert fragment in str(_error("11", 12, dims))


def test_dims_as_pairs_and_integral_floats():
    shape = make_shape("11", 12, [("B", 300.0), ("A", 1000)])
    assert shape.dims_mm == (("A", 1000), ("B", 300))
    assert isinstance(shape.dim("B"), int)


def test_unknown_code_bar_type_and_size():
    assert "not in the BS 8666:2005 catalogue" in str(_error("52", 12, {"A": 100}))
    assert "steel notation" in str(_error("11", 12, {"A": 500, "B": 500}, bar_type="T"))
    assert "Table 2" in str(_error("11", 14, {"A": 500, "B": 500}))


def test_moving_the_free_dimension_needs_code_99():
    # BS 8666:2005 general notes: another free dimension -> schedule as 99.
    err = _error("11", 12, {"A": 500, "B": 500}, free_dim="A")
    assert "99" in str(err)
    assert make_shape("11", 12, {"A": 500, "B": 500}, free_dim="B").free_dims == ("B",)


def test_code_01_only_for_stock_lengths():
    # BS 8666:2005 code 01 (stock lengths, Note 4: e.g. 6 m, 12 m).
    assert "stock length" in str(_error("01", 12, {"A": 7000}))
    assert make_shape("01", 12, {"A": 6000}).length_mm == 6000


def test_longest_bar():
    # 12 m stock length (fendersteel.co.uk: 12 m notional lengths) as the default limit.
    assert "lap" in str(_error("00", 16, {"A": 12500}))
    rules = ScheduleRules(max_length_mm=None)
    assert make_shape("00", 16, {"A": 12500}, rules=rules).length_mm == 12500


def test_code_99_needs_sketch_and_length():
    assert "sketch" in str(_error("99", 12, {"A": 500}, length_mm=500.0))
    assert "length" in str(_error("99", 12, {"A": 500}, sketch_ref="SK-1"))
    assert "free dimension" in str(
        _error("99", 12, {"A": 500}, sketch_ref="SK-1", length_mm=500.0, free_dim="B")
    )
    assert "only for code 99" in str(_error("11", 12, {"A": 500, "B": 500}, length_mm=990.0))
