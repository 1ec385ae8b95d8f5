"""Design limits and margins: the job's ``limits:`` list, validated, then judged against the results.

A limit names a quantity (a property of a state, a quantity of a leg, or a ratio of a leg), where it
applies (leg names or state labels; default everywhere it exists), a ``max`` and/or ``min`` in units
of that quantity, an optional required margin (absolute, or a percent of the computed value) and a
``basis`` saying where the limit comes from. Each (limit, bound, place) becomes one :class:`Check`.

Margin: ``limit − value`` for a maximum, ``value − limit`` for a minimum, in the quantity's unit and
in percent of the computed value (absolute temperature in K). A check passes when the margin is at
least the required margin (zero when none is required): a value exactly at its limit passes. Values
within one part in 10⁹ of the limit count as at the limit (round-off of unit conversions).

A limit on something this job does not have (a misspelt leg, power in a closed system) is bad
input (:class:`JobError` naming file:line), never a silent pass.
"""
from __future__ import annotations

import dataclasses
import math
from typing import Any, NoReturn

from ..errors import Finding, JobError
from ..job.messages import problem
from ..job.model import Job, LimitSpec
from ..job.quantities import QUANTITIES, SIGNED, Quantity, applies, applies_text, place_text
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from .results import Check, Results, StateRecord

__all__ = ["REL_TOL", "evaluate", "judge", "locations", "with_checks"]

REL_TOL = 1e-9


# ----------------------------------------------------------------------------------------------
def locations(job: Job, results: Results, q: Quantity, at: tuple[str, ...], where: tuple[int, int] = (0, 0),
              path: str = "") -> list[tuple[str, Calc]]:
    """The places a quantity is asked for and its value at each: [(place text, Calc)].

    With no ``at``, every place where the quantity exists (every state for a state property, every
    leg that has a leg quantity). A named place that lacks the quantity is a JobError.
    """
    legs = {leg.name: leg for leg in results.legs}
    recs = {rec.label: rec for rec in results.states}
    gas_method = getattr(results.gas, "eos_method", "") or "input"

    def fail(code: str, **values: Any) -> NoReturn:
        raise JobError([problem(job, Finding(code, values, path), where=where)])

    def at_state(rec: StateRecord) -> Calc | None:
        if q.scope == "record":
            val = getattr(rec, q.attr, None)
            if val is None:
                return None
            return Calc(f"{q.symbol}_{rec.label}", val, q.unit, "", "input" if rec.number == 1 else gas_method)
        return Calc(f"{q.symbol}_{rec.label}", getattr(rec.state, q.attr), q.unit, "",
                    "input" if rec.number == 1 and q.attr in ("P", "T") else gas_method)

    def at_leg(leg: LegResult) -> tuple[Calc | None, str]:
        if q.scope in ("state", "record", "end"):
            rec = results.states[leg.i]
            c = at_state(rec)
            return c, place_text("leg_end", leg.name, rec.label)
        if q.scope == "ratio":
            a, b = getattr(leg.end, q.attr), getattr(leg.start, q.attr)
            sym = "P" if q.attr == "P" else "v"
            return (Calc(f"{q.symbol} ({leg.name})", a / b, "", "{x2} / {x1}", "ratio.leg",
                         {"x2": Term(f"{sym}_{leg.i + 1}", a, _attr_unit(q.attr)),
                          "x1": Term(f"{sym}_{leg.i}", b, _attr_unit(q.attr))}), leg.name)
        if q.scope == "change":
            a, b = getattr(results.states[leg.i], q.attr, None), getattr(results.states[leg.i - 1], q.attr, None)
            if a is None or b is None:
                return None, leg.name
            return (Calc(f"{q.symbol} ({leg.name})", a - b, q.unit, "{x2} − {x1}", "prop.change",
                         {"x2": Term(f"{q.attr}_{leg.i + 1}", a, q.unit), "x1": Term(f"{q.attr}_{leg.i}", b, q.unit)}),
                    leg.name)
        c = leg.quantities.get(q.attr)
        if c is None or c.value is None or not math.isfinite(c.value):
            return None, leg.name
        if q.sign < 0:
            c = Calc(f"{q.symbol} ({leg.name})", -c.value, c.unit, "−{x}", "sign.trade",
                     {"x": Term(c.symbol, c.value, c.unit)}, note=Finding("sign_reversed", {"title": q.title,
                                                                                             "symbol": c.symbol}))
        return c, leg.name

    out: list[tuple[str, Calc]] = []
    if q.scope == "total":
        found = [c for c in getattr(results, "totals", ()) if c.symbol == q.attr]
        if not found:
            fail("limit.no_total", title=q.title)
        note = found[0].note
        if isinstance(note, Finding) and note.code == "total.partial":
            fail("limit.partial_total", title=q.title, missing=note.values["missing"])
        return [(place_text("train"), found[0])]
    if not at:
        if q.scope in ("state", "record"):
            for rec in results.states:
                c = at_state(rec)
                if c is not None:
                    out.append((place_text("state", label=rec.label), c))
        else:
            for leg in results.legs:
                if q.on and leg.process not in q.on:
                    continue
                c, text = at_leg(leg)
                if c is not None:
                    out.append((text, c))
        if not out:
            if q.on:
                fail("limit.no_leg_on", quantity=q.name, on=q.on,
                     legs=tuple((leg.name, leg.process) for leg in results.legs))
            fail("limit.no_leg", quantity=q.name, legs=tuple((leg.name, tuple(leg.quantities)) for leg in results.legs))
        return out
    for name in at:
        # a compressor leg split into stages by the job's staging block answers for every stage
        stages = [n for n in legs if n.startswith(f"{name}, stage ")] if name not in legs else [name]
        if q.on and stages and not any(applies(q, legs[n].process) for n in stages):
            # a trade quantity of coolers named on a staged compressor: its intercoolers
            stages = [n for n in legs if n.startswith(f"{name}, intercooler ")] or stages
        if stages:
            for stage in stages:
                if not applies(q, legs[stage].process):
                    fail("limit.wrong_process", leg=stage, process=legs[stage].process, applies=applies_text(q))
                c, text = at_leg(legs[stage])
                if c is None:
                    leg = legs[stage]
                    fail("limit.leg_lacks", leg=stage, process=leg.process, quantity=q.name,
                         quantities=tuple(leg.quantities))
                out.append((text, c))
        elif name in recs and q.scope in ("state", "record"):
            c = at_state(recs[name])
            if c is None:
                fail("limit.state_lacks", label=name, quantity=q.name)
            out.append((place_text("state", label=name), c))
        elif name in recs:
            fail("limit.leg_quantity_at_state", quantity=q.name, label=name, legs=tuple(legs))
        else:
            fail("limit.no_place", name=name, quantity=q.name, legs=tuple(legs), states=tuple(recs))
    return out


def _attr_unit(attr: str) -> str:
    return {"P": "Pa", "v": "m**3/kg", "T": "K"}.get(attr, "")


def judge(spec: LimitSpec, kind: str, where: str, value: Calc) -> Check:
    """One check of one bound at one place."""
    lim = spec.max if kind == "max" else spec.min
    assert lim is not None, "a bound is judged only where the limit gives it"
    x = value.value
    margin = (lim.si - x) if kind == "max" else (x - lim.si)
    # a percent only of a quantity with a true zero (job.quantities.PERCENT_MARGIN): of the computed value,
    # or of the gauge pressure for a pressure limit written as gauge
    base = abs(x - spec.percent_zero) if spec.percent_zero is not None else 0.0
    pct = margin / base * 100.0 if base != 0 else float("nan")
    req, req_text = 0.0, ""
    if spec.margin is not None:
        req_text = spec.margin.entered
        req = spec.margin.si * base if spec.margin.percent else spec.margin.si
    tol = REL_TOL * max(abs(lim.si), abs(x))
    ok = margin >= req - tol
    return Check(spec.name, spec.quantity.name, where, value, lim.si, kind, spec.quantity.unit, margin, pct, req,
                 "pass" if ok else "fail", spec.basis, difference=spec.quantity.kind == "temperature",
                 required_entered=req_text, limit_entered=lim.entered)


def evaluate(job: Job, results: Results) -> tuple[Check, ...]:
    """The checks of a job's limits against its results, in the order of the job file."""
    out: list[Check] = []
    for spec in job.limits:
        locs = locations(job, results, spec.quantity, spec.at, spec.at_where, f"{spec.path}.at" if spec.at else spec.path)
        _refuse_negative(job, spec, locs)
        for kind in ("max", "min"):
            if getattr(spec, kind) is None:
                continue
            if spec.at:
                out.extend(judge(spec, kind, where, c) for where, c in locs)
            else:
                sign = 1.0 if kind == "max" else -1.0
                where, c = max(locs, key=lambda wc: sign * wc[1].value)   # first place of the governing value
                text = where if len(locs) == 1 else place_text("governing", where, count=len(locs))
                out.append(judge(spec, kind, text, c))
    return tuple(out)


def _refuse_negative(job: Job, spec: LimitSpec, locs: list[tuple[str, Calc]]) -> None:
    """A limit on a signed quantity that meets a negative value is misread input: a ``max`` on a
    negative cooler duty always passes. Raise a JobError at the limit naming the quantity to use."""
    q = spec.quantity
    if q.name not in SIGNED and q.scope != "total":
        return
    bad = [(where, c) for where, c in locs if c.value < 0]
    if not bad:
        return
    where, c = bad[0]
    lim = spec.max or spec.min
    instead = SIGNED.get(q.name)
    f = Finding("limit.negative", {
        "limit": spec.name, "quantity": q.name, "bound": ("max" if spec.max else "min") if lim is not None else "",
        "entered": lim.entered if lim is not None else "", "where": where, "value": c.value, "unit": q.unit,
        "closed": "closed" in q.systems and "flow" not in q.systems, "instead": instead or "",
        "instead_title": QUANTITIES[instead].title if instead else "", "everywhere": not spec.at},
        f"{spec.path}.quantity")
    raise JobError([problem(job, f, where=(spec.line, spec.col))])


def with_checks(job: Job, results: Results) -> Results:
    """The results with their checks filled in from the job's limits."""
    if not job.limits:
        return results
    return dataclasses.replace(results, checks=evaluate(job, results))
