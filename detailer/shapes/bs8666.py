"""BS 8666:2005 bar shapes: checked, dimensioned shapes with their scheduled lengths.

This package follows **BS 8666:2005**: its standard shapes table (believed to be Table 3 of
that edition) for the shape codes and length formulas, Table 2 for radii and end projections,
Figure 6 for the straight between bends. BS 8666:2020 renumbered the tables (its shapes table is
Table 5) and added codes such as 52, which are not catalogued here.

Conventions:

* Dimensions A, B, C, D, E are straight leg lengths measured out-to-out (to the outside faces
  of the bar), in whole mm, in multiples of 5 mm (the schedule form's footnote, from memory).
  R is a specified non-standard bend radius; without it the bends have Table 2's radius r.
* L is the total length along the centre line from the shape's formula.
* The free dimension (printed in parentheses) takes the fabrication deviations; moving it to
  another dimension makes the shape a code 99 (BS 8666:2005 general notes).
* The scheduled length is L rounded by ``LengthRounding``, by default up to the next 5 mm (never
  shorter than the formula). BS 8666 was not seen to fix this rule: it is common practice and
  a parameter (10 mm or 25 mm steps are also in use).
"""

from __future__ import annotations

__all__ = [
    "BAR_TYPES",
    "DEFAULT_RULES",
    "DIM_NAMES",
    "SHAPES",
    "STANDARD",
    "LengthRounding",
    "ScheduleRules",
    "ScheduledShape",
    "Shape",
    "ShapeDefinition",
    "ShapeError",
    "formula_length_mm",
    "make_shape",
    "shape_definition",
    "shape_length_mm",
]

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Final, Literal

from detailer.bars import BarSizeError, mass_kg_per_m
from detailer.shapes import _checks
from detailer.shapes.catalogue import (
    BAR_TYPES,
    DIM_NAMES,
    SHAPES,
    STANDARD,
    ShapeDefinition,
    ShapeError,
    formula_length_mm,
    shape_definition,
)
from detailer.shapes.table2 import bending_limits

# --------------------------------------------------------------------------------------------
# Rounding and scheduling rules


@dataclass(frozen=True, slots=True)
class LengthRounding:
    """Rounding of the scheduled total length L (common practice; not fixed by BS 8666).

    ``mode="up"`` rounds up to the next multiple of ``step_mm`` (never short of the formula);
    ``mode="nearest"`` rounds to the nearest multiple, halves up.
    """

    step_mm: int = 5
    mode: Literal["up", "nearest"] = "up"

    def __post_init__(self) -> None:
        step = self.step_mm
        if isinstance(step, bool) or not isinstance(step, int) or step <= 0:
            raise ValueError(f"length rounding step must be a positive int mm (got {step!r})")
        if self.mode not in ("up", "nearest"):
            raise ValueError(f"length rounding mode must be 'up' or 'nearest' (got {self.mode!r})")

    def apply(self, length_mm: float) -> int:
        """``length_mm`` rounded by this rule, in whole mm."""
        units = length_mm / self.step_mm
        if self.mode == "up":
            steps = math.ceil(units - _checks.EPS_MM)
        else:
            steps = math.floor(units + 0.5 + _checks.EPS_MM)
        return int(steps) * self.step_mm


@dataclass(frozen=True, slots=True)
class ScheduleRules:
    """Scheduling rules of a project; the defaults are common practice.

    ``dimension_step_mm``: A..E are multiples of it (BS 8666: 5 mm, from memory).
    ``stock_lengths_mm``: the lengths supplied as code 01. ``max_length_mm``: the longest bar
    scheduled (the 12 m stock length), None for no limit.
    """

    length_rounding: LengthRounding = field(default_factory=LengthRounding)
    dimension_step_mm: int = 5
    stock_lengths_mm: tuple[int, ...] = (6000, 12000)
    max_length_mm: int | None = 12000

    def __post_init__(self) -> None:
        step = self.dimension_step_mm
        if isinstance(step, bool) or not isinstance(step, int) or step <= 0:
            raise ValueError(f"dimension step must be a positive int mm (got {step!r})")
        if self.length_rounding.step_mm % step:
            raise ValueError(
                f"length rounding step {self.length_rounding.step_mm} mm must be a multiple of "
                f"the dimension step {step} mm"
            )
        if any(s <= 0 or s % step for s in self.stock_lengths_mm):
            raise ValueError(f"stock lengths must be positive multiples of {step} mm")
        if self.max_length_mm is not None and self.max_length_mm <= 0:
            raise ValueError(f"max bar length must be > 0 mm (got {self.max_length_mm!r})")


DEFAULT_RULES: Final = ScheduleRules()


# --------------------------------------------------------------------------------------------
# Shapes


@dataclass(frozen=True, slots=True)
class Shape:
    """A dimensioned shape: code, out-to-out dimensions in mm (schedule order), free dims."""

    code: str
    dims_mm: tuple[tuple[str, int], ...]
    free_dims: tuple[str, ...] = ()
    sketch_ref: str = ""  # code 99: the reference of its dimensioned sketch

    def dim(self, name: str) -> int:
        """The dimension ``name`` in mm; ``KeyError`` if the shape has none."""
        for key, value in self.dims_mm:
            if key == name:
                return value
        raise KeyError(name)

    def get(self, name: str, default: int | None = None) -> int | None:
        """The dimension ``name`` in mm, or ``default``."""
        for key, value in self.dims_mm:
            if key == name:
                return value
        return default

    def as_dict(self) -> dict[str, int]:
        """A new dict of the dimensions, for writers."""
        return dict(self.dims_mm)


@dataclass(frozen=True, slots=True)
class ScheduledShape:
    """A checked shape in one bar type and size, with its scheduled length."""

    shape: Shape
    phi_mm: int  # nominal bar size d
    bar_type: str  # BS 8666 notation of steel, e.g. "H"
    length_exact_mm: float  # L from the formula (code 99: as given), before rounding
    length_mm: int  # scheduled length of each bar

    @property
    def code(self) -> str:
        return self.shape.code

    @property
    def dims_mm(self) -> tuple[tuple[str, int], ...]:
        return self.shape.dims_mm

    @property
    def free_dims(self) -> tuple[str, ...]:
        return self.shape.free_dims

    def dim(self, name: str) -> int:
        """The dimension ``name`` in mm; ``KeyError`` if the shape has none."""
        return self.shape.dim(name)

    @property
    def callout(self) -> str:
        """Type and size as scheduled, e.g. "H12"."""
        return f"{self.bar_type}{self.phi_mm}"

    @property
    def mass_kg(self) -> float:
        """Nominal mass of one bar of the scheduled length, kg."""
        return mass_kg_per_m(self.phi_mm) * self.length_mm / 1000.0


# --------------------------------------------------------------------------------------------
# Building and checking


def make_shape(
    code: str,
    phi_mm: int,
    dims: Mapping[str, float] | Iterable[tuple[str, float]],
    bar_type: str = "H",
    *,
    free_dim: str | None = None,
    sketch_ref: str = "",
    length_mm: float | None = None,
    rules: ScheduleRules = DEFAULT_RULES,
) -> ScheduledShape:
    """Check that a shape can be bent and schedule it; else raise ``ShapeError`` (one line).

    Checks: the code's dimensions present, whole mm, A..E in multiples of
    ``rules.dimension_step_mm``; end legs >= P; legs between two bends >= x (4d straight);
    R >= r; the rules printed beside the code; the scheduled length <= ``rules.max_length_mm``.
    A code 99 needs ``sketch_ref`` and ``length_mm`` (its centre-line length, from the sketch);
    only its dimensions and radius are checked here.

    BS 8666:2005, Table 2.
    """
    defn = shape_definition(code)
    if bar_type not in BAR_TYPES:
        raise ShapeError(
            f"shape code {code}: bar type {bar_type!r} is not BS 8666 steel notation",
            code=code,
            fix=f"use one of {', '.join(BAR_TYPES)}",
        )
    try:
        limits = bending_limits(phi_mm)
    except BarSizeError as exc:
        raise ShapeError(f"shape code {code}: {exc}", code=code) from None
    label = f"shape code {code} {bar_type}{limits.d_mm}"
    values = _checks.coerce_dims(label, dims, rules.dimension_step_mm)
    _checks.check_present(label, defn, values)
    if code == "51" and "C" in values:
        values.setdefault("D", values["C"])  # (C) and (D) are equal: schedule both
    ctx = _checks.Ctx(code, limits.d_mm, bar_type, values, limits)

    if code == "99":
        exact = _special_length(ctx, free_dim, sketch_ref, length_mm)
        free: tuple[str, ...] = (free_dim,) if free_dim else ()
    else:
        exact = _standard_length(ctx, defn, free_dim, sketch_ref, length_mm, rules)
        free = defn.free_dims

    scheduled = rules.length_rounding.apply(exact)
    if code in ("00", "01") and scheduled != values["A"]:
        raise ctx.fail(
            f"A = {values['A']} mm is not a multiple of the "
            f"{rules.length_rounding.step_mm} mm length step",
            "A",
            f"schedule A as {scheduled} mm",
        )
    if scheduled <= 0:
        raise ctx.fail(f"length {exact:.0f} mm is not positive", "", "lengthen the legs")
    if rules.max_length_mm is not None and scheduled > rules.max_length_mm:
        raise ctx.fail(
            f"length {scheduled} mm is over the {rules.max_length_mm} mm longest bar",
            "",
            "split the bar with a lap, or raise the limit in the scheduling rules",
        )
    ordered = tuple((n, values[n]) for n in DIM_NAMES if n in values)
    return ScheduledShape(
        Shape(code, ordered, free, sketch_ref), limits.d_mm, bar_type, exact, scheduled
    )


def _standard_length(
    ctx: _checks.Ctx,
    defn: ShapeDefinition,
    free_dim: str | None,
    sketch_ref: str,
    length_mm: float | None,
    rules: ScheduleRules,
) -> float:
    if length_mm is not None or sketch_ref:
        raise ctx.fail(
            "a length or a sketch is given only for code 99",
            "",
            "omit length_mm and sketch_ref; the shape's formula gives L",
        )
    if free_dim is not None and free_dim not in defn.free_dims:
        raise ctx.fail(
            f"the free dimension of code {ctx.code} is ({', '.join(defn.free_dims) or 'none'}),"
            f" not ({free_dim})",
            free_dim,
            "schedule the shape as 99 with its free dimension in parentheses",
        )
    _checks.check_radius(ctx)
    _checks.check_generic(ctx, defn)
    _checks.check_specific(ctx)
    if ctx.code == "01" and ctx.dims["A"] not in rules.stock_lengths_mm:
        stock = ", ".join(str(s) for s in rules.stock_lengths_mm)
        raise ctx.fail(
            f"A = {ctx.dims['A']} mm is not a stock length ({stock} mm)",
            "A",
            "use code 00 for a bar cut to length",
        )
    return formula_length_mm(ctx.code, ctx.phi_mm, ctx.dims)


def _special_length(
    ctx: _checks.Ctx, free_dim: str | None, sketch_ref: str, length_mm: float | None
) -> float:
    if not sketch_ref.strip():
        raise ctx.fail(
            "a code 99 shape needs a dimensioned sketch",
            "",
            "give sketch_ref, the reference of the sketch drawn over columns A to E",
        )
    if not ctx.dims:
        raise ctx.fail("every dimension of the sketch must be scheduled", "", "give A..E")
    if free_dim is not None and free_dim not in ctx.dims:
        raise ctx.fail(
            f"the free dimension ({free_dim}) is not one of the dimensions given",
            free_dim,
            "name a scheduled dimension, or none",
        )
    number = isinstance(length_mm, (int, float)) and not isinstance(length_mm, bool)
    if not number or not math.isfinite(length_mm) or length_mm <= 0:  # type: ignore[arg-type]
        raise ctx.fail(
            f"a code 99 shape needs its length (got {length_mm!r})",
            "",
            "compute L along the centre line from the sketch",
        )
    _checks.check_radius(ctx)
    return float(length_mm)  # type: ignore[arg-type]


def shape_length_mm(
    code: str, phi_mm: int, *, rules: ScheduleRules = DEFAULT_RULES, **dims: float
) -> int:
    """Scheduled length in mm of a checked shape: ``shape_length_mm("11", 12, A=1000, B=300)``.

    BS 8666:2005, Table 3.
    """
    return make_shape(code, phi_mm, dims, rules=rules).length_mm
