"""A whole floor plate drawn as a general-arrangement DXF, with the project file that uses it.

For the batch tests (invented demonstration data). The plate is a rectangle of one-way slab:
downstand beams run across it (along y) at the panel lines, so the slab spans in x from beam
to beam; each bay row (a band of the plate between two y panel lines) gets design strips
running in x, drawn as a LINE or as a band rectangle on the strips layer with its id text.
The drawing follows the rules of ``detailer.io.dxf_reader`` (default layer names, millimetre
units in ``$INSUNITS``), so every strip reads back with the spans laid out here:
``FloorPlate.spans_mm`` is the reference a test compares with.

``ga_floor(folder, n_panels_x, n_panels_y)`` writes ``<name>.dxf`` and ``<name>.yaml`` into
``folder`` and returns the YAML path. The slab is 225 mm thick for spans up to 5.6 m
(span/depth about 25, common practice for a first sizing of a continuous slab).
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import ezdxf

__all__ = ["FloorPlate", "ga_floor", "plate_of"]

SLAB, SUPPORTS, STRIPS = "SW-GA-SLAB", "SW-GA-SUPPORTS", "SW-GA-STRIPS"

#: Spans cycled along x (those of strip S1 of sample_projects/quayside-terrace.yaml).
DEFAULT_SPANS_MM = (4200.0, 5600.0, 5100.0, 4600.0)


@dataclass(frozen=True, slots=True)
class FloorPlate:
    """The geometry of the plate, in mm; x = 0 on the centreline of the first beam."""

    spans_mm: tuple[float, ...]  # beam centreline to centreline, left to right
    bay_mm: float  # width of one bay row (y)
    n_bays: int  # bay rows in y
    beam_width_mm: float
    right_cantilever_mm: float  # slab past the last beam's centreline; 0 = flush
    strips_per_bay: int
    strip: str  # "line", "band" or "mixed" (alternating, first a line)

    @property
    def beam_x_mm(self) -> tuple[float, ...]:
        return (0.0, *itertools.accumulate(self.spans_mm))

    @property
    def strip_ids(self) -> tuple[str, ...]:
        n = self.n_bays * self.strips_per_bay
        return tuple(f"F{i:02d}" for i in range(1, n + 1))

    def kind(self, index: int) -> str:
        """``line`` or ``band`` for the strip of this index (0-based)."""
        if self.strip == "mixed":
            return "line" if index % 2 == 0 else "band"
        return self.strip

    @property
    def panel_width_mm(self) -> float:
        """Width of slab each strip stands for: its share of one bay row."""
        return self.bay_mm / self.strips_per_bay


def plate_of(
    n_panels_x: int,
    n_panels_y: int,
    *,
    spans_mm: Sequence[float] | None = None,
    bay_mm: float = 6000.0,
    beam_width_mm: float = 300.0,
    right_cantilever_mm: float = 0.0,
    strips_per_bay: int = 1,
    strip: str = "line",
) -> FloorPlate:
    """The plate ``ga_floor`` draws for these arguments (spans cycle DEFAULT_SPANS_MM)."""
    if n_panels_x < 1 or n_panels_y < 1 or strips_per_bay < 1:
        raise ValueError("a plate needs at least one panel each way and one strip per bay")
    if strip not in ("line", "band", "mixed"):
        raise ValueError(f"strip must be line, band or mixed, not {strip!r}")
    spans = (
        tuple(spans_mm)
        if spans_mm is not None
        else tuple(itertools.islice(itertools.cycle(DEFAULT_SPANS_MM), n_panels_x))
    )
    if len(spans) != n_panels_x:
        raise ValueError(f"{len(spans)} spans for {n_panels_x} panels")
    return FloorPlate(
        spans_mm=tuple(float(s) for s in spans),
        bay_mm=float(bay_mm),
        n_bays=n_panels_y,
        beam_width_mm=float(beam_width_mm),
        right_cantilever_mm=float(right_cantilever_mm),
        strips_per_bay=strips_per_bay,
        strip=strip,
    )


def _rect(x0: float, y0: float, x1: float, y1: float) -> list[tuple[float, float]]:
    return [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]


def write_dxf(plate: FloorPlate, path: Path) -> Path:
    """Draw ``plate`` as a GA DXF at ``path``."""
    doc = ezdxf.new("R2010")
    doc.units = ezdxf.units.MM  # $INSUNITS = 4
    for name in (SLAB, SUPPORTS, STRIPS):
        doc.layers.add(name)
    msp = doc.modelspace()
    xs = plate.beam_x_mm
    half = plate.beam_width_mm / 2
    y_top = plate.bay_mm * plate.n_bays
    right = xs[-1] + (plate.right_cantilever_mm or half)
    msp.add_lwpolyline(_rect(-half, 0.0, right, y_top), close=True, dxfattribs={"layer": SLAB})
    for x in xs:  # beams run on 200 mm past the slab sides (only the part under slab counts)
        msp.add_lwpolyline(
            _rect(x - half, -200.0, x + half, y_top + 200.0),
            close=True,
            dxfattribs={"layer": SUPPORTS},
        )
    width = plate.panel_width_mm
    a, b = xs[0] + 500.0, xs[-1] - 500.0  # the drawn length only places the strip
    text_x = xs[0] + plate.spans_mm[0] / 2
    for i, sid in enumerate(plate.strip_ids):
        y_mid = (i + 0.5) * width
        if plate.kind(i) == "line":
            msp.add_line((a, y_mid), (b, y_mid), dxfattribs={"layer": STRIPS})
            at = (text_x, y_mid + 300.0)
        else:
            msp.add_lwpolyline(
                _rect(a, y_mid - width / 2, b, y_mid + width / 2),
                close=True,
                dxfattribs={"layer": STRIPS},
            )
            at = (text_x, y_mid + width / 4)
        msp.add_text(sid, height=250.0, dxfattribs={"layer": STRIPS, "insert": at})
    doc.saveas(path)
    return path


_YAML_HEAD = """\
# Floor plate {n_x} x {n_y} panels, strips from the general arrangement {dxf} (generated)
project: {{id: {pid}, title: "Floor plate {n_x} x {n_y} panels", revision: P1,
          date: 2026-01-05, drawing: GA-{n_x}x{n_y}}}
materials: {{concrete: C32/40, exposure: XC1}}
geometry: {{dxf: "{dxf}"}}
defaults:
  thickness_mm: 225
  cover: {{top_mm: 25, bottom_mm: 25, side_mm: 25}}
  loads: {{category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5}}
strips:
"""


def write_yaml(plate: FloorPlate, path: Path, dxf_name: str, project_id: str) -> Path:
    """The project file of ``plate``: one entry per strip id, geometry from ``dxf_name``."""
    n_x, n_y = len(plate.spans_mm), plate.n_bays
    lines = [_YAML_HEAD.format(n_x=n_x, n_y=n_y, dxf=dxf_name, pid=project_id).rstrip("\n")]
    for i, sid in enumerate(plate.strip_ids):
        row = i // plate.strips_per_bay + 1
        entry = f'  - {{id: {sid}, description: "bay row {row}"'
        if plate.kind(i) == "line":  # a band gives its own width
            entry += f", panel_width_mm: {plate.panel_width_mm:g}"
        lines.append(entry + "}")
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def ga_floor(
    path_dir: Path | str,
    n_panels_x: int,
    n_panels_y: int,
    *,
    name: str = "floor",
    project_id: str = "ga-floor",
    **plate_args,
) -> Path:
    """Write ``<name>.dxf`` and ``<name>.yaml`` for a plate of ``n_panels_x`` spans by
    ``n_panels_y`` bay rows into ``path_dir``; return the YAML path. ``plate_args`` go to
    :func:`plate_of` (spans_mm, bay_mm, beam_width_mm, right_cantilever_mm, strips_per_bay,
    strip)."""
    folder = Path(path_dir)
    folder.mkdir(parents=True, exist_ok=True)
    plate = plate_of(n_panels_x, n_panels_y, **plate_args)
    write_dxf(plate, folder / f"{name}.dxf")
    return write_yaml(plate, folder / f"{name}.yaml", f"{name}.dxf", project_id)
