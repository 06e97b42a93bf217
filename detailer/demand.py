"""Moment demand curves for design and curtailment, on a fine regular grid along the strip.

The analysis envelope (stations at most L/20 apart) is interpolated onto a grid of
``GRID_STEP_MM``; the top demand is the hogging envelope as a positive number, the bottom demand
the sagging envelope. Near supports the top demand is capped at the design support moment (face
moment or reduced centreline moment, EN 1992-1-1 5.3.2.2(3)/(4)), then the curve is shifted by
a_l (EN 1992-1-1 9.2.1.3(2), a_l = d for slabs without shear reinforcement, 9.3.1.1(4)): the
shifted demand at x is the largest demand within a_l either side of x.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

GRID_STEP_MM = 10.0


@dataclass(frozen=True, slots=True)
class DemandCurve:
    """One face's moment demand on the grid, kNm per m, as a positive number (tension face)."""

    x_mm: np.ndarray
    m_knm_per_m: np.ndarray  # demand after capping at the design support moments
    m_shifted_knm_per_m: np.ndarray  # after the a_l shift
    a_l_mm: float

    def peak_in(self, x_from_mm: float, x_to_mm: float) -> tuple[float, float]:
        """Largest unshifted demand in [x_from, x_to] and where it occurs."""
        sel = (self.x_mm >= x_from_mm - 1e-6) & (self.x_mm <= x_to_mm + 1e-6)
        if not np.any(sel):
            return 0.0, 0.5 * (x_from_mm + x_to_mm)
        idx = np.flatnonzero(sel)
        k = idx[int(np.argmax(self.m_knm_per_m[idx]))]
        return float(self.m_knm_per_m[k]), float(self.x_mm[k])

    def shifted_at(self, x_mm: float | np.ndarray) -> np.ndarray:
        return np.interp(x_mm, self.x_mm, self.m_shifted_knm_per_m, left=0.0, right=0.0)


def make_grid(x_start_mm: float, x_end_mm: float, step_mm: float = GRID_STEP_MM) -> np.ndarray:
    """A regular grid from x_start to x_end inclusive (the last step may be shorter)."""
    n = max(int(np.ceil((x_end_mm - x_start_mm) / step_mm - 1e-9)), 1)
    grid = x_start_mm + step_mm * np.arange(n + 1, dtype=float)
    grid[-1] = x_end_mm
    return grid


def interpolate(grid_mm: np.ndarray, x_mm: np.ndarray, values: np.ndarray) -> np.ndarray:
    """Interpolate a station curve (x non-decreasing, repeats allowed) onto the grid."""
    return np.interp(grid_mm, np.asarray(x_mm, dtype=float), np.asarray(values, dtype=float))


def shift(grid_mm: np.ndarray, m: np.ndarray, a_l_mm: float) -> np.ndarray:
    """Largest value of m within a_l either side of each grid point (EN 1992-1-1 9.2.1.3(2))."""
    if a_l_mm <= 0:
        return m.copy()
    step = float(np.min(np.diff(grid_mm))) if len(grid_mm) > 1 else 1.0
    k = int(np.ceil(a_l_mm / step - 1e-9))
    out = m.copy()
    for j in range(1, k + 1):
        out[j:] = np.maximum(out[j:], m[:-j])
        out[:-j] = np.maximum(out[:-j], m[j:])
    return out


def cap_near_supports(
    grid_mm: np.ndarray,
    m: np.ndarray,
    caps: tuple[tuple[float, float, float], ...],
) -> np.ndarray:
    """Cap m at ``value`` over each (x_from, x_to, value) support region."""
    out = m.copy()
    for x_from, x_to, value in caps:
        sel = (grid_mm >= x_from - 1e-6) & (grid_mm <= x_to + 1e-6)
        out[sel] = np.minimum(out[sel], value)
    return out


def build_curve(
    grid_mm: np.ndarray,
    station_x_mm: np.ndarray,
    station_m_knm: np.ndarray,
    *,
    hogging: bool,
    caps: tuple[tuple[float, float, float], ...],
    a_l_mm: float,
) -> DemandCurve:
    """Demand of the top face (``hogging``) or bottom face from an envelope curve."""
    m = interpolate(grid_mm, station_x_mm, station_m_knm)
    m = np.maximum(-m if hogging else m, 0.0)
    m = cap_near_supports(grid_mm, m, caps)
    m.setflags(write=False)
    shifted = shift(grid_mm, m, a_l_mm)
    shifted.setflags(write=False)
    return DemandCurve(grid_mm, m, shifted, a_l_mm)


def intervals_above(
    grid_mm: np.ndarray, values: np.ndarray, level: float
) -> tuple[tuple[float, float], ...]:
    """Maximal intervals where values > level, ends interpolated linearly between grid points."""
    above = values > level + 1e-9
    if not np.any(above):
        return ()
    out: list[tuple[float, float]] = []
    idx = np.flatnonzero(np.diff(np.concatenate(([0], above.astype(np.int8), [0]))))
    for start, stop in zip(idx[::2], idx[1::2]):
        i0, i1 = int(start), int(stop) - 1
        x0 = float(grid_mm[i0])
        if i0 > 0:
            x0 = _crossing(grid_mm, values, i0 - 1, i0, level)
        x1 = float(grid_mm[i1])
        if i1 < len(grid_mm) - 1:
            x1 = _crossing(grid_mm, values, i1, i1 + 1, level)
        out.append((x0, x1))
    return tuple(out)


def _crossing(x: np.ndarray, v: np.ndarray, i: int, j: int, level: float) -> float:
    vi, vj = float(v[i]), float(v[j])
    if vi == vj:
        return float(x[i])
    t = (level - vi) / (vj - vi)
    return float(x[i] + min(max(t, 0.0), 1.0) * (x[j] - x[i]))
