"""Typed data of a general arrangement (GA): layers, tolerances, drawn entities, results, errors.

Shared by the DXF reader (``detailer.io.dxf_reader``) and the pure geometry
(``detailer.io.ga_geometry``). Lengths in mm; points are (x, y) in the drawing's coordinate
system scaled to mm.
"""

from __future__ import annotations

__all__ = [
    "XY",
    "DrawnGA",
    "DrawnLine",
    "DrawnPolyline",
    "DrawnText",
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
]

import itertools
import math
from dataclasses import dataclass

from detailer.errors import ProjectError

XY = tuple[float, float]


# -- errors ------------------------------------------------------------------------------------
class GAError(ProjectError):
    """A mistake in a GA drawing: ``ga.dxf: layer 'X', entity #2F: what is wrong; fix``."""

    def __init__(
        self, file: str, message: str, *, layer: str = "", handle: str = "", fix: str = ""
    ) -> None:
        parts = []
        if layer:
            parts.append(f"layer '{layer}'")
        if handle:
            parts.append(f"entity #{handle}")
        super().__init__(file, message, key_path=", ".join(parts), fix=fix)
        self.layer = layer
        self.handle = handle


class GAFileError(GAError):
    """The file cannot be read as a DXF drawing (missing, not a DXF, damaged)."""


class GAUnitsError(GAError):
    """The drawing units are missing, unsupported or implausible."""


class GALayerError(GAError):
    """An expected layer is missing or holds nothing usable."""


class GAOutlineError(GAError):
    """The slab outline is missing, open, repeated or crosses itself."""


class GASupportError(GAError):
    """A support shape cannot be read (open polyline, unpaired line, overlap)."""


class GAStripError(GAError):
    """A design strip cannot be measured (outside the slab, too few supports, ...)."""


class GAStripIdError(GAStripError):
    """A strip has no id text, several, an invalid one, or shares its id with another strip."""


# -- settings and drawn input ------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class GALayers:
    """Layer names of the GA (matched case-insensitively, as DXF layer names are)."""

    slab: str = "SW-GA-SLAB"  # one closed polyline: the slab edge
    supports: str = "SW-GA-SUPPORTS"  # beams and walls: closed polylines or parallel line pairs
    strips: str = "SW-GA-STRIPS"  # strip lines or bands, and their id texts


@dataclass(frozen=True, slots=True)
class GATolerances:
    edge_mm: float = 10.0  # slab past a support's outer face up to this is flush, not a cantilever
    id_search_mm: float = 1000.0  # farthest an id text may sit from a strip line
    max_support_width_mm: float = 3000.0  # farthest apart two lines of one support may be
    parallel_deg: float = 0.5  # two support lines within this angle are parallel
    min_band_aspect: float = 1.1  # a band must be this much longer than wide to show a direction


@dataclass(frozen=True, slots=True)
class DrawnLine:
    handle: str
    start_mm: XY
    end_mm: XY


@dataclass(frozen=True, slots=True)
class DrawnPolyline:
    handle: str
    points_mm: tuple[XY, ...]  # arcs already flattened
    closed: bool


@dataclass(frozen=True, slots=True)
class DrawnText:
    handle: str
    text: str
    at_mm: XY  # insertion (alignment) point


@dataclass(frozen=True, slots=True, kw_only=True)
class DrawnGA:
    """The entities of the three GA layers, in mm, as the DXF reader found them."""

    file: str  # for messages
    layers: GALayers
    mm_per_unit: float  # to quote coordinates in messages in the drawing's own units
    outlines: tuple[DrawnPolyline, ...]
    support_lines: tuple[DrawnLine, ...]
    support_outlines: tuple[DrawnPolyline, ...]
    strip_lines: tuple[DrawnLine, ...]
    strip_bands: tuple[DrawnPolyline, ...]
    strip_texts: tuple[DrawnText, ...]


# -- results -----------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class GASupport:
    x_mm: float  # support centreline along the strip, from the strip's x origin
    width_mm: float  # length of strip axis inside the support, along the strip
    handle: str  # DXF handle of the support shape; "2A+2B" for a pair of lines


@dataclass(frozen=True, slots=True, kw_only=True)
class GAStrip:
    id: str
    handle: str  # DXF handle of the strip line or band
    id_handle: str  # DXF handle of its id text
    supports: tuple[GASupport, ...]  # left to right along the axis
    left_cantilever_mm: float  # 0.0 when the slab ends at the first support
    right_cantilever_mm: float  # 0.0 when the slab ends at the last support
    panel_width_mm: float | None  # band width across the strip; None for a strip line
    left_edge_x_mm: float  # slab edge at the start of the axis (0.0 with a left cantilever)
    right_edge_x_mm: float  # slab edge at the end of the axis
    axis_start_mm: XY  # drawing coordinates (in mm) of the slab edge at the start
    axis_end_mm: XY  # drawing coordinates (in mm) of the slab edge at the end
    origin_mm: XY  # drawing coordinates (in mm) of x = 0

    @property
    def spans_mm(self) -> tuple[float, ...]:
        """Centreline-to-centreline spans between supports (cantilevers excluded)."""
        xs = [s.x_mm for s in self.supports]
        return tuple(b - a for a, b in itertools.pairwise(xs))

    @property
    def direction(self) -> XY:
        """Unit vector of the strip's x axis in drawing coordinates."""
        (x0, y0), (x1, y1) = self.axis_start_mm, self.axis_end_mm
        n = math.hypot(x1 - x0, y1 - y0)
        return ((x1 - x0) / n, (y1 - y0) / n)


@dataclass(frozen=True, slots=True, kw_only=True)
class GeneralArrangement:
    file: str
    units: str  # "mm" or "m": the drawing's units (all results are in mm)
    units_from_header: bool  # False when the project file had to state them
    strips: tuple[GAStrip, ...]  # ordered by id
    notes: tuple[str, ...] = ()  # what the DXF recovery repaired, if it had to

    def strip(self, strip_id: str) -> GAStrip:
        for s in self.strips:
            if s.id == strip_id:
                return s
        raise KeyError(strip_id)
