"""Hand-built bar sets for the marks, schedule and record tests (one builder for all of them)."""

from __future__ import annotations

from detailer.layout import BarRole, BarSet
from detailer.shapes.bs8666 import make_shape


def make_bar_set(
    strip: str,
    set_id: str,
    layer: str,
    *,
    phi: int,
    dims: dict[str, int],
    count: int,
    code: str = "00",
    x_start: float = 0.0,
    zone_id: str = "z",
    spacing_mm: int = 200,
) -> BarSet:
    """A bar set at ``spacing_mm`` whose run starts at ``x_start`` and is ``dims["A"]`` long;
    principal in layers T1/B1, distribution otherwise."""
    return BarSet(
        strip_id=strip,
        set_id=set_id,
        role=BarRole.PRINCIPAL if layer.endswith("1") else BarRole.DISTRIBUTION,
        layer=layer,
        zone_id=zone_id,
        bar_type="H",
        phi_mm=phi,
        spacing_mm=spacing_mm,
        offset_mm=0.0,
        count=count,
        x_start_mm=x_start,
        x_end_mm=x_start + dims["A"],
        shape=make_shape(code, phi, dims),
    )
