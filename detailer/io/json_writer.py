"""The build record ``<project-id>-record.json``: byte-stable JSON of :mod:`detailer.record`.

Also reads an earlier issue's mark table back (:func:`read_previous_marks`), so unchanged
bars keep their marks.

Keys in the record's field order (not sorted: the order reads top-down like the calculation),
two-space indent, ``ensure_ascii=False`` (UTF-8), no NaN or infinity (they are null), one
newline at the end. The same project file therefore always gives the same bytes.
"""

from __future__ import annotations

__all__ = [
    "RecordReadError",
    "format_json",
    "previous_marks",
    "read_previous_marks",
    "record_file_name",
    "render_record_json",
    "write_record_json",
]

import json
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from detailer.errors import InputError
from detailer.io.atomic import write_output
from detailer.marks import BarIdentity
from detailer.record import record_to_jsonable
from detailer.record_types import SCHEMA_VERSION, ProjectRecord


def record_file_name(project_id: str) -> str:
    """File name of a project's record: ``<project-id>-record.json``."""
    return f"{project_id}-record.json"


def render_record_json(record: ProjectRecord) -> bytes:
    """The record as UTF-8 JSON bytes: indented by two spaces, except that an object or list
    holding only plain values (a station, a mark's dimensions) is written on one line; a
    record of hundreds of strips stays quick to write and easy to read and compare."""
    return format_json(record_to_jsonable(record)).encode("utf-8")


def format_json(data: Any) -> str:
    """JSON text of plain data in the layout of the record files (see
    :func:`render_record_json`), ending in one newline."""
    parts: list[str] = []
    _dump(data, "", parts)
    parts.append("\n")
    return "".join(parts)


_ENCODE = json.JSONEncoder(ensure_ascii=False, allow_nan=False, separators=(", ", ": ")).encode


def _flat(value: Any) -> bool:
    children = value.values() if isinstance(value, dict) else value
    return all(not isinstance(v, (dict, list)) for v in children)


def _dump(value: Any, pad: str, out: list[str]) -> None:
    if not isinstance(value, (dict, list)) or not value or _flat(value):
        out.append(_ENCODE(value))
        return
    inner = pad + "  "
    if isinstance(value, dict):
        out.append("{")
        for k, (key, v) in enumerate(value.items()):
            out.append(("," if k else "") + "\n" + inner + _ENCODE(str(key)) + ": ")
            _dump(v, inner, out)
        out.append("\n" + pad + "}")
    else:
        out.append("[")
        for k, v in enumerate(value):
            out.append(("," if k else "") + "\n" + inner)
            _dump(v, inner, out)
        out.append("\n" + pad + "]")


def write_record_json(path: Path, record: ProjectRecord) -> None:
    """Write the record atomically (an ``OutputError`` names the path and the fix)."""
    write_output(Path(path), render_record_json(record))


def previous_marks(data: Mapping[str, Any]) -> tuple[dict[BarIdentity, str], tuple[str, ...]]:
    """(identity -> mark, withdrawn marks) from a record loaded with ``json.load``.

    Raises ``ValueError`` (one line) if the record is not a slabwright record this version
    can read.
    """
    version = data.get("schema_version") if isinstance(data, Mapping) else None
    if version != SCHEMA_VERSION:
        raise ValueError(
            f"record schema_version {version!r} is not {SCHEMA_VERSION}; "
            "rebuild the earlier issue with this version or start the marks afresh"
        )
    table: dict[BarIdentity, str] = {}
    try:
        for m in data["marks"]:
            identity = BarIdentity(
                bar_type=str(m["bar_type"]),
                phi_mm=int(m["phi_mm"]),
                shape_code=str(m["shape_code"]),
                dims_mm=tuple((str(k), int(v)) for k, v in m["dims_mm"].items()),
                free_dims=tuple(str(x) for x in m["free_dims"]),
                sketch_ref=str(m["sketch_ref"]),
                length_mm=int(m["length_mm"]),
            )
            table[identity] = str(m["mark"])
        withdrawn = tuple(str(x) for x in data["withdrawn_marks"])
    except (KeyError, TypeError, ValueError, AttributeError) as exc:
        raise ValueError(
            f"record mark table is damaged ({exc!r}); rebuild the earlier issue"
        ) from None
    return table, withdrawn


class RecordReadError(InputError):
    """An earlier record (for keeping marks) cannot be read; the message is one line."""


def read_previous_marks(path: Path) -> tuple[dict[BarIdentity, str], tuple[str, ...]]:
    """(identity -> mark, withdrawn marks) of an earlier issue's record file."""
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except OSError as exc:
        raise RecordReadError(f"{path}: cannot read the earlier record ({exc.strerror})") from None
    except (UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise RecordReadError(
            f"{path}: not a JSON record ({exc}); give the earlier issue's -record.json file"
        ) from None
    try:
        return previous_marks(data)
    except ValueError as exc:
        raise RecordReadError(f"{path}: {exc}") from None
