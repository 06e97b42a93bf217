"""Placement of the result stations (``analysis.stations.station_arrays``).

Stations are placed two ways: by arithmetic on the uniform grid of each segment (the fast
placement, used wherever grid points are well apart) and by merging integer position keys
(any grid). The two must place every station alike, bit for bit: a consistency check of
the fast placement against the plain one, not an outside source. Positions are drawn on,
next to and between grid points, support faces and load ends (within and just beyond the
position tolerance), where the two could part. The station rules themselves (grid at most
L/20 apart, support faces, load points doubled) are checked against statics in
test_analysis_stiffness.py.
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis import stations as stn
from analysis.beam import BeamModel, Load, PointLoad, UniformLoad
from analysis.load_table import POSITION_TOL_MM, load_table

TOL = POSITION_TOL_MM
# Offsets from a grid point: on it, within the tolerance's rounding, and just beyond.
NUDGES = (0.0, 0.3 * TOL, -0.3 * TOL, 0.6 * TOL, -0.6 * TOL, 1.5 * TOL, -1.5 * TOL, 7.0)


@st.composite
def placements(draw: st.DrawFn):
    n_seg = draw(st.integers(1, 4))
    lengths = [float(draw(st.sampled_from([600, 1000, 2400, 3000, 4750]))) for _ in range(n_seg)]
    n_uniform = draw(st.sampled_from([1, 3, 8, 20]))
    if draw(st.booleans()):
        n_div = np.full(n_seg, n_uniform)
    else:
        n_div = np.array([draw(st.sampled_from([1, 2, 5, 20, 21])) for _ in range(n_seg)])
    lengths_mm = np.array(lengths)

    def near_grid(j: int) -> float:
        i = draw(st.integers(0, int(n_div[j])))
        a = lengths[j] * (i / int(n_div[j])) + draw(st.sampled_from(NUDGES))
        return min(max(a, 0.0), lengths[j])

    # Support half widths: none, tiny, on a grid point, or ordinary.
    half = []
    for k in range(n_seg + 1):
        j = min(k, n_seg - 1)
        kind = draw(st.sampled_from(["none", "tiny", "grid", "plain"]))
        if kind == "none":
            half.append(0.0)
        elif kind == "tiny":
            half.append(draw(st.sampled_from([0.5 * TOL, 1.5 * TOL])))
        elif kind == "grid":
            half.append(min(near_grid(j), 0.45 * lengths[j]))
        else:
            half.append(draw(st.sampled_from([100.0, 150.0, 175.5])))
    half_mm = np.array(half)
    model = BeamModel.from_spans(lengths)
    cases: list[list[Load]] = []
    for _ in range(draw(st.integers(1, 3))):
        loads: list[Load] = []
        for _ in range(draw(st.integers(0, 4))):
            j = draw(st.integers(0, n_seg - 1))
            if draw(st.booleans()):
                loads.append(PointLoad(j, draw(st.floats(-5.0, 20.0)), near_grid(j)))
            else:
                a, b = sorted((near_grid(j), near_grid(j)))
                if b - a > 2.0 * TOL:
                    loads.append(UniformLoad(j, 3.0, a, b))
                else:
                    loads.append(UniformLoad(j, 3.0))
        cases.append(loads)
    table = load_table(model, cases)
    return lengths_mm, n_div, half_mm[:-1], half_mm[1:], table


@settings(max_examples=300, deadline=None)
@given(placements())
def test_arithmetic_placement_is_the_key_placement(placement) -> None:
    lengths_mm, n_div, half_l, half_r, table = placement
    assert stn.arithmetic_placement_holds(lengths_mm, n_div)
    positions = stn._unique_positions(lengths_mm, half_l, half_r, table)
    fast = stn._on_the_grid(lengths_mm, n_div, positions)
    plain = stn._by_keys(lengths_mm, n_div, positions)
    for name, a, b in zip(("segment", "local_mm", "side", "start"), fast[:4], plain[:4]):
        assert a.dtype == b.dtype, name
        np.testing.assert_array_equal(a, b, err_msg=name)
        # Bit for bit, signed zeros included.
        assert a.tobytes() == b.tobytes(), name
    seg, local, _, start, grid = fast
    # A station said to be on the grid is exactly there; every grid point has its station.
    on = grid >= 0
    np.testing.assert_array_equal(local[on], lengths_mm[seg[on]] * (grid[on] / n_div[seg[on]]))
    for j in range(lengths_mm.size):
        in_j = grid[start[j] : start[j + 1]]
        assert set(range(int(n_div[j]) + 1)) - set(in_j[in_j >= 0].tolist()) <= {
            i for i in range(int(n_div[j]) + 1) if _point_load_on(table, j, lengths_mm, n_div, i)
        }


def _point_load_on(table, j, lengths_mm, n_div, i) -> bool:
    """A point load of segment j takes grid point i's place (its key is the grid point's)."""
    key = np.round(lengths_mm[j] * (i / n_div[j]) / TOL)
    at = np.round(table.start_m[(table.segment == j) & table.is_point] * 1000.0 / TOL)
    return bool((at == key).any())


def test_close_grid_points_are_placed_by_keys() -> None:
    # Grid points closer than the fast placement allows: the key placement merges them.
    lengths_mm = np.array([3.0 * TOL, 1000.0])
    n_div = np.array([20, 20])
    assert not stn.arithmetic_placement_holds(lengths_mm, n_div)
    model = BeamModel.from_spans([3.0 * TOL, 1000.0])
    table = load_table(model, [[UniformLoad(1, 1.0)]])
    seg, local, side, start, grid = stn.station_arrays(
        lengths_mm, n_div, np.zeros(2), np.zeros(2), table
    )
    assert (grid == -1).all()
    # Keys 0..3 on the short segment (grid points 0-3, 4-9, 10-16 and 17-20 share them):
    # the first grid point of each, snapped to a node within the tolerance; then the 21
    # grid points of the other segment.
    np.testing.assert_array_equal(start, [0, 4, 25])
    np.testing.assert_array_equal(seg[:5], [0, 0, 0, 0, 1])
    np.testing.assert_array_equal(local[:4], [0.0, 0.0, 1.5 * TOL, 3.0 * TOL])
    np.testing.assert_array_equal(side[:5], [1, 1, 0, -1, 1])
