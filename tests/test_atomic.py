"""Atomic output sets: all new files replace the old ones, or none do.

Sources: POSIX.1-2017 (IEEE Std 1003.1), rename(): replacing an existing file is atomic within
one file system, which is why the temporaries live beside their targets; the write-temp /
fsync / rename sequence itself is common practice for crash-safe file updates.
"""

from __future__ import annotations

import errno
import os
from pathlib import Path

import pytest

from detailer.io import atomic
from detailer.io.atomic import OutputError, write_output, write_outputs


def _leftovers(folder: Path) -> list[str]:
    """Hidden temporaries or backups the writer might have left behind."""
    return sorted(p.name for p in folder.rglob(".*") if p.is_file())


def _old_set(folder: Path) -> dict[Path, bytes]:
    old = {
        folder / "p1-schedule.csv": b"old schedule\n",
        folder / "p1-record.json": b'{"old": true}\n',
        folder / "p1-layout.dxf": b"old drawing\n",
    }
    for path, data in old.items():
        path.write_bytes(data)
    return old


def _new_set(folder: Path) -> dict[Path, bytes]:
    return {
        folder / "p1-schedule.csv": b"new schedule\n",
        folder / "p1-record.json": b'{"new": true}\n',
        folder / "p1-layout.dxf": b"new drawing\n",
        folder / "p1-calcs.html": b"<html>new</html>\n",  # a file that did not exist before
    }


def test_writes_every_file_with_exact_bytes_and_no_temporaries(tmp_path: Path) -> None:
    files = _new_set(tmp_path)
    write_outputs(files)
    for path, data in files.items():
        assert path.read_bytes() == data
    assert _leftovers(tmp_path) == []


def test_new_file_gets_the_umask_permissions_not_the_private_temp_mode(tmp_path: Path) -> None:
    # mkstemp creates 0o600 files (Python docs, tempfile.mkstemp); an output must be readable
    # like any file the user creates: 0o666 & ~umask (POSIX.1-2017, open() with O_CREAT).
    if os.name != "posix":
        pytest.skip("POSIX permissions")
    umask = os.umask(0o022)
    try:
        write_output(tmp_path / "a.csv", b"x\n")
    finally:
        os.umask(umask)
    assert (tmp_path / "a.csv").stat().st_mode & 0o777 == 0o644


def test_existing_file_keeps_its_permissions(tmp_path: Path) -> None:
    if os.name != "posix":
        pytest.skip("POSIX permissions")
    target = tmp_path / "a.csv"
    target.write_bytes(b"old\n")
    target.chmod(0o640)
    write_output(target, b"new\n")
    assert target.read_bytes() == b"new\n"
    assert target.stat().st_mode & 0o777 == 0o640


def test_missing_folders_are_created(tmp_path: Path) -> None:
    target = tmp_path / "output" / "p1" / "p1-record.json"
    write_output(target, b"{}\n")
    assert target.read_bytes() == b"{}\n"


@pytest.mark.parametrize("failing_call", [1, 2, 3, 4])
def test_failure_during_the_renames_puts_every_old_file_back(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, failing_call: int
) -> None:
    """A rename failing part-way (1st .. 4th of four) must leave the earlier set as it was."""
    old = _old_set(tmp_path)
    real_replace = os.replace
    calls = {"n": 0}

    def flaky_replace(src: os.PathLike[str] | str, dst: os.PathLike[str] | str) -> None:
        calls["n"] += 1
        if calls["n"] == failing_call:
            raise OSError(errno.EIO, "Input/output error", str(dst))
        real_replace(src, dst)

    monkeypatch.setattr(atomic.os, "replace", flaky_replace)
    with pytest.raises(OutputError) as info:
        write_outputs(_new_set(tmp_path))
    monkeypatch.undo()

    for path, data in old.items():
        assert path.read_bytes() == data
    assert not (tmp_path / "p1-calcs.html").exists()
    assert _leftovers(tmp_path) == []
    assert "\n" not in str(info.value)


def test_disk_full_while_writing_leaves_old_files_and_names_the_fix(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    old = _old_set(tmp_path)
    real_fsync = os.fsync
    calls = {"n": 0}

    def full_fsync(fd: int) -> None:
        calls["n"] += 1
        if calls["n"] == 3:  # the third file of the set hits a full disk
            raise OSError(errno.ENOSPC, "No space left on device")
        real_fsync(fd)

    monkeypatch.setattr(atomic.os, "fsync", full_fsync)
    with pytest.raises(OutputError) as info:
        write_outputs(_new_set(tmp_path))
    monkeypatch.undo()

    for path, data in old.items():
        assert path.read_bytes() == data
    assert _leftovers(tmp_path) == []
    message = str(info.value)
    assert "\n" not in message
    assert "disk is full" in message
    assert info.value.path.parent == tmp_path


def test_read_only_file_system_is_reported_in_one_line(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    old = _old_set(tmp_path)

    def read_only_mkstemp(*args: object, **kwargs: object) -> tuple[int, str]:
        raise OSError(errno.EROFS, "Read-only file system")

    monkeypatch.setattr(atomic.tempfile, "mkstemp", read_only_mkstemp)
    with pytest.raises(OutputError, match=r"^cannot write .*: read-only file system; .*read-only"):
        write_outputs(_new_set(tmp_path))
    monkeypatch.undo()
    for path, data in old.items():
        assert path.read_bytes() == data


@pytest.mark.skipif(
    os.name != "posix" or os.geteuid() == 0, reason="needs POSIX permissions as a normal user"
)
def test_read_only_folder_really_on_disk(tmp_path: Path) -> None:
    old = _old_set(tmp_path)
    tmp_path.chmod(0o555)
    try:
        with pytest.raises(OutputError, match="read-only or not yours"):
            write_outputs(_new_set(tmp_path))
    finally:
        tmp_path.chmod(0o755)
    for path, data in old.items():
        assert path.read_bytes() == data
    assert _leftovers(tmp_path) == []


def test_failed_set_removes_the_folders_it_created(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    def failing_replace(src: object, dst: object) -> None:
        raise OSError(errno.EIO, "Input/output error")

    monkeypatch.setattr(atomic.os, "replace", failing_replace)
    with pytest.raises(OutputError):
        write_outputs({tmp_path / "out" / "p1" / "a.csv": b"x\n"})
    monkeypatch.undo()
    assert list(tmp_path.iterdir()) == []


def test_folder_with_the_file_name_is_reported(tmp_path: Path) -> None:
    (tmp_path / "p1-record.json").mkdir()
    with pytest.raises(OutputError, match="a folder has the output file's name"):
        write_outputs({tmp_path / "a.csv": b"x\n", tmp_path / "p1-record.json": b"{}\n"})
    assert not (tmp_path / "a.csv").exists()
    assert _leftovers(tmp_path) == []


def test_same_file_twice_is_a_programming_error(tmp_path: Path) -> None:
    with pytest.raises(ValueError, match="same output file"):
        write_outputs({tmp_path / "a.csv": b"1", tmp_path / "sub" / ".." / "a.csv": b"2"})


def test_keyboard_interrupt_also_rolls_back(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    old = _old_set(tmp_path)
    real_replace = os.replace
    calls = {"n": 0}

    def interrupted_replace(src: os.PathLike[str] | str, dst: os.PathLike[str] | str) -> None:
        calls["n"] += 1
        if calls["n"] == 2:
            raise KeyboardInterrupt
        real_replace(src, dst)

    monkeypatch.setattr(atomic.os, "replace", interrupted_replace)
    with pytest.raises(KeyboardInterrupt):
        write_outputs(_new_set(tmp_path))
    monkeypatch.undo()
    for path, data in old.items():
        assert path.read_bytes() == data
    assert _leftovers(tmp_path) == []
