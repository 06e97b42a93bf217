"""Free cantilever edges: U-bars (EN 1992-1-1:2004, 9.3.1.4(1)) that can be bent to fit.

A U-bar's height between its bends is h less both covers; BS 8666:2005 (Table 2 with the
minimum length between two bends, 10 d for d <= 16... 13 d above, from memory of its Fig. 6)
limits how small a bent U may be, so a U-bar takes a smaller allowed size where the top bars'
size cannot be bent that tight.
"""

from __future__ import annotations

from detailer.pipeline import detail_project
from detailer.project import parse_project
from detailer.shapes.table2 import min_between_bends_mm

YAML = """\
project: {id: edge, title: Edge test, revision: P1, date: 2025-03-14, drawing: E-1}
materials: {concrete: C30/37}
reinforcement: {diameters_mm: [10, 12, 16]}
strips:
  - id: S1
    thickness_mm: 180
    cover: {top_mm: 30, bottom_mm: 30, side_mm: 30}
    panel_width_mm: 3000
    spans_mm: [4000]
    support_widths_mm: 250
    left_end: pinned
    right_end: {cantilever_mm: 1200}
    loads: {category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 2.0}
    fixed_bars:
      - {zone: B-T, diameter_mm: 16, spacing_mm: 200}
"""


def test_u_bar_takes_a_smaller_size_that_bends_inside_the_covers():
    project = parse_project(YAML, "edge.yaml")
    detail = detail_project(project).strips[0]
    top = next(z for z in detail.zones if z.zone_id == "B-T")
    assert top.phi_mm == 16 and top.user_fixed
    (u,) = [b for b in detail.bar_sets if b.set_id.endswith("-U")]
    height = 180 - 30 - 30
    assert min_between_bends_mm(16) > height  # an H16 U could not be bent this tight
    assert u.shape.code == "21" and u.phi_mm == 12
    assert u.shape.dim("B") <= height and min_between_bends_mm(12) <= u.shape.dim("B")
    assert u.spacing_mm == top.spacing_mm  # one U per top bar
