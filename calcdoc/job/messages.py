"""Problems of the job file that only computing shows, in words: the engine and the physics report them as
codes with values (:class:`calcdoc.errors.Finding`, :class:`calcdoc.errors.PhysicsError`); this module words
them in the job's units and locates them at the key they concern (file:line:column).

Each entry is (what was found, what would be valid), templates filled by :func:`calcdoc.units.phrase`:
``{P:Pa}`` is a pressure shown in the job's units, ``{T:K~4}`` a temperature to four figures, ``{dT:dK}`` a
temperature difference; a value that is itself a finding is worded first.
"""
from __future__ import annotations

from ..errors import Finding, PhysicsError, Problem
from ..units import phrase
from .model import Job

__all__ = ["MESSAGES", "found_text", "problem"]

#: code → (found, valid)
MESSAGES: dict[str, tuple[str, str]] = {}


def found_text(f: Finding | PhysicsError, system: str = "SI") -> str:
    """What a finding (or a physics error) says, in the unit system."""
    if isinstance(f, PhysicsError):
        f = f.finding
    found, _ = MESSAGES.get(f.code, (f.code, ""))
    return phrase(found, _worded(f.values, system), system)


def valid_text(f: Finding, system: str = "SI") -> str:
    """What would be valid instead, in the unit system."""
    _, valid = MESSAGES.get(f.code, ("", ""))
    return phrase(valid, _worded(f.values, system), system)


def _worded(values: dict, system: str) -> dict:
    return {k: found_text(v, system) if isinstance(v, (Finding, PhysicsError)) else v for k, v in values.items()}


def problem(job: Job, f: Finding) -> Problem:
    """A finding as a problem of the job file, at the key it concerns."""
    line, col = job.locate(f.path)
    return Problem(job.name, line, col, f.path, found_text(f, job.units), valid_text(f, job.units))
