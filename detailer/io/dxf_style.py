"""Pens, layers, text and dimension styles of the layout drawing, and its XDATA vocabulary.

Every layer is one frozen :class:`LayerStyle` (name, ACI colour, linetype, lineweight); the
writer defines all of them (and their linetypes) before drawing, and the readback finds bars
by these names. Sizes of annotation are paper millimetres: the writer multiplies them by the
plot scale, so text on a 1:50 sheet is drawn 50 times larger in model space.

XDATA is stored under our own application id :data:`APPID` as ``key=value`` strings (group
code 1000), so a drawing can be read back without guessing from geometry.
"""

from __future__ import annotations

__all__ = [
    "APPID",
    "DIMENSION_LAYER",
    "GRID_LAYER",
    "LABEL_LAYER",
    "LAYERS",
    "LINETYPES",
    "NOTES_LAYER",
    "OUTLINE_LAYER",
    "REVISION_LAYER",
    "SUPPORT_LAYER",
    "TEXT_STYLE",
    "TITLE_LAYER",
    "VIEWPORT_LAYER",
    "LayerStyle",
    "Linetype",
    "PaperSizes",
    "bar_layer",
    "dimstyle_name",
    "parse_xdata",
    "xdata_tags",
]

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Final


@dataclass(frozen=True, slots=True)
class Linetype:
    """A dash pattern in paper mm: positive = dash, negative = gap, 0 = dot."""

    name: str
    description: str
    pattern_mm: tuple[float, ...]

    @property
    def total_mm(self) -> float:
        return sum(abs(p) for p in self.pattern_mm)


@dataclass(frozen=True, slots=True)
class LayerStyle:
    """One layer of the drawing: what it holds and how it is drawn."""

    name: str
    colour: int  # AutoCAD Colour Index
    linetype: str  # "Continuous" or one of LINETYPES
    lineweight: int  # 1/100 mm (DXF convention): 25 = 0.25 mm
    description: str
    plot: bool = True


DASHED: Final = Linetype("SW-DASHED", "Dashed __ __ __", (6.0, -3.0))
CENTRE: Final = Linetype("SW-CENTRE", "Centre ____ _ ____", (12.0, -3.0, 3.0, -3.0))
LINETYPES: Final[tuple[Linetype, ...]] = (DASHED, CENTRE)

OUTLINE_LAYER: Final = LayerStyle("SW-OUTLINE", 7, "Continuous", 35, "slab outline")
SUPPORT_LAYER: Final = LayerStyle("SW-SUPPORTS", 8, "Continuous", 25, "beams and walls")
SUPPORT_HIDDEN_LAYER: Final = LayerStyle(
    "SW-SUPPORTS-HIDDEN", 253, DASHED.name, 18, "supports below, seen in plan"
)
GRID_LAYER: Final = LayerStyle("SW-GRID", 252, CENTRE.name, 18, "support centrelines, grid")
BARS_TOP_LAYER: Final = LayerStyle("SW-BARS-TOP", 1, "Continuous", 50, "principal top bars")
BARS_BOTTOM_LAYER: Final = LayerStyle(
    "SW-BARS-BOTTOM", 5, "Continuous", 50, "principal bottom bars"
)
BARS_DISTRIBUTION_LAYER: Final = LayerStyle(
    "SW-BARS-DISTRIBUTION", 94, "Continuous", 35, "distribution bars"
)
LABEL_LAYER: Final = LayerStyle("SW-LABELS", 250, "Continuous", 18, "bar callouts, leaders")
DIMENSION_LAYER: Final = LayerStyle("SW-DIMENSIONS", 134, "Continuous", 18, "dimensions")
NOTES_LAYER: Final = LayerStyle("SW-NOTES", 251, "Continuous", 18, "notes and view titles")
TITLE_LAYER: Final = LayerStyle("SW-TITLE", 174, "Continuous", 35, "sheet frame, title block")
REVISION_LAYER: Final = LayerStyle(
    "SW-REVISIONS", 6, "Continuous", 25, "revision markers beside changed bar sets"
)
VIEWPORT_LAYER: Final = LayerStyle(
    "SW-VIEWPORTS", 9, "Continuous", 13, "viewport frames (not plotted)", plot=False
)

LAYERS: Final[tuple[LayerStyle, ...]] = (
    OUTLINE_LAYER,
    SUPPORT_LAYER,
    SUPPORT_HIDDEN_LAYER,
    GRID_LAYER,
    BARS_TOP_LAYER,
    BARS_BOTTOM_LAYER,
    BARS_DISTRIBUTION_LAYER,
    LABEL_LAYER,
    DIMENSION_LAYER,
    NOTES_LAYER,
    TITLE_LAYER,
    REVISION_LAYER,
    VIEWPORT_LAYER,
)

#: Text style of every text and dimension (a font matplotlib bundles, so previews match).
TEXT_STYLE: Final = "SW-TEXT"
TEXT_FONT: Final = "DejaVuSans.ttf"
#: Estimated advance of one character as a share of the text height (DejaVu Sans runs
#: about 0.87 for digits and capitals; a little over so estimated boxes never undershoot).
CHAR_WIDTH_FACTOR: Final = 0.9

#: Our registered XDATA application id.
APPID: Final = "SLABWRIGHT"
#: Name prefix of the disc blocks a row of bars seen end-on is drawn with ("SW-DOT-17_5").
DOT_BLOCK_PREFIX: Final = "SW-DOT-"


@dataclass(frozen=True, slots=True)
class PaperSizes:
    """Annotation sizes on paper, mm (common practice for A1/A2 structural sheets)."""

    text_mm: float = 2.5
    small_text_mm: float = 2.0
    title_text_mm: float = 3.5
    arrow_mm: float = 2.0
    grid_bubble_radius_mm: float = 4.0
    row_gap_mm: float = 3.0  # between stacked rows of labels or dimensions
    dot_min_mm: float = 0.5  # smallest drawn diameter of a bar seen in section


def bar_layer(layer: str, distribution: bool) -> LayerStyle:
    """The drawing layer of a bar set: by role, then by face (T1/T2 top, B1/B2 bottom)."""
    if distribution:
        return BARS_DISTRIBUTION_LAYER
    return BARS_TOP_LAYER if layer.upper().startswith("T") else BARS_BOTTOM_LAYER


def dimstyle_name(scale: int) -> str:
    """Our dimension style for a plot scale 1:scale (dimlfac 1: mm drawn, mm read)."""
    return f"SW-DIM-{scale}"


def xdata_tags(fields: Mapping[str, str] | Iterable[tuple[str, str]]) -> list[tuple[int, str]]:
    """XDATA group-code tags for ``fields``, in their given order (``key=value`` strings)."""
    items = fields.items() if isinstance(fields, Mapping) else fields
    tags = []
    for key, value in items:
        text = f"{key}={value}"
        if "\n" in text or len(text) > 250:
            raise ValueError(f"XDATA field {key!r} too long or multi-line")
        tags.append((1000, text))
    return tags


def parse_xdata(tags: Iterable[tuple[int, object]]) -> dict[str, str]:
    """Fields of our XDATA tags; other group codes and strings without ``=`` are ignored."""
    out: dict[str, str] = {}
    for code, value in tags:
        if code != 1000 or not isinstance(value, str) or "=" not in value:
            continue
        key, _, text = value.partition("=")
        out[key.strip()] = text.strip()
    return out
