"""Lines for the terminal: the summary of a run and the changes between two revisions, in the job's units."""
from __future__ import annotations

from .. import units
from ..engine.revision import Diff
from ..units import display
from .changes import result_label, shows_percent
from .format import _num, settled
from .words import gas_text, say

__all__ = ["diff_text", "summary"]


def _show(value, unit: str, system: units.Units, difference: bool = False) -> str:
    if value is None:
        return "—"
    if isinstance(value, str):
        return value
    if not unit:
        return f"{value:.6g}"
    v, u = units.display(value, unit, system, difference=difference)
    return f"{v:.6g} {u}".strip()


def diff_text(diff: Diff, system: units.Units = "SI") -> str:
    """The comparison for a terminal."""
    lines = [f"Changes from {diff.old_label} to {diff.new_label}", ""]
    lines.append(f"Inputs changed ({len(diff.inputs)}):" if diff.inputs else "Inputs: none changed.")
    for c in diff.inputs:
        lines.append(f"  {c.path}: {c.old if c.old is not None else '(not given)'} → "
                     f"{c.new if c.new is not None else '(removed)'}")
    lines.append("")
    lines.append(f"Results and checks that moved ({len(diff.moved)}), largest relative change first:"
                 if diff.moved else "Results and checks: none moved.")
    for m in diff.moved:
        change = ""
        if m.change is not None:
            change = f"   change {_show(m.change, m.unit, system, difference=True)}"
            change += f" ({m.percent:+.3g} %)" if m.percent is not None and shows_percent(m.key, system) else ""
        lines.append(f"  {result_label(m.key)}: {_show(m.old, m.unit, system, m.difference)} → "
                     f"{_show(m.new, m.unit, system, m.difference)}{change}")
    lines.append(f"  {diff.unchanged} result{'s' if diff.unchanged != 1 else ''} unchanged.")
    return "\n".join(lines) + "\n"


def summary(results, written) -> None:
    """What a run computed, for the terminal: states, legs, checks, warnings and the files written."""
    system = results.job.units
    t = results.job.calc

    def show(value, unit, sig=5, difference=False):
        v, u = display(value, unit, system, difference=difference)
        v = settled(v, value, unit)
        text = _num(v, sig) if v == 0 or 1e-3 <= abs(v) < 1e7 else f"{v:.{sig - 1}e}"   # no markup on a terminal
        return f"{text} {u}".replace("\u2009", " ").strip()

    print(f"{t.number} rev {t.revision}: {t.title}")
    print(f"  gas: {gas_text(results.gas)}")
    for rec in results.states:
        s = rec.state
        print(f"  state {rec.label:>3}: P = {show(s.P, 'Pa'):>14}   T = {show(s.T, 'K'):>10}   "
              f"v = {show(s.v, 'm**3/kg', 4)}   {s.phase}")
    for leg in results.legs:
        qd = leg.quantities
        if "W_by_gas" in qd:
            print(f"  leg {leg.i}→{leg.i + 1} {leg.name} ({leg.process}): W by gas = {show(qd['W_by_gas'].value, 'J')}, "
                  f"Q to gas = {show(qd['Q_to_gas'].value, 'J')}")
        elif "work_in" in qd:
            print(_flow_leg_line(leg, show))
        elif "duration" in qd:
            print(f"  leg {leg.i}→{leg.i + 1} {leg.name} ({leg.process}): t = {show(qd['duration'].value, 's')}, "
                  f"T min = {show(qd['T_min'].value, 'K')}, T max = {show(qd['T_max'].value, 'K')}")
        else:
            print(f"  leg {leg.i}→{leg.i + 1} {leg.name} ({leg.process})")
    solve = results.extra.get("solve")
    if solve:
        value = show(solve["value"]["value"], solve["value"]["unit"], 7) if solve["value"]["unit"] else solve["entered"]
        print(f"  solved: {solve['vary']} = {value} ({solve['quantity']} = "
              f"{show(solve['achieved']['value'], solve['achieved']['unit']) if solve['achieved']['unit'] else solve['achieved']['value']}"
              f", {solve['iterations']} iterations)")
    for c in results.checks:
        margin = f"margin {show(c.margin, c.unit, difference=True)}"
        if c.required_entered:
            margin += f" (required {c.required_entered}" + (
                f" = {show(c.required_margin, c.unit, difference=True)})" if "%" in c.required_entered else ")")
        print(f"  check {c.name} at {c.where}: {c.status.upper()}: value {show(c.value.value, c.unit)}, "
              f"{c.kind} {show(c.limit, c.unit)}, {margin}")
    for w in results.warnings:
        print(f"  warning: {say(w, system)}")
    for p in written:
        print(f"  wrote {p}")


def _flow_leg_line(leg, show) -> str:
    """One line of a steady-flow leg: end state, head, efficiencies, power and duty, in the job's units."""
    qd = leg.quantities
    parts = [f"  leg {leg.i}→{leg.i + 1} {leg.name} ({leg.process}): P2 = {show(leg.end.P, 'Pa')}, "
             f"T2 = {show(leg.end.T, 'K')}"]
    for key, label in (("head", "Hp"), ("eta_p", "ηp"), ("eta_s", "ηs"), ("eta_p_schultz", "ηp Schultz"),
                       ("power", "P gas"), ("shaft_power", "P shaft"), ("duty", "duty"), ("dT", "ΔT"),
                       ("volumetric_efficiency", "ηv"), ("cylinder_flow", "ṁ cyl"), ("capacity", "capacity"),
                       ("rod_load_compression", "rod load C"), ("rod_load_tension", "rod load T")):
        if key in qd and not (key in ("power", "duty") and qd[key].value == 0.0):
            c = qd[key]
            unit = {"duty": "W|heat", "head": "J/kg|head"}.get(key, c.unit)
            parts.append(f"{label} = {show(c.value, unit, difference=(key == 'dT'))}")
    return ", ".join(parts)
