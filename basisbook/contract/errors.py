"""Input problems, reported with file, line, key and what was expected.

Bad input is never a traceback: the CLI collects ``Problem`` objects and
prints them all, then exits with code 2.
"""

from __future__ import annotations

from dataclasses import dataclass


class InputConflict(ValueError):
    """Raised by a calc's compute() when inputs that each pass their own range
    cannot be true together (e.g. x_q > x_d on a salient-pole machine)."""

    def __init__(self, key: str, message: str):
        super().__init__(f"{key}: {message}")
        self.key = key
        self.message = message


@dataclass(frozen=True)
class Problem:
    file: str
    line: int | None
    key: str
    message: str

    def __str__(self) -> str:
        where = self.file if self.line is None else f"{self.file}:{self.line}"
        key = f" [{self.key}]" if self.key else ""
        return f"{where}:{key} {self.message}"


class ProjectError(Exception):
    """One or more problems with the project's inputs (exit code 2)."""

    def __init__(self, problems: list[Problem]):
        self.problems = problems
        super().__init__("\n".join(str(p) for p in problems))


class EnvironmentFailure(Exception):
    """The machine, not the input, stopped the command: a full disk, a read-only folder, a
    port in use, another build holding the output folder (exit code 1, one line)."""
