"""Bar runs longer than the stock length are split into lapped pieces.

Two 6.5 m spans with 6 m stock bars (``reinforcement: {stock_length_mm: 6000}``): the span
bottom runs (about 6.6 m) and the distribution bars across a 7 m panel must be lapped.
Each piece <= the stock length; laps >= l_0 of EN 1992-1-1:2004, 8.7.3(1), Eq. (8.10):
l_0 = alpha_1 alpha_2 alpha_3 alpha_5 alpha_6 l_b,rqd >= l_0,min (8.11), alpha_6 from the share
rho_1 of bars lapped within 0.65 l_0 of the lap's centre (Table 8.3, 8.7.2(3) Fig. 8.8); the
self-check and the other checks of ``strip_factory.check_detail`` still pass.
"""

from __future__ import annotations

import pytest

from detailer.pipeline import detail_project
from tests.strip_factory import (
    StripSpec,
    build_project,
    check_detail,
    check_laps,
    l_0_for,
    laps,
    principal_bars,
)

STOCK = 6000
LONG = StripSpec(
    spans_mm=(6500, 6500), thickness_mm=250, g_k_kn_per_m2=1.5, q_k_kn_per_m2=2.5,
    support_width_mm=250, panel_width_mm=7000, stock_length_mm=STOCK,
)  # fmt: skip


@pytest.fixture(scope="module")
def long_strip():
    project = build_project(LONG)
    return project, detail_project(project).strips[0]


def test_hand_lap_lengths_c30():
    """C30/37, good bond, c_d = 25 mm [D]: f_ctd = 0.7 x 0.3 x 30^(2/3)/1.5 = 1.352, f_bd =
    2.25 f_ctd = 3.041 (Eq. (8.2)), l_b,rqd = phi/4 x 434.8/3.041 (Eq. (8.3)), alpha_2 =
    1 - 0.15 (25 - phi)/phi (Table 8.2). Half the bars lapped, alpha_6 = (50/25)^0.5:
    H10 0.775 x 1.414 x 357.4 = 391.7 mm; H12 0.8375 x 1.414 x 428.9 = 508.0 mm. All lapped,
    alpha_6 = 1.5: H10 415.5 mm."""
    project = build_project(LONG)
    strip = project.strips[0]
    assert l_0_for(project, strip, 10, False, 2**0.5) == pytest.approx(391.7, abs=0.1)
    assert l_0_for(project, strip, 12, False, 2**0.5) == pytest.approx(508.0, abs=0.1)
    assert l_0_for(project, strip, 10, False, 1.5) == pytest.approx(415.5, abs=0.1)


def test_runs_are_split_and_lapped(long_strip):
    project, detail = long_strip
    bottom_laps = laps(detail, top=False)
    assert bottom_laps, "the 6.6 m bottom runs must be lapped with 6 m stock"
    for b in detail.bar_sets:
        assert b.shape.length_mm <= STOCK, b
    assert check_laps(project, detail) == []
    hand = {10: 391.7, 12: 508.0}  # half the bars lapped at a section, see above
    for left, right, _, overlap in bottom_laps:
        assert left.x_start_mm < right.x_start_mm < left.x_end_mm < right.x_end_mm
        assert overlap >= hand[left.phi_mm] - 0.5


def test_distribution_bars_across_the_panel_are_lapped(long_strip):
    """6950 mm across (7000 less two side covers) > 6000: two pieces per zone, lap >= l_0 with
    every bar lapped at one section (alpha_6 = 1.5)."""
    _, detail = long_strip
    across = LONG.panel_width_mm - 2 * LONG.cover_mm
    for z in detail.zones:
        dist = [
            b for b in detail.bar_sets if b.zone_id == z.zone_id and b.role.value != "principal"
        ]
        assert len(dist) >= 2, z.zone_id
        assert sum(b.shape.length_mm for b in dist) - across >= (len(dist) - 1) * 200


def test_split_strip_still_passes_the_checks(long_strip):
    project, detail = long_strip
    assert detail.selfcheck.ok and detail.selfcheck.utilisation_max <= 1.0
    assert check_detail(project, detail) == []
    # the same strip with 12 m stock needs no principal laps
    fields = {f: getattr(LONG, f) for f in LONG.__slots__}
    fields["stock_length_mm"] = 12000
    other = detail_project(build_project(StripSpec(**fields))).strips[0]
    assert not laps(other, top=False) and not laps(other, top=True)
    assert max(b.shape.length_mm for b in principal_bars(other, False)) > STOCK


def test_lap_where_only_one_group_runs_is_a_full_lap():
    """Regression: a staged top zone whose curtailed group does not reach the lap of the full
    group laps every bar present there, so l_0 takes alpha_6 = 1.5 for 100 % lapped
    (EN 1992-1-1:2004, 8.7.3(1) and Table 8.3); it was given the 50 % lap length."""
    from detailer.pipeline import default_code, detail_strip
    from tests.strip_factory import StripSpec, build_project
    from tests.strip_factory.checks import check_detail

    spec = StripSpec(
        spans_mm=(5750, 2750), thickness_mm=190, g_k_kn_per_m2=2.25, q_k_kn_per_m2=3.0,
        left_end="pinned", right_end="cantilever", left_cantilever_mm=0,
        right_cantilever_mm=1650, line_load=None, concrete="C25/30", cover_mm=25,
        support_width_mm=200, panel_width_mm=3000, stock_length_mm=6000,
        curtailment="envelope", category="A",
    )  # fmt: skip
    project = build_project(spec)
    detail = detail_strip(project, project.strips[0], default_code(project))
    assert any("piece" in b.note for b in detail.bar_sets)  # the case does lap
    assert check_detail(project, detail) == []
