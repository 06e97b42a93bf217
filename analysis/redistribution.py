"""Linear elastic analysis with limited redistribution, EN 1992-1-1:2004, 5.5.

Every support moment of every load case is multiplied by delta; the moment in each segment
changes by the straight line between the changes at its ends, so each case stays in
equilibrium with its own loads (only the statically indeterminate part changes). Shears and
reactions change by the matching constant shear per segment.

The change is linear in the loads, so redistributing unit cases and superposing them is
exactly the same as redistributing each arrangement.

Moments that statics fixes are left alone: pinned and free ends (zero) and the root of a
cantilever (equal to the cantilever's own moment). Interior supports and FIXED ends are
redistributed. The delta limits of 5.5(4) (e.g. delta >= 0.7) are checked elsewhere; here
only 0 < delta <= 1.
"""

from __future__ import annotations

import math

import numpy as np

from analysis.beam import BeamModel, Restraint
from analysis.stiffness import CaseResults, NodeSolution

__all__ = [
    "check_delta",
    "redistributable_nodes",
    "redistribute",
    "redistribute_node_moments",
    "redistribute_solution",
]


def check_delta(delta: float) -> float:
    """Validate the redistribution ratio delta (only 0 < delta <= 1 here).

    EN 1992-1-1:2004, 5.5(4).
    """
    if isinstance(delta, bool) or not isinstance(delta, (int, float)):
        raise TypeError(f"redistribution ratio delta must be a number, got {delta!r}")
    if not (math.isfinite(delta) and 0.0 < delta <= 1.0):
        raise ValueError(f"redistribution ratio delta must satisfy 0 < delta <= 1, got {delta}")
    return float(delta)


def redistributable_nodes(model: BeamModel) -> np.ndarray:
    """(n_nodes,) bool: nodes whose moment is statically indeterminate and is scaled."""
    n = len(model.node_x_mm)
    mask = np.zeros(n, dtype=bool)
    for i, r in enumerate(model.restraints):
        if r is Restraint.FREE:
            continue
        is_end = i in (0, n - 1)
        cantilever_root = (i == 1 and model.is_cantilever(0)) or (
            i == n - 2 and model.is_cantilever(n - 2)
        )
        if cantilever_root or (is_end and r is Restraint.PINNED):
            continue
        mask[i] = True
    return mask


def redistribute_node_moments(
    model: BeamModel, node_moment_knm: np.ndarray, delta: float
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Scale the redistributable node moments by delta.

    Returns (new node moments, change of node moments, change of reactions), each
    (n_cases, n_nodes). The reaction change follows from the constant shear change
    (dM_right - dM_left) / L in each segment.
    """
    delta = check_delta(delta)
    mask = redistributable_nodes(model)
    dm = np.where(mask[None, :], (delta - 1.0) * node_moment_knm, 0.0)
    length_m = np.diff(np.asarray(model.node_x_mm, dtype=float)) / 1000.0
    dv = (dm[:, 1:] - dm[:, :-1]) / length_m  # (n_cases, n_seg)
    dr = np.zeros_like(dm)
    dr[:, :-1] += dv  # shear just right of node j rises by dv of segment j
    dr[:, 1:] -= dv  # shear just left of node j + 1
    return node_moment_knm + dm, dm, dr


def redistribute_solution(sol: NodeSolution, delta: float) -> NodeSolution:
    """A ``NodeSolution`` whose moments, shears and reactions are redistributed
    (deflection stays elastic)."""
    new_m, _, dr = redistribute_node_moments(sol.model, sol.node_moment_knm, delta)
    return sol.with_moments(new_m, sol.reactions_kn + dr)


def redistribute(results: CaseResults, model: BeamModel, delta: float) -> CaseResults:
    """Redistribute every case of ``results`` (support moments times delta).

    Deflections are left elastic: redistribution is an ultimate-limit-state device.
    """
    new_m, dm, dr = redistribute_node_moments(model, results.node_moment_knm, delta)
    st = results.stations
    seg = st.segment
    length_m = (np.diff(np.asarray(model.node_x_mm, dtype=float)) / 1000.0)[seg]
    xi = st.local_mm / 1000.0 / length_m
    dml, dmr = dm[:, seg], dm[:, seg + 1]
    return CaseResults(
        stations=st,
        m_knm=results.m_knm + dml + (dmr - dml) * xi,
        v_kn=results.v_kn + (dmr - dml) / length_m,
        deflection_mm=np.array(results.deflection_mm),
        reactions_kn=results.reactions_kn + dr,
        node_moment_knm=new_m,
        node_deflection_mm=np.array(results.node_deflection_mm),
        node_rotation_rad=np.array(results.node_rotation_rad),
    )
