"""Concrete cover: EN 1992-1-1:2004 4.4.1.

c_nom = c_min + delta_c_dev (4.1); c_min = max(c_min,b; c_min,dur + delta_c_dur,gamma -
delta_c_dur,st - delta_c_dur,add; 10 mm) (4.2), the three delta_c_dur terms taken as 0;
c_min,b = phi for separate bars (+5 mm when d_g > 32 mm); delta_c_dev = 10 mm.

c_min,dur comes from the EN recommended Table 4.4N (default structural class S4; the S4 row
matches a published reproduction, the other rows are from memory). NOT IMPLEMENTED: the UK
NA replaces c_min,dur by the BS 8500-1 values (which depend on strength class, cement type
and intended working life), and Table 4.3N adjustments of the structural class. Results
say so in their ``basis`` line so that the calc report carries the caveat.
"""

from __future__ import annotations

from detailer.codes.base import CoverCheck, CoverRequirement, DesignCodeError

DELTA_C_DEV = 10.0  # mm, 4.4.1.3(1)P recommended value

# Table 4.4N columns, reinforcing steel: X0, XC1, XC2/XC3, XC4, XD1/XS1, XD2/XS2, XD3/XS3.
_COLUMNS: dict[str, int] = {
    "X0": 0,
    "XC1": 1,
    "XC2": 2,
    "XC3": 2,
    "XC4": 3,
    "XD1": 4,
    "XS1": 4,
    "XD2": 5,
    "XS2": 5,
    "XD3": 6,
    "XS3": 6,
}
TABLE_4_4N: dict[str, tuple[float, ...]] = {
    "S1": (10, 10, 10, 15, 20, 25, 30),
    "S2": (10, 10, 15, 20, 25, 30, 35),
    "S3": (10, 10, 20, 25, 30, 35, 40),
    "S4": (10, 15, 25, 30, 35, 40, 45),
    "S5": (15, 20, 30, 35, 40, 45, 50),
    "S6": (20, 25, 35, 40, 45, 50, 55),
}
BASIS = "EN Table 4.4N (recommended values); UK NA / BS 8500-1 cover values not implemented"


def c_min_dur(exposure: str, structural_class: str = "S4") -> float:
    """Minimum cover for durability, reinforcing steel, mm (EN recommended values).

    EN 1992-1-1:2004, 4.4.1.2(5), Table 4.4N.
    """
    exp = exposure.strip().upper()
    cls = structural_class.strip().upper()
    if exp not in _COLUMNS:
        raise DesignCodeError(
            f"exposure class {exposure!r} not known for cover; use one of {', '.join(_COLUMNS)}"
        )
    if cls not in TABLE_4_4N:
        raise DesignCodeError(f"structural class {structural_class!r}: use S1 to S6")
    return TABLE_4_4N[cls][_COLUMNS[exp]]


def c_min_b(phi: float, d_g: float = 20.0) -> float:
    """Minimum cover for bond of a separate bar: phi, +5 mm when aggregate d_g > 32 mm.

    EN 1992-1-1:2004, 4.4.1.2(3), Table 4.2.
    """
    return phi + (5.0 if d_g > 32.0 else 0.0)


def c_min(c_min_b: float, c_min_dur: float) -> float:
    """Minimum cover c_min = max(c_min,b; c_min,dur; 10 mm), the delta_c_dur terms being 0.

    EN 1992-1-1:2004, Eq. (4.2).
    """
    return max(c_min_b, c_min_dur, 10.0)


def c_nom(c_min: float, delta_c_dev: float = DELTA_C_DEV) -> float:
    """Nominal cover c_nom = c_min + delta_c_dev, mm.

    EN 1992-1-1:2004, Eq. (4.1), 4.4.1.3(1)P.
    """
    return c_min + delta_c_dev


def cover_requirement(
    phi: float,
    exposure: str,
    structural_class: str = "S4",
    d_g: float = 20.0,
    delta_c_dev: float = DELTA_C_DEV,
) -> CoverRequirement:
    """Required nominal cover to a bar of diameter phi (mm).

    EN 1992-1-1:2004, 4.4.1.1, Eq. (4.1), Eq. (4.2), Table 4.4N.
    """
    if phi <= 0.0:
        raise DesignCodeError(f"bar diameter {phi} mm must be positive")
    if not 0.0 <= delta_c_dev <= 10.0:
        raise DesignCodeError(f"delta_c_dev = {delta_c_dev} mm must be within 0..10 mm")
    cb = c_min_b(phi, d_g)
    cd = c_min_dur(exposure, structural_class)
    cm = c_min(cb, cd)
    return CoverRequirement(
        phi=phi,
        exposure=exposure.strip().upper(),
        structural_class=structural_class.strip().upper(),
        c_min_b=cb,
        c_min_dur=cd,
        c_min=cm,
        delta_c_dev=delta_c_dev,
        c_nom=c_nom(cm, delta_c_dev),
        basis=BASIS,
    )


def check_nominal_cover(c_nom_provided: float, required: CoverRequirement) -> CoverCheck:
    """Compare a provided nominal cover with the requirement; one readable line.

    EN 1992-1-1:2004, 4.4.1.1(2)P, Eq. (4.1).
    """
    r = required
    detail = (
        f"c_min = max(c_min,b {r.c_min_b:g}, c_min,dur {r.c_min_dur:g}, 10) = {r.c_min:g} mm "
        f"+ delta_c_dev {r.delta_c_dev:g} mm"
    )
    where = f"phi {r.phi:g} bars in {r.exposure}, {r.structural_class}"
    ok = c_nom_provided >= r.c_nom - 1e-9
    if ok:
        message = (
            f"nominal cover {c_nom_provided:g} mm >= required {r.c_nom:g} mm for {where} ({detail})"
        )
    else:
        message = (
            f"nominal cover {c_nom_provided:g} mm is less than the {r.c_nom:g} mm required for "
            f"{where} ({detail}); increase the cover to at least {r.c_nom:g} mm"
        )
    return CoverCheck(ok=ok, c_nom_provided=c_nom_provided, required=r, message=message)
