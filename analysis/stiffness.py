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

from collections.abc import Sequence
from dataclasses import dataclass, field, replace

import numpy as np

from analysis.banded import NotPositiveDefiniteError, cholesky_banded
from analysis.beam import BeamModel, Load, Restraint
from analysis.stations import (
    FreeTerms,
    LoadTable,
    Stations,
    build_stations,
    free_terms,
    load_table,
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
        for name in (
            "m_knm",
            "v_kn",
            "deflection_mm",
            "reactions_kn",
            "node_moment_knm",
            "node_deflection_mm",
            "node_rotation_rad",
        ):
            getattr(self, name).setflags(write=False)

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
        mn = self.node_moment_knm.T
        me = self.elastic_node_moment_knm.T
        object.__setattr__(self, "_seg_m0", np.ascontiguousarray(mn[:-1]))
        object.__setattr__(self, "_seg_dm", np.ascontiguousarray(mn[1:] - mn[:-1]))
        y_rows = tuple(
            np.ascontiguousarray(a)
            for a in (self.node_v_m.T[:-1], self.node_theta_rad.T[:-1], me[:-1], me[1:])
        )
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
        c2 = x**3 / (6.0 * length)
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


def _element_matrices(length_m: np.ndarray, ei: float) -> np.ndarray:
    """(n_el, 4, 4) Euler-Bernoulli beam element stiffness, DOFs (v1, th1, v2, th2)."""
    length = length_m[:, None, None]
    base = np.array(
        [
            [12.0, 6.0, -12.0, 6.0],
            [6.0, 4.0, -6.0, 2.0],
            [-12.0, -6.0, 12.0, -6.0],
            [6.0, 2.0, -6.0, 4.0],
        ]
    )
    # Powers of L for each entry: v-v 0, v-th 1, th-th 2.
    power = np.array([[0, 1, 0, 1], [1, 2, 1, 2], [0, 1, 0, 1], [1, 2, 1, 2]])
    return ei * base[None] * length ** power[None] / length**3


def _fixed_end_actions(table: LoadTable, length_by_seg: np.ndarray) -> np.ndarray:
    """(n_loads, 4) actions of the nodes on a fully fixed element, in DOF directions.

    Integrals of the point-load fixed-end forces over the loaded length (standard
    fixed-end moment tables: w L^2 / 12 and P a b^2 / L^2 for the usual cases).
    """
    length = length_by_seg[table.segment]
    q = table.intensity
    c, d = table.start_m, table.end_m
    pt = table.is_point
    a = c
    b = length - a
    # Point load P at a: reactions up P b^2 (L + 2a) / L^3 and P a^2 (3L - 2a) / L^3,
    # moments P a b^2 / L^2 (hogging, left) and P a^2 b / L^2 (hogging, right).
    r1_p = q * b**2 * (length + 2.0 * a) / length**3
    r2_p = q * a**2 * (3.0 * length - 2.0 * a) / length**3
    m1_p = q * a * b**2 / length**2
    m2_p = q * a**2 * b / length**2

    def prim(s: np.ndarray) -> tuple[np.ndarray, ...]:
        lv = length
        return (
            lv**3 * s - lv * s**3 + 0.5 * s**4,  # int (L - s)^2 (L + 2s) ds
            lv * s**3 - 0.5 * s**4,  # int s^2 (3L - 2s) ds
            0.5 * lv**2 * s**2 - 2.0 * lv * s**3 / 3.0 + 0.25 * s**4,  # int s (L - s)^2 ds
            lv * s**3 / 3.0 - 0.25 * s**4,  # int s^2 (L - s) ds
        )

    pd, pc = prim(d), prim(c)
    r1_w = q * (pd[0] - pc[0]) / length**3
    r2_w = q * (pd[1] - pc[1]) / length**3
    m1_w = q * (pd[2] - pc[2]) / length**2
    m2_w = q * (pd[3] - pc[3]) / length**2
    r1 = np.where(pt, r1_p, r1_w)
    r2 = np.where(pt, r2_p, r2_w)
    m1 = np.where(pt, m1_p, m1_w)
    m2 = np.where(pt, m2_p, m2_w)
    # Node on element, DOF directions (v down, theta = dv/dx): the upward reactions are
    # negative; the left hogging moment acts against +theta, the right one along it.
    return np.stack([-r1, -m1, -r2, m2], axis=1)


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
    n_nodes = len(model.node_x_mm)
    n_el = n_nodes - 1
    n_cases = table.n_cases
    length = np.diff(np.asarray(model.node_x_mm, dtype=float)) / 1000.0
    ke = _element_matrices(length, model.ei_knm2)
    # Restraints.
    free = np.ones(2 * n_nodes, dtype=bool)
    for i, r in enumerate(model.restraints):
        if r is not Restraint.FREE:
            free[2 * i] = False
        if r is Restraint.FIXED:
            free[2 * i + 1] = False
    red = np.cumsum(free) - 1
    n_free = int(free.sum())
    # Assemble the reduced stiffness in lower band storage.
    dofs = 2 * np.arange(n_el)[:, None] + np.arange(4)[None, :]  # (n_el, 4)
    rows = np.broadcast_to(dofs[:, :, None], (n_el, 4, 4))
    cols = np.broadcast_to(dofs[:, None, :], (n_el, 4, 4))
    keep = free[rows] & free[cols] & (red[rows] >= red[cols])
    r_red, c_red = red[rows][keep], red[cols][keep]
    band = int((r_red - c_red).max()) if r_red.size else 0
    ab = np.zeros((band + 1, n_free))
    np.add.at(ab, (r_red - c_red, c_red), ke[keep])
    # Load vectors: equivalent nodal loads are minus the fixed-end actions.
    fea = _fixed_end_actions(table, length)  # (n_loads, 4)
    fe_el = np.zeros((n_el, 4, n_cases))
    np.add.at(
        fe_el,
        (
            np.repeat(table.segment, 4),
            np.tile(np.arange(4), table.segment.size),
            np.repeat(table.case, 4),
        ),
        fea.ravel(),
    )
    f_full = np.zeros((n_nodes, 2, n_cases))
    f_full[:-1] -= fe_el[:, :2]
    f_full[1:] -= fe_el[:, 2:]
    f_full = f_full.reshape(2 * n_nodes, n_cases)
    d_full = np.zeros((2 * n_nodes, n_cases))
    if n_free:
        try:
            factor = cholesky_banded(ab)
        except NotPositiveDefiniteError:
            raise ValueError("the beam model is a mechanism (not enough supports)") from None
        d_full[free] = factor.solve(f_full[free])
    # Element end actions f = k d + fixed-end actions.
    d_el = d_full[dofs]  # (n_el, 4, n_cases)
    f_el = np.matmul(ke, d_el) + fe_el
    m_start = f_el[:, 1, :].T  # M(0) = action along +theta at the left node
    m_end = -f_el[:, 3, :].T  # M(L) = minus the action along +theta at the right node
    node_m = np.empty((n_cases, n_nodes))
    node_m[:, 0] = m_start[:, 0]
    node_m[:, -1] = m_end[:, -1]
    node_m[:, 1:-1] = 0.5 * (m_end[:, :-1] + m_start[:, 1:])
    for i in (0, n_nodes - 1):
        if model.restraints[i] is not Restraint.FIXED:
            node_m[:, i] = 0.0  # pinned or free end: zero by statics, remove round-off
    # Reactions: the nodes push the elements with f; the supports push the nodes.
    down = np.zeros((n_nodes, n_cases))
    down[:-1] += f_el[:, 0, :]
    down[1:] += f_el[:, 2, :]
    reactions = -down.T
    for i, r in enumerate(model.restraints):
        if r is Restraint.FREE:
            reactions[:, i] = 0.0
    v_nodes = d_full[0::2].T
    th_nodes = d_full[1::2].T
    return NodeSolution(
        model=model,
        stations=stations,
        free=free_terms(model, stations, table),
        node_moment_knm=_frozen(node_m),
        elastic_node_moment_knm=_frozen(node_m),
        reactions_kn=_frozen(np.ascontiguousarray(reactions)),
        node_v_m=_frozen(np.ascontiguousarray(v_nodes)),
        node_theta_rad=_frozen(np.ascontiguousarray(th_nodes)),
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
