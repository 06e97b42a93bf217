"""Moment distribution (Hardy Cross), an independent second route to the support moments.

Used by the tests to cross-check the stiffness solver; not used by the envelope.

Member end moments are clockwise-positive on the member (the classical sign convention);
results are returned as bending moments, sagging positive (hogging support moments
negative). Constant EI. Stiffness factors: 4EI/L with the far end fixed or continuous,
3EI/L with the far end pinned (or at a cantilever root, whose moment statics fixes);
carry-over factor 1/2 towards a far end that is fixed or continuous, none towards a pinned
one. Fixed-end moments: w L^2 / 12 for a full uniform load, P a b^2 / L^2 and P a^2 b / L^2
for a point load, partial uniform loads by integrating the point-load case.
"""

from __future__ import annotations

from collections.abc import Sequence

from analysis.beam import Load, PointLoad, Restraint

__all__ = ["fixed_end_moments", "moment_in_segment", "support_moments_md"]


def _parts(load: Load, length_m: float) -> tuple[bool, float, float, float]:
    """(is_point, intensity, start_m, end_m) of a load on a segment of ``length_m``."""
    if isinstance(load, PointLoad):
        a = load.a_mm / 1000.0
        return True, load.p_kn, a, a
    c = 0.0 if load.start_mm is None else load.start_mm / 1000.0
    d = length_m if load.end_mm is None else load.end_mm / 1000.0
    return False, load.w_kn_per_m, c, d


def fixed_end_moments(length_mm: float, loads: Sequence[Load]) -> tuple[float, float]:
    """Clockwise-positive fixed-end moments (kNm) at the left and right end of a segment."""
    length = length_mm / 1000.0
    left = right = 0.0
    for load in loads:
        is_point, q, c, d = _parts(load, length)
        if is_point:
            a, b = c, length - c
            left -= q * a * b * b / length**2
            right += q * a * a * b / length**2
        else:
            # int_c^d w s (L - s)^2 / L^2 ds and int_c^d w s^2 (L - s) / L^2 ds
            def f_left(s: float) -> float:
                return length**2 * s**2 / 2 - 2 * length * s**3 / 3 + s**4 / 4

            def f_right(s: float) -> float:
                return length * s**3 / 3 - s**4 / 4

            left -= q * (f_left(d) - f_left(c)) / length**2
            right += q * (f_right(d) - f_right(c)) / length**2
    return left, right


def _cantilever_root_moment(length_mm: float, loads: Sequence[Load], root_at_right: bool) -> float:
    """Bending moment (sagging +, so negative) at the root of a cantilever."""
    length = length_mm / 1000.0
    total = 0.0
    for load in loads:
        is_point, q, c, d = _parts(load, length)
        force = q if is_point else q * (d - c)
        centroid = 0.5 * (c + d)
        arm = length - centroid if root_at_right else centroid
        total -= force * arm
    return total


def support_moments_md(
    spans_mm: Sequence[float],
    left: Restraint,
    right: Restraint,
    loads: Sequence[Load] = (),
    *,
    tolerance_knm: float = 1.0e-10,
    max_sweeps: int = 100_000,
) -> tuple[float, ...]:
    """Bending moments (kNm, sagging +) at every node of a continuous beam.

    ``spans_mm`` are the segment lengths left to right; a FREE ``left``/``right`` end makes
    the first/last segment a cantilever. Interior nodes are pinned supports. ``loads`` carry
    segment indices into ``spans_mm``.
    """
    n = len(spans_mm)
    if n < 1 or any(not s > 0 for s in spans_mm):
        raise ValueError("need at least one segment, all lengths > 0")
    if left is Restraint.FREE and right is Restraint.FREE and n < 3:
        raise ValueError("both ends free over a single support: a mechanism")
    if n == 1 and Restraint.FIXED not in (left, right) and Restraint.FREE in (left, right):
        raise ValueError("a single cantilever needs a fixed root")
    by_seg: list[list[Load]] = [[] for _ in range(n)]
    for load in loads:
        if not 0 <= load.segment < n:
            raise ValueError(f"load on segment {load.segment}: no such segment")
        by_seg[load.segment].append(load)

    cant_left = left is Restraint.FREE
    cant_right = right is Restraint.FREE
    first = 1 if cant_left else 0  # first span (non-cantilever segment)
    last = n - 2 if cant_right else n - 1
    node_m = [0.0] * (n + 1)
    if cant_left:
        node_m[1] = _cantilever_root_moment(spans_mm[0], by_seg[0], root_at_right=True)
    if cant_right:
        node_m[n - 1] = _cantilever_root_moment(spans_mm[n - 1], by_seg[n - 1], False)
    if last < first:  # a single cantilever with a fixed root
        return tuple(node_m)

    # Kind of each node of the continuous part: "joint" (balanced), "fixed", or
    # "released" (moment known: a pinned end, or a cantilever root).
    def kind(node: int) -> str:
        if node == first or node == last + 1:
            if (node == first and cant_left) or (node == last + 1 and cant_right):
                return "released"
            end = left if node == first else right
            return "fixed" if end is Restraint.FIXED else "released"
        return "joint"

    # Member end moment (clockwise +) that a released node imposes on its span.
    def target(node: int, at_left_end_of_span: bool) -> float:
        m = node_m[node]  # bending moment there (0 at a pinned end)
        return m if at_left_end_of_span else -m

    spans = list(range(first, last + 1))
    end_m: dict[tuple[int, int], float] = {}  # (span, 0=left / 1=right) -> member end moment
    stiff: dict[tuple[int, int], float] = {}
    carry: dict[tuple[int, int], bool] = {}  # carry over from this end to the other
    for s in spans:
        length = spans_mm[s]
        fa, fb = fixed_end_moments(length, by_seg[s])
        ka, kb = kind(s), kind(s + 1)
        if ka == "released" and kb == "released":
            fa, fb = target(s, True), target(s + 1, False)
            stiff[s, 0] = stiff[s, 1] = 0.0
            carry[s, 0] = carry[s, 1] = False
        elif kb == "released":
            tb = target(s + 1, False)
            fa, fb = fa + (tb - fb) / 2.0, tb
            stiff[s, 0], stiff[s, 1] = 3.0 / length, 0.0
            carry[s, 0], carry[s, 1] = False, False
        elif ka == "released":
            ta = target(s, True)
            fa, fb = ta, fb + (ta - fa) / 2.0
            stiff[s, 0], stiff[s, 1] = 0.0, 3.0 / length
            carry[s, 0], carry[s, 1] = False, False
        else:
            stiff[s, 0] = stiff[s, 1] = 4.0 / length
            carry[s, 0] = carry[s, 1] = True
        end_m[s, 0], end_m[s, 1] = fa, fb

    joints = [j for j in range(first + 1, last + 1) if kind(j) == "joint"]
    dist = {}
    for j in joints:
        k_left, k_right = stiff[j - 1, 1], stiff[j, 0]
        total = k_left + k_right
        dist[j] = (k_left / total, k_right / total)
    scale = max([abs(v) for v in end_m.values()] + [1.0])
    for _ in range(max_sweeps):
        worst = 0.0
        for j in joints:  # Gauss-Seidel sweep: balance, then carry over at once
            unbalanced = end_m[j - 1, 1] + end_m[j, 0]
            worst = max(worst, abs(unbalanced))
            d_left, d_right = dist[j]
            bal_left, bal_right = -unbalanced * d_left, -unbalanced * d_right
            end_m[j - 1, 1] += bal_left
            end_m[j, 0] += bal_right
            if carry[j - 1, 1]:
                end_m[j - 1, 0] += bal_left / 2.0
            if carry[j, 0]:
                end_m[j, 1] += bal_right / 2.0
        if worst <= tolerance_knm * scale:
            break
    else:
        raise RuntimeError("moment distribution did not converge")

    for s in spans:
        node_m[s] = end_m[s, 0]  # M(0) = clockwise end moment at the left end
        node_m[s + 1] = -end_m[s, 1]  # M(L) = minus the clockwise end moment at the right
    return tuple(node_m)


def moment_in_segment(
    length_mm: float, m_left_knm: float, m_right_knm: float, loads: Sequence[Load], x_mm: float
) -> float:
    """Bending moment at ``x_mm`` in a segment from its end moments and its own loads
    (statics of the segment as a simple beam)."""
    length = length_mm / 1000.0
    x = x_mm / 1000.0
    m = m_left_knm + (m_right_knm - m_left_knm) * x / length
    for load in loads:
        is_point, q, c, d = _parts(load, length)
        if is_point:
            m += q * (length - c) / length * x - q * max(x - c, 0.0)
        else:
            w_tot = q * (d - c)
            m += w_tot * (length - 0.5 * (c + d)) / length * x
            covered = min(max(x - c, 0.0), d - c)  # loaded length left of x
            m -= q * covered * (x - (c + covered / 2.0))
    return m
