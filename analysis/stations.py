"""Result stations along the strip and the statics of each segment as a simple beam.

Each segment carries its own stations from its left node (local 0) to its right node
(local L), so a support position appears twice: as the last station of one segment and the
first of the next, which gives the shear just left and just right of the support. A
point-load position inside a segment also appears twice (shear just left and just right of
the load); bending moment and deflection are equal at both.

``side`` says which limit of the shear a station holds: -1 the limit from the left, +1
from the right, 0 where shear is continuous. A segment's first station is +1, its last -1.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from analysis.beam import BeamModel
from analysis.load_table import POSITION_TOL_MM, LoadTable

__all__ = [
    "FreeTerms",
    "Stations",
    "build_stations",
    "free_term_arrays",
    "free_terms",
    "full_line_loads",
    "station_arrays",
]


def _frozen(a: np.ndarray) -> np.ndarray:
    a.setflags(write=False)
    return a


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class Stations:
    """Result stations, ordered by segment then position."""

    x_mm: np.ndarray  # (n_st,) global position, mm
    segment: np.ndarray  # (n_st,) int, segment index
    local_mm: np.ndarray  # (n_st,) position from the segment's left node, mm
    side: np.ndarray  # (n_st,) int8: -1 left limit, +1 right limit, 0 continuous
    start: np.ndarray  # (n_segments + 1,) int: stations of segment j are start[j]:start[j+1]

    def __post_init__(self) -> None:
        self.x_mm.setflags(write=False)
        self.segment.setflags(write=False)
        self.local_mm.setflags(write=False)
        self.side.setflags(write=False)
        self.start.setflags(write=False)

    def __len__(self) -> int:
        return int(self.x_mm.shape[0])

    def of_segment(self, j: int) -> slice:
        """Slice of the stations of segment j."""
        return slice(int(self.start[j]), int(self.start[j + 1]))

    def find(self, segment: int, local_mm: float) -> int | None:
        """Index of the station of ``segment`` at ``local_mm`` (the first if doubled), or None."""
        sl = self.of_segment(segment)
        hits = np.flatnonzero(np.abs(self.local_mm[sl] - local_mm) <= POSITION_TOL_MM)
        return int(sl.start + hits[0]) if hits.size else None


def build_stations(model: BeamModel, table: LoadTable) -> Stations:
    """Stations: a uniform grid at most L * model.station_spacing_fraction apart in every
    segment, plus support faces, load points and the ends of partial line loads."""
    frac = model.station_spacing_fraction
    if not (0.0 < frac <= 1.0):
        raise ValueError(f"station_spacing_fraction must be in (0, 1], got {frac}")
    nodes = np.asarray(model.node_x_mm, dtype=float)
    half = np.asarray(model.support_width_mm, dtype=float) / 2.0
    n_div = np.full(model.n_segments, max(1, math.ceil(1.0 / frac - 1e-9)))
    seg, local, side, start, _ = station_arrays(np.diff(nodes), n_div, half[:-1], half[1:], table)
    return Stations(x_mm=nodes[seg] + local, segment=seg, local_mm=local, side=side, start=start)


# The arithmetic placement (``_on_the_grid``) needs grid points well apart (more than four
# position tolerances) and lengths whose round-off stays far below the tolerance.
_ARITHMETIC_MIN_SPACING = 4.0 * POSITION_TOL_MM
_ARITHMETIC_MAX_LENGTH_MM = 1.0e9


def station_arrays(
    lengths_mm: np.ndarray,
    n_div: np.ndarray,
    half_l: np.ndarray,
    half_r: np.ndarray,
    table: LoadTable,
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """(segment, local_mm, side, start, grid) of the stations of segments side by side
    (those of one beam, or of many beams stacked: ``analysis.floor``).

    Segment j has length ``lengths_mm[j]``, ``n_div[j]`` grid divisions and supports of half
    width ``half_l[j]`` / ``half_r[j]`` at its left / right node; ``table.segment`` indexes
    these segments. ``start`` has one entry per segment plus one. ``grid`` is the index i of
    a station that is grid point i of its segment, at exactly L i / n, and -1 for any other
    station.

    Stations are the grid points and the other positions (support faces inside a segment,
    load points, the ends of partial line loads), each position once: positions are
    integers of the tolerance, and a position that is a grid point's is that grid point
    (taking a point load's own position). Positions within the tolerance of a node are
    snapped to it. A point load inside a segment doubles its station: the limits of the
    shear from the left and from the right.
    """
    positions = _unique_positions(lengths_mm, half_l, half_r, table)
    if arithmetic_placement_holds(lengths_mm, n_div):
        return _on_the_grid(lengths_mm, n_div, positions)
    return _by_keys(lengths_mm, n_div, positions)


def arithmetic_placement_holds(lengths_mm: np.ndarray, n_div: np.ndarray) -> bool:
    """Whether ``station_arrays`` places stations by arithmetic on the grid (fast; grid
    points well apart) rather than by merging keys (any grid). Both place them alike."""
    return bool(
        lengths_mm.size
        and (lengths_mm / n_div).min() > _ARITHMETIC_MIN_SPACING
        and lengths_mm.max() <= _ARITHMETIC_MAX_LENGTH_MM
    )


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class _Positions:
    """The positions other than the grid, each once, in key order (internal): segment,
    position (mm), point load or not, key within the segment and key over all segments
    (``key_off[segment]`` + key), keys being integers of the tolerance."""

    seg: np.ndarray
    pos: np.ndarray
    point: np.ndarray
    rel: np.ndarray
    key: np.ndarray
    key_off: np.ndarray


def _unique_positions(
    lengths_mm: np.ndarray, half_l: np.ndarray, half_r: np.ndarray, table: LoadTable
) -> _Positions:
    """``_other_positions``, each position once: the first of its group, point loads first,
    then in the order of ``_other_positions``."""
    e_seg, e_pos, e_pt = _other_positions(lengths_mm, half_l, half_r, table)
    e_rel = np.round(e_pos / POSITION_TOL_MM).astype(np.int64)
    # Keys over all segments: those of segment j are offset by the keys of the segments
    # before it, so that one integer orders (segment, position).
    key_l = np.round(lengths_mm / POSITION_TOL_MM)
    key_off = np.zeros(lengths_mm.size + 1, dtype=np.int64)
    np.cumsum(key_l.astype(np.int64) + 2, out=key_off[1:])
    e_key = key_off[e_seg] + e_rel
    order = np.argsort(e_key * 2 + ~e_pt, kind="stable")
    e_key = e_key[order]
    first = np.ones(e_key.size, dtype=bool)
    first[1:] = e_key[1:] != e_key[:-1]
    keep = order[first]
    return _Positions(e_seg[keep], e_pos[keep], e_pt[keep], e_rel[keep], e_key[first], key_off)


def _other_positions(
    lengths_mm: np.ndarray, half_l: np.ndarray, half_r: np.ndarray, table: LoadTable
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(segment, position, is a point load) of the positions other than the grid, in this
    order: support faces that fall inside a segment, load points, and the ends of line loads
    not at the ends of their segment (those coincide with grid points and change nothing)."""
    tol = POSITION_TOL_MM
    left_face = (half_r > tol) & (half_r < lengths_mm - tol)
    right_face = (half_l > tol) & (half_l < lengths_mm - tol)
    seg_idx = np.arange(lengths_mm.size)
    lo_mm, hi_mm = table.start_m * 1000.0, table.end_m * 1000.0
    end_rel = np.round(lengths_mm / tol).astype(np.int64)[table.segment]
    lo_in = table.is_point | (lo_mm != 0.0)
    hi_in = ~table.is_point & (np.round(hi_mm / tol).astype(np.int64) != end_rel)
    e_seg = np.concatenate(
        [seg_idx[left_face], seg_idx[right_face], table.segment[lo_in], table.segment[hi_in]]
    )
    e_pos = np.concatenate(
        [(lengths_mm - half_r)[left_face], half_l[right_face], lo_mm[lo_in], hi_mm[hi_in]]
    )
    e_pt = np.zeros(e_seg.size, dtype=bool)
    n_faces = int(left_face.sum() + right_face.sum())
    e_pt[n_faces : n_faces + int(lo_in.sum())] = table.is_point[lo_in]
    return e_seg.astype(np.intp, copy=False), e_pos, e_pt


def _grid_points(lengths_mm: np.ndarray, n_div: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(position L i / n, i) of the grid points, segment by segment, flat."""
    n_seg = lengths_mm.size
    n = int(n_div[0]) if n_seg else 1
    if n_seg and (n_div == n).all():  # one spacing for every segment: one product
        step = np.arange(n + 1)
        g_pos = lengths_mm[:, None] * (step / n)[None, :]
        return g_pos.ravel(), np.tile(step, n_seg)
    counts = n_div + 1
    step = np.arange(int(counts.sum())) - np.repeat(np.cumsum(counts) - counts, counts)
    return np.repeat(lengths_mm, counts) * (step / np.repeat(n_div, counts)), step


def _grid_keys(lengths_mm: np.ndarray, i: np.ndarray, n: np.ndarray) -> np.ndarray:
    """Position keys (integers of the tolerance) of grid points i of n on lengths, as
    ``_grid_points`` places them."""
    key = lengths_mm * (i / n) / POSITION_TOL_MM
    np.round(key, out=key)
    return key.astype(np.int64)


def _snapped(
    pos: np.ndarray, length: np.ndarray, point: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(position, side, doubled) of stations at ``pos`` on segments of ``length``: snapped
    to a node within the tolerance (side +1 at the left node, -1 at the right one), and
    whether a point load (``point``) doubles it (inside the segment)."""
    tol = POSITION_TOL_MM
    at_start = pos <= tol
    at_end = pos >= length - tol
    pos = np.where(at_start, 0.0, np.where(at_end, length, pos))
    side = np.where(at_end, -1, at_start).astype(np.int8)
    return pos, side, point & ~at_start & ~at_end


def _on_the_grid(
    lengths_mm: np.ndarray, n_div: np.ndarray, positions: _Positions
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """``station_arrays`` by arithmetic on the grid: the grid points' stations are never
    searched or sorted, only the few other positions are placed among them.

    Valid where grid points are more than ``_ARITHMETIC_MIN_SPACING`` apart: then grid
    points other than a segment's first and last lie farther than the tolerance from its
    nodes, and a position's grid neighbours are among the four nearest its estimate."""
    e_seg, e_pos, e_pt, e_rel = positions.seg, positions.pos, positions.point, positions.rel
    n_seg = lengths_mm.size
    counts = n_div + 1
    g_start = np.zeros(n_seg + 1, dtype=np.intp)
    np.cumsum(counts, out=g_start[1:])
    g_pos, g_i = _grid_points(lengths_mm, n_div)
    # Each other position among the grid keys of its segment: grid points before it, and
    # the one it falls on, if any (keys rise along the grid).
    length, n = lengths_mm[e_seg], n_div[e_seg]
    estimate = np.clip(np.floor(e_pos / length * n), 0, n).astype(np.intp)
    near = estimate + np.arange(-1, 3)[:, None]  # (4, n_positions)
    valid = (near >= 0) & (near <= n)
    near_key = _grid_keys(length, near, n)
    before = np.maximum(estimate - 1, 0) + (valid & (near_key < e_rel)).sum(axis=0)
    on_grid = (valid & (near_key == e_rel)).any(axis=0)
    # A point load on a grid point takes its place with its own position; any other
    # position on a grid point is that grid point; the rest are new stations.
    hit = on_grid & e_pt
    new = ~on_grid
    hit_g = g_start[e_seg[hit]] + before[hit]  # grid point taken by the load
    new_at = g_start[e_seg[new]] + before[new]  # grid point a new station precedes (sorted)
    hit_pos, hit_side, hit_double = _snapped(e_pos[hit], length[hit], e_pt[hit])
    new_pos, new_side, new_double = _snapped(e_pos[new], length[new], e_pt[new])
    # Index of every station before doubling: the grid points with the new stations among
    # them; then after doubling, each doubled station followed by its twin.
    n_new = new_at.size
    pre_new = new_at + np.arange(n_new)
    pre_hit = hit_g + np.searchsorted(new_at, hit_g, side="right")
    doubled = np.sort(np.concatenate((pre_hit[hit_double], pre_new[new_double])))

    def final(pre: np.ndarray) -> np.ndarray:
        return pre + np.searchsorted(doubled, pre, side="left")

    twin = doubled + np.arange(1, doubled.size + 1)
    at_new, at_hit = final(pre_new), final(pre_hit)
    ends_g = np.stack((g_start[:-1], g_start[1:] - 1), axis=1).ravel()  # first, last: sorted
    at_ends = final(ends_g + np.searchsorted(new_at, ends_g, side="right"))
    # Stations per segment, then the arrays: grid points where no other station is.
    seg_new = e_seg[new]
    seg_twin = np.concatenate((e_seg[hit][hit_double], seg_new[new_double]))
    per_seg = counts + np.bincount(seg_new, minlength=n_seg)
    per_seg += np.bincount(seg_twin, minlength=n_seg)
    start = np.zeros(n_seg + 1, dtype=np.intp)
    np.cumsum(per_seg, out=start[1:])
    total = int(start[-1])
    is_grid = np.ones(total, dtype=bool)
    is_grid[at_new] = False
    is_grid[twin] = False
    on_grid_at = np.flatnonzero(is_grid)
    pos = np.empty(total)
    pos[on_grid_at] = g_pos
    pos[at_new] = new_pos
    pos[at_hit] = hit_pos
    pos[twin] = pos[twin - 1]
    side = np.zeros(total, dtype=np.int8)
    side[at_ends] = np.tile(np.array([1, -1], dtype=np.int8), n_seg)
    side[at_new] = new_side
    side[at_hit] = hit_side
    side[twin - 1] = -1
    side[twin] = 1
    grid = np.full(total, -1, dtype=np.intp)
    grid[on_grid_at] = g_i
    grid[at_hit] = -1
    seg = np.repeat(np.arange(n_seg), per_seg)
    return seg, pos, side, start, grid


def _by_keys(
    lengths_mm: np.ndarray, n_div: np.ndarray, positions: _Positions
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """``station_arrays`` by keys: every grid point and other position as one integer key,
    searched and merged; for any grid (grid points closer than the tolerance are one
    station). Every station is reported off the grid (-1)."""
    e_seg, e_pos, e_pt, e_key = positions.seg, positions.pos, positions.point, positions.key
    key_off = positions.key_off
    n_seg = lengths_mm.size
    tol = POSITION_TOL_MM
    g_pos, g_i = _grid_points(lengths_mm, n_div)
    g_seg = np.repeat(np.arange(n_seg), n_div + 1)
    g_key = _grid_keys(lengths_mm[g_seg], g_i, n_div[g_seg]) + key_off[g_seg]
    keep = np.ones(g_key.size, dtype=bool)
    keep[1:] = g_key[1:] != g_key[:-1]
    useg, upos, ukey = g_seg[keep], g_pos[keep], g_key[keep]
    upt = np.zeros(useg.size, dtype=bool)
    at = np.searchsorted(ukey, e_key)
    on_grid = ukey[np.minimum(at, ukey.size - 1)] == e_key
    hit = at[on_grid & e_pt]  # a point load on a grid point: its position, and doubled
    upos[hit] = e_pos[on_grid & e_pt]
    upt[hit] = True
    new = ~on_grid
    useg, upos, upt = _insert(at[new], (useg, upos, upt), (e_seg[new], e_pos[new], e_pt[new]))
    ulen = lengths_mm[useg]
    at_start = upos <= tol
    at_end = upos >= ulen - tol
    upos[at_end] = ulen[at_end]
    upos[at_start] = 0.0
    side_u = np.where(at_end, -1, at_start).astype(np.int8)
    double = np.flatnonzero(upt & ~at_start & ~at_end)
    side_u[double] = -1
    st_seg, st_pos, side = _insert(
        double + 1, (useg, upos, side_u), (useg[double], upos[double], np.int8(1))
    )
    start = np.searchsorted(st_seg, np.arange(n_seg + 1)).astype(np.intp)
    return st_seg.astype(np.intp), st_pos, side, start, np.full(st_seg.size, -1, dtype=np.intp)


def _insert(
    at: np.ndarray, arrays: tuple[np.ndarray, ...], values: tuple[np.ndarray | np.generic, ...]
) -> tuple[np.ndarray, ...]:
    """``np.insert(a, at, v)`` for each array and its values, ``at`` ascending (the new
    entries' places worked out once)."""
    if not at.size:
        return arrays
    new = at + np.arange(at.size)
    keep = np.ones(arrays[0].size + at.size, dtype=bool)
    keep[new] = False
    old = np.flatnonzero(keep)  # indices: one pass over the mask for every array
    out = []
    for a, v in zip(arrays, values):
        r = np.empty(keep.size, dtype=a.dtype)
        r[old] = a
        r[new] = v
        out.append(r)
    return tuple(out)


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class FreeTerms:
    """Effect of each load on its own segment taken as a simple beam, at that segment's
    stations, as sparse entries (one per load and station; a case may repeat a station).

    ``m0`` free bending moment (kNm), ``v0`` free shear (kN), ``j0`` double integral
    ``int_0^x (x - t) M0(t) dt`` (kN m^3), which gives the deflection.
    """

    case: np.ndarray  # (n_entries,) int
    station: np.ndarray  # (n_entries,) int, ascending
    m0: np.ndarray
    v0: np.ndarray
    j0: np.ndarray


def free_terms(model: BeamModel, stations: Stations, table: LoadTable) -> FreeTerms:
    """Simple-beam statics of every load at the stations of its segment (vectorised)."""
    length_m = np.diff(np.asarray(model.node_x_mm, dtype=float)) / 1000.0
    case, st, m0, v0, j0 = free_term_arrays(
        stations.start, stations.local_mm, stations.side, length_m, table
    )
    return FreeTerms(
        case=_frozen(case), station=_frozen(st), m0=_frozen(m0), v0=_frozen(v0), j0=_frozen(j0)
    )


def free_term_arrays(
    start: np.ndarray,
    local_mm: np.ndarray,
    side: np.ndarray,
    length_m: np.ndarray,
    table: LoadTable,
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """(case, station, m0, v0, j0) of ``FreeTerms``, ordered by station (then load), for
    the stations (``start``, ``local_mm``, ``side`` as in ``Stations``) of segments of
    ``length_m`` side by side; ``table.segment`` indexes these segments."""
    seg_of_load = table.segment
    # Entries station by station, each station's in table order: a station of segment j
    # holds one entry per load on j. Only segments with loads are visited.
    n_loads = np.bincount(seg_of_load, minlength=length_m.size)
    segs = np.flatnonzero(n_loads)
    n_st = start[segs + 1] - start[segs]
    n_loads_s = n_loads[segs]
    first_st = np.cumsum(n_st) - n_st
    stations = np.repeat(start[segs] - first_st, n_st) + np.arange(int(n_st.sum()))
    reps = np.repeat(n_loads_s, n_st)  # entries per visited station
    first_load = np.cumsum(n_loads_s) - n_loads_s  # of each segment, loads sorted by segment
    base = np.repeat(first_load, n_st) - (np.cumsum(reps) - reps)
    by_segment = np.argsort(seg_of_load, kind="stable")
    load = by_segment[np.repeat(base, reps) + np.arange(int(reps.sum()))]
    st = np.repeat(stations, reps)
    # A line load over the whole segment (the common case): w times the unit-load statics
    # of the station, M0 = x (L - x) / 2, V0 = L / 2 - x, J0 = x^3 (2 L - x) / 24.
    x_s = local_mm[stations] / 1000.0
    l_s = np.repeat(length_m[segs], n_st)
    q = table.intensity[load]
    m0 = q * np.repeat(0.5 * x_s * (l_s - x_s), reps)
    v0 = q * np.repeat(0.5 * l_s - x_s, reps)
    j0 = q * np.repeat(x_s * x_s * x_s * (2.0 * l_s - x_s) / 24.0, reps)
    other = np.flatnonzero(~full_line_loads(table, length_m)[load])
    if other.size:
        m0[other], v0[other], j0[other] = _general_free_terms(
            table,
            load[other],
            np.repeat(x_s, reps)[other],
            np.repeat(l_s, reps)[other],
            side[st[other]],
        )
    return table.case[load], st, m0, v0, j0


def full_line_loads(table: LoadTable, length_m: np.ndarray) -> np.ndarray:
    """(n_loads,) bool: line loads over the whole of their segment (``length_m`` each)."""
    return ~table.is_point & (table.start_m == 0.0) & (table.end_m == length_m[table.segment])


def _general_free_terms(
    table: LoadTable,
    load: np.ndarray,
    x: np.ndarray,
    length: np.ndarray,
    side: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(m0, v0, j0) of point loads and partial line loads at entries at x (m) with the
    segment ``length`` (m) and the station's ``side``."""
    q = table.intensity[load]
    c = table.start_m[load]
    d = table.end_m[load]
    pt = table.is_point[load]
    # Point load P at a = c: left reaction P (L - a) / L.
    # Line load w on c..d: total W = w (d - c) at its centroid (c + d) / 2.
    total = np.where(pt, q, q * (d - c))
    r_a = total * (length - 0.5 * (c + d)) / length
    xc = np.maximum(x - c, 0.0)
    xd = np.maximum(x - d, 0.0)
    # Point load: is the load left of the section? Ties (station at the load) use the side.
    tie = np.abs(x - c) * 1000.0 <= POSITION_TOL_MM
    left_of = (x > c) & ~tie | tie & (side == 1)
    m0 = np.where(pt, r_a * x - q * xc, r_a * x - 0.5 * q * (xc * xc - xd * xd))
    m0[x >= length] = 0.0  # zero at the right node by statics; drop the round-off
    v0 = np.where(pt, r_a - q * left_of, r_a - q * (np.clip(x, c, d) - c))
    # Powers as products (pow is several times slower).
    xc2, xd2 = xc * xc, xd * xd
    rx3 = r_a * (x * x * x) / 6.0
    j0 = np.where(pt, rx3 - q * (xc2 * xc) / 6.0, rx3 - q * (xc2 * xc2 - xd2 * xd2) / 24.0)
    return m0, v0, j0
