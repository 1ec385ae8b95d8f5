"""Words of the report for what the engine found: warnings, notes of calcs and facts of legs, each a code
with its values (:class:`calcdoc.errors.Finding`), worded in the job's unit system.

Templates are filled by :func:`calcdoc.units.phrase` (``{P:Pa}``, ``{T:K~4}``, ``{dT:dK}``).
"""
from __future__ import annotations

from ..errors import Finding, PhysicsError
from ..job.messages import found_text
from ..units import phrase

__all__ = ["FACTS", "NOTES", "WARNINGS", "note", "say"]

#: warning code → sentence
WARNINGS: dict[str, str] = {}
#: fact code (a plain statement about a leg) → sentence
FACTS: dict[str, str] = {}
#: note code of a calc (which form was used, what a value means) → text
NOTES: dict[str, str] = {}


def say(item: Finding | str, system: str = "SI") -> str:
    """A warning or a fact in words (text passes through as it is)."""
    if isinstance(item, str):
        return item
    template = WARNINGS.get(item.code) or FACTS.get(item.code)
    if template is None:
        return found_text(item, system)
    values = {k: found_text(v, system) if isinstance(v, (Finding, PhysicsError)) else v for k, v in item.values.items()}
    return phrase(template, values, system)


def note(code: str) -> str:
    """The text of a calc's note (a code of :data:`NOTES`, or text as it is)."""
    return NOTES.get(code, code)
