"""Shapes from detailing intent: straight bars, L-bars, U-bars at free edges, cranks.

Each helper turns what the detailer means (a bar from here to there, a leg down into a wall, a
U around a free edge) into a checked BS 8666:2005 shape. Lengths that must be reached (runs,
legs, anchorage) are rounded up to the dimension step; heights that must fit inside the covers
are rounded down. A shape that cannot be bent raises ``ShapeError``; nothing is clamped.

Dimensions are out-to-out (BS 8666 convention). Covers are nominal covers to this bar.
"""

from __future__ import annotations

__all__ = ["cranked", "fits_section", "l_bar", "straight", "u_bar"]

import math

from detailer.shapes import _checks
from detailer.shapes.bs8666 import (
    DEFAULT_RULES,
    ScheduledShape,
    ScheduleRules,
    ShapeError,
    make_shape,
)
from detailer.shapes.table2 import (
    bending_limits,
    min_between_bends_mm,
    min_straight_between_bends_mm,
)


def _length(name: str, value: float, *, allow_zero: bool = False) -> float:
    number = isinstance(value, (int, float)) and not isinstance(value, bool)
    if not number or not math.isfinite(value) or value < 0 or (value == 0 and not allow_zero):
        limit = ">= 0" if allow_zero else "> 0"
        raise ShapeError(f"{name} must be a length {limit} mm (got {value!r})", fix="give it in mm")
    return float(value)


def _up(value: float, rules: ScheduleRules) -> int:
    step = rules.dimension_step_mm
    return math.ceil(value / step - _checks.EPS_MM) * step


def _down(value: float, rules: ScheduleRules) -> int:
    step = rules.dimension_step_mm
    return math.floor(value / step + _checks.EPS_MM) * step


def straight(
    phi_mm: int, length_mm: float, *, bar_type: str = "H", rules: ScheduleRules = DEFAULT_RULES
) -> ScheduledShape:
    """A straight bar: code 01 when the length is a stock length, else 00 (cut to length).

    The length is rounded by ``rules.length_rounding`` (code 00: L = A).
    """
    a_mm = rules.length_rounding.apply(_length("straight bar length", length_mm))
    code = "01" if a_mm in rules.stock_lengths_mm else "00"
    return make_shape(code, phi_mm, {"A": a_mm}, bar_type, rules=rules)


def l_bar(
    phi_mm: int,
    horizontal_mm: float,
    leg_mm: float,
    *,
    bar_type: str = "H",
    rules: ScheduleRules = DEFAULT_RULES,
) -> ScheduledShape:
    """An L-bar, code 11: A along the slab, (B) the leg turned into an edge beam or wall.

    Both are out-to-out and rounded up to the dimension step.
    """
    a_mm = _up(_length("L-bar horizontal length", horizontal_mm), rules)
    b_mm = _up(_length("L-bar leg", leg_mm), rules)
    return make_shape("11", phi_mm, {"A": a_mm, "B": b_mm}, bar_type, rules=rules)


def _available_depth_mm(h_mm: float, cover_top_mm: float, cover_bottom_mm: float) -> float:
    h = _length("section depth h", h_mm)
    top = _length("top cover", cover_top_mm, allow_zero=True)
    bottom = _length("bottom cover", cover_bottom_mm, allow_zero=True)
    if top + bottom >= h:
        raise ShapeError(
            f"covers {top:g} + {bottom:g} mm leave no depth in h = {h:g} mm",
            fix="check the section depth and the covers",
        )
    return h - top - bottom


def u_bar(
    phi_mm: int,
    h_mm: float,
    cover_top_mm: float,
    cover_bottom_mm: float,
    top_leg_mm: float,
    bottom_leg_mm: float | None = None,
    *,
    bar_type: str = "H",
    rules: ScheduleRules = DEFAULT_RULES,
) -> ScheduledShape:
    """A U-bar at a free edge, code 21: A top leg and (C) bottom leg along the slab.

    B, the height out-to-out, is h less both covers, rounded down to the dimension step so
    the bar stays inside the covers. The legs (bottom = top unless given) are rounded up.
    """
    height_mm = _down(_available_depth_mm(h_mm, cover_top_mm, cover_bottom_mm), rules)
    top = _up(_length("U-bar top leg", top_leg_mm), rules)
    bottom_raw = top_leg_mm if bottom_leg_mm is None else bottom_leg_mm
    bottom = _up(_length("U-bar bottom leg", bottom_raw), rules)
    if height_mm <= 0:
        raise ShapeError(
            f"U-bar: no height left in h = {h_mm:g} mm after covers and rounding",
            fix="check the section depth and the covers",
        )
    return make_shape("21", phi_mm, {"A": top, "B": height_mm, "C": bottom}, bar_type, rules=rules)


# Vertical extent (out-to-out) of shapes lying in the section's plane, by code.
_VERTICAL_DIM = {"11": "B", "12": "B", "13": "B", "21": "B", "23": "B", "26": "D"}


def fits_section(
    shape: ScheduledShape, h_mm: float, cover_top_mm: float, cover_bottom_mm: float
) -> int:
    """Check that a bar fits between the covers of a section h deep; return the spare mm.

    The vertical extent is d for a straight bar and the out-to-out leg for an L (11, 12), a
    U (13, 21), a Z (23) or a crank's offset (26). Pass the depth of the member the leg sits in
    (for an L turned down into an edge beam, the beam's depth). Raises ``ShapeError`` when it
    does not fit, or for a shape whose vertical extent is not known here.
    """
    available = _available_depth_mm(h_mm, cover_top_mm, cover_bottom_mm)
    label = f"shape code {shape.code} {shape.callout}"
    if shape.code in ("00", "01"):
        name, extent = "d", shape.phi_mm
    elif shape.code in _VERTICAL_DIM:
        name = _VERTICAL_DIM[shape.code]
        extent = shape.dim(name)
    else:
        known = ", ".join(["00", "01", *_VERTICAL_DIM])
        raise ShapeError(
            f"{label}: fits_section does not know which dimension is vertical",
            code=shape.code,
            fix=f"check the fit by hand (known codes: {known})",
        )
    spare = available - extent
    if spare < -_checks.EPS_MM:
        raise ShapeError(
            f"{label}: {name} = {extent} mm does not fit in h = {h_mm:g} mm less covers "
            f"{cover_top_mm:g} + {cover_bottom_mm:g} mm ({available:g} mm)",
            code=shape.code,
            phi_mm=shape.phi_mm,
            dim=name,
            fix=f"make {name} at most {math.floor(available + _checks.EPS_MM)} mm, "
            "use a smaller bar or a deeper section",
        )
    return math.floor(spare + _checks.EPS_MM)


def cranked(
    phi_mm: int,
    first_run_mm: float,
    offset_mm: float,
    second_run_mm: float,
    *,
    angle_deg: float = 90.0,
    first_leg_mm: float | None = None,
    second_leg_mm: float | None = None,
    bar_type: str = "H",
    rules: ScheduleRules = DEFAULT_RULES,
) -> ScheduledShape:
    """A bar stepping by ``offset_mm`` (out-to-out) between two runs, optionally with end legs.

    At 90 deg every dimension is out-to-out; at an inclined crank the runs are measured to the
    intersection of the centre lines there (the code 26 reading, from memory).

    * 90 deg, no legs: code 23 (A, B = offset, (C)); 90 deg with both legs: code 41
      (A leg, B run, C offset, D run, (E) leg; the same length formula as 44, so check the
      sketch's leg directions).
    * <= 45 deg, no legs: code 26 (A, B incline, (C), D offset), B = (offset - d) / sin(angle)
      rounded up to 5 mm.
    * Anything else: code 99 with a sketch reference and its centre-line length: 90 deg bends
      deduct 0.5r + d each as in code 11, inclined bends 2 rho tan(a/2) - rho a with
      rho = r + d/2 (derived).
    """
    angle = _length("crank angle", angle_deg)
    if angle > 90.0:
        raise ShapeError(f"crank angle {angle_deg:g} deg must be <= 90", fix="give 0 < angle <= 90")
    run1 = _up(_length("first run", first_run_mm), rules)
    run2 = _up(_length("second run", second_run_mm), rules)
    step = _up(_length("crank offset", offset_mm), rules)
    legs = [
        None if v is None else _up(_length("end leg", v), rules)
        for v in (first_leg_mm, second_leg_mm)
    ]
    square = abs(angle - 90.0) < 1e-9
    if square and legs == [None, None]:
        return make_shape("23", phi_mm, {"A": run1, "B": step, "C": run2}, bar_type, rules=rules)
    if square and None not in legs:
        dims = {"A": legs[0], "B": run1, "C": step, "D": run2, "E": legs[1]}
        return make_shape("41", phi_mm, dims, bar_type, rules=rules)
    d = bending_limits(phi_mm).d_mm
    if square:
        incline = step
    else:
        if step <= d:
            raise ShapeError(
                f"crank offset {step} mm must exceed the bar size {d} mm",
                fix="give the offset out-to-out",
            )
        incline = _up((step - d) / math.sin(math.radians(angle)), rules)
    if angle <= 45.0 and legs == [None, None]:
        dims = {"A": run1, "B": incline, "C": run2, "D": step}
        return make_shape("26", phi_mm, dims, bar_type, rules=rules)
    return _crank_99(phi_mm, run1, incline, run2, legs, angle, step, bar_type, rules)


def _crank_99(
    phi_mm: int,
    run1: int,
    incline: int,
    run2: int,
    legs: list[int | None],
    angle_deg: float,
    step: int,
    bar_type: str,
    rules: ScheduleRules,
) -> ScheduledShape:
    """Code 99 crank: check bendability here (make_shape cannot for a sketch), then schedule."""
    row = bending_limits(phi_mm)
    d, r = float(row.d_mm), float(row.r_mm)
    square = abs(angle_deg - 90.0) < 1e-9
    a = math.radians(angle_deg)
    rho = r + d / 2.0
    # Length taken from the straight at each kind of bend end (derived, see docstring).
    at_square, at_incline = r + d, rho * math.tan(a / 2.0)
    crank_end = at_square if square else at_incline
    four_d = min_straight_between_bends_mm(phi_mm)
    label = f"shape code 99 {bar_type}{row.d_mm}"

    def check(name: str, value: int, ends: tuple[float | None, float | None]) -> None:
        if None in ends:  # an end leg: at least P
            if value < row.p_mm:
                raise ShapeError(
                    f"{label}: {name} = {value} mm is less than the minimum end projection P "
                    f"(BS 8666:2005, Table 2), {row.p_mm} mm",
                    code="99",
                    phi_mm=row.d_mm,
                    dim=name,
                    minimum_mm=row.p_mm,
                    fix=f"make {name} at least {row.p_mm} mm or use a smaller bar",
                )
            return
        straight_mm = value - sum(e for e in ends if e is not None)
        if straight_mm + _checks.EPS_MM < four_d:
            least = _checks.up5(value - straight_mm + four_d)
            if square and ends == (at_square, at_square):
                least = max(least, min_between_bends_mm(phi_mm))
            raise ShapeError(
                f"{label}: {name} = {value} mm leaves less than 4d straight between bends "
                f"(BS 8666:2005, Fig. 6); it needs {least} mm",
                code="99",
                phi_mm=row.d_mm,
                dim=name,
                minimum_mm=least,
                fix=f"make {name} at least {least} mm or use a smaller bar",
            )

    parts: list[tuple[str, int, tuple[float | None, float | None]]] = []
    if legs[0] is not None:
        parts.append(("leg", legs[0], (None, at_square)))
    parts.append(("run", run1, (at_square if legs[0] is not None else None, crank_end)))
    parts.append(("offset" if square else "incline", incline, (crank_end, crank_end)))
    parts.append(("run", run2, (crank_end, at_square if legs[1] is not None else None)))
    if legs[1] is not None:
        parts.append(("leg", legs[1], (at_square, None)))

    names = "ABCDE"
    dims = {names[i]: value for i, (_, value, _) in enumerate(parts)}
    for i, (_, value, ends) in enumerate(parts):
        check(names[i], value, ends)
    n_square = sum(leg is not None for leg in legs) + (2 if square else 0)
    n_incline = 0 if square else 2
    deduction = n_square * (0.5 * r + d) + n_incline * (2.0 * rho * math.tan(a / 2.0) - rho * a)
    length = sum(dims.values()) - deduction
    letters = ", ".join(
        f"({names[i]}) {kind}" if i == len(parts) - 1 else f"{names[i]} {kind}"
        for i, (kind, _, _) in enumerate(parts)
    )
    sketch = f"crank {angle_deg:g} deg, offset {step} mm: {letters}"
    free = names[len(parts) - 1]
    return make_shape(
        "99",
        phi_mm,
        dims,
        bar_type,
        free_dim=free,
        sketch_ref=sketch,
        length_mm=length,
        rules=rules,
    )
