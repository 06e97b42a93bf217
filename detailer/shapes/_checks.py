"""Bendability checks of one shape (private; used by ``detailer.shapes.bs8666.make_shape``).

Each check raises ``ShapeError`` with one line: shape code and bar, the dimension, the value,
the minimum and its source, then the fix.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass

from detailer.shapes.catalogue import DIM_NAMES, ShapeDefinition, ShapeError
from detailer.shapes.table2 import (
    MAX_CONTINUOUS_MANDREL_MM,
    BendingLimits,
    min_between_bends_mm,
    min_straight_between_bends_mm,
)

EPS_MM = 1e-6  # float noise allowed when comparing lengths in mm


@dataclass(frozen=True, slots=True)
class Ctx:
    code: str
    phi_mm: int
    bar_type: str
    dims: Mapping[str, int]
    limits: BendingLimits

    @property
    def label(self) -> str:
        return f"shape code {self.code} {self.bar_type}{self.phi_mm}"

    @property
    def r_mm(self) -> float:
        """Radius of the bends: R where given, else Table 2 r."""
        return float(self.dims.get("R", self.limits.r_mm))

    def fail(
        self, message: str, dim: str = "", fix: str = "", minimum_mm: float | None = None
    ) -> ShapeError:
        return ShapeError(
            f"{self.label}: {message}",
            code=self.code,
            phi_mm=self.phi_mm,
            dim=dim,
            minimum_mm=minimum_mm,
            fix=fix,
        )


def up5(value: float) -> int:
    """``value`` rounded up to a multiple of 5 mm."""
    return int(math.ceil(value / 5.0 - EPS_MM) * 5)


def need(ctx: Ctx, name: str, minimum: float, why: str, fix: str = "") -> None:
    value = ctx.dims[name]
    if value + EPS_MM >= minimum:
        return
    shown = up5(minimum)
    raise ctx.fail(
        f"{name} = {value} mm is less than {why}, {shown} mm",
        name,
        fix or f"make {name} at least {shown} mm or use a smaller bar",
        minimum,
    )


def coerce_dims(
    label: str, raw: Mapping[str, float] | Iterable[tuple[str, float]], step_mm: int
) -> dict[str, int]:
    """Dimensions as whole mm, A..E in multiples of ``step_mm``; ``label`` prefixes errors."""
    items = raw.items() if isinstance(raw, Mapping) else raw
    out: dict[str, int] = {}

    def bad(message: str, name: str, fix: str) -> ShapeError:
        return ShapeError(f"{label}: {message}", dim=name, fix=fix)

    for name, value in items:
        if name not in DIM_NAMES:
            raise bad(f"unknown dimension {name!r}", str(name), "use A, B, C, D, E or R")
        if name in out:
            raise bad(f"dimension {name} given twice", name, "give each dimension once")
        number = not isinstance(value, bool) and isinstance(value, (int, float))
        if not number or not math.isfinite(value) or value <= 0:
            raise bad(f"{name} must be a length > 0 mm (got {value!r})", name, "give it in mm")
        if abs(value - round(value)) > EPS_MM:
            raise bad(f"{name} = {value} mm is not whole mm", name, f"round {name} to whole mm")
        whole = round(value)
        if name != "R" and whole % step_mm:
            near = int(math.ceil(whole / step_mm) * step_mm)
            raise bad(
                f"{name} = {whole} mm is not a multiple of {step_mm} mm",
                name,
                f"schedule {name} as {near} mm (BS 8666 gives dimensions in 5 mm steps)",
            )
        out[name] = whole
    return out


def check_present(label: str, defn: ShapeDefinition, dims: Mapping[str, int]) -> None:
    missing = [n for n in defn.dims if n not in dims]
    extra = [n for n in dims if n not in defn.dims and n not in defn.optional_dims]
    if missing or extra:
        what = f"missing {', '.join(missing)}" if missing else f"unexpected {', '.join(extra)}"
        wanted = ", ".join(defn.dims) or "A..E from the sketch"
        if defn.optional_dims and defn.dims:
            wanted += f" (optional {', '.join(defn.optional_dims)})"
        raise ShapeError(f"{label}: {what}", code=defn.code, fix=f"give {wanted}")


def check_radius(ctx: Ctx) -> None:
    """A specified radius R: at least Table 2 r, at most the largest radius bent."""
    if "R" not in ctx.dims:
        return
    r_min = ctx.limits.r_mm
    need(
        ctx,
        "R",
        r_min,
        "the minimum scheduling radius r (BS 8666:2005, Table 2)",
        f"use R >= {r_min} mm, or omit R for the standard radius",
    )
    max_r = ctx.limits.max_bend_radius_mm
    if max_r is not None and ctx.dims["R"] > max_r:
        raise ctx.fail(
            f"R = {ctx.dims['R']} mm is over {max_r} mm, above which bars are supplied "
            "straight (BS 8666:2005, Table 2)",
            "R",
            "schedule the bar straight (00) to be sprung into the curve",
        )


def check_generic(ctx: Ctx, defn: ShapeDefinition) -> None:
    """End projections P, 4d straight between bends, semicircle widths (Table 2, Fig. 6)."""
    d = ctx.limits.d_mm
    end_min = float(ctx.limits.p_mm)
    end_why = "the minimum end projection P (BS 8666:2005, Table 2)"
    if "R" in ctx.dims and ctx.r_mm + 6.0 * d > end_min:
        end_min = ctx.r_mm + 6.0 * d
        end_why = "R + 6d, the end projection for radius R (BS 8666:2005, shape code 12)"
    for name in defn.end_dims:
        need(ctx, name, end_min, end_why)
    x_min = min_between_bends_mm(ctx.phi_mm, ctx.dims.get("R"))
    for name in defn.between_dims:
        need(ctx, name, x_min, "the minimum leg between bends, 4d straight (BS 8666:2005, Fig. 6)")
    for name in defn.semicircle_dims:
        need(ctx, name, 2.0 * (ctx.r_mm + d), "2(r + d), the least outside width of a semicircle")
        largest = MAX_CONTINUOUS_MANDREL_MM + 2 * d
        if ctx.dims[name] > largest:
            raise ctx.fail(
                f"{name} = {ctx.dims[name]} mm needs a mandrel over {MAX_CONTINUOUS_MANDREL_MM} "
                "mm, the largest practical for a continuous curve (BS 8666:2005, Note 3)",
                name,
                f"keep {name} <= {largest} mm or schedule the shape as 99",
            )


def check_specific(ctx: Ctx) -> None:
    """Rules printed beside single codes in the BS 8666:2005 standard shapes table."""
    x, d, code = ctx.dims, ctx.limits.d_mm, ctx.code
    if code == "12" and 2 * x["R"] > MAX_CONTINUOUS_MANDREL_MM:
        raise ctx.fail(
            f"R = {x['R']} mm needs a mandrel of {2 * x['R']} mm, over the "
            f"{MAX_CONTINUOUS_MANDREL_MM} mm practical limit (BS 8666:2005, Note 3)",
            "R",
            f"use R <= {MAX_CONTINUOUS_MANDREL_MM // 2} mm or schedule the shape as 99",
        )
    if code == "13":
        for name in ("A", "C"):
            need(ctx, name, x["B"] / 2.0 + 5.0 * d, "B/2 + 5d (BS 8666:2005, shape code 13)")
    elif code == "22":
        need(ctx, "D", x["C"] / 2.0 + 5.0 * d, "C/2 + 5d (BS 8666:2005, shape code 22)")
    elif code == "33":
        need(ctx, "A", 12.0 * d + 30.0, "12d + 30 mm (BS 8666:2005, shape code 33)")
        need(ctx, "C", x["B"] / 2.0 + 5.0 * d, "B/2 + 5d (BS 8666:2005, shape code 33)")
    elif code == "26":
        check_crank_26(ctx)
    elif code == "51":
        c, other = x["C"], x.get("D", x["C"])
        if other != c:
            raise ctx.fail(f"(C) = {c} mm and (D) = {other} mm must be equal", "D", f"make D {c}")
        shortest = min(x["A"], x["B"])
        if c > shortest:
            raise ctx.fail(
                f"(C) = {c} mm is longer than the side it lies along (min(A, B) = {shortest} mm)",
                "C",
                f"make C and D at most {shortest} mm",
            )


def crank_angle_rad(offset_mm: float, incline_mm: float, phi_mm: float) -> float:
    """Bend angle of a crank: B runs between centre-line intersection points, D out-to-out."""
    return math.asin(max(offset_mm - phi_mm, 0.0) / incline_mm)


def check_crank_26(ctx: Ctx) -> None:
    """Offset D below B; angle <= 45 deg (Note 1); 4d straight in B (derived from Fig. 6)."""
    x, d = ctx.dims, ctx.limits.d_mm
    if x["D"] >= x["B"]:
        raise ctx.fail(
            f"offset D = {x['D']} mm must be less than the inclined length B = {x['B']} mm",
            "D",
            "check B and D; schedule a 90 deg step as 23",
        )
    angle = crank_angle_rad(x["D"], x["B"], d)
    if angle > math.radians(45.0) + 1e-9:
        raise ctx.fail(
            f"crank angle {math.degrees(angle):.1f} deg is over 45 deg, where the code 26 "
            "length is too approximate (BS 8666:2005, Note 1)",
            "B",
            "schedule the crank as 99 with its centre-line length",
        )
    rho = ctx.r_mm + d / 2.0  # centre-line radius of each bend
    straight = x["B"] - 2.0 * rho * math.tan(angle / 2.0)
    need_mm = min_straight_between_bends_mm(ctx.phi_mm)
    if straight + EPS_MM < need_mm:
        need(ctx, "B", x["B"] - straight + need_mm, "the length giving 4d straight between bends")
