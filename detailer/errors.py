"""Input errors: one clear line per mistake, naming the file, the line, the key and a fix.

``str(ProjectError)`` reads like a compiler message::

    project.yaml:12: strips[0].spans_mm[1]: must be > 0 (got -4200); give the span length in mm
"""

from __future__ import annotations

__all__ = ["DesignError", "InputError", "ProjectError", "ProjectErrors", "format_key_path"]

from collections.abc import Iterable, Sequence


class InputError(Exception):
    """Base of every error caused by the user's input (never by a bug in slabwright)."""


def format_key_path(path: Iterable[str | int]) -> str:
    """``("strips", 0, "spans_mm", 1)`` -> ``"strips[0].spans_mm[1]"``."""
    out = ""
    for part in path:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += f".{part}" if out else str(part)
    return out


class ProjectError(InputError):
    """One mistake in a project file.

    ``file`` is the path as the user gave it, ``line`` is 1-based (None when unknown, e.g. the
    file cannot be read), ``key_path`` the dotted place in the file (empty for the whole file),
    ``message`` what is wrong and ``fix`` what to do about it.
    """

    def __init__(
        self,
        file: str,
        message: str,
        *,
        line: int | None = None,
        key_path: str = "",
        fix: str = "",
    ) -> None:
        self.file = str(file)
        self.line = line
        self.key_path = key_path
        self.message = message
        self.fix = fix
        super().__init__(self._one_line())

    def _one_line(self) -> str:
        place = self.file if self.line is None else f"{self.file}:{self.line}"
        parts = [place]
        if self.key_path:
            parts.append(self.key_path)
        text = self.message if not self.fix else f"{self.message}; {self.fix}"
        parts.append(text)
        # One line whatever the user typed: newlines in a quoted value would break it.
        return ": ".join(parts).replace("\r", " ").replace("\n", " ")

    def __str__(self) -> str:
        return self._one_line()


class ProjectErrors(ProjectError):
    """Several mistakes found at once. Behaves as the first one; ``errors`` holds them all."""

    def __init__(self, errors: Sequence[ProjectError]) -> None:
        if not errors:
            raise ValueError("ProjectErrors needs at least one error")
        first = errors[0]
        super().__init__(
            first.file, first.message, line=first.line, key_path=first.key_path, fix=first.fix
        )
        self.errors: tuple[ProjectError, ...] = tuple(errors)


class DesignError(InputError):
    """The project is valid but cannot be designed as given (a check fails): one line naming
    the strip, the zone or check, and what to change (thicker slab, more bar sizes, ...)."""
