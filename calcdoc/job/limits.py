"""Design limits as the job file gives them (``limits:``): validated into :class:`LimitSpec` records.

A limit names a quantity (:mod:`calcdoc.job.quantities`), where it applies (leg names or state labels;
default everywhere it exists), a ``max`` and/or ``min`` in units of that quantity, an optional required
margin (absolute, or a percent of the computed value) and a ``basis`` saying where the limit comes from.
The engine judges them against the results (:mod:`calcdoc.engine.checks`).
"""
from __future__ import annotations

from collections.abc import Callable, Iterable

from .model import Input, LegSpec, LimitSpec
from .quantities import (
    Quantity,
    applies,
    applies_text,
    margin_example,
    percent_margin,
    quantity_named,
    quantity_problem,
)
from .reader import Reader
from .source import Node

__all__ = ["LIMIT_KEYS", "Places", "names_of", "quantity_at", "read_limits"]

LIMIT_KEYS = ("name", "quantity", "at", "max", "min", "margin", "basis")


class Places:
    """The legs and state labels of a job, to resolve ``at:`` names and check quantities against them."""

    def __init__(self, legs: Iterable[LegSpec]) -> None:
        self.legs = [leg.name for leg in legs]
        self.procs = {leg.name: leg.process for leg in legs}
        states = 1
        for leg in legs:
            # a staged compressor becomes "<leg>, stage k" and "<leg>, intercooler k" legs at run time:
            # accept the names and state labels up to what its staging can produce (checked again
            # against the computed legs and states when the limits are judged)
            N = leg.options.staging.most_stages if leg.options.staging is not None else 1
            for k in range(1, N + 1 if N > 1 else 1):
                self.legs.append(f"{leg.name}, stage {k}")
                self.procs[self.legs[-1]] = "compressor"
                if k < N:
                    self.legs.append(f"{leg.name}, intercooler {k}")
                    self.procs[self.legs[-1]] = "cooler"
            states += 2 * N - 1
        self.labels = [str(i + 1) for i in range(states)]

    def valid(self) -> str:
        """The names a place may take, for a message."""
        return (f"legs: {', '.join(repr(n) for n in self.legs)}; states: {', '.join(self.labels)}")

    def check(self, q: Quantity, names: list[tuple[str, Node]], add: Callable[..., None]) -> None:
        """Each named place exists and can carry the quantity."""
        for name, node in names:
            if q.scope == "total":
                add(node, f"{q.name} is a total over the whole train and takes no 'at'", "remove 'at'")
                continue
            if name in self.legs:
                proc = self.procs[name]
                if not applies(q, proc) and not any(self.procs[n] in q.on for n in self.legs
                                                    if n.startswith(f"{name}, intercooler ")):
                    add(node, f"'{name}' is a {proc} leg", f"{applies_text(q)}; name such a leg")
                continue
            if name in self.labels:
                if q.scope in ("leg", "ratio", "change", "end"):
                    add(node, f"{q.name} is a quantity of a leg, but '{name}' is a state label",
                        f"name a leg: {', '.join(repr(n) for n in self.legs)}")
                continue
            import difflib  # only when a name is not known: the suggestion

            close = difflib.get_close_matches(name, self.legs + self.labels, n=1, cutoff=0.6)
            hint = f"did you mean '{close[0]}'? " if close else ""
            add(node, f"this job has no leg or state named '{name}'", f"{hint}{self.valid()}")


def names_of(node: Node | None, add: Callable[..., None]) -> list[tuple[str, Node]]:
    """The names in an ``at:`` value: one name or a list of names (numbers are state labels)."""
    if node is None:
        return []
    items = node.value if node.kind == "seq" else [node]
    out = []
    for item in items:
        if item.kind != "scalar" or item.value is None or isinstance(item.value, bool) or str(item.value).strip() == "":
            add(item, "expected a leg name or a state label", "write for example at: [Stage 1] or at: [2]")
            continue
        out.append((str(item.value), item))
    if node.kind == "seq" and not items:
        add(node, "the list of places is empty", "leave 'at' out to apply the limit everywhere, or name legs or states")
    return out



def quantity_at(r: Reader, qnode: Node | None, atnode: Node | None, system: str,
                places: Places) -> tuple[Quantity | None, list[tuple[str, Node]]]:
    """A quantity named in the job (by name or alias) and the places (``at``) it is asked at, each checked
    against the system and the job's legs and states (shared by limits and solves; problems go to the reader)."""
    qname = r.text(qnode, required=True, what="quantity name") if qnode is not None else ""
    q = quantity_named(qname) if qname else None
    if qname:
        why = quantity_problem(q, qname, system)
        if why:
            assert qnode is not None
            r.add(qnode, *why)
            q = None
    at = names_of(atnode, r.add)
    if q is not None:
        places.check(q, at, r.add)
    return q, at


def read_limits(r: Reader, items: list[Node], system: str, places: Places) -> tuple[LimitSpec, ...]:
    """The job's limits, validated (problems go to the reader)."""
    out: list[LimitSpec] = []
    names: dict[str, Node] = {}
    for item in items:
        m = r.mapping(item, LIMIT_KEYS, what="a limit")
        if not m:
            continue
        before = len(r.problems)
        if "quantity" not in m:
            r.add(item, "missing required key 'quantity'", "for example quantity: temperature",
                  path=f"{item.path}.quantity")
        if "basis" not in m:
            r.add(item, "missing required key 'basis'",
                  "say where the limit comes from: a standard clause, a datasheet, or 'common practice'",
                  path=f"{item.path}.basis")
        if "max" not in m and "min" not in m:
            r.add(item, "the limit gives neither max nor min", "give max:, min: or both")
        q, at = quantity_at(r, m.get("quantity"), m.get("at"), system, places)
        bounds: dict[str, Input | None] = {}
        for key in ("max", "min"):
            if key in m and q is not None:
                bounds[key] = r.quantity(m[key], q.kind, positive=False, record=False)
        lo, hi = bounds.get("min"), bounds.get("max")
        if lo is not None and hi is not None and lo.si > hi.si:
            r.add(item, f"min ({lo.entered}) is above max ({hi.entered})",
                  "give a min below the max")
        margin = None
        if "margin" in m and q is not None:
            margin = r.quantity(m["margin"], q.margin_kind, positive=False, allow_percent=True, record=False,
                                valid="write a value with its unit or a percentage of the computed value, for example '10 %'")
            if margin is not None and margin.si < 0:
                r.add(m["margin"], f"a required margin of {margin.entered} is negative", "give a margin of zero or more")
            if margin is not None and margin.percent:
                _check_percent(r, m["margin"], margin, q, bounds)
        basis = r.text(m.get("basis"), required=True, what="basis")
        name = r.text(m.get("name"), required=True, what="limit name") if "name" in m else ""
        if q is not None and not name:
            name = f"{q.title[0].upper()}{q.title[1:]}" + (f" {'max' if 'max' in m else 'min'}" if "max" not in m or "min" not in m else "")
        if name:
            if name in names:
                r.add(m.get("name", item), f"the limit name '{name}' is used twice (first at line {names[name].where[0]})",
                      "give each limit its own name")
            names[name] = m.get("name", item)
        if len(r.problems) > before or q is None:
            continue
        out.append(LimitSpec(name, q, tuple(n for n, _ in at), bounds.get("max"), bounds.get("min"), margin, basis,
                             item.path, *item.where, at_where=m["at"].where if "at" in m else item.where,
                             percent_zero=_percent_zero(q, bounds, getattr(r, "atm", None))))
    return tuple(out)


def _percent_zero(q: Quantity, bounds: dict[str, Input | None], atm: float | None) -> float | None:
    """The zero a percent of this limit's quantity is measured from (see :class:`LimitSpec`)."""
    kind, _ = percent_margin(q)
    if kind == "percent":
        return 0.0
    if kind == "gauge" and atm is not None and bounds and all(b.gauge for b in bounds.values() if b is not None):
        return atm
    return None


def _check_percent(r: Reader, node: Node, margin: Input, q: Quantity, bounds: dict[str, Input | None]) -> None:
    """A percent margin only where the quantity has a true zero that the trade uses that way."""
    kind, why = percent_margin(q)
    if kind == "percent":
        return
    if kind == "gauge" and bounds and all(b is not None and b.gauge for b in bounds.values()):
        return
    if kind == "gauge":
        r.add(node, f"a percent margin ({margin.entered}) on an absolute pressure limit: {why}",
              f"write the limit as a gauge pressure (for example max: 10 barg) so the margin is a percent of the "
              f"gauge pressure, or give an absolute margin, for example margin: {margin_example(q)}")
        return
    r.add(node, f"a percent margin ({margin.entered}) on {q.title}: {why}",
          f"give an absolute margin in the quantity's units, for example margin: {margin_example(q)}")
