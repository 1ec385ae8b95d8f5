"""Solving for an input as the job file gives it (``solve:``), and the words of its problems.

```yaml
solve:
  vary: start.volume                  # a path into the job, as a sweep's input
  between: [10 L, 500 L]              # the bracket, in the units of the varied input
  so_that: {quantity: volume_change, at: Discharge, equals: 20 L}
```

The target names a quantity of the one table (:mod:`calcdoc.job.quantities`) that limits and sweeps use,
at one place. Each trial of the engine's root search is the job file with the varied value written in its
place (:func:`calcdoc.job.vary.with_text`), read and validated as a separate job file would be.
A job cannot both sweep and solve: the sweep's points would each need a solve of their own, which is not
what a reader of the job file would expect from one sweep; the message says how to do either.
"""
from __future__ import annotations

import json
import re

from .. import units
from ..errors import Problem
from .limits import Places, quantity_at
from .model import Input, Job, SolveSpec
from .quantities import Quantity
from .reader import Reader, describe
from .source import Node
from .sweep import _block_span, resolve_path

__all__ = ["SOLVE_KEYS", "SO_THAT_KEYS", "bracket_problem", "places_problem", "read_solve", "trial_problem",
           "trial_text", "unsolved_problem"]

SOLVE_KEYS = ("vary", "between", "so_that")
SO_THAT_KEYS = ("quantity", "at", "equals")
_NUM = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")


def read_solve(r: Reader, tree: Node, system: str, places: Places, inputs: list[Input]) -> SolveSpec | None:
    """The job's solve, validated (problems go to the reader); None when the job has none."""
    node = tree.value.get("solve")
    if node is None:
        return None
    m = r.mapping(node, SOLVE_KEYS, required=SOLVE_KEYS, what="the solve")
    if not m:
        return None
    before = len(r.problems)
    if "sweep" in tree.value:
        r.add(node, "this job has both a sweep and a solve",
              "a solved job is computed at the one value that meets its target: solve in this job file, then "
              "sweep a copy that gives the solved value in place of the solve block")
    target: Node | None = None
    inp: Input | None = None
    if "vary" in m:
        text = r.text(m["vary"], required=True, what="input path")
        if text:
            target, why = resolve_path(tree, text, inputs)
            if why or target is None:
                r.add(m["vary"], f"cannot vary '{text}': {why}", _could_mean(text, inputs))
            else:
                path = target.path
                inp = next(i for i in inputs if i.path == path)
    bracket: tuple[float, float] | None = None
    entered: tuple[str, str] | None = None
    unit = ""
    if "between" in m:
        b = m["between"]
        if b.kind != "seq" or len(b.value) != 2 or any(it.kind != "scalar" for it in b.value):
            r.add(b, f"expected a list of two values, found {describe(b)}", "write between: [10 L, 500 L]")
        else:
            bracket, entered, unit = _bracket(r, b, inp)
    q: Quantity | None = None
    at: tuple[str, ...] = ()
    equals: Input | None = None
    if "so_that" in m:
        sm = r.mapping(m["so_that"], SO_THAT_KEYS, required=("quantity", "equals"), what="the target of the solve")
        q, names = quantity_at(r, sm.get("quantity"), sm.get("at"), system, places)
        if len(names) > 1:
            r.add(sm["at"], f"the target names {len(names)} places", "name one leg or state: the solve meets one value")
        if q is not None:
            if "equals" in sm:
                equals = r.quantity(sm["equals"], q.kind, positive=False, record=False)
        at = tuple(n for n, _ in names)
    if len(r.problems) > before or target is None or bracket is None or entered is None or q is None \
            or equals is None:
        return None
    where = {"vary": m["vary"].where, "between": m["between"].where, "so_that": m["so_that"].where,
             "at": m["so_that"].value["at"].where if "at" in m["so_that"].value else m["so_that"].where}
    return SolveSpec(str(m["vary"].value), target.path, target.span, _block_span(tree, "solve"), unit, bracket,
                     entered, q, at, equals, node.path, where)


def _could_mean(text: str, inputs: list[Input]) -> str:
    paths = [i.path for i in inputs]
    import difflib  # only when a name is not known: the suggestion

    close = difflib.get_close_matches(text, paths, n=4, cutoff=0.4)
    shown = close or paths[:12]
    return "name a quantity the job gives; paths that could be meant: " + ", ".join(shown)


def _bracket(r: Reader, b: Node, inp: Input | None) -> tuple[tuple[float, float] | None, tuple[str, str] | None, str]:
    """The two ends of the bracket as numbers in one unit, each checked as a value of the varied input."""
    a_node, b_node = b.value
    ma, mb = (_NUM.match(str(n.value)) if not isinstance(n.value, bool) else None for n in (a_node, b_node))
    if not ma or not mb:
        r.add(b, "each end of the bracket must be a number with the unit of the varied input",
              "write between: [10 L, 500 L]")
        return None, None, ""
    if ma.group("unit") != mb.group("unit"):
        r.add(b, f"the ends are in '{ma.group('unit')}' and '{mb.group('unit')}'", "write both ends in the same unit")
        return None, None, ""
    x0, x1 = float(ma.group("num")), float(mb.group("num"))
    if x0 == x1:
        r.add(b, "the two ends of the bracket are the same value", "give a bracket with two different ends")
        return None, None, ""
    if inp is not None:
        for n in (a_node, b_node):
            if inp.kind and inp.kind != "dimensionless":
                r.quantity(n, inp.kind, positive=False, record=False)
            else:
                r.number(n, what="a plain number (the varied input has no unit)")
    return (min(x0, x1), max(x0, x1)), (str(a_node.value), str(b_node.value)), ma.group("unit")


def trial_text(spec: SolveSpec, x: float) -> str:
    """The YAML text of the varied value at x (a number in the bracket's unit)."""
    t = f"{x:.15g}"
    return json.dumps(f"{t} {spec.unit}") if spec.unit else t


def _spec(job: Job) -> SolveSpec:
    assert job.solve is not None, "the job has a solve"
    return job.solve


def _show(job: Job, value: float) -> str:
    """A value of the target quantity in the job's units, and in the unit the target was written in."""
    sp = _spec(job)
    q = sp.quantity
    if not q.unit:
        return f"{value:.7g}"
    text = units.say(value, q.unit, job.units, 7)
    m = _NUM.match(sp.equals.entered)
    unit = m.group("unit") if m else ""
    if unit and q.kind not in ("temperature", "pressure") and unit not in text:
        try:
            text += f" ({value / units.to_si(1.0, unit, q.kind):.7g} {unit})"
        except Exception:  # pint raises several unrelated types; the value in the job's units stands alone
            pass
    return text


def _at(job: Job, key: str, found: str, valid: str) -> Problem:
    sp = _spec(job)
    line, col = sp.where[key]
    return Problem(job.name, line, col, f"{sp.path}.{key}", found, valid)


def bracket_problem(job: Job, fa: float, fb: float) -> Problem:
    """The ends of the bracket do not straddle the target: the values achieved at both ends."""
    sp = _spec(job)
    side = "above" if fa > sp.equals.si else "below"
    return _at(job, "between", f"the bracket does not straddle the target: {sp.quantity.name} is {_show(job, fa)} at "
               f"{sp.vary} = {sp.entered[0]} and {_show(job, fb)} at {sp.entered[1]}, both {side} the target "
               f"{_show(job, sp.equals.si)}",
               "choose ends at which the achieved values lie on either side of the target")


def trial_problem(job: Job, x: float, why: str) -> Problem:
    """The job cannot be computed at a point inside the bracket."""
    sp = _spec(job)
    at = f"{x:.6g}" + (f" {sp.unit}" if sp.unit else "")
    return _at(job, "between", f"the job cannot be computed at {sp.vary} = {at}, inside the bracket: {why}",
               "narrow the bracket to values this job can be computed at")


def places_problem(job: Job, places: list[str]) -> Problem:
    """The target quantity exists at more than one place, and the solve names none."""
    sp = _spec(job)
    return _at(job, "at", f"{sp.quantity.name} exists at {len(places)} places ({'; '.join(places)})",
               "name the one place the target applies to with at:")


def unsolved_problem(job: Job, iterations: int) -> Problem:
    """The root search did not converge within its iterations."""
    return _at(job, "between", f"the solve did not converge in {iterations} iterations",
               "narrow the bracket around the target")
