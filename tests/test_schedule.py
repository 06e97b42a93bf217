"""Bar schedule rows, summary and the bar-count rule.

Sources: the bar-count rule floor(extent / spacing) + 1 is common practice; the columns follow
the BS 8666:2005 form of bar schedule (from memory); nominal masses per metre are those of
BS 4449:1997, Table 1 (0.616 kg/m for 10 mm, 0.888 for 12 mm, 1.579 for 16 mm, 2.466 for
20 mm), printed to 0.001 kg/m, so compared within 0.1 %.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.layout import BarSet
from detailer.marks import assign_marks
from detailer.schedule import (
    bar_count,
    build_schedule,
    distribution_bar_count,
    principal_bar_count,
    schedule_rows,
    summarise,
)
from tests.bar_fixtures import make_bar_set

# BS 4449:1997, Table 1: nominal mass per metre, kg/m.
BS4449_KG_PER_M = {10: 0.616, 12: 0.888, 16: 1.579, 20: 2.466}


def bar(
    strip: str,
    set_id: str,
    layer: str,
    x: float,
    phi: int,
    length: int,
    count: int,
    code: str = "00",
) -> BarSet:
    dims = {"A": length} if code == "00" else {"A": length, "B": 300}
    return make_bar_set(strip, set_id, layer, phi=phi, dims=dims, count=count, code=code, x_start=x)


# ---- bar count (common practice: a bar at each end, floor(extent / spacing) + 1)


@pytest.mark.parametrize(
    ("extent_mm", "spacing_mm", "expected"),
    [
        (1000.0, 200.0, 6),  # exact multiple: bars at 0, 200, ..., 1000
        (950.0, 200.0, 5),  # last bar at 800, 150 short of the end
        (199.0, 200.0, 1),
        (0.0, 150.0, 1),
        (4250.0, 250.0, 18),
        (1000.0 - 1e-9, 200.0, 6),  # float noise in x does not lose a bar
    ],
)
def test_bar_count_examples(extent_mm: float, spacing_mm: float, expected: int) -> None:
    assert bar_count(extent_mm, spacing_mm) == expected


def test_principal_count_across_the_panel_less_side_covers() -> None:
    # 6200 mm panel, 25 mm side cover, H12 at 200: floor(6150 / 200) + 1 = 31 (common practice).
    assert principal_bar_count(6200.0, 25.0, 200) == 31
    # 3000 mm panel, 40 mm side cover, at 150: floor(2920 / 150) + 1 = 20.
    assert principal_bar_count(3000.0, 40.0, 150) == 20


def test_distribution_count_along_the_bar_run() -> None:
    # H10 at 300 from x = 150 to x = 4350: floor(4200 / 300) + 1 = 15 (common practice).
    assert distribution_bar_count(150.0, 4350.0, 300) == 15


@pytest.mark.parametrize(
    ("extent", "spacing"), [(1000.0, 0.0), (1000.0, -200.0), (-5.0, 200.0), (math.nan, 200.0)]
)
def test_bar_count_rejects_nonsense(extent: float, spacing: float) -> None:
    with pytest.raises(ValueError):
        bar_count(extent, spacing)


def test_panel_narrower_than_two_side_covers_is_rejected() -> None:
    with pytest.raises(ValueError, match="twice the side cover"):
        principal_bar_count(40.0, 25.0, 200)


# ---- rows


def _marked(*strips: tuple[BarSet, ...]) -> list[BarSet]:
    return [b for s in assign_marks(strips) for b in s]


def test_one_row_per_mark_per_member_with_counts_summed() -> None:
    s1 = (
        bar("S1", "a", "B1", 0.0, 12, 3400, 31),
        bar("S1", "a-stagger", "B1", 0.0, 12, 3400, 30),  # same bars, offset group: same mark
        bar("S1", "t", "T1", 3000.0, 16, 2400, 31),
    )
    s2 = (bar("S2", "a", "B1", 0.0, 12, 3400, 16),)
    rows = schedule_rows(_marked(s1, s2), revision="P1")
    assert [(r.member, r.mark, r.n_bars_each, r.total_bars) for r in rows] == [
        ("S1", "01", 61, 61),
        ("S1", "02", 31, 31),
        ("S2", "01", 16, 16),
    ]
    first = rows[0]
    assert first.type_and_size == "H12"
    assert first.length_mm == 3400
    assert first.shape_code == "00"
    assert first.dim("A") == 3400 and first.dim("B") is None
    assert first.revision == "P1"


def test_number_of_members_multiplies_the_total() -> None:
    s1 = (bar("S1", "a", "B1", 0.0, 12, 3400, 31),)
    (row,) = schedule_rows(_marked(s1), members={"S1": 4})
    assert (row.n_members, row.n_bars_each, row.total_bars) == (4, 31, 124)


def test_row_mass_from_bs4449_mass_per_metre() -> None:
    # 31 H12 bars of 3400 mm: 105.4 m x 0.888 kg/m (BS 4449:1997, Table 1) = 93.60 kg.
    s1 = (bar("S1", "a", "B1", 0.0, 12, 3400, 31),)
    (row,) = schedule_rows(_marked(s1))
    assert row.total_length_m == pytest.approx(105.4)
    assert row.mass_kg == pytest.approx(105.4 * 0.888, rel=1e-3)


@pytest.mark.parametrize("phi", sorted(BS4449_KG_PER_M))
def test_summary_mass_per_metre_matches_bs4449(phi: int) -> None:
    (line,) = summarise(schedule_rows(_marked((bar("S1", "a", "B1", 0.0, phi, 2000, 1),))))
    assert line.mass_kg_per_m == pytest.approx(BS4449_KG_PER_M[phi], rel=1e-3)


def test_unchanged_row_keeps_its_revision_letter() -> None:
    s1 = (bar("S1", "a", "B1", 0.0, 12, 3400, 31), bar("S1", "t", "T1", 0.0, 16, 2400, 31))
    first = schedule_rows(_marked(s1), revision="P1")
    s1b = (bar("S1", "a", "B1", 0.0, 12, 3400, 31), bar("S1", "t", "T1", 0.0, 16, 2400, 33))
    second = schedule_rows(_marked(s1b), revision="P2", previous=first)
    assert [(r.mark, r.revision) for r in second] == [("01", "P1"), ("02", "P2")]


def test_unmarked_bar_sets_are_refused() -> None:
    with pytest.raises(ValueError, match="no mark"):
        schedule_rows([bar("S1", "a", "B1", 0.0, 12, 3400, 31)])


# ---- summary totals equal the rows (property)

_SIZES = (10, 12, 16, 20)


@st.composite
def _bar_sets(draw: st.DrawFn) -> list[BarSet]:
    n = draw(st.integers(1, 10))
    sets = []
    for i in range(n):
        strip = draw(st.sampled_from(("S1", "S2", "S3")))
        phi = draw(st.sampled_from(_SIZES))
        length = 5 * draw(st.integers(100, 2400))
        count = draw(st.integers(1, 60))
        layer = draw(st.sampled_from(("B1", "B2", "T1", "T2")))
        sets.append(bar(strip, f"s{i}", layer, 10.0 * i, phi, length, count))
    by_strip: dict[str, list[BarSet]] = {}
    for b in sets:
        by_strip.setdefault(b.strip_id, []).append(b)
    return [b for s in assign_marks(list(by_strip.values())) for b in s]


@settings(max_examples=60, deadline=None)
@given(bar_sets=_bar_sets(), members=st.integers(1, 5))
def test_summary_totals_equal_the_sum_of_the_rows(bar_sets: list[BarSet], members: int) -> None:
    sched = build_schedule(bar_sets, revision="A", members={"S2": members})
    rows = sched.rows
    assert sum(r.total_bars for r in rows) == sum(line.total_bars for line in sched.summary)
    assert math.fsum(r.mass_kg for r in rows) == pytest.approx(sched.total_mass_kg, rel=1e-12)
    assert math.fsum(r.total_length_m for r in rows) == pytest.approx(sched.total_length_m)
    for line in sched.summary:
        mine = [r for r in rows if (r.bar_type, r.phi_mm) == (line.bar_type, line.phi_mm)]
        assert line.total_length_m == pytest.approx(math.fsum(r.total_length_m for r in mine))
        assert line.mass_kg == pytest.approx(line.total_length_m * line.mass_kg_per_m)
    # Every bar set is counted once: the rows' bars equal the sets' bars (x members).
    expected = sum(b.count * (members if b.strip_id == "S2" else 1) for b in bar_sets)
    assert sum(r.total_bars for r in rows) == expected
