"""A whole floor of slab strips solved at once: one block-diagonal banded system.

Every strip (a ``BeamModel``) keeps its own DOFs, a disjoint range of the floor's, and its
own EI; the strips never couple, so the floor's stiffness is block-diagonal and banded. Its
blocks are factorised in lockstep (``analysis.banded.cholesky_banded_blocks``: column j of
every block at once) and every strip's load cases are right-hand-side columns; a strip with
fewer cases than the most gets zero columns (strips are taken in order of their number of
cases, so the station values of a run of strips with the same number carry none). Loads are
validated, stations built, end actions, node moments, reactions and free terms computed for
all strips together, by the functions of the single-strip solver (``analysis.stiffness``,
``analysis.stations``) with the same arithmetic in the same order: ``solve_nodes_floor``
gives every strip bit for bit what ``solve_nodes`` gives it, so envelopes built on either
pick the same arrangement even where two tie. ``solve_floor`` then evaluates every station
of every case by matrix products on the grid of each segment (``analysis.floor_values``),
which agrees with ``solve`` to round-off. Only the per-strip result objects are made one
strip at a time, as views of the floor's arrays.

The point is speed for many small strips (a floor of hundreds of 3-6 span strips): the cost
of the single solver is per call, not per DOF. Errors are those of the single solver for
the first bad strip, prefixed "model k: ".
"""

from __future__ import annotations

import dataclasses
import itertools
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from operator import attrgetter
from typing import Any

import numpy as np

from analysis.banded import cholesky_banded_blocks
from analysis.beam import BeamModel, Load
from analysis.floor_values import station_values
from analysis.stations import (
    FreeTerms,
    LoadTable,
    Stations,
    free_term_arrays,
    load_table,
    stacked_load_table,
    station_arrays,
)
from analysis.stiffness import (
    CaseResults,
    Frame,
    NodeSolution,
    band_entries,
    element_matrices,
    load_vectors,
    node_results,
    restraint_codes,
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
    arrays are (n_nodes, n_cols) over all strips' nodes (a node's cases are one row); a
    strip's cases are its first columns. Offsets have one entry per strip plus one."""

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
    st = fl.stations
    f_case, f_st, f_m0, f_v0, f_j0 = free_term_arrays(
        fl.st_start, fl.st_local_mm, fl.st_side, fl.frame.length_m, fl.table
    )
    st_off = fl.st_off.tolist()
    free_off = np.searchsorted(f_st, fl.st_off).tolist()
    node_off = fl.node_off.tolist()
    out: list[NodeSolution | None] = [None] * len(order)
    for k, (model, stations) in enumerate(zip(fl.models, st)):
        e0, e1 = free_off[k], free_off[k + 1]
        n0, n1 = node_off[k], node_off[k + 1]
        nc = fl.n_cases[k]
        free = FreeTerms(
            case=f_case[e0:e1],
            station=f_st[e0:e1] - st_off[k],
            m0=f_m0[e0:e1],
            v0=f_v0[e0:e1],
            j0=f_j0[e0:e1],
        )
        node_m = fl.node_m[n0:n1, :nc].T
        out[order[k]] = NodeSolution(
            model=model,
            stations=stations,
            free=free,
            node_moment_knm=node_m,
            elastic_node_moment_knm=node_m,
            reactions_kn=fl.reactions[n0:n1, :nc].T,
            node_v_m=fl.node_v_m[n0:n1, :nc].T,
            node_theta_rad=fl.node_theta[n0:n1, :nc].T,
        )
    return tuple(out)  # type: ignore[arg-type]


def solve_floor(
    models: Sequence[BeamModel], cases: FloorCases, names: FloorNames = None
) -> tuple[CaseResults, ...]:
    """``solve(models[k], cases[k], names[k])`` for every strip k, solved together: every
    case at every station of every strip, evaluated for the whole floor at once."""
    fl, order = _solve(models, cases, names)
    if fl is None:
        return ()
    # Reactions, moments, deflections (mm) and rotations of the nodes, one array.
    nodes = np.stack((fl.reactions, fl.node_m, fl.node_v_m * 1000.0, fl.node_theta))
    _freeze(nodes)
    st_off, node_off, n_cases = fl.st_off.tolist(), fl.node_off.tolist(), fl.n_cases
    out: list[CaseResults | None] = [None] * len(order)
    for g0, g1, values in station_values(fl):
        base = st_off[g0]
        for k in range(g0, g1):
            m, v, d = values[:, :, st_off[k] - base : st_off[k + 1] - base]
            r, mn, dn, th = nodes[:, node_off[k] : node_off[k + 1], : n_cases[k]].transpose(0, 2, 1)
            out[order[k]] = _case_results(fl.stations[k], m, v, d, r, mn, dn, th)
    return tuple(out)  # type: ignore[arg-type]


def _freeze(*arrays: np.ndarray) -> None:
    for a in arrays:
        a.setflags(write=False)


def _of_views(cls: type) -> Callable[..., Any]:
    """A constructor of the frozen slots dataclass ``cls`` from its fields in order, for
    views of the floor's read-only arrays: the fields are set as ``__init__`` sets them,
    without ``__post_init__`` (which would only mark read-only views read-only again).
    Hundreds of strips make thousands of these objects; this is a third of their cost."""
    setters = [getattr(cls, f.name).__set__ for f in dataclasses.fields(cls)]
    new = object.__new__

    def make(*values: object) -> Any:
        obj = new(cls)
        for put, value in zip(setters, values, strict=True):
            put(obj, value)
        return obj

    return make


_case_results = _of_views(CaseResults)
_stations = _of_views(Stations)


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
    for k, model in enumerate(models):
        if not isinstance(model, BeamModel):
            raise TypeError(f"model {k}: expected a BeamModel, got {type(model).__name__}")
    try:
        counts = [len(c) for c in cases]
    except TypeError as exc:
        raise TypeError(f"cases: each model needs a sequence of cases ({exc})") from None
    order = sorted(range(len(models)), key=counts.__getitem__)
    if not order:
        return None, order
    try:
        return (
            _floor(
                tuple(models[i] for i in order),
                [cases[i] for i in order],
                None if names is None else [names[i] for i in order],
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
    st_seg, local, side, start = station_arrays(
        length_mm, n_div[model_of_el], half[left], half[left + 1], table
    )
    st_off = start[seg_off]
    x_mm = node_x[left][st_seg] + local
    local_seg = st_seg - seg_off[model_of_el[st_seg]]
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
    fe_el, f_full = load_vectors(frame, table)
    d_full = np.zeros_like(f_full)
    n_b = int(n_free.max(initial=0))
    if n_b:
        p = int(band_k.max(initial=0))
        ab = np.zeros((p + 1, n_b, n_models))
        ab[0] = np.arange(n_b)[:, None] >= n_free[None, :]  # padding: identity
        np.add.at(ab, (band_k, red_j[band_c], dof_model[band_c]), band_v)
        factor, singular = cholesky_banded_blocks(ab)
        if singular.any():
            k = int(np.argmax(singular))
            raise _StripError(k, "the beam model is a mechanism (not enough supports)")
        rhs = np.zeros((n_b, n_models, n_cols))
        rhs[red_j, dof_model] = f_full[free]
        d_full[free] = factor.solve(rhs)[red_j, dof_model]
    node_m, reactions = node_results(frame, ke, d_full, fe_el)
    node_arrays = [node_m, reactions, d_full[0::2], d_full[1::2]]
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
    out = []
    st, sg = st_off.tolist(), seg_off.tolist()
    for k in range(len(st) - 1):
        a, b = st[k], st[k + 1]
        s0 = sg[k] + k
        out.append(
            _stations(
                x_mm[a:b],
                local_seg[a:b],
                local_mm[a:b],
                side[a:b],
                starts[s0 : s0 + sg[k + 1] - sg[k] + 1],
            )
        )
    return tuple(out)


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
