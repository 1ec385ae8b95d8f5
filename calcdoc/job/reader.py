"""Reading plain values and quantities out of the YAML nodes of a job file, collecting every problem.

One reader serves every section of the job file (title block, gas, start, legs and their options,
limits, sweep), so that each message has the same shape: file:line:column, the key path, what was
found and what would be valid.
"""
from __future__ import annotations

import datetime as _dt
import math

from .. import units
from ..errors import Problem
from .model import Drop, Input
from .source import Node

__all__ = ["Reader", "describe"]

#: Longest text a job file may give in one value (a title, a name, a note) [characters].
MAX_TEXT = 2000


def describe(node: Node) -> str:
    """What a node holds, in words, for a message."""
    if node.kind == "map":
        return "a mapping"
    if node.kind == "seq":
        return "a list"
    v = node.value
    if v is None:
        return "nothing"
    if isinstance(v, bool):
        return f"the boolean {str(v).lower()}"
    if isinstance(v, (int, float)):
        return f"the number {v}"
    text = str(v)
    return f"'{text[:60]}…'" if len(text) > 60 else f"'{text}'"


def _g(x: float) -> str:
    return f"{x:.6g}"


class Reader:
    """Reads values from nodes; ``problems`` collects what is wrong, ``inputs`` every quantity read."""

    def __init__(self, name: str, atmosphere: float | None = None, required_hints: dict[str, str] | None = None):
        self.name = name
        self.problems: list[Problem] = []
        self.inputs: list[Input] = []
        self.where: dict[str, tuple[int, int]] = {}
        self.atm = atmosphere
        self.system: units.Units = "SI"   # the job's units, for values in messages
        self.hints = required_hints or {}

    def add(self, node: Node, found: str, valid: str = "", path: str | None = None) -> None:
        """Record a problem at a node (or at ``path``, located at the node)."""
        line, col = node.where
        self.problems.append(Problem(self.name, line, col, node.path if path is None else path, found, valid))

    def mapping(self, node: Node, allowed: tuple[str, ...], required: tuple[str, ...] = (),
                what: str = "") -> dict[str, Node]:
        """The allowed keys of a mapping; unknown keys (with the closest valid one) and missing required keys
        are problems."""
        if node.kind != "map":
            self.add(node, f"expected a mapping of keys{(' for ' + what) if what else ''}, found {describe(node)}",
                     f"valid keys here: {', '.join(allowed)}")
            return {}
        self.where[node.path] = node.where
        suggested: set[str] = set()
        for key, child in node.value.items():
            self.where[child.path] = child.where
            if key not in allowed:
                import difflib  # only when a name is not known: the suggestion

                close = difflib.get_close_matches(key, allowed, n=1, cutoff=0.6)
                hint = f"did you mean '{close[0]}'? " if close else ""
                if close and close[0] in required and close[0] not in node.value:
                    suggested.add(close[0])
                    hint = f"did you mean '{close[0]}' (a required key)? "
                self.add(child, f"unknown key '{key}'" + (f" in {what}" if what else ""),
                         f"{hint}valid keys here: {', '.join(allowed)}")
        for key in required:
            if key not in node.value and key not in suggested:
                self.add(node, f"missing required key '{key}'", self.hints.get(key, ""),
                         path=f"{node.path}.{key}" if node.path else key)
        return {k: c for k, c in node.value.items() if k in allowed}

    def seq(self, node: Node | None) -> list[Node]:
        """The items of a list (a problem if the node is not one)."""
        if node is None:
            return []
        if node.kind != "seq":
            self.add(node, f"expected a list, found {describe(node)}", "write a list, one item a line starting with '- '")
            return []
        self.where[node.path] = node.where
        for item in node.value:
            self.where[item.path] = item.where
        return list(node.value)

    def text(self, node: Node | None, default: str = "", required: bool = False, what: str = "text",
             most: int = MAX_TEXT) -> str:
        """A plain text (dates as ISO text) of at most ``most`` characters; ``required`` refuses an empty or
        blank text."""
        if node is None:
            return default
        if node.kind != "scalar" or node.value is None or isinstance(node.value, bool):
            self.add(node, f"expected {what}, found {describe(node)}", "write plain text")
            return default
        if isinstance(node.value, (_dt.date, _dt.datetime)):
            return node.value.isoformat()
        text = str(node.value)
        if len(text) > most:
            self.add(node, f"the text is {len(text):,} characters long", f"write at most {most:,} characters here")
            return default
        if required and not text.strip():
            self.add(node, f"the {what} is empty", f"write the {what}")
            return default
        return text

    def number(self, node: Node, lo: float | None = None, hi: float | None = None, lo_open: bool = False,
               hi_open: bool = False, what: str = "a number") -> float | None:
        """A plain number within [lo, hi] (open ends where asked)."""
        val = node.value
        if node.kind == "scalar" and isinstance(val, str):
            try:
                val = float(val)
            except ValueError:
                pass
        if isinstance(val, int) and not isinstance(val, bool):
            try:
                val = float(val)
            except OverflowError:
                self.add(node, f"the number {str(node.value)[:40]}… is beyond floating-point range",
                         "write a number of a sensible size")
                return None
        if node.kind != "scalar" or isinstance(val, bool) or not isinstance(val, float) or not math.isfinite(val):
            self.add(node, f"expected {what}, found {describe(node)}", "write a plain number, for example 1.3")
            return None
        if (lo is not None and (val < lo or (lo_open and val == lo))) or \
                (hi is not None and (val > hi or (hi_open and val == hi))):
            rng = (f"{'(' if lo_open else '['}{'' if lo is None else _g(lo)}, "
                   f"{'' if hi is None else _g(hi)}{')' if hi_open else ']'}")
            self.add(node, f"{what} of {_g(val)} is out of range", f"valid range is {rng}")
            return None
        return val

    def integer(self, node: Node, lo: int, hi: int, what: str) -> int | None:
        """A whole number from lo to hi."""
        v = node.value
        if node.kind != "scalar" or isinstance(v, bool) or not isinstance(v, int) or not lo <= v <= hi:
            self.add(node, f"{what} must be a whole number from {lo} to {hi}, found {describe(node)}",
                     f"for example {lo + 1}")
            return None
        return v

    def enum(self, node: Node | None, choices: tuple[str, ...], default: str | None = None) -> str | None:
        """One of the choices (case-insensitive, as the trade writes Polytropic, REAL, si)."""
        if node is None:
            return default
        val = node.value if node.kind == "scalar" else None
        if isinstance(val, str) and val not in choices:
            folded = {c.casefold(): c for c in choices}
            val = folded.get(val.strip().casefold(), val)
        if not isinstance(val, str) or val not in choices:
            import difflib  # only when a name is not known: the suggestion

            close = difflib.get_close_matches(str(val), choices, n=1, cutoff=0.6) if isinstance(val, str) else []
            hint = f"did you mean '{close[0]}'? " if close else ""
            self.add(node, f"{describe(node) if not isinstance(node.value, str) else repr(node.value)} is not one of "
                     "the choices", f"{hint}valid: {', '.join(choices)}")
            return None
        return val

    def quantity(self, node: Node | None, kind: str, positive: bool = True, allow_percent: bool = False,
                 allow_gauge: bool = True, record: bool = True, valid: str = "") -> Input | None:
        """A quantity with its unit, parsed into SI (gauge pressures made absolute with the site atmosphere).

        ``record`` lists it among the job's inputs (the report's input table); ``valid`` replaces the
        suggestion of what would be valid in a unit message.
        """
        if node is None:
            return None
        if node.kind != "scalar":
            self.add(node, f"expected a {kind.replace('_', ' ')} with its unit, found {describe(node)}",
                     "write a number and a unit on one line, for example 'pressure: 7 barg'")
            return None
        try:
            parsed = units.parse_quantity(node.value, kind, atmosphere=self.atm, allow_percent=allow_percent)
        except units.UnitParseError as exc:
            self.add(node, exc.found, valid or exc.valid)
            return None
        if parsed.gauge and not allow_gauge:
            self.add(node, f"'{parsed.entered}' is a gauge pressure", "give this value as an absolute pressure")
            return None
        if not math.isfinite(parsed.si):
            self.add(node, f"'{parsed.entered}' is not a finite value", "write a finite number")
            return None
        if positive and parsed.si <= 0.0:
            if kind == "pressure" and parsed.gauge and self.atm is not None:
                self.add(node, f"'{parsed.entered}' is below full vacuum (absolute pressure "
                         f"{units.say(parsed.si, 'Pa', self.system, 4)} with the site atmosphere of "
                         f"{units.say(self.atm, 'Pa', self.system, 4)})",
                         "a gauge pressure cannot be lower than minus the atmospheric pressure")
            elif kind == "temperature":
                self.add(node, f"'{parsed.entered}' is at or below absolute zero",
                         "give a temperature above 0 K (−273.15 °C)")
            else:
                self.add(node, f"'{parsed.entered}' is not positive", f"a {kind.replace('_', ' ')} must be greater than zero")
            return None
        inp = Input(parsed.si, parsed.unit, parsed.entered, node.path, *node.where, gauge=parsed.gauge,
                    percent=parsed.percent, kind=kind)
        if record:
            self.inputs.append(inp)
        return inp

    def fraction(self, node: Node, what: str) -> Input | None:
        """An efficiency: a plain number in (0, 1] or a percentage ('82 %')."""
        try:
            p = units.parse_quantity(node.value if node.kind == "scalar" else None, "dimensionless")
        except units.UnitParseError as exc:
            self.add(node, f"{what}: {exc.found}", "write a number from 0 to 1, for example 0.78, or a percentage")
            return None
        if not 0.0 < p.si <= 1.0:
            self.add(node, f"{what} of {p.entered} is outside (0, 1]",
                     "an efficiency is greater than 0 and at most 1 (100 %)")
            return None
        inp = Input(p.si, "", p.entered, node.path, *node.where, percent=p.percent)
        self.inputs.append(inp)
        return inp

    def drop(self, node: Node) -> Drop:
        """A pressure drop: a pressure difference ('0.3 bar') or a percentage of the inlet pressure ('2 %')."""
        try:
            p = units.parse_quantity(node.value if node.kind == "scalar" else None, "pressure_difference",
                                     allow_percent=True)
        except units.UnitParseError as exc:
            self.add(node, exc.found, "give the pressure drop as a pressure difference ('0.3 bar') or a "
                     "percentage of the inlet pressure ('2 %')")
            return Drop()
        inp = Input(p.si, p.unit, p.entered, node.path, *node.where, percent=p.percent, kind="pressure_difference")
        if not (p.si >= 0) or not math.isfinite(p.si) or (p.percent and p.si >= 1.0):
            self.add(node, f"a pressure drop of {p.entered} is not possible",
                     "give a drop of zero or more, and below 100 % of the inlet pressure")
            return Drop()
        self.inputs.append(inp)
        return Drop(fraction=p.si, inp=inp) if p.percent else Drop(absolute=p.si, inp=inp)
