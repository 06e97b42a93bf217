"""Progress of a build, stage by stage ("detailing 120/500").

The build reports to a :class:`Progress`; it never prints. :data:`SILENT` ignores everything
(the default, and what the tests and library callers get); :func:`terminal_progress` draws a
progress bar on a terminal with tqdm, imported only when a bar is drawn.
"""

from __future__ import annotations

__all__ = ["SILENT", "Progress", "terminal_progress"]

from typing import Protocol, TextIO


class Progress(Protocol):
    def start(self, stage: str, total: int) -> None:
        """A stage of ``total`` steps begins (the previous one, if any, is finished)."""

    def advance(self, steps: int = 1) -> None:
        """``steps`` more steps of the current stage are done."""

    def close(self) -> None:
        """The build is over (finished or failed): remove or finish the bar."""


class _Silent:
    def start(self, stage: str, total: int) -> None:
        pass

    def advance(self, steps: int = 1) -> None:
        pass

    def close(self) -> None:
        pass


SILENT: Progress = _Silent()


class _Bar:
    """One tqdm bar per stage, on ``stream`` (stderr), left on screen when the stage ends."""

    def __init__(self, stream: TextIO) -> None:
        self._stream = stream
        self._bar = None

    def start(self, stage: str, total: int) -> None:
        from tqdm import tqdm

        self.close()
        self._bar = tqdm(
            total=total,
            desc=f"{stage:<10}",
            unit="strip",
            file=self._stream,
            leave=True,
            dynamic_ncols=True,
            mininterval=0.2,
            bar_format="{desc} {percentage:3.0f}%|{bar}| {n_fmt}/{total_fmt} [{elapsed}<{remaining}]",
        )

    def advance(self, steps: int = 1) -> None:
        if self._bar is not None:
            self._bar.update(steps)

    def close(self) -> None:
        if self._bar is not None:
            self._bar.close()
            self._bar = None


def terminal_progress(stream: TextIO) -> Progress:
    """A progress bar on ``stream``."""
    return _Bar(stream)
