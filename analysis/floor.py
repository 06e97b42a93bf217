"""A whole floor of slab strips solved at once: one block-diagonal banded system.

Every strip (a ``BeamModel``) keeps its own DOFs, a disjoint range of the floor's, and its
own EI; the strips never couple, so the floor's stiffness is block-diagonal and banded. Its
blocks are factorised in lockstep (``analysis.banded.cholesky_banded_blocks``: column j of
every block at once) and every strip's load cases are right-hand-side columns; a strip with
fewer cases than the most gets zero columns (strips are taken in order of their number of
cases, so the station values of a run of strips with the same number carry none). Loads are
validated, stations built, end actions, node moments, reactions and free terms computed for
all strips together, by the functions of the single-strip solver (``analysis.stiffness``,
``analysis.load_table``, ``analysis.stations``) with the same arithmetic in the same order
(node and element arrays with the nodes or elements last, so that operations run along
them): ``solve_nodes_floor`` gives every strip bit for bit what ``solve_nodes`` gives it,
so envelopes built on either pick the same arrangement even where two tie. ``solve_floor``
then evaluates every station of every case by matrix products on the grid of each segment
(``analysis.floor_values``), which agrees with ``solve`` to round-off. The per-strip
result objects are views of the floor's arrays, made field by field for all strips at once.

The point is speed for many small strips (a floor of hundreds of 3-6 span strips): the cost
of the single solver is per call, not per DOF. Errors are those of the single solver for
the first bad strip, prefixed "model k: ".
"""

from __future__ import annotations

import dataclasses
import itertools
from collections import deque
from collections.abc import Sequence
from dataclasses import dataclass
from itertools import repeat
from operator import attrgetter
from typing import Any

import numpy as np

from analysis.banded import cholesky_banded_blocks
from analysis.beam import BeamModel, Load
from analysis.floor_values import station_values
from analysis.load_table import LoadTable, load_table, stacked_load_table
from analysis.stations import FreeTerms, Stations, free_term_arrays, station_arrays
from analysis.stiffness import (
    CaseResults,
    Frame,
    NodeSolution,
    band_entries,
    element_matrices,
    load_vectors,
    node_results,
    restraint_codes,
    segment_rows,
    solve_nodes,
)

__all__ = ["solve_floor", "solve_nodes_floor"]

FloorCases = Sequence[Sequence[Sequence[Load]]]
FloorNames = Sequence[Sequence[str] | None] | None


class _StripError(Exception):
    """Strip ``index`` of the floor is bad (internal; the caller words the error)."""

    def __init__(self, index: int, message: str, kind: type[Exception] = ValueError) -> None:
        super().__init__(message)
        self.index, self.message, self.kind = index, message, kind


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class _Floor:
    """Every strip's geometry, stations and node results side by side (internal). Node
    arrays are (n_cols, n_nodes) over all strips' nodes, as ``NodeSolution`` holds them; a
    strip's cases are its first rows. Offsets have one entry per strip plus one."""

    models: tuple[BeamModel, ...]
    n_cases: tuple[int, ...]
    node_off: np.ndarray  # first node of each strip
    seg_off: np.ndarray  # first segment (= element)
    st_off: np.ndarray  # first station
    frame: Frame
    ei_el: np.ndarray  # (n_el,) EI of each element, kNm2
    length_mm: np.ndarray  # (n_el,)
    n_div: np.ndarray  # (n_el,) grid divisions of each element (its strip's)
    table: LoadTable  # segments numbered over the floor, cases within each strip
    st_seg: np.ndarray  # (n_st,) floor segment of each station
    st_local_mm: np.ndarray  # (n_st,)
    st_side: np.ndarray  # (n_st,)
    st_start: np.ndarray  # (n_st_floor + 1,) stations of floor segment j: st_start[j]:[j+1]
    st_grid: np.ndarray  # (n_st,) grid point of each station, -1 off the grid
    stations: tuple[Stations, ...]
    node_m: np.ndarray
    reactions: np.ndarray
    node_v_m: np.ndarray
    node_theta: np.ndarray


def solve_nodes_floor(
    models: Sequence[BeamModel], cases: FloorCases, names: FloorNames = None
) -> tuple[NodeSolution, ...]:
    """``solve_nodes(models[k], cases[k], names[k])`` for every strip k, solved together.

    ``names`` optionally names the cases of each strip in error messages (one sequence or
    None per strip). Errors: those of ``solve_nodes`` for the first bad strip, prefixed
    "model k: ".
    """
    fl, order = _solve(models, cases, names)
    if fl is None:
        return ()
    # Free terms of every strip's loads at its stations, stations numbered within the strip.
    f_case, f_st, f_m0, f_v0, f_j0 = free_term_arrays(
        fl.st_start, fl.st_local_mm, fl.st_side, fl.frame.length_m, fl.table
    )
    free_off = np.searchsorted(f_st, fl.st_off)
    f_st = f_st - np.repeat(fl.st_off[:-1], np.diff(free_off))
    _freeze(f_case, f_st, f_m0, f_v0, f_j0)
    at_free = _slices(free_off.tolist())
    free_arrays = {"case": f_case, "station": f_st, "m0": f_m0, "v0": f_v0, "j0": f_j0}
    free = _new_many(
        FreeTerms, **{k: list(map(a.__getitem__, at_free)) for k, a in free_arrays.items()}
    )
    # What NodeSolution works out per segment (segments, cases), for every strip at once.
    m0, dm, y_rows = segment_rows(fl.node_m, fl.node_m, fl.node_v_m, fl.node_theta, fl.frame.left)
    per_segment = (m0, dm, *y_rows)
    length_m = fl.frame.length_m
    _freeze(*per_segment, length_m)
    n_cases = fl.n_cases
    node_m, reactions, node_v, theta = _node_views(
        fl, fl.node_m, fl.reactions, fl.node_v_m, fl.node_theta
    )
    seg_sl = _slices(fl.seg_off.tolist())
    at_segments = list(zip(seg_sl, map(slice, repeat(0), n_cases)))
    seg_m0, seg_dm, v_l, th_l, me_l, me_r = (
        list(map(a.__getitem__, at_segments)) for a in per_segment
    )
    made = _new_many(
        NodeSolution,
        model=fl.models,
        stations=fl.stations,
        free=free,
        node_moment_knm=node_m,
        elastic_node_moment_knm=node_m,
        reactions_kn=reactions,
        node_v_m=node_v,
        node_theta_rad=theta,
        _seg_m0=seg_m0,
        _seg_dm=seg_dm,
        _seg_y=list(zip(v_l, th_l, me_l, me_r)),
        _length_m=list(map(length_m.__getitem__, seg_sl)),
    )
    return tuple(map(made.__getitem__, np.argsort(order).tolist()))


def solve_floor(
    models: Sequence[BeamModel], cases: FloorCases, names: FloorNames = None
) -> tuple[CaseResults, ...]:
    """``solve(models[k], cases[k], names[k])`` for every strip k, solved together: every
    case at every station of every strip, evaluated for the whole floor at once."""
    fl, order = _solve(models, cases, names)
    if fl is None:
        return ()
    # Reactions, moments, deflections (mm) and rotations of the nodes, each (n_cols,
    # n_nodes): a strip's part of each is a view (cases, its nodes) as CaseResults holds it.
    deflection_mm = fl.node_v_m * 1000.0
    _freeze(deflection_mm)
    r, mn, dn, th = _node_views(fl, fl.reactions, fl.node_m, deflection_mm, fl.node_theta)
    st_off = fl.st_off.tolist()
    station_views: tuple[list[np.ndarray], ...] = ([], [], [])
    for g0, g1, values in station_values(fl):  # values (3, cases, stations of the run)
        base = st_off[g0]
        local = [s - base for s in st_off[g0 : g1 + 1]]
        at_stations = list(zip(repeat(slice(None)), _slices(local)))
        for views, q in zip(station_views, values):
            views.extend(map(q.__getitem__, at_stations))
    m, v, d = station_views
    made = _new_many(
        CaseResults,
        stations=fl.stations,
        m_knm=m,
        v_kn=v,
        deflection_mm=d,
        reactions_kn=r,
        node_moment_knm=mn,
        node_deflection_mm=dn,
        node_rotation_rad=th,
    )
    return tuple(map(made.__getitem__, np.argsort(order).tolist()))


def _freeze(*arrays: np.ndarray) -> None:
    for a in arrays:
        a.setflags(write=False)


def _node_views(fl: _Floor, *arrays: np.ndarray) -> list[list[np.ndarray]]:
    """Each strip's part (its cases, its nodes) of each floor node array (n_cols, n_nodes)."""
    at = list(zip(map(slice, repeat(0), fl.n_cases), _slices(fl.node_off.tolist())))
    return [list(map(a.__getitem__, at)) for a in arrays]


def _slices(offsets: list[int]) -> list[slice]:
    """slice(offsets[k], offsets[k + 1]) for every k."""
    return list(map(slice, offsets[:-1], offsets[1:]))


def _new_many(cls: type, **columns: Sequence[object]) -> list[Any]:
    """Objects of the frozen slots dataclass ``cls``, object k with ``columns[name][k]`` as
    its field ``name`` (every field, those ``__init__`` leaves to ``__post_init__`` too),
    for views of the floor's read-only arrays. The fields are set as ``__init__`` sets them
    but without ``__post_init__``: the caller has worked out for every strip at once what it
    works out (or it would only mark read-only views read-only again). Column by column at
    C level (``map``), not object by object in Python: hundreds of strips make thousands of
    these objects."""
    names = [f.name for f in dataclasses.fields(cls)]
    if sorted(columns) != sorted(names):
        raise TypeError(f"{cls.__name__} has fields {names}, got {list(columns)}")
    n = len(columns[names[0]])
    made = list(map(object.__new__, repeat(cls, n)))
    for name in names:
        if len(columns[name]) != n:
            raise ValueError(f"{cls.__name__}.{name}: {len(columns[name])} values for {n} objects")
        deque(map(getattr(cls, name).__set__, made, columns[name]), maxlen=0)
    return made


# --------------------------------------------------------------------------- the solve


def _names_of(names: FloorNames, k: int) -> Sequence[str] | None:
    return None if names is None else names[k]


def _solve(
    models: Sequence[BeamModel], cases: FloorCases, names: FloorNames
) -> tuple[_Floor | None, list[int]]:
    """The floor solve, strips ordered by their number of cases (stable), and that order
    (None and [] for no strips)."""
    models = tuple(models)
    if len(cases) != len(models):
        raise ValueError(f"{len(models)} models but {len(cases)} sets of cases: one per model")
    if names is not None and len(names) != len(models):
        raise ValueError(f"{len(models)} models but {len(names)} sets of case names")
    if not all(map(isinstance, models, repeat(BeamModel))):
        k, model = next((k, m) for k, m in enumerate(models) if not isinstance(m, BeamModel))
        raise TypeError(f"model {k}: expected a BeamModel, got {type(model).__name__}")
    try:
        counts = list(map(len, cases))
    except TypeError as exc:
        raise TypeError(f"cases: each model needs a sequence of cases ({exc})") from None
    order = sorted(range(len(models)), key=counts.__getitem__)
    if not order:
        return None, order
    try:
        return (
            _floor(
                tuple(map(models.__getitem__, order)),
                list(map(cases.__getitem__, order)),
                None if names is None else list(map(names.__getitem__, order)),
            ),
            order,
        )
    except _StripError as err:
        # The first bad strip in the given order, worded as the single solver words it.
        bad = order[err.index]
        for i in range(bad + 1):
            try:
                solve_nodes(models[i], cases[i], _names_of(names, i))
            except (ValueError, TypeError) as exc:
                raise type(exc)(f"model {i}: {exc}") from None
        raise err.kind(f"model {bad}: {err.message}") from None


def _offsets(counts: np.ndarray) -> np.ndarray:
    out = np.zeros(counts.size + 1, dtype=np.intp)
    np.cumsum(counts, out=out[1:])
    return out


def _floor(models: tuple[BeamModel, ...], cases: FloorCases, names: FloorNames) -> _Floor:
    n_models = len(models)
    # Every model's fields read by C-level iteration (attrgetter, map): no Python frame
    # per model.
    xs = list(map(attrgetter("node_x_mm"), models))
    n_nodes = np.fromiter(map(len, xs), np.intp, n_models)
    node_off = _offsets(n_nodes)
    seg_off = node_off - np.arange(n_models + 1)
    total = int(node_off[-1])
    chain = itertools.chain.from_iterable
    node_x = np.fromiter(chain(xs), float, total)
    widths = chain(map(attrgetter("support_width_mm"), models))
    half = np.fromiter(widths, float, total) / 2.0
    codes = restraint_codes(list(chain(map(attrgetter("restraints"), models))))
    model_of_node = np.repeat(np.arange(n_models), n_nodes)
    end = np.zeros(total, dtype=bool)
    end[node_off[:-1]] = True
    end[node_off[1:] - 1] = True
    bad = ~end & (codes != 1)
    if bad.any():
        i = int(np.argmax(bad))
        k = int(model_of_node[i])
        raise _StripError(k, f"node {i - node_off[k]}: interior supports must be PINNED")
    has_right = np.ones(total, dtype=bool)
    has_right[node_off[1:] - 1] = False
    left = np.flatnonzero(has_right)  # the left node of every element
    length_mm = node_x[left + 1] - node_x[left]
    frame = Frame(length_m=length_mm / 1000.0, left=left, restraint=codes, end=end)
    model_of_el = model_of_node[left]
    ei_el = np.array(list(map(attrgetter("ei_knm2"), models)), dtype=float)[model_of_el]
    frac = np.array(list(map(attrgetter("station_spacing_fraction"), models)), dtype=float)
    ok = (frac > 0.0) & (frac <= 1.0)
    if not ok.all():
        k = int(np.argmin(ok))
        raise _StripError(k, f"station_spacing_fraction must be in (0, 1], got {frac[k]}")
    n_div = np.maximum(1, np.ceil(1.0 / frac - 1e-9)).astype(np.intp)

    n_cases = tuple(map(len, cases))
    n_cols = max(n_cases, default=0)
    table = stacked_load_table(cases, n_cases, n_cols, n_nodes - 1, seg_off, length_mm)
    if table is None:
        table = _slow_table(models, cases, names, n_cols, seg_off)

    # Stations of every strip.
    st_seg, local, side, start, grid = station_arrays(
        length_mm, n_div[model_of_el], half[left], half[left + 1], table
    )
    st_off = start[seg_off]
    per_seg = np.diff(start)
    x_mm = np.repeat(node_x[left], per_seg) + local
    local_seg = np.repeat(np.arange(left.size) - seg_off[model_of_el], per_seg)
    starts = _strip_starts(start, seg_off, st_off, n_nodes - 1)
    _freeze(x_mm, local_seg, local, side, starts)
    stations = _strip_stations(x_mm, local_seg, local, side, starts, st_off, seg_off)

    # Stiffness: one block per strip, padded to the largest, factorised in lockstep.
    ke = element_matrices(frame.length_m, ei_el)
    free = frame.free_dofs()
    band_k, band_c, band_v = band_entries(ke, frame, free)
    dof_model = np.repeat(model_of_node, 2)[free]  # strip of each free DOF
    n_free = np.bincount(dof_model, minlength=n_models)
    red_off = _offsets(n_free)
    red_j = np.arange(dof_model.size) - red_off[dof_model]  # position within its block
    fe_el, f_t = load_vectors(frame, table)
    d_t = np.zeros_like(f_t)  # (n_cols, 2 n_nodes)
    n_b = int(n_free.max(initial=0))
    if n_b:
        p = int(band_k.max(initial=0))
        # Summed cell by cell in entry order (bincount, as np.add.at sums but faster).
        cell = (band_k * n_b + red_j[band_c]) * n_models + dof_model[band_c]
        ab = np.bincount(cell, band_v, (p + 1) * n_b * n_models).reshape(p + 1, n_b, n_models)
        ab[0] += np.arange(n_b)[:, None] >= n_free[None, :]  # padding: identity
        factor, singular = cholesky_banded_blocks(ab)
        if singular.any():
            k = int(np.argmax(singular))
            raise _StripError(k, "the beam model is a mechanism (not enough supports)")
        rhs = np.zeros((n_b, n_models, n_cols))
        rhs[red_j, dof_model] = f_t[:, free].T
        d_t[:, free] = factor.solve(rhs)[red_j, dof_model].T
    node_m, reactions = node_results(frame, ke, d_t, fe_el)
    node_arrays = [node_m, reactions, d_t[:, 0::2], d_t[:, 1::2]]
    _freeze(*node_arrays)
    return _Floor(
        models,
        n_cases,
        node_off,
        seg_off,
        st_off,
        frame,
        ei_el,
        length_mm,
        n_div[model_of_el],
        table,
        st_seg,
        local,
        side,
        start,
        grid,
        stations,
        *node_arrays,
    )


def _strip_stations(
    x_mm: np.ndarray,
    local_seg: np.ndarray,
    local_mm: np.ndarray,
    side: np.ndarray,
    starts: np.ndarray,
    st_off: np.ndarray,
    seg_off: np.ndarray,
) -> tuple[Stations, ...]:
    """Each strip's ``Stations``, views of the floor's arrays."""
    at = _slices(st_off.tolist())
    # Strip k's segment starts: its n_seg + 1 entries, from seg_off[k] + k.
    start_off = (seg_off + np.arange(seg_off.size)).tolist()
    columns = {
        name: list(map(a.__getitem__, at))
        for name, a in (
            ("x_mm", x_mm),
            ("segment", local_seg),
            ("local_mm", local_mm),
            ("side", side),
        )
    }
    columns["start"] = list(map(starts.__getitem__, _slices(start_off)))
    return tuple(_new_many(Stations, **columns))


def _strip_starts(
    start: np.ndarray, seg_off: np.ndarray, st_off: np.ndarray, n_seg: np.ndarray
) -> np.ndarray:
    """Each strip's ``Stations.start`` (n_seg + 1 entries, from 0), one after the other."""
    counts = n_seg + 1
    strip = np.repeat(np.arange(n_seg.size), counts)
    within = np.arange(int(counts.sum())) - _offsets(counts)[strip]
    return start[seg_off[strip] + within] - st_off[strip]


# --------------------------------------------------------------------------- loads


def _slow_table(
    models: tuple[BeamModel, ...],
    cases: FloorCases,
    names: FloorNames,
    n_cols: int,
    seg_off: np.ndarray,
) -> LoadTable:
    """The floor's load table from ``load_table`` strip by strip (any load the single
    solver accepts); the first bad strip raises."""
    tables = []
    for k, model in enumerate(models):
        try:
            tables.append(load_table(model, cases[k], _names_of(names, k)))
        except (ValueError, TypeError) as exc:
            raise _StripError(k, str(exc), type(exc)) from None
    cat = np.concatenate
    return LoadTable(
        n_cases=n_cols,
        case=cat([t.case for t in tables] + [np.zeros(0, np.intp)]),
        segment=cat(
            [t.segment + seg_off[k] for k, t in enumerate(tables)] + [np.zeros(0, np.intp)]
        ),
        is_point=cat([t.is_point for t in tables] + [np.zeros(0, bool)]),
        intensity=cat([t.intensity for t in tables] + [np.zeros(0)]),
        start_m=cat([t.start_m for t in tables] + [np.zeros(0)]),
        end_m=cat([t.end_m for t in tables] + [np.zeros(0)]),
    )
