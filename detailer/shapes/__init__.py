"""Bar shapes to BS 8666:2005: catalogue, bendability checks, scheduled lengths, helpers.

``bs8666`` holds the shapes and their checks, ``table2`` the radii and end projections of
BS 8666:2005 Table 2, ``detailing`` the helpers that build shapes from detailing intent.
"""

from __future__ import annotations

from detailer.shapes.bs8666 import (
    BAR_TYPES,
    DEFAULT_RULES,
    DIM_NAMES,
    SHAPES,
    STANDARD,
    LengthRounding,
    ScheduledShape,
    ScheduleRules,
    Shape,
    ShapeDefinition,
    ShapeError,
    formula_length_mm,
    make_shape,
    shape_definition,
    shape_length_mm,
)
from detailer.shapes.detailing import cranked, fits_section, l_bar, straight, u_bar
from detailer.shapes.table2 import (
    TABLE_2,
    BendingLimits,
    bending_limits,
    min_between_bends_mm,
    min_straight_between_bends_mm,
)

__all__ = [
    "BAR_TYPES",
    "DEFAULT_RULES",
    "DIM_NAMES",
    "SHAPES",
    "STANDARD",
    "TABLE_2",
    "BendingLimits",
    "LengthRounding",
    "ScheduleRules",
    "ScheduledShape",
    "Shape",
    "ShapeDefinition",
    "ShapeError",
    "bending_limits",
    "cranked",
    "fits_section",
    "formula_length_mm",
    "l_bar",
    "make_shape",
    "min_between_bends_mm",
    "min_straight_between_bends_mm",
    "shape_definition",
    "shape_length_mm",
    "straight",
    "u_bar",
]
