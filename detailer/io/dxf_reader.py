"""Read a general arrangement (GA) DXF into strip geometry: supports, spans, cantilevers.

:func:`read_general_arrangement` is the entry point. It opens the drawing (recovering a
damaged one when that is safe), finds the drawing units, collects the entities of three
layers and hands them, in mm, to :func:`detailer.io.ga_geometry.arrange`; the types are in
``detailer.io.ga_model``.

What the drawing must hold (layer names are :class:`GALayers`, matched case-insensitively):

- slab layer: one closed polyline (LWPOLYLINE or 2D POLYLINE, arcs allowed) for the slab edge;
- supports layer: each beam or wall as a closed polyline, or as two parallel LINEs (its faces);
- strips layer: each design strip as a LINE (a 1 m strip: the panel width comes from the
  project file) or a closed rectangular polyline (a band: its width across the strip is the
  panel width), with its id as a TEXT or MTEXT on the same layer, inside the band or within
  ``GATolerances.id_search_mm`` of the line.

Entities inside blocks count (layer 0 inside a block takes the INSERT's layer); messages then
name the INSERT's handle. Text, hatches and dimensions on the three layers are ignored; any
other kind of entity there is an error, so that nothing drawn is silently left out.

Units come from ``$INSUNITS`` (4 = mm, 6 = m). When the header has none (0 or missing, as in
every R12 file), ``units_if_missing`` ("mm" or "m", from the project file) is used; without it
the reader stops and asks for it. Results are in mm whatever the drawing units.

A damaged file is read with ezdxf's recovery only when that is safe: a file cut short (no
closing EOF) or one whose recovery had to replace values is refused; repairs of structure
alone are listed in ``GeneralArrangement.notes`` for the caller to show.

Limits (a sign of the wrong file, a damaged entity or wrong units, each refused with a
message): the file at most ``MAX_DXF_BYTES``, at most ``MAX_LAYER_ENTITIES`` entities on a GA
layer, every coordinate a number within 1e11 mm of the origin. ezdxf's own log lines are kept
off stderr while reading.

End conditions are not decided here: the result says where the slab ends and how far it
overhangs; whether an end at a support is pinned or monolithic comes from the project file.
"""

from __future__ import annotations

__all__ = [
    "GAError",
    "GAFileError",
    "GALayerError",
    "GALayers",
    "GAOutlineError",
    "GAStrip",
    "GAStripError",
    "GAStripIdError",
    "GASupport",
    "GASupportError",
    "GATolerances",
    "GAUnitsError",
    "GeneralArrangement",
    "read_general_arrangement",
]

import contextlib
import difflib
import logging
import math
import os
from collections.abc import Iterator

import ezdxf
from ezdxf import recover
from ezdxf.document import Drawing
from ezdxf.entities import DXFGraphic
from ezdxf.enums import TextEntityAlignment
from ezdxf.path import make_path

from detailer.io.ga_geometry import arrange
from detailer.io.ga_model import (
    XY,
    DrawnGA,
    DrawnLine,
    DrawnPolyline,
    DrawnText,
    GAError,
    GAFileError,
    GALayerError,
    GALayers,
    GAOutlineError,
    GAStrip,
    GAStripError,
    GAStripIdError,
    GASupport,
    GASupportError,
    GATolerances,
    GAUnitsError,
    GeneralArrangement,
)

#: $INSUNITS codes read, and mm per drawing unit (DXF reference, HEADER section, $INSUNITS).
_UNITS = {4: ("mm", 1.0), 6: ("m", 1000.0)}
_UNITS_BY_NAME = {name: (name, k) for name, k in _UNITS.values()}

_TEXT = {"TEXT", "MTEXT", "ATTRIB"}
# Annotation and fills: allowed on the GA layers and ignored.
_IGNORED = {
    "HATCH", "SOLID", "WIPEOUT", "DIMENSION", "ARC_DIMENSION", "LARGE_RADIAL_DIMENSION",
    "LEADER", "MULTILEADER", "MLEADER", "POINT", "ATTDEF", "IMAGE", "TOLERANCE",
}  # fmt: skip
_POLYLINES = {"LWPOLYLINE", "POLYLINE"}
_FLATTEN_MM = 0.5  # chord error when arcs of a polyline are turned into straight pieces
_CLOSE_MM = 1.0  # a polyline whose ends meet this closely is closed (snapped by eye)
_MAX_BLOCK_DEPTH = 16
#: Largest DXF read: a GA of a large floor is a few MiB; ezdxf takes about a minute per 50 MiB.
MAX_DXF_BYTES = 64 * 2**20
#: Most entities on one GA layer (2000 strips with their id texts fit easily).
MAX_LAYER_ENTITIES = 5000
#: Farthest a point may lie from the drawing origin: beyond every national grid or UTM
#: coordinate (under 1e10 mm), so farther means a damaged entity or wrong units.
_MAX_COORD_MM = 1.0e11
_DEFAULT_LAYERS = GALayers()
_DEFAULT_TOLERANCES = GATolerances()


def read_general_arrangement(
    path: str | os.PathLike[str],
    layers: GALayers = _DEFAULT_LAYERS,
    units_if_missing: str | None = None,
    *,
    tolerances: GATolerances = _DEFAULT_TOLERANCES,
) -> GeneralArrangement:
    """Read the GA DXF at ``path`` into one measured strip per design strip, in mm.

    ``units_if_missing`` ("mm" or "m") is used only when the DXF header states no units.
    Raises a :class:`GAError` subclass (a ProjectError: one line naming the file, the layer
    and the entity handle) for every problem with the file or the drawing.
    """
    file = os.fspath(path)
    with _quiet_ezdxf():
        doc, notes = _open(file)
        units, mm_per_unit, from_header = _units(doc, file, units_if_missing)
        drawn = _collect(doc, file, layers, mm_per_unit)
    _check_scale(drawn, units, units_if_missing if from_header else None)
    strips = arrange(drawn, tolerances)
    return GeneralArrangement(
        file=file, units=units, units_from_header=from_header, strips=strips, notes=notes
    )


# -- opening -----------------------------------------------------------------------------------
@contextlib.contextmanager
def _quiet_ezdxf() -> Iterator[None]:
    """Keep ezdxf's log lines (e.g. what recovery repaired) off the user's stderr: every
    problem is reported once, as our own one-line error, and repairs go into ``notes``."""
    logger = logging.getLogger("ezdxf")
    handler = logging.NullHandler()
    propagate = logger.propagate
    logger.addHandler(handler)
    logger.propagate = False
    try:
        yield
    finally:
        logger.removeHandler(handler)
        logger.propagate = propagate


def _open(file: str) -> tuple[Drawing, tuple[str, ...]]:
    """The drawing, and notes on what recovery repaired (empty for a sound file)."""
    if os.path.isdir(file):
        raise GAFileError(file, "this is a folder, not a file", fix="give the GA .dxf file")
    try:
        with open(file, "rb") as fh:
            head = fh.read(32)
            size = os.fstat(fh.fileno()).st_size
    except OSError as exc:
        raise GAFileError(
            file, f"cannot read the file: {exc.strerror or exc}", fix="check the path and name"
        ) from None
    if size > MAX_DXF_BYTES:
        raise GAFileError(
            file,
            f"the file is {size / 2**20:.0f} MiB, more than the {MAX_DXF_BYTES >> 20} MiB read",
            fix="save a DXF holding only the slab, supports and strips layers",
        )
    if head.startswith(b"AC10"):
        raise GAFileError(
            file, "this is a DWG drawing, not a DXF", fix="save the GA as DXF from the CAD program"
        )
    binary = head.startswith(b"AutoCAD Binary DXF")
    if not binary and not ezdxf.is_dxf_file(file):
        raise GAFileError(
            file, "not a DXF file", fix="export the general arrangement as DXF (ASCII)"
        )
    try:
        return ezdxf.readfile(file), ()
    except Exception as exc:  # noqa: BLE001 - ezdxf raises assorted types on bad input
        problem = _first_line(exc)
    fix = "open it in the CAD program, repair (audit) it and save it as DXF again"
    if binary:
        raise GAFileError(file, f"damaged DXF: {problem}", fix=fix)
    if not _ends_with_eof(file):
        # Recovery would return what it could read: supports or strips might be missing.
        raise GAFileError(
            file,
            f"the DXF is cut short: it does not end with EOF ({problem})",
            fix="copy or export the file again",
        )
    try:
        doc, auditor = recover.readfile(file)
    except Exception:  # noqa: BLE001
        raise GAFileError(
            file, f"damaged DXF that cannot be recovered: {problem}", fix=fix
        ) from None
    if auditor.has_errors:
        # Recovery replaces bad values (e.g. a bad coordinate by 1.0): not safe to measure.
        more = f" (and {len(auditor.errors) - 1} more)" if len(auditor.errors) > 1 else ""
        raise GAFileError(file, f"damaged DXF: {auditor.errors[0].message}{more}", fix=fix)
    notes = [f"{file}: read with DXF recovery after: {problem}"]
    notes += [f"{file}: recovery fixed: {entry.message}" for entry in auditor.fixes]
    return doc, tuple(notes)


def _first_line(exc: BaseException) -> str:
    """The first line of an ezdxf message, without its repeated class name and full stop."""
    lines = str(exc).strip().splitlines()
    text = lines[0] if lines else type(exc).__name__
    return text.removeprefix(f"{type(exc).__name__}: ").rstrip(".")


def _ends_with_eof(file: str) -> bool:
    with open(file, "rb") as fh:
        fh.seek(0, os.SEEK_END)
        fh.seek(max(0, fh.tell() - 64))
        tail = fh.read().split()
    return len(tail) >= 2 and tail[-2] == b"0" and tail[-1].upper() == b"EOF"


# -- units -------------------------------------------------------------------------------------
def _units(doc: Drawing, file: str, units_if_missing: str | None) -> tuple[str, float, bool]:
    code = doc.header.get("$INSUNITS", 0)
    if code in _UNITS:
        return (*_UNITS[code], True)
    if code not in (0, None):
        name = ezdxf.units.unit_name(code) or f"code {code}"
        raise GAUnitsError(
            file,
            f"drawing units are {name.lower()} ($INSUNITS = {code}); only mm and m are read",
            fix="save the GA with millimetres or metres as its drawing units",
        )
    if units_if_missing is None:
        raise GAUnitsError(
            file,
            "the DXF does not state its drawing units ($INSUNITS missing or 0, as in R12 files)",
            fix="state them in the project file: geometry: {units: mm} (or m)",
        )
    if units_if_missing not in _UNITS_BY_NAME:
        raise GAUnitsError(file, f"unknown drawing units {units_if_missing!r}", fix="write mm or m")
    return (*_UNITS_BY_NAME[units_if_missing], False)


def _check_scale(drawn: DrawnGA, units: str, file_units: str | None = None) -> None:
    """A slab under 1 m or over 1 km across means the units are wrong, not the slab.
    ``file_units``: the project file's units, when the header's were used instead."""
    if not drawn.outlines:
        return  # reported by arrange()
    xs = [x for p in drawn.outlines for x, _ in p.points_mm]
    ys = [y for p in drawn.outlines for _, y in p.points_mm]
    size_mm = max(max(xs) - min(xs), max(ys) - min(ys))
    if not 1000.0 <= size_mm <= 1.0e6:
        if file_units is not None and file_units != units:
            read_in = (
                f"{units} (the DXF header's $INSUNITS; units: {file_units} in the project file "
                "is used only when the header states none)"
            )
            fix = "save the GA with the drawing units it was drawn in"
        else:
            read_in = units
            fix = "check the drawing units ($INSUNITS, or units: in the project file)"
        raise GAUnitsError(
            drawn.file,
            f"the slab outline is {size_mm:.4g} mm across when read in {read_in}",
            layer=drawn.layers.slab,
            handle=drawn.outlines[0].handle,
            fix=fix,
        )


# -- entities ----------------------------------------------------------------------------------
def _entities(doc: Drawing, file: str) -> Iterator[tuple[DXFGraphic, str, str]]:
    """(entity, effective layer, handle to quote) for model space, blocks exploded."""
    for entity in doc.modelspace():
        yield from _expand(file, entity, entity.dxf.layer, entity.dxf.handle, 0)


def _expand(
    file: str, entity: DXFGraphic, layer: str, handle: str, depth: int
) -> Iterator[tuple[DXFGraphic, str, str]]:
    """Entities inside a block carry the handle of the outermost INSERT for messages."""
    if entity.dxftype() != "INSERT":
        yield entity, layer, handle
        return
    if depth > _MAX_BLOCK_DEPTH:
        raise GAFileError(
            file,
            f"blocks nested deeper than {_MAX_BLOCK_DEPTH} levels",
            handle=handle,
            fix="explode the block",
        )
    for attrib in entity.attribs:
        yield attrib, _effective(attrib.dxf.layer, layer), handle
    for virtual in entity.virtual_entities():
        yield from _expand(file, virtual, _effective(virtual.dxf.layer, layer), handle, depth + 1)


def _effective(own: str, parent: str) -> str:
    # Entities on layer 0 inside a block are drawn on the layer of the INSERT.
    return parent if own == "0" else own


def _collect(doc: Drawing, file: str, layers: GALayers, k: float) -> DrawnGA:
    roles = {"slab": layers.slab, "supports": layers.supports, "strips": layers.strips}
    names = {layer.dxf.name.casefold(): layer.dxf.name for layer in doc.layers}
    found: dict[str, list[tuple[DXFGraphic, str]]] = {role: [] for role in roles}
    used: set[str] = set()  # layers holding entities, casefolded
    by_layer = {name.casefold(): role for role, name in roles.items()}
    try:
        for entity, layer, handle in _entities(doc, file):
            names.setdefault(layer.casefold(), layer)
            used.add(layer.casefold())
            role = by_layer.get(layer.casefold())
            if role is not None:
                found[role].append((entity, handle))
    except GAError:
        raise
    except Exception as exc:  # noqa: BLE001 - a broken block definition
        raise GAFileError(
            file, f"cannot expand a block: {_first_line(exc)}", fix="explode or purge it"
        ) from None
    for role, name in roles.items():
        if name.casefold() not in names or not found[role]:
            others = {n.casefold() for n in roles.values()}
            raise _layer_error(file, role, name, names, used - others)
        if len(found[role]) > MAX_LAYER_ENTITIES:
            raise GALayerError(
                file,
                f"{len(found[role])} entities, more than the {MAX_LAYER_ENTITIES} read on a layer",
                layer=name,
                fix="keep only the general arrangement on this layer (hatches, notes elsewhere)",
            )
    reader = _Reader(file, k)
    outlines: list[DrawnPolyline] = []
    for entity, handle in found["slab"]:
        kind = entity.dxftype()
        if kind in _POLYLINES:
            outlines.append(reader.polyline(entity, handle, layers.slab, GAOutlineError))
        elif kind not in _IGNORED and kind not in _TEXT:
            raise reader.wrong(entity, handle, layers.slab, GAOutlineError, "the slab outline")
    support_lines, support_outlines = reader.lines_and_polylines(
        found["supports"], layers.supports, GASupportError, "a support"
    )
    strip_lines, strip_bands = reader.lines_and_polylines(
        found["strips"], layers.strips, GAStripError, "a strip"
    )
    texts = [reader.text(e, h, layers.strips) for e, h in found["strips"] if e.dxftype() in _TEXT]
    return DrawnGA(
        file=file,
        layers=layers,
        mm_per_unit=k,
        outlines=tuple(outlines),
        support_lines=support_lines,
        support_outlines=support_outlines,
        strip_lines=strip_lines,
        strip_bands=strip_bands,
        strip_texts=tuple(texts),
    )


def _layer_error(
    file: str, role: str, name: str, names: dict[str, str], used: set[str]
) -> GALayerError:
    """A missing or empty layer, with the likeliest intended layer among ``used`` (layers that
    hold entities and are not one of the GA layers)."""
    exists = name.casefold() in names
    pool = sorted(used)
    close = difflib.get_close_matches(name.casefold(), pool, n=1, cutoff=0.6)
    if close:
        hint = f"did you mean '{names[close[0]]}'?"
    elif exists:
        hint = f"draw the {_WHAT[role]} on this layer"
    else:
        listed = sorted(names.values())
        more = ", ..." if len(listed) > 12 else ""
        hint = "layers in the drawing: " + ", ".join(listed[:12]) + more
    return GALayerError(
        file,
        "layer holds no entities" if exists else "layer is not in the drawing",
        layer=name,
        fix=f"{hint} (or set geometry.layers.{role} in the project file)",
    )


_HOW = {
    "the slab outline": "draw the slab edge as one closed polyline",
    "a support": "draw a beam or wall as a closed polyline or two parallel LINEs",
    "a strip": "draw a strip as a LINE, or a band as a closed polyline",
}
_WHAT = {
    "slab": "slab outline as one closed polyline",
    "supports": "beams and walls as closed polylines or pairs of LINEs",
    "strips": "design strips as LINEs or closed polylines, each with an id text",
}


class _Reader:
    """Turns entities into drawn records in mm."""

    def __init__(self, file: str, mm_per_unit: float) -> None:
        self.file = file
        self.k = mm_per_unit

    def xy(self, v, entity, handle: str, layer: str, error: type[GAError]) -> XY:
        """A point in mm; a NaN or a point far beyond any site is a damaged entity."""
        x, y = float(v[0]), float(v[1])
        if not (math.isfinite(x) and math.isfinite(y)):
            raise error(
                self.file,
                f"{entity.dxftype()} has a coordinate that is not a number ({x:g}, {y:g})",
                layer=layer,
                handle=handle,
                fix="the file is damaged: audit it in the CAD program, or redraw the entity",
            )
        far = max(abs(x), abs(y)) * self.k
        if far > _MAX_COORD_MM:
            raise error(
                self.file,
                f"{entity.dxftype()} lies {far:.3g} mm from the drawing origin, beyond any site",
                layer=layer,
                handle=handle,
                fix="move the drawing near (0, 0), or check the entity and the drawing units",
            )
        return (x * self.k, y * self.k)

    def unreadable(self, exc: Exception, handle, layer, error: type[GAError]) -> GAError:
        return error(
            self.file,
            f"cannot read the polyline: {_first_line(exc)}",
            layer=layer,
            handle=handle,
            fix="redraw it as a closed polyline",
        )

    def wrong(self, entity, handle, layer, error: type[GAError], what: str) -> GAError:
        return error(
            self.file,
            f"{entity.dxftype()} cannot be read as {what}",
            layer=layer,
            handle=handle,
            fix=_HOW.get(what, "draw it as a closed polyline"),
        )

    def polyline(self, entity, handle, layer, error: type[GAError]) -> DrawnPolyline:
        if entity.dxftype() == "POLYLINE" and (entity.is_polygon_mesh or entity.is_poly_face_mesh):
            raise self.wrong(entity, handle, layer, error, "a polyline")
        try:
            path = make_path(entity)
            control = list(path.control_vertices())
        except Exception as exc:  # noqa: BLE001 - e.g. a polyline without vertices
            raise self.unreadable(exc, handle, layer, error) from None
        # Check the vertices before flattening: an arc of absurd radius would never finish.
        corners = [self.xy(v, entity, handle, layer, error) for v in control]
        extent = max((_dist(corners[0], c) for c in corners), default=0.0)
        try:
            flat = list(path.flattening(distance=max(_FLATTEN_MM, 1e-7 * extent) / self.k))
        except Exception as exc:  # noqa: BLE001
            raise self.unreadable(exc, handle, layer, error) from None
        points = [self.xy(v, entity, handle, layer, error) for v in flat]
        closed = bool(entity.closed if entity.dxftype() == "LWPOLYLINE" else entity.is_closed)
        if not closed and len(points) >= 4 and _dist(points[0], points[-1]) <= _CLOSE_MM:
            closed = True
        if closed and len(points) > 1 and _dist(points[0], points[-1]) <= _CLOSE_MM:
            points.pop()
        return DrawnPolyline(handle, tuple(points), closed)

    def lines_and_polylines(self, entities, layer, error: type[GAError], what: str):
        lines: list[DrawnLine] = []
        polylines: list[DrawnPolyline] = []
        for entity, handle in entities:
            kind = entity.dxftype()
            if kind == "LINE":
                a = self.xy(entity.dxf.start, entity, handle, layer, error)
                b = self.xy(entity.dxf.end, entity, handle, layer, error)
                lines.append(DrawnLine(handle, a, b))
            elif kind in _POLYLINES:
                poly = self.polyline(entity, handle, layer, error)
                if not poly.closed and len(poly.points_mm) == 2:
                    # A two-point open polyline is a line drawn with the polyline command.
                    lines.append(DrawnLine(handle, poly.points_mm[0], poly.points_mm[1]))
                else:
                    polylines.append(poly)
            elif kind not in _IGNORED and kind not in _TEXT:
                raise self.wrong(entity, handle, layer, error, what)
        return tuple(lines), tuple(polylines)

    def text(self, entity, handle, layer: str) -> DrawnText:
        if entity.dxftype() == "MTEXT":
            at = self.xy(entity.dxf.insert, entity, handle, layer, GAStripIdError)
            return DrawnText(handle, entity.plain_text(split=False), at)
        align, p1, p2 = entity.get_placement()
        if align in (TextEntityAlignment.ALIGNED, TextEntityAlignment.FIT) and p2 is not None:
            p1 = (p1 + p2) / 2
        at = entity.ocs().to_wcs(p1)  # TEXT points are in its object coordinate system
        return DrawnText(
            handle, entity.dxf.text, self.xy(at, entity, handle, layer, GAStripIdError)
        )


def _dist(a: XY, b: XY) -> float:
    return ((a[0] - b[0]) ** 2 + (a[1] - b[1]) ** 2) ** 0.5
