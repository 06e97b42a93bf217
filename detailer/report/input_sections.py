"""Report sections of one strip before the design: input echo, actions, analysis.

Every number comes from the strip's record in its JSON-ready form (see ``markup``); the plots
are drawn from the same analysis objects the record was built from.
"""

from __future__ import annotations

__all__ = ["actions_section", "analysis_section", "input_section"]

import numpy as np

from detailer.layout import StripDetail
from detailer.model import AnalysisOptions
from detailer.report import plots
from detailer.report.markup import Json, c, esc, k, num, raw, table, tag

_EXPRESSION = {
    "6.10": "&Sigma; &gamma;<sub>G</sub> G<sub>k</sub> + &gamma;<sub>Q</sub> Q<sub>k</sub>",
    "6.10a": "&Sigma; &gamma;<sub>G</sub> G<sub>k</sub> + &gamma;<sub>Q</sub> &psi;<sub>0</sub> "
    "Q<sub>k</sub>",
    "6.10b": "&Sigma; &xi; &gamma;<sub>G</sub> G<sub>k</sub> + &gamma;<sub>Q</sub> Q<sub>k</sub>",
}


def _end(end: Json) -> str:
    if end["kind"] == "cantilever":
        return f"cantilever of {num(end['cantilever_mm'])} mm beyond the end support"
    return str(end["kind"])


def input_section(
    s: Json, materials: Json, detail: StripDetail, *, input_name: str, input_sha256: str
) -> str:
    """Geometry, materials, covers and characteristic loads, as read from the input file."""
    sid = s["id"]
    sec = s["section"]
    out = [
        tag("h3", "1. Input"),
        tag(
            "p",
            f"From <code>{esc(input_name)}</code>, SHA-256 <code class='hash'>"
            f"{esc(input_sha256)}</code>.",
            cls="source",
        ),
    ]
    geometry = [
        (
            "Slab thickness h",
            k(sec["thickness_mm"], f"{sid}/section/thickness_mm"),
            "mm",
        ),
        (
            "Nominal cover, top c<sub>nom</sub>",
            k(sec["cover_top_mm"], f"{sid}/section/cover_top_mm"),
            "mm",
        ),
        (
            "Nominal cover, bottom c<sub>nom</sub>",
            k(sec["cover_bottom_mm"], f"{sid}/section/cover_bottom_mm"),
            "mm",
        ),
        (
            "Cover at edges and bar ends",
            k(sec["cover_side_mm"], f"{sid}/section/cover_side_mm"),
            "mm",
        ),
        (
            "Panel width (sets bar counts)",
            k(sec["panel_width_mm"], f"{sid}/section/panel_width_mm"),
            "mm",
        ),
        ("Identical members", c(detail.strip.members, "num"), ""),
        ("Left end", c(_end(s["left_end"])), ""),
        ("Right end", c(_end(s["right_end"])), ""),
        ("Overall length", k(s["length_mm"], f"{sid}/length_mm"), "mm"),
        (
            "Spans (support centrelines)",
            c(", ".join(num(x) for x in s["spans_mm"]), "num"),
            "mm",
        ),
    ]
    mats = [
        ("Concrete", c(materials["concrete_class"]), ""),
        (
            "f<sub>ck</sub> / f<sub>ck,cube</sub>",
            c(f"{num(materials['f_ck_mpa'])} / {num(materials['f_ck_cube_mpa'])}", "num"),
            "N/mm&sup2;",
        ),
        ("Reinforcement f<sub>yk</sub>", c(num(materials["f_yk_mpa"]), "num"), "N/mm&sup2;"),
        (
            "Bar type, ductility class",
            c(f"{materials['bar_type']}, class {materials['ductility_class']}"),
            "",
        ),
        ("Exposure class", c(materials["exposure_class"]), ""),
        (
            "Density for self-weight",
            k(s["concrete_density_kn_per_m3"], f"{sid}/concrete_density_kn_per_m3"),
            "kN/m&sup3;",
        ),
        ("Imposed-load category (EN 1991-1-1, Table 6.1)", c(s["load_category"]), ""),
    ]
    out.append(
        table(
            ["Item", "Value", "Unit"],
            [[raw(name), cell, raw(unit)] for name, cell, unit in geometry + mats],
            caption="Geometry, materials and covers",
            cls="kv",
        )
    )
    out.append(
        table(
            ["Support", "x (mm)", "width (mm)"],
            [
                [
                    c(sp["label"]),
                    k(sp["x_mm"], f"{sid}/supports/{sp['label']}/x_mm"),
                    k(sp["width_mm"], f"{sid}/supports/{sp['label']}/width_mm"),
                ]
                for sp in s["supports"]
            ],
            caption="Supports (x from the left end of the strip)",
        )
    )
    seg_rows = []
    for g in s["segments"]:
        key = f"{sid}/segments/{g['index']}"
        others = [
            f"g<sub>k</sub> {esc(num(p['g_k_kn_per_m2']))}, q<sub>k</sub> {esc(num(p['q_k_kn_per_m2']))} "
            f"kN/m&sup2; from {esc(num(p['start_mm']))} to {esc(num(p['end_mm']))} mm"
            + (f" ({esc(p['description'])})" if p["description"] else "")
            for p in g["partial_loads"]
        ] + [
            f"line g<sub>k</sub> {esc(num(ln['g_k_kn_per_m']))}, q<sub>k</sub> "
            f"{esc(num(ln['q_k_kn_per_m']))} kN/m at {esc(num(ln['a_mm']))} mm"
            + (f" ({esc(ln['description'])})" if ln["description"] else "")
            for ln in g["line_loads"]
        ]
        seg_rows.append(
            [
                c(g["label"]),
                c(g["kind"]),
                k(g["x_start_mm"], f"{key}/x_start_mm"),
                k(g["length_mm"], f"{key}/length_mm"),
                k(g["self_weight_kn_per_m2"], f"{key}/self_weight_kn_per_m2"),
                k(g["g_k_superimposed_kn_per_m2"], f"{key}/g_k_superimposed_kn_per_m2"),
                k(g["g_k_kn_per_m2"], f"{key}/g_k_kn_per_m2"),
                k(g["q_k_kn_per_m2"], f"{key}/q_k_kn_per_m2"),
                raw("<br>".join(others) or "&ndash;"),
            ]
        )
    out.append(
        table(
            [
                "Segment",
                "Kind",
                "x<sub>start</sub> (mm)",
                "L (mm)",
                "g<sub>sw</sub> (kN/m&sup2;)",
                "g<sub>k,sup</sub> (kN/m&sup2;)",
                "G<sub>k</sub> (kN/m&sup2;)",
                "Q<sub>k</sub> (kN/m&sup2;)",
                "Other loads (positions from the segment's left end)",
            ],
            seg_rows,
            caption="Characteristic loads per segment (G<sub>k</sub> includes self-weight "
            "g<sub>sw</sub> = h &times; density; on a 1 m strip kN/m&sup2; acts as kN/m)",
        )
    )
    return "".join(out)


def actions_section(s: Json) -> str:
    """The EN 1990 combination, its factors and the load arrangements analysed."""
    sid = s["id"]
    a = s["actions"]
    key = f"{sid}/actions"
    eq_rows = []
    for e in a["equations"]:
        name = e["name"]
        if name == "6.10b":
            g_from = f"&xi; &gamma;<sub>G,sup</sub> = {esc(num(a['xi']))} &times; {esc(num(a['gamma_g_sup']))}"
        else:
            g_from = f"&gamma;<sub>G,sup</sub> = {esc(num(a['gamma_g_sup']))}"
        if name == "6.10a":
            q_from = f"&gamma;<sub>Q</sub> &psi;<sub>0</sub> = {esc(num(a['gamma_q']))} &times; {esc(num(a['psi_0']))}"
        else:
            q_from = f"&gamma;<sub>Q</sub> = {esc(num(a['gamma_q']))}"
        eq_rows.append(
            [
                c(f"EN 1990:2002, Eq. ({name})"),
                raw(_EXPRESSION.get(name, esc(name))),
                k(e["gamma_g"], f"{key}/equations/{name}/gamma_g"),
                raw(g_from),
                k(e["gamma_q"], f"{key}/equations/{name}/gamma_q"),
                raw(q_from),
            ]
        )
    which = (
        "the less favourable of Eq. (6.10a) and (6.10b)"
        if a["combination"] == "6.10a/b"
        else f"Eq. ({esc(a['combination'])})"
    )
    factors = table(
        [
            "&gamma;<sub>G,sup</sub>",
            "&gamma;<sub>G,inf</sub>",
            "&gamma;<sub>Q</sub>",
            "&psi;<sub>0</sub>",
            "&psi;<sub>2</sub>",
            "&xi;",
        ],
        [
            [
                k(a["gamma_g_sup"], f"{key}/gamma_g_sup"),
                k(a["gamma_g_inf"], f"{key}/gamma_g_inf"),
                k(a["gamma_q"], f"{key}/gamma_q"),
                k(a["psi_0"], f"{key}/psi_0"),
                k(a["psi_2"], f"{key}/psi_2"),
                k(a["xi"], f"{key}/xi"),
            ]
        ],
        caption="Partial factors (EN 1990:2002, Table A1.2(B) with the UK NA) and &psi; factors "
        f"of category {esc(s['load_category'])} (EN 1990:2002, Table A1.1)",
    )
    if a["pattern"] == "all and alternate":
        pattern = (
            "UK NA to EN 1992-1-1, 5.1.3(1): all spans loaded, and alternate spans loaded, with "
            "&gamma;<sub>Q</sub> Q<sub>k</sub> on the loaded spans and the same "
            "&gamma;<sub>G</sub> G<sub>k</sub> on every span."
        )
        arrangements = tag(
            "ol", "".join(tag("li", esc(x)) for x in a["arrangements"]), cls="arrangements"
        )
    else:
        pattern = (
            "every subset of loaded segments (the worst case at every section, found by "
            "superposing one variable-load case per segment)."
        )
        arrangements = ""
    return "".join(
        [
            tag("h3", "2. Actions and load arrangements"),
            tag("p", f"Ultimate limit state: {which}, EN 1990:2002, 6.4.3.2."),
            table(
                [
                    "Equation",
                    "Expression",
                    "factor on G<sub>k</sub>",
                    "from",
                    "factor on Q<sub>k</sub> (loaded spans)",
                    "from",
                ],
                eq_rows,
                caption="Combination equations used",
            ),
            factors,
            tag("p", f"<strong>Arrangements of the imposed load:</strong> {pattern}"),
            arrangements,
            tag(
                "p",
                "Serviceability: quasi-permanent combination G<sub>k</sub> + &psi;<sub>2</sub> "
                "Q<sub>k</sub> (EN 1990:2002, Eq. (6.16b)), elastic, for the steel stress of "
                "the crack-control check (EN 1992-1-1:2004, 7.3.3).",
            ),
        ]
    )


# --------------------------------------------------------------------------------------------
# Analysis: envelopes and the governing arrangements


def _stations_at(env: list[Json], x_mm: float) -> list[Json]:
    return [st for st in env if abs(float(st["x_mm"]) - x_mm) < 0.5]


def _span_peaks(s: Json) -> list[tuple[Json, Json]]:
    """(segment, station of the greatest sagging moment) per segment."""
    out = []
    for g in s["segments"]:
        here = [st for st in s["envelope"] if st["segment"] == g["index"]]
        best = max(here, key=lambda st: st["m_max_knm"])
        out.append((g, best))
    return out


def _v_side(st: Json | None) -> tuple[str, str] | None:
    """(field, governing-label field) of the larger shear magnitude at a station."""
    if st is None:
        return None
    if abs(st["v_min_kn"]) >= abs(st["v_max_kn"]):
        return "v_min_kn", "v_min_by"
    return "v_max_kn", "v_max_by"


def _support_rows(s: Json) -> list[tuple[Json, Json, Json | None, Json | None]]:
    """(support, station of the least moment, left-side station, right-side station)."""
    out = []
    for sp in s["supports"]:
        at = _stations_at(s["envelope"], float(sp["x_mm"]))
        if not at:
            continue
        m = min(at, key=lambda st: st["m_min_knm"])
        left = next((st for st in at if st["side"] == -1), None)
        right = next((st for st in at if st["side"] == 1), None)
        out.append((sp, m, left, right))
    return out


def _supports(detail: StripDetail) -> tuple[plots.SupportMark, ...]:
    return tuple(plots.SupportMark(x.label, x.x_mm, x.width_mm) for x in detail.strip.supports)


def _support_basis(options: AnalysisOptions) -> str:
    if options.use_support_reduction:
        return (
            "the centreline moment reduced by &Delta;M = F<sub>Ed,sup</sub> t / 8 at the "
            "interior supports (EN 1992-1-1:2004, 5.3.2.2(4))"
        )
    if options.design_at_support_faces:
        return (
            "the moment at the support faces, not less than 0.65 of the fixed-end moment "
            "(EN 1992-1-1:2004, 5.3.2.2(3))"
        )
    return "the moment at the support centrelines"


def analysis_section(s: Json, detail: StripDetail, options: AnalysisOptions, *, salt: str) -> str:
    """Redistribution, the M and V envelopes plotted, and the governing arrangements."""
    sid = s["id"]
    a = s["actions"]
    delta = a["redistribution_delta"]
    if delta == 1:
        redis = (
            f"&delta; = {esc(num(delta))}: linear elastic analysis, no redistribution "
            "(EN 1992-1-1:2004, 5.4)."
        )
    else:
        pct = round((1.0 - float(delta)) * 100.0, 4)
        redis = (
            f"&delta; = {esc(num(delta))}: the support moments of every arrangement are "
            f"multiplied by &delta; ({esc(num(pct))} % redistribution) and the span moments "
            "follow from equilibrium (EN 1992-1-1:2004, 5.5); the limits on &delta; are "
            "checked in section 7."
        )
    env = detail.analysis.uls
    x = np.asarray(env.stations.x_mm, dtype=float)
    peaks = _span_peaks(s)
    sups = _support_rows(s)
    m_notes = [
        plots.Annotation(float(st["x_mm"]), float(st["m_max_knm"]), num(st["m_max_knm"]))
        for _, st in peaks
        if st["m_max_knm"] > 0
    ] + [
        plots.Annotation(float(st["x_mm"]), float(st["m_min_knm"]), num(st["m_min_knm"]))
        for _, st, _, _ in sups
        if st["m_min_knm"] < 0
    ]
    v_notes = []
    for _, _, left, right in sups:
        for st, dx in ((left, -1.0), (right, 1.0)):
            side = _v_side(st)
            if st is not None and side is not None:
                value = st[side[0]]
                v_notes.append(plots.Annotation(float(st["x_mm"]) + dx, float(value), num(value)))
    supports = _supports(detail)
    m_svg = plots.moment_svg(
        plots.EnvelopeData(
            x, np.asarray(env.m_max_knm), np.asarray(env.m_min_knm), supports, tuple(m_notes)
        ),
        title=f"Strip {sid}: ULS bending-moment envelope (kNm per m width)",
        salt=f"{salt}/moment",
    )
    v_svg = plots.shear_svg(
        plots.EnvelopeData(
            x, np.asarray(env.v_max_kn), np.asarray(env.v_min_kn), supports, tuple(v_notes)
        ),
        title=f"Strip {sid}: ULS shear-force envelope (kN per m width)",
        salt=f"{salt}/shear",
    )
    peak_rows = []
    for g, st in peaks:
        key = f"{sid}/segments/{g['index']}"
        sag = st["m_max_knm"] > 0
        peak_rows.append(
            [
                c(f"{g['label']} ({g['kind']})"),
                k(st["m_max_knm"], f"{key}/m_max_knm") if sag else c("no sagging", "num"),
                k(st["x_mm"], f"{key}/x_m_max_mm") if sag else c("", "num"),
                c(st["m_max_by"] if sag else ""),
            ]
        )
    sup_rows = []
    for sp, st, left, right in sups:
        key = f"{sid}/supports/{sp['label']}"
        row = [c(sp["label"]), k(st["m_min_knm"], f"{key}/m_min_knm"), c(st["m_min_by"])]
        for side_st, name in ((left, "v_left_kn"), (right, "v_right_kn")):
            side = _v_side(side_st)
            if side_st is None or side is None:
                row += [raw("&ndash;", "num"), c("")]
            else:
                row += [k(side_st[side[0]], f"{key}/{name}"), c(side_st[side[1]])]
        sup_rows.append(row)
    return "".join(
        [
            tag("h3", "3. Analysis: envelopes", id=f"{sid}-analysis"),
            tag("p", f"<strong>Redistribution:</strong> {redis}"),
            tag(
                "p",
                "<strong>Design moments over supports</strong> (section 4): "
                f"{_support_basis(options)}; the envelopes below are at the centrelines.",
            ),
            _figure(
                m_svg,
                "ULS bending-moment envelope. UK convention: the diagram is drawn on the tension "
                "side, sagging (positive) below the axis and hogging (negative) above it. "
                "Values at the span peaks and support centrelines; grey bands: supports.",
            ),
            _figure(
                v_svg,
                "ULS shear-force envelope, positive up (the part left of the section pushed up). "
                "Values just left and right of each support centreline.",
            ),
            table(
                ["Segment", "M<sub>Ed,max</sub> (kNm/m)", "at x (mm)", "governing arrangement"],
                peak_rows,
                caption="Span peaks (greatest sagging moment at the analysis stations)",
            ),
            table(
                [
                    "Support",
                    "M<sub>Ed,min</sub> (kNm/m)",
                    "governing arrangement",
                    "V<sub>Ed</sub> left (kN/m)",
                    "governing",
                    "V<sub>Ed</sub> right (kN/m)",
                    "governing",
                ],
                sup_rows,
                caption="Supports (moment at the centreline, most hogging; shear at the "
                "centreline from each side, largest magnitude)",
            ),
        ]
    )


def _figure(svg: str, caption: str) -> str:
    return f"<figure>{svg}<figcaption>{caption}</figcaption></figure>"
