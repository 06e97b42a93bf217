"""Bar marks: identical bars share a mark; numbering is stable and reads in fixing order.

Sources: a bar mark identifies bars of one type, size, shape and dimensions, so one mark is one
line of cutting and bending (BS 8666:2005 form of bar schedule, from memory); numbering by
strip, then layer (B1, B2, T1, T2) and position along the strip, two-digit marks "01", "02",
..., and never reusing a withdrawn mark on a later issue are common practice.
"""

from __future__ import annotations

import dataclasses

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from detailer.layout import BarSet
from detailer.marks import (
    LAYER_ORDER,
    BarIdentity,
    assign_marks,
    bar_identity,
    format_mark,
    mark_number,
    mark_table,
    withdrawn_marks,
)
from tests.bar_fixtures import make_bar_set


def bar(
    strip: str,
    set_id: str,
    layer: str,
    x_start: float,
    phi: int = 12,
    length: int = 3400,
    code: str = "00",
    count: int = 20,
) -> BarSet:
    """A hand-built bar set; straight (00) or an L bar (11, leg B = 300) of total run ``length``."""
    dims = {"A": length} if code == "00" else {"A": length, "B": 300}
    return make_bar_set(
        strip, set_id, layer, phi=phi, dims=dims, count=count, code=code, x_start=x_start,
        zone_id=f"{set_id}-zone",
    )  # fmt: skip


def marks_by_set(strips: tuple[tuple[BarSet, ...], ...]) -> dict[tuple[str, str], str]:
    return {(b.strip_id, b.set_id): b.mark for s in strips for b in s}


def test_format_mark_two_digits_then_three() -> None:
    # Common practice: two-digit marks, a third digit only past 99 (earlier marks not re-padded).
    assert [format_mark(n) for n in (1, 9, 10, 99, 100, 123)] == [
        "01",
        "09",
        "10",
        "99",
        "100",
        "123",
    ]
    assert mark_number("07") == 7
    assert mark_number("100") == 100
    assert mark_number("7a") is None
    with pytest.raises(ValueError):
        format_mark(0)


def test_layer_order_is_bottom_mat_first_outer_layer_first() -> None:
    assert LAYER_ORDER == ("B1", "B2", "T1", "T2")


def test_numbering_follows_strip_then_layer_then_x_start() -> None:
    # Given in a scrambled order on purpose; numbering must not depend on input order within
    # a strip (common practice: marks read in fixing order, bottom mat first).
    s1 = (
        bar("S1", "top-C", "T1", 8000.0, phi=16, length=2400),
        bar("S1", "dist-b", "B2", 0.0, phi=10, length=5800),
        bar("S1", "bot-2", "B1", 4000.0, phi=12, length=4200),
        bar("S1", "top-B", "T1", 3000.0, phi=12, length=2400),
        bar("S1", "bot-1", "B1", 0.0, phi=12, length=4100),
    )
    s2 = (bar("S2", "bot-1", "B1", 0.0, phi=10, length=3000),)
    marked = marks_by_set(assign_marks([s1, s2]))
    assert marked == {
        ("S1", "bot-1"): "01",
        ("S1", "bot-2"): "02",
        ("S1", "dist-b"): "03",
        ("S1", "top-B"): "04",
        ("S1", "top-C"): "05",
        ("S2", "bot-1"): "06",
    }


def test_identical_bars_share_a_mark_across_strips_and_layers() -> None:
    s1 = (
        bar("S1", "a", "B1", 0.0),
        bar("S1", "b", "B1", 3000.0, length=3000),
        bar("S1", "c", "T1", 0.0),  # same type, size, shape and length as "a"
    )
    s2 = (bar("S2", "a", "B1", 500.0), bar("S2", "b", "B1", 0.0, phi=16))
    marked = marks_by_set(assign_marks([s1, s2]))
    assert marked[("S1", "a")] == marked[("S1", "c")] == marked[("S2", "a")] == "01"
    assert marked[("S1", "b")] == "02"
    assert marked[("S2", "b")] == "03"
    assert len(mark_table(assign_marks([s1, s2]))) == 3


def test_shape_code_and_size_make_a_different_mark() -> None:
    # Same run, different shape (00 straight against 11 with a 300 leg) or size: new marks.
    s1 = (
        bar("S1", "a", "B1", 0.0, code="00"),
        bar("S1", "b", "B1", 10.0, code="11"),
        bar("S1", "c", "B1", 20.0, phi=10),
    )
    marks = [b.mark for b in assign_marks([s1])[0]]
    assert marks == ["01", "02", "03"]


def test_returns_new_bar_sets_in_the_input_structure() -> None:
    s1 = (bar("S1", "b", "T1", 0.0), bar("S1", "a", "B1", 0.0, length=2000))
    out = assign_marks([s1])
    assert len(out) == 1 and len(out[0]) == 2
    assert [b.set_id for b in out[0]] == ["b", "a"]  # order kept, only the mark changes
    assert [b.mark for b in s1] == ["", ""]
    assert dataclasses.replace(out[0][0], mark="") == s1[0]
    assert out[0][0].callout == "20H12-02-200 T1"


def test_previous_marks_are_kept_and_new_bars_never_reuse_a_withdrawn_mark() -> None:
    first = assign_marks(
        [
            (
                bar("S1", "a", "B1", 0.0),
                bar("S1", "b", "B1", 3000.0, length=3000),
                bar("S1", "c", "T1", 2800.0, phi=16, length=2400),
            )
        ]
    )
    previous = {e.identity: e.mark for e in mark_table(first)}
    # Next issue: "b" is withdrawn (its bar changed length), "c" unchanged, one new bar.
    second = assign_marks(
        [
            (
                bar("S1", "a", "B1", 0.0),
                bar("S1", "b", "B1", 3000.0, length=3100),
                bar("S1", "c", "T1", 2800.0, phi=16, length=2400),
                bar("S1", "d", "T2", 0.0, phi=10, length=5000),
            )
        ],
        previous,
    )
    marked = marks_by_set(second)
    assert marked[("S1", "a")] == "01"
    assert marked[("S1", "c")] == "03"
    assert marked[("S1", "b")] == "04"  # not "02": that mark was issued for another bar
    assert marked[("S1", "d")] == "05"
    gone = withdrawn_marks(previous, mark_table(second))
    assert gone == ("02",)
    # A third issue still skips 02 even when told only about the second issue's table.
    third = assign_marks(
        [(bar("S1", "e", "B1", 0.0, phi=20),)],
        {e.identity: e.mark for e in mark_table(second)},
        withdrawn=gone,
    )
    assert third[0][0].mark == "06"


def test_previous_table_with_one_mark_for_two_bars_is_rejected() -> None:
    a = bar_identity(bar("S1", "a", "B1", 0.0))
    b = bar_identity(bar("S1", "b", "B1", 0.0, phi=16))
    with pytest.raises(ValueError, match="two different bars"):
        assign_marks([()], {a: "01", b: "01"})


def test_hundredth_mark_has_three_digits() -> None:
    sets = tuple(bar("S1", f"s{i:03d}", "B1", float(i), length=1000 + 5 * i) for i in range(101))
    marks = [b.mark for b in assign_marks([sets])[0]]
    assert marks[0] == "01" and marks[98] == "99" and marks[99] == "100" and marks[100] == "101"


# A pool of distinct bar sets for the property tests: (layer, x_start, size, length).
_POOL = [
    (layer, x, phi, length)
    for layer in ("B1", "B2", "T1", "T2")
    for x in (0.0, 1500.0, 4200.0)
    for phi, length in ((10, 3000), (12, 3000), (12, 4500))
]


@st.composite
def _strips(draw: st.DrawFn) -> list[list[BarSet]]:
    n_strips = draw(st.integers(1, 3))
    out = []
    for k in range(n_strips):
        picks = draw(
            st.lists(st.sampled_from(range(len(_POOL))), min_size=1, max_size=8, unique=True)
        )
        out.append(
            [
                bar(f"S{k + 1}", f"set{p:02d}", *_POOL[p][:2], phi=_POOL[p][2], length=_POOL[p][3])
                for p in picks
            ]
        )
    return out


@settings(max_examples=60, deadline=None)
@given(strips=_strips(), data=st.data())
def test_marks_do_not_depend_on_the_order_within_a_strip(
    strips: list[list[BarSet]], data: st.DataObject
) -> None:
    shuffled = [data.draw(st.permutations(s)) for s in strips]
    assert marks_by_set(assign_marks(strips)) == marks_by_set(assign_marks(shuffled))


@settings(max_examples=60, deadline=None)
@given(strips=_strips())
def test_one_mark_per_identity_numbered_from_01_without_gaps(strips: list[list[BarSet]]) -> None:
    out = assign_marks(strips)
    assert assign_marks(strips) == out  # deterministic
    by_identity: dict[BarIdentity, set[str]] = {}
    for s in out:
        for b in s:
            by_identity.setdefault(bar_identity(b), set()).add(b.mark)
    assert all(len(m) == 1 for m in by_identity.values())
    numbers = sorted(mark_number(next(iter(m))) for m in by_identity.values())
    assert numbers == list(range(1, len(by_identity) + 1))
    # Keeping the same table as "previous" changes nothing.
    previous = {e.identity: e.mark for e in mark_table(out)}
    assert assign_marks(strips, previous) == out
