"""The simplified curtailment rules (``reinforcement: {curtailment: simplified}``).

Rules as the project states them in detailer/simplified.py (BS 8110-1:1997, 3.12.10.3 and
Fig. 3.25, carried into UK practice with EN 1992-1-1; FROM MEMORY, not checked against the
figure): top over an internal support, all the steel to max(0.15 l, 45 phi) from the face and
half of it to 0.3 l; span bottom, half the steel the full span into the supports and the other
half stopping 0.1 l from the support centrelines. Conditions of use (same source, from memory):
UDL only, spans within 0.85 of the longest, q_k <= 1.25 g_k and q_k <= 5 kN/m2, no cantilever.

Independently of that source, the layout must still satisfy EN 1992-1-1 (the pipeline's
self-check and the checks of ``strip_factory.check_detail``).
"""

from __future__ import annotations

import pytest

from detailer.errors import DesignError
from detailer.pipeline import detail_project
from tests.strip_factory import StripSpec, build_project, check_detail

SPAN = 5000
QUALIFYING = StripSpec(
    spans_mm=(SPAN, SPAN, SPAN), thickness_mm=175, g_k_kn_per_m2=1.5, q_k_kn_per_m2=2.5,
    support_width_mm=250, curtailment="simplified",
)  # fmt: skip


def _sets(detail, zone_id):
    return sorted(
        (b for b in detail.bar_sets if b.zone_id == zone_id and b.role.value == "principal"),
        key=lambda b: b.x_end_mm - b.x_start_mm,
    )


def _supports_in(detail, zone):
    return [
        i
        for i, s in enumerate(detail.strip.supports)
        if zone.x_from_mm - s.width_mm / 2 - 1 <= s.x_mm <= zone.x_to_mm + s.width_mm / 2 + 1
    ]


@pytest.fixture(scope="module")
def simple():
    project = build_project(QUALIFYING)
    return project, detail_project(project).strips[0]


def test_qualifying_slab_passes_the_checks(simple):
    project, detail = simple
    assert detail.selfcheck.ok and detail.selfcheck.utilisation_max <= 1.0
    assert check_detail(project, detail) == []


def _at_least(got: float, rule: float, bar) -> None:
    """The rule's extent is a minimum; a longer bar must say the envelope needed it."""
    if got == pytest.approx(rule, abs=0.5):
        return
    assert got > rule, (got, rule, bar.set_id)
    assert "extended where the shifted envelope needs it" in bar.note


def test_top_extents_over_internal_supports(simple):
    """Top zones over the internal supports (one zone when the hogging joins across span 2):
    half the bars to 0.3 l from the outer faces, the other half to max(0.15 l, 45 phi); all of
    them to 0.3 l where alternate bars would exceed the 3h <= 400 spacing (from memory, see the
    module docstring)."""
    _, detail = simple
    strip = detail.strip
    zones = [z for z in detail.zones if z.face.value == "top" and _supports_in(detail, z)]
    internal = [z for z in zones if 0 not in _supports_in(detail, z)]
    internal = [z for z in internal if len(strip.supports) - 1 not in _supports_in(detail, z)]
    assert {i for z in internal for i in _supports_in(detail, z)} == {1, 2}
    for zone in internal:
        inside = _supports_in(detail, zone)
        first, last = strip.supports[inside[0]], strip.supports[inside[-1]]
        left_face, right_face = first.x_mm - first.width_mm / 2, last.x_mm + last.width_mm / 2
        sets = _sets(detail, zone.zone_id)
        longest = sets[-1]
        _at_least(left_face - longest.x_start_mm, 0.3 * SPAN, longest)
        _at_least(longest.x_end_mm - right_face, 0.3 * SPAN, longest)
        if len(sets) == 2:  # alternate bars: each at twice the zone spacing
            short = sets[0]
            reach = max(0.15 * SPAN, 45 * short.phi_mm)
            _at_least(left_face - short.x_start_mm, reach, short)
            _at_least(short.x_end_mm - right_face, reach, short)
            assert short.spacing_mm == longest.spacing_mm == 2 * zone.spacing_mm
        else:
            assert 2 * zone.spacing_mm > min(3 * strip.thickness_mm, 400)


def test_typical_qualifying_slab_is_detailed():
    """3 equal 4 m spans, h 200, g_k 1.5 + self-weight, q_k 2.5: meets every condition of use,
    sags in the middle span (separate top zones over B and C)."""
    fields = {f: getattr(QUALIFYING, f) for f in QUALIFYING.__slots__}
    fields.update(spans_mm=(4000, 4000, 4000), thickness_mm=200)
    project = build_project(StripSpec(**fields))
    detail = detail_project(project).strips[0]
    assert check_detail(project, detail) == []


def test_bottom_extents_in_spans(simple):
    """Span bottoms: the curtailed half stops 0.1 l = 500 mm from each support centreline, the
    other half runs into both supports; a span whose alternate bars would exceed 3h <= 400 has
    all bars full length (from memory, see the module docstring)."""
    _, detail = simple
    halves = 0
    for seg in detail.strip.segments:
        sets = _sets(detail, f"S{seg.span_number}-B")
        zone = next(z for z in detail.zones if z.zone_id == f"S{seg.span_number}-B")
        full = sets[-1]
        half_width = QUALIFYING.support_width_mm / 2  # past both support faces
        assert full.x_start_mm < seg.x_start_mm + half_width
        assert full.x_end_mm > seg.x_end_mm - half_width
        if len(sets) == 2:
            halves += 1
            short = sets[0]
            # stops 0.1 l from each centreline (reaches 0.9 l from the far one), or nearer to
            # the support where the envelope needs the bar
            _at_least(seg.x_end_mm - short.x_start_mm, 0.9 * SPAN, short)
            _at_least(short.x_end_mm - seg.x_start_mm, 0.9 * SPAN, short)
            assert short.spacing_mm == full.spacing_mm == 2 * zone.spacing_mm
        else:
            assert 2 * zone.spacing_mm > min(3 * detail.strip.thickness_mm, 400)
    assert halves >= 1


@pytest.mark.parametrize(
    ("change", "named"),
    [
        ({"right_end": "cantilever", "right_cantilever_mm": 1200}, "cantilever"),
        ({"spans_mm": (5000, 4200, 5000)}, "not approximately equal"),  # 4200 < 0.85 x 5000
        ({"line_load": (2, 2500, 5.0)}, "line"),
        # g_k = 0 + 0.175 x 25 = 4.375; q_k 5.0 > 1.25 g_k = 5.47? no -> h 150: 3.75, 4.69 < 4.9
        ({"thickness_mm": 150, "g_k_kn_per_m2": 0.0, "q_k_kn_per_m2": 4.9}, "1.25 g_k"),
        # h 250: g_k = 1.0 + 6.25 = 7.25, 1.25 g_k = 9.06 > 5.5 > 5
        ({"thickness_mm": 250, "g_k_kn_per_m2": 1.0, "q_k_kn_per_m2": 5.5}, "> 5 kN/m2"),
    ],
    ids=["cantilever", "unequal spans", "line load", "q_k > 1.25 g_k", "q_k > 5"],
)
def test_non_qualifying_slabs_are_refused(change, named):
    """Each condition of use, broken alone, is refused with a message naming it."""
    fields = {f: getattr(QUALIFYING, f) for f in QUALIFYING.__slots__}
    fields.update(change)
    project = build_project(StripSpec(**fields))
    with pytest.raises(DesignError) as info:
        detail_project(project)
    message = str(info.value)
    assert "simplified curtailment rules" in message and named in message, message
    assert "\n" not in message
