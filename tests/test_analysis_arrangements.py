"""Combination equations and arrangement labels.

Sources: EN 1990:2002 Eq. (6.10), (6.10a), (6.10b), (6.14b), (6.16b); UK NA to BS EN 1990
Table NA.A1.2(B): gamma_G,sup = 1.35, gamma_G,inf = 1.0, gamma_Q = 1.5, xi = 0.925, so 6.10b
is 1.25 Gk + 1.5 Qk (UK worked examples: "n = 1.25 x gk + 1.5 x qk"); EN 1990 Table A1.1:
psi_0 = 0.7, psi_2 = 0.3 for categories A and B.
"""

from __future__ import annotations

import pytest

from analysis.arrangements import (
    ActionFactors,
    Arrangement,
    Combination,
    alternate_sets,
    equations,
    make_arrangement,
)
from analysis.beam import BeamModel, Restraint

F = ActionFactors()


def test_uk_default_factors() -> None:
    assert (F.gamma_g_sup, F.gamma_g_inf, F.gamma_q) == (1.35, 1.0, 1.5)
    assert (F.psi_0, F.psi_2, F.xi) == (0.7, 0.3, 0.925)


def test_equations() -> None:
    (e,) = equations(Combination.EQ_6_10, F)
    assert (e.name, e.gamma_g, e.gamma_q) == ("6.10", 1.35, 1.5)
    a, b = equations(Combination.EQ_6_10AB, F)
    assert (a.name, a.gamma_g, a.gamma_q) == ("6.10a", 1.35, pytest.approx(1.05))
    # 0.925 x 1.35 = 1.24875, published as 1.25 (two decimals)
    assert (b.name, b.gamma_g, b.gamma_q) == ("6.10b", pytest.approx(1.25, abs=0.005), 1.5)
    (c,) = equations(Combination.CHARACTERISTIC, F)
    assert (c.gamma_g, c.gamma_q) == (1.0, 1.0)
    (qp,) = equations(Combination.QUASI_PERMANENT, F)
    assert (qp.name, qp.gamma_g, qp.gamma_q) == ("quasi-permanent", 1.0, 0.3)


@pytest.mark.parametrize(
    "kwargs", [{"gamma_q": -1.0}, {"psi_0": 1.2}, {"xi": float("nan")}, {"psi_2": 2}]
)
def test_factor_validation(kwargs: dict) -> None:
    with pytest.raises(ValueError, match="ActionFactors"):
        ActionFactors(**kwargs)
    with pytest.raises(TypeError):
        ActionFactors(gamma_q="1.5")  # type: ignore[arg-type]


def test_labels_use_span_numbers_and_name_cantilevers() -> None:
    plain = BeamModel.from_spans([4000.0] * 4)
    assert make_arrangement(plain, "6.10b", (0, 2)).label == "6.10b, Q on spans 1, 3"
    assert make_arrangement(plain, "6.10a", (1,)).label == "6.10a, Q on span 2"
    assert make_arrangement(plain, "6.10", range(4)).label == "6.10, Q on all spans"
    assert make_arrangement(plain, "6.10", ()).label == "6.10, G only"
    cant = BeamModel.from_spans([1200.0, 4000.0, 4000.0, 900.0], Restraint.FREE, Restraint.FREE)
    assert make_arrangement(cant, "6.10b", (0, 2)).label == "6.10b, Q on left cantilever, span 2"
    assert make_arrangement(cant, "6.10b", (1, 3)).label == "6.10b, Q on span 1, right cantilever"
    assert make_arrangement(cant, "6.10b", (0, 3)).label == (
        "6.10b, Q on left cantilever, right cantilever"
    )
    assert make_arrangement(cant, "6.10", range(4)).label == (
        "6.10, Q on all spans and both cantilevers"
    )
    one = BeamModel.from_spans([1200.0, 4000.0], Restraint.FREE, Restraint.PINNED)
    assert make_arrangement(one, "6.10", (0, 1)).label == "6.10, Q on all spans and the cantilever"
    # an arrangement built without the model numbers segments from 1
    assert Arrangement("6.10", (0, 2)).label == "6.10, Q on spans 1, 3"


def test_alternate_sets_uk_na() -> None:
    # UK NA to EN 1992-1-1 5.1.3(1): all spans, then each set of alternate spans
    assert alternate_sets(5) == ((0, 1, 2, 3, 4), (0, 2, 4), (1, 3))
    assert alternate_sets(2) == ((0, 1), (0,), (1,))
