"""Plain-text summaries of the design for the terminal (``slabwright check`` and ``build``)."""

from __future__ import annotations

from detailer.layout import StripDetail


def design_lines(detail: StripDetail, bar_type: str) -> list[str]:
    """Per zone M_Ed, A_s,req, the bars chosen, A_s,prov and the governing requirement."""
    lines = [
        "",
        (
            "  Zone          face     M_Ed (kNm/m)  d (mm)  A_s,req  A_s,min  bars        A_s,prov"
            "  governing"
        ),
    ]
    for z in detail.zones:
        bars = f"{bar_type}{z.phi_mm}@{z.spacing_mm}"
        lines.append(
            f"  {z.zone_id:<13} {z.face.value:<7}{z.m_ed_knm_per_m:>13.2f}{z.d_mm:>8.0f}"
            f"{z.as_req_mm2_per_m:>9.0f}{z.as_min_mm2_per_m:>9.0f}  {bars:<10}"
            f"{z.as_prov_mm2_per_m:>10.0f}  {z.governing}"
        )
    lines.append("  (areas in mm2 per metre width)")
    worst = sorted(detail.checks, key=lambda c: -c.utilisation)[:3]
    if worst:
        lines.append("  Highest utilisations of the strip checks:")
        for c in worst:
            lines.append(f"    {c.name}: {c.utilisation:.2f} ({c.clause})")
    sc = detail.selfcheck
    lines.append(
        f"  Self-check M_Rd(x) >= shifted M_Ed(x): utilisation {sc.utilisation_max:.2f} at "
        f"x = {sc.x_at_mm:.0f} mm ({sc.face.value}) - {'OK' if sc.ok else 'FAILS'}"
    )
    return lines
