"""Problems the user can fix, and the exceptions that carry them.

A `Problem` names where (file, line), what (dotted config key or record id)
and why. Config validation and ingest both use it, so every message the user
sees has the same shape.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path


@dataclass(frozen=True)
class Problem:
    path: Path
    line: int | None
    key: str  # dotted config key, e.g. "score.threshold"; a record id or field for input problems
    message: str

    def __str__(self) -> str:
        where = f"{self.path}:{self.line}" if self.line else str(self.path)
        return f"{where}: {self.key}: {self.message}" if self.key else f"{where}: {self.message}"


class ReporterError(Exception):
    """A failure the user can fix; the CLI prints it and exits with status 1."""

    def __init__(self, problems: list[Problem] | Problem | str):
        if isinstance(problems, str):
            self.problems: list[Problem] = []
            text = problems
        else:
            self.problems = [problems] if isinstance(problems, Problem) else list(problems)
            text = "\n".join(str(p) for p in self.problems)
        super().__init__(text)


class ConfigError(ReporterError):
    """The configuration file is missing, unreadable or invalid."""


class InputError(ReporterError):
    """An input file is missing or cannot be read at all."""


class OutputError(ReporterError):
    """A file would be written outside the output folder."""


class FrameworkError(ReporterError):
    """A goal framework file is invalid."""


class ModelError(ReporterError):
    """The sentence-embedding model cannot be loaded."""


class ComparisonError(ReporterError):
    """Results from runs that are not like-for-like were asked to be compared."""
