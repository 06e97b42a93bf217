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

import itertools
import math
import operator
from collections.abc import Sequence
from dataclasses import dataclass
from operator import attrgetter

import numpy as np

from analysis.beam import BeamModel, Load, PointLoad, UniformLoad

__all__ = [
    "FreeTerms",
    "LoadTable",
    "Stations",
    "build_stations",
    "free_term_arrays",
    "free_terms",
    "full_line_loads",
    "load_table",
    "stacked_load_table",
    "station_arrays",
]

# Positions closer than this (mm) are the same station.
POSITION_TOL_MM = 1.0e-6


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


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class LoadTable:
    """All loads of all cases as flat arrays (validated). Lengths in m, forces in kN."""

    n_cases: int
    case: np.ndarray  # (n_loads,) int
    segment: np.ndarray  # (n_loads,) int
    is_point: np.ndarray  # (n_loads,) bool
    intensity: np.ndarray  # (n_loads,) P in kN (point) or w in kN/m (line)
    start_m: np.ndarray  # (n_loads,) a (point) or start of the line load, from the left node
    end_m: np.ndarray  # (n_loads,) a (point) or end of the line load


def _fail(where: str, what: str) -> ValueError:
    return ValueError(f"{where}: {what}")


def _where(names: Sequence[str] | None, k: int, i: int) -> str:
    return f"{names[k] if names is not None else f'case {k}'}, load {i}"


def load_table(
    model: BeamModel, cases: Sequence[Sequence[Load]], names: Sequence[str] | None = None
) -> LoadTable:
    """Validate the loads of every case against the model and flatten them.

    ``names`` optionally names each case in error messages (default "case k").
    """
    n_seg = model.n_segments
    lengths = [model.segment_length_mm(j) for j in range(n_seg)]
    case, seg, is_point, inten, start, end = [], [], [], [], [], []
    isfinite = math.isfinite
    tol = POSITION_TOL_MM
    for k, loads in enumerate(cases):
        for i, load in enumerate(loads):
            if not isinstance(load, (UniformLoad, PointLoad)):
                raise TypeError(
                    f"{_where(names, k, i)}: expected UniformLoad or PointLoad, "
                    f"got {type(load).__name__}"
                )
            j = load.segment
            if type(j) is not int and (isinstance(j, bool) or not isinstance(j, np.integer)):
                raise TypeError(f"{_where(names, k, i)}: segment {j!r} must be an integer index")
            if not 0 <= j < n_seg:
                raise _fail(
                    _where(names, k, i),
                    f"segment {j!r} does not exist (the strip has segments 0 to {n_seg - 1})",
                )
            length = lengths[j]
            if isinstance(load, PointLoad):
                a = load.a_mm
                if not isfinite(load.p_kn):
                    raise _fail(_where(names, k, i), "point load must be a finite number of kN")
                if not (isfinite(a) and -tol <= a <= length + tol):
                    raise _fail(
                        _where(names, k, i),
                        f"a_mm = {a!r} must lie on the segment (0..{length} mm)",
                    )
                a = 0.0 if a <= tol else (length if a >= length - tol else a)
                lo = hi = a
                is_point.append(True)
                inten.append(float(load.p_kn))
            else:
                if not isfinite(load.w_kn_per_m):
                    raise _fail(_where(names, k, i), "line load must be a finite number of kN/m")
                lo = 0.0 if load.start_mm is None else load.start_mm
                hi = length if load.end_mm is None else load.end_mm
                if not (isfinite(lo) and isfinite(hi)):
                    raise _fail(_where(names, k, i), "start_mm and end_mm must be finite")
                if lo < -tol or hi > length + tol:
                    raise _fail(
                        _where(names, k, i),
                        f"line load {lo}..{hi} mm is outside the segment (0..{length} mm)",
                    )
                if not hi - lo > tol:
                    raise _fail(
                        _where(names, k, i), f"line load needs start_mm < end_mm (got {lo}..{hi})"
                    )
                lo = 0.0 if lo <= tol else lo  # snap to the nodes within the tolerance
                hi = length if hi >= length - tol else hi
                is_point.append(False)
                inten.append(float(load.w_kn_per_m))
            case.append(k)
            seg.append(int(j))
            start.append(lo / 1000.0)
            end.append(hi / 1000.0)
    return LoadTable(
        n_cases=len(cases),
        case=np.array(case, dtype=np.intp),
        segment=np.array(seg, dtype=np.intp),
        is_point=np.array(is_point, dtype=bool),
        intensity=np.array(inten, dtype=float),
        start_m=np.array(start, dtype=float),
        end_m=np.array(end, dtype=float),
    )


_LINE_FIELDS = ("w_kn_per_m", "start_mm", "end_mm")
_POINT_FIELDS = ("p_kn", "a_mm")
_NUMBER = {int, float}
_NUMBER_OR_NONE = {int, float, type(None)}


def stacked_load_table(
    cases: Sequence[Sequence[Sequence[Load]]],
    n_cases: tuple[int, ...],
    n_cols: int,
    n_seg: np.ndarray,
    seg_off: np.ndarray,
    length_mm: np.ndarray,
) -> LoadTable | None:
    """``load_table`` of many beams side by side (``analysis.floor``) for plain loads.

    ``cases[k]`` are the cases of beam k, which has ``n_seg[k]`` segments, the first one
    numbered ``seg_off[k]`` among all segments (of ``length_mm``); the table numbers the
    segments over all beams and the cases within each beam (``n_cols`` columns). Every load
    must be a ``UniformLoad`` or ``PointLoad`` of plain ints and floats, valid as
    ``load_table`` checks it; otherwise the result is None (then ``load_table`` beam by beam
    words the first bad load, or takes the unusual number types). The same positions are
    snapped to the nodes as ``load_table`` snaps them.
    """
    chain = itertools.chain.from_iterable
    try:
        case_lists = list(chain(cases))  # every case of every strip
        per_case = list(map(len, case_lists))
        flat = list(chain(case_lists))
    except TypeError:
        return None
    # The loads' own attributes, read by C-level iteration (no object per load).
    kinds = list(map(type, flat))
    if not set(kinds) <= {UniformLoad, PointLoad}:
        return None
    is_p = list(map(operator.is_, kinds, itertools.repeat(PointLoad)))
    lines = list(itertools.compress(flat, map(operator.not_, is_p)))
    points = list(itertools.compress(flat, is_p))
    seg_l = list(map(attrgetter("segment"), flat))
    q_w, lo_w, hi_w = (list(map(attrgetter(n), lines)) for n in _LINE_FIELDS)
    q_p, a_p = (list(map(attrgetter(n), points)) for n in _POINT_FIELDS)
    if not (
        set(map(type, seg_l)) <= {int}
        and set(map(type, q_w)) | set(map(type, q_p)) | set(map(type, a_p)) <= _NUMBER
        and all(
            v.count(None) == len(v) or set(map(type, v)) <= _NUMBER_OR_NONE for v in (lo_w, hi_w)
        )
    ):
        return None
    n_loads = len(flat)
    pt = np.fromiter(is_p, bool, n_loads)
    w = ~pt
    try:
        seg = np.fromiter(seg_l, np.intp, n_loads)
        q, lo, hi = np.empty(n_loads), np.empty(n_loads), np.empty(n_loads)
        q[w], q[pt] = _floats(q_w), _floats(q_p)
        lo[w], hi[w] = _floats(lo_w), _floats(hi_w)  # None -> nan
        lo[pt] = hi[pt] = _floats(a_p)
    except OverflowError:
        return None
    lo_nan, hi_nan = np.isnan(lo), np.isnan(hi)
    if (lo_nan & pt).any() or int(lo_nan.sum() + hi_nan.sum()) != lo_w.count(None) + hi_w.count(
        None
    ):
        return None  # a position that is nan (not None), or None on a point load
    n_strip_cases = np.array(n_cases, dtype=np.intp)
    case_strip = np.repeat(np.arange(n_strip_cases.size), n_strip_cases)
    g_case = np.repeat(np.arange(case_strip.size), np.array(per_case, dtype=np.intp))
    strip = case_strip[g_case]
    case = g_case - (np.cumsum(n_strip_cases) - n_strip_cases)[strip]
    if ((seg < 0) | (seg >= n_seg[strip])).any():
        return None
    g_seg = seg + seg_off[strip]
    length = length_mm[g_seg]
    tol = POSITION_TOL_MM
    lo = np.where(lo_nan, 0.0, lo)
    hi = np.where(hi_nan, length, hi)
    with np.errstate(invalid="ignore"):
        ok_pt = np.isfinite(lo) & (lo >= -tol) & (lo <= length + tol)
        ok_w = (
            np.isfinite(lo)
            & np.isfinite(hi)
            & (lo >= -tol)
            & (hi <= length + tol)
            & (hi - lo > tol)
        )
    if not (np.isfinite(q).all() and np.where(pt, ok_pt, ok_w).all()):
        return None
    # Snap to the nodes within the tolerance, as ``load_table`` does.
    lo = np.where(lo <= tol, 0.0, np.where(pt & (lo >= length - tol), length, lo))
    hi = np.where(pt, lo, np.where(hi >= length - tol, length, hi))
    return LoadTable(
        n_cases=n_cols,
        case=case,
        segment=g_seg,
        is_point=pt,
        intensity=q,
        start_m=lo / 1000.0,
        end_m=hi / 1000.0,
    )


def _floats(values: list) -> np.ndarray:
    """float array of numbers and None (nan); all None is the common case."""
    if values.count(None) == len(values):
        return np.full(len(values), np.nan)
    return np.array(values, dtype=float)


def build_stations(model: BeamModel, table: LoadTable) -> Stations:
    """Stations: a uniform grid at most L * model.station_spacing_fraction apart in every
    segment, plus support faces, load points and the ends of partial line loads."""
    frac = model.station_spacing_fraction
    if not (0.0 < frac <= 1.0):
        raise ValueError(f"station_spacing_fraction must be in (0, 1], got {frac}")
    nodes = np.asarray(model.node_x_mm, dtype=float)
    half = np.asarray(model.support_width_mm, dtype=float) / 2.0
    n_div = np.full(model.n_segments, max(1, math.ceil(1.0 / frac - 1e-9)))
    seg, local, side, start = station_arrays(np.diff(nodes), n_div, half[:-1], half[1:], table)
    return Stations(x_mm=nodes[seg] + local, segment=seg, local_mm=local, side=side, start=start)


def station_arrays(
    lengths_mm: np.ndarray,
    n_div: np.ndarray,
    half_l: np.ndarray,
    half_r: np.ndarray,
    table: LoadTable,
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """(segment, local_mm, side, start) of the stations of segments side by side (those of
    one beam, or of many beams stacked: ``analysis.floor``).

    Segment j has length ``lengths_mm[j]``, ``n_div[j]`` grid divisions and supports of half
    width ``half_l[j]`` / ``half_r[j]`` at its left / right node; ``table.segment`` indexes
    these segments. ``start`` has one entry per segment plus one.
    """
    n_seg = lengths_mm.size
    tol = POSITION_TOL_MM
    # The other positions, in this order: support faces that fall inside a segment, load
    # points, and the ends of line loads not at the ends of their segment (those coincide
    # with grid points and change nothing).
    left_face = (half_r > tol) & (half_r < lengths_mm - tol)
    right_face = (half_l > tol) & (half_l < lengths_mm - tol)
    seg_idx = np.arange(n_seg)
    lo_mm, hi_mm = table.start_m * 1000.0, table.end_m * 1000.0
    # Positions are integers of the tolerance; those of segment j are offset by the keys
    # of the segments before it, so that one integer orders (segment, position).
    key_l = np.round(lengths_mm / tol)
    key_off = np.zeros(n_seg + 1, dtype=np.int64)
    np.cumsum(key_l.astype(np.int64) + 2, out=key_off[1:])
    end_key = key_off[table.segment] + key_l[table.segment].astype(np.int64)
    hi_key = key_off[table.segment] + np.round(hi_mm / tol).astype(np.int64)
    lo_in = table.is_point | (lo_mm != 0.0)
    hi_in = ~table.is_point & (hi_key != end_key)
    e_seg = np.concatenate(
        [seg_idx[left_face], seg_idx[right_face], table.segment[lo_in], table.segment[hi_in]]
    )
    e_pos = np.concatenate(
        [(lengths_mm - half_r)[left_face], half_l[right_face], lo_mm[lo_in], hi_mm[hi_in]]
    )
    e_pt = np.zeros(e_seg.size, dtype=bool)
    n_faces = int(left_face.sum() + right_face.sum())
    e_pt[n_faces : n_faces + int(lo_in.sum())] = table.is_point[lo_in]
    e_key = key_off[e_seg] + np.round(e_pos / tol).astype(np.int64)
    g_seg, g_pos, g_key = _grid(lengths_mm, n_div, key_off)
    # Groups of equal (segment, key) are one station; its position is that of the group's
    # first entry, point loads first, then in the order above (the grid first of all).
    if n_seg and (lengths_mm / n_div).min() > 2.0 * tol:
        useg, upos, ukey = g_seg, g_pos, g_key  # grid points a key apart at least
    else:
        keep = np.ones(g_key.size, dtype=bool)
        keep[1:] = g_key[1:] != g_key[:-1]
        useg, upos, ukey = g_seg[keep], g_pos[keep], g_key[keep]
    upt = np.zeros(useg.size, dtype=bool)
    order = np.argsort(e_key * 2 + ~e_pt, kind="stable")
    e_key, e_seg, e_pos, e_pt = e_key[order], e_seg[order], e_pos[order], e_pt[order]
    e_first = np.ones(e_key.size, dtype=bool)
    e_first[1:] = e_key[1:] != e_key[:-1]
    e_key, e_seg, e_pos, e_pt = e_key[e_first], e_seg[e_first], e_pos[e_first], e_pt[e_first]
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
    # A point load inside a segment doubles its station: the limits from left and right.
    double = np.flatnonzero(upt & ~at_start & ~at_end)
    side_u[double] = -1
    st_seg, st_pos, side = _insert(
        double + 1, (useg, upos, side_u), (useg[double], upos[double], np.int8(1))
    )
    start = np.searchsorted(st_seg, np.arange(n_seg + 1)).astype(np.intp)
    return st_seg.astype(np.intp), st_pos, side, start


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


def _grid(
    lengths_mm: np.ndarray, n_div: np.ndarray, key_off: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(segment, position, key) of the grid points L i / n, segment by segment."""
    n_seg = lengths_mm.size
    n = int(n_div[0]) if n_seg else 1
    if n_seg and (n_div == n).all():  # one spacing for every segment: one product
        g_pos = lengths_mm[:, None] * (np.arange(n + 1) / n)[None, :]
        g_seg = np.repeat(np.arange(n_seg), n + 1)
    else:
        counts = n_div + 1
        g_seg = np.repeat(np.arange(n_seg), counts)
        step = np.arange(g_seg.size) - np.repeat(np.cumsum(counts) - counts, counts)
        g_pos = np.repeat(lengths_mm, counts) * (step / np.repeat(n_div, counts))
    key = g_pos / POSITION_TOL_MM
    np.round(key, out=key)
    g_key = key.astype(np.int64)
    g_key += key_off[:-1, None] if g_key.ndim == 2 else key_off[g_seg]
    return g_seg, g_pos.ravel(), g_key.ravel()


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
    m0 = np.where(pt, r_a * x - q * xc, r_a * x - 0.5 * q * (xc**2 - xd**2))
    m0[x >= length] = 0.0  # zero at the right node by statics; drop the round-off
    v0 = np.where(pt, r_a - q * left_of, r_a - q * (np.clip(x, c, d) - c))
    j0 = np.where(
        pt, r_a * x**3 / 6.0 - q * xc**3 / 6.0, r_a * x**3 / 6.0 - q * (xc**4 - xd**4) / 24.0
    )
    return m0, v0, j0
