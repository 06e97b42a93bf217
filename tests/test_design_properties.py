"""Property tests of design and detailing on random valid strips (hypothesis, derandomized in CI).

Strips come from ``tests/strip_factory.py`` (2-5 spans of 2.5-7.5 m, h 175-300, g_k 0.5-3,
q_k 1.5-5 kN/m2, optional cantilevers, monolithic ends and line loads, 6 or 12 m stock bars),
written as project YAML and read by the project reader. ``detail_strip`` must either refuse
with a one-line ``DesignError`` or return a detail that meets, recomputed independently in
``strip_factory`` from the public results and the clauses (each check names its clause):

* M_Rd(x) >= shifted M_Ed(x) on both faces, bars built up over l_bd from their ends
  (EN 1992-1-1:2004, 9.2.1.3(3), Fig. 9.2), and the demand really shifted by a_l = d
  (9.2.1.3(2), 9.3.1.1(4));
* bars stop only l_bd beyond the point where they are no longer needed (9.2.1.3(3));
* per zone A_s,prov >= A_s,req (6.1, "How to" method), A_s,min <= A_s,prov <= A_s,max
  (9.2.1.1(1), (3)), spacing 3h <= 400 and 2h <= 250 at the peak (9.3.1.1(3));
* distribution bars >= 20 % of the principal steel at <= 3.5h <= 450 (9.3.1.1(2), (3));
* half the span steel into end supports (9.3.1.2(1)); bottom bars >= 10 phi past internal
  support faces (9.2.1.5(1)); top bars at pinned ends >= 0.2 x span from the face, >= 15 % of
  the span moment (9.3.1.2(2));
* every bar <= the stock length, inside the concrete, BS 8666:2005 formula length; laps >= l_0
  with alpha_6 from the layout (8.7.3); l_bd as computed by hand (8.4.4).

The known detailing faults (self-check refusals the pipeline itself calls a bug) are tracked
in ``test_selfcheck_known_faults.py``; here any DesignError is accepted if it is one clean line.
"""

from __future__ import annotations

from hypothesis import event, given, settings

from detailer.errors import DesignError
from detailer.pipeline import default_code, detail_strip
from tests.strip_factory import build_project, check_detail, project_yaml, strip_specs


def _detail(spec):
    project = build_project(spec)
    strip = project.strips[0]
    try:
        return project, detail_strip(project, strip, default_code(project))
    except DesignError as exc:
        message = str(exc)
        # a user-facing refusal: one line, naming the strip (rules for helpers: one-line errors)
        assert "\n" not in message and message.startswith(f"strip {strip.id}:"), message
        event("refused: " + message.split(":")[1].split("(")[0].strip()[:40])
        return project, None


@settings(max_examples=40)
@given(strip_specs())
def test_detailed_strips_meet_the_rules(spec):
    project, detail = _detail(spec)
    if detail is None:
        return
    event("detailed")
    failures = check_detail(project, detail)
    assert not failures, "\n".join([project_yaml(spec), *failures])


@settings(max_examples=25)
@given(strip_specs())
def test_zone_ids_and_sets_are_consistent(spec):
    """Every bar set belongs to a zone of its face and layer (T1/T2 top, B1/B2 bottom); zone ids
    are unique; every zone has principal bars."""
    _, detail = _detail(spec)
    if detail is None:
        return
    zones = {z.zone_id: z for z in detail.zones}
    assert len(zones) == len(detail.zones)
    for b in detail.bar_sets:
        z = zones[b.zone_id]
        assert b.layer[0] == ("T" if z.face.value == "top" else "B"), b
        assert b.layer[1] == ("1" if b.role.value == "principal" else "2"), b
        assert b.count >= 1 and b.x_end_mm > b.x_start_mm
    for z in detail.zones:
        assert any(
            b.zone_id == z.zone_id and b.role.value == "principal" for b in detail.bar_sets
        ), z.zone_id


def test_checks_detect_planted_faults():
    """The checks above can fail: each fault planted in a good detail is reported."""
    import dataclasses

    from tests.strip_factory import StripSpec

    spec = StripSpec(
        spans_mm=(4500, 4500), thickness_mm=200, g_k_kn_per_m2=1.5, q_k_kn_per_m2=2.5,
        panel_width_mm=7000, stock_length_mm=6000,
    )  # fmt: skip
    project, detail = _detail(spec)
    assert check_detail(project, detail) == []
    sets = detail.bar_sets

    def planted(pick, **change):
        out = tuple(dataclasses.replace(b, **change) if pick(b) else b for b in sets)
        return check_detail(project, dataclasses.replace(detail, bar_sets=out))

    dist = next(b for b in sets if b.role.value == "distribution")
    bottom = next(b for b in sets if b.zone_id == "S1-B" and b.role.value == "principal")
    end_top = next(b for b in sets if b.zone_id == "A-T" and b.role.value == "principal")
    faults = {
        "9.3.1.1(2)": planted(lambda b: b is dist, spacing_mm=dist.spacing_mm * 8),
        "9.3.1.2(1)": planted(lambda b: b is bottom, x_start_mm=bottom.x_start_mm + 400),
        "9.3.1.2(2)": planted(lambda b: b is end_top, x_end_mm=end_top.x_end_mm - 300),
        "outside the concrete": planted(lambda b: b is bottom, x_start_mm=bottom.x_start_mm - 50),
        "BS 8666": planted(
            lambda b: b is bottom, shape=dataclasses.replace(bottom.shape, length_exact_mm=1.0)
        ),
        "9.2.1.3": planted(lambda b: b.zone_id == "B-T", spacing_mm=1000),
    }
    for marker, lines in faults.items():
        assert any(marker in line for line in lines), (marker, lines)
