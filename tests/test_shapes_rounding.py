"""Rounding of dimensions and scheduled lengths.

Sources: dimensions in multiples of 5 mm (BS 8666 schedule form footnote, from memory). The
rounding of the total length is common practice, not found in BS 8666: the project default is
up to the next 5 mm; 10 mm and 25 mm steps are options.
"""

from __future__ import annotations

import pytest

from detailer.shapes import (
    DEFAULT_RULES,
    LengthRounding,
    ScheduleRules,
    ShapeError,
    make_shape,
    straight,
)


@pytest.mark.parametrize(
    ("step", "mode", "length", "expected"),
    [
        (5, "up", 1276.0, 1280),
        (5, "up", 1275.0, 1275),
        (5, "up", 1275.0 + 1e-9, 1275),  # float noise is not a millimetre
        (5, "up", 1275.01, 1280),
        (10, "up", 1271.0, 1280),
        (25, "up", 1276.0, 1300),
        (25, "up", 1300.0, 1300),
        (5, "nearest", 1276.0, 1275),
        (5, "nearest", 1277.5, 1280),  # halves up
        (25, "nearest", 1287.4, 1275),
        (25, "nearest", 1287.5, 1300),
    ],
)
def test_length_rounding(step, mode, length, expected):
    assert LengthRounding(step, mode).apply(length) == expected


def test_default_is_up_to_5mm():
    assert DEFAULT_RULES.length_rounding == LengthRounding(5, "up")
    assert DEFAULT_RULES.dimension_step_mm == 5


def test_rules_change_the_scheduled_length():
    # Code 11, H12, A = 1000, B = 300: L = 1276 (BS 8666:2005 shapes table).
    dims = {"A": 1000, "B": 300}
    assert make_shape("11", 12, dims).length_mm == 1280
    rules_25 = ScheduleRules(length_rounding=LengthRounding(25))
    assert make_shape("11", 12, dims, rules=rules_25).length_mm == 1300
    nearest = ScheduleRules(length_rounding=LengthRounding(5, "nearest"))
    assert make_shape("11", 12, dims, rules=nearest).length_mm == 1275


def test_straight_bar_length_follows_the_rule():
    assert straight(12, 1283).dim("A") == 1285
    rules_25 = ScheduleRules(length_rounding=LengthRounding(25))
    bar = straight(12, 1283, rules=rules_25)
    assert (bar.code, bar.dim("A"), bar.length_mm) == ("00", 1300, 1300)
    # A straight bar scheduled by hand must already be on the length step (L = A).
    with pytest.raises(ShapeError, match="schedule A as 1300 mm"):
        make_shape("00", 12, {"A": 1280}, rules=rules_25)


@pytest.mark.parametrize(
    "kwargs",
    [
        {"length_rounding": LengthRounding(12)},  # not a multiple of the 5 mm dimension step
        {"dimension_step_mm": 0},
        {"stock_lengths_mm": (6001,)},
        {"max_length_mm": 0},
    ],
)
def test_bad_rules(kwargs):
    with pytest.raises(ValueError):
        ScheduleRules(**kwargs)


@pytest.mark.parametrize("bad", [{"step_mm": 0}, {"step_mm": 2.5}, {"mode": "down"}])
def test_bad_rounding(bad):
    with pytest.raises(ValueError):
        LengthRounding(**bad)
