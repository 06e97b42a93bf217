"""Checks between values of a schema-valid project file, and the build of the project model.

Every user mistake is reported through the ``error`` factory handed in by ``detailer.project``
(which knows the file and lines); all mistakes found are raised together.
"""

from __future__ import annotations

__all__ = ["BAR_DIAMETERS_MM", "CONCRETE_CLASSES", "EXPOSURE_CLASSES", "MAX_SPANS", "build_project"]

import itertools
import re
import string
from collections.abc import Callable

from detailer.codes.en1990 import psi_factors
from detailer.errors import ProjectError, ProjectErrors
from detailer.model import (
    AnalysisOptions,
    Combination,
    Curtailment,
    EndKind,
    FixedBars,
    LineLoad,
    Materials,
    PartialLoad,
    PatternRule,
    Project,
    ReinforcementOptions,
    SegmentLoads,
    Strip,
    StripEnd,
    Support,
)
from detailer.project_schema import EndIn, FileIn, LoadsIn, StripIn, WhereIn, unportable_name

ErrorFactory = Callable[[tuple, str, str], ProjectError]

#: Strength classes accepted: EN 1992-1-1:2004 Table 3.1 up to C50/60, plus C28/35 and C32/40
#: of BS 8500-1 (common UK specification classes; from memory).
CONCRETE_CLASSES: tuple[str, ...] = (
    "C12/15", "C16/20", "C20/25", "C25/30", "C28/35", "C30/37", "C32/40",
    "C35/45", "C40/50", "C45/55", "C50/60",
)  # fmt: skip

#: Exposure classes for which cover rules are implemented, EN 1992-1-1:2004 Table 4.1.
EXPOSURE_CLASSES: tuple[str, ...] = (
    "X0", "XC1", "XC2", "XC3", "XC4", "XD1", "XD2", "XD3", "XS1", "XS2", "XS3",
)  # fmt: skip

#: Preferred bar sizes, BS 8666 / BS 4449 (6 mm excluded: B500A below 8 mm does not conform
#: to EN 1992-1-1, BS 8666:2005 Table 2 note).
BAR_DIAMETERS_MM: tuple[int, ...] = (8, 10, 12, 16, 20, 25, 32, 40)

# Lengths below these are taken as a units slip (metres typed for mm), not as real geometry.
_MIN_SPAN_MM = 300.0
_MAX_SPAN_MM = 30000.0
_MAX_AREA_LOAD = 100.0  # kN/m2
_MAX_LINE_LOAD = 500.0  # kN/m
#: Most spans in one strip: 50 spans of 3-6 m is a 150-300 m floor, far past the usual spacing
#: of movement joints (common practice), and the analysis grows with the square of the spans.
MAX_SPANS = 50
#: No nominal cover can be below 10 mm: c_min >= 10 mm, EN 1992-1-1:2004, 4.4.1.2(2), Eq. (4.2).
_MIN_COVER_MM = 10.0

# Steel notation of BS 8666 (as amended 2008, from memory) -> ductility classes it covers.
_BAR_TYPE_DUCTILITY = {"H": "ABC", "A": "A", "B": "BC", "C": "C"}


class _Checker:
    """Collects the mistakes found; ``count`` tells a builder whether it added any."""

    def __init__(self, error: ErrorFactory) -> None:
        self._error = error
        self.errors: list[ProjectError] = []

    def fail(self, path: tuple, message: str, fix: str = "") -> None:
        self.errors.append(self._error(path, message, fix))

    @property
    def count(self) -> int:
        return len(self.errors)


def build_project(f: FileIn, error: ErrorFactory) -> Project:
    """Check relations between values of ``f`` and build the model; raises ProjectErrors."""
    chk = _Checker(error)
    fail = chk.fail
    materials = _materials(f, fail)
    reinforcement = _reinforcement(f, fail)
    analysis = _analysis(f, fail)
    problem = unportable_name(f.project.id)  # the id names the output folder and files
    if problem is not None:
        fail(("project", "id"), *problem)
    strips: list[Strip] = []
    seen: dict[str, int] = {}  # ids in lower case: each strip has output files of its own
    for i, s in enumerate(f.strips):
        first = seen.setdefault(s.id.casefold(), i)
        if first != i:
            other = f.strips[first].id
            fail(
                ("strips", i, "id"),
                f"duplicate strip id '{s.id}' (also strips[{first}])"
                if other == s.id
                else f"strip id '{s.id}' differs from '{other}' (strips[{first}]) only in letter "
                "case: their output files would clash on Windows and macOS",
                "give every strip its own id",
            )
        strip = _strip(s, ("strips", i), materials, reinforcement, chk)
        if strip is not None:
            strips.append(strip)
    if chk.errors:
        raise ProjectErrors(sorted(chk.errors, key=lambda e: e.line or 0))
    return Project(
        id=f.project.id,
        title=f.project.title,
        revision=f.project.revision,
        date=f.project.date,
        drawing_ref=f.project.drawing,
        materials=materials,
        reinforcement=reinforcement,
        analysis=analysis,
        strips=tuple(strips),
        code_id=f.design.code,
    )


def _materials(f: FileIn, fail: Callable[..., None]) -> Materials:
    m = f.materials
    name = m.concrete.strip().upper().replace(" ", "")
    match = re.fullmatch(r"C(\d+)/(\d+)", name)
    if name not in CONCRETE_CLASSES or match is None:
        fail(
            ("materials", "concrete"),
            f"unknown concrete class '{m.concrete}'",
            "use one of " + ", ".join(CONCRETE_CLASSES) + " (EN 1992-1-1 Table 3.1)",
        )
        f_ck, f_cube = 30.0, 37.0  # placeholder so the other checks can run
    else:
        f_ck, f_cube = float(match.group(1)), float(match.group(2))
    if m.exposure not in EXPOSURE_CLASSES:
        fail(
            ("materials", "exposure"),
            f"exposure class '{m.exposure}' is not supported",
            "use X0, XC1-XC4, XD1-XD3 or XS1-XS3 (EN 1992-1-1 Table 4.1)",
        )
    if m.ductility_class not in _BAR_TYPE_DUCTILITY[m.bar_type]:
        fail(
            ("materials", "ductility_class"),
            f"bar type {m.bar_type} is not made in ductility class {m.ductility_class}",
            f"use ductility class {' or '.join(_BAR_TYPE_DUCTILITY[m.bar_type])}, or bar type H",
        )
    return Materials(
        concrete_class=name,
        f_ck=f_ck,
        f_ck_cube=f_cube,
        f_yk=float(m.f_yk),
        bar_type=m.bar_type,
        ductility_class=m.ductility_class,
        exposure_class=m.exposure,
        density_kn_per_m3=float(m.density_kn_per_m3),
    )


def _reinforcement(f: FileIn, fail: Callable[..., None]) -> ReinforcementOptions:
    r = f.reinforcement
    path = ("reinforcement", "diameters_mm")
    for k, d in enumerate(r.diameters_mm):
        if d not in BAR_DIAMETERS_MM:
            fail(
                (*path, k),
                f"{d} mm is not a standard bar size",
                "use " + ", ".join(str(x) for x in BAR_DIAMETERS_MM),
            )
    for key, values in (("diameters_mm", r.diameters_mm), ("spacings_mm", r.spacings_mm)):
        for k, v in enumerate(values):
            if v in values[:k]:
                fail(("reinforcement", key, k), f"{v} is listed twice", "list each value once")
    return ReinforcementOptions(
        diameters_mm=tuple(sorted(set(r.diameters_mm))),
        spacings_mm=tuple(sorted(set(r.spacings_mm))),
        stock_length_mm=float(r.stock_length_mm),
        curtailment=Curtailment(r.curtailment),
        max_aggregate_mm=float(r.max_aggregate_mm),
    )


def _analysis(f: FileIn, fail: Callable[..., None]) -> AnalysisOptions:
    d = f.design
    delta = 1.0
    if d.redistribution_percent is not None and d.redistribution_delta is not None:
        fail(
            ("design", "redistribution_delta"),
            "give redistribution_percent or redistribution_delta, not both",
            "delete one of them",
        )
    elif d.redistribution_percent is not None:
        delta = 1.0 - d.redistribution_percent / 100.0
    elif d.redistribution_delta is not None:
        delta = float(d.redistribution_delta)
    # UK NA to EN 1992-1-1 5.5(4): delta >= k6 = 0.8 for Class A steel (k5 = 0.7 for B and C).
    if f.materials.ductility_class == "A" and delta < 0.8 - 1e-12:
        key = (
            "redistribution_percent"
            if d.redistribution_percent is not None
            else "redistribution_delta"
        )
        fail(
            ("design", key),
            f"delta {delta:.2f} is below 0.8, the limit for Class A reinforcement",
            "redistribute at most 20 % with Class A bars (EN 1992-1-1 5.5(4), UK NA)",
        )
    return AnalysisOptions(
        combination=Combination(d.combination),
        pattern=PatternRule(d.arrangements),
        redistribution_delta=delta,
        use_support_reduction=d.support_reduction,
        design_at_support_faces=d.moments_at_faces,
    )


def _end(e: EndIn, path: tuple, fail: Callable[..., None]) -> StripEnd:
    kind = EndKind(e.kind)
    if kind is EndKind.CANTILEVER:
        if e.cantilever_mm is None:
            fail(path, "a cantilever end needs its length", "write {cantilever_mm: 1500}")
            return StripEnd(kind, 1000.0)
        if e.cantilever_mm < _MIN_SPAN_MM / 3:
            fail(
                (*path, "cantilever_mm"),
                f"a {e.cantilever_mm:g} mm cantilever is too short to be real",
                "give the overhang in mm, e.g. 1500 for 1.5 m",
            )
        return StripEnd(kind, float(e.cantilever_mm))
    if e.cantilever_mm is not None:
        fail(
            (*path, "cantilever_mm"),
            f"cantilever_mm given for a {e.kind} end",
            "write the end as {cantilever_mm: 1500}, or drop cantilever_mm",
        )
    return StripEnd(kind, 0.0)


def _labels(n: int) -> list[str]:
    letters = string.ascii_uppercase
    return [letters[i] if i < 26 else letters[i // 26 - 1] + letters[i % 26] for i in range(n)]


def _strip(
    s: StripIn,
    path: tuple,
    materials: Materials,
    reinforcement: ReinforcementOptions,
    chk: _Checker,
) -> Strip | None:
    fail = chk.fail
    n_errors = chk.count
    left = _end(s.left_end, (*path, "left_end"), fail)
    right = _end(s.right_end, (*path, "right_end"), fail)
    x0 = left.cantilever_mm if left.kind is EndKind.CANTILEVER else 0.0

    # Support centrelines, from spans or from positions.
    if (s.spans_mm is None) == (s.supports_mm is None):
        fail(
            path,
            "give spans_mm or supports_mm" + (", not both" if s.spans_mm is not None else ""),
            "spans_mm lists span lengths; supports_mm lists support centreline positions",
        )
        return None
    given = s.spans_mm if s.spans_mm is not None else s.supports_mm or []
    n_spans_given = len(given) - (s.spans_mm is None)
    if n_spans_given > MAX_SPANS:
        fail(
            (*path, "spans_mm" if s.spans_mm is not None else "supports_mm"),
            f"{n_spans_given} spans are more than the {MAX_SPANS} one strip may have",
            "split the strip into several strips (e.g. at movement joints)",
        )
        return None
    if s.spans_mm is not None:
        key = "spans_mm"
        spans = [float(v) for v in s.spans_mm]
        xs = [x0]
        for v in spans:
            xs.append(xs[-1] + v)
    else:
        key = "supports_mm"
        raw = [float(v) for v in s.supports_mm or ()]
        xs = [x0 + v - raw[0] for v in raw]
        spans = [b - a for a, b in itertools.pairwise(xs)]
        for k, (a, b) in enumerate(itertools.pairwise(raw)):
            if b <= a:
                fail(
                    (*path, key, k + 1),
                    f"must be greater than the previous position (got {b:g} after {a:g})",
                    "list support centrelines from left to right",
                )
                return None
    for k, span in enumerate(spans):
        where = (*path, key, k) if key == "spans_mm" else (*path, key, k + 1)
        if not _MIN_SPAN_MM <= span <= _MAX_SPAN_MM:
            fail(
                where,
                f"a span of {span:g} mm is outside {_MIN_SPAN_MM:g}..{_MAX_SPAN_MM:g} mm",
                "give lengths in mm, e.g. 4200 for 4.2 m",
            )
    if chk.count > n_errors:
        return None  # further geometry checks would only repeat the units slip
    n_sup = len(xs)

    # Ends: a single support must be the fixed root of a cantilever.
    if n_sup == 1:
        kinds = {left.kind, right.kind}
        if kinds != {EndKind.CANTILEVER, EndKind.MONOLITHIC}:
            both = left.kind is EndKind.CANTILEVER and right.kind is EndKind.CANTILEVER
            fail(
                path,
                "cantilevers at both ends over a single support are unstable"
                if both
                else "a strip on one support must be a cantilever from a monolithic support",
                "add the back span (spans_mm), or set the other end to monolithic",
            )
            return None

    # Support widths and labels.
    widths = [float(w) for w in s.support_widths_mm]
    wpath = (*path, "support_widths_mm")
    if len(widths) == 1:
        widths = widths * n_sup
    elif len(widths) != n_sup:
        fail(
            wpath,
            f"{len(widths)} widths for {n_sup} supports",
            "give one width for all supports, or exactly one per support",
        )
        return None
    labels = list(s.support_labels) if s.support_labels is not None else _labels(n_sup)
    if len(labels) != n_sup or len(set(labels)) != n_sup:
        fail(
            (*path, "support_labels"),
            f"needs {n_sup} different labels (got {len(labels)}"
            + (", with repeats)" if len(set(labels)) != len(labels) else ")"),
            "give one unique label per support, left to right",
        )
        return None
    one_width = len(s.support_widths_mm) == 1

    def wplace(k: int) -> tuple:
        return wpath if one_width else (*wpath, k)

    for k, span in enumerate(spans):
        a, b = labels[k], labels[k + 1]
        wa, wb = widths[k], widths[k + 1]
        if wa / 2 + wb / 2 >= span:
            fail(
                wplace(k + 1),
                f"supports {a} and {b} overlap: half-widths {wa / 2:g} + {wb / 2:g} mm "
                f">= span {span:g} mm",
                "check the support widths and the span, both in mm",
            )
        elif max(wa, wb) >= span:
            j = k if wa >= wb else k + 1
            fail(
                wplace(j),
                f"support {labels[j]} ({widths[j]:g} mm wide) is as wide as span {a}-{b} "
                f"({span:g} mm)",
                "check the support width and the span, both in mm",
            )
    for end, k, side in ((left, 0, "left_end"), (right, n_sup - 1, "right_end")):
        if end.kind is EndKind.CANTILEVER and widths[k] / 2 >= end.cantilever_mm:
            fail(
                (*path, side, "cantilever_mm"),
                f"the cantilever ({end.cantilever_mm:g} mm) ends inside support {labels[k]} "
                f"({widths[k]:g} mm wide)",
                "measure the overhang from the support centreline to the free edge",
            )

    # Cover against thickness.
    h = float(s.thickness_mm)
    c_top, c_bot = float(s.cover.top_mm), float(s.cover.bottom_mm)
    for ckey, c in (("top_mm", c_top), ("bottom_mm", c_bot), ("side_mm", float(s.cover.side_mm))):
        if c >= h:
            fail(
                (*path, "cover", ckey),
                f"cover {c:g} mm is not less than the slab thickness {h:g} mm",
                "give the nominal cover in mm, e.g. 25",
            )
        elif c < _MIN_COVER_MM:
            fail(
                (*path, "cover", ckey),
                f"cover {c:g} mm is below the {_MIN_COVER_MM:g} mm minimum of EN 1992-1-1 "
                "4.4.1.2(2)",
                "give the nominal cover in mm, e.g. 25 (not in cm)",
            )
    d_min = min(reinforcement.diameters_mm)
    if max(c_top, c_bot) < h and c_top + c_bot + 2 * d_min >= h:
        fail(
            (*path, "cover"),
            f"no room for bars: covers {c_top:g} + {c_bot:g} mm plus two {d_min} mm bars "
            f">= thickness {h:g} mm",
            "reduce the covers or increase thickness_mm",
        )

    # Loads, one SegmentLoads per segment left to right.
    n_seg = n_sup - 1 + (left.kind is EndKind.CANTILEVER) + (right.kind is EndKind.CANTILEVER)
    seg_len = _segment_lengths(xs, left, right)
    names = _segment_names(labels, left, right)
    loads = _loads(s.loads, (*path, "loads"), left, n_sup - 1, seg_len, names, fail)

    if chk.count > n_errors or loads is None:
        return None
    supports = tuple(Support(label=labels[k], x_mm=xs[k], width_mm=widths[k]) for k in range(n_sup))
    assert len(loads) == n_seg
    return Strip(
        id=s.id,
        description=s.description,
        thickness_mm=h,
        cover_top_mm=c_top,
        cover_bottom_mm=c_bot,
        cover_side_mm=float(s.cover.side_mm),
        panel_width_mm=float(s.panel_width_mm),
        supports=supports,
        left_end=left,
        right_end=right,
        segment_loads=tuple(loads),
        load_category=s.loads.category,
        psi=psi_factors(s.loads.category, "UK"),
        concrete_density_kn_per_m3=materials.density_kn_per_m3,
        members=int(s.members),
        fixed_bars=tuple(
            FixedBars(f.zone, int(f.diameter_mm), int(f.spacing_mm)) for f in s.fixed_bars
        ),
    )


def _segment_lengths(xs: list[float], left: StripEnd, right: StripEnd) -> list[float]:
    lengths = []
    if left.kind is EndKind.CANTILEVER:
        lengths.append(left.cantilever_mm)
    lengths += [b - a for a, b in itertools.pairwise(xs)]
    if right.kind is EndKind.CANTILEVER:
        lengths.append(right.cantilever_mm)
    return lengths


def _segment_names(labels: list[str], left: StripEnd, right: StripEnd) -> list[str]:
    names = [f"span {k + 1} ({a}-{b})" for k, (a, b) in enumerate(itertools.pairwise(labels))]
    if left.kind is EndKind.CANTILEVER:
        names.insert(0, "the left cantilever")
    if right.kind is EndKind.CANTILEVER:
        names.append("the right cantilever")
    return names


def _loads(
    spec: LoadsIn,
    path: tuple,
    left: StripEnd,
    n_spans: int,
    seg_len: list[float],
    names: list[str],
    fail: Callable[..., None],
) -> list[SegmentLoads] | None:
    n_seg = len(seg_len)
    offset = 1 if left.kind is EndKind.CANTILEVER else 0
    has_right = n_seg - offset > n_spans
    ok = True

    def segment_of(item: WhereIn, ipath: tuple) -> int | None:
        nonlocal ok
        span = item.span
        side = item.cantilever
        if (span is None) == (side is None):
            fail(
                ipath,
                "say where the load is: span or cantilever" + (", not both" if span else ""),
                "give span: N (1 = leftmost span) or cantilever: left|right",
            )
        elif span is not None and span > n_spans:
            fail(
                (*ipath, "span"),
                f"there is no span {span}: this strip has {n_spans} span(s)",
                "number spans 1 to N from the left, cantilevers excluded",
            )
        elif side == "left" and not offset or side == "right" and not has_right:
            fail(
                (*ipath, "cantilever"),
                f"this strip has no {side} cantilever",
                f"make {side}_end a cantilever, or put the load on a span",
            )
        else:
            return offset + span - 1 if span is not None else (0 if side == "left" else n_seg - 1)
        ok = False
        return None

    def check_size(ipath: tuple, value: float, limit: float, unit: str) -> None:
        nonlocal ok
        if value > limit:
            ok = False
            fail(
                ipath,
                f"{value:g} {unit} is implausibly large (more than {limit:g} {unit})",
                f"give the load in {unit}: 1 kN/m2 is about 100 kg/m2",
            )

    for key in ("g_k_kn_per_m2", "q_k_kn_per_m2"):
        check_size((*path, key), getattr(spec, key), _MAX_AREA_LOAD, "kN/m2")
    g = [float(spec.g_k_kn_per_m2)] * n_seg
    q = [float(spec.q_k_kn_per_m2)] * n_seg
    partial: list[list[PartialLoad]] = [[] for _ in range(n_seg)]
    line: list[list[LineLoad]] = [[] for _ in range(n_seg)]

    overridden: dict[int, int] = {}
    for k, o in enumerate(spec.overrides):
        ipath = (*path, "overrides", k)
        seg = segment_of(o, ipath)
        if seg is None:
            continue
        if seg in overridden:
            ok = False
            fail(
                ipath,
                f"{names[seg]} is already overridden by overrides[{overridden[seg]}]",
                "merge the two entries into one",
            )
            continue
        overridden[seg] = k
        if o.g_k_kn_per_m2 is None and o.q_k_kn_per_m2 is None:
            ok = False
            fail(ipath, "the override changes no load", "give g_k_kn_per_m2 and/or q_k_kn_per_m2")
        if o.g_k_kn_per_m2 is not None:
            check_size((*ipath, "g_k_kn_per_m2"), o.g_k_kn_per_m2, _MAX_AREA_LOAD, "kN/m2")
            g[seg] = float(o.g_k_kn_per_m2)
        if o.q_k_kn_per_m2 is not None:
            check_size((*ipath, "q_k_kn_per_m2"), o.q_k_kn_per_m2, _MAX_AREA_LOAD, "kN/m2")
            q[seg] = float(o.q_k_kn_per_m2)

    for k, p in enumerate(spec.partial):
        ipath = (*path, "partial", k)
        seg = segment_of(p, ipath)
        if seg is None:
            continue
        length = seg_len[seg]
        if p.to_mm <= p.from_mm:
            ok = False
            fail(
                (*ipath, "to_mm"),
                f"must be greater than from_mm (got {p.to_mm:g} <= {p.from_mm:g})",
                "give from_mm < to_mm, from the left end of the segment",
            )
        elif p.to_mm > length + 1e-6:
            ok = False
            fail(
                (*ipath, "to_mm"),
                f"{p.to_mm:g} mm is beyond the end of {names[seg]} ({length:g} mm long)",
                "measure from the left end of the segment",
            )
        if p.g_k_kn_per_m2 == 0 and p.q_k_kn_per_m2 == 0:
            ok = False
            fail(
                ipath, "the partial load carries no load", "give g_k_kn_per_m2 and/or q_k_kn_per_m2"
            )
        for key in ("g_k_kn_per_m2", "q_k_kn_per_m2"):
            check_size((*ipath, key), getattr(p, key), _MAX_AREA_LOAD, "kN/m2")
        partial[seg].append(
            PartialLoad(
                float(p.from_mm),
                float(p.to_mm),
                float(p.g_k_kn_per_m2),
                float(p.q_k_kn_per_m2),
                p.description,
            )
        )

    for k, ln in enumerate(spec.line):
        ipath = (*path, "line", k)
        seg = segment_of(ln, ipath)
        if seg is None:
            continue
        length = seg_len[seg]
        if ln.x_mm > length + 1e-6:
            ok = False
            fail(
                (*ipath, "x_mm"),
                f"{ln.x_mm:g} mm is beyond the end of {names[seg]} ({length:g} mm long)",
                "measure from the left end of the segment",
            )
        if ln.g_k_kn_per_m == 0 and ln.q_k_kn_per_m == 0:
            ok = False
            fail(ipath, "the line load carries no load", "give g_k_kn_per_m and/or q_k_kn_per_m")
        for key in ("g_k_kn_per_m", "q_k_kn_per_m"):
            check_size((*ipath, key), getattr(ln, key), _MAX_LINE_LOAD, "kN/m")
        line[seg].append(
            LineLoad(float(ln.x_mm), float(ln.g_k_kn_per_m), float(ln.q_k_kn_per_m), ln.description)
        )

    if not ok:
        return None
    return [SegmentLoads(g[i], q[i], tuple(partial[i]), tuple(line[i])) for i in range(n_seg)]
