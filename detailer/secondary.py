"""Secondary bars of a strip: U-bars closing free edges and transverse distribution bars."""

from __future__ import annotations

import math
from collections.abc import Callable

from detailer.codes.base import DesignCode
from detailer.curtailment import U_BAR_LEG_OVER_H, StripGeometry
from detailer.design import as_per_m
from detailer.errors import DesignError
from detailer.layout import BarRole, BarSet, Face, ZoneDesign
from detailer.model import Project, Strip
from detailer.schedule import bar_count, principal_bar_count
from detailer.shapes import detailing as shape_helpers
from detailer.shapes.bs8666 import ShapeError


def u_bar_set(
    strip: Strip,
    top_zone: ZoneDesign,
    geom: StripGeometry,
    at_left: bool,
    bar_type: str,
    rules,
    diameters: tuple[int, ...] = (),
) -> BarSet:
    """U-bars closing a free cantilever edge (EN 1992-1-1:2004, 9.3.1.4(1)), one per top bar.

    The U takes the top bars' size where it can be bent to fit between the covers (BS 8666
    minimum lengths between bends); otherwise the largest smaller allowed size that fits.
    """
    leg = U_BAR_LEG_OVER_H * strip.thickness_mm
    sizes = [top_zone.phi_mm] + sorted((p for p in diameters if p < top_zone.phi_mm), reverse=True)
    shape = None
    first_error: ShapeError | None = None
    for phi in sizes:
        try:
            shape = shape_helpers.u_bar(
                phi,
                strip.thickness_mm,
                strip.cover_top_mm,
                strip.cover_bottom_mm,
                leg,
                bar_type=bar_type,
                rules=rules,
            )
            break
        except ShapeError as exc:
            first_error = first_error or exc
    if shape is None:
        raise DesignError(
            f"strip {strip.id}: no allowed bar size bends into a U-bar for the free edge inside "
            f"h = {strip.thickness_mm:g} mm less the covers ({first_error}); allow a smaller bar "
            "size or reduce the covers"
        )
    x0 = geom.bar_left_mm if at_left else geom.bar_right_mm - shape.dim("A")
    return BarSet(
        strip_id=strip.id,
        set_id=f"{top_zone.zone_id}-U",
        role=BarRole.PRINCIPAL,
        layer="T1",
        zone_id=top_zone.zone_id,
        bar_type=bar_type,
        phi_mm=shape.phi_mm,
        spacing_mm=top_zone.spacing_mm,
        offset_mm=0.0,
        count=principal_bar_count(strip.panel_width_mm, strip.cover_side_mm, top_zone.spacing_mm),
        x_start_mm=round(x0, 1),
        x_end_mm=round(x0 + shape.dim("A"), 1),
        shape=shape,
        note="U-bars at the free edge",
    )


def distribution_set(
    strip: Strip,
    project: Project,
    code: DesignCode,
    *,
    set_id: str,
    zone_id: str,
    face: Face,
    x_start_mm: float,
    x_end_mm: float,
    as_principal_mm2_per_m: float,
    bar_type: str,
    rules,
    lap_for: Callable[[int, Face], float],
) -> tuple[BarSet, ...]:
    """Transverse bars: at least 20 % of the principal steel (9.3.1.1(2)), spacing within the
    secondary limit of 9.3.1.1(3); across the panel, split with laps beyond the stock length."""
    need = code.secondary_min(as_principal_mm2_per_m)
    s_max = code.max_spacing(strip.thickness_mm, principal=False, high_moment_zone=False)
    opts = project.reinforcement
    best = None
    for phi in opts.diameters_mm:
        for s in opts.spacings_mm:
            if s > s_max + 1e-9:
                continue
            a = as_per_m(phi, s)
            if a < need - 1e-9:
                continue
            key = (round(a, 6), -s, phi)
            if best is None or key < best[0]:
                best = (key, phi, s)
    if best is None:
        raise DesignError(
            f"strip {strip.id}: no allowed bar size and spacing gives the distribution steel "
            f"of zone {zone_id} ({need:.0f} mm2/m); allow closer spacings"
        )
    _, phi, s = best
    layer = "T2" if face is Face.TOP else "B2"
    across = strip.panel_width_mm - 2 * strip.cover_side_mm
    count = bar_count(max(x_end_mm - x_start_mm, 0.0), s)
    stock = opts.stock_length_mm
    lengths: list[float]
    if across <= stock:
        lengths = [across]
    else:
        lap = lap_for(phi, face)
        n = math.ceil((across - lap) / (stock - lap))
        piece = (across + (n - 1) * lap) / n
        lengths = [piece] * n
    out = []
    for k, length in enumerate(lengths, start=1):
        shape = shape_helpers.straight(phi, length, bar_type=bar_type, rules=rules)
        suffix = "" if len(lengths) == 1 else str(k)
        out.append(
            BarSet(
                strip_id=strip.id,
                set_id=f"{set_id}{suffix}",
                role=BarRole.DISTRIBUTION,
                layer=layer,
                zone_id=zone_id,
                bar_type=bar_type,
                phi_mm=phi,
                spacing_mm=s,
                offset_mm=0.0,
                count=count,
                x_start_mm=round(x_start_mm, 1),
                x_end_mm=round(x_end_mm, 1),
                shape=shape,
                note="distribution bars across the panel"
                + ("" if len(lengths) == 1 else f", lapped, piece {k} of {len(lengths)}"),
            )
        )
    return tuple(out)
