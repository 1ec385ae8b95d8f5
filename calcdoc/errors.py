"""The small family of errors calcdoc raises.

The library raises; only the command line turns an error into a message and an exit code.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

__all__ = ["EXIT_BAD_INPUT", "EXIT_CHECK_FAILED", "EXIT_INTERNAL", "EXIT_INTERRUPTED", "EXIT_OK", "CalcdocError",
           "Finding", "JobError", "PhysicsError", "Problem"]

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


@dataclass(frozen=True)
class Finding:
    """Something found while computing, as a code with its values (SI floats, names, counts); the layer that
    speaks to the user words it (:mod:`calcdoc.job.messages` for problems of the job file,
    :mod:`calcdoc.report.words` for warnings and notes), in the job's units.

    ``path`` is the key path of the job file the finding concerns (``legs[2].end.pressure``), or "".
    """

    code: str
    values: dict[str, Any] = field(default_factory=dict)
    path: str = ""

    def __str__(self) -> str:
        return self.code + (" " + ", ".join(f"{k}={v!r}" for k, v in self.values.items()) if self.values else "")


class PhysicsError(CalcdocError):
    """A state or path outside what the gas model can compute (exit code 2): a code and its values (SI).

    Raised as ``PhysicsError("eos.range", T=..., P=...)``; :mod:`calcdoc.job.messages` words it where it
    becomes a problem of the job file.
    """

    def __init__(self, code: str, /, **values: Any) -> None:
        self.code = code
        self.values = values
        super().__init__(str(Finding(code, values)))

    @property
    def finding(self) -> Finding:
        """The error as a finding."""
        return Finding(self.code, dict(self.values))
