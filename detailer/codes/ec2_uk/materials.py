"""Materials: EN 1992-1-1:2004 section 3 (Table 3.1, 3.1.6, 3.2.7) with the UK NA.

Which values the design uses
----------------------------
Table 3.1 prints f_ctm, f_ctk,0.05 and E_cm rounded (C30/37: 2.9, 2.0, 33 GPa). The design
uses the table's *formulas* (f_ctm = 0.30 f_ck^(2/3), f_ctk,0.05 = 0.7 f_ctm,
E_cm = 22 (f_cm/10)^0.3 GPa), unrounded (C30/37: 2.896, 2.028, 32 837 N/mm2), so that every
class, including the BS 8500 classes C28/35 and C32/40 that are not in Table 3.1, is
treated the same way. The rounded table is kept in ``TABLE_3_1`` for reports and tests.
The difference shows in the third figure of A_s,min (216.9 vs 217.2 mm2/m at d = 144).

Partial factors and coefficients (persistent and transient situations):
gamma_c = 1.5, gamma_s = 1.15 (Table 2.1N; UK NA the same), alpha_cc = 0.85 for flexure
(UK NA; EN recommends 1.0), alpha_ct = 1.0.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from detailer.codes.base import ConcreteSteel, DesignCodeError

GAMMA_C = 1.5  # Table 2.1N, persistent/transient
GAMMA_S = 1.15  # Table 2.1N, persistent/transient
ALPHA_CC = 0.85  # 3.1.6(1) UK NA value for flexure and axial load
ALPHA_CT = 1.0  # 3.1.6(2)
E_S = 200_000.0  # 3.2.7(4), N/mm2


@dataclass(frozen=True, slots=True)
class Table31Row:
    """One column of EN 1992-1-1 Table 3.1, as printed (rounded)."""

    f_ck: float  # N/mm2
    f_ck_cube: float  # N/mm2
    f_cm: float  # N/mm2
    f_ctm: float  # N/mm2
    f_ctk_005: float  # N/mm2
    f_ctk_095: float  # N/mm2
    E_cm_gpa: float  # kN/mm2


# EN 1992-1-1:2004 Table 3.1, strength classes C12/15 to C90/105, values as printed.
TABLE_3_1: tuple[Table31Row, ...] = tuple(
    Table31Row(*row)
    for row in (
        (12, 15, 20, 1.6, 1.1, 2.0, 27),
        (16, 20, 24, 1.9, 1.3, 2.5, 29),
        (20, 25, 28, 2.2, 1.5, 2.9, 30),
        (25, 30, 33, 2.6, 1.8, 3.3, 31),
        (30, 37, 38, 2.9, 2.0, 3.8, 33),
        (35, 45, 43, 3.2, 2.2, 4.2, 34),
        (40, 50, 48, 3.5, 2.5, 4.6, 35),
        (45, 55, 53, 3.8, 2.7, 4.9, 36),
        (50, 60, 58, 4.1, 2.9, 5.3, 37),
        (55, 67, 63, 4.2, 3.0, 5.5, 38),
        (60, 75, 68, 4.4, 3.1, 5.7, 39),
        (70, 85, 78, 4.6, 3.2, 6.0, 41),
        (80, 95, 88, 4.8, 3.4, 6.3, 42),
        (90, 105, 98, 5.0, 3.5, 6.6, 44),
    )
)

# Classes accepted: Table 3.1 plus the BS 8500-1 intermediate classes used in the UK
# (C28/35, C32/40; from memory, not in Table 3.1).
_CUBE_BY_CYLINDER: dict[int, int] = {int(r.f_ck): int(r.f_ck_cube) for r in TABLE_3_1}
_CUBE_BY_CYLINDER.update({28: 35, 32: 40})

_CLASS_RE = re.compile(r"^\s*C\s*(\d+)\s*(?:/\s*(\d+))?\s*$", re.IGNORECASE)


def parse_concrete_class(concrete_class: str) -> tuple[float, float]:
    """Return (f_ck, f_ck_cube) in N/mm2 for a class written 'C30/37' or 'C30'.

    EN 1992-1-1:2004, Table 3.1.
    """
    match = _CLASS_RE.match(concrete_class)
    known = ", ".join(f"C{c}/{u}" for c, u in sorted(_CUBE_BY_CYLINDER.items()))
    if match is None:
        raise DesignCodeError(
            f"concrete class {concrete_class!r} not understood; write it like 'C30/37' ({known})"
        )
    f_ck = int(match.group(1))
    if f_ck not in _CUBE_BY_CYLINDER:
        raise DesignCodeError(f"concrete class {concrete_class!r} is not one of {known}")
    cube = _CUBE_BY_CYLINDER[f_ck]
    if match.group(2) is not None and int(match.group(2)) != cube:
        raise DesignCodeError(
            f"concrete class {concrete_class!r}: the cube strength for C{f_ck} is {cube}; "
            f"write 'C{f_ck}/{cube}'"
        )
    return float(f_ck), float(cube)


def table_3_1_row(f_ck: float) -> Table31Row:
    """The printed (rounded) Table 3.1 column for a strength class.

    EN 1992-1-1:2004, Table 3.1.
    """
    for row in TABLE_3_1:
        if row.f_ck == f_ck:
            return row
    raise DesignCodeError(f"f_ck = {f_ck} N/mm2 is not a class in Table 3.1")


def f_cm(f_ck: float) -> float:
    """Mean cylinder strength f_cm = f_ck + 8, N/mm2.

    EN 1992-1-1:2004, Table 3.1.
    """
    return f_ck + 8.0


def f_ctm(f_ck: float) -> float:
    """Mean axial tensile strength, N/mm2: 0.30 f_ck^(2/3) up to C50/60, else 2.12 ln(1 + f_cm/10).

    EN 1992-1-1:2004, Table 3.1.
    """
    if f_ck <= 50.0:
        return 0.30 * f_ck ** (2.0 / 3.0)
    return 2.12 * math.log(1.0 + f_cm(f_ck) / 10.0)


def f_ctk_005(f_ctm: float) -> float:
    """5 % fractile tensile strength f_ctk,0.05 = 0.7 f_ctm, N/mm2.

    EN 1992-1-1:2004, Table 3.1.
    """
    return 0.7 * f_ctm


def f_ctk_095(f_ctm: float) -> float:
    """95 % fractile tensile strength f_ctk,0.95 = 1.3 f_ctm, N/mm2.

    EN 1992-1-1:2004, Table 3.1.
    """
    return 1.3 * f_ctm


def E_cm(f_cm: float) -> float:
    """Secant modulus E_cm = 22 (f_cm/10)^0.3 GPa, returned in N/mm2.

    EN 1992-1-1:2004, Table 3.1.
    """
    return 22_000.0 * (f_cm / 10.0) ** 0.3


def eps_cu2(f_ck: float) -> float:
    """Ultimate compressive strain eps_cu2 (dimensionless, 0.0035 up to C50/60).

    EN 1992-1-1:2004, Table 3.1.
    """
    if f_ck <= 50.0:
        return 0.0035
    return (2.6 + 35.0 * ((90.0 - f_ck) / 100.0) ** 4) / 1000.0


def f_cd(f_ck: float, alpha_cc: float = ALPHA_CC, gamma_c: float = GAMMA_C) -> float:
    """Design compressive strength f_cd = alpha_cc f_ck / gamma_c, N/mm2 (alpha_cc = 0.85).

    EN 1992-1-1:2004, Eq. (3.15) + UK NA.
    """
    return alpha_cc * f_ck / gamma_c


def f_ctd(f_ctk_005: float, alpha_ct: float = ALPHA_CT, gamma_c: float = GAMMA_C) -> float:
    """Design tensile strength f_ctd = alpha_ct f_ctk,0.05 / gamma_c, N/mm2.

    EN 1992-1-1:2004, Eq. (3.16).
    """
    return alpha_ct * f_ctk_005 / gamma_c


def f_yd(f_yk: float, gamma_s: float = GAMMA_S) -> float:
    """Design yield strength f_yd = f_yk / gamma_s, N/mm2.

    EN 1992-1-1:2004, 3.2.7(2).
    """
    return f_yk / gamma_s


def concrete_steel(
    concrete_class: str, f_yk: float = 500.0, ductility_class: str = "B"
) -> ConcreteSteel:
    """Design material values for a concrete class and a reinforcing steel (formula values).

    EN 1992-1-1:2004, Table 3.1, 3.1.6(1), 3.2.2(3)P, Annex C + UK NA.
    """
    f_ck, f_ck_cube = parse_concrete_class(concrete_class)
    if not 400.0 <= f_yk <= 600.0:
        raise DesignCodeError(f"f_yk = {f_yk} N/mm2 is outside 400..600 N/mm2 (3.2.2(3)P)")
    duct = ductility_class.strip().upper()
    if duct not in ("A", "B", "C"):
        raise DesignCodeError(f"steel ductility class {ductility_class!r}: use 'A', 'B' or 'C'")
    tensile = f_ctm(f_ck)
    fractile = f_ctk_005(tensile)
    return ConcreteSteel(
        concrete_class=f"C{int(f_ck)}/{int(f_ck_cube)}",
        f_ck=f_ck,
        f_ck_cube=f_ck_cube,
        f_cm=f_cm(f_ck),
        f_cd=f_cd(f_ck),
        f_ctm=tensile,
        f_ctk_005=fractile,
        f_ctd=f_ctd(fractile),
        E_cm=E_cm(f_cm(f_ck)),
        eps_cu2=eps_cu2(f_ck),
        f_yk=f_yk,
        f_yd=f_yd(f_yk),
        E_s=E_S,
        ductility_class=duct,
        gamma_c=GAMMA_C,
        gamma_s=GAMMA_S,
    )
