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
import difflib
import math
from dataclasses import dataclass

from . import units
from ._yaml import Node
from .calc import Calc, Term
from .errors import JobError, Problem
from .jobfile import Input, Job

__all__ = ["LIMIT_KEYS", "QUANTITIES", "LimitSpec", "Quantity", "evaluate", "limit_problems", "parse_limits",
           "with_checks"]

LIMIT_KEYS = ("name", "quantity", "at", "max", "min", "margin", "basis")
REL_TOL = 1e-9
BOTH = ("closed", "flow")


@dataclass(frozen=True)
class Quantity:
    """A quantity a limit (or a sweep) can name.

    scope: ``state`` (a property of a state: at a state label, or at a leg's end state), ``record``
    (an extensive value kept beside the state: volume, volume flow), ``leg`` (a quantity of a leg),
    ``ratio`` (end over start of a leg, of the state attribute ``attr``) or ``end`` (a state
    property at a leg's end only, e.g. discharge temperature).
    """

    name: str
    kind: str                 # key of units.DIMENSIONS
    scope: str
    attr: str
    systems: tuple[str, ...] = BOTH
    symbol: str = ""
    title: str = ""
    sign: float = 1.0             # −1: the leg quantity ``attr`` with its sign reversed (the trade's sense)
    on: tuple[str, ...] = ()      # processes where it exists by default (no ``at``); () = every leg

    @property
    def unit(self) -> str:
        return units.DIMENSIONS[self.kind]

    @property
    def margin_kind(self) -> str:
        return {"temperature": "temperature_difference", "pressure": "pressure_difference"}.get(self.kind, self.kind)


def _q(name, kind, scope, attr, systems=BOTH, symbol="", title="", sign=1.0, on=()):
    return Quantity(name, kind, scope, attr, systems, symbol or attr, title or name.replace("_", " "), sign, on)


QUANTITIES: dict[str, Quantity] = {q.name: q for q in (
    _q("pressure", "pressure", "state", "P"),
    _q("temperature", "temperature", "state", "T"),
    _q("specific_volume", "specific_volume", "state", "v"),
    _q("density", "density", "state", "rho", symbol="ρ"),
    _q("internal_energy", "specific_energy", "state", "u", title="specific internal energy"),
    _q("enthalpy", "specific_energy", "state", "h", title="specific enthalpy"),
    _q("entropy", "specific_entropy", "state", "s", title="specific entropy"),
    _q("Z", "dimensionless", "state", "Z", title="compressibility factor"),
    _q("volume", "volume", "record", "V", ("closed",)),
    _q("volume_flow", "volume_flow", "record", "V_dot", ("flow",), symbol="V̇", title="actual volume flow"),
    _q("discharge_temperature", "temperature", "end", "T"),
    _q("pressure_ratio", "dimensionless", "ratio", "P", symbol="r_p"),
    _q("volume_ratio", "dimensionless", "ratio", "v", symbol="r_v"),
    _q("n", "dimensionless", "leg", "n", title="polytropic exponent"),
    _q("W_by_gas", "energy", "leg", "W_by_gas", ("closed",), symbol="W", title="work done by the gas"),
    _q("Q_to_gas", "energy", "leg", "Q_to_gas", ("closed",), symbol="Q", title="heat added to the gas"),
    _q("work_on_gas", "energy", "leg", "W_by_gas", ("closed",), symbol="W_on", title="work done on the gas",
       sign=-1.0),
    _q("heat_from_gas", "energy", "leg", "Q_to_gas", ("closed",), symbol="Q_out", title="heat removed from the gas",
       sign=-1.0),
    _q("dU", "energy", "leg", "dU", ("closed",), symbol="ΔU", title="change of internal energy"),
    _q("dH", "energy", "leg", "dH", ("closed",), symbol="ΔH", title="change of enthalpy"),
    _q("dS", "entropy", "leg", "dS", ("closed",), symbol="ΔS", title="change of entropy"),
    _q("work_in", "specific_energy", "leg", "work_in", ("flow",), symbol="w_in", title="specific work input"),
    _q("head", "specific_energy", "leg", "head", ("flow",)),
    _q("head_isentropic", "specific_energy", "leg", "head_isentropic", ("flow",), title="isentropic head"),
    _q("eta_p", "dimensionless", "leg", "eta_p", ("flow",), symbol="η_p", title="polytropic efficiency"),
    _q("eta_s", "dimensionless", "leg", "eta_s", ("flow",), symbol="η_s", title="isentropic efficiency"),
    _q("duty", "power", "leg", "duty", ("flow",), symbol="Q̇"),
    _q("power", "power", "leg", "power", ("flow",), symbol="P_gas", title="gas power"),
    _q("shaft_power", "power", "leg", "shaft_power", ("flow",), symbol="P_shaft", title="shaft power"),
    # the same in the trade's sense: heat removed by a cooler, heat added by a heater, power delivered
    # by an expander, each positive
    _q("cooling_duty", "power", "leg", "duty", ("flow",), symbol="Q̇_cool", title="cooling duty", sign=-1.0,
       on=("cooler",)),
    _q("heating_duty", "power", "leg", "duty", ("flow",), symbol="Q̇_heat", title="heating duty", on=("heater",)),
    _q("power_output", "power", "leg", "power", ("flow",), symbol="P_out", title="gas power output", sign=-1.0,
       on=("expander",)),
    _q("shaft_power_output", "power", "leg", "shaft_power", ("flow",), symbol="P_{shaft,out}",
       title="shaft power output", sign=-1.0, on=("expander",)),
    # train totals in the trade's sense, each positive (one driver for a staged machine, the cooling load)
    _q("total_power", "power", "total", "ΣP_comp", ("flow",), symbol="ΣP_comp", title="total compressor gas power"),
    _q("total_power_output", "power", "total", "ΣP_out", ("flow",), symbol="ΣP_out",
       title="total expander gas power output"),
    _q("total_cooling_duty", "power", "total", "ΣQ̇_cool", ("flow",), symbol="ΣQ̇_cool", title="total cooling duty"),
    _q("total_heating_duty", "power", "total", "ΣQ̇_heat", ("flow",), symbol="ΣQ̇_heat", title="total heating duty"),
    _q("total_shaft_power", "power", "total", "ΣP_shaft", ("flow",), symbol="ΣP_shaft",
       title="total compressor shaft power"),
    _q("total_shaft_power_output", "power", "total", "ΣP_{shaft,out}", ("flow",), symbol="ΣP_{shaft,out}",
       title="total expander shaft power output"),
)}

#: Other spellings engineers write, mapped to the names above.
ALIASES = {
    "P": "pressure", "T": "temperature", "v": "specific_volume", "rho": "density", "u": "internal_energy",
    "h": "enthalpy", "s": "entropy", "compressibility": "Z", "V": "volume", "V_dot": "volume_flow",
    "work_by_gas": "W_by_gas", "heat_to_gas": "Q_to_gas", "polytropic_exponent": "n",
    "polytropic_efficiency": "eta_p", "isentropic_efficiency": "eta_s",
}


#: Flow processes that exchange heat and work along a reversible path: a quantity in the trade's sense
#: (cooling_duty, power_output) also applies there when a limit names the leg.
REVERSIBLE = ("polytropic", "isentropic", "isothermal")


def applies(q: Quantity, process: str) -> bool:
    """Whether a leg of this process can carry the quantity (only restricted for the trade's quantities)."""
    return not q.on or process in q.on or process in REVERSIBLE


def _applies_text(q: Quantity) -> str:
    return f"{q.name} applies to {' and '.join(p + ' legs' for p in q.on)} (and reversible flow legs)"


#: Signed quantities (work and heat INTO the gas positive, closed-system work BY the gas positive) and
#: the quantity in the trade's sense to name when a limit meets a negative value.
SIGNED = {
    "duty": "cooling_duty", "power": "power_output", "shaft_power": "shaft_power_output",
    "W_by_gas": "work_on_gas", "Q_to_gas": "heat_from_gas", "work_on_gas": "W_by_gas", "heat_from_gas": "Q_to_gas",
    "cooling_duty": "heating_duty", "heating_duty": "cooling_duty", "power_output": "power",
    "shaft_power_output": "shaft_power",
}


def quantity_named(name: str) -> Quantity | None:
    return QUANTITIES.get(ALIASES.get(name, name))


@dataclass(frozen=True)
class LimitSpec:
    name: str
    quantity: Quantity
    at: tuple[str, ...]              # leg names or state labels; () = everywhere it exists
    max: Input | None
    min: Input | None
    margin: Input | None             # absolute (SI of the quantity) or percent (si = fraction)
    basis: str
    path: str
    line: int
    col: int
    at_where: tuple[int, int] = (0, 0)


# ----------------------------------------------------------------------------------------------
class Places:
    """The legs and state labels of a job, to resolve ``at:`` names and check quantities against them."""

    def __init__(self, job: Job):
        self.job = job
        self.legs = [leg.name for leg in job.legs]
        self.procs = {leg.name: leg.process for leg in job.legs}
        states = 1
        for leg in job.legs:
            # a staged compressor becomes "<leg>, stage k" and "<leg>, intercooler k" legs at run time:
            # accept the names and state labels up to what its staging can produce (checked again
            # against the computed legs and states when the limits are judged)
            N = _most_stages(leg)
            for k in range(1, N + 1 if N > 1 else 1):
                self.legs.append(f"{leg.name}, stage {k}")
                self.procs[self.legs[-1]] = "compressor"
                if k < N:
                    self.legs.append(f"{leg.name}, intercooler {k}")
                    self.procs[self.legs[-1]] = "cooler"
            states += 2 * N - 1
        self.labels = [str(i + 1) for i in range(states)]

    def valid(self) -> str:
        return (f"legs: {', '.join(repr(n) for n in self.legs)}; states: {', '.join(self.labels)}")

    def check(self, q: Quantity, names: list[tuple[str, Node]], add) -> None:
        for name, node in names:
            if q.scope == "total":
                add(node, f"{q.name} is a total over the whole train and takes no 'at'", "remove 'at'")
                continue
            if name in self.legs:
                proc = self.procs[name]
                if not applies(q, proc) and not any(self.procs[n] in q.on for n in self.legs
                                                    if n.startswith(f"{name}, intercooler ")):
                    add(node, f"'{name}' is a {proc} leg", f"{_applies_text(q)}; name such a leg")
                continue
            if name in self.labels:
                if q.scope in ("leg", "ratio", "end"):
                    add(node, f"{q.name} is a quantity of a leg, but '{name}' is a state label",
                        f"name a leg: {', '.join(repr(n) for n in self.legs)}")
                continue
            close = difflib.get_close_matches(name, self.legs + self.labels, n=1, cutoff=0.6)
            hint = f"did you mean '{close[0]}'? " if close else ""
            add(node, f"this job has no leg or state named '{name}'", f"{hint}{self.valid()}")


def _most_stages(leg) -> int:
    """The most stages a compressor leg's staging block can give (1 when it has none)."""
    from ._flowjob import DEFAULT_MAX_STAGES

    node = leg.options.get("staging") if leg.process == "compressor" else None
    if node is None or node.kind != "map":
        return 1
    for key in ("stages", "max_stages"):
        v = node.value.get(key)
        if v is not None and isinstance(v.value, int) and not isinstance(v.value, bool):
            return max(1, min(v.value, 12))
    return DEFAULT_MAX_STAGES


def quantity_problem(q: Quantity | None, name: str, system: str) -> tuple[str, str] | None:
    """Why a quantity name cannot be used in a job of this system, or None."""
    if q is None:
        close = difflib.get_close_matches(name, list(QUANTITIES) + list(ALIASES), n=1, cutoff=0.6)
        hint = f"did you mean '{close[0]}'? " if close else ""
        return (f"'{name}' is not a quantity calcdoc knows",
                f"{hint}valid for a {system} system: {', '.join(n for n, x in QUANTITIES.items() if system in x.systems)}")
    if system not in q.systems:
        other = "steady-flow" if q.systems == ("flow",) else "closed-system"
        return (f"{q.name} is a {other} quantity, and this job is a {'steady-flow' if system == 'flow' else 'closed'} system",
                f"valid for a {system} system: {', '.join(n for n, x in QUANTITIES.items() if system in x.systems)}")
    return None


def names_of(node: Node | None, add) -> list[tuple[str, Node]]:
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


class _Reader:
    """Reads plain values and quantities from nodes, collecting problems (with file:line)."""

    def __init__(self, job: Job):
        self.job = job
        self.problems: list[Problem] = []

    def add(self, node: Node, found: str, valid: str = "", path: str | None = None) -> None:
        line, col = node.where
        self.problems.append(Problem(self.job.name, line, col, node.path if path is None else path, found, valid))

    def mapping(self, node: Node, allowed: tuple[str, ...], what: str) -> dict[str, Node]:
        if node.kind != "map":
            self.add(node, f"expected a mapping of keys for {what}", f"valid keys: {', '.join(allowed)}")
            return {}
        for key, child in node.value.items():
            if key not in allowed:
                close = difflib.get_close_matches(key, allowed, n=1, cutoff=0.6)
                hint = f"did you mean '{close[0]}'? " if close else ""
                self.add(child, f"unknown key '{key}' in {what}", f"{hint}valid keys: {', '.join(allowed)}")
        return {k: c for k, c in node.value.items() if k in allowed}

    def text(self, node: Node | None) -> str:
        if node is None:
            return ""
        if node.kind != "scalar" or node.value is None or isinstance(node.value, bool) or str(node.value).strip() == "":
            self.add(node, "expected text", "write plain text")
            return ""
        return str(node.value)

    def quantity(self, node: Node, kind: str, allow_percent: bool = False) -> Input | None:
        if node.kind != "scalar":
            self.add(node, "expected a value with its unit", f"write for example {units._EXAMPLES.get(kind, '1')}")
            return None
        try:
            p = units.parse_quantity(node.value, kind, atmosphere=self.job.site.P_atm, allow_percent=allow_percent)
        except units.UnitParseError as exc:
            self.add(node, exc.found, exc.valid + (" or a percentage of the computed value, for example '10 %'"
                                                   if allow_percent else ""))
            return None
        if not math.isfinite(p.si):
            self.add(node, f"'{p.entered}' is not a finite value", "write a finite number")
            return None
        return Input(p.si, p.unit, p.entered, node.path, *node.where, gauge=p.gauge, percent=p.percent, kind=kind)


def parse_limits(job: Job) -> tuple[list[LimitSpec], list[Problem]]:
    """The job's limits, validated: (limits, problems found)."""
    r = _Reader(job)
    places = Places(job)
    out: list[LimitSpec] = []
    names: dict[str, Node] = {}
    for item in job.limits:
        m = r.mapping(item, LIMIT_KEYS, "a limit")
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
        qname = r.text(m.get("quantity")) if "quantity" in m else ""
        q = quantity_named(qname) if qname else None
        if qname:
            why = quantity_problem(q, qname, job.system)
            if why:
                r.add(m["quantity"], *why)
                q = None
        at = names_of(m.get("at"), r.add)
        if q is not None:
            places.check(q, at, r.add)
        bounds = {}
        for key in ("max", "min"):
            if key in m and q is not None:
                bounds[key] = r.quantity(m[key], q.kind)
        if bounds.get("max") and bounds.get("min") and bounds["min"].si > bounds["max"].si:
            r.add(item, f"min ({bounds['min'].entered}) is above max ({bounds['max'].entered})",
                  "give a min below the max")
        margin = None
        if "margin" in m and q is not None:
            margin = r.quantity(m["margin"], q.margin_kind, allow_percent=True)
            if margin is not None and margin.si < 0:
                r.add(m["margin"], f"a required margin of {margin.entered} is negative", "give a margin of zero or more")
        basis = r.text(m.get("basis"))
        name = r.text(m.get("name")) if "name" in m else ""
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
                             item.path, *item.where, at_where=m["at"].where if "at" in m else item.where))
    return out, r.problems


def limit_problems(job: Job) -> list[Problem]:
    return parse_limits(job)[1]


# ----------------------------------------------------------------------------------------------
def locations(job: Job, results, q: Quantity, at: tuple[str, ...], where: tuple[int, int] = (0, 0),
              path: str = "") -> list[tuple[str, Calc]]:
    """The places a quantity is asked for and its value at each: [(place text, Calc)].

    With no ``at``, every place where the quantity exists (every state for a state property, every
    leg that has a leg quantity). A named place that lacks the quantity is a JobError.
    """
    legs = {leg.name: leg for leg in results.legs}
    recs = {rec.label: rec for rec in results.states}
    gas_method = getattr(results.gas, "eos_method", "") or "input"

    def fail(found: str, valid: str):
        raise JobError([Problem(job.name, where[0], where[1], path, found, valid)])

    def at_state(rec):
        if q.scope == "record":
            val = getattr(rec, q.attr, None)
            if val is None:
                return None
            return Calc(f"{q.symbol}_{rec.label}", val, q.unit, "", "input" if rec.number == 1 else gas_method)
        return Calc(f"{q.symbol}_{rec.label}", getattr(rec.state, q.attr), q.unit, "",
                    "input" if rec.number == 1 and q.attr in ("P", "T") else gas_method)

    def at_leg(leg):
        if q.scope in ("state", "record", "end"):
            rec = results.states[leg.i]
            c = at_state(rec)
            return c, f"{leg.name} (end, state {rec.label})"
        if q.scope == "ratio":
            a, b = getattr(leg.end, q.attr), getattr(leg.start, q.attr)
            sym = "P" if q.attr == "P" else "v"
            return (Calc(f"{q.symbol} ({leg.name})", a / b, "", "{x2} / {x1}", "ratio.leg",
                         {"x2": Term(f"{sym}_{leg.i + 1}", a, _attr_unit(q.attr)),
                          "x1": Term(f"{sym}_{leg.i}", b, _attr_unit(q.attr))}), leg.name)
        c = leg.quantities.get(q.attr)
        if c is None or c.value is None or not math.isfinite(c.value):
            return None, leg.name
        if q.sign < 0:
            c = Calc(f"{q.symbol} ({leg.name})", -c.value, c.unit, "−{x}", "sign.trade",
                     {"x": Term(c.symbol, c.value, c.unit)}, note=f"{q.title}: {c.symbol} with its sign reversed")
        return c, leg.name

    out: list[tuple[str, Calc]] = []
    if q.scope == "total":
        found = [c for c in getattr(results, "totals", ()) if c.symbol == q.attr]
        if not found:
            fail(f"this job has no {q.title}", "name a quantity this job computes")
        if "partial:" in found[0].note:
            fail(f"the {q.title} is partial ({found[0].note.split('partial:')[1].strip()})",
                 "give every machine a mechanical_efficiency, or limit each leg's shaft_power")
        return [("train", found[0])]
    if not at:
        if q.scope in ("state", "record"):
            for rec in results.states:
                c = at_state(rec)
                if c is not None:
                    out.append((f"state {rec.label}", c))
        else:
            for leg in results.legs:
                if q.on and leg.process not in q.on:
                    continue
                c, text = at_leg(leg)
                if c is not None:
                    out.append((text, c))
        if not out:
            if q.on:
                fail(f"no leg of this job has {q.name} (it applies to {' and '.join(p + ' legs' for p in q.on)})",
                     f"legs and their processes: {'; '.join(f'{leg.name}: {leg.process}' for leg in results.legs)}")
            fail(f"no leg of this job has {q.name}",
                 f"legs and their quantities: {_leg_quantities(results)}")
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
                    fail(f"'{stage}' is a {legs[stage].process} leg", f"{_applies_text(q)}; name such a leg")
                c, text = at_leg(legs[stage])
                if c is None:
                    leg = legs[stage]
                    fail(f"leg '{stage}' ({leg.process}) has no {q.name}",
                         f"its quantities are: {', '.join(leg.quantities) or 'none'}; name a leg that has {q.name}")
                out.append((text, c))
        elif name in recs and q.scope in ("state", "record"):
            c = at_state(recs[name])
            if c is None:
                fail(f"state {name} has no {q.name}", "name another quantity")
            out.append((f"state {name}", c))
        elif name in recs:
            fail(f"{q.name} is a quantity of a leg, but '{name}' is a state label",
                 f"name a leg: {', '.join(repr(n) for n in legs)}")
        else:
            fail(f"this job has no leg or state named '{name}' that has {q.name}",
                 f"legs: {', '.join(repr(n) for n in legs)}; states: {', '.join(recs)}")
    return out


def _attr_unit(attr: str) -> str:
    return {"P": "Pa", "v": "m**3/kg", "T": "K"}.get(attr, "")


def _leg_quantities(results) -> str:
    return "; ".join(f"{leg.name}: {', '.join(leg.quantities) or 'none'}" for leg in results.legs) or "no legs"


def judge(spec: LimitSpec, kind: str, where: str, value: Calc):
    """One check of one bound at one place."""
    from .results import Check

    lim = spec.max if kind == "max" else spec.min
    x = value.value
    margin = (lim.si - x) if kind == "max" else (x - lim.si)
    pct = margin / abs(x) * 100.0 if x != 0 else float("nan")
    req, req_text = 0.0, ""
    if spec.margin is not None:
        req_text = spec.margin.entered
        req = spec.margin.si * abs(x) if spec.margin.percent else spec.margin.si
    tol = REL_TOL * max(abs(lim.si), abs(x))
    ok = margin >= req - tol
    return Check(spec.name, spec.quantity.name, where, value, lim.si, kind, spec.quantity.unit, margin, pct, req,
                 "pass" if ok else "fail", spec.basis, difference=spec.quantity.kind == "temperature",
                 required_entered=req_text, limit_entered=lim.entered)


def evaluate(job: Job, results, specs: list[LimitSpec] | None = None) -> tuple:
    """The checks of a job's limits against its results, in the order of the job file."""
    if specs is None:
        specs, problems = parse_limits(job)
        if problems:
            raise JobError(problems)
    out = []
    for spec in specs:
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
                text = where if len(locs) == 1 else f"{where}, governing of {len(locs)}"
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
    conv = ("work done BY the gas and heat added TO the gas are positive" if "closed" in q.systems and "flow" not in
            q.systems else "shaft work and heat INTO the gas are positive")
    lim = spec.max or spec.min
    entered = f" {'max' if spec.max else 'min'} {lim.entered}" if lim is not None else ""
    instead = SIGNED.get(q.name)
    found = (f"the limit '{spec.name}' ({q.name}{entered}) meets a negative value at {where} "
             f"({c.value:.6g} {q.unit}): it is negative by the sign convention ({conv}), so a limit on it "
             "does not mean what it says")
    valid = (f"use quantity: {instead} ({QUANTITIES[instead].title}, positive there)" if instead else
             "name a quantity that is positive at every place the limit applies to")
    if not spec.at and instead:
        valid += ", or name with 'at' the places where the value is positive"
    raise JobError([Problem(job.name, spec.line, spec.col, f"{spec.path}.quantity", found, valid)])


def with_checks(job: Job, results):
    """The results with their checks filled in from the job's limits."""
    if not job.limits:
        return results
    return dataclasses.replace(results, checks=evaluate(job, results))
