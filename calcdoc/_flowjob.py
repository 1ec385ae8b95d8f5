"""Reading the steady-flow leg options of a job (efficiency, pressure_drop, mechanical_efficiency,
staging) from the YAML nodes ``jobfile`` passes on, with file:line messages for every problem.

Knows the job file and units, nothing of thermodynamics; the checks that need the computed start
of a leg (an end pressure against it) are made by the flow engine, pointing at the same lines.
"""
from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from . import units
from ._yaml import Node
from .errors import JobError, Problem
from .jobfile import Input, Job, LegSpec

__all__ = ["Drop", "LegOptions", "Staging", "read_options"]

MACHINES = ("compressor", "expander")
PRESSURE_TARGETS = ("pressure", "pressure_ratio")
DEFAULT_MAX_STAGES = 6


@dataclass(frozen=True)
class Drop:
    """A pressure drop: a fraction of the inlet pressure, or an absolute difference [Pa]."""

    fraction: float | None = None
    absolute: float | None = None
    inp: Input | None = None

    def outlet(self, P_in: float) -> float:
        return P_in * (1.0 - self.fraction) if self.fraction is not None else P_in - (self.absolute or 0.0)


@dataclass(frozen=True)
class Staging:
    stages: int | None                 # a fixed number of stages, or
    T_max: Input | None                # the discharge-temperature limit for the fewest-stages search
    max_stages: int
    T_cool: Input                      # intercooler outlet temperature
    drop: Drop
    node: Node


@dataclass(frozen=True)
class LegOptions:
    eta_p: Input | None = None
    eta_s: Input | None = None
    eta_m: Input | None = None
    drop: Drop = Drop()
    staging: Staging | None = None


class _Reader:
    def __init__(self, job: Job):
        self.job = job
        self.problems: list[Problem] = []
        self.inputs: list[Input] = []

    def add(self, node: Node, found: str, valid: str = "") -> None:
        self.problems.append(Problem(self.job.name, *node.where, node.path, found, valid))

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
        try:
            p = units.parse_quantity(node.value if node.kind == "scalar" else None, "pressure_difference",
                                     allow_percent=True)
        except units.UnitParseError as exc:
            self.add(node, exc.found, "give the pressure drop as a pressure difference ('0.3 bar') or a "
                     "percentage of the inlet pressure ('2 %')")
            return Drop()
        inp = Input(p.si, p.unit, p.entered, node.path, *node.where, percent=p.percent, kind="pressure_difference")
        if p.si < 0 or (p.percent and p.si >= 1.0):
            self.add(node, f"a pressure drop of {p.entered} is not possible",
                     "give a drop of zero or more, and below 100 % of the inlet pressure")
            return Drop()
        self.inputs.append(inp)
        return Drop(fraction=p.si, inp=inp) if p.percent else Drop(absolute=p.si, inp=inp)

    def mapping(self, node: Node, allowed: tuple[str, ...], what: str) -> dict[str, Node]:
        if node.kind != "map":
            self.add(node, f"expected a mapping for {what}", f"valid keys: {', '.join(allowed)}")
            return {}
        for k, child in node.value.items():
            if k not in allowed:
                self.add(child, f"unknown key '{k}' in {what}", f"valid keys: {', '.join(allowed)}")
        return {k: c for k, c in node.value.items() if k in allowed}

    def leg(self, leg: LegSpec) -> LegOptions:
        o = leg.options
        proc = leg.process
        out: dict = {}
        for key, allowed in (("efficiency", MACHINES), ("mechanical_efficiency", MACHINES),
                             ("pressure_drop", ("cooler", "heater")), ("staging", ("compressor",))):
            if key in o and proc not in allowed:
                self.add(o[key], f"{key} does not apply to a {proc} leg",
                         f"{key} applies to {' and '.join(p + ' legs' for p in allowed)}; remove it")
        measured = "temperature" in leg.end and any(k in leg.end for k in PRESSURE_TARGETS)
        if proc in MACHINES and "efficiency" in o:
            m = self.mapping(o["efficiency"], ("polytropic", "isentropic"), "efficiency")
            if len(o["efficiency"].value if o["efficiency"].kind == "map" else ()) != 1 and m:
                self.add(o["efficiency"], "more than one efficiency is given",
                         "give one: efficiency: {polytropic: 0.78} or efficiency: {isentropic: 0.80}")
            elif "polytropic" in m:
                out["eta_p"] = self.fraction(m["polytropic"], "polytropic efficiency")
            elif "isentropic" in m:
                out["eta_s"] = self.fraction(m["isentropic"], "isentropic efficiency")
            elif o["efficiency"].kind == "map":
                self.add(o["efficiency"], "no efficiency is given",
                         "give efficiency: {polytropic: 0.78} or efficiency: {isentropic: 0.80}")
            if measured:
                self.add(o["efficiency"], "an efficiency is given together with a measured end temperature",
                         "give either the efficiency or the measured end temperature; both efficiencies are "
                         "derived from a measured end state")
        if proc in MACHINES and "efficiency" not in o and not measured:
            self.add(_leg_node(self.job, leg), f"the {proc} leg '{leg.name}' has no efficiency",
                     "add efficiency: {polytropic: 0.78} (or isentropic), or a measured end temperature beside "
                     "the end pressure")
        if proc in MACHINES and "mechanical_efficiency" in o:
            out["eta_m"] = self.fraction(o["mechanical_efficiency"], "mechanical efficiency")
        if proc in ("cooler", "heater") and "pressure_drop" in o:
            out["drop"] = self.drop(o["pressure_drop"])
        self.targets(leg)
        if proc == "compressor" and "staging" in o:
            if measured:
                self.add(o["staging"], "staging cannot be combined with a measured end temperature",
                         "remove the measured temperature or the staging")
            out["staging"] = self.staging(o["staging"])
        return LegOptions(**{k: v for k, v in out.items() if v is not None})

    def targets(self, leg: LegSpec) -> None:
        proc, end = leg.process, leg.end
        where = _leg_node(self.job, leg, "end")
        has_p = any(k in end for k in PRESSURE_TARGETS)
        if proc in ("cooler", "heater"):
            if set(end) != {"temperature"}:
                self.add(where, f"a {proc} leg takes its end temperature (found {', '.join(end)})",
                         "write end: {temperature: 40 degC}; the end pressure follows from pressure_drop")
        elif "temperature" in end and not (proc in MACHINES and has_p):
            self.add(where, f"a {proc} leg takes an end pressure or pressure ratio (found {', '.join(end)})",
                     "write end: {pressure: 8 bara} or end: {pressure_ratio: 3}"
                     + ("; a compressor or expander may add a measured temperature" if proc in MACHINES else ""))
        if proc == "polytropic" and leg.n is None:
            self.add(_leg_node(self.job, leg), "a steady-flow polytropic leg needs its exponent n",
                     "add n: 1.3 (a compressor with an efficiency derives n from its end states)")

    def staging(self, node: Node) -> Staging | None:
        m = self.mapping(node, ("stages", "max_discharge_temperature", "max_stages", "intercooler"), "staging")
        if not m and node.kind != "map":
            return None
        stages = T_max = None
        if ("stages" in m) == ("max_discharge_temperature" in m):
            self.add(node, "staging needs exactly one of stages and max_discharge_temperature",
                     "give stages: 2 (equal ratios), or max_discharge_temperature: 150 degC (fewest stages)")
        if "stages" in m:
            stages = self.integer(m["stages"], 1, 12, "the number of stages")
        if "max_discharge_temperature" in m:
            T_max = self._quantity(m["max_discharge_temperature"], "temperature")
        max_stages = DEFAULT_MAX_STAGES
        if "max_stages" in m:
            if "stages" in m:
                self.add(m["max_stages"], "max_stages applies to the fewest-stages search only", "remove it")
            max_stages = self.integer(m["max_stages"], 1, 12, "max_stages") or DEFAULT_MAX_STAGES
        T_cool = None
        drop = Drop()
        if "intercooler" not in m:
            self.add(node, "staging needs the intercooler outlet temperature",
                     "add intercooler: {temperature: 40 degC, pressure_drop: 2 %}")
        else:
            ic = self.mapping(m["intercooler"], ("temperature", "pressure_drop"), "intercooler")
            if "temperature" in ic:
                T_cool = self._quantity(ic["temperature"], "temperature")
            elif m["intercooler"].kind == "map":
                self.add(m["intercooler"], "the intercooler has no outlet temperature", "add temperature: 40 degC")
            if "pressure_drop" in ic:
                drop = self.drop(ic["pressure_drop"])
        if T_cool is None or (stages is None and T_max is None):
            return None
        return Staging(stages, T_max, max_stages, T_cool, drop, node)

    def integer(self, node: Node, lo: int, hi: int, what: str) -> int | None:
        v = node.value
        if node.kind != "scalar" or isinstance(v, bool) or not isinstance(v, int) or not lo <= v <= hi:
            self.add(node, f"{what} must be a whole number from {lo} to {hi}, found {v!r}", f"for example {lo + 1}")
            return None
        return v

    def _quantity(self, node: Node, kind: str) -> Input | None:
        try:
            p = units.parse_quantity(node.value if node.kind == "scalar" else None, kind,
                                     atmosphere=self.job.site.P_atm)
        except units.UnitParseError as exc:
            self.add(node, exc.found, exc.valid)
            return None
        if p.si <= 0:
            self.add(node, f"'{p.entered}' is at or below absolute zero", "give a temperature above 0 K")
            return None
        inp = Input(p.si, p.unit, p.entered, node.path, *node.where)
        self.inputs.append(inp)
        return inp


def _leg_node(job: Job, leg: LegSpec, key: str = "") -> Node:
    """A stand-in node carrying the place of a leg (or one of its keys) for messages."""
    path = f"{leg.path}.{key}" if key else leg.path
    line, col = job.locate(path)
    return Node(None, line, col, path)


def read_options(job: Job) -> tuple[Job, list[LegOptions]]:
    """The options of every leg, and the job with these inputs added to its list of inputs (for the
    report's input table). Raises JobError listing every problem."""
    r = _Reader(job)
    opts = [r.leg(leg) for leg in job.legs]
    if r.problems:
        raise JobError(sorted(r.problems, key=lambda p: (p.line, p.column)))
    job = dataclasses.replace(job, inputs=tuple(sorted((*job.inputs, *r.inputs), key=lambda i: (i.line, i.col))))
    return job, opts


def direction_problem(job: Job, leg: LegSpec, P_in: float, T_in: float) -> Problem | None:
    """A leg whose end target goes the wrong way for its process, from an inlet at (P_in, T_in): a
    compressor that does not raise the pressure, an expander or throttle that does not lower it, a cooler
    that heats or a heater that cools."""
    proc = leg.process

    def at(inp: Input, found: str, valid: str) -> Problem:
        return Problem(job.name, inp.line, inp.col, inp.path, found, valid)

    if proc in ("cooler", "heater") and "temperature" in leg.end:
        t = leg.end["temperature"]
        if proc == "cooler" and t.si > T_in:
            return at(t, f"the cooler outlet {t.entered} is above its inlet temperature ({T_in - 273.15:.4g} °C)",
                      "a cooler lowers the temperature; use a heater, or a lower outlet temperature")
        if proc == "heater" and t.si < T_in:
            return at(t, f"the heater outlet {t.entered} is below its inlet temperature ({T_in - 273.15:.4g} °C)",
                      "a heater raises the temperature; use a cooler, or a higher outlet temperature")
        return None
    inp = leg.end.get("pressure") or leg.end.get("pressure_ratio")
    if inp is None:
        return None
    P2 = inp.si if "pressure" in leg.end else P_in * inp.si
    if proc == "compressor" and P2 <= P_in:
        return at(inp, f"the compressor's end pressure ({P2 / 1e3:.6g} kPa) is not above its start "
                       f"({P_in / 1e3:.6g} kPa)", "give an end pressure above the start, or use an expander or throttle")
    if proc in ("expander", "throttle") and P2 >= P_in:
        return at(inp, f"the {proc}'s end pressure ({P2 / 1e3:.6g} kPa) is not below its start ({P_in / 1e3:.6g} kPa)",
                  "give an end pressure below the start (pressure_ratio is end/start, below 1 for an expansion)")
    return None


def option_inputs(job: Job) -> list[Input]:
    """The quantities the steady-flow leg options give (efficiencies, pressure drops, staging)."""
    r = _Reader(job)
    for leg in job.legs:
        r.leg(leg)
    return r.inputs


def option_problems(job: Job) -> list[Problem]:
    """Every problem of the steady-flow leg options, found without computing (for ``calcdoc check``)."""
    r = _Reader(job)
    for leg in job.legs:
        r.leg(leg)
    # the first leg starts at the start state, known without computing
    first = direction_problem(job, job.legs[0], job.start.pressure.si, job.start.temperature.si) if job.legs else None
    return r.problems + ([first] if first is not None else [])


def problem_at(job: Job, inp_or_path, found: str, valid: str = "") -> JobError:
    """A JobError at an input (its line and column) or a key path."""
    if isinstance(inp_or_path, Input):
        return JobError([Problem(job.name, inp_or_path.line, inp_or_path.col, inp_or_path.path, found, valid)])
    if isinstance(inp_or_path, Node):
        return JobError([Problem(job.name, *inp_or_path.where, inp_or_path.path, found, valid)])
    return JobError([job.problem(inp_or_path, found, valid)])
