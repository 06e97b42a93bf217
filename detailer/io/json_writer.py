"""The build record ``<project-id>-record.json``: byte-stable JSON of :mod:`detailer.record`.

Keys in the record's field order (not sorted: the order reads top-down like the calculation),
two-space indent, ``ensure_ascii=False`` (UTF-8), no NaN or infinity (they are null), one
newline at the end. The same project file therefore always gives the same bytes.
"""

from __future__ import annotations

__all__ = [
    "RecordReadError",
    "read_previous_marks",
    "record_file_name",
    "render_record_json",
    "write_record_json",
]

import json
from pathlib import Path

from detailer.errors import InputError
from detailer.io.atomic import write_output
from detailer.marks import BarIdentity
from detailer.record import ProjectRecord, previous_marks, record_to_jsonable


def record_file_name(project_id: str) -> str:
    """File name of a project's record: ``<project-id>-record.json``."""
    return f"{project_id}-record.json"


def render_record_json(record: ProjectRecord) -> bytes:
    """The record as UTF-8 JSON bytes."""
    text = json.dumps(
        record_to_jsonable(record), indent=2, ensure_ascii=False, allow_nan=False
    )
    return (text + "\n").encode("utf-8")


def write_record_json(path: Path, record: ProjectRecord) -> None:
    """Write the record atomically (an ``OutputError`` names the path and the fix)."""
    write_output(Path(path), render_record_json(record))


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
        raise RecordReadError(f"{path}: not a JSON record ({exc}); give the earlier issue's "
                              "-record.json file") from None  # fmt: skip
    try:
        return previous_marks(data)
    except ValueError as exc:
        raise RecordReadError(f"{path}: {exc}") from None
