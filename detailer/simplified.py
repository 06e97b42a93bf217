"""Simplified curtailment rules for qualifying one-way slabs (fixed fractions of the span).

Source: the simplified detailing rules for slabs of BS 8110-1:1997, 3.12.10.3 and Fig. 3.25,
as carried into UK practice with EN 1992-1-1 (values from memory: check them against the
figure before relying on them). Where EN 1992-1-1 asks for more, EN 1992-1-1 governs here:
half of the span steel goes into every support (9.3.1.2(1), more than the figure's 40 %), and
top steel at end supports follows 9.3.1.2(2) as in the envelope method.

Rules applied (l = the adjacent span, distances from the face of the support):

* top over an internal support: all the steel to max(0.15 l, 45 phi), half of it to 0.3 l;
* bottom of a span: half the steel the full span and into the supports, the other half to
  within 0.1 l of the support centrelines (from memory).

Conditions of use, each checked with its own message (from memory, BS 8110-1:1997, 3.5.2.3
and 3.12.10.3.1): uniformly distributed loads only (no line loads or partial loads); spans
approximately equal (the shortest at least 0.85 of the longest); characteristic imposed load
q_k <= 1.25 g_k and q_k <= 5 kN/m2; no cantilevers (outside the rules' scope); at least two
spans. The self-check still runs on the result: a layout the rules get wrong is refused.
"""

from __future__ import annotations

from detailer.errors import DesignError
from detailer.model import Strip

SIMPLIFIED_SOURCE = "BS 8110-1:1997, 3.12.10.3 and Fig. 3.25 (from memory)"
TOP_FULL_OVER_SPAN = 0.15
TOP_FULL_OVER_PHI = 45.0
TOP_HALF_OVER_SPAN = 0.30
BOTTOM_HALF_STOP_OVER_SPAN = 0.10
MIN_SPAN_RATIO = 0.85
MAX_Q_OVER_G = 1.25
MAX_Q_KN_PER_M2 = 5.0


def qualifies(strip: Strip) -> None:
    """Raise DesignError naming the first condition of use the strip fails."""
    where = f"strip {strip.id}: the simplified curtailment rules ({SIMPLIFIED_SOURCE}) do not apply"
    fix = "; use 'curtailment: envelope'"
    if strip.has_left_cantilever or strip.has_right_cantilever:
        raise DesignError(f"{where}: the strip has a cantilever{fix}")
    spans = strip.spans_mm
    if len(spans) < 2:
        raise DesignError(
            f"{where}: it needs at least two continuous spans (has {len(spans)}){fix}"
        )
    if min(spans) < MIN_SPAN_RATIO * max(spans):
        raise DesignError(
            f"{where}: spans are not approximately equal (shortest {min(spans):.0f} mm < "
            f"{MIN_SPAN_RATIO} x longest {max(spans):.0f} mm){fix}"
        )
    for seg in strip.segments:
        loads = seg.loads
        if loads.partial or loads.line:
            raise DesignError(
                f"{where}: span {seg.label} carries partial or line loads (uniform loads only){fix}"
            )
        g_k = strip.g_k_total_kn_per_m2(seg.index)
        q_k = loads.q_k_kn_per_m2
        if q_k > MAX_Q_OVER_G * g_k + 1e-9:
            raise DesignError(
                f"{where}: span {seg.label} has q_k = {q_k:g} > {MAX_Q_OVER_G} g_k = "
                f"{MAX_Q_OVER_G * g_k:.2f} kN/m2{fix}"
            )
        if q_k > MAX_Q_KN_PER_M2 + 1e-9:
            raise DesignError(
                f"{where}: span {seg.label} has q_k = {q_k:g} > {MAX_Q_KN_PER_M2:g} kN/m2{fix}"
            )


def top_reach_mm(span_mm: float, phi_mm: float) -> tuple[float, float]:
    """(all bars, half the bars) reach of top steel from the face of an internal support."""
    full = max(TOP_FULL_OVER_SPAN * span_mm, TOP_FULL_OVER_PHI * phi_mm)
    return full, max(TOP_HALF_OVER_SPAN * span_mm, full)


def bottom_stop_mm(span_mm: float) -> float:
    """Distance from each support centreline where the curtailed half of the bottom bars stops."""
    return BOTTOM_HALF_STOP_OVER_SPAN * span_mm
