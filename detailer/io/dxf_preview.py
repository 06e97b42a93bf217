"""PNG previews of the layout drawing's sheets, rendered with ezdxf's drawing add-on.

matplotlib (the ``report`` extra) and the drawing add-on are imported only when a preview is
rendered: together they cost over a second. Text uses the fonts bundled with matplotlib, loaded
into ezdxf's font manager once per process, so a preview looks the same on every machine
(without them ezdxf draws text as empty boxes where no system fonts exist). The sheet is drawn
on white with ezdxf's default colour policy (colour 7 shows black on white).
"""

from __future__ import annotations

__all__ = ["render_png", "write_preview_files"]

import io
import random
from pathlib import Path

import ezdxf
from ezdxf.document import Drawing

from detailer.errors import InputError
from detailer.io.atomic import write_outputs

_FONTS_LOADED = False


def _use_bundled_fonts() -> None:
    """Point ezdxf's font manager at matplotlib's bundled fonts (once; no cache file written)."""
    global _FONTS_LOADED
    if _FONTS_LOADED:
        return
    import matplotlib
    from ezdxf.fonts import fonts

    folder = Path(matplotlib.get_data_path()) / "fonts" / "ttf"
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
    from ezdxf.addons.drawing.matplotlib import MatplotlibBackend
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    width_mm, height_mm = _paper_size(layout)
    fig = Figure(figsize=(width_mm / 25.4, height_mm / 25.4), facecolor="white")
    FigureCanvasAgg(fig)
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    config = Configuration(background_policy=BackgroundPolicy.WHITE)
    backend = MatplotlibBackend(ax, adjust_figure=False)
    ctx = RenderContext(doc)
    main_scale = _main_viewport_scale(layout)
    if main_scale:
        # The add-on scales linetype patterns of model space seen through a viewport by the
        # viewport scale once more (dashes 1:50 come out 50 times too long): undo that for
        # the sheet's main viewport, so dashes show at their paper length as in CAD.
        ctx.linetype_scale = ctx.linetype_scale * main_scale
    # ezdxf jiggles hatch pattern lines by a random offset: seed it so previews are
    # byte-stable, and give the caller's random state back afterwards.
    state = random.getstate()
    random.seed(0)
    try:
        Frontend(ctx, backend, config=config).draw_layout(layout, finalize=True)
    finally:
        random.setstate(state)
    if layout.name != "Model":  # frame the whole sheet, not just what is drawn on it
        ax.set_xlim(0.0, width_mm)
        ax.set_ylim(0.0, height_mm)
        ax.set_aspect("equal")
    ax.set_axis_off()
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=dpi, facecolor="white", metadata={"Software": None})
    return buffer.getvalue()


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
