"""Earlier issues on disk: find and read the previous record, keep the previous revision's files.

``write_issue`` replaces a project's outputs with a new issue and keeps the previous issue's
files in ``<out>/rev-<old revision>/``. Order (a failure at any step leaves the current
outputs as they were): the previous files are hard-linked (or copied) into a new archive
folder, which does not touch them; then the new files are written with
:func:`detailer.io.atomic.write_outputs` (temporaries first, then renames, all or none); only
then are previous files that the new issue no longer has removed. An archive folder that
already holds files is never written into: the next free name ``rev-<old>-2``, ... is used.
"""

from __future__ import annotations

__all__ = ["PreviousIssue", "find_previous", "read_previous", "write_issue"]

import contextlib
import errno
import json
import os
import shutil
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from detailer.io.atomic import OutputError, write_outputs
from detailer.io.json_writer import RecordReadError, previous_marks, record_file_name


@dataclass(frozen=True, slots=True)
class PreviousIssue:
    """An earlier record as read from disk: its path, its raw JSON data and its bytes."""

    path: Path
    data: Mapping[str, Any]
    raw: bytes

    @property
    def revision(self) -> str:
        return str(self.data.get("revision", ""))


def find_previous(folder: Path, project_id: str, explicit: str | Path | None = None) -> Path | None:
    """``--previous`` if given, else ``<folder>/<project-id>-record.json`` if it exists."""
    if explicit is not None:
        return Path(explicit)
    default = Path(folder) / record_file_name(project_id)
    return default if default.is_file() else None


def read_previous(path: Path, project_id: str | None = None) -> PreviousIssue:
    """Read and check an earlier record; ``RecordReadError`` (one line) if it cannot be used."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise RecordReadError(
            f"{path}: cannot read the earlier record ({exc.strerror}); check the path"
        ) from None
    try:
        data = json.loads(raw.decode("utf-8"))
    except (UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise RecordReadError(
            f"{path}: not a JSON record ({exc}); give the earlier issue's -record.json file"
        ) from None
    try:
        previous_marks(data)
    except ValueError as exc:
        raise RecordReadError(f"{path}: {exc}") from None
    if project_id is not None and data.get("project_id") != project_id:
        raise RecordReadError(
            f"{path}: the record is of project {data.get('project_id')!r}, not {project_id!r}; "
            "give the earlier record of this project"
        )
    return PreviousIssue(path=path, data=data, raw=raw)


def _project_files(folder: Path, project_id: str) -> list[Path]:
    """The project's output files in ``folder`` (``<project-id>-*``), sorted."""
    if not folder.is_dir():
        return []
    prefix = f"{project_id}-"
    return sorted(p for p in folder.iterdir() if p.is_file() and p.name.startswith(prefix))


def _free_archive(folder: Path, revision: str) -> Path:
    safe = "".join(c if c.isalnum() or c in "-_." else "_" for c in revision) or "unknown"
    base = folder / f"rev-{safe}"
    candidate, n = base, 1
    while candidate.exists() and (not candidate.is_dir() or any(candidate.iterdir())):
        n += 1
        candidate = folder / f"rev-{safe}-{n}"
    return candidate


def _keep(src: Path, dst: Path) -> None:
    try:
        os.link(src, dst)
    except OSError as exc:
        if exc.errno not in (errno.EPERM, errno.EOPNOTSUPP, errno.EXDEV, errno.EMLINK):
            raise
        shutil.copy2(src, dst)


def write_issue(
    folder: Path, project_id: str, files: Mapping[str, bytes], old_revision: str | None
) -> Path | None:
    """Write a new issue's files into ``folder``; keep the previous ones (see module docs).

    ``old_revision`` is the revision of the files now in the folder (None: nothing to keep).
    Returns the archive folder, or None when nothing was archived.
    """
    folder = Path(folder)
    existing = _project_files(folder, project_id) if old_revision is not None else []
    archive: Path | None = None
    if existing:
        archive = _free_archive(folder, str(old_revision))
        try:
            archive.mkdir(exist_ok=True)
            for p in existing:
                _keep(p, archive / p.name)
        except OSError as exc:
            shutil.rmtree(archive, ignore_errors=True)
            raise OutputError.from_oserror(archive, exc) from None
    try:
        write_outputs({folder / name: data for name, data in files.items()})
    except BaseException:
        if archive is not None:
            shutil.rmtree(archive, ignore_errors=True)
        raise
    for p in existing:
        if p.name not in files:
            with contextlib.suppress(OSError):
                p.unlink()
    return archive
