"""The conclusions of a calc package: the answer to its purpose in one short paragraph, generated from the
results (never typed): where the gas goes, the key results, how many design checks pass and which one
governs, with its margin, in the job's units."""
from __future__ import annotations

import math

from markupsafe import Markup, escape

from . import format as fmt
from .words import note

__all__ = ["conclusions", "governing"]


def governing(checks):
    """The check closest to failing: the least margin beyond the required one, relative to the limit
    (a failing check first). None when there are no checks."""
    if not checks:
        return None

    def slack(c):
        scale = abs(c.limit) if c.limit else 1.0
        return (c.margin - c.required_margin) / scale

    return min(checks, key=lambda c: (c.status == "pass", slack(c)))


def _margin(c, S) -> str:
    text = str(fmt.qty(c.margin, c.unit, S, difference=True))
    if math.isfinite(c.margin_pct):
        text += f" ({fmt.num(c.margin_pct, 3)} %)"
    if c.required_entered:
        text += f" against a required {escape(c.required_entered)}"
    return text


def conclusions(results, S) -> list[Markup]:
    """The sentences of the conclusions section."""
    out: list[str] = []
    first, last = results.states[0].state, results.states[-1].state
    q = fmt.qty
    if results.system == "flow" and results.legs:
        out.append(f"The gas goes from {q(first.P, 'Pa', S)} and {q(first.T, 'K', S, 4)} at the inlet (state 1) "
                   f"to {q(last.P, 'Pa', S)} and {q(last.T, 'K', S, 4)} at the outlet (state {results.states[-1].label}), "
                   f"at a mass flow of {q(results.flow['m_dot'].value, 'kg/s', S)}.")
        totals = [f"{escape(note(c.note))} {q(c.value, fmt.flavour(c), S)}" for c in getattr(results, "totals", ())]
        if totals:
            out.append("Train totals: " + "; ".join(totals) + ".")
        hot = [(leg, leg.end.T) for leg in results.legs if leg.process == "compressor"]
        if hot:
            leg, T = max(hot, key=lambda lt: lt[1])
            out.append(f"The highest compressor discharge temperature is {q(T, 'K', S, 4)}, at {escape(leg.name)}.")
    elif results.system == "vessel" and results.legs:
        t_total = sum(leg.quantities["duration"].value for leg in results.legs if "duration" in leg.quantities)
        T_lo = min(leg.quantities["T_min"].value for leg in results.legs if "T_min" in leg.quantities)
        T_hi = max(leg.quantities["T_max"].value for leg in results.legs if "T_max" in leg.quantities)
        out.append(f"The vessel goes from {q(first.P, 'Pa', S)} and {q(first.T, 'K', S, 4)} (state 1) to "
                   f"{q(last.P, 'Pa', S)} and {q(last.T, 'K', S, 4)} (state {results.states[-1].label}) in "
                   f"{q(t_total, 's', S, 4)} over {len(results.legs)} leg{'s' if len(results.legs) > 1 else ''}; "
                   f"the gas temperature stays between {q(T_lo, 'K', S, 4)} and {q(T_hi, 'K', S, 4)}.")
    elif results.legs:
        W = sum(leg.quantities["W_by_gas"].value for leg in results.legs if "W_by_gas" in leg.quantities)
        Q = sum(leg.quantities["Q_to_gas"].value for leg in results.legs if "Q_to_gas" in leg.quantities)
        Pmax = max(rec.state.P for rec in results.states)
        Tmax = max(rec.state.T for rec in results.states)
        out.append(f"The gas ({q(results.mass.value, 'kg', S)}) goes from {q(first.P, 'Pa', S)} and "
                   f"{q(first.T, 'K', S, 4)} (state 1) to {q(last.P, 'Pa', S)} and {q(last.T, 'K', S, 4)} "
                   f"(state {results.states[-1].label}); the highest pressure is {q(Pmax, 'Pa', S)} and the "
                   f"highest temperature {q(Tmax, 'K', S, 4)}. Over all legs the gas does a net work of "
                   f"{q(W, 'J', S)} and takes in a net heat of {q(Q, 'J', S)} (work by the gas and heat to "
                   f"the gas positive).")
    sv = results.extra.get("solve")
    if sv:
        v = sv["value"]
        shown = q(v["value"], v["unit"], S, 5) if v.get("unit") else fmt.num(v["value"], 5)
        out.append(f"Solved: {escape(sv['vary'])} = {shown}, the value that meets the target "
                   f"({escape(sv['quantity'])}).")
    checks = results.checks
    if not checks:
        out.append("No design limits are set in this job: no result is checked against a limit.")
    else:
        passed = sum(1 for c in checks if c.status == "pass")
        g = governing(checks)
        verdict = (f"All {len(checks)} design checks pass." if passed == len(checks) and len(checks) > 1 else
                   "The design check passes." if passed == len(checks) else
                   f"{passed} of {len(checks)} design checks pass; this calculation does not pass.")
        out.append(f"{verdict} The governing check is {escape(g.name)} at {escape(g.where)}: "
                   f"{q(g.value.value, g.unit, S)} against {g.kind} {q(g.limit, g.unit, S)}, "
                   f"a margin of {_margin(g, S)} ({g.status}).")
    if results.warnings:
        n = len(results.warnings)
        out.append(f"{n} warning{'s' if n > 1 else ''} in the summary qualif{'y' if n > 1 else 'ies'} these results.")
    return [Markup(s) for s in out]
