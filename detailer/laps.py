"""Bar runs longer than the stock length: lapped pieces with staggered laps.

EN 1992-1-1:2004, 8.7: laps of alternate bars are staggered (centres at least 1.3 l_0 apart,
8.7.2(3)) so that half the bars are lapped at a section (alpha_6 for 50 %, 8.7.3 and Table
8.3); where the other group does not run through a lap, every bar there is lapped and the lap
takes alpha_6 for 100 %. Lap centres are put where the demand on that face is least.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import replace

import numpy as np

from detailer.curtailment import BarEnds, Run
from detailer.demand import DemandCurve
from detailer.errors import DesignError


def developed_mm(run: Run) -> float:
    """Length of bar a run needs: the horizontal run plus its legs."""
    return (run.x_end_mm - run.x_start_mm) + run.ends.left_leg_mm + run.ends.right_leg_mm


def split_for_stock(
    run: Run,
    *,
    stock_mm: float,
    lap_mm: float,
    curve: DemandCurve,
    avoid_mm: tuple[float, ...] = (),
    min_gap_mm: float = 0.0,
) -> tuple[Run, ...]:
    """Split a run longer than the stock length into pieces lapped by ``lap_mm``.

    Each lap centre is put where the (unshifted) demand on that face is least within the reach
    of the piece, and at least ``min_gap_mm`` from every centre in ``avoid_mm`` (the laps of the
    alternate bars: centres 1.3 l_0 apart are not in the same lapped section, EN 1992-1-1:2004,
    8.7.2(3) and 8.7.3(1)). Pieces of one run get consecutive suffixes 1, 2, ...
    """
    if developed_mm(run) <= stock_mm:
        return (run,)
    if lap_mm >= stock_mm / 2:
        raise DesignError(
            f"zone {run.zone_id}: lap {lap_mm:.0f} mm is too long for {stock_mm:.0f} mm stock bars; "
            "use smaller bars or longer stock lengths"
        )
    pieces: list[Run] = []
    start = run.x_start_mm
    left_leg = run.ends.left_leg_mm
    grid = curve.x_mm
    avoid = np.asarray(avoid_mm, dtype=float)
    k = 1
    while True:
        reach = stock_mm - left_leg  # horizontal length this piece may have
        if run.x_end_mm - start + run.ends.right_leg_mm <= reach + 1e-6:
            pieces.append(_piece(run, k, start, run.x_end_mm, left_leg, run.ends.right_leg_mm))
            break
        hi = start + reach - lap_mm / 2
        # aim at equal pieces, then look for low demand within a quarter piece of the aim
        remaining = run.x_end_mm - start + left_leg + run.ends.right_leg_mm
        n_left = max(math.ceil((remaining - lap_mm) / (stock_mm - lap_mm) - 1e-9), 2)
        piece = (remaining + (n_left - 1) * lap_mm) / n_left
        aim = start - left_leg + piece - lap_mm / 2
        lo = max(start + 1.5 * lap_mm, aim - 0.25 * piece)
        hi = min(hi, aim + 0.25 * piece)
        sel = (grid >= lo) & (grid <= hi)
        if avoid.size:
            sel &= np.min(np.abs(grid[:, None] - avoid[None, :]), axis=1) >= min_gap_mm
        if np.any(sel):
            cand = grid[sel]
            vals = curve.m_knm_per_m[sel]
            # least demand; among equals the one nearest the aim
            best = np.flatnonzero(vals <= vals.min() + 1e-6)
            centre = float(cand[best[int(np.argmin(np.abs(cand[best] - aim)))]])
        else:
            centre = hi
        pieces.append(_piece(run, k, start, centre + lap_mm / 2, left_leg, 0.0))
        start = centre - lap_mm / 2
        left_leg = 0.0
        k += 1
        if k > 1000:
            raise DesignError(f"zone {run.zone_id}: cannot split the bar run for stock lengths")
    return tuple(pieces)


def lap_centres_mm(pieces: tuple[Run, ...]) -> tuple[float, ...]:
    """Centres of the laps between consecutive pieces of one run."""
    return tuple(0.5 * (a.x_end_mm + b.x_start_mm) for a, b in itertools.pairwise(pieces))


def split_zone_runs(
    runs: tuple[Run, ...],
    *,
    stock_mm: float,
    lap_mm: float,
    curve: DemandCurve,
    lap_all_mm: float | None = None,
) -> tuple[Run, ...]:
    """Split a zone's runs for stock lengths with staggered laps.

    A single group that needs laps becomes two alternate groups so that only half of the bars
    are lapped at any section; the second group's laps keep 1.3 l_0 clear of the first's.
    ``lap_mm`` is l_0 for half the bars lapped at a section; where the other group does not
    run past a lap (so every bar there is lapped) the lap is ``lap_all_mm`` (alpha_6 for
    100 %, EN 1992-1-1:2004, Table 8.3).
    """
    if all(developed_mm(r) <= stock_mm for r in runs):
        return runs
    lap_all = lap_mm if lap_all_mm is None else lap_all_mm
    if len(runs) == 1:
        r = runs[0]
        note = "alternate bars, laps staggered"
        runs = (
            replace(
                r, set_id=f"{r.set_id}-a", spacing_mm=2 * r.spacing_mm, offset_mm=0.0, note=note
            ),
            replace(
                r,
                set_id=f"{r.set_id}-b",
                spacing_mm=2 * r.spacing_mm,
                offset_mm=float(r.spacing_mm),
                note=note,
            ),
        )
    out: list[Run] = []
    centres: tuple[float, ...] = ()
    for k, r in enumerate(runs):
        others = [o for j, o in enumerate(runs) if j != k]
        pieces = ()
        for lap in (lap_mm, lap_all):
            pieces = split_for_stock(
                r,
                stock_mm=stock_mm,
                lap_mm=lap,
                curve=curve,
                avoid_mm=centres,
                min_gap_mm=1.3 * lap,
            )
            # half lapped only where the other group runs through the whole lap zone
            if all(
                any(o.x_start_mm <= c - 0.65 * lap and o.x_end_mm >= c + 0.65 * lap for o in others)
                for c in lap_centres_mm(pieces)
            ):
                break
        centres = centres + lap_centres_mm(pieces)
        out.extend(pieces)
    return tuple(out)


def _piece(run: Run, k: int, x0: float, x1: float, left_leg: float, right_leg: float) -> Run:
    return Run(
        f"{run.set_id}{k}",
        run.zone_id,
        run.face,
        run.layer,
        run.phi_mm,
        run.spacing_mm,
        run.offset_mm,
        x0,
        x1,
        BarEnds(left_leg, right_leg),
        (run.note + "; " if run.note else "") + f"lapped length, piece {k}",
    )
