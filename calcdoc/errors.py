"""The small family of errors calcdoc raises.

The library raises; only the command line turns an error into a message and an exit code.
"""
from __future__ import annotations

from dataclasses import dataclass

__all__ = ["EXIT_BAD_INPUT", "EXIT_CHECK_FAILED", "EXIT_INTERNAL", "EXIT_INTERRUPTED", "EXIT_OK", "CalcdocError",
           "JobError", "PhysicsError", "Problem"]

#: Exit codes of the command line: success, a design check fails (outputs still written), bad input,
#: an internal error, and interrupted (128 + SIGINT).
EXIT_OK, EXIT_CHECK_FAILED, EXIT_BAD_INPUT, EXIT_INTERNAL, EXIT_INTERRUPTED = 0, 1, 2, 3, 130


class CalcdocError(Exception):
    """Base of every error calcdoc raises on purpose."""


@dataclass(frozen=True)
class Problem:
    """One thing wrong with a job file, located as precisely as we can.

    file, line and column point at the offending key or value (line and column 1-based; 0 when
    unknown); ``path`` is the key path in the job (``legs[2].end.pressure``); ``found`` says what
    was there and ``valid`` what would be accepted.
    """

    file: str
    line: int
    column: int
    path: str
    found: str
    valid: str = ""

    def __str__(self) -> str:
        where = self.file
        if self.line:
            where += f":{self.line}:{self.column}" if self.column else f":{self.line}"
        text = f"{where}: {self.path or '(job)'}: {self.found}"
        if self.valid:
            text += f"; {self.valid}"
        return text


class JobError(CalcdocError):
    """Bad input: one or more problems in a job file (exit code 2)."""

    def __init__(self, problems: list[Problem]):
        self.problems = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))


class PhysicsError(CalcdocError):
    """A state or path outside what the gas model can compute (exit code 2).

    ``where`` names the job item (a leg or state), so the message can point into the job file.
    """

    def __init__(self, message: str, where: str = ""):
        self.where = where
        super().__init__(message)
