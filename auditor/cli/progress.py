"""A progress bar on stderr while the field solves run.

The pipeline takes a plain callback (``on_step(label)``) and never knows
whether anything is drawn; the command line builds one of these and passes
its :meth:`SolveProgress.step`. When disabled (not a terminal, ``CI`` set,
``--quiet``; see :func:`auditor.cli.colour.use_progress`) it draws nothing.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Mapping
from types import TracebackType
from typing import TextIO

from rich.console import Console
from rich.progress import BarColumn, MofNCompleteColumn, Progress, TaskID, TextColumn

from auditor.cli.colour import use_progress


class SolveProgress:
    """Context manager counting solves towards ``total``.

    Examples
    --------
    >>> import io
    >>> with SolveProgress(2, enabled=False, stream=io.StringIO()) as bar:
    ...     bar.step("BTN1"); bar.step("BTN2")
    >>> bar.done
    2
    """

    def __init__(self, total: int, *, enabled: bool, stream: TextIO) -> None:
        self.total = total
        self.done = 0
        self._progress: Progress | None = None
        self._task: TaskID | None = None
        if enabled:
            console = Console(file=stream, force_terminal=True)
            self._progress = Progress(
                TextColumn("solving"), BarColumn(), MofNCompleteColumn(),
                TextColumn("{task.description}"), console=console, transient=True)

    def __enter__(self) -> SolveProgress:
        if self._progress is not None:
            self._progress.start()
            self._task = self._progress.add_task("", total=self.total)
        return self

    def step(self, label: str = "") -> None:
        """Count one finished solve; ``label`` names the pad just solved."""
        self.done += 1
        if self._progress is not None and self._task is not None:
            self._progress.update(self._task, advance=1, description=label)

    def __exit__(self, exc_type: type[BaseException] | None, exc: BaseException | None,
                 tb: TracebackType | None) -> None:
        if self._progress is not None:
            self._progress.stop()


def progress_for(total: int, quiet: bool = False, stream: TextIO | None = None,
                 env: Mapping[str, str] | None = None) -> SolveProgress:
    """A :class:`SolveProgress` on stderr, drawn only where
    :func:`auditor.cli.colour.use_progress` allows it."""
    target = stream if stream is not None else sys.stderr
    environment = os.environ if env is None else env
    return SolveProgress(total, enabled=use_progress(target, environment, quiet), stream=target)


class ProgressCallback:
    """The pipeline's ``progress(label, done, total)`` callback, drawing a
    :class:`SolveProgress` that is created on the first solve (only then is
    the number of electrodes known) and closed after the last."""

    def __init__(self, quiet: bool = False, stream: TextIO | None = None) -> None:
        self._quiet = quiet
        self._stream = stream
        self._bar: SolveProgress | None = None

    def __call__(self, label: str, done: int, total: int) -> None:
        if self._bar is None:
            self._bar = progress_for(total, self._quiet, self._stream).__enter__()
        self._bar.step(label)
        if done >= total:
            self.close()

    def close(self) -> None:
        """Stop drawing (safe to call twice)."""
        if self._bar is not None:
            self._bar.__exit__(None, None, None)
            self._bar = None
