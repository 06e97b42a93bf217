"""Atomic writes of output files: all of a set replace the old files, or none do.

Each file is first written in full to a hidden temporary name in its own folder, flushed and
fsynced; only when every file of the set is safely on disk are the temporaries renamed over
the targets with ``os.replace`` (atomic within one file system). Earlier versions are kept as
hard-link backups until the last rename succeeds, so a failure part-way through the renames
puts the old files back. A failed run therefore leaves earlier outputs as they were and no
temporary files behind.

Operating-system errors become one :class:`OutputError` line naming the path and the fix.
"""

from __future__ import annotations

import contextlib
import errno
import os
import secrets
import shutil
import tempfile
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

from detailer.errors import InputError

__all__ = ["OutputError", "write_output", "write_outputs"]

_TMP_SUFFIX = ".tmp"
_BAK_SUFFIX = ".bak"

# errno name -> what the user can do about it (one short clause each). Looked up by name because
# not every platform defines every code.
_PERMISSION = (
    "the folder is read-only or not yours: choose another output folder or fix its permissions"
)
_FULL = "the disk is full: free some space or choose another output folder"
_IN_USE = "the file is in use: close the program holding it and run again"
_FIX_BY_NAME: dict[str, str] = {
    "EACCES": _PERMISSION,
    "EPERM": _PERMISSION,
    "EROFS": "the file system is read-only: choose another output folder",
    "ENOSPC": _FULL,
    "EDQUOT": "the disk quota is used up: free some space or choose another output folder",
    "EFBIG": "the file is too large for this file system: choose another output folder",
    "ENOENT": "the folder does not exist: create it or choose another output folder",
    "ENOTDIR": "part of the path is a file, not a folder: choose another output folder",
    "EISDIR": "a folder has the output file's name: remove or rename that folder",
    "ENAMETOOLONG": "the path is too long: choose a shorter output folder",
    "EBUSY": _IN_USE,
    "ETXTBSY": _IN_USE,
}
_FIXES: dict[int, str] = {
    getattr(errno, name): fix for name, fix in _FIX_BY_NAME.items() if hasattr(errno, name)
}


class OutputError(InputError):
    """An output file could not be written; the message is one line: path, reason, fix.

    An :class:`~detailer.errors.InputError` because the cause is the user's choice of folder or
    the state of their disk, never a bug: the CLI prints it as one line and exits non-zero.
    """

    def __init__(self, path: Path, reason: str, fix: str) -> None:
        self.path = Path(path)
        self.reason = reason
        self.fix = fix
        super().__init__(f"cannot write {self.path}: {reason}; {fix}")

    @classmethod
    def from_oserror(cls, path: Path, exc: OSError) -> OutputError:
        """Turn an OSError into the one-line error, choosing the fix from its errno."""
        reason = (exc.strerror or exc.__class__.__name__).strip().rstrip(".").lower()
        fix = _FIXES.get(exc.errno or -1, "check the folder and run again")
        return cls(path, reason, fix)


@dataclass(slots=True)
class _Staged:
    """Book-keeping for one target while the set is being written."""

    target: Path
    data: bytes
    tmp: Path | None = None
    backup: Path | None = None  # hard link (or copy) of the previous version, if any
    existed: bool = False
    replaced: bool = False


def write_output(path: Path, data: bytes) -> None:
    """Write one file atomically (see :func:`write_outputs`)."""
    write_outputs({Path(path): data})


def write_outputs(files: Mapping[Path, bytes]) -> None:
    """Write a set of files so that either all new versions replace the old ones or none do.

    Parent folders are created when missing (and removed again, if they stay empty, when the
    set fails). On any failure every temporary file is removed, the earlier files are left as
    they were, and :class:`OutputError` is raised naming the path and the fix.
    """
    staged = _stage_targets(files)
    created_dirs: list[Path] = []
    mode = _default_mode()
    current = staged[0].target if staged else Path()
    try:
        for st in staged:
            current = st.target
            created_dirs.extend(_make_parents(st.target.parent))
            if st.target.is_dir():
                raise IsADirectoryError(errno.EISDIR, os.strerror(errno.EISDIR), str(st.target))
            st.existed = st.target.exists()
            file_mode = st.target.stat().st_mode & 0o777 if st.existed else mode
            st.tmp = _write_temp(st.target, st.data, file_mode)
        for st in staged:
            current = st.target
            if st.existed:
                st.backup = _backup(st.target)
        for st in staged:
            current = st.target
            assert st.tmp is not None
            os.replace(st.tmp, st.target)
            st.tmp = None
            st.replaced = True
    except OSError as exc:
        error = OutputError.from_oserror(current, exc)
        _roll_back(staged, created_dirs)
        raise error from None
    except BaseException:
        _roll_back(staged, created_dirs)
        raise
    for st in staged:
        if st.backup is not None:
            with contextlib.suppress(OSError):
                st.backup.unlink()
    for folder in sorted({st.target.parent for st in staged}):
        _fsync_dir(folder)


def _stage_targets(files: Mapping[Path, bytes]) -> list[_Staged]:
    """One entry per target, in a fixed order; reject two keys naming the same file."""
    seen: dict[Path, Path] = {}
    for p in files:
        resolved = Path(os.path.abspath(p))
        if resolved in seen:
            raise ValueError(f"{p} and {seen[resolved]} name the same output file")
        seen[resolved] = Path(p)
        if not isinstance(files[p], (bytes, bytearray, memoryview)):
            raise TypeError(f"output for {p} must be bytes, not {type(files[p]).__name__}")
    return [_Staged(Path(p), bytes(files[p])) for p in sorted(files, key=lambda q: str(q))]


def _default_mode() -> int:
    """Permission bits of a newly created file under the current umask (0o666 & ~umask)."""
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def _make_parents(folder: Path) -> list[Path]:
    """Create ``folder`` and any missing ancestors; return the ones created, outermost first."""
    missing: list[Path] = []
    p = folder
    while not p.exists() and p != p.parent:
        missing.append(p)
        p = p.parent
    created = []
    for m in reversed(missing):
        try:
            m.mkdir()
        except FileExistsError:  # made meanwhile by someone else: not ours to remove
            continue
        created.append(m)
    return created


def _write_temp(target: Path, data: bytes, mode: int) -> Path:
    """Write ``data`` to a hidden temporary beside ``target``, fsynced; return its path."""
    fd, name = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.", suffix=_TMP_SUFFIX)
    tmp = Path(name)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, mode)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    return tmp


def _backup(target: Path) -> Path:
    """Keep the previous version of ``target`` under a hidden name (hard link, else a copy)."""
    for _ in range(100):
        backup = target.with_name(f".{target.name}.{secrets.token_hex(4)}{_BAK_SUFFIX}")
        try:
            os.link(target, backup)
            return backup
        except FileExistsError:
            continue
        except OSError as exc:
            if exc.errno not in (errno.EPERM, errno.EOPNOTSUPP, errno.EXDEV, errno.EMLINK):
                raise
            fd, name = tempfile.mkstemp(
                dir=target.parent, prefix=f".{target.name}.", suffix=_BAK_SUFFIX
            )
            os.close(fd)
            shutil.copy2(target, name)
            return Path(name)
    raise FileExistsError(errno.EEXIST, "no free backup name", str(target))


def _roll_back(staged: list[_Staged], created_dirs: list[Path]) -> None:
    """Put back the old files, remove the new ones and every temporary; best effort."""
    for st in reversed(staged):
        with contextlib.suppress(OSError):
            if st.replaced:
                if st.backup is not None:
                    os.replace(st.backup, st.target)
                    st.backup = None
                elif not st.existed:
                    st.target.unlink()
        for leftover in (st.tmp, st.backup):
            if leftover is not None:
                with contextlib.suppress(OSError):
                    leftover.unlink()
        st.tmp = None
        st.backup = None
    for folder in reversed(created_dirs):
        with contextlib.suppress(OSError):
            folder.rmdir()  # only succeeds when empty


def _fsync_dir(folder: Path) -> None:
    """Make the renames durable (POSIX); a no-op where folders cannot be opened."""
    if os.name != "posix":
        return
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        with contextlib.suppress(OSError):
            os.fsync(fd)
    finally:
        os.close(fd)
