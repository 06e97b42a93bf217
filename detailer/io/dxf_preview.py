"""PNG previews of the layout drawing's sheets, rendered with ezdxf's drawing add-on.

The add-on's Frontend draws into :class:`~detailer.io.preview_backend.BatchBackend`, which
hands matplotlib's Agg renderer a few path collections instead of one artist per primitive
(ezdxf's own matplotlib backend spends seconds a sheet on those), without building a
matplotlib figure; the pixels are written as a PNG here. The drawing add-on and Agg are
loaded only when a preview is rendered. Text uses the fonts bundled with matplotlib, loaded
into ezdxf's font manager once per process, so a preview looks the same on every machine
(without them ezdxf draws text as empty boxes where no system fonts exist). The sheet is drawn
on white with ezdxf's default colour policy (colour 7 shows black on white).
"""

from __future__ import annotations

__all__ = ["render_png", "write_preview_files"]

import io
import random
import struct
import weakref
import zlib
from pathlib import Path

import ezdxf
import numpy as np
from ezdxf.document import Drawing

from detailer.errors import InputError
from detailer.io import dxf_style as st
from detailer.io.atomic import write_outputs

_FONTS_LOADED = False
_PNG_LEVEL = 3  # zlib level of the PNG's pixel data, see _png_bytes
_HATCH_RANDOM_STATE = random.Random(0).getstate()  # the generator's state while drawing


def _use_bundled_fonts() -> None:
    """Point ezdxf's font manager at matplotlib's bundled fonts (once; no cache file written)."""
    global _FONTS_LOADED
    if _FONTS_LOADED:
        return
    from ezdxf.fonts import fonts

    from detailer.io.preview_backend import matplotlib_data_folder

    folder = matplotlib_data_folder() / "fonts" / "ttf"
    fonts.font_manager.clear()
    fonts.font_manager.build([str(folder)], support_dirs=False)
    _FONTS_LOADED = True


def _document(dxf: bytes | Drawing) -> Drawing:
    if isinstance(dxf, Drawing):
        return dxf
    try:
        return ezdxf.read(io.StringIO(bytes(dxf).decode("utf-8")))
    except (UnicodeDecodeError, ezdxf.DXFError, ValueError) as exc:
        raise InputError(f"cannot render the preview: not a readable DXF ({exc})") from None


_BBOXES: dict[int, tuple[weakref.ref, object]] = {}


def _bbox_cache(doc: Drawing):
    """The bounding boxes of a document's model-space entities, kept while the document
    lives: with them the add-on draws through a viewport only what lies in its view, not the
    model space of every other sheet (a file of 50 sheets: 50 times less to draw)."""
    import ezdxf.bbox

    for key in [k for k, (ref, _) in _BBOXES.items() if ref() is None]:
        del _BBOXES[key]
    entry = _BBOXES.get(id(doc))
    if entry is None or entry[0]() is not doc:
        cache = ezdxf.bbox.Cache()
        _fill_boxes(doc, cache)
        entry = (weakref.ref(doc), cache)
        _BBOXES[id(doc)] = entry
    return entry[1]


def _fill_boxes(doc: Drawing, cache) -> None:
    """Quick boxes of the model-space entities we write, each at least as big as what the
    entity draws (a box too big only draws a little more); ezdxf measures the rest itself,
    which for text means laying out its glyphs: half a second for a sheet's worth."""
    from ezdxf.math import BoundingBox

    for e in doc.modelspace():
        kind = e.dxftype()
        dxf = e.dxf
        if kind == "LINE":
            pts = [dxf.start, dxf.end]
            pad = 0.0
        elif kind == "LWPOLYLINE":
            pts = [(p[0], p[1]) for p in e.get_points("xy")]
            pad = float(dxf.get("const_width", 0.0)) + 1.0
            if any(b for *_, b in e.get_points("xyb")):  # arcs bulge out: half a chord each way
                xs, ys = [p[0] for p in pts], [p[1] for p in pts]
                pad += max(max(xs) - min(xs), max(ys) - min(ys))
        elif kind == "CIRCLE":
            c, r = dxf.center, float(dxf.radius)
            pts, pad = [c], r
        elif kind == "TEXT":
            h = float(dxf.height)
            reach = h * (len(dxf.text) + 2)  # any alignment, a generous advance per character
            pts, pad = [dxf.insert, dxf.get("align_point", dxf.insert)], reach
        elif kind == "INSERT" and dxf.name.startswith(st.DOT_BLOCK_PREFIX):
            x, y = dxf.insert[0], dxf.insert[1]
            n = int(dxf.get("column_count", 1))
            pts = [(x, y), (x + (n - 1) * float(dxf.get("column_spacing", 0.0)), y)]
            pad = 100.0  # a disc is a bar's diameter, at most a few tens of mm
        elif kind == "DIMENSION":
            pts = [dxf.defpoint, dxf.defpoint2, dxf.defpoint3, dxf.text_midpoint]
            block = doc.blocks.get(dxf.geometry)
            if block is None:
                continue
            for part in block:  # its picture: polyline, ticks, text
                if part.dxftype() == "LWPOLYLINE":
                    pts += [(p[0], p[1]) for p in part.get_points("xy")]
                elif part.dxftype() == "LINE":
                    pts += [part.dxf.start, part.dxf.end]
            pad = 8.0 * float(doc.dimstyles.get(dxf.dimstyle).dxf.get("dimscale", 1.0)) * 2.5
        else:
            continue  # measured by ezdxf when drawn
        box = BoundingBox((p[0], p[1], 0.0) for p in pts)
        cache.store(e, BoundingBox([box.extmin - (pad, pad, 0), box.extmax + (pad, pad, 0)]))


def render_png(dxf: bytes | Drawing, layout_name: str, *, dpi: int = 100) -> bytes:
    """A PNG of one paper-space layout (e.g. "Strip S1"), the whole sheet, white background."""
    doc = _document(dxf)
    if layout_name not in doc.layouts:
        names = ", ".join(n for n in doc.layout_names() if n != "Model")
        raise InputError(f"the drawing has no layout {layout_name!r}; it has: {names}")
    layout = doc.layouts.get(layout_name)
    _use_bundled_fonts()
    from ezdxf.addons.drawing import Frontend, RenderContext
    from ezdxf.addons.drawing.config import BackgroundPolicy, Configuration

    from detailer.io.preview_backend import BatchBackend

    # Arcs of wide polylines (bar dots, bends) become polygons of 1/32 circle a side, not
    # ezdxf's 1/128: at most 0.5 % of the radius off (a tenth of a pixel at 100 dpi for a
    # 5 mm radius on paper), and a fifth of the Frontend's time saved.
    config = Configuration(background_policy=BackgroundPolicy.WHITE, circle_approximation_count=32)
    backend = BatchBackend(dpi)
    ctx = RenderContext(doc)
    main_scale = _main_viewport_scale(layout)
    if main_scale:
        # The add-on scales linetype patterns of model space seen through a viewport by the
        # viewport scale once more (dashes 1:50 come out 50 times too long): undo that for
        # the sheet's main viewport, so dashes show at their paper length as in CAD.
        ctx.linetype_scale = ctx.linetype_scale * main_scale
    # ezdxf jiggles hatch pattern lines by a random offset: start the generator from a fixed
    # state so previews are byte-stable, and give the caller's random state back afterwards.
    state = random.getstate()
    random.setstate(_HATCH_RANDOM_STATE)
    try:
        Frontend(ctx, backend, config=config, bbox_cache=_bbox_cache(doc)).draw_layout(
            layout, finalize=True
        )
    finally:
        random.setstate(state)

    width_mm, height_mm = _paper_size(layout)
    if layout.name != "Model":  # frame the whole sheet, not just what is drawn on it
        view = (0.0, 0.0, width_mm, height_mm)
    else:  # model space: what is drawn, centred, at the sheet's aspect
        view = _fit(backend.extents() or (0.0, 0.0, 1.0, 1.0), width_mm / height_mm)
    rgba = backend.render_rgba((width_mm / 25.4, height_mm / 25.4), view, dpi)
    return _png_bytes(rgba, dpi)


def _png_bytes(rgba: np.ndarray, dpi: int) -> bytes:
    """Pixels (rows, columns, RGBA) as an 8-bit RGB PNG (the paper is opaque), with their
    resolution.

    Written here rather than by Pillow, whose adaptive row filtering costs more than the
    deflate itself on a sheet of mostly white paper: unfiltered rows at zlib level 3 take
    about two thirds of the time, for a file some 15 % larger. Laid out as the PNG
    specification (RFC 2083) says: signature, IHDR, pHYs, one IDAT, IEND; no time stamp.
    """
    height, width = rgba.shape[:2]
    rows = np.zeros((height, 1 + 3 * width), dtype=np.uint8)  # filter byte 0 = None
    for channel in range(3):  # one byte-strided copy per channel: 4 times quicker than one
        rows[:, 1 + channel :: 3] = rgba[:, :, channel]  # copy of (r, g, b) triples
    per_metre = int(dpi / 0.0254 + 0.5)
    header = struct.pack(">IIBBBBB", width, height, 8, 2, 0, 0, 0)  # 8 bit, truecolour
    return b"".join(
        (
            b"\x89PNG\r\n\x1a\n",
            _png_chunk(b"IHDR", header),
            _png_chunk(b"pHYs", struct.pack(">IIB", per_metre, per_metre, 1)),  # 1 = metre
            _png_chunk(b"IDAT", zlib.compress(rows, _PNG_LEVEL)),
            _png_chunk(b"IEND", b""),
        )
    )


def _png_chunk(kind: bytes, data: bytes) -> bytes:
    """One PNG chunk: length, type, data, CRC-32 of type and data (RFC 2083, 3.2)."""
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))


def _fit(
    box: tuple[float, float, float, float], aspect: float
) -> tuple[float, float, float, float]:
    """``box`` (x0, y0, x1, y1) widened in one direction to width/height = ``aspect``, +2 %."""
    x0, y0, x1, y1 = box
    cx, cy = (x0 + x1) / 2.0, (y0 + y1) / 2.0
    half_w, half_h = max(x1 - x0, 1e-9) / 2.0 * 1.02, max(y1 - y0, 1e-9) / 2.0 * 1.02
    half_w, half_h = max(half_w, half_h * aspect), max(half_h, half_w / aspect)
    return cx - half_w, cy - half_h, cx + half_w, cy + half_h


def _main_viewport_scale(layout) -> float:
    """Paper per model unit of the largest viewport on a paper-space layout (0 if none)."""
    best, scale = 0.0, 0.0
    for vp in layout.query("VIEWPORT"):
        w, h, vh = float(vp.dxf.width), float(vp.dxf.height), float(vp.dxf.view_height)
        if vp.dxf.id == 1 or vh <= 0:  # id 1 is the paper-space view itself
            continue
        if w * h > best:
            best, scale = w * h, h / vh
    return scale


def _paper_size(layout) -> tuple[float, float]:
    """Paper width and height in mm of a paper-space layout (its page setup), else A1."""
    try:
        w = float(layout.dxf_layout.dxf.paper_width)
        h = float(layout.dxf_layout.dxf.paper_height)
    except AttributeError:
        return 841.0, 594.0
    if w <= 0 or h <= 0:
        return 841.0, 594.0
    return w, h


def write_preview_files(dxf: bytes, folder: Path, stem: str, *, dpi: int = 100) -> list[Path]:
    """Render every strip sheet of ``dxf`` to ``folder/<stem>-<layout>.png``, atomically."""
    doc = _document(dxf)
    files: dict[Path, bytes] = {}
    for name in doc.layout_names():
        if name == "Model":
            continue
        safe = name.replace(" ", "-").lower()
        files[Path(folder) / f"{stem}-{safe}.png"] = render_png(doc, name, dpi=dpi)
    write_outputs(files)
    return sorted(files)
