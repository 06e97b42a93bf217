"""Timing of the analysis engine (a script, not a test: pytest collects only test_*.py).

Run:  /work/venv/bin/python tests/benchmarks/bench_analysis.py

1. Full-superposition envelope (6.10a/b, every subset of loaded spans) of 10, 100 and 1000
   equal 5 m spans. Targets: 100 spans < 50 ms, 1000 spans < 2 s.
2. A 50-span strip with 51 load cases (permanent on all spans + variable on each span
   alone) solved by this package and by anastruct (test-only oracle, one solve per case,
   one element per span), side by side. Target ratio >= 300.
"""

from __future__ import annotations

import statistics
import sys
import time
from collections.abc import Callable
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from analysis.arrangements import ActionFactors, Combination, PatternRule
from analysis.beam import BeamModel, Restraint, UniformLoad
from analysis.envelope import analyse_envelope
from analysis.stiffness import solve

SPAN_MM = 5000.0
G_KN_M = 6.0
Q_KN_M = 2.5
EI_KNM2 = 3.0e4


def _strip(n: int) -> BeamModel:
    x = tuple(SPAN_MM * i for i in range(n + 1))
    return BeamModel(x, (Restraint.PINNED,) * (n + 1), (300.0,) * (n + 1), ei_knm2=EI_KNM2)


def _best_median(fn: Callable[[], object], repeat: int) -> tuple[float, float]:
    fn()  # warm up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times), statistics.median(times)


def _envelope(n: int) -> Callable[[], object]:
    model = _strip(n)
    g = [UniformLoad(i, G_KN_M) for i in range(n)]
    q = [UniformLoad(i, Q_KN_M) for i in range(n)]
    return lambda: analyse_envelope(
        model, g, q, ActionFactors(), Combination.EQ_6_10AB, PatternRule.ALL_SUBSETS
    )


def _anastruct_cases(n: int) -> Callable[[], object]:
    from anastruct import SystemElements  # test-only oracle, imported only here

    def run() -> list[list[float]]:
        peaks = []
        for case in range(n + 1):
            ss = SystemElements(EI=EI_KNM2, EA=1.0e9)
            for i in range(n):
                ss.add_element([[SPAN_MM / 1000.0 * i, 0.0], [SPAN_MM / 1000.0 * (i + 1), 0.0]])
            ss.add_support_hinged(1)
            for node in range(2, n + 2):
                ss.add_support_roll(node)
            if case == 0:
                ss.q_load(q=-G_KN_M, element_id=list(range(1, n + 1)), direction="y")
            else:
                ss.q_load(q=-Q_KN_M, element_id=case, direction="y")
            ss.solve()
            peaks.append([ss.get_element_results(e)["Mmax"] for e in range(1, n + 1)])
        return peaks

    return run


def main() -> None:
    print("Full-superposition envelope, 6.10a/b, all subsets (n + 1 unit cases)")
    print(f"{'spans':>6} {'stations':>9} {'best ms':>9} {'median ms':>10} {'target':>8}")
    for n, target_ms, repeat in ((10, None, 50), (100, 50.0, 20), (1000, 2000.0, 3)):
        fn = _envelope(n)
        best, med = _best_median(fn, repeat)
        n_st = len(fn().stations)  # type: ignore[attr-defined]
        tgt = f"< {target_ms:.0f}" if target_ms else "-"
        print(f"{n:>6} {n_st:>9} {best * 1e3:>9.2f} {med * 1e3:>10.2f} {tgt:>8}")

    n = 50
    model = _strip(n)
    cases = [[UniformLoad(i, G_KN_M) for i in range(n)]] + [
        [UniformLoad(i, Q_KN_M)] for i in range(n)
    ]
    best_solve, med_solve = _best_median(lambda: solve(model, cases), 30)
    best_env, med_env = _best_median(_envelope(n), 30)
    try:
        best_ana, med_ana = _best_median(_anastruct_cases(n), 3)
    except ImportError:
        print("\nanastruct not installed: skipping the side-by-side run")
        return
    print(f"\n{n} spans, {n + 1} load cases (median of repeats)")
    print(f"{'engine':<44} {'ms':>9} {'anastruct / this':>17}")
    print(f"{'anastruct 1.x, 51 separate solves':<44} {med_ana * 1e3:>9.1f} {'':>17}")
    print(
        f"{'this package: solve() all stations':<44} {med_solve * 1e3:>9.2f} "
        f"{med_ana / med_solve:>16.0f}x"
    )
    print(
        f"{'this package: analyse_envelope() incl. envelope':<44} {med_env * 1e3:>9.2f} "
        f"{med_ana / med_env:>16.0f}x"
    )
    print(
        f"(best times: anastruct {best_ana * 1e3:.1f} ms, solve {best_solve * 1e3:.2f} ms, "
        f"envelope {best_env * 1e3:.2f} ms)"
    )


if __name__ == "__main__":
    main()
