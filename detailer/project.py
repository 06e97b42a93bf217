"""Read a project YAML file, validate it and build the typed project model.

``load_project(path)`` is the only entry point most callers need. Every mistake becomes a
``ProjectError`` whose one-line text names the file, the line, the key and a fix; several
mistakes found at once arrive as ``ProjectErrors`` (a ProjectError listing all of them).
The file format is described in ``sample_projects/README.md``.
"""

from __future__ import annotations

__all__ = [
    "BAR_DIAMETERS_MM",
    "CONCRETE_CLASSES",
    "EXPOSURE_CLASSES",
    "MAX_FILE_BYTES",
    "MAX_STRIPS",
    "decode_project_bytes",
    "load_project",
    "parse_project",
    "read_project_text",
]

import dataclasses
import difflib
import math
import os
import re
import unicodedata
from typing import Any

from pydantic import ValidationError

from detailer.errors import ProjectError, ProjectErrors, format_key_path
from detailer.model import Project
from detailer.project_build import (
    BAR_DIAMETERS_MM,
    CONCRETE_CLASSES,
    EXPOSURE_CLASSES,
    build_project,
)

# Re-exported for callers that list the allowed values.
from detailer.project_ga import apply_general_arrangement
from detailer.project_schema import FileIn, fields_at
from detailer.project_yaml import DOCUMENT, Path, YamlSource, read_yaml

#: Largest project file read (a 2000-strip floor is about 0.5 MiB); larger is not a project.
MAX_FILE_BYTES = 4 * 2**20
#: Most strips in one project file (a floor of 500 strips is normal).
MAX_STRIPS = 2000

# What to do about a bad value, by key name (the last name in the error's path).
_FIX: dict[str, str] = {
    "project": "add a project: block with id, title, revision, date and drawing",
    "design": "see sample_projects/README.md for the design: keys",
    "materials": "add a materials: block with at least concrete: C32/40",
    "reinforcement": "see sample_projects/README.md for the reinforcement: keys",
    "defaults": "give defaults: as a mapping of strip keys shared by every strip",
    "strips": "give a list of strips, each starting with '- id: ...'",
    "id": "use letters, digits, '.', '-' or '_' (no spaces), e.g. S1",
    "title": "give a short title in quotes",
    "revision": "give the revision as text, e.g. P1",
    "date": "give the issue date as YYYY-MM-DD, e.g. 2025-03-14",
    "drawing": "give the drawing reference as text",
    "description": "give a short text",
    "code": "write EN1992-1-1+UKNA (the only code supported so far)",
    "combination": 'write "6.10" or "6.10a/b" in quotes (unquoted 6.10 is read as the number 6.1)',
    "arrangements": "write uk-simplified or all-subsets",
    "redistribution_percent": "give the support-moment reduction in percent, 0 to 30",
    "redistribution_delta": "give delta (EN 1992-1-1 5.5) between 0.7 and 1.0",
    "support_reduction": "write true or false",
    "moments_at_faces": "write true or false",
    "concrete": "give a strength class such as C32/40",
    "f_yk": "give the reinforcement yield strength in MPa, 400 to 600 (EN 1992-1-1 3.2.2(3)P)",
    "bar_type": "write H, A, B or C (BS 8666 steel notation)",
    "ductility_class": "write A, B or C (EN 1992-1-1 Annex C)",
    "exposure": "give an exposure class of EN 1992-1-1 Table 4.1, e.g. XC1",
    "density_kn_per_m3": "give the concrete density in kN/m3, e.g. 25",
    "diameters_mm": "list bar sizes in mm, e.g. [10, 12, 16, 20]",
    "spacings_mm": "list bar centres in mm, e.g. [100, 125, 150, 175, 200]",
    "stock_length_mm": "give the longest bar length in mm, e.g. 12000",
    "curtailment": "write envelope or simplified",
    "max_aggregate_mm": "give the maximum aggregate size in mm, e.g. 20",
    "thickness_mm": "give the slab thickness h in mm, e.g. 225",
    "cover": "give cover: {top_mm: 25, bottom_mm: 25, side_mm: 25}",
    "top_mm": "give the nominal cover in mm, e.g. 25",
    "bottom_mm": "give the nominal cover in mm, e.g. 25",
    "side_mm": "give the nominal cover in mm, e.g. 25",
    "panel_width_mm": "give the width of slab this strip stands for in mm, e.g. 6000",
    "spans_mm": "give the span length in mm (support centreline to centreline), e.g. 4200",
    "supports_mm": "give support centreline positions in mm, increasing from left to right",
    "support_widths_mm": "give the support width in mm: one value, or one per support",
    "support_labels": "give one short unique label per support, e.g. [A, B, C]",
    "left_end": "write pinned, monolithic or {cantilever_mm: 1500}",
    "right_end": "write pinned, monolithic or {cantilever_mm: 1500}",
    "kind": "write pinned, monolithic or {cantilever_mm: 1500}",
    "cantilever_mm": "give the overhang from the end support centreline to the free edge in mm",
    "loads": "give loads: {category: A, g_k_kn_per_m2: 1.5, q_k_kn_per_m2: 1.5}",
    "category": "give an imposed-load category A to H (EN 1991-1-1 Table 6.1)",
    "g_k_kn_per_m2": "give the superimposed permanent load in kN/m2 (self-weight is added)",
    "q_k_kn_per_m2": "give the imposed load in kN/m2",
    "g_k_kn_per_m": "give the permanent line load in kN per metre width of slab",
    "q_k_kn_per_m": "give the imposed line load in kN per metre width of slab",
    "overrides": "give a list of {span: N or cantilever: left|right, g_k_kn_per_m2, q_k_kn_per_m2}",
    "partial": "give a list of {span: N, from_mm, to_mm, g_k_kn_per_m2, q_k_kn_per_m2}",
    "line": "give a list of {span: N, x_mm, g_k_kn_per_m, q_k_kn_per_m}",
    "span": "give the span number, 1 for the leftmost span between supports",
    "cantilever": "write left or right",
    "from_mm": "give the position in mm from the left end of the segment",
    "to_mm": "give the position in mm from the left end of the segment",
    "x_mm": "give the position in mm from the left end of the segment",
}

_TYPE_NAMES = {
    dict: "a mapping",
    list: "a list",
    str: "text",
    bool: "true/false",
    type(None): "nothing",
}


def load_project(path: str | os.PathLike[str]) -> Project:
    """Read, validate and build the project in ``path``. Raises ProjectError (one per mistake)."""
    file = os.fspath(path)
    return parse_project(read_project_text(file), file)


def read_project_text(file: str) -> str:
    """The text of the project file ``file``; a one-line ProjectError when it is not one."""
    if os.path.isdir(file):
        raise ProjectError(
            file, "this is a folder, not a file", fix="give the project .yaml file inside it"
        )
    try:
        with open(file, "rb") as fh:
            size = os.fstat(fh.fileno()).st_size
            if size > MAX_FILE_BYTES:
                raise ProjectError(
                    file,
                    f"the file is {size / 2**20:.1f} MiB, more than the {MAX_FILE_BYTES >> 20} MiB "
                    "a project file may have",
                    fix="check that this is the project YAML (a 2000-strip floor is under 1 MiB)",
                )
            data = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ProjectError(
            file, f"cannot read the file: {_reason(exc)}", fix=_read_fix(file, exc)
        ) from None
    if len(data) > MAX_FILE_BYTES:  # a device or pipe that states no size
        raise ProjectError(
            file,
            f"more than {MAX_FILE_BYTES >> 20} MiB of data",
            fix="give the project YAML file (a 2000-strip floor is under 1 MiB)",
        )
    return decode_project_bytes(data, file)


def decode_project_bytes(data: bytes, file: str) -> str:
    """UTF-8 text of a project file's bytes (a BOM is allowed); ProjectError for binary data."""
    kind = _binary_kind(data)
    if kind is not None:
        raise ProjectError(
            file,
            f"not a text file ({kind})",
            line=1,
            key_path=DOCUMENT,
            fix="give the project YAML file, saved as UTF-8 text",
        )
    if _is_utf16(data):
        raise ProjectError(
            file,
            "not UTF-8: the file is saved as UTF-16 text",
            line=1,
            key_path=DOCUMENT,
            fix="save it again as UTF-8 (in the editor's encoding menu)",
        )
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise ProjectError(
            file,
            f"not a text file (not UTF-8: byte 0x{data[exc.start]:02X} at offset {exc.start})",
            line=line,
            key_path=DOCUMENT,
            fix="save the project as UTF-8 YAML text",
        ) from None


# Leading bytes of binary files a project file is commonly mistaken for (file signatures).
_SIGNATURES: tuple[tuple[bytes, str], ...] = (
    (b"PK\x03\x04", "a ZIP archive, e.g. an .xlsx, .docx or .zip file"),
    (b"%PDF", "a PDF document"),
    (b"\xd0\xcf\x11\xe0", "an old Office document, e.g. an .xls file"),
    (b"AC10", "a DWG drawing"),
    (b"\x89PNG", "a PNG image"),
    (b"\x1f\x8b", "a gzip archive"),
)


def _binary_kind(data: bytes) -> str | None:
    for magic, kind in _SIGNATURES:
        if data.startswith(magic):
            return kind
    return None


def _is_utf16(data: bytes) -> bool:
    """Text saved as UTF-16 with a byte-order mark (as some Windows editors do)."""
    if not data.startswith((b"\xff\xfe", b"\xfe\xff")):
        return False
    try:
        text = data.decode("utf-16")
    except UnicodeDecodeError:
        return False
    return "\x00" not in text


def _reason(exc: OSError) -> str:
    return (exc.strerror or type(exc).__name__).strip().rstrip(".").lower()


def _read_fix(file: str, exc: OSError) -> str:
    if isinstance(exc, PermissionError):
        return "you may not read it: fix its permissions or copy it somewhere you can read"
    if isinstance(exc, FileNotFoundError):
        folder, name = os.path.split(file)
        try:
            near = difflib.get_close_matches(name, os.listdir(folder or "."), n=1, cutoff=0.7)
        except OSError:
            near = []
        if near:
            return f"did you mean {os.path.join(folder, near[0])}?"
    return "check the path and name"


def parse_project(text: str, file: str = "<project>") -> Project:
    """Validate YAML ``text`` (``file`` is the name used in messages) and build the project."""
    source = read_yaml(text, file)
    data = source.data
    if not isinstance(data, dict):
        raise ProjectError(
            file,
            f"expected a mapping of keys at the top level (got {_kind(data)})",
            line=1,
            key_path=DOCUMENT,
            fix="start the file with project:, materials: and strips: blocks",
        )
    locator = _Locator(file, source)
    strips = data.get("strips")
    if isinstance(strips, list) and len(strips) > MAX_STRIPS:
        raise locator.error(
            ("strips",),
            f"{len(strips)} strips are more than the {MAX_STRIPS} one project file may have",
            "split the floor into several project files",
        )
    merged, notes = apply_general_arrangement(locator.merge_defaults(data), file, locator.error)
    try:
        validated = FileIn.model_validate(merged)
    except ValidationError as exc:
        errors = _drop_misspelt_missing(exc.errors())
        raise ProjectErrors(_dedupe([locator.pydantic_error(e) for e in errors])) from None
    project = build_project(validated, locator.error)
    return dataclasses.replace(project, input_notes=notes) if notes else project


def _drop_misspelt_missing(errors: list[Any]) -> list[Any]:
    """Drop "missing x" when an unknown key beside it is a misspelling of x (one mistake)."""
    extras: dict[tuple, list[str]] = {}
    for e in errors:
        if e["type"] == "extra_forbidden" and e["loc"]:
            extras.setdefault(tuple(e["loc"][:-1]), []).append(str(e["loc"][-1]))
    kept = []
    for e in errors:
        if e["type"] == "missing" and e["loc"]:
            near = extras.get(tuple(e["loc"][:-1]), [])
            if difflib.get_close_matches(str(e["loc"][-1]), near, n=1):
                continue
        kept.append(e)
    return kept


def _kind(value: Any) -> str:
    return _TYPE_NAMES.get(
        type(value), "a number" if isinstance(value, (int, float)) else "a value"
    )


def _dedupe(errors: list[ProjectError]) -> list[ProjectError]:
    seen: set[str] = set()
    out = []
    for e in sorted(errors, key=lambda e: e.line or 0):
        if str(e) not in seen:
            seen.add(str(e))
            out.append(e)
    return out


def _show(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, (dict, list)) or value is None:
        return _kind(value)
    return repr(value) if isinstance(value, str) else str(value)


def _number_text_hint(text: str) -> str | None:
    """Fix for a number that arrived as text, e.g. '1e3'; None when it is not a number."""
    stripped = text.strip()
    if not stripped.isascii():
        # Python's float() reads full-width and other Unicode digits; YAML and we do not.
        ascii_digits = unicodedata.normalize("NFKC", stripped)
        ascii_digits = "".join(str(int(c)) if c.isdecimal() else c for c in ascii_digits)
        if ascii_digits.isascii() and _number_text_hint(ascii_digits) is not None:
            return f"write the number with ASCII digits 0-9: {ascii_digits}"
        return None
    grouped = re.fullmatch(r"[-+]?\d{1,3}(?:[ ,'_]\d{3})+", stripped)
    if grouped and not stripped.replace("_", "").lstrip("+-").isdigit():
        plain = re.sub(r"[ ,'_]", "", stripped)
        return f"write the number without digit-group separators: {plain}"
    if re.fullmatch(r"[-+]?\d+,\d+", stripped):
        return f"use a decimal point, not a comma: {stripped.replace(',', '.')}"
    try:
        value = float(stripped.replace("_", ""))
    except ValueError:
        return None
    if not math.isfinite(value):
        return "give a finite number"
    if "e" not in stripped.lower():
        return f"remove the quotes: write {stripped}"
    plain = f"{value:.0f}" if value == int(value) and abs(value) < 1e12 else repr(value)
    mantissa, exponent = f"{value:.6e}".split("e")
    mantissa = mantissa.rstrip("0")
    mantissa += "0" if mantissa.endswith(".") else ""
    sci = f"{mantissa}e{int(exponent):+d}"
    return f"YAML 1.1 reads {stripped} as text; write {plain} or {sci}"


class _Locator:
    """Maps paths in the validated data back to places in the file."""

    def __init__(self, file: str, source: YamlSource) -> None:
        self.file = file
        self.lines = source.lines
        self.origin: dict[Path, Path] = {}  # path in merged data -> path in the file

    # -- defaults -------------------------------------------------------------------------
    def merge_defaults(self, data: dict[str, Any]) -> dict[str, Any]:
        """Copy of ``data`` with ``defaults:`` merged into every strip (strip keys win)."""
        out = {k: v for k, v in data.items() if k != "defaults"}
        defaults = data.get("defaults")
        strips = data.get("strips")
        if "defaults" in data and not isinstance(defaults, dict):
            raise ProjectError(
                self.file,
                f"expected a mapping (got {_kind(defaults)})",
                line=self.lines.get(("defaults",)),
                key_path="defaults",
                fix=_FIX["defaults"],
            )
        if defaults and isinstance(strips, list):
            merged = []
            for i, strip in enumerate(strips):
                if isinstance(strip, dict):
                    merged.append(self._merge(defaults, strip, ("defaults",), ("strips", i)))
                else:
                    merged.append(strip)
            out["strips"] = merged
        return out

    def _merge(self, low: dict, high: dict, low_path: Path, high_path: Path) -> dict:
        out: dict[str, Any] = {}
        for key, value in low.items():
            if key not in high:
                out[key] = value
                self._record(value, (*low_path, key), (*high_path, key))
        for key, value in high.items():
            if isinstance(value, dict) and isinstance(low.get(key), dict):
                out[key] = self._merge(low[key], value, (*low_path, key), (*high_path, key))
            else:
                out[key] = value
        return out

    def _record(self, value: Any, src: Path, dst: Path) -> None:
        self.origin[dst] = src
        if isinstance(value, dict):
            for k, v in value.items():
                self._record(v, (*src, k), (*dst, k))
        elif isinstance(value, list):
            for i, v in enumerate(value):
                self._record(v, (*src, i), (*dst, i))

    # -- places ---------------------------------------------------------------------------
    def source_path(self, path: Path) -> Path:
        for n in range(len(path), 0, -1):
            if path[:n] in self.origin:
                return self.origin[path[:n]] + path[n:]
        return path

    def place(self, path: Path, *, missing: bool = False) -> tuple[Path, int | None]:
        """(path to show, line) for a path in the merged data."""
        src = self.source_path(path)
        for n in range(len(src), -1, -1):
            if src[:n] in self.lines:
                shown = src if missing or n == len(src) else src[:n]
                return shown, self.lines[src[:n]]
        return src, None

    def error(self, path: Path, message: str, fix: str = "") -> ProjectError:
        shown, line = self.place(path)
        return ProjectError(
            self.file, message, line=line, key_path=format_key_path(shown) or DOCUMENT, fix=fix
        )

    # -- pydantic -------------------------------------------------------------------------
    def pydantic_error(self, err: Any) -> ProjectError:
        loc: Path = tuple(p for p in err["loc"] if isinstance(p, (str, int)))
        kind = err["type"]
        given = err.get("input")
        ctx = err.get("ctx") or {}
        names = [p for p in loc if isinstance(p, str)]
        name = names[-1] if names else ""
        fix = _FIX.get(name, "see sample_projects/README.md")
        missing = kind == "missing"
        if missing:
            message = "required key is missing"
            fix = f"add {name}: to this block" + (f" ({_FIX[name]})" if name in _FIX else "")
        elif kind == "extra_forbidden":
            parent = loc[:-1]
            src_parent = self.source_path(parent)
            allowed = fields_at(("strips", 0) if src_parent == ("defaults",) else parent)
            message = f"unknown key '{name}'"
            close = difflib.get_close_matches(name, allowed, n=1)
            if close:
                fix = f"did you mean '{close[0]}'?"
            elif allowed:
                fix = "allowed keys here: " + ", ".join(allowed)
        elif kind in ("float_type", "int_type", "int_from_float"):
            message, fix = self._number_message(kind, given, fix)
        elif kind == "finite_number":
            message = f"must be a finite number (got {_show(given)})"
        elif kind in ("greater_than", "greater_than_equal", "less_than", "less_than_equal"):
            op = {
                "greater_than": ">",
                "greater_than_equal": ">=",
                "less_than": "<",
                "less_than_equal": "<=",
            }[kind]
            limit = next(iter(ctx.values()))
            message = f"must be {op} {_show(limit)} (got {_show(given)})"
        elif kind == "literal_error":
            message = f"must be one of {ctx.get('expected', '')} (got {_show(given)})"
            if name == "combination" and not isinstance(given, float):
                fix = 'write "6.10" or "6.10a/b"'  # the note on unquoted 6.10 does not apply
        elif kind == "string_type":
            message = f"expected text (got {_show(given)})"
            if isinstance(given, bool):
                fix = "quote the value: YAML 1.1 reads yes/no/on/off as true/false"
        elif kind == "bool_type":
            message = f"expected true or false (got {_show(given)})"
            fix = "write true or false"
        elif kind in ("list_type", "too_short"):
            message = (
                f"expected a list (got {_kind(given)})"
                if kind == "list_type"
                else f"needs at least {ctx.get('min_length', 1)} item(s)"
            )
        elif kind in ("model_type", "dict_type", "model_attributes_type"):
            message = f"expected a mapping of keys (got {_kind(given)})"
        elif kind == "string_pattern_mismatch":
            message = f"not a valid name (got {_show(given)})"
        elif kind in ("string_too_long", "string_too_short"):
            message = (
                f"too long (at most {ctx.get('max_length')} characters)"
                if kind == "string_too_long"
                else "must not be empty"
            )
        else:
            message = str(err.get("msg", "invalid value")).removeprefix("Value error, ")
        shown, line = self.place(loc, missing=missing)
        return ProjectError(
            self.file, message, line=line, key_path=format_key_path(shown) or DOCUMENT, fix=fix
        )

    @staticmethod
    def _number_message(kind: str, given: Any, fix: str) -> tuple[str, str]:
        whole = kind != "float_type"
        wanted = "a whole number" if whole else "a number"
        if isinstance(given, bool):
            return f"expected {wanted}, got {_show(given)}", fix
        if isinstance(given, str):
            hint = _number_text_hint(given)
            if hint is not None:
                return f"expected {wanted} (got text {given!r})", hint
            return f"expected {wanted} (got {_show(given)})", fix
        if whole and isinstance(given, float):
            return f"must be a whole number (got {_show(given)})", fix
        if isinstance(given, int):  # an integer too large for a float
            return f"a {len(str(abs(given)))}-digit number is far too large", fix
        return f"expected {wanted} (got {_kind(given)})", fix
