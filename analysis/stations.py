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
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from analysis.beam import BeamModel, Load, PointLoad, UniformLoad

__all__ = ["FreeTerms", "LoadTable", "Stations", "build_stations", "free_terms", "load_table"]

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
        for a in (self.x_mm, self.segment, self.local_mm, self.side, self.start):
            a.setflags(write=False)

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


def build_stations(model: BeamModel, table: LoadTable) -> Stations:
    """Stations: a uniform grid at most L * model.station_spacing_fraction apart in every
    segment, plus support faces, load points and the ends of partial line loads."""
    frac = model.station_spacing_fraction
    if not (0.0 < frac <= 1.0):
        raise ValueError(f"station_spacing_fraction must be in (0, 1], got {frac}")
    n_seg = model.n_segments
    nodes = np.asarray(model.node_x_mm, dtype=float)
    lengths = np.diff(nodes)
    n_div = max(1, math.ceil(1.0 / frac - 1e-9))
    grid = lengths[:, None] * (np.arange(n_div + 1) / n_div)[None, :]  # (n_seg, n_div+1)
    seg_parts = [np.repeat(np.arange(n_seg), n_div + 1)]
    pos_parts = [grid.ravel()]
    pt_parts = [np.zeros(grid.size, dtype=bool)]
    # Support faces that fall inside a segment.
    half = np.asarray(model.support_width_mm, dtype=float) / 2.0
    left_face = (half[1:] > POSITION_TOL_MM) & (half[1:] < lengths - POSITION_TOL_MM)
    right_face = (half[:-1] > POSITION_TOL_MM) & (half[:-1] < lengths - POSITION_TOL_MM)
    seg_idx = np.arange(n_seg)
    seg_parts += [seg_idx[left_face], seg_idx[right_face]]
    pos_parts += [(lengths - half[1:])[left_face], half[:-1][right_face]]
    pt_parts += [np.zeros(int(left_face.sum()), bool), np.zeros(int(right_face.sum()), bool)]
    # Load points and line-load ends.
    seg_parts += [table.segment, table.segment]
    pos_parts += [table.start_m * 1000.0, table.end_m * 1000.0]
    pt_parts += [table.is_point, np.zeros(table.is_point.size, dtype=bool)]

    seg = np.concatenate(seg_parts)
    pos = np.concatenate(pos_parts)
    is_pt = np.concatenate(pt_parts)
    key = np.round(pos / POSITION_TOL_MM)
    order = np.lexsort((~is_pt, key, seg))  # point-load entries first within a group
    seg, pos, is_pt, key = seg[order], pos[order], is_pt[order], key[order]
    first = np.ones(seg.size, dtype=bool)
    first[1:] = (seg[1:] != seg[:-1]) | (key[1:] != key[:-1])
    grp = np.cumsum(first) - 1
    useg, upos = seg[first], pos[first]
    upt = np.zeros(useg.size, dtype=bool)
    np.logical_or.at(upt, grp, is_pt)
    ulen = lengths[useg]
    at_start = upos <= POSITION_TOL_MM
    at_end = upos >= ulen - POSITION_TOL_MM
    upos = np.where(at_start, 0.0, np.where(at_end, ulen, upos))
    double = upt & ~at_start & ~at_end
    reps = 1 + double.astype(np.intp)
    st_seg = np.repeat(useg, reps)
    st_pos = np.repeat(upos, reps)
    side = np.zeros(st_seg.size, dtype=np.int8)
    second = np.zeros(st_seg.size, dtype=bool)
    ends = np.cumsum(reps)
    second[ends[double] - 1] = True
    side[ends[double] - 2] = -1
    side[second] = 1
    side[np.repeat(at_start, reps)] = 1
    side[np.repeat(at_end, reps)] = -1
    start = np.searchsorted(st_seg, np.arange(n_seg + 1)).astype(np.intp)
    return Stations(
        x_mm=nodes[st_seg] + st_pos,
        segment=st_seg.astype(np.intp),
        local_mm=st_pos,
        side=side,
        start=start,
    )


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
    counts = np.diff(stations.start)[table.segment]
    n_e = int(counts.sum())
    load = np.repeat(np.arange(table.segment.size), counts)
    offs = np.arange(n_e) - np.repeat(np.cumsum(counts) - counts, counts)
    st = stations.start[table.segment][load] + offs
    length = (np.diff(np.asarray(model.node_x_mm, dtype=float)) / 1000.0)[table.segment][load]
    x = stations.local_mm[st] / 1000.0
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
    left_of = (x > c) & ~tie | tie & (stations.side[st] == 1)
    m0 = np.where(pt, r_a * x - q * xc, r_a * x - 0.5 * q * (xc**2 - xd**2))
    m0[x >= length] = 0.0  # zero at the right node by statics; drop the round-off
    v0 = np.where(pt, r_a - q * left_of, r_a - q * (np.clip(x, c, d) - c))
    j0 = np.where(
        pt, r_a * x**3 / 6.0 - q * xc**3 / 6.0, r_a * x**3 / 6.0 - q * (xc**4 - xd**4) / 24.0
    )
    order = np.argsort(st, kind="stable")
    return FreeTerms(
        case=_frozen(table.case[load][order]),
        station=_frozen(st[order]),
        m0=_frozen(m0[order]),
        v0=_frozen(v0[order]),
        j0=_frozen(j0[order]),
    )
