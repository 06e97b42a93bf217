"""The BS 8666:2005 standard shapes catalogue: dimension sets, free dimensions, length formulas.

Every length formula of the BS 8666:2005 standard shapes table (believed to be its Table 3) is
linear in the dimensions, the bar size d and the scheduling radius r, so each is stored as its
coefficients: code 11, L = A + (B) - 0.5r - d, is ``{"A": 1, "B": 1, "r": -0.5, "d": -1}``.
"""

from __future__ import annotations

__all__ = [
    "BAR_TYPES",
    "DIM_NAMES",
    "SHAPES",
    "STANDARD",
    "ShapeDefinition",
    "ShapeError",
    "formula_length_mm",
    "shape_definition",
]

from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType
from typing import Final

from detailer.errors import InputError
from detailer.shapes.table2 import bending_limits

STANDARD: Final = "BS 8666:2005"

#: Dimension names in schedule column order; R is a specified non-standard bend radius.
DIM_NAMES: Final[tuple[str, ...]] = ("A", "B", "C", "D", "E", "R")

#: Steel notation, BS 8666:2005 Table 1 as amended (from memory): H = B500A, B500B or B500C to
#: BS 4449; A = B500A; B = B500B or B500C; C = B500C; S = stainless; X = other.
BAR_TYPES: Final[tuple[str, ...]] = ("H", "A", "B", "C", "S", "X")


class ShapeError(InputError, ValueError):
    """A shape that cannot be scheduled or bent. ``str()`` is one line: what, where, the fix.

    ``code``, ``phi_mm``, ``dim`` and ``minimum_mm`` say which rule failed where.
    """

    def __init__(
        self,
        message: str,
        *,
        code: str = "",
        phi_mm: int | None = None,
        dim: str = "",
        minimum_mm: float | None = None,
        fix: str = "",
    ) -> None:
        self.message = message
        self.code = code
        self.phi_mm = phi_mm
        self.dim = dim
        self.minimum_mm = minimum_mm
        self.fix = fix
        text = f"{message}; {fix}" if fix else message
        super().__init__(" ".join(text.split()))


@dataclass(frozen=True, slots=True)
class ShapeDefinition:
    """One shape code of the BS 8666:2005 standard shapes table.

    ``dims`` are the dimensions a schedule must give (including those only shown on the
    sketch, such as B of code 14 or the offset D of code 26); ``coefficients`` the length
    formula (keys are dimension names, "r" and "d"). The check lists name the dimensions that
    are end legs (>= P), legs between two bends (>= x of Figure 6) and the outside widths of
    semicircles (>= 2(r + d)).
    """

    code: str
    description: str
    dims: tuple[str, ...]
    optional_dims: tuple[str, ...]
    free_dims: tuple[str, ...]  # printed in parentheses
    formula: str  # as printed in the shapes table
    coefficients: tuple[tuple[str, float], ...]
    bends: int  # number of bends, a semicircle counting as one
    end_dims: tuple[str, ...] = ()
    between_dims: tuple[str, ...] = ()
    semicircle_dims: tuple[str, ...] = ()
    approximate: bool = False  # shapes table Note 1: the formula is approximate

    @property
    def has_formula(self) -> bool:
        return bool(self.coefficients)


def _coefs(text: str) -> tuple[tuple[str, float], ...]:
    """ "A+B-0.5r-d" -> (("A", 1.0), ("B", 1.0), ("r", -0.5), ("d", -1.0))."""
    out: list[tuple[str, float]] = []
    for term in text.replace("-", "+-").split("+"):
        if term:
            number, name = term[:-1], term[-1]
            value = -1.0 if number == "-" else float(number) if number else 1.0
            out.append((name, value))
    return tuple(out)


def _d(
    code: str,
    description: str,
    dims: str,
    free: str,
    formula: str,
    coefs: str,
    bends: int,
    *,
    optional: str = "",
    end: str = "",
    between: str = "",
    semi: str = "",
    approximate: bool = False,
) -> ShapeDefinition:
    radius = ("R",) if bends and "R" not in dims and "R" not in optional else ()
    return ShapeDefinition(
        code=code,
        description=description,
        dims=tuple(dims),
        optional_dims=tuple(optional) + radius,
        free_dims=tuple(free),
        formula=formula,
        coefficients=_coefs(coefs),
        bends=bends,
        end_dims=tuple(end),
        between_dims=tuple(between),
        semicircle_dims=tuple(semi),
        approximate=approximate,
    )


# Formulas and rules as printed in the BS 8666:2005 standard shapes table (reproduced by
# several fabricators; see shared reference notes 1.1). Geometry words are from memory.
_CATALOGUE = (
    _d("00", "straight, cut to length", "A", "", "A", "A", 0),
    _d("01", "straight, stock length", "A", "", "A", "A", 0),
    _d("11", "one 90 deg bend (L)", "AB", "B", "A + (B) - 0.5r - d", "A+B-0.5r-d", 1, end="AB"),
    _d("12", "one 90 deg bend of radius R", "ABR", "B", "A + (B) - 0.43R - 1.2d",
       "A+B-0.43R-1.2d", 1, end="AB"),
    _d("13", "semicircle between two straights, B its outside width", "ABC", "C",
       "A + 0.57B + (C) - 1.6d", "A+0.57B+C-1.6d", 1, end="AC", semi="B"),
    _d("14", "one inclined bend, B shown", "ABC", "C", "A + (C) - 4d", "A+C-4d", 1,
       end="AC", approximate=True),
    _d("15", "one inclined bend, B shown", "ABC", "C", "A + (C)", "A+C", 1,
       end="AC", approximate=True),
    _d("21", "two 90 deg bends, same direction (U)", "ABC", "C", "A + B + (C) - r - 2d",
       "A+B+C-r-2d", 2, end="AC", between="B"),
    _d("22", "90 deg bend then a semicircle, C its outside width", "ABCD", "D",
       "A + B + C + (D) - 1.5r - 3d", "A+B+C+D-1.5r-3d", 2, end="AD", between="B", semi="C"),
    _d("23", "two 90 deg bends, opposite directions (Z)", "ABC", "C", "A + B + (C) - r - 2d",
       "A+B+C-r-2d", 2, end="AC", between="B"),
    _d("25", "two inclined bends, C and D shown", "ABE", "E", "A + B + (E)", "A+B+E", 2,
       optional="CD", end="AB", approximate=True),
    _d("26", "crank, two bends <= 45 deg, D the offset", "ABCD", "C", "A + B + (C)", "A+B+C",
       2, end="AC", approximate=True),
    _d("31", "three 90 deg bends", "ABCD", "D", "A + B + C + (D) - 1.5r - 3d",
       "A+B+C+D-1.5r-3d", 3, end="AD", between="BC"),
    _d("32", "three bends, one inclined", "ABCD", "D", "A + B + C + (D) - 1.5r - 3d",
       "A+B+C+D-1.5r-3d", 3, end="AD", between="BC", approximate=True),
    _d("33", "link with semicircular ends, B their outside width", "ABC", "C",
       "2A + 1.7B + 2(C) - 4d", "2A+1.7B+2C-4d", 2, end="C", semi="B"),
    _d("41", "four 90 deg bends", "ABCDE", "E", "A + B + C + D + (E) - 2r - 4d",
       "A+B+C+D+E-2r-4d", 4, end="AE", between="BCD"),
    _d("51", "closed link, end legs (C) and (D) equal", "ABC", "CD",
       "2(A + B + (C)) - 2.5r - 5d", "2A+2B+2C-2.5r-5d", 5,
       optional="D", end="C", between="AB"),
    _d("99", "special: dimensioned sketch", "", "", "from the sketch", "", 0,
       optional="ABCDER"),
)  # fmt: skip

#: The catalogue, keyed by shape code ("00" ... "99").
SHAPES: Final[Mapping[str, ShapeDefinition]] = MappingProxyType({s.code: s for s in _CATALOGUE})


def shape_definition(code: str) -> ShapeDefinition:
    """The catalogue entry for ``code``; raises ``ShapeError`` for an unknown code."""
    found = SHAPES.get(code) if isinstance(code, str) else None
    if found is None:
        raise ShapeError(
            f"shape code {code!r} is not in the BS 8666:2005 catalogue",
            code=str(code),
            fix=f"use one of {', '.join(SHAPES)} (99 with a sketch for any other shape)",
        )
    return found


def formula_length_mm(code: str, phi_mm: int, dims: Mapping[str, float]) -> float:
    """Total length L along the centre line from the shape's formula, unrounded, unchecked.

    r is the Table 2 radius of ``phi_mm`` unless ``dims`` gives a radius R.

    BS 8666:2005, Table 3.
    """
    defn = shape_definition(code)
    if not defn.has_formula:
        raise ShapeError(
            f"shape code {code} has no length formula",
            code=code,
            fix="give the length of a code 99 shape, measured from its sketch",
        )
    row = bending_limits(phi_mm)
    symbols = {"d": float(row.d_mm), "r": float(dims.get("R", row.r_mm))}
    total = 0.0
    for name, coef in defn.coefficients:
        value = symbols[name] if name in symbols else float(dims[name])
        total += coef * value
    return total
