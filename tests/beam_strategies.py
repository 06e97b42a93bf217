"""Hypothesis building blocks for random continuous beams, shared by the analysis tests."""

from __future__ import annotations

from hypothesis import strategies as st

from analysis.beam import Restraint

PIN, FIX, FREE = Restraint.PINNED, Restraint.FIXED, Restraint.FREE


def spans_and_ends(
    draw: st.DrawFn, max_spans: int, shortest_span_mm: float
) -> tuple[list[float], Restraint, Restraint]:
    """Segment lengths (mm, multiples of 50, spans up to 9 m) and end restraints: 1 to
    ``max_spans`` spans, pinned or fixed ends, a cantilever (0.5-2.5 m) at either end or
    both; a single span with a cantilever gets a fixed root (a statically valid beam)."""
    n = draw(st.integers(1, max_spans))
    spans = [draw(st.integers(int(shortest_span_mm // 50), 180)) * 50.0 for _ in range(n)]
    left, right = draw(st.sampled_from([PIN, FIX])), draw(st.sampled_from([PIN, FIX]))
    if draw(st.booleans()):
        spans.insert(0, draw(st.integers(10, 50)) * 50.0)
        left = FREE
    if draw(st.booleans()) and not (left is FREE and n == 1):
        spans.append(draw(st.integers(10, 50)) * 50.0)
        right = FREE
    if len(spans) == 1 and FREE in (left, right):
        left, right = (FIX, FREE) if right is FREE else (FREE, FIX)
    return spans, left, right
