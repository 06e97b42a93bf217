"""Strip geometry from a general-arrangement DXF, merged into the project data before validation.

A project file with a ``geometry:`` block takes each strip's supports (centres and widths),
cantilever overhangs and, for a band, its panel width from the drawing; the file still gives
thickness, covers, loads and the end conditions at supports (``pinned`` by default):

    geometry:
      dxf: ga/level2.dxf        # relative to the project file
      units: mm                 # only used when the DXF header states none ($INSUNITS)
      layers: {slab: SW-GA-SLAB, supports: SW-GA-SUPPORTS, strips: SW-GA-STRIPS}

Values the drawing gives may not be repeated in the file (one source of truth).
"""

from __future__ import annotations

import os
from collections.abc import Callable
from typing import Any

from detailer.errors import ProjectError

ErrorFactory = Callable[..., ProjectError]

_GEOMETRY_KEYS = {"dxf", "units", "layers"}
_LAYER_KEYS = {"slab", "supports", "strips"}
_FROM_DRAWING = ("spans_mm", "supports_mm", "support_widths_mm")


def apply_general_arrangement(
    merged: dict[str, Any], file: str, error: ErrorFactory
) -> tuple[dict[str, Any], tuple[str, ...]]:
    """The project data with each strip's geometry taken from the DXF (pure but for reading
    the drawing), and the reader's notes on what recovery repaired in a damaged drawing
    (empty for a sound one, or without a ``geometry:`` block). ``error(path, message,
    fix)`` builds a located ProjectError."""
    geometry = merged.get("geometry")
    if geometry is None:
        return merged, ()
    from detailer.io.dxf_reader import GALayers, read_general_arrangement

    if not isinstance(geometry, dict) or "dxf" not in geometry:
        raise error(
            ("geometry",), "needs dxf: the general-arrangement drawing", "write dxf: ga.dxf"
        )
    for key in geometry:
        if key not in _GEOMETRY_KEYS:
            raise error(("geometry", key), f"unknown key '{key}'", "use dxf, units or layers")
    dxf = geometry["dxf"]
    if not isinstance(dxf, str) or not dxf.strip():
        raise error(("geometry", "dxf"), "must be a file name", "give the DXF path in quotes")
    units = geometry.get("units")
    if units is not None and units not in ("mm", "m"):
        raise error(("geometry", "units"), f"unknown units {units!r}", "write mm or m")
    layers = geometry.get("layers") or {}
    if not isinstance(layers, dict) or any(k not in _LAYER_KEYS for k in layers):
        raise error(
            ("geometry", "layers"),
            "layers must map slab, supports and strips to layer names",
            "e.g. layers: {slab: SLAB, supports: BEAMS, strips: STRIPS}",
        )
    for role, name in layers.items():
        if not isinstance(name, str) or not name.strip():
            raise error(
                ("geometry", "layers", role),
                f"expected a layer name (got {name!r})",
                "give the DXF layer name as text, e.g. " + role + ": GA-" + role.upper(),
            )
    path = dxf if os.path.isabs(dxf) else os.path.join(os.path.dirname(file) or ".", dxf)
    ga = read_general_arrangement(path, GALayers(**layers), units_if_missing=units)
    ids = [s.id for s in ga.strips]

    strips = merged.get("strips")
    if not isinstance(strips, list):
        return {k: v for k, v in merged.items() if k != "geometry"}, ga.notes
    out = []
    for i, s in enumerate(strips):
        if not isinstance(s, dict):
            out.append(s)
            continue
        sid = s.get("id")
        if isinstance(sid, int) and not isinstance(sid, bool):
            sid = str(sid)  # an unquoted id such as 101 (the schema reads it as text too)
        if not isinstance(sid, str):
            raise error(
                ("strips", i, "id") if "id" in s else ("strips", i),
                f"needs an id to find the strip in {dxf}",
                "add id: with the id written beside the strip on the drawing",
            )
        if sid not in ids:
            raise error(
                ("strips", i, "id"),
                f"strip {sid!r} is not in {dxf} (it has {', '.join(ids) or 'no strips'})",
                "use an id written beside a strip on the drawing",
            )
        for key in _FROM_DRAWING:
            if key in s:
                raise error(
                    ("strips", i, key),
                    f"{key} is given by the general arrangement {dxf}",
                    "remove it from the project file (or remove the geometry: block)",
                )
        g = ga.strip(sid)
        s = dict(s)
        s["supports_mm"] = [sup.x_mm for sup in g.supports]
        s["support_widths_mm"] = [sup.width_mm for sup in g.supports]
        for side, overhang in (
            ("left_end", g.left_cantilever_mm),
            ("right_end", g.right_cantilever_mm),
        ):
            given = s.get(side)
            if overhang > 0:
                if isinstance(given, dict) and "cantilever_mm" in given:
                    raise error(
                        ("strips", i, side),
                        f"the overhang is given by the general arrangement ({overhang:.0f} mm)",
                        f"write {side}: cantilever, or leave it out",
                    )
                s[side] = {"cantilever_mm": overhang}
            else:
                if given == "cantilever" or (isinstance(given, dict) and "cantilever_mm" in given):
                    raise error(
                        ("strips", i, side),
                        f"the drawing shows no overhang at this end of strip {sid}",
                        "write pinned or monolithic, or correct the slab outline in the drawing",
                    )
                s.setdefault(side, "pinned")
        if g.panel_width_mm is not None:
            width = s.get("panel_width_mm")
            if isinstance(width, (int, float)) and abs(float(width) - g.panel_width_mm) > 1.0:
                raise error(
                    ("strips", i, "panel_width_mm"),
                    f"{width:g} mm disagrees with the band drawn for strip {sid} "
                    f"({g.panel_width_mm:.0f} mm)",
                    "remove panel_width_mm (the band gives it) or correct the drawing",
                )
            s["panel_width_mm"] = g.panel_width_mm
        out.append(s)
    result = {k: v for k, v in merged.items() if k != "geometry"}
    result["strips"] = out
    return result, ga.notes
