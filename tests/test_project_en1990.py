"""EN 1990 factors used by the project reader and the strip analysis.

Sources: EN 1990:2002 Table A1.1 (psi factors for buildings; the A/B row also in
shared/reference/standards.md 3.4 [R]); UK NA to BS EN 1990 Table NA.A1.1 (roofs psi_0 = 0.7,
from memory) and Table NA.A1.2(B) (1.35 / 1.0 / 1.5, xi = 0.925; standards.md 3.4 gives
6.10b as 1.25 G_k + 1.5 Q_k, i.e. 0.925 x 1.35 = 1.249); recommended xi = 0.85 (from memory).
"""

from __future__ import annotations

import inspect
import re

import pytest

from detailer.codes import en1990

TABLE_A1_1 = {  # EN 1990:2002 Table A1.1 (recommended values), from memory except A/B
    "A": (0.7, 0.5, 0.3),
    "B": (0.7, 0.5, 0.3),
    "C": (0.7, 0.7, 0.6),
    "D": (0.7, 0.7, 0.6),
    "E": (1.0, 0.9, 0.8),
    "F": (0.7, 0.7, 0.6),
    "G": (0.7, 0.5, 0.3),
    "H": (0.0, 0.0, 0.0),
}


@pytest.mark.parametrize("category", sorted(TABLE_A1_1))
def test_table_a1_1_recommended(category: str) -> None:
    psi = en1990.psi_factors(category, "recommended")
    assert (psi.psi_0, psi.psi_1, psi.psi_2) == TABLE_A1_1[category]


@pytest.mark.parametrize("category", sorted(TABLE_A1_1))
def test_table_na_a1_1_uk(category: str) -> None:
    psi = en1990.psi_factors(category)
    expected = (0.7, 0.0, 0.0) if category == "H" else TABLE_A1_1[category]
    assert (psi.psi_0, psi.psi_1, psi.psi_2) == expected


def test_categories_and_lookup_errors() -> None:
    assert en1990.IMPOSED_LOAD_CATEGORIES == tuple("ABCDEFGH")
    assert en1990.psi_factors(" a ").psi_0 == 0.7
    assert en1990.category_description("A") == "domestic, residential areas"
    with pytest.raises(KeyError):
        en1990.psi_factors("Z")
    with pytest.raises(KeyError):
        en1990.psi_factors("A", "FR")


def test_partial_factors_uk_na() -> None:
    f = en1990.partial_factors("UK")
    assert (f.gamma_g_sup, f.gamma_g_inf, f.gamma_q, f.xi) == (1.35, 1.0, 1.5, 0.925)
    assert f.xi * f.gamma_g_sup == pytest.approx(1.25, abs=0.005)  # "1.25 G_k", printed to 2 d.p.
    assert en1990.partial_factors("recommended").xi == 0.85


def test_every_public_function_cites_en_1990() -> None:
    pattern = re.compile(
        r"^EN 1990:2002, (Table A1\.[12](\(B\))?|Eq\. \(6\.\d+[ab]?\))( \+ UK NA)?\.$", re.MULTILINE
    )
    funcs = [
        f
        for n, f in inspect.getmembers(en1990, inspect.isfunction)
        if not n.startswith("_") and f.__module__ == en1990.__name__
    ]
    assert len(funcs) == 3
    for f in funcs:
        assert pattern.search(inspect.getdoc(f) or ""), f.__name__
