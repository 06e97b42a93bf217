"""Direct stiffness analysis of a continuous beam (a 1 m slab strip), many load cases at once.

Two degrees of freedom per node: deflection v (down positive) and rotation
theta = dv/dx. A support removes v; a FIXED end also removes theta. The reduced stiffness
matrix is banded (half-bandwidth <= 3) and is factorised once for all load cases
(``analysis.banded``). Within a segment the results are exact for the applied loads:
bending moment is the straight line between the end moments plus the simple-beam moment of
the segment's own loads, and deflection integrates that moment twice from the left node.

Units inside: m, kN, kNm, kNm2; results in mm, kN, kNm (see ``analysis.beam``).
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass, field, replace

import numpy as np

from analysis.banded import NotPositiveDefiniteError, cholesky_banded
from analysis.beam import BeamModel, Load, Restraint
from analysis.load_table import LoadTable, load_table
from analysis.stations import (
    FreeTerms,
    Stations,
    build_stations,
    free_terms,
    full_line_loads,
)

__all__ = ["CaseResults", "NodeSolution", "solve", "solve_nodes"]


def _frozen(a: np.ndarray) -> np.ndarray:
    a.setflags(write=False)
    return a


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class CaseResults:
    """Results of every load case at every station (arrays are read-only).

    Per station: ``m_knm`` bending moment (sagging +), ``v_kn`` shear (V = dM/dx; at a
    doubled station the limit given by ``stations.side``), ``deflection_mm`` (down +).
    Per node: ``reactions_kn`` (up +; 0 at a free end), ``node_moment_knm``,
    ``node_deflection_mm``, ``node_rotation_rad`` (dv/dx).
    """

    stations: Stations
    m_knm: np.ndarray  # (n_cases, n_st)
    v_kn: np.ndarray  # (n_cases, n_st)
    deflection_mm: np.ndarray  # (n_cases, n_st)
    reactions_kn: np.ndarray  # (n_cases, n_nodes)
    node_moment_knm: np.ndarray  # (n_cases, n_nodes)
    node_deflection_mm: np.ndarray  # (n_cases, n_nodes)
    node_rotation_rad: np.ndarray  # (n_cases, n_nodes)

    def __post_init__(self) -> None:
        self.m_knm.setflags(write=False)
        self.v_kn.setflags(write=False)
        self.deflection_mm.setflags(write=False)
        self.reactions_kn.setflags(write=False)
        self.node_moment_knm.setflags(write=False)
        self.node_deflection_mm.setflags(write=False)
        self.node_rotation_rad.setflags(write=False)

    @property
    def x_mm(self) -> np.ndarray:
        """(n_st,) station positions, mm from the left end."""
        return self.stations.x_mm

    @property
    def segment(self) -> np.ndarray:
        """(n_st,) segment index of each station."""
        return self.stations.segment

    @property
    def n_cases(self) -> int:
        return int(self.m_knm.shape[0])


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class NodeSolution:
    """Node results of every case plus the free (simple-beam) terms: everything needed to
    evaluate any station of any case on demand without storing n_cases x n_st arrays.

    ``node_moment_knm`` and ``reactions_kn`` may be redistributed (``analysis.redistribution``);
    ``elastic_node_moment_knm`` is always the elastic one and drives the deflection.
    """

    model: BeamModel
    stations: Stations
    free: FreeTerms
    node_moment_knm: np.ndarray  # (n_cases, n_nodes)
    elastic_node_moment_knm: np.ndarray  # (n_cases, n_nodes)
    reactions_kn: np.ndarray  # (n_cases, n_nodes)
    node_v_m: np.ndarray  # (n_cases, n_nodes) deflection, m
    node_theta_rad: np.ndarray  # (n_cases, n_nodes)
    # Per-segment rows, cases last (fast row gathers): M at the left node, M change along
    # the segment, and for deflection (v, theta, elastic M left, elastic M right).
    _seg_m0: np.ndarray = field(init=False, repr=False, compare=False)
    _seg_dm: np.ndarray = field(init=False, repr=False, compare=False)
    _seg_y: tuple[np.ndarray, ...] = field(init=False, repr=False, compare=False)
    _length_m: np.ndarray = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        m0, dm, y_rows = segment_rows(
            self.node_moment_knm,
            self.elastic_node_moment_knm,
            self.node_v_m,
            self.node_theta_rad,
            np.arange(self.node_moment_knm.shape[1] - 1),
        )
        object.__setattr__(self, "_seg_m0", m0)
        object.__setattr__(self, "_seg_dm", dm)
        object.__setattr__(self, "_seg_y", y_rows)
        lengths = np.diff(np.asarray(self.model.node_x_mm, dtype=float)) / 1000.0
        object.__setattr__(self, "_length_m", lengths)

    @property
    def n_cases(self) -> int:
        return int(self.node_moment_knm.shape[0])

    def with_moments(self, node_moment_knm: np.ndarray, reactions_kn: np.ndarray) -> NodeSolution:
        """Copy with other (e.g. redistributed) node moments and reactions."""
        return replace(
            self, node_moment_knm=_frozen(node_moment_knm), reactions_kn=_frozen(reactions_kn)
        )

    def _free_entries(self, idx: slice | np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(entry indices, column in the block, case) of the free terms at stations idx."""
        f = self.free
        n_st = len(self.stations)
        if isinstance(idx, slice) and idx.step in (None, 1):
            start, stop, _ = idx.indices(n_st)
            lo, hi = np.searchsorted(f.station, [start, stop])
            sel = np.arange(lo, hi)
            return sel, f.station[sel] - start, f.case[sel]
        ids = np.arange(n_st)[idx]
        lo = np.searchsorted(f.station, ids, side="left")
        count = np.searchsorted(f.station, ids, side="right") - lo
        col = np.repeat(np.arange(ids.size), count)
        sel = np.repeat(lo - np.cumsum(count) + count, count) + np.arange(int(count.sum()))
        return sel, col, f.case[sel]

    def _geometry(self, idx: slice | np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        st = self.stations
        seg = st.segment[idx]
        length = self._length_m[seg]
        return seg, st.local_mm[idx] / 1000.0, length

    def moments_t(self, idx: slice | np.ndarray) -> np.ndarray:
        """Bending moment (kNm), shape (n_idx, n_cases), at stations idx (a slice or an
        array of distinct indices)."""
        seg, x, length = self._geometry(idx)
        out = self._seg_m0[seg] + self._seg_dm[seg] * (x / length)[:, None]
        sel, col, case = self._free_entries(idx)
        np.add.at(out, (col, case), self.free.m0[sel])
        return out

    def shears_t(self, idx: slice | np.ndarray) -> np.ndarray:
        """Shear (kN), shape (n_idx, n_cases)."""
        seg, _, length = self._geometry(idx)
        out = self._seg_dm[seg] / length[:, None]
        sel, col, case = self._free_entries(idx)
        np.add.at(out, (col, case), self.free.v0[sel])
        return out

    def deflections_t(self, idx: slice | np.ndarray) -> np.ndarray:
        """Deflection (mm, down +), shape (n_idx, n_cases)."""
        seg, x, length = self._geometry(idx)
        ei = self.model.ei_knm2
        c2 = x * x * x / (6.0 * length)
        c1 = 0.5 * x**2 - c2
        v_l, th_l, m_l, m_r = self._seg_y
        out = (m_l[seg] * (c1 / ei)[:, None] + m_r[seg] * (c2 / ei)[:, None]) * -1000.0
        out += v_l[seg] * 1000.0
        out += th_l[seg] * (x * 1000.0)[:, None]
        sel, col, case = self._free_entries(idx)
        np.add.at(out, (col, case), self.free.j0[sel] * (-1000.0 / ei))
        return out

    def evaluate(
        self, idx: slice | np.ndarray = slice(None)
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(M kNm, V kN, deflection mm) at stations idx, each of shape (n_cases, n_idx)."""
        return self.moments_t(idx).T, self.shears_t(idx).T, self.deflections_t(idx).T


def segment_rows(
    node_m: np.ndarray,
    elastic_m: np.ndarray,
    node_v: np.ndarray,
    node_theta: np.ndarray,
    left: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]]:
    """What ``NodeSolution`` evaluates stations from, per segment (rows) and case, from its
    node arrays (cases, nodes) and the left node of each segment (``left + 1`` is its right
    node): M at the left node, M's change along the segment, and (v, theta, elastic M at the
    left node, elastic M at the right node) for the deflection. One beam or a whole floor
    (``analysis.floor``), with the same arithmetic."""
    mn, me = node_m.T, elastic_m.T
    right = left + 1
    m_left = mn[left]
    return m_left, mn[right] - m_left, (node_v.T[left], node_theta.T[left], me[left], me[right])


def element_matrices(length_m: np.ndarray, ei: float | np.ndarray) -> np.ndarray:
    """(4, 4, n_el) Euler-Bernoulli beam element stiffness, DOFs (v1, th1, v2, th2), the
    elements last (every operation on them runs along the elements); ``ei`` one number or
    one per element."""
    length = length_m[None, None, :]
    base = np.array(
        [
            [12.0, 6.0, -12.0, 6.0],
            [6.0, 4.0, -6.0, 2.0],
            [-12.0, -6.0, 12.0, -6.0],
            [6.0, 2.0, -6.0, 4.0],
        ]
    )[:, :, None]
    # Powers of L for each entry: v-v 0, v-th 1, th-th 2 (products: pow is slow).
    power = np.array([[0, 1, 0, 1], [1, 2, 1, 2], [0, 1, 0, 1], [1, 2, 1, 2]])[:, :, None]
    l2 = length * length
    l_power = np.where(power == 0, 1.0, np.where(power == 1, length, l2))
    ei = np.reshape(np.asarray(ei, dtype=float), (1, 1, -1))
    return ei * base * l_power / (l2 * length)


def _fixed_end_actions(table: LoadTable, length_by_seg: np.ndarray) -> np.ndarray:
    """(4, n_loads) actions of the nodes on a fully fixed element, in DOF directions.

    Integrals of the point-load fixed-end forces over the loaded length (standard
    fixed-end moment tables: w L^2 / 12 and P a b^2 / L^2 for the usual cases).
    """
    length = length_by_seg[table.segment]
    # A line load over the whole element (the common case): reactions w L / 2 up and
    # hogging moments w L^2 / 12 at both ends.
    r = 0.5 * table.intensity * length
    m = r * length / 6.0
    # Node on element, DOF directions (v down, theta = dv/dx): the upward reactions are
    # negative; the left hogging moment acts against +theta, the right one along it.
    out = np.stack([-r, -m, -r, m])
    other = np.flatnonzero(~full_line_loads(table, length_by_seg))
    if other.size:
        out[:, other] = _general_fixed_end_actions(
            table.intensity[other],
            table.start_m[other],
            table.end_m[other],
            table.is_point[other],
            length[other],
        )
    return out


def _general_fixed_end_actions(
    q: np.ndarray, c: np.ndarray, d: np.ndarray, pt: np.ndarray, length: np.ndarray
) -> np.ndarray:
    """``_fixed_end_actions`` of point loads (at c) and partial line loads (c..d)."""
    a = c
    b = length - a
    # Powers as products (pow is several times slower).
    l2 = length * length
    l3 = l2 * length
    # Point load P at a: reactions up P b^2 (L + 2a) / L^3 and P a^2 (3L - 2a) / L^3,
    # moments P a b^2 / L^2 (hogging, left) and P a^2 b / L^2 (hogging, right).
    r1_p = q * (b * b) * (length + 2.0 * a) / l3
    r2_p = q * (a * a) * (3.0 * length - 2.0 * a) / l3
    m1_p = q * a * (b * b) / l2
    m2_p = q * (a * a) * b / l2

    def prim(s: np.ndarray) -> tuple[np.ndarray, ...]:
        s2 = s * s
        s3, s4 = s2 * s, s2 * s2
        return (
            l3 * s - length * s3 + 0.5 * s4,  # int (L - s)^2 (L + 2s) ds
            length * s3 - 0.5 * s4,  # int s^2 (3L - 2s) ds
            0.5 * l2 * s2 - 2.0 * length * s3 / 3.0 + 0.25 * s4,  # int s (L - s)^2 ds
            length * s3 / 3.0 - 0.25 * s4,  # int s^2 (L - s) ds
        )

    pd, pc = prim(d), prim(c)
    r1_w = q * (pd[0] - pc[0]) / l3
    r2_w = q * (pd[1] - pc[1]) / l3
    m1_w = q * (pd[2] - pc[2]) / l2
    m2_w = q * (pd[3] - pc[3]) / l2
    r1 = np.where(pt, r1_p, r1_w)
    r2 = np.where(pt, r2_p, r2_w)
    m1 = np.where(pt, m1_p, m1_w)
    m2 = np.where(pt, m2_p, m2_w)
    return np.stack([-r1, -m1, -r2, m2])


# Codes by member identity (enum members are singletons; hashing an enum member is slow).
# Anything else counts as pinned: it is not FREE (v is held) and not FIXED (theta is free).
_CODE = {id(Restraint.FREE): 0, id(Restraint.PINNED): 1, id(Restraint.FIXED): 2}


def restraint_codes(restraints: Sequence[Restraint]) -> np.ndarray:
    """(n,) int8 codes of ``Frame.restraint``: 0 free, 1 pinned, 2 fixed."""
    codes = map(_CODE.get, map(id, restraints), itertools.repeat(1))
    return np.fromiter(codes, np.int8, len(restraints))


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class Frame:
    """Connectivity of one beam, or of many beams side by side (``analysis.floor``): element
    e joins nodes ``left[e]`` and ``left[e] + 1``; node i has DOFs 2i (v) and 2i + 1 (theta)."""

    length_m: np.ndarray  # (n_el,)
    left: np.ndarray  # (n_el,) int
    restraint: np.ndarray  # (n_nodes,) int8: 0 free, 1 pinned, 2 fixed
    end: np.ndarray  # (n_nodes,) bool: first or last node of its beam

    @classmethod
    def of(cls, model: BeamModel) -> Frame:
        n = len(model.node_x_mm)
        end = np.zeros(n, dtype=bool)
        end[[0, -1]] = True
        return cls(
            length_m=np.diff(np.asarray(model.node_x_mm, dtype=float)) / 1000.0,
            left=np.arange(n - 1),
            restraint=restraint_codes(model.restraints),
            end=end,
        )

    @property
    def n_nodes(self) -> int:
        return int(self.restraint.size)

    def free_dofs(self) -> np.ndarray:
        """(2 n_nodes,) bool: a support removes v, a FIXED end also theta."""
        free = np.ones((self.n_nodes, 2), dtype=bool)
        free[:, 0] = self.restraint == 0
        free[:, 1] = self.restraint != 2
        return free.ravel()


# The lower triangle of an element matrix, local (row, column): the DOFs of an element
# rise with the local index, so row >= column is the lower band of the reduced matrix too.
_LOW_R, _LOW_C = np.tril_indices(4)


def band_entries(
    ke: np.ndarray, frame: Frame, free: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Entries of the reduced stiffness in lower band storage: (row - column, column,
    value), entry by entry of the element matrices (``element_matrices``; summed by the
    caller: a band cell gets at most two, whose sum is the same in either order); columns
    number the free DOFs in order."""
    dofs = 2 * frame.left[None, :] + np.arange(4)[:, None]  # (4, n_el)
    red = (np.cumsum(free) - 1)[dofs]
    is_free = free[dofs]
    keep = is_free[_LOW_R] & is_free[_LOW_C]
    col = red[_LOW_C]
    return (red[_LOW_R] - col)[keep], col[keep], ke[_LOW_R, _LOW_C][keep]


def load_vectors(frame: Frame, table: LoadTable) -> tuple[np.ndarray, np.ndarray]:
    """Fixed-end actions (4, n_cases, n_el) per element action, case and element, and the
    equivalent nodal loads (n_cases, 2 n_nodes), which are minus the fixed-end actions;
    ``table.segment`` indexes the elements."""
    n_el, n_cases = frame.left.size, table.n_cases
    fea = _fixed_end_actions(table, frame.length_m)  # (4, n_loads)
    # Summed per (action, case, element) in table order.
    flat = (np.arange(4)[:, None] * n_cases + table.case) * n_el + table.segment
    fe_el = np.bincount(flat.ravel(), fea.ravel(), 4 * n_cases * n_el).astype(float, copy=False)
    fe_el = fe_el.reshape(4, n_cases, n_el)
    # A node's DOF gets minus the actions of at most two elements: its element to the right
    # (left-end actions) and its element to the left (right-end actions), in that order.
    at = _at_columns(n_cases, 2 * frame.n_nodes, 2 * frame.left)
    shape = (n_cases, 2 * frame.n_nodes)
    f_t = _scattered(shape, (at, -fe_el[0]), (at + 1, -fe_el[1]))
    f_t -= _scattered(shape, (at + 2, fe_el[2]), (at + 3, fe_el[3]))
    return fe_el, f_t


def _at_columns(n_rows: int, n_cols: int, cols: np.ndarray) -> np.ndarray:
    """Flat indices of columns ``cols`` of every row of an (n_rows, n_cols) array."""
    return (np.arange(n_rows)[:, None] * n_cols + cols).ravel()


def _scattered(shape: tuple[int, int], *parts: tuple[np.ndarray, np.ndarray]) -> np.ndarray:
    """Zeros of ``shape`` with the values of each part put at its flat indices (distinct
    over the parts): scattering by flat index is several times faster than by columns."""
    out = np.zeros(shape)
    flat = out.reshape(-1)
    for at, values in parts:
        flat[at] = values.reshape(-1)
    return out


def node_results(
    frame: Frame, ke: np.ndarray, d_t: np.ndarray, fe_el: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Node moments and reactions, each (n_cases, n_nodes), from the DOF values
    (n_cases, 2 n_nodes), the element matrices and the fixed-end actions (elements last,
    as ``element_matrices`` and ``load_vectors`` give them)."""
    # Element end actions f = k d + fixed-end actions, term by term in a fixed order (the
    # same for any number of cases: one beam or a floor agree bit for bit), along the
    # elements.
    dof = 2 * frame.left
    d_el = [np.take(d_t, dof + c, axis=1) for c in range(4)]  # (n_cases, n_el): v1 .. th2
    term = np.empty_like(d_el[0])
    f_el = []  # (n_cases, n_el) for each DOF of the element
    for r in range(4):
        f = fe_el[r].copy()
        for c in range(4):
            f += np.multiply(ke[r, c], d_el[c], out=term)
        f_el.append(f)
    # Element by element, the left end's actions go to its left node and the right end's
    # to its right node: scattered by flat index (columns are nodes, rows cases).
    n_cases, n_nodes = d_t.shape[0], frame.n_nodes
    at_left = _at_columns(n_cases, n_nodes, frame.left)
    at_right = at_left + 1
    # M(0) is the action along +theta at the left node, M(L) minus that at the right node;
    # a node between two elements takes the mean of the two; a pinned or free end is zero
    # by statics.
    shape = (n_cases, n_nodes)
    node_m = _scattered(shape, (at_left, f_el[1])) - _scattered(shape, (at_right, f_el[3]))
    node_m *= np.where(frame.end, 1.0, 0.5)
    node_m[:, frame.end & (frame.restraint != 2)] = 0.0
    # Reactions: the nodes push the elements with f; the supports push the nodes.
    down = _scattered(shape, (at_left, f_el[0])) + _scattered(shape, (at_right, f_el[2]))
    reactions = -down
    reactions[:, frame.restraint == 0] = 0.0
    return node_m, reactions


def _check_model(model: BeamModel) -> None:
    for i, r in enumerate(model.restraints[1:-1], start=1):
        if r is not Restraint.PINNED:
            raise ValueError(
                f"node {i}: interior supports of a slab strip must be PINNED (got {r.name})"
            )


def solve_nodes(
    model: BeamModel,
    cases: Sequence[Sequence[Load]],
    names: Sequence[str] | None = None,
) -> NodeSolution:
    """Solve all cases for node results; stations cover the load points of every case."""
    _check_model(model)
    table = load_table(model, cases, names)
    stations = build_stations(model, table)
    return _solve_table(model, table, stations)


def _solve_table(model: BeamModel, table: LoadTable, stations: Stations) -> NodeSolution:
    frame = Frame.of(model)
    ke = element_matrices(frame.length_m, model.ei_knm2)
    free = frame.free_dofs()
    band_k, band_c, band_v = band_entries(ke, frame, free)
    n_free = int(free.sum())
    ab = np.zeros((int(band_k.max()) + 1 if band_k.size else 1, n_free))
    np.add.at(ab, (band_k, band_c), band_v)
    fe_el, f_t = load_vectors(frame, table)
    d_t = np.zeros_like(f_t)  # (n_cases, 2 n_nodes)
    if n_free:
        try:
            factor = cholesky_banded(ab)
        except NotPositiveDefiniteError:
            raise ValueError("the beam model is a mechanism (not enough supports)") from None
        d_t[:, free] = factor.solve(np.ascontiguousarray(f_t[:, free].T)).T
    node_m, reactions = node_results(frame, ke, d_t, fe_el)
    _frozen(node_m)
    return NodeSolution(
        model=model,
        stations=stations,
        free=free_terms(model, stations, table),
        node_moment_knm=node_m,
        elastic_node_moment_knm=node_m,
        reactions_kn=_frozen(reactions),
        node_v_m=_frozen(np.ascontiguousarray(d_t[:, 0::2])),
        node_theta_rad=_frozen(np.ascontiguousarray(d_t[:, 1::2])),
    )


def results_from_nodes(sol: NodeSolution) -> CaseResults:
    """Evaluate every case at every station."""
    return CaseResults(
        stations=sol.stations,
        m_knm=np.ascontiguousarray(sol.moments_t(slice(None)).T),
        v_kn=np.ascontiguousarray(sol.shears_t(slice(None)).T),
        deflection_mm=np.ascontiguousarray(sol.deflections_t(slice(None)).T),
        reactions_kn=np.array(sol.reactions_kn),
        node_moment_knm=np.array(sol.node_moment_knm),
        node_deflection_mm=sol.node_v_m * 1000.0,
        node_rotation_rad=np.array(sol.node_theta_rad),
    )


def solve(
    model: BeamModel, cases: Sequence[Sequence[Load]], names: Sequence[str] | None = None
) -> CaseResults:
    """Analyse ``cases`` (each a sequence of loads) on ``model``; one factorisation for all.

    Stations are common to all cases: the grid of every segment plus support faces and the
    load points of every case. ``names`` optionally names the cases in error messages.
    """
    return results_from_nodes(solve_nodes(model, cases, names))
