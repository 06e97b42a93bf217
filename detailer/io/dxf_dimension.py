"""Linear dimensions of the layout drawing: the DIMENSION entity and its picture block.

A DIMENSION entity carries its definition points and names a block holding its picture
(extension lines, dimension line, the two oblique ticks, the text and the definition points);
CAD programs show the block and rebuild it when the dimension is edited. ezdxf's general
renderer builds that block for any style, at about a millisecond a dimension, a third of the
time of a whole sheet; our dimensions all use one kind of style (:mod:`detailer.io.dxf_style`:
oblique ticks, text above the line, whole millimetres), so the block is drawn here directly,
with the same geometry ezdxf draws for that style, in fewer entities: the two extension lines
and the dimension line are one polyline, each tick a LINE (not an INSERT of an oblique-stroke
block), and the definition points are left to the DIMENSION entity itself (ezdxf also copies
them into the block as POINTs on the non-plotting Defpoints layer). A floor's drawing has
thousands of dimensions: a third fewer entities is a third less to write.

Style values used (paper mm, times the plot scale): extension beyond the dimension line
``dimexe``, offset from the point ``dimexo``, text height ``dimtxt``, gap ``dimgap``, tick
``dimtsz`` (the stroke spans 2 x dimtsz along and across the line).
"""

from __future__ import annotations

__all__ = ["add_linear_dimension"]

import math

from ezdxf.lldxf import const

from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import Dim

DIMEXE_MM = 1.5
DIMEXO_MM = 1.5
DIMTXT_MM = 2.5
DIMGAP_MM = 1.0
DIMTSZ_MM = 1.5


def add_linear_dimension(layout, d: Dim, dx: float, dy: float):
    """Add dimension ``d`` shifted by (dx, dy) to ``layout``; returns the DIMENSION entity."""
    s = float(d.scale)
    a = math.radians(d.angle)
    ux, uy = math.cos(a), math.sin(a)  # along the dimension line
    nx, ny = -uy, ux  # towards the text side
    p1 = (d.p1[0] + dx, d.p1[1] + dy)
    p2 = (d.p2[0] + dx, d.p2[1] + dy)
    base = (d.base[0] + dx, d.base[1] + dy)

    def on_line(p: tuple[float, float]) -> tuple[float, float]:
        t = (p[0] - base[0]) * ux + (p[1] - base[1]) * uy
        return (base[0] + t * ux, base[1] + t * uy)

    d1, d2 = on_line(p1), on_line(p2)
    measurement = abs((p2[0] - p1[0]) * ux + (p2[1] - p1[1]) * uy)
    if d.text_at is not None:
        text_at = (d.text_at[0] + dx, d.text_at[1] + dy)
    else:
        off = (DIMGAP_MM + DIMTXT_MM / 2) * s
        text_at = ((d1[0] + d2[0]) / 2 + off * nx, (d1[1] + d2[1]) / 2 + off * ny)
    doc = layout.doc
    block = doc.blocks.new_anonymous_block(type_char="D")
    # Extension lines and dimension line as one polyline, the same picture as three lines:
    # from near the first point out past the line, back to it, along it, out past it at the
    # second point and back to near that point.
    path: list[tuple[float, float]] = []
    ends = []
    for p, q in ((p1, d1), (p2, d2)):
        vx, vy = q[0] - p[0], q[1] - p[1]
        length = math.hypot(vx, vy)
        if length < 1e-9:
            ends.append(None)
            continue
        ex, ey = vx / length, vy / length
        near = (p[0] + ex * DIMEXO_MM * s, p[1] + ey * DIMEXO_MM * s)
        past = (q[0] + ex * DIMEXE_MM * s, q[1] + ey * DIMEXE_MM * s)
        ends.append((near, past))
    if ends[0] is not None:
        path += [ends[0][0], ends[0][1]]
    path += [d1, d2]
    if ends[1] is not None:
        path += [ends[1][1], ends[1][0]]
    block.add_lwpolyline(path)
    half = DIMTSZ_MM * s  # the stroke runs from (-half, -half) to (half, half), line axes
    for q in (d1, d2):
        block.add_line(
            (q[0] - half * (ux + nx), q[1] - half * (uy + ny)),
            (q[0] + half * (ux + nx), q[1] + half * (uy + ny)),
            dxfattribs={"layer": st.DIMENSION_LAYER.name},
        )
    text = block.add_mtext(
        f"{measurement:.0f}",
        dxfattribs={
            "layer": st.DIMENSION_LAYER.name,
            "insert": text_at,
            "char_height": DIMTXT_MM * s,
            "attachment_point": const.MTEXT_MIDDLE_CENTER,
            "style": st.TEXT_STYLE,
            "rotation": d.angle,
        },
    )
    if d.angle == 0.0:
        text.dxf.discard("rotation")
    dimtype = const.DIM_LINEAR | const.DIM_BLOCK_EXCLUSIVE
    if d.text_at is not None:
        dimtype |= const.DIM_USER_LOCATION_OVERRIDE
    return layout.new_entity(
        "DIMENSION",
        dxfattribs={
            "layer": st.DIMENSION_LAYER.name,
            "version": 0,
            "geometry": block.name,
            "dimstyle": st.dimstyle_name(d.scale),
            "defpoint": d1,
            "text_midpoint": text_at,
            "dimtype": dimtype,
            "attachment_point": const.MTEXT_MIDDLE_CENTER,
            "text": "<>",
            "defpoint2": p1,
            "defpoint3": p2,
            "angle": d.angle,
        },
    )
