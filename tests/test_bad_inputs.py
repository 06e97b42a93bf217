"""A catalogue of bad inputs, run through the command line as a user would meet them.

Every case is one row of ``CASES``: what the input is, the exit code, how many stderr lines
(one per mistake) and words the message must hold (the file, the place: line and key path,
or DXF layer and entity handle; the reason; the fix). Each run asserts: the exit code; exactly
that many stderr lines, each naming the file and carrying a fix after "; "; no traceback;
nothing on stdout when the run fails; and for a build into a folder holding an earlier good
build, every earlier file byte-identical afterwards and no file added (temporaries included).

Sources of what counts as a mistake: the file contract of sample_projects/README.md (units,
limits, YAML traps); the YAML 1.1 type library (yaml.org/type/float.html: a float needs a
'.', so 1e400 is text); EN 1992-1-1:2004, 4.4.1.2(2), Eq. (4.2): c_min >= 10 mm, so a smaller
nominal cover is a units slip; file signatures (ZIP "PK\\x03\\x04", PKWARE APPNOTE 4.3.7);
Windows reserved device names (CON, NUL, COM1, ...: Microsoft "Naming Files, Paths, and
Namespaces", from memory); the DXF structure (a file ends with 0/EOF; $INSUNITS 4 = mm,
6 = m: DXF reference, HEADER). The drawing rules (closed polylines, id texts) are the
documented rules of detailer.io.dxf_reader (common practice for GA drawings).
"""

from __future__ import annotations

import errno
import json
import os
import random
import shutil
import zipfile
from collections.abc import Callable
from dataclasses import dataclass
from io import BytesIO
from pathlib import Path

import pytest

import detailer.project
from detailer.cli import main
from tests.test_dxf_reader_errors import GA, STRIPS, h, rect

BASE = """\
project:
  id: bi
  title: "Bad inputs floor"
  revision: P1
  date: 2025-03-14
  drawing: BI-01
materials:
  concrete: C30/37
strips:
  - id: S1
    description: "Bay 1"
    thickness_mm: 200
    cover: {top_mm: 25, bottom_mm: 25, side_mm: 25}
    panel_width_mm: 5000
    spans_mm: [4000, 4500]
    support_widths_mm: 300
    left_end: pinned
    right_end: pinned
    loads: {category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5}
"""
# The same floor at its next revision with more imposed load: a build that must write files.
REVISED = BASE.replace("revision: P1", "revision: P2").replace("q_k_kn_per_m2: 1.5", "q_k_kn_per_m2: 2.5")  # fmt: skip

STRIP = """\
  - id: {sid}
    thickness_mm: 200
    cover: {{top_mm: 25, bottom_mm: 25, side_mm: 25}}
    panel_width_mm: 5000
    spans_mm: [4000]
    support_widths_mm: 300
    left_end: pinned
    right_end: pinned
    loads: {{category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5}}
"""

# The GA of tests/test_dxf_reader_errors.py: a 10 m x 6 m slab on three walls, strip S1.
GA_YAML = """\
project: {{id: bi, title: "Bad inputs floor", revision: P1, date: 2025-03-14, drawing: BI-01}}
materials: {{concrete: C30/37}}
geometry: {geometry}
strips:
  - id: {sid}
    thickness_mm: 200
    cover: {{top_mm: 25, bottom_mm: 25, side_mm: 25}}
    panel_width_mm: 5000
    loads: {{category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5}}
"""

# A YAML "billion laughs": 9 levels of 9 aliases expand to 9**9 (387 million) values.
BOMB = "a0: &a0 [x, x, x, x, x, x, x, x, x]\n" + "".join(
    f"a{k}: &a{k} [{', '.join([f'*a{k - 1}'] * 9)}]\n" for k in range(1, 9)
)


class Ctx:
    """What a case's ``make`` gets: a scratch folder, the earlier build, monkeypatch."""

    def __init__(self, tmp: Path, out: Path, mp: pytest.MonkeyPatch) -> None:
        self.tmp, self.out, self.mp = tmp, out, mp
        self.named = ""  # the file every stderr line must name (set by make)
        self.expect: list[str] = []  # words known only once the input is made (handles)
        self.after: Callable[[], None] | None = None  # extra checks after the run
        self.stdout: list[str] = []  # words a successful run prints (default: wrote / OK)
        self.restore: list[Callable[[], None]] = []

    def write(self, text: str | bytes, name: str = "bad.yaml") -> Path:
        path = self.tmp / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(text if isinstance(text, bytes) else text.encode("utf-8"))
        self.named = self.named or path.name
        return path

    def build(self, path: Path, out: Path | None = None) -> list[str]:
        return ["build", str(path), "--out", str(out or self.out)]


Make = Callable[[Ctx], list[str]]


@dataclass(frozen=True)
class Case:
    id: str
    what: str  # the input, in a few words
    make: Make
    code: int  # exit code: 0 ok, 1 design failure, 2 input error
    lines: int  # stderr lines: one per mistake
    words: tuple[str, ...] = ()  # in stderr: place, reason and fix
    non_root: bool = False  # needs permissions that root ignores


def sub(*pairs: str) -> Make:
    """BASE with each (old, new) pair replaced once; built into the earlier outputs."""

    def make(ctx: Ctx) -> list[str]:
        t = BASE
        for old, new in zip(pairs[::2], pairs[1::2], strict=True):
            assert old in t, old
            t = t.replace(old, new, 1)
        return ctx.build(ctx.write(t))

    return make


def raw(data: bytes | Callable[[], bytes]) -> Make:
    def make(ctx: Ctx) -> list[str]:
        return ctx.build(ctx.write(data() if callable(data) else data))

    return make


def garbage() -> bytes:
    rng = random.Random(8666)
    return bytes(rng.randrange(128, 256) for _ in range(2000))  # never valid UTF-8 text


def zipped() -> bytes:
    buf = BytesIO()
    with zipfile.ZipFile(buf, "w", compression=zipfile.ZIP_STORED) as z:
        z.writestr("project.yaml", BASE)  # stored, not compressed: the YAML text is inside
    return buf.getvalue()


def many_strips(n: int) -> str:
    """``n`` one-line strips sharing their keys through ``defaults:`` (strips: on line 9)."""
    head = BASE.split("  - id: S1")[0].replace("strips:\n", "")
    shared = STRIP.format(sid="X").split("\n", 1)[1].replace("    spans_mm: [4000]\n", "")
    body = "".join(f"  - {{id: F{i:04d}, spans_mm: [4000]}}\n" for i in range(1, n + 1))
    return head + "strips:\n" + body + "defaults:\n" + shared.replace("    ", "  ")


def ga(
    edit: Callable[[GA], list[str] | None] | None = None,
    *,
    geometry: str = "{dxf: ga.dxf}",
    sid: str = "S1",
    text_edit: Callable[[str], str | bytes] | None = None,
    check: bool = False,
    named: str = "ga.dxf",
) -> Make:
    """The GA drawing changed by ``edit`` (which returns the handles the message must name),
    then as text by ``text_edit``; the project file ga-project.yaml uses it."""

    def make(ctx: Ctx) -> list[str]:
        drawing = GA()
        words = edit(drawing) if edit is not None else None
        ctx.expect += words or []
        dxf = drawing.save(ctx.tmp / "ga.dxf")
        if text_edit is not None:
            new = text_edit(dxf.read_text())
            dxf.write_bytes(new if isinstance(new, bytes) else new.encode())
        (ctx.tmp / "gadir").mkdir()
        ctx.named = named
        path = ctx.write(GA_YAML.format(geometry=geometry, sid=sid), "ga-project.yaml")
        return ["check", str(path)] if check else ctx.build(path)

    return make


# -- edits of the GA (each returns the handles the message must name) -------------------------
def no_outline(g: GA) -> list[str]:
    g.slab.destroy()
    g.msp.add_text("SLAB", dxfattribs={"layer": "SW-GA-SLAB", "insert": (0, 0)})
    return []


def zero_length_strip(g: GA) -> list[str]:
    g.strip.dxf.end = g.strip.dxf.start
    return [h(g.strip)]


def flat_support(g: GA) -> list[str]:
    g.walls[1].set_points([(4850, -100), (5000, -100), (5150, -100)])  # three points on a line
    return [h(g.walls[1])]


def bow_tie(g: GA) -> list[str]:
    g.slab.set_points([(-150, 0), (10150, 6000), (10150, 0), (-150, 6000)])
    return [h(g.slab), "(5000, 3000)"]  # the diagonals cross at the middle


def far_away(g: GA) -> list[str]:
    for e in g.msp:
        e.translate(1e12, 1e12, 0)
    return [h(g.slab)]


def strip_off_supports(g: GA) -> list[str]:
    g.slab.set_points(rect(-150, 0, 10150, 9000))  # the walls stop at y = 6100
    g.strip.dxf.start, g.strip.dxf.end = (500, 7000), (9500, 7000)
    g.label.dxf.insert = (4000, 7300)
    return [h(g.strip)]


def header_in_metres(g: GA) -> list[str]:
    g.doc.header["$INSUNITS"] = 6  # drawn in mm, the header says m
    return [h(g.slab)]


def label(text: str | None) -> Callable[[GA], list[str]]:
    """The strip's id text changed (None: deleted); the message names the text or the strip."""

    def edit(g: GA) -> list[str]:
        if text is None:
            g.label.destroy()
            return [h(g.strip)]
        g.label.dxf.text = text
        return [h(g.label)]

    return edit


def twin_ids(g: GA) -> list[str]:
    other = g.line((500, 1000), (9500, 1000), STRIPS)
    g.text("S1", (4000, 1300))
    return [h(g.strip), h(other)]


def unicode_layers(g: GA) -> list[str]:
    for name in ("Dalle-é", "Träger 梁", "Streifen-ü"):
        g.doc.layers.add(name)
    g.slab.dxf.layer = "Dalle-é"
    for w in g.walls:
        w.dxf.layer = "Träger 梁"
    g.strip.dxf.layer = g.label.dxf.layer = "Streifen-ü"
    return []


def nan_x(text: str) -> str:
    assert "\n10150.0\n" in text  # the slab outline's right edge
    return text.replace("\n10150.0\n", "\nnan\n", 1)


def truncate(text: str) -> str:
    lines = text.split("\n")
    return "\n".join(lines[: len(lines) * 2 // 3]) + "\n"


# -- file-system cases -------------------------------------------------------------------------
def folder_as_project(ctx: Ctx) -> list[str]:
    (ctx.tmp / "level2.yaml").mkdir()
    ctx.named = "level2.yaml"
    return ctx.build(ctx.tmp / "level2.yaml")


def misspelt_path(ctx: Ctx) -> list[str]:
    ctx.write(BASE, "level2.yml")
    ctx.named = "level2.yaml"
    ctx.expect.append("did you mean")
    return ctx.build(ctx.tmp / "level2.yaml")


def chmod_000(ctx: Ctx) -> list[str]:
    path = ctx.write(BASE)
    path.chmod(0)
    ctx.restore.append(lambda: path.chmod(0o644))
    return ctx.build(path)


def open_denied(ctx: Ctx) -> list[str]:
    path = ctx.write(BASE)

    def denied(file, *args, **kwargs):
        raise PermissionError(errno.EACCES, os.strerror(errno.EACCES), str(file))

    ctx.mp.setattr(detailer.project, "open", denied, raising=False)
    return ctx.build(path)


def sparse(name: str, size: int, *, dxf: bool = False) -> Make:
    def make(ctx: Ctx) -> list[str]:
        with open(ctx.tmp / name, "wb") as fh:
            fh.truncate(size)  # a sparse file: no disk space used
        ctx.named = name
        if dxf:
            return ctx.build(ctx.write(GA_YAML.format(geometry=f"{{dxf: {name}}}", sid="S1")))
        return ctx.build(ctx.tmp / name)

    return make


def spaced_paths(ctx: Ctx) -> list[str]:
    path = ctx.write(BASE, "my projects/Büro level 2/floor plan.yaml")
    out = ctx.tmp / "issue folder" / "rev a"
    ctx.after = lambda: written(out)
    return ctx.build(path, out)


def unicode_names(ctx: Ctx) -> list[str]:
    title = "Café Müller Straße 中文 ✓"
    text = BASE.replace("Bad inputs floor", title).replace("Bay 1", "Büro 2, 会议室")
    out = ctx.tmp / "new"

    def after() -> None:
        written(out)
        record = json.loads((out / "bi-record.json").read_text("utf-8"))
        assert title in json.dumps(record, ensure_ascii=False)

    ctx.after = after
    return ctx.build(ctx.write(text), out)


def bom_crlf(ctx: Ctx) -> list[str]:
    ctx.stdout.append("no change since revision P1")  # the same project as the earlier build
    return ctx.build(ctx.write(("\ufeff" + BASE.replace("\n", "\r\n")).encode()))


def written(out: Path) -> None:
    names = sorted(p.name for p in out.iterdir())
    assert {"bi-record.json", "bi-schedule.csv", "bi-layout.dxf"} <= set(names), names
    assert all((out / n).stat().st_size > 0 for n in names)


def out_is_a_file(ctx: Ctx) -> list[str]:
    taken = ctx.tmp / "taken"
    taken.write_bytes(b"a file, not a folder\n")
    ctx.named = "taken"

    def after() -> None:
        assert taken.read_bytes() == b"a file, not a folder\n"

    ctx.after = after
    return ctx.build(ctx.write(REVISED), taken)


def read_only_out(ctx: Ctx) -> list[str]:
    path = ctx.write(REVISED)
    ctx.named = str(ctx.out)
    if os.geteuid() != 0:  # chmod is enforced: the real thing
        ctx.out.chmod(0o555)
        ctx.restore.append(lambda: ctx.out.chmod(0o755))
        return ctx.build(path)
    # As root, permissions are not enforced: every write under the folder is refused instead.
    folder = os.path.abspath(ctx.out)

    def inside(p) -> bool:
        return isinstance(p, (str, os.PathLike)) and os.path.abspath(p).startswith(folder)

    for name, n_paths in (("open", 1), ("mkdir", 1), ("link", 2), ("replace", 2), ("rename", 2)):
        real = getattr(os, name)

        def refuse(*args, _real=real, _n=n_paths, _name=name, **kwargs):
            writes = _name != "open" or args[1] & (os.O_WRONLY | os.O_RDWR | os.O_CREAT)
            if writes and any(inside(p) for p in args[:_n]):
                raise PermissionError(errno.EACCES, os.strerror(errno.EACCES), str(args[0]))
            return _real(*args, **kwargs)

        ctx.mp.setattr(os, name, refuse)
    return ctx.build(path)


def disk_full(ctx: Ctx) -> list[str]:
    from detailer.io import atomic

    real_fsync, calls = os.fsync, []

    def full(fd: int) -> None:
        calls.append(fd)
        if len(calls) == 3:  # the third file of the set: its data written, then no space
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        real_fsync(fd)

    ctx.mp.setattr(atomic.os, "fsync", full)
    ctx.named = str(ctx.out)
    return ctx.build(ctx.write(REVISED))


def damaged_record(ctx: Ctx) -> list[str]:
    (ctx.out / "bi-record.json").write_bytes(b'{"project_id": "bi", "rev')  # cut short
    ctx.named = "bi-record.json"
    return ctx.build(ctx.write(REVISED))


# fmt: off
CASES: list[Case] = [
    # -- not a YAML project at all --
    Case("garbage-bytes", "2000 random high bytes", raw(garbage), 2, 1, ("bad.yaml:1: (document)", "not UTF-8", "UTF-8 YAML")),
    Case("zip-named-yaml", "a ZIP archive named .yaml", raw(zipped), 2, 1, ("ZIP archive", "give the project YAML")),
    Case("utf16-text", "the project saved as UTF-16", raw(BASE.encode("utf-16")), 2, 1, ("UTF-16", "save it again as UTF-8")),
    Case("nul-byte", "a NUL byte on line 3", raw(BASE.replace("Bad inputs", "Bad\0inputs").encode()), 2, 1, ("bad.yaml:3:", "U+0000", "remove it")),
    Case("empty-file", "zero bytes", raw(b""), 2, 1, ("bad.yaml:1:", "empty", "start with project:")),
    Case("cut-mid-mapping", "file ends inside a flow mapping", raw(BASE[: BASE.index("bottom_mm")].encode()), 2, 1, ("bad.yaml:13:", "not valid YAML", "unclosed")),
    Case("cut-mid-string", "file ends inside a quoted title", raw(BASE[: BASE.index("inputs")].encode()), 2, 1, ("bad.yaml:3:", "end of stream", "unclosed quote")),
    Case("cut-mid-block", "file ends after 'loads:'", raw(BASE[: BASE.index("loads:") + 6].encode()), 2, 1, ("bad.yaml:19: strips[0].loads:", "got nothing", "category")),
    Case("yaml-bomb", "aliases nested 9 deep (9**9 values)", raw(BOMB.encode()), 2, 1, ("expands to more than", "write the values out")),
    Case("recursive-alias", "an alias inside its own anchor", raw(b"a: &a [*a, *a]\n"), 2, 1, ("bad.yaml:1:", "levels deep", "recursive anchor")),
    Case("deep-brackets", "5000 nested '['", raw(b"[" * 5000 + b"]" * 5000), 2, 1, ("nested too deeply", "right file")),
    Case("tab-indent", "a tab before a key", sub("    thickness_mm", "\tthickness_mm"), 2, 1, ("bad.yaml:12:", "spaces, not tabs")),
    Case("tag-without-value", "'!!int' with nothing after it", sub("thickness_mm: 200", "thickness_mm: !!int"), 2, 1, ("bad.yaml:12: strips[0].thickness_mm", "as !!int", "drop any !! tag")),
    Case("two-documents", "a second '---' document", raw((BASE + "---\n" + BASE).encode()), 2, 1, ("another document", "one YAML document")),
    Case("huge-file", "a 5 MiB (sparse) file", sparse("big.yaml", 5 * 2**20), 2, 1, ("5.0 MiB", "2000-strip floor")),
    # -- wrong units --
    Case("spans-in-metres", "spans typed as 4.0, 4.5", sub("[4000, 4500]", "[4.0, 4.5]"), 2, 2, ("bad.yaml:15: strips[0].spans_mm[0]", "spans_mm[1]", "4200 for 4.2 m")),
    Case("loads-in-n-per-m2", "g and q typed in N/m2", sub("g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5", "g_k_kn_per_m2: 1500, q_k_kn_per_m2: 1500"), 2, 2, ("loads.g_k_kn_per_m2", "loads.q_k_kn_per_m2", "implausibly large", "kg/m2")),
    Case("thickness-in-metres", "h = 0.2", sub("thickness_mm: 200", "thickness_mm: 0.2"), 2, 1, ("bad.yaml:12: strips[0].thickness_mm", ">= 50 (got 0.2)", "in mm")),
    Case("covers-in-cm", "covers 2.5", sub("top_mm: 25, bottom_mm: 25, side_mm: 25", "top_mm: 2.5, bottom_mm: 2.5, side_mm: 2.5"), 2, 3, ("cover.top_mm", "cover.side_mm", "10 mm minimum", "not in cm")),
    # -- NaN and infinity --
    Case("nan-thickness", ".nan for h", sub("thickness_mm: 200", "thickness_mm: .nan"), 2, 1, ("strips[0].thickness_mm", "finite", "slab thickness")),
    Case("inf-load", ".inf imposed load", sub("q_k_kn_per_m2: 1.5", "q_k_kn_per_m2: .inf"), 2, 1, ("loads.q_k_kn_per_m2", "got inf")),
    Case("minus-inf-cover", "-.inf top cover", sub("top_mm: 25", "top_mm: -.inf"), 2, 1, ("cover.top_mm", "got -inf", "nominal cover")),
    Case("1e400-span", "1e400 (text in YAML 1.1)", sub("[4000, 4500]", "[4000, 1e400]"), 2, 1, ("spans_mm[1]", "'1e400'", "finite number")),
    Case("1.0e+400-load", "a float that overflows to inf", sub("g_k_kn_per_m2: 1.5", "g_k_kn_per_m2: 1.0e+400"), 2, 1, ("loads.g_k_kn_per_m2", "finite")),
    Case("400-digit-int", "an integer of 400 digits", sub("thickness_mm: 200", "thickness_mm: " + "9" * 400), 2, 1, ("strips[0].thickness_mm", "400-digit", "far too large")),
    # -- negative, zero, absurd --
    Case("zero-thickness", "h = 0", sub("thickness_mm: 200", "thickness_mm: 0"), 2, 1, ("strips[0].thickness_mm", "got 0")),
    Case("negative-cover-zero-width", "two mistakes at once", sub("top_mm: 25", "top_mm: -25", "panel_width_mm: 5000", "panel_width_mm: 0"), 2, 2, ("bad.yaml:13: strips[0].cover.top_mm", "bad.yaml:14: strips[0].panel_width_mm", "got -25")),
    Case("negative-load-cantilever", "q < 0 and a negative overhang", sub("q_k_kn_per_m2: 1.5", "q_k_kn_per_m2: -1.5", "right_end: pinned", "right_end: {cantilever_mm: -1200}"), 2, 2, ("right_end.cantilever_mm", "loads.q_k_kn_per_m2", ">= 0 (got -1.5)")),
    Case("h-1e9", "h = 1.0e+9", sub("thickness_mm: 200", "thickness_mm: 1.0e+9"), 2, 1, ("<= 2000 (got 1e+09)",)),
    Case("span-1-km", "one span of 1 000 000 mm", sub("[4000, 4500]", "[4000, 1000000]"), 2, 1, ("spans_mm[1]", "1e+06 mm is outside", "in mm")),
    Case("10000-spans", "a strip of 10 000 spans", sub("[4000, 4500]", "[" + ", ".join(["4000"] * 10000) + "]"), 2, 1, ("bad.yaml:15: strips[0].spans_mm", "10000 spans", "more than the 50", "split the strip")),
    Case("51-spans", "one span past the limit", sub("[4000, 4500]", "[" + ", ".join(["4000"] * 51) + "]"), 2, 1, ("51 spans",)),
    Case("2001-strips", "one strip past the limit", lambda c: c.build(c.write(many_strips(2001))), 2, 1, ("bad.yaml:9: strips", "2001 strips", "several project files")),
    Case("empty-strips", "strips: []", sub("strips:\n", "strips: []\nx_strips:\n"), 2, 2, ("needs at least 1", "unknown key 'x_strips'")),
    # -- ids and names --
    Case("triple-id", "S1 three times", lambda c: c.build(c.write(BASE + STRIP.format(sid="S1") * 2)), 2, 2, ("bad.yaml:20: strips[1].id", "bad.yaml:29: strips[2].id", "duplicate strip id 'S1'")),
    Case("ids-differ-in-case", "S1 and s1", lambda c: c.build(c.write(BASE + STRIP.format(sid="s1"))), 2, 1, ("strips[1].id", "only in letter case", "its own id")),
    Case("unicode-title", "title and description in é, ü, 中文", unicode_names, 0, 0),
    Case("unicode-strip-id", "strip id Sé1", sub("id: S1", "id: Sé1"), 2, 1, ("bad.yaml:10: strips[0].id", "'Sé1'", "letters, digits")),
    Case("slash-in-id", "strip id S1/2 (unsafe in file names)", sub("id: S1", 'id: "S1/2"'), 2, 1, ("strips[0].id", "'S1/2'", "no spaces")),
    Case("reserved-project-id", "project id CON", sub("id: bi", "id: CON"), 2, 1, ("bad.yaml:2: project.id", "device name on Windows", "CON-1")),
    Case("cyrillic-key", "thickness_mm with a Cyrillic с", sub("thickness_mm", "thiсkness_mm"), 2, 1, ("unknown key 'thiсkness_mm'", "did you mean 'thickness_mm'")),
    Case("fullwidth-digits", "span typed ４０００", sub("[4000, 4500]", "[４０００, 4500]"), 2, 1, ("spans_mm[0]", "ASCII digits 0-9: 4000")),
    Case("digit-groups", "width typed 5 000", sub("panel_width_mm: 5000", "panel_width_mm: 5 000"), 2, 1, ("panel_width_mm", "separators: 5000")),
    Case("decimal-comma", "h typed 200,5", sub("thickness_mm: 200", "thickness_mm: 200,5"), 2, 1, ("thickness_mm", "decimal point, not a comma: 200.5")),
    Case("bom-crlf", "Windows Notepad: UTF-8 BOM and CRLF, read as the earlier build", bom_crlf, 0, 0),
    # -- paths and folders --
    Case("spaces-in-paths", "project and output folder with spaces", spaced_paths, 0, 0),
    Case("project-is-folder", "a folder named level2.yaml", folder_as_project, 2, 1, ("folder, not a file", "give the project .yaml")),
    Case("missing-file", "level2.yaml when level2.yml exists", misspelt_path, 2, 1, ("cannot read the file", "level2.yml?")),
    Case("unreadable-chmod", "chmod 000", chmod_000, 2, 1, ("permission denied", "fix its permissions"), non_root=True),
    Case("unreadable-denied", "open refused (as chmod 000 for a user)", open_denied, 2, 1, ("permission denied", "fix its permissions")),
    Case("out-is-a-file", "--out names a file", out_is_a_file, 2, 1, ("cannot write", "part of the path is a file")),
    Case("read-only-out", "output folder not writable", read_only_out, 2, 1, ("cannot write", "permission denied", "read-only or not yours")),
    Case("disk-full", "ENOSPC on the third output file", disk_full, 2, 1, ("cannot write", "disk is full")),
    Case("damaged-record", "the earlier record in --out cut short", damaged_record, 2, 1, ("not a JSON record", "-record.json")),
    # -- general-arrangement DXF --
    Case("dxf-garbage", "random bytes named ga.dxf", ga(text_edit=lambda t: garbage()), 2, 1, ("not a DXF file", "export the general arrangement")),
    Case("dxf-truncated", "the DXF cut at two thirds", ga(text_edit=truncate), 2, 1, ("cut short", "EOF", "export the file again")),
    Case("dxf-too-big", "a 65 MiB (sparse) DXF", sparse("ga.dxf", 65 * 2**20, dxf=True), 2, 1, ("more than the 64 MiB", "only the slab, supports and strips")),
    Case("dxf-no-outline", "only a text on the slab layer", ga(no_outline), 2, 1, ("layer 'SW-GA-SLAB'", "no slab outline", "one closed polyline")),
    Case("dxf-zero-length-strip", "strip LINE start = end", ga(zero_length_strip), 2, 1, ("layer 'SW-GA-STRIPS'", "zero length", "across its supports")),
    Case("dxf-zero-area-support", "support polyline of three collinear points", ga(flat_support), 2, 1, ("layer 'SW-GA-SUPPORTS'", "encloses no area", "closed polyline around")),
    Case("dxf-bow-tie", "self-intersecting slab outline", ga(bow_tie), 2, 1, ("crosses itself", "edges do not cross")),
    Case("dxf-nan", "a slab vertex x = nan", ga(lambda g: [h(g.slab)], text_edit=nan_x), 2, 1, ("layer 'SW-GA-SLAB'", "not a number (nan", "audit it")),
    Case("dxf-1e12", "every entity moved by 1e12 mm", ga(far_away), 2, 1, ("1e+12 mm from the drawing origin", "near (0, 0)")),
    Case("dxf-strip-no-support", "strip beyond the walls", ga(strip_off_supports), 2, 1, ("crosses no support", "at least two supports")),
    Case("dxf-units-m-vs-mm", "header m, project units: mm, drawn in mm", ga(header_in_metres, geometry="{dxf: ga.dxf, units: mm}"), 2, 1, ("1.03e+07 mm across", "$INSUNITS", "units: mm in the project file")),
    Case("dxf-wrong-layer", "layers: {supports: BEAMS}", ga(geometry="{dxf: ga.dxf, layers: {supports: BEAMS}}"), 2, 1, ("layer 'BEAMS'", "not in the drawing", "SW-GA-SUPPORTS")),
    Case("dxf-layer-not-text", "layers: {slab: 5}", ga(geometry="{dxf: ga.dxf, layers: {slab: 5}}", named="ga-project.yaml"), 2, 1, ("ga-project.yaml:3: geometry.layers.slab", "layer name")),
    Case("dxf-no-id-text", "the strip's id text deleted", ga(label(None)), 2, 1, ("no id text", "TEXT or MTEXT")),
    Case("dxf-twin-ids", "two strips both labelled S1", ga(twin_ids), 2, 1, ("two strips have the id 'S1'", "its own id")),
    Case("dxf-unicode-id", "id text S1é", ga(label("S1é")), 2, 1, ("'S1é' is not a valid id", "letters, digits")),
    Case("dxf-unicode-layers", "layers Dalle-é, Träger 梁, Streifen-ü", ga(unicode_layers, geometry="{dxf: ga.dxf, layers: {slab: DALLE-É, supports: TRÄGER 梁, strips: streifen-Ü}}", check=True), 0, 0),
    Case("dxf-numeric-id", "id text 101, YAML id: 101 unquoted", ga(lambda g: setattr(g.label.dxf, "text", "101"), sid="101", check=True), 0, 0),
    Case("dxf-is-folder", "dxf: names a folder", ga(geometry="{dxf: gadir}", named="gadir"), 2, 1, ("folder, not a file", "GA .dxf")),
]
# fmt: on


@pytest.fixture(scope="module")
def earlier(tmp_path_factory) -> Path:
    """An earlier good build of BASE: the outputs every failed build must leave as they were."""
    folder = tmp_path_factory.mktemp("earlier")
    project = folder / "base.yaml"
    project.write_text(BASE, encoding="utf-8")
    out = folder / "out"
    assert main(["build", str(project), "--out", str(out)]) == 0
    return out


def snapshot(folder: Path) -> dict[str, bytes | None]:
    """Every file (hidden ones too) and folder below ``folder``: name -> bytes (None: folder)."""
    return {
        str(p.relative_to(folder)): None if p.is_dir() else p.read_bytes()
        for p in sorted(folder.rglob("*"))
    }


def test_the_catalogue_is_large_and_its_ids_unique() -> None:
    assert len(CASES) >= 40
    assert len({c.id for c in CASES}) == len(CASES)


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_bad_input(case: Case, earlier: Path, tmp_path: Path, monkeypatch, capsys) -> None:
    if case.non_root and os.geteuid() == 0:
        pytest.skip("root ignores file permissions (the case is simulated as unreadable-denied)")
    out = tmp_path / "earlier out"
    shutil.copytree(earlier, out)
    ctx = Ctx(tmp_path, out, monkeypatch)
    argv = case.make(ctx)
    before = snapshot(out)
    try:
        code = main(argv)
    finally:
        monkeypatch.undo()
        for restore in ctx.restore:
            restore()
    cap = capsys.readouterr()
    lines = cap.err.splitlines()
    assert "Traceback" not in cap.err + cap.out
    assert code == case.code, cap.err
    assert len(lines) == case.lines, lines
    for line in lines:
        assert ctx.named in line, line  # the file
        assert "; " in line, line  # reason; fix
    for word in (*case.words, *ctx.expect):
        assert word in cap.err, (word, cap.err)
    if case.code != 0:
        assert cap.out == ""
    else:
        default = "OK: 1 strip(s) checked." if argv[0] == "check" else " wrote "
        for word in ctx.stdout or [default]:
            assert word in cap.out, (word, cap.out)
    assert snapshot(out) == before  # earlier outputs byte-identical, nothing added
    if ctx.after is not None:
        ctx.after()
