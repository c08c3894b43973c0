"""The tool's own exceptions.

Everything padaudit raises on bad input derives from :class:`PadauditError`;
the command line turns any of them into one line on stderr and exit code 2.
Anything else escaping is an internal error (exit code 3).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # only a type here; pathlib costs start-up time of --version
    from pathlib import Path


class PadauditError(Exception):
    """Base of every error caused by the user's input or options."""


class UsageError(PadauditError):
    """A command-line option or configuration value is not acceptable."""


class LocatedError(PadauditError):
    """An error in one input file, at a line and column where known.

    Parameters
    ----------
    path:
        The file at fault.
    message:
        What is wrong, in one line.
    line, column:
        1-based position of the offending token where known.
    """

    def __init__(self, path: str | Path, message: str, line: int | None = None,
                 column: int | None = None) -> None:
        self.path = str(path)
        self.message = message
        self.line = line
        self.column = column
        super().__init__(self.__str__())

    def __str__(self) -> str:
        return _located(self.path, self.line, self.column, self.message)


class ConfigError(LocatedError):
    """A configuration, profile or project file is malformed."""


class BoardFileError(LocatedError):
    """A board file cannot be read.

    Examples
    --------
    >>> str(BoardFileError("a.kicad_pcb", "unbalanced parenthesis", 3, 7))
    'a.kicad_pcb:3:7: unbalanced parenthesis'
    """


def _located(path: str, line: int | None, column: int | None, message: str) -> str:
    where = path
    if line is not None:
        where += f":{line}"
        if column is not None:
            where += f":{column}"
    return f"{where}: {message}"
