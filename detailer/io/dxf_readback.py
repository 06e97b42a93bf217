"""Read a layout drawing back: bar sets, callouts and dimensions, as a person may have left it.

The drawing written by :mod:`detailer.io.dxf_writer` tags every bar entity, callout and
dimension with XDATA (application id ``SLABWRIGHT``). This module reads those tags and the text
of the callouts, which is what a fixer reads and what a person edits: a callout whose count or
size was retyped reads back with the new values, a deleted callout reads back as missing. A
callout typed afresh (no XDATA) is joined to its strip by position and to a bar set by mark.

:func:`read_layout` reads a file (a one-line :class:`~detailer.errors.InputError` when it cannot);
:func:`readback` reads an ezdxf document already open.
"""

from __future__ import annotations

__all__ = [
    "Callout",
    "DrawnBar",
    "DrawnDimension",
    "DrawnLabel",
    "LayoutReadback",
    "merge_readbacks",
    "parse_callout",
    "read_layout",
    "readback",
]

import io
import re
from collections.abc import Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path

import ezdxf
from ezdxf.document import Drawing

from detailer.errors import InputError
from detailer.io import dxf_style as st
from detailer.io.dxf_geometry import developed_length_mm

# 25H12-03-200 B1: number, type, size, mark, spacing, layer (the trade's callout).
_CALLOUT = re.compile(
    r"^\s*(\d+)\s*([A-Za-z])\s*(\d+)\s*-\s*([0-9A-Za-z]+)\s*-\s*(\d+)\s+([TB]\d)\s*$"
)
# A plan tag: mark and layer, e.g. "03 B1".
_TAG = re.compile(r"^\s*([0-9A-Za-z]+)\s+([TB]\d)\s*$")


@dataclass(frozen=True, slots=True)
class Callout:
    """A bar callout as written on the drawing, e.g. 25H12-03-200 B1."""

    count: int
    bar_type: str
    phi_mm: int
    mark: str
    spacing_mm: int
    layer: str

    @property
    def type_and_size(self) -> str:
        return f"{self.bar_type}{self.phi_mm}"


def parse_callout(text: str) -> Callout | None:
    """The callout in ``text`` ("25H12-03-200 B1"), or None when it is not one."""
    m = _CALLOUT.match(text or "")
    if m is None:
        return None
    count, bar_type, phi, mark, spacing, layer = m.groups()
    return Callout(int(count), bar_type.upper(), int(phi), mark, int(spacing), layer.upper())


def parse_tag(text: str) -> tuple[str, str] | None:
    """(mark, layer) of a plan tag ("03 B1"), or None."""
    m = _TAG.match(text or "")
    return None if m is None else (m.group(1), m.group(2).upper())


@dataclass(frozen=True, slots=True)
class DrawnBar:
    """One bar set as the drawing records it (XDATA), with the geometry drawn in the section."""

    strip_id: str
    set_id: str
    mark: str
    layer: str
    role: str
    count: int
    type_and_size: str
    spacing_mm: int
    length_mm: int
    shape_code: str
    dims: str  # e.g. "A=1405;B=170"
    x_start_mm: float
    x_end_mm: float
    views: tuple[str, ...]
    drawn_x_min_mm: float | None  # extreme x of the section geometry (centre line or dots)
    drawn_x_max_mm: float | None
    drawn_length_mm: float | None  # developed centre-line length of the section polyline
    handles: tuple[str, ...]


@dataclass(frozen=True, slots=True)
class DrawnLabel:
    """A text that is (or reads as) a callout or plan tag of a bar set."""

    text: str
    view: str  # "section", "plan", "cross-section", "" when not tagged
    strip_id: str
    set_id: str  # "" when the text is not tagged and could not be joined to a set
    mark: str  # the mark the XDATA gives (the text may say otherwise)
    callout: Callout | None
    handle: str
    x: float
    y: float
    tagged: bool  # True when the text carries our XDATA


@dataclass(frozen=True, slots=True)
class DrawnDimension:
    strip_id: str
    kind: str  # "span", "curtailment", "cover", "depth"
    ref: str
    measurement_mm: float
    handle: str


@dataclass(frozen=True, slots=True)
class LayoutReadback:
    source: str
    layouts: tuple[str, ...]
    strip_ids: tuple[str, ...]
    bars: tuple[DrawnBar, ...]
    labels: tuple[DrawnLabel, ...]
    dimensions: tuple[DrawnDimension, ...]

    _label_index: dict | None = field(default=None, init=False, repr=False, compare=False)

    def bars_of(self, strip_id: str) -> tuple[DrawnBar, ...]:
        return tuple(b for b in self.bars if b.strip_id == strip_id)

    def labels_of(self, strip_id: str, set_id: str, view: str) -> tuple[DrawnLabel, ...]:
        """The labels of one bar set in one view, in drawing order (indexed once: a floor's
        drawing has tens of thousands of labels)."""
        index = self._label_index
        if index is None:
            index = {}
            for lab in self.labels:
                index.setdefault((lab.strip_id, lab.set_id, lab.view), []).append(lab)
            index = {k: tuple(v) for k, v in index.items()}
            object.__setattr__(self, "_label_index", index)
        return index.get((strip_id, set_id, view), ())


def merge_readbacks(parts: Sequence[LayoutReadback], source: str = "") -> LayoutReadback:
    """One readback of a drawing split into several files (their sheets and bars together)."""
    return LayoutReadback(
        source or " + ".join(p.source for p in parts),
        tuple(n for p in parts for n in p.layouts),
        tuple(i for p in parts for i in p.strip_ids),
        tuple(b for p in parts for b in p.bars),
        tuple(lab for p in parts for lab in p.labels),
        tuple(d for p in parts for d in p.dimensions),
    )


def read_layout(source: str | Path | bytes) -> LayoutReadback:
    """Read a layout DXF (a path, or the bytes themselves); one-line ``InputError`` if unreadable."""
    if isinstance(source, (bytes, bytearray)):
        name = "<drawing>"
        try:
            doc = ezdxf.read(io.StringIO(bytes(source).decode("utf-8")))
        except (UnicodeDecodeError, ezdxf.DXFError, ValueError) as exc:
            raise InputError(f"{name}: not a readable DXF drawing ({_reason(exc)})") from None
        return readback(doc, name)
    path = Path(source)
    if not path.is_file():
        raise InputError(f"{path}: no such drawing file; check the path")
    try:
        doc = ezdxf.readfile(path)
    except (OSError, ezdxf.DXFError, ValueError) as exc:
        raise InputError(
            f"{path}: cannot read the drawing ({_reason(exc)}); give a DXF file written by slabwright"
        ) from None
    return readback(doc, str(path))


def _reason(exc: Exception) -> str:
    text = str(exc).strip().splitlines()[0] if str(exc).strip() else exc.__class__.__name__
    return text[:120]


def _fields(entity) -> dict[str, str] | None:
    if not entity.has_xdata(st.APPID):
        return None
    return st.parse_xdata(entity.get_xdata(st.APPID))


def _text_of(entity) -> str:
    if entity.dxftype() == "MTEXT":
        return entity.plain_text(split=False).strip()
    return str(entity.dxf.text).strip()


def _position(entity) -> tuple[float, float]:
    if entity.dxftype() == "MTEXT":
        p = entity.dxf.insert
    else:
        p = entity.get_placement()[1]
    return float(p[0]), float(p[1])


def readback(doc: Drawing, source: str = "") -> LayoutReadback:
    """Bar sets, labels and dimensions of an open layout drawing (model space)."""
    msp = doc.modelspace()
    raw: dict[tuple[str, str], list[tuple[dict[str, str], object]]] = {}
    labels: list[DrawnLabel] = []
    free_texts = []
    dims: list[DrawnDimension] = []
    y_range: dict[str, list[float]] = {}
    for e in msp:
        kind_fields = _fields(e)
        kind = kind_fields.get("kind", "") if kind_fields else ""
        if kind_fields and kind_fields.get("strip"):
            for y in _ys(e):
                r = y_range.setdefault(kind_fields["strip"], [y, y])
                r[0], r[1] = min(r[0], y), max(r[1], y)
        if kind == "bar":
            raw.setdefault((kind_fields["strip"], kind_fields.get("set", "")), []).append(
                (kind_fields, e)
            )
        elif kind == "label" and e.dxftype() in ("TEXT", "MTEXT"):
            text = _text_of(e)
            x, y = _position(e)
            labels.append(
                DrawnLabel(
                    text,
                    kind_fields.get("view", ""),
                    kind_fields["strip"],
                    kind_fields.get("set", ""),
                    kind_fields.get("mark", ""),
                    parse_callout(text),
                    e.dxf.handle,
                    x,
                    y,
                    True,
                )
            )
        elif kind == "dimension" and e.dxftype() == "DIMENSION":
            dims.append(
                DrawnDimension(
                    kind_fields.get("strip", ""),
                    kind_fields.get("dim", ""),
                    kind_fields.get("ref", ""),
                    float(e.get_measurement()),
                    e.dxf.handle,
                )
            )
        elif kind_fields is None and e.dxftype() in ("TEXT", "MTEXT"):
            text = _text_of(e)
            if parse_callout(text) is not None:
                free_texts.append((text, e.dxf.handle, *_position(e)))
    bars = tuple(_bar(key, items) for key, items in sorted(raw.items()))
    strip_ids = tuple(dict.fromkeys(b.strip_id for b in bars))
    labels += _join_free(free_texts, bars, labels, y_range)
    layouts = tuple(n for n in doc.layout_names() if n != "Model")
    return LayoutReadback(source, layouts, strip_ids, bars, tuple(labels), tuple(dims))


def _ys(entity) -> list[float]:
    t = entity.dxftype()
    if t == "LWPOLYLINE":
        return [float(p[1]) for p in entity.get_points("xy")]
    if t == "INSERT":
        return [float(entity.dxf.insert[1])]
    if t in ("TEXT", "MTEXT"):
        return [_position(entity)[1]]
    return []


def _int(fields: dict[str, str], key: str) -> int:
    try:
        return int(float(fields.get(key, "0")))
    except ValueError:
        return 0


def _float(fields: dict[str, str], key: str) -> float:
    try:
        return float(fields.get(key, "nan"))
    except ValueError:
        return float("nan")


def _bar(key: tuple[str, str], items) -> DrawnBar:
    """Merge the entities of one bar set: fields from its section entity, else the first."""
    section = [(f, e) for f, e in items if f.get("view") == "section"]
    fields = (section or items)[0][0]
    xs: list[float] = []
    length = None
    for _, e in section:
        if e.dxftype() == "INSERT":  # a row of discs: its first and last bar
            x0 = float(e.dxf.insert[0])
            n = int(e.dxf.get("column_count", 1))
            xs += [x0, x0 + (n - 1) * float(e.dxf.get("column_spacing", 0.0))]
            continue
        if e.dxftype() != "LWPOLYLINE":
            continue
        pts = list(e.get_points("xyb"))
        if len(pts) == 2 and all(abs(b) == 1.0 for _, _, b in pts) and e.closed:
            xs.append(0.5 * (pts[0][0] + pts[1][0]))  # a dot: its centre
        else:
            xs += [float(p[0]) for p in pts]
            length = developed_length_mm(pts, closed=bool(e.closed))
    return DrawnBar(
        strip_id=key[0],
        set_id=key[1],
        mark=fields.get("mark", ""),
        layer=fields.get("layer", ""),
        role=fields.get("role", ""),
        count=_int(fields, "count"),
        type_and_size=fields.get("size", ""),
        spacing_mm=_int(fields, "spacing"),
        length_mm=_int(fields, "length"),
        shape_code=fields.get("shape", ""),
        dims=fields.get("dims", ""),
        x_start_mm=_float(fields, "x_start"),
        x_end_mm=_float(fields, "x_end"),
        views=tuple(sorted({f.get("view", "") for f, _ in items})),
        drawn_x_min_mm=min(xs) if xs else None,
        drawn_x_max_mm=max(xs) if xs else None,
        drawn_length_mm=length,
        handles=tuple(e.dxf.handle for _, e in items),
    )


def _join_free(free_texts, bars, labels, y_range) -> list[DrawnLabel]:
    """Untagged callouts: strip by position (the region whose height holds it, else the
    nearest), then the set of that mark without a section callout, nearest in x."""
    out: list[DrawnLabel] = []
    labelled = {(lab.strip_id, lab.set_id) for lab in labels if lab.view == "section"}
    for text, handle, x, y in free_texts:
        callout = parse_callout(text)
        strip = ""
        if y_range:
            strip = min(
                y_range,
                key=lambda s: (
                    0.0
                    if y_range[s][0] <= y <= y_range[s][1]
                    else min(abs(y - y_range[s][0]), abs(y - y_range[s][1]))
                ),
            )
        cands = [
            b
            for b in bars
            if b.strip_id == strip
            and b.mark == callout.mark
            and (b.strip_id, b.set_id) not in labelled
        ]
        set_id = ""
        if cands:
            best = min(
                cands,
                key=lambda b: (
                    0.0
                    if b.x_start_mm <= x <= b.x_end_mm
                    else min(abs(x - b.x_start_mm), abs(x - b.x_end_mm))
                ),
            )
            set_id = best.set_id
            labelled.add((strip, set_id))
        lab = DrawnLabel(text, "section", strip, set_id, "", callout, handle, x, y, False)
        out.append(replace(lab, mark=callout.mark))
    return out
