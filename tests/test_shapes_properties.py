"""Property tests of the shape catalogue and the detailing helpers (hypothesis).

Invariants:

* every BS 8666:2005 length formula (standard shapes table, Table 3 from memory) grows with each
  leg dimension A..E, strictly where the dimension is in the formula (legs add length);
* the scheduled length is never shorter than L and less than one rounding step above it;
* whatever a helper returns validates again through ``make_shape`` unchanged, and a U-bar fits
  the section it was made for; any refusal is a ``ShapeError``, never another exception.
"""

from __future__ import annotations

import math

from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.bars import UK_BAR_SIZES_MM
from detailer.shapes import (
    SHAPES,
    ScheduledShape,
    ScheduleRules,
    ShapeError,
    bending_limits,
    cranked,
    fits_section,
    formula_length_mm,
    l_bar,
    make_shape,
    straight,
    u_bar,
)

SETTINGS = settings(max_examples=60, deadline=None)
CODES_WITH_FORMULA = sorted(c for c, s in SHAPES.items() if s.has_formula)
SIZES = st.sampled_from(UK_BAR_SIZES_MM)
MM = st.integers(min_value=20, max_value=1200).map(lambda n: 5 * n)  # 100 .. 6000 mm


def _revalidate(shape: ScheduledShape) -> None:
    again = make_shape(
        shape.code,
        shape.phi_mm,
        shape.dims_mm,
        shape.bar_type,
        free_dim=shape.free_dims[0] if shape.code == "99" and shape.free_dims else None,
        sketch_ref=shape.shape.sketch_ref,
        length_mm=shape.length_exact_mm if shape.code == "99" else None,
    )
    assert again == shape
    assert shape.length_exact_mm <= shape.length_mm < shape.length_exact_mm + 5 + 1e-6


@SETTINGS
@given(
    code=st.sampled_from(CODES_WITH_FORMULA),
    d=SIZES,
    values=st.lists(MM, min_size=6, max_size=6),
    bump=st.integers(min_value=1, max_value=100).map(lambda n: 5 * n),
    which=st.integers(min_value=0, max_value=5),
)
def test_formulas_monotone_in_every_leg(code, d, values, bump, which):
    defn = SHAPES[code]
    names = [n for n in (*defn.dims, *defn.optional_dims) if n != "R"]
    dims = dict(zip(names, values, strict=False))
    if "R" in defn.dims:
        dims["R"] = 100
    name = names[which % len(names)]
    base = formula_length_mm(code, d, dims)
    longer = formula_length_mm(code, d, {**dims, name: dims[name] + bump})
    in_formula = name in {key for key, _ in defn.coefficients}
    if in_formula:
        assert longer > base
    else:  # a dimension only shown on the sketch (e.g. the offset D of code 26)
        assert longer == base


@SETTINGS
@given(d=SIZES, horizontal=MM, leg=st.integers(min_value=1, max_value=1500))
def test_l_bar_validates(d, horizontal, leg):
    try:
        shape = l_bar(d, horizontal, leg)
    except ShapeError:
        return
    _revalidate(shape)
    assert shape.code == "11"


@SETTINGS
@given(
    d=SIZES,
    h=st.integers(min_value=100, max_value=600),
    cover_top=st.integers(min_value=15, max_value=60),
    cover_bottom=st.integers(min_value=15, max_value=60),
    leg=st.integers(min_value=50, max_value=1500),
)
def test_u_bar_validates_and_fits(d, h, cover_top, cover_bottom, leg):
    try:
        shape = u_bar(d, h, cover_top, cover_bottom, leg)
    except ShapeError:
        return
    _revalidate(shape)
    spare = fits_section(shape, h, cover_top, cover_bottom)
    assert 0 <= spare < 5  # rounded down to the 5 mm step, never over
    # A slab 5 mm thinner than the U's outside height less covers must be refused.
    thinner = shape.dim("B") + cover_top + cover_bottom - 5
    try:
        fits_section(shape, thinner, cover_top, cover_bottom)
    except ShapeError:
        pass
    else:
        raise AssertionError("fits_section accepted a U-bar taller than h - covers")


@SETTINGS
@given(d=SIZES, length=st.floats(min_value=100, max_value=12000, allow_nan=False))
def test_straight_validates(d, length):
    shape = straight(d, length)
    _revalidate(shape)
    assert shape.length_mm == shape.dim("A") >= length - 1e-6  # float noise is not a mm


@SETTINGS
@given(
    d=SIZES,
    run1=MM,
    run2=MM,
    offset=st.integers(min_value=10, max_value=100).map(lambda n: 5 * n),
    angle=st.sampled_from([20.0, 30.0, 45.0, 60.0, 75.0, 90.0]),
    legs=st.sampled_from([(None, None), (300, None), (None, 400), (300, 400)]),
)
def test_cranked_validates(d, run1, run2, offset, angle, legs):
    try:
        shape = cranked(
            d, run1, offset, run2, angle_deg=angle, first_leg_mm=legs[0], second_leg_mm=legs[1]
        )
    except ShapeError:
        return
    _revalidate(shape)
    expected = {
        (True, (None, None)): "23",
        (True, (300, 400)): "41",
    }.get((angle == 90.0, legs), "26" if angle <= 45.0 and legs == (None, None) else "99")
    assert shape.code == expected


def _generous_dims(code: str, d: int, legs: list[int]) -> dict[str, int]:
    """Dimensions clear of every printed minimum of the code (legs 1000 mm and longer)."""
    defn = SHAPES[code]
    names = [n for n in defn.dims if n != "R"]
    dims = dict(zip(names, legs, strict=False))
    r = bending_limits(d).r_mm
    for name in defn.semicircle_dims:  # 2(r + d) <= width <= 400 + 2d (Note 3)
        dims[name] = 5 * math.ceil(2 * (r + d) / 5)
    if code == "12":  # r <= R <= 200 (mandrel 2R <= 400, Note 3)
        dims["R"] = 200
    if code == "26":  # offset 200 with the incline over twice as long: under 30 deg
        dims["B"], dims["D"] = 400 + 10 * d, 200
    if code == "51":
        dims["C"] = min(dims["A"], dims["B"])
    return dims


@SETTINGS
@given(
    code=st.sampled_from([c for c in CODES_WITH_FORMULA if c != "01"]),
    d=SIZES,
    legs=st.lists(st.integers(min_value=200, max_value=400).map(lambda n: 5 * n), min_size=5),
)
def test_generous_shapes_always_validate(code, d, legs):
    # Every leg far above P, x (Fig. 6) and the code's own minimums: never refused.
    shape = make_shape(code, d, _generous_dims(code, d, legs), rules=_NO_LIMIT)
    assert shape.length_exact_mm <= shape.length_mm < shape.length_exact_mm + 5 + 1e-6


_NO_LIMIT = ScheduleRules(max_length_mm=None)
