"""``Calc``: one computed number with everything a checker needs to verify it by hand."""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from ..errors import Finding


@dataclass(frozen=True)
class Term:
    """A named input of an equation: its symbol, SI value and SI unit."""

    symbol: str
    value: float
    unit: str = ""


@dataclass(frozen=True)
class Calc:
    """A value with its symbol, unit, equation and method.

    ``equation`` is the right-hand side in symbols, with every input written as ``{name}`` where
    ``name`` is a key of ``inputs`` (an equation stated in words is a code starting with "~", worded by the
    report, for example ``~v_on_path``); where
    ``name`` is a key of ``inputs``; the report typesets it once with symbols and once with the
    numbers put in. ``method`` is an id in :mod:`calcdoc.methods`, whose entry gives the citation.
    ``note`` says which form was used where there is a choice (for example the n → 1 form).
    """

    symbol: str
    value: float
    unit: str
    equation: str
    method: str
    inputs: dict[str, Term] = field(default_factory=dict)
    note: str | Finding = ""     # a note code (its words are the report's), or a code with values
    difference: bool = False   # a temperature difference (shown in K or °R, never °C/°F)

    def as_json(self) -> dict[str, Any]:
        """The value as a quantity of the results file."""
        return {"value": self.value, "unit": self.unit}

    def trace(self) -> dict[str, Any]:
        """The calculation as data, for the results file."""
        return {
            "symbol": self.symbol,
            "value": self.value,
            "unit": self.unit,
            "equation": self.equation,
            "inputs": {k: {"symbol": t.symbol, "value": t.value, "unit": t.unit} for k, t in self.inputs.items()},
            "method": self.method,
            "note": self.note,
        }


def given(symbol: str, value: float, unit: str, method: str = "input") -> Calc:
    """A value taken as given (an input or a property from the equation of state)."""
    return Calc(symbol, value, unit, "", method)
