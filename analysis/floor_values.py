"""Every station of every case of a floor solved by ``analysis.floor``: M, V and deflection
evaluated for all strips at once, by matrix products on the grid of each segment.

Split from ``analysis.floor`` (the solve) because it is a concept of its own: turning node
results into station values. It agrees with ``analysis.stiffness.solve`` to round-off.
"""

from __future__ import annotations

import functools
from collections.abc import Iterator
from typing import TYPE_CHECKING

import numpy as np

from analysis.load_table import LoadTable
from analysis.stations import free_term_arrays, full_line_loads

if TYPE_CHECKING:
    from analysis.floor import _Floor

__all__ = ["station_values"]


def station_values(
    fl: _Floor,
) -> Iterator[tuple[int, int, np.ndarray]]:
    """(first strip, end strip, values) for each run of strips with the same number of
    cases and grid; values (3, n_cases, stations of the run): M, V and deflection.

    Within a segment M is the straight line between the end moments plus w x (L - x) / 2
    for the line loads over the whole segment (w their sum per case), V is its derivative,
    and the deflection is v + theta x - (M_l c1 + M_r c2 + w J) / EI, integrated twice from
    the left node (c1 = x^2/2 - x^3/(6L), c2 = x^3/(6L), J = x^3 (2L - x) / 24), as in
    ``analysis.stiffness``; point loads and partial line loads add their free terms. Each
    is a sum of shapes times coefficients per segment and case: on the grid (x = L i/n) the
    shapes are the same for every segment, so one matrix product gives every grid station;
    the few stations off the grid (support faces, load points) are evaluated one by one.
    """
    frame, table = fl.frame, fl.table
    n_cols = fl.node_m.shape[0]
    left, right = frame.left, frame.left + 1
    length = frame.length_m
    full = full_line_loads(table, length)
    # Summed per (case, segment) in table order (bincount, as np.add.at sums but faster).
    w = np.bincount(
        table.case[full] * length.size + table.segment[full],
        table.intensity[full],
        n_cols * length.size,
    ).reshape(n_cols, length.size)
    k_ei = -1000.0 / fl.ei_el
    m_l, m_r = fl.node_m[:, left], fl.node_m[:, right]
    # Per case (rows) and segment (columns).
    rows = {
        "m_l": m_l,
        "m_r": m_r,
        "w": w,
        "slope": (m_r - m_l) / length,
        "v_l": fl.node_v_m[:, left] * 1000.0,
        "th_l": fl.node_theta[:, left] * 1000.0,
    }
    coefficients = _grid_coefficients(rows, length, k_ei)
    # Per station: its grid point (stations off the grid are evaluated on their own).
    seg = fl.st_seg
    local = fl.st_local_mm
    grid_i = fl.st_grid
    off = np.flatnonzero(grid_i < 0)
    extra = _off_grid(rows, seg[off], local[off] / 1000.0, length, k_ei)
    # Free terms of the other loads, at every station of their segments.
    f_case, f_st, f_m0, f_v0, f_j0 = free_term_arrays(
        fl.st_start, local, fl.st_side, length, _rows_of(table, ~full)
    )
    f_j0 = f_j0 * k_ei[seg[f_st]]
    # One buffer for every output, each run's part of it in turn: (3, stations, cases),
    # so that a station's values of every case are one row (see ``_on_grid``).
    st_off, seg_off, n_cases = fl.st_off.tolist(), fl.seg_off.tolist(), fl.n_cases
    el_div, st_start = fl.n_div.tolist(), fl.st_start.tolist()
    scratch = np.empty(0)
    n_st = np.diff(fl.st_off)
    buffer = np.empty(3 * int(np.dot(n_st, np.array(n_cases, dtype=np.intp))))
    used = 0
    k = 0
    while k < len(n_cases):
        g1 = k + 1
        key = (n_cases[k], el_div[seg_off[k]])
        while g1 < len(n_cases) and (n_cases[g1], el_div[seg_off[g1]]) == key:
            g1 += 1
        nc, n = key
        a, b = st_off[k], st_off[g1]
        out = buffer[used : used + 3 * nc * (b - a)].reshape(3, b - a, nc)
        used += out.size
        if scratch.size < nc * _SEGMENTS * (n + 1):
            scratch = np.empty(nc * _SEGMENTS * (n + 1))
        _on_grid(coefficients, n, seg, grid_i, st_start, seg_off[k], seg_off[g1], out, a, scratch)
        o0, o1 = np.searchsorted(off, [a, b])
        if o1 > o0:
            for o, x in zip(out, extra):
                o[off[o0:o1] - a] = x[:nc, o0:o1].T
        f0, f1 = np.searchsorted(f_st, [a, b])
        if f1 > f0:
            where = (f_st[f0:f1] - a, f_case[f0:f1])
            for o, vals in zip(out, (f_m0, f_v0, f_j0)):
                np.add.at(o, where, vals[f0:f1])
        out.setflags(write=False)
        yield k, g1, out.transpose(0, 2, 1)
        k = g1


def _rows_of(table: LoadTable, keep: np.ndarray) -> LoadTable:
    return LoadTable(
        n_cases=table.n_cases,
        case=table.case[keep],
        segment=table.segment[keep],
        is_point=table.is_point[keep],
        intensity=table.intensity[keep],
        start_m=table.start_m[keep],
        end_m=table.end_m[keep],
    )


# Segments evaluated on the grid at once: the grid values stay small (their memory is
# reused) and each matrix product is small enough for one BLAS thread (its threads would
# only wait for each other on a busy machine).
_SEGMENTS = 256


def _on_grid(
    coefficients: tuple[np.ndarray, ...],
    n: int,
    seg: np.ndarray,
    grid_i: np.ndarray,
    st_start: list[int],
    e0: int,
    e1: int,
    out: np.ndarray,
    a: int,
    scratch: np.ndarray,
) -> None:
    """(M, V, deflection) at the stations of segments e0:e1 into ``out`` (3, stations from
    station ``a``, n_cases), from the grid values t = i / n of each segment (``grid_i``;
    a station off the grid, -1, gets some grid row, clipped: the caller overwrites it).
    ``scratch`` holds the grid values of ``_SEGMENTS`` segments.

    The grid values come out as rows (grid point, segment) of every case, so each station
    copies one row of n_cases values: far fewer, longer copies than one value at a time.
    """
    shapes = _grid_shapes(n)
    nc = out.shape[2]
    if nc == 0:
        return
    for c0 in range(e0, e1, _SEGMENTS):
        c1 = min(e1, c0 + _SEGMENTS)
        s0, s1 = st_start[c0], st_start[c1]
        row = grid_i[s0:s1] * (c1 - c0) + (seg[s0:s1] - c0)
        g = scratch[: nc * (c1 - c0) * (n + 1)].reshape(n + 1, -1)
        for q, (c, sh) in enumerate(zip(coefficients, shapes)):
            np.matmul(sh, c[:, c0:c1, :nc].reshape(sh.shape[1], -1), out=g)
            np.take(g.reshape(-1, nc), row, axis=0, out=out[q, s0 - a : s1 - a], mode="clip")


def _grid_coefficients(
    rows: dict[str, np.ndarray], length: np.ndarray, k_ei: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Coefficients (n_terms, n_seg, n_cases) of M, V and deflection on the shapes of
    ``_grid_shapes``, per segment and case, from ``rows`` per case and segment."""
    m_l, m_r, w = rows["m_l"], rows["m_r"], rows["w"]
    l2 = length * length
    k2 = k_ei * l2
    terms = (
        (m_l, m_r, w * (0.5 * l2)),
        (rows["slope"], w * length),
        (rows["v_l"], rows["th_l"] * length, m_l * k2, m_r * k2, w * (k2 * l2)),
    )
    return tuple(np.stack([t.T for t in group]) for group in terms)  # type: ignore[return-value]


@functools.cache
def _grid_shapes(n: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Shapes (n + 1, n_terms) of M, V and deflection at t = x / L = i / n (see
    ``station_values``: x = t L); read-only, made once for each n."""
    t = np.arange(n + 1) / n
    t3 = t**3
    one = np.ones_like(t)
    shapes = (
        np.stack((1.0 - t, t, t * (1.0 - t)), axis=1),
        np.stack((one, 0.5 - t), axis=1),
        np.stack((one, t, 0.5 * t**2 - t3 / 6.0, t3 / 6.0, t3 * (2.0 - t) / 24.0), axis=1),
    )
    for a in shapes:
        a.setflags(write=False)
    return shapes


def _off_grid(
    rows: dict[str, np.ndarray],
    seg: np.ndarray,
    x: np.ndarray,
    length: np.ndarray,
    k_ei: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(M, V, deflection) at stations x (m) of segments ``seg`` of ``rows``, each
    (n_cases, n_stations)."""
    ln, k = length[seg], k_ei[seg]
    x3 = x * x * x
    c2 = x3 / (6.0 * ln)
    g = {name: np.take(r, seg, axis=1) for name, r in rows.items()}
    m = g["m_l"] * (1.0 - x / ln) + g["m_r"] * (x / ln) + g["w"] * (0.5 * x * (ln - x))
    v = g["slope"] + g["w"] * (0.5 * ln - x)
    d = g["v_l"] + g["th_l"] * x
    d += g["m_l"] * ((0.5 * x**2 - c2) * k)
    d += g["m_r"] * (c2 * k)
    d += g["w"] * (x3 * (2.0 * ln - x) / 24.0 * k)
    return m, v, d
