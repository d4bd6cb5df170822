"""User-facing errors.

Library code only raises; :mod:`acceptance.cli` is the one place that prints
them and chooses an exit code. Every input problem carries its location so it
can be shown as ``file:line:column: key.path: message``.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

__all__ = ["AcceptanceError", "InputError", "Problem", "BuildError"]


@dataclass(frozen=True, order=True)
class Problem:
    """One thing wrong with one input file."""

    file: str
    line: int
    column: int
    key_path: str
    message: str

    def __str__(self) -> str:
        where = f"{self.file}:{self.line}:{self.column}"
        key = f" {self.key_path}:" if self.key_path else ""
        return f"{where}:{key} {self.message}"


class AcceptanceError(Exception):
    """Base of every error the command line reports without a traceback."""

    exit_code = 2


class InputError(AcceptanceError):
    """One or more problems in the job folder; all of them, not just the first."""

    def __init__(self, problems: list[Problem]):
        self.problems = sorted(set(problems))
        super().__init__("\n".join(str(p) for p in self.problems))

    @classmethod
    def single(cls, file: str | Path, message: str, line: int = 1, column: int = 1,
               key_path: str = "") -> InputError:
        return cls([Problem(str(file), line, column, key_path, message)])


class BuildError(AcceptanceError):
    """The build could not be completed; the previous output is left untouched."""

    exit_code = 3
