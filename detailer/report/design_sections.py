"""Report sections of one strip from the design on: sections, checks, anchorage, curtailment.

Numbers come from the strip's record in its JSON-ready form (see ``markup``); the curtailment
diagram is drawn from the same resistance curves and bar sets the record was built from.
"""

from __future__ import annotations

__all__ = [
    "all_checks",
    "anchorage_section",
    "checks_summary_section",
    "curtailment_data",
    "curtailment_section",
    "design_section",
    "highest",
    "other_checks_section",
    "serviceability_shear_section",
]

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from detailer.layout import BarRole, StripDetail
from detailer.report import plots
from detailer.report.markup import Cell, Json, c, clause, esc, k, num, raw, table, tag

#: Clause of the self-check (resistance of the bars laid against the shifted envelope).
SELFCHECK_CLAUSE = "EN 1992-1-1:2004, 9.2.1.3(2)"


@dataclass(frozen=True, slots=True)
class CheckRow:
    """A check of the record with where it sits (``key``) and what it belongs to."""

    where: str  # zone id, or "strip"
    key: str  # data-key prefix, e.g. "S1/zones/C-T/checks/2"
    check: Json

    @property
    def utilisation(self) -> float:
        u = self.check["utilisation"]
        return float("inf") if u is None else float(u)


def _group(clause: str) -> str:
    if ", 7.4.2" in clause:
        return "deflection"
    if ", 6.2." in clause:
        return "shear"
    if ", 9.2.1.4" in clause or ", 9.3.1.2" in clause:
        return "anchorage"
    return "other"


def all_checks(s: Json) -> list[CheckRow]:
    """Every check of a strip: per zone, then the strip-level ones, then the self-check."""
    sid = s["id"]
    rows = [
        CheckRow(z["zone_id"], f"{sid}/zones/{z['zone_id']}/checks/{i}", ch)
        for z in s["zones"]
        for i, ch in enumerate(z["checks"])
    ]
    rows += [CheckRow("strip", f"{sid}/checks/{i}", ch) for i, ch in enumerate(s["checks"])]
    sc = s["selfcheck"]
    rows.append(
        CheckRow(
            "strip",
            f"{sid}/selfcheck",
            {
                "name": f"self-check M_Rd(x) >= shifted M_Ed(x), worst at x = {num(sc['x_at_mm'])} "
                f"mm, {sc['face']} face",
                "clause": SELFCHECK_CLAUSE,
                "demand": None,
                "capacity": None,
                "unit": "-",
                "ok": sc["ok"],
                "note": "",
                "utilisation": sc["utilisation_max"],
            },
        )
    )
    return rows


def highest(rows: Sequence[CheckRow]) -> float:
    return max((r.utilisation for r in rows), default=0.0)


def _ok(ok: bool) -> Cell:
    return raw("OK" if ok else "<strong>FAILS</strong>", "ok" if ok else "fail")


def _check_cells(r: CheckRow, *, with_where: bool) -> list[Cell]:
    ch = r.check
    util_key = (
        f"{r.key}/utilisation_max" if r.key.endswith("/selfcheck") else f"{r.key}/utilisation"
    )
    cells = [c(r.where, "nw")] if with_where else []
    cells += [
        c(ch["name"]),
        clause(ch["clause"]),
        k(ch["demand"], f"{r.key}/demand") if ch["demand"] is not None else c(""),
        k(ch["capacity"], f"{r.key}/capacity") if ch["capacity"] is not None else c(""),
        c(ch["unit"]),
        k(ch["utilisation"], util_key),
        _ok(ch["ok"]),
        c(ch["note"], "note"),
    ]
    return cells


_CHECK_HEADERS = [
    "Check",
    "Clause",
    "Demand",
    "Capacity / limit",
    "Unit",
    "Utilisation",
    "",
    "Note",
]


def _check_table(rows: Sequence[CheckRow], caption: str, *, with_where: bool = False) -> str:
    peak = highest(rows)
    notes = any(r.check["note"] for r in rows)
    cut = None if notes else -1  # no empty note column
    return table(
        ((["Zone"] if with_where else []) + _CHECK_HEADERS)[:cut],
        [_check_cells(r, with_where=with_where)[:cut] for r in rows],
        caption=caption,
        cls="checks",
        row_classes=["peak" if r.utilisation == peak and peak > 0 else "" for r in rows],
    )


def design_section(s: Json, bar_type: str) -> str:
    """Flexural design per zone, then each zone's checks with their clauses."""
    sid = s["id"]
    flex, steel = [], []
    for z in s["zones"]:
        key = f"{sid}/zones/{z['zone_id']}"
        flex.append(
            [
                c(z["zone_id"]),
                c(z["description"]),
                k(z["m_ed_knm_per_m"], f"{key}/m_ed_knm_per_m"),
                k(z["d_mm"], f"{key}/d_mm"),
                k(z["k"], f"{key}/k"),
                k(z["k_prime"], f"{key}/k_prime"),
                k(z["z_mm"], f"{key}/z_mm"),
                k(z["as_req_mm2_per_m"], f"{key}/as_req_mm2_per_m"),
            ]
        )
        bars = f"{bar_type}{z['phi_mm']} @ {z['spacing_mm']}"
        steel.append(
            [
                c(z["zone_id"]),
                k(z["as_req_mm2_per_m"], f"{key}/as_req_mm2_per_m"),
                k(z["as_min_mm2_per_m"], f"{key}/as_min_mm2_per_m"),
                k(z["as_max_mm2_per_m"], f"{key}/as_max_mm2_per_m"),
                k(z["as_design_mm2_per_m"], f"{key}/as_design_mm2_per_m"),
                c(z["governing"], "note"),
                c(bars + (" (fixed in the input)" if z["user_fixed"] else ""), "nw"),
                k(z["as_prov_mm2_per_m"], f"{key}/as_prov_mm2_per_m"),
            ]
        )
    zone_checks = [r for r in all_checks(s) if r.where != "strip"]
    return "".join(
        [
            tag("h3", "4. Section design (per metre width, b = 1000 mm)"),
            table(
                [
                    "Zone",
                    "Where",
                    "M<sub>Ed</sub> (kNm/m)",
                    "d (mm)",
                    "K",
                    "K&prime;",
                    "z (mm)",
                    "A<sub>s,req</sub> (mm&sup2;/m)",
                ],
                flex,
                caption="Flexure, EN 1992-1-1:2004, 6.1 with the UK NA: K = M<sub>Ed</sub> / "
                "(b d&sup2; f<sub>ck</sub>), z = d [0.5 + &radic;(0.25 &minus; K / 1.134)] "
                "&le; 0.95 d, A<sub>s,req</sub> = M<sub>Ed</sub> / (f<sub>yd</sub> z)",
            ),
            table(
                [
                    "Zone",
                    "A<sub>s,req</sub>",
                    "A<sub>s,min</sub> (9.2.1.1(1))",
                    "A<sub>s,max</sub> (9.2.1.1(3))",
                    "A<sub>s,design</sub>",
                    "governed by",
                    "bars (mm)",
                    "A<sub>s,prov</sub>",
                ],
                steel,
                caption="Reinforcement chosen (areas in mm&sup2;/m; bars: type and size @ spacing)",
            ),
            _check_table(
                zone_checks,
                "Zone checks: area, spacing and crack control (highest utilisation highlighted)",
                with_where=True,
            ),
        ]
    )


def serviceability_shear_section(s: Json) -> str:
    """Span/effective-depth (7.4.2) and shear without shear reinforcement (6.2.2)."""
    rows = [r for r in all_checks(s) if r.where == "strip"]
    defl = [r for r in rows if _group(r.check["clause"]) == "deflection"]
    shear = [r for r in rows if _group(r.check["clause"]) == "shear"]
    return "".join(
        [
            tag("h3", "5. Deflection and shear"),
            _check_table(
                defl,
                "Deflection by span/effective depth l/d against the limit of EN 1992-1-1:2004, "
                "7.4.2, Eq. (7.16) with the factors in the note (demand: actual l/d)",
            )
            if defl
            else tag("p", "No span/depth check applies."),
            _check_table(
                shear,
                "Shear V<sub>Ed</sub> at d from the support faces against V<sub>Rd,c</sub>, "
                "EN 1992-1-1:2004, 6.2.2(1), Eq. (6.2), per metre width",
            )
            if shear
            else tag("p", "No shear check applies."),
        ]
    )


def anchorage_section(s: Json) -> str:
    """Anchorage and lap lengths used, and the bottom-bar checks at the end supports."""
    sid = s["id"]
    rows = []
    for a in s["anchorage"]:
        key = f"{sid}/anchorage/{a['layer']}/{a['phi_mm']}"
        rows.append(
            [
                c(a["layer"]),
                c(a["phi_mm"], "num"),
                c(a["bond"]),
                k(a["f_bd_mpa"], f"{key}/f_bd_mpa"),
                k(a["l_b_rqd_mm"], f"{key}/l_b_rqd_mm"),
                k(a["l_bd_mm"], f"{key}/l_bd_mm"),
                k(a["l_0_mm"], f"{key}/l_0_mm"),
            ]
        )
    ends = [
        r for r in all_checks(s) if r.where == "strip" and _group(r.check["clause"]) == "anchorage"
    ]
    parts = [
        tag("h3", "6. Anchorage and laps"),
        table(
            [
                "Layer",
                "&phi; (mm)",
                "bond (8.4.2(2))",
                "f<sub>bd</sub> (N/mm&sup2;) (8.4.2)",
                "l<sub>b,rqd</sub> (mm) (8.4.3)",
                "l<sub>bd</sub> (mm) (8.4.4)",
                "l<sub>0</sub> (mm) (8.7.3)",
            ],
            rows,
            caption="Anchorage at the full design stress f<sub>yd</sub>, straight bars, and "
            "lap lengths where bars are lapped (EN 1992-1-1:2004, 8.4 and 8.7.3)",
        ),
    ]
    if ends:
        parts.append(
            _check_table(
                ends,
                "Bottom bars at the end supports (EN 1992-1-1:2004, 9.3.1.2(1) and 9.2.1.4(2))",
            )
        )
    return "".join(parts)


def curtailment_data(detail: StripDetail) -> plots.CurtailmentData | None:
    """What the curtailment diagram of a strip draws (``None`` without principal bars or
    without the resistance curves of both faces)."""
    if len(detail.resistance) != 2:
        return None
    top, bottom = detail.resistance
    principal = [
        b for b in detail.bar_sets if b.role is BarRole.PRINCIPAL and b.layer in ("T1", "B1")
    ]
    if not principal:
        return None
    x_min = min(b.x_start_mm for b in principal)
    x_max = max(b.x_end_mm for b in principal)
    bars = tuple(
        plots.BarLine(
            mark=b.mark,
            label=b.callout.rsplit(" ", 1)[0],
            layer=b.layer,
            x_start_mm=b.x_start_mm,
            x_end_mm=b.x_end_mm,
            leg_left=b.shape.code in ("11", "21") and abs(b.x_start_mm - x_min) < 1.0,
            leg_right=b.shape.code in ("11", "21") and abs(b.x_end_mm - x_max) < 1.0,
        )
        for b in principal
    )
    supports = tuple(plots.SupportMark(x.label, x.x_mm, x.width_mm) for x in detail.strip.supports)
    return plots.CurtailmentData(
        x_top_mm=np.asarray(top.x_mm, dtype=float),
        m_ed_top=np.asarray(top.m_ed_shifted_knm_per_m, dtype=float),
        m_rd_top=np.asarray(top.m_rd_knm_per_m, dtype=float),
        x_bottom_mm=np.asarray(bottom.x_mm, dtype=float),
        m_ed_bottom=np.asarray(bottom.m_ed_shifted_knm_per_m, dtype=float),
        m_rd_bottom=np.asarray(bottom.m_rd_knm_per_m, dtype=float),
        bars=bars,
        supports=supports,
    )


def _dims(b: Json) -> str:
    return " ".join(f"{name} {value}" for name, value in b["dims_mm"].items())


def curtailment_section(s: Json, detail: StripDetail, *, salt: str) -> str:
    """The curtailment diagram, the bar sets with their marks and the self-check."""
    sid = s["id"]
    data = curtailment_data(detail)
    if data is None:
        figure = tag("p", "No principal bars or resistance curves to draw.", cls="warn")
    else:
        svg = plots.curtailment_svg(
            data,
            title=f"Strip {sid}: shifted design moment against the resistance of the bars provided "
            "(kNm per m width)",
            salt=f"{salt}/curtailment",
        )
        figure = (
            f"<figure>{svg}<figcaption>Curtailment. Upper part: M<sub>Ed</sub> shifted by "
            "a<sub>l</sub> (EN 1992-1-1:2004, 9.2.1.3(2)) and M<sub>Rd</sub> of the bars as laid "
            "(built up over l<sub>bd</sub> from each bar end), drawn on the tension side: top "
            "face (hogging) above the axis, bottom face (sagging) below. Lower part: principal "
            "bars by layer with their callouts (number, type and size, mark, spacing); a short "
            "leg marks a bend into a support or a U-bar; dotted lines are the bar ends "
            "(cut-off points).</figcaption></figure>"
        )
    rows = []
    for b in s["bar_sets"]:
        key = f"{sid}/bar_sets/{b['mark']}/{b['set_id']}"
        rows.append(
            [
                c(b["mark"]),
                c(b["callout"], "nw"),
                c(b["role"]),
                c(b["zone_id"]),
                c(b["shape_code"]),
                c(_dims(b)),
                k(b["x_start_mm"], f"{key}/x_start_mm"),
                k(b["x_end_mm"], f"{key}/x_end_mm"),
                c(b["length_mm"], "num"),
                k(b["mass_kg"], f"{key}/mass_kg"),
                c(b["note"], "note"),
            ]
        )
    sc = s["selfcheck"]
    verdict = "OK" if sc["ok"] else "FAILS"
    return "".join(
        [
            tag("h3", "7. Curtailment and bars", id=f"{sid}-curtailment"),
            figure,
            table(
                [
                    "Mark",
                    "Callout",
                    "Role",
                    "Zone",
                    "Shape (BS 8666)",
                    "Dimensions (mm)",
                    "x<sub>start</sub> (mm)",
                    "x<sub>end</sub> (mm)",
                    "Length (mm)",
                    "Mass (kg)",
                    "Note",
                ],
                rows,
                caption="Bar sets of one member (distribution bars run across the panel, laid "
                "between x<sub>start</sub> and x<sub>end</sub>)",
                cls="bars",
            ),
            tag(
                "p",
                "Self-check (M<sub>Rd</sub>(x) &ge; shifted M<sub>Ed</sub>(x), both faces, "
                f"{esc(SELFCHECK_CLAUSE)}): greatest utilisation "
                + tag(
                    "span",
                    esc(num(sc["utilisation_max"])),
                    data_key=f"{sid}/selfcheck/utilisation_max",
                )
                + f" at x = {esc(num(sc['x_at_mm']))} mm on the {esc(sc['face'])} face: "
                + tag("strong", verdict, cls="ok" if sc["ok"] else "fail")
                + ".",
            ),
        ]
    )


def other_checks_section(s: Json) -> str:
    rows = [r for r in all_checks(s) if r.where == "strip" and _group(r.check["clause"]) == "other"]
    rows = [r for r in rows if not r.key.endswith("/selfcheck")]
    if not rows:
        return ""
    return tag("h3", "8. Cover and redistribution") + _check_table(
        rows, "Nominal cover (EN 1992-1-1:2004, 4.4.1) and limits of redistribution (5.5(4))"
    )


def checks_summary_section(s: Json) -> str:
    """Every check of the strip on one line each, with its utilisation; the highest marked."""
    rows = all_checks(s)
    peak = highest(rows)
    worst = [r for r in rows if r.utilisation == peak]
    n_fail = sum(1 for r in rows if not r.check["ok"])
    lead = (
        f"{len(rows)} checks, "
        + ("all satisfied" if n_fail == 0 else f"<strong class='fail'>{n_fail} fail</strong>")
        + f"; highest utilisation {esc(num(worst[0].check['utilisation']) if worst else '0')}"
        + (f" ({esc(worst[0].where)}: {esc(worst[0].check['name'])})" if worst else "")
        + (f" and {len(worst) - 1} more at the same value" if len(worst) > 1 else "")
        + "."
    )
    body = []
    for r in rows:
        util_key = (
            f"{r.key}/utilisation_max" if r.key.endswith("/selfcheck") else f"{r.key}/utilisation"
        )
        body.append(
            [
                c(r.where, "nw"),
                c(r.check["name"]),
                clause(r.check["clause"]),
                k(r.check["utilisation"], util_key),
                _ok(r.check["ok"]),
            ]
        )
    return "".join(
        [
            tag("h3", "9. Summary of the checks"),
            tag("p", lead),
            table(
                ["Zone", "Check", "Clause", "Utilisation", ""],
                body,
                caption="Every check of the strip (highest utilisation highlighted)",
                cls="checks summary",
                row_classes=["peak" if r.utilisation == peak and peak > 0 else "" for r in rows],
            ),
        ]
    )
