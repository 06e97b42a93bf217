"""EN 1990 (basis of structural design) for building floors: psi factors and ULS partial factors.

Values are those of EN 1990:2002 Annex A1 with the UK National Annex (NA to BS EN 1990:2002+A1).
Only imposed floor and roof loads (EN 1991-1-1 categories A to H) are covered; snow, wind and
thermal actions do not act on an internal one-way slab strip in this tool.
"""

from __future__ import annotations

__all__ = [
    "IMPOSED_LOAD_CATEGORIES",
    "PartialFactors",
    "PsiFactors",
    "category_description",
    "partial_factors",
    "psi_factors",
]

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class PsiFactors:
    """Combination factors for one variable action (dimensionless)."""

    psi_0: float  # combination value
    psi_1: float  # frequent value
    psi_2: float  # quasi-permanent value


@dataclass(frozen=True, slots=True)
class PartialFactors:
    """ULS partial factors for STR/GEO set B (dimensionless)."""

    gamma_g_sup: float  # permanent action, unfavourable
    gamma_g_inf: float  # permanent action, favourable
    gamma_q: float  # leading and accompanying variable actions, unfavourable (0 when favourable)
    xi: float  # reduction factor on unfavourable permanent actions in Eq. (6.10b)


# EN 1990:2002 Table A1.1, recommended values: (psi_0, psi_1, psi_2, description).
_TABLE_A1_1: dict[str, tuple[float, float, float, str]] = {
    "A": (0.7, 0.5, 0.3, "domestic, residential areas"),
    "B": (0.7, 0.5, 0.3, "office areas"),
    "C": (0.7, 0.7, 0.6, "congregation areas"),
    "D": (0.7, 0.7, 0.6, "shopping areas"),
    "E": (1.0, 0.9, 0.8, "storage areas"),
    "F": (0.7, 0.7, 0.6, "traffic area, vehicle weight <= 30 kN"),
    "G": (0.7, 0.5, 0.3, "traffic area, 30 kN < vehicle weight <= 160 kN"),
    "H": (0.0, 0.0, 0.0, "roofs"),
}

# UK NA Table NA.A1.1 departs from the recommended values only for roofs: psi_0 = 0.7
# (from memory: check against the NA before relying on it).
_UK_NA_TABLE_A1_1: dict[str, tuple[float, float, float]] = {"H": (0.7, 0.0, 0.0)}

#: The imposed-load categories this module knows, in table order.
IMPOSED_LOAD_CATEGORIES: tuple[str, ...] = tuple(_TABLE_A1_1)

_ANNEXES = ("UK", "recommended")


def psi_factors(category: str, national_annex: str = "UK") -> PsiFactors:
    """psi_0, psi_1, psi_2 for an imposed-load category A to H of EN 1991-1-1.

    EN 1990:2002, Table A1.1 + UK NA.

    ``national_annex`` is ``"UK"`` (UK NA Table NA.A1.1) or ``"recommended"`` (the values
    of the table itself). Raises ``KeyError`` for an unknown category or annex.
    """
    if national_annex not in _ANNEXES:
        raise KeyError(f"unknown national annex {national_annex!r}; use one of {_ANNEXES}")
    key = category.strip().upper()
    if key not in _TABLE_A1_1:
        raise KeyError(f"unknown imposed-load category {category!r}")
    psi_0, psi_1, psi_2, _ = _TABLE_A1_1[key]
    if national_annex == "UK" and key in _UK_NA_TABLE_A1_1:
        psi_0, psi_1, psi_2 = _UK_NA_TABLE_A1_1[key]
    return PsiFactors(psi_0=psi_0, psi_1=psi_1, psi_2=psi_2)


def category_description(category: str) -> str:
    """Short description of an imposed-load category.

    EN 1990:2002, Table A1.1.
    """
    return _TABLE_A1_1[category.strip().upper()][3]


def partial_factors(national_annex: str = "UK") -> PartialFactors:
    """Partial factors for persistent and transient design situations, STR/GEO (set B).

    EN 1990:2002, Table A1.2(B) + UK NA.

    gamma_G,sup = 1.35, gamma_G,inf = 1.0 and gamma_Q = 1.5 in both; xi for Eq. (6.10b) is
    0.925 in the UK NA (Table NA.A1.2(B)) against the recommended 0.85 (from memory).
    """
    if national_annex not in _ANNEXES:
        raise KeyError(f"unknown national annex {national_annex!r}; use one of {_ANNEXES}")
    xi = 0.925 if national_annex == "UK" else 0.85
    return PartialFactors(gamma_g_sup=1.35, gamma_g_inf=1.0, gamma_q=1.5, xi=xi)
