"""Every load of every case of a beam (or of many beams side by side) as flat arrays,
validated against the beam and with positions snapped to the nodes: the form in which the
solvers (``analysis.stiffness``, ``analysis.floor``) and the stations (``analysis.stations``)
read loads.
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

__all__ = ["POSITION_TOL_MM", "LoadTable", "load_table", "stacked_load_table"]

# Positions closer than this (mm) are the same position (a node, a station).
POSITION_TOL_MM = 1.0e-6


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
