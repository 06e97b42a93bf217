"""Timing of a whole floor: a synthetic plate of 500 strips of 3-6 spans (a script, not a test).

Run:  python tests/benchmarks/bench_floor.py [--strips 500] [--jobs N] [--skip-e2e]

1. End to end: ``slabwright build`` as a user runs it (a new process, default options: worker
   processes, no PNG previews above 8 strips), wall time and peak memory of the process and
   its workers together (proportional set sizes summed, sampled every 20 ms; Linux /proc).
   Targets on 2 cores: 45 s and 1 GB.
2. Time per stage, in this process and without workers (what each stage costs): read,
   analysis, design and detailing, marks + schedule + record, drawing (sheet layout, ezdxf
   entities, DXF text), self-audit of drawing against schedule, report; previews per sheet.
3. Side by side, on the same strips:
   - the analysis against anastruct (test-only oracle): the same beam models (one element
     per segment, the same supports) under the same unit load cases (permanent on every
     segment, then variable on each segment alone), solved by anastruct case by case, by
     ``analysis.stiffness.solve`` strip by strip and by ``analysis.floor.solve_floor`` (every
     strip in one solve, as a build does). Target: at least 300 times faster.
   - the DXF writing against raw ezdxf: the same entities (every entity of our drawing, in
     model space, blocks and sheets) made again by plain ezdxf calls with no layout work and
     written, against slabwright's drawing stage (sheet layout + entities + text), best of
     three each, alternately. Target: within 1.5 times.
"""

from __future__ import annotations

import argparse
import gc
import io
import os
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import itertools
import math

from tests.floor_factory import floor_yaml


def _tree_rss_mb(pid: int) -> float:
    """Memory of a process and all its descendants, MB (Linux /proc): the proportional set
    size (Pss: pages shared between a process and its forked workers counted once, shared
    out), else the resident set size (which would count those pages once per process)."""
    total, todo, seen = 0, [pid], set()
    while todo:
        p = todo.pop()
        if p in seen:
            continue
        seen.add(p)
        try:
            try:
                with open(f"/proc/{p}/smaps_rollup") as f:
                    total += next(int(ln.split()[1]) for ln in f if ln.startswith("Pss:"))
            except (OSError, StopIteration):
                # A worker that has exited but not been reaped yet has no memory lines.
                with open(f"/proc/{p}/status") as f:
                    total += next((int(ln.split()[1]) for ln in f if ln.startswith("VmRSS:")), 0)
            for task in os.listdir(f"/proc/{p}/task"):
                with open(f"/proc/{p}/task/{task}/children") as f:
                    todo += [int(c) for c in f.read().split()]
        except (FileNotFoundError, ProcessLookupError, PermissionError):
            continue
    return total / 1024.0


def end_to_end(project: Path, out: Path, jobs: int | None) -> tuple[float, float, int]:
    cmd = [sys.executable, "-m", "detailer", "build", str(project), "--out", str(out)]
    cmd += ["--no-progress"] + (["--jobs", str(jobs)] if jobs else [])
    peak = [0.0]
    t0 = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, cwd=ROOT)

    def sample() -> None:
        while proc.poll() is None:
            peak[0] = max(peak[0], _tree_rss_mb(proc.pid))
            time.sleep(0.02)

    sampler = threading.Thread(target=sample, daemon=True)
    sampler.start()
    _, err = proc.communicate()
    wall = time.perf_counter() - t0
    sampler.join()
    if proc.returncode not in (0, 1):
        sys.exit(f"build failed ({proc.returncode}): {err.decode()[:500]}")
    return wall, peak[0], proc.returncode


class Stages:
    def __init__(self) -> None:
        self.rows: list[tuple[str, float]] = []

    def time(self, name: str, fn):
        t0 = time.perf_counter()
        value = fn()
        self.rows.append((name, time.perf_counter() - t0))
        return value


def stages(project_path: Path) -> None:
    from detailer.audit import audit_layout, parse_schedule_csv
    from detailer.build import _marked
    from detailer.io.csv_writer import render_schedule_csv
    from detailer.io.dxf_readback import readback
    from detailer.io.dxf_writer import build_layout, document_bytes, sheet_plans
    from detailer.io.json_writer import render_record_json
    from detailer.pipeline import default_code, detail_strip
    from detailer.project import load_project
    from detailer.record import build_record
    from detailer.report import render_report
    from detailer.schedule import schedule_for_project
    from detailer.strip_analysis import analyse_strips

    st = Stages()
    project = st.time("read (YAML -> model)", lambda: load_project(project_path))
    code = default_code(project)
    analyses = st.time(
        "analysis (envelopes, one floor solve)",
        lambda: analyse_strips(project, project.strips),
    )
    details = st.time(
        "design + detailing",
        lambda: tuple(
            detail_strip(project, s, code, a) for s, a in zip(project.strips, analyses, strict=True)
        ),
    )

    def schedule_stage():
        d = _marked(project, details)
        sch = schedule_for_project(d, members={s.id: s.members for s in project.strips})
        rec = build_record(d, schedule=sch)
        return d, sch, rec, render_schedule_csv(sch, d.project), render_record_json(rec)

    detail, schedule, record, csv_bytes, _ = st.time("marks, schedule, record", schedule_stage)
    plans = st.time("drawing: sheet layout", lambda: sheet_plans(detail, record.revisions))
    doc = st.time("drawing: ezdxf entities", lambda: build_layout(detail, plans=plans))
    dxf = st.time("drawing: DXF text", lambda: document_bytes(doc))
    st.time(
        "self-audit drawing vs schedule",
        lambda: audit_layout(readback(doc), parse_schedule_csv(csv_bytes.decode())),
    )
    st.time(
        "report (HTML with plots)",
        lambda: render_report(
            detail, record, schedule, input_name="floor.yaml", input_sha256="0" * 64
        ),
    )
    rows = st.rows
    total = sum(t for _, t in rows)
    print(f"\nStages, in one process without workers ({len(project.strips)} strips)")
    print(f"{'stage':<34} {'s':>8} {'ms/strip':>9}")
    for name, t in rows:
        print(f"{name:<34} {t:>8.2f} {t / len(project.strips) * 1e3:>9.1f}")
    print(f"{'total':<34} {total:>8.2f}")
    print(f"DXF size {len(dxf) / 1e6:.1f} MB, {len(doc.entitydb)} DXF objects")
    _previews(dxf, detail)
    # Side by side, alternately, best of three each (the same machine load for both).
    ours_t, raw_t = [], []
    for _ in range(3):
        t0 = time.perf_counter()
        document_bytes(build_layout(detail, plans=sheet_plans(detail, record.revisions)))
        ours_t.append(time.perf_counter() - t0)
        raw_t.append(_raw_floor(doc))
    drawing, raw = min(ours_t), min(raw_t)
    print(
        f"\nDXF writing (best of 3, one process): slabwright {drawing:.2f} s (sheet layout, "
        f"entities, text); raw ezdxf, same entities {raw:.2f} s; ratio {drawing / raw:.2f} "
        "(target <= 1.5)"
    )
    _against_anastruct(project)


def _previews(dxf: bytes, detail, n: int = 3) -> None:
    import ezdxf

    from detailer.io.dxf_preview import render_png
    from detailer.io.dxf_writer import layout_name

    doc = ezdxf.read(io.StringIO(dxf.decode()))
    render_png(doc, layout_name(detail.strips[0].strip.id))  # fonts and imports, once
    t0 = time.perf_counter()
    for sd in detail.strips[:n]:
        render_png(doc, layout_name(sd.strip.id))
    per = (time.perf_counter() - t0) / n
    print(f"PNG preview: {per:.2f} s per sheet (not rendered by default above 8 strips)")


def _raw_floor(our_doc) -> float:
    """Write the same entities with plain ezdxf calls and no layout work: the floor.

    Every entity of our document (model space, every block, every sheet) is made again in a
    new document from its DXF attributes with ezdxf's ordinary factory calls (with its XDATA),
    the tables set up likewise, and the document written as text."""
    import ezdxf

    from detailer.io import dxf_style as st

    t0 = time.perf_counter()
    doc = ezdxf.new("R2013", setup=False)
    doc.appids.add(st.APPID)
    for lt in st.LINETYPES:
        doc.linetypes.add(lt.name, pattern=[lt.total_mm, *lt.pattern_mm])
    for layer in st.LAYERS:
        doc.layers.add(layer.name, color=layer.colour, linetype=layer.linetype)
    doc.styles.add(st.TEXT_STYLE, font=st.TEXT_FONT)
    for style in our_doc.dimstyles:
        if style.dxf.name not in doc.dimstyles:
            doc.dimstyles.add(style.dxf.name, dxfattribs=style.dxfattribs(drop={"handle", "owner"}))

    def replay(src, dst) -> None:
        for e in src:
            kind = e.dxftype()
            a = e.dxfattribs(drop={"handle", "owner"})
            if kind == "LWPOLYLINE":
                a.pop("count", None)
                a.pop("flags", None)
                new = dst.add_lwpolyline(e.get_points("xyseb"), close=e.closed, dxfattribs=a)
            elif kind == "MTEXT":
                new = dst.add_mtext(e.text, dxfattribs=a)
            elif kind == "HATCH":
                new = dst.add_hatch(dxfattribs={"layer": a["layer"]})
                for path in e.paths:
                    new.paths.add_polyline_path(
                        [(v[0], v[1]) for v in path.vertices], is_closed=True
                    )
                new.set_pattern_fill(e.dxf.pattern_name, scale=e.dxf.pattern_scale)
            elif kind == "VIEWPORT":
                if a.get("id") == 1:
                    continue
                new = dst.add_viewport(a["center"], (a["width"], a["height"]), a["view_center_point"], a["view_height"])  # fmt: skip
            elif kind == "INSERT":
                new = dst.add_blockref(a.pop("name"), a.pop("insert"), dxfattribs=a)
            else:  # LINE, TEXT, CIRCLE, POINT, DIMENSION: attributes are the whole entity
                new = dst.new_entity(kind, a)
            if e.has_xdata(st.APPID):
                new.set_xdata(st.APPID, list(e.get_xdata(st.APPID)))

    for block in our_doc.blocks:  # dimension pictures and other blocks, same names
        if block.name.lower().startswith(("*model_space", "*paper_space")):
            continue
        if block.name.startswith("*"):
            dst = doc.blocks.new_anonymous_block(type_char=block.name[1])
        else:
            dst = doc.blocks.new(block.name)
        replay(block, dst)
    replay(our_doc.modelspace(), doc.modelspace())
    for name in our_doc.layout_names():
        if name == "Model":
            continue
        src = our_doc.layouts.get(name)
        psp = doc.layouts.new(name)
        replay(src, psp)
    stream = io.StringIO()
    doc.write(stream)
    stream.getvalue().encode("utf-8")
    return time.perf_counter() - t0


def _against_anastruct(project, n_strips: int = 40) -> None:
    """Analysis of the floor's strips: ``solve`` strip by strip and ``solve_floor`` (all
    strips at once) on every strip, anastruct on an evenly spaced sample; times per strip."""
    from analysis.beam import PointLoad, Restraint
    from analysis.floor import solve_floor, solve_nodes_floor
    from analysis.stiffness import solve
    from detailer.strip_analysis import strip_loads, strip_model_variants

    try:
        from anastruct import SystemElements  # test-only oracle, imported only here
    except ImportError:
        print("\nanastruct not installed (pip install anastruct): no side-by-side run")
        return
    # The envelope's unit cases: permanent on every segment, then the variable load of
    # each segment alone (uniform loads, and line loads across the strip as point loads).
    models, cases = [], []
    for strip in project.strips:
        model = strip_model_variants(strip, project.materials.f_ck)[0][1]
        permanent, variable = strip_loads(strip)
        loaded = sorted({ld.segment for ld in variable})
        models.append(model)
        cases.append([list(permanent)] + [[v for v in variable if v.segment == j] for j in loaded])
    step = max(1, len(models) // n_strips)
    sample = list(range(0, len(models), step))[:n_strips]

    def anastruct_case(model, loads) -> None:
        # One element per segment, split only where a point load needs a node.
        x = model.node_x_mm
        cuts = [{0.0, x[j + 1] - x[j]} for j in range(len(x) - 1)]
        for ld in loads:
            if isinstance(ld, PointLoad):
                cuts[ld.segment].add(float(ld.a_mm))
            elif ld.start_mm is not None or ld.end_mm is not None:
                cuts[ld.segment] |= {
                    ld.start_mm or 0.0,
                    ld.end_mm or x[ld.segment + 1] - x[ld.segment],
                }
        ss = SystemElements(EI=model.ei_knm2, EA=1.0e9)
        elements, node_of = [], {}  # (segment, a, b) in mm; (segment, a) -> anastruct node
        for j, c in enumerate(cuts):
            pts = sorted(c)
            for a, b in itertools.pairwise(pts):
                ss.add_element([[(x[j] + a) / 1000.0, 0.0], [(x[j] + b) / 1000.0, 0.0]])
                elements.append((j, a, b))
                node_of.setdefault((j, a), len(elements))
                node_of[(j, b)] = len(elements) + 1
        first = True
        for i, r in enumerate(model.restraints):
            node = node_of[(i, 0.0)] if i < len(cuts) else len(elements) + 1
            if r is Restraint.FIXED:
                ss.add_support_fixed(node)
            elif r is Restraint.PINNED:
                ss.add_support_hinged(node) if first else ss.add_support_roll(node)
            first = first and r is Restraint.FREE
        q_on: dict[int, float] = {}  # anastruct keeps one q_load per element: sum them
        for ld in loads:
            if isinstance(ld, PointLoad):
                ss.point_load(node_of[(ld.segment, float(ld.a_mm))], Fy=-ld.p_kn)
                continue
            j, length = ld.segment, x[ld.segment + 1] - x[ld.segment]
            c, d = ld.start_mm or 0.0, length if ld.end_mm is None else ld.end_mm
            for e, (seg, a, b) in enumerate(elements, start=1):
                if seg == j and c <= a and b <= d:
                    q_on[e] = q_on.get(e, 0.0) + ld.w_kn_per_m
        for e, q in sorted(q_on.items()):
            ss.q_load(q=-q, element_id=e, direction="y")
        ss.solve()

    def timed(fn) -> float:
        # The result is kept until the clock has stopped (as a caller keeps it): freeing
        # a floor's arrays is no part of its solve.
        t0 = time.perf_counter()
        result = fn()
        t = time.perf_counter() - t0
        del result
        return t

    def anastruct_strip(k: int) -> float:
        t = 0.0
        for case in cases[k]:
            t0 = time.perf_counter()
            anastruct_case(models[k], case)
            t += time.perf_counter() - t0
        return t

    # Rounds alternate between anastruct and ours so that both see the same machine; each
    # keeps its best (other load on the machine only ever adds time). Garbage collection
    # is off within a round, as timeit times, for both. anastruct's cost is per case (a
    # new model for each): its best time on the sample, per case, times the floor's cases
    # per strip (the sample's strips have a few more or fewer on average).
    n = len(models)
    rounds = 5
    t_ana_strip = [math.inf] * len(sample)
    t_single = t_floor = t_nodes = math.inf
    for r in range(rounds):
        gc.collect()
        gc.disable()
        try:
            for i, k in enumerate(sample):
                t_ana_strip[i] = min(t_ana_strip[i], anastruct_strip(k))
            if r < 2:
                t_single = min(t_single, timed(lambda: [solve(*mc) for mc in zip(models, cases)]))
            # Each solver several times in a row, as timeit repeats a statement.
            for _ in range(3):
                t_floor = min(t_floor, timed(lambda: solve_floor(models, cases)))
            for _ in range(3):
                t_nodes = min(t_nodes, timed(lambda: solve_nodes_floor(models, cases)))
        finally:
            gc.enable()
    t_single, t_floor, t_nodes = t_single / n, t_floor / n, t_nodes / n
    n_cases = sum(len(c) for c in cases)
    n_points = sum(isinstance(ld, PointLoad) for c in cases for case in c for ld in case)
    sample_cases = sum(len(cases[k]) for k in sample)
    t_ana_case = sum(t_ana_strip) / sample_cases
    t_ana = t_ana_case * n_cases / n
    print(
        f"\nAnalysis of {n} strips, {n_cases} unit load cases ({n_points} point loads), times "
        f"per strip, best of {rounds} rounds taken alternately.\nanastruct timed case by "
        f"case on {len(sample)} strips (every {step}th, {sample_cases / len(sample):.2f} "
        f"cases per strip): {t_ana_case * 1e3:.2f} ms per case, times the floor's "
        f"{n_cases / n:.2f} cases per strip; ours on all {n} strips, divided by {n}."
    )
    print(f"  anastruct, case by case:        {t_ana * 1e3:8.2f} ms per strip")
    print(
        f"  slabwright solve, per strip:    {t_single * 1e3:8.3f} ms per strip; "
        f"{t_ana / t_single:6.0f} times faster"
    )
    print(
        f"  slabwright solve_floor, floor:  {t_floor * 1e3:8.3f} ms per strip; "
        f"{t_ana / t_floor:6.0f} times faster (target >= 300), every station of every case"
    )
    print(
        f"  slabwright solve_nodes_floor:   {t_nodes * 1e3:8.3f} ms per strip; "
        f"{t_ana / t_nodes:6.0f} times faster, node results of every case (as anastruct's "
        "solve gives), stations evaluated on demand"
    )


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--strips", type=int, default=500)
    ap.add_argument("--jobs", type=int, default=None)
    ap.add_argument("--skip-e2e", action="store_true")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "floor.yaml"
        path.write_text(floor_yaml(args.strips), encoding="utf-8")
        print(f"Synthetic floor: {args.strips} strips of 3-6 spans; {os.cpu_count()} CPUs")
        if not args.skip_e2e:
            wall, peak, code = end_to_end(path, Path(tmp) / "out", args.jobs)
            print(
                f"End to end (slabwright build, new process): {wall:.1f} s (target 45 s), "
                f"peak memory {peak:.0f} MB (target 1024 MB), exit {code}"
            )
        stages(path)


if __name__ == "__main__":
    main()
