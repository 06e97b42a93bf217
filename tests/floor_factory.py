"""Synthetic whole floors for the batch tests and benchmarks (invented demonstration data).

``floor_yaml(n)`` writes a project file with ``n`` one-way strips of 3 to 6 spans, as a
drawing office would type them for a floor plate: spans 3.0-6.5 m, slab depth from the
longest span (about span/30, common practice for a first sizing), a mix of pinned and
monolithic ends and balconies. The strips are drawn from a fixed pseudo-random sequence
(``key``), so the same call always gives the same file. ``failing`` names strips made
undesignable on purpose (a 9 m span in a 150 mm slab: refused by the deflection or flexure
checks), for the tests of a batch in which some strips fail.
"""

from __future__ import annotations

import math
import random

__all__ = ["floor_yaml"]

_HEADER = """\
# Synthetic floor plate: {n} one-way strips (generated, invented data)
project: {{id: {pid}, title: "Synthetic floor plate ({n} strips)", revision: P1,
          date: 2026-01-05, drawing: SF-100}}
design: {{combination: "6.10a/b", arrangements: uk-simplified}}
materials: {{concrete: C32/40, exposure: XC1}}
reinforcement:
  diameters_mm: [10, 12, 16, 20]
  spacings_mm: [100, 125, 150, 175, 200, 225, 250, 275, 300]
  stock_length_mm: 12000
defaults:
  cover: {{top_mm: 25, bottom_mm: 25, side_mm: 25}}
  support_widths_mm: 300
  loads: {{category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 2.0}}
strips:
"""


def _strip(rng: random.Random, strip_id: str, failing: bool) -> list[str]:
    n = rng.randint(3, 6)
    spans = [rng.randint(60, 130) * 50 for _ in range(n)]
    h = max(175, 25 * math.ceil(max(spans) / 30 / 25))
    if failing:
        spans[0], h = 9000, 150
    left = rng.choice(["pinned", "pinned", "monolithic"])
    right = rng.choice(["pinned", "monolithic", "{cantilever_mm: 1200}"])
    lines = [
        f"  - id: {strip_id}",
        f'    description: "Bay {strip_id}"',
        f"    thickness_mm: {h}",
        f"    panel_width_mm: {rng.randint(8, 24) * 250}",
        f"    spans_mm: [{', '.join(str(s) for s in spans)}]",
        f"    left_end: {left}",
        f"    right_end: {right}",
    ]
    if rng.random() < 0.3:
        lines.append(f"    members: {rng.randint(2, 4)}")
    if rng.random() < 0.25:
        span = rng.randint(1, n)
        x = spans[span - 1] // 2
        lines.append(
            f"    loads: {{line: [{{span: {span}, x_mm: {x}, g_k_kn_per_m: 4.0, "
            'description: "partition"}]}'
        )
    return lines


def floor_yaml(
    n_strips: int, *, key: int = 1, failing: tuple[str, ...] = (), project_id: str = ""
) -> str:
    """A project file of ``n_strips`` strips ``F001``, ``F002``, ... (deterministic)."""
    rng = random.Random(key)
    pid = project_id or f"floor-{n_strips}"
    lines = [_HEADER.format(n=n_strips, pid=pid).rstrip("\n")]
    width = max(3, len(str(n_strips)))
    for i in range(1, n_strips + 1):
        sid = f"F{i:0{width}d}"
        lines += _strip(rng, sid, sid in failing)
    return "\n".join(lines) + "\n"
