"""The steady-flow options of a leg (efficiency, pressure_drop, mechanical_efficiency, staging), read
from the job file with file:line messages for every problem, and the checks of a leg's direction that
need no computing.

Knows the job file and units, nothing of thermodynamics; the checks that need the computed start of a
leg (an end pressure against it) are made when the engine reaches the leg, pointing at the same lines.
"""
from __future__ import annotations

from collections.abc import Callable
from typing import Any

from ..errors import Problem
from ..units import say
from .model import Drop, Input, Job, LegOptions, LegSpec, Staging
from .reader import Reader
from .source import Node

__all__ = ["DEFAULT_MAX_STAGES", "FLOW_OPTION_KEYS", "MACHINES", "chain_problems", "direction_problem", "read_options"]

MACHINES = ("compressor", "expander")
PRESSURE_TARGETS = ("pressure", "pressure_ratio")
DEFAULT_MAX_STAGES = 6
FLOW_OPTION_KEYS = ("efficiency", "pressure_drop", "mechanical_efficiency", "staging")
STAGING_KEYS = ("stages", "max_discharge_temperature", "max_stages", "intercooler")
INTERCOOLER_KEYS = ("temperature", "pressure_drop")


class _Options:
    """Reads the options of the legs of one job with a shared :class:`Reader`."""

    def __init__(self, r: Reader, job_locate: Callable[[str], tuple[int, int]]) -> None:
        self.r = r
        self.locate = job_locate

    def add(self, node: Node, found: str, valid: str = "") -> None:
        self.r.add(node, found, valid)

    def leg(self, leg: LegSpec, o: dict[str, Node]) -> LegOptions:
        """The options of one leg from its option nodes."""
        proc = leg.process
        out: dict[str, Any] = {}
        for key, allowed in (("efficiency", MACHINES), ("mechanical_efficiency", MACHINES),
                             ("pressure_drop", ("cooler", "heater")), ("staging", ("compressor",))):
            if key in o and proc not in allowed:
                self.add(o[key], f"{key} does not apply to a {proc} leg",
                         f"{key} applies to {' and '.join(p + ' legs' for p in allowed)}; remove it")
        measured = "temperature" in leg.end and any(k in leg.end for k in PRESSURE_TARGETS)
        if proc in MACHINES and "efficiency" in o:
            m = self.r.mapping(o["efficiency"], ("polytropic", "isentropic"), what="efficiency")
            if len(o["efficiency"].value if o["efficiency"].kind == "map" else ()) != 1 and m:
                self.add(o["efficiency"], "more than one efficiency is given",
                         "give one: efficiency: {polytropic: 0.78} or efficiency: {isentropic: 0.80}")
            elif "polytropic" in m:
                out["eta_p"] = self.r.fraction(m["polytropic"], "polytropic efficiency")
            elif "isentropic" in m:
                out["eta_s"] = self.r.fraction(m["isentropic"], "isentropic efficiency")
            elif o["efficiency"].kind == "map":
                self.add(o["efficiency"], "no efficiency is given",
                         "give efficiency: {polytropic: 0.78} or efficiency: {isentropic: 0.80}")
            if measured:
                self.add(o["efficiency"], "an efficiency is given together with a measured end temperature",
                         "give either the efficiency or the measured end temperature; both efficiencies are "
                         "derived from a measured end state")
        if proc in MACHINES and "efficiency" not in o and not measured:
            self.add(self._leg_node(leg), f"the {proc} leg '{leg.name}' has no efficiency",
                     "add efficiency: {polytropic: 0.78} (or isentropic), or a measured end temperature beside "
                     "the end pressure")
        if proc in MACHINES and "mechanical_efficiency" in o:
            out["eta_m"] = self.r.fraction(o["mechanical_efficiency"], "mechanical efficiency")
        if proc in ("cooler", "heater") and "pressure_drop" in o:
            out["drop"] = self.r.drop(o["pressure_drop"])
        self.targets(leg)
        if proc == "compressor" and "staging" in o:
            if measured:
                self.add(o["staging"], "staging cannot be combined with a measured end temperature",
                         "remove the measured temperature or the staging")
            out["staging"] = self.staging(o["staging"])
        return LegOptions(**{k: v for k, v in out.items() if v is not None})

    def targets(self, leg: LegSpec) -> None:
        proc, end = leg.process, leg.end
        where = self._leg_node(leg, "end")
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
            self.add(self._leg_node(leg), "a steady-flow polytropic leg needs its exponent n",
                     "add n: 1.3 (a compressor with an efficiency derives n from its end states)")

    def staging(self, node: Node) -> Staging | None:
        m = self.r.mapping(node, STAGING_KEYS, what="staging")
        if not m and node.kind != "map":
            return None
        stages = T_max = None
        if ("stages" in m) == ("max_discharge_temperature" in m):
            self.add(node, "staging needs exactly one of stages and max_discharge_temperature",
                     "give stages: 2 (equal ratios), or max_discharge_temperature: 150 degC (fewest stages)")
        if "stages" in m:
            stages = self.r.integer(m["stages"], 1, 12, "the number of stages")
        if "max_discharge_temperature" in m:
            T_max = self.r.quantity(m["max_discharge_temperature"], "temperature")
        max_stages = DEFAULT_MAX_STAGES
        if "max_stages" in m:
            if "stages" in m:
                self.add(m["max_stages"], "max_stages applies to the fewest-stages search only", "remove it")
            max_stages = self.r.integer(m["max_stages"], 1, 12, "max_stages") or DEFAULT_MAX_STAGES
        T_cool = None
        drop = Drop()
        if "intercooler" not in m:
            self.add(node, "staging needs the intercooler outlet temperature",
                     "add intercooler: {temperature: 40 degC, pressure_drop: 2 %}")
        else:
            ic = self.r.mapping(m["intercooler"], INTERCOOLER_KEYS, what="intercooler")
            if "temperature" in ic:
                T_cool = self.r.quantity(ic["temperature"], "temperature")
            elif m["intercooler"].kind == "map":
                self.add(m["intercooler"], "the intercooler has no outlet temperature", "add temperature: 40 degC")
            if "pressure_drop" in ic:
                drop = self.r.drop(ic["pressure_drop"])
        if T_cool is None or (stages is None and T_max is None):
            return None
        return Staging(stages, T_max, max_stages, T_cool, drop, node.path)

    def _leg_node(self, leg: LegSpec, key: str = "") -> Node:
        """A stand-in node carrying the place of a leg (or one of its keys) for messages."""
        path = f"{leg.path}.{key}" if key else leg.path
        line, col = self.locate(path)
        return Node(None, line, col, path)


def read_options(r: Reader, legs: list[tuple[LegSpec, dict[str, Node]]],
                 locate: Callable[[str], tuple[int, int]]) -> list[LegOptions]:
    """The options of every leg of a steady-flow job (problems go to the reader)."""
    o = _Options(r, locate)
    return [o.leg(leg, nodes) for leg, nodes in legs]


def chain_problems(job: Job) -> list[Problem]:
    """What the legs' own inputs show without computing: a leg going the wrong way from an inlet whose
    pressure (or temperature) follows from the given values (the start, end pressures and ratios, the pressure
    drops of coolers and heaters, the outlet temperatures of coolers and heaters), and a pressure drop at least
    the pressure at its inlet."""
    out: list[Problem] = []
    P: float | None = job.start.pressure.si
    T: float | None = job.start.temperature.si
    for leg in job.legs:
        if P is not None:
            wrong = direction_problem(job, leg, P, T)
            if wrong is not None:
                out.append(wrong)
                return out                  # the legs after it start from a state that cannot be
        proc = leg.process
        if proc in ("cooler", "heater"):
            d = leg.options.drop
            if P is not None and d.inp is not None and d.outlet(P) <= 0:
                out.append(job.problem_at(d.inp, f"the pressure drop {d.inp.entered} leaves no outlet pressure: it "
                                          f"is larger than the inlet pressure of '{leg.name}' ({say(P, 'Pa', job.units, 6)}), "
                                          "or equal to it",
                                          "give a drop smaller than the inlet pressure"))
                return out
            P = d.outlet(P) if P is not None else None
            T = leg.end["temperature"].si if "temperature" in leg.end else None
            continue
        if "pressure" in leg.end:
            P = leg.end["pressure"].si
        elif "pressure_ratio" in leg.end and P is not None:
            P = P * leg.end["pressure_ratio"].si
        else:
            P = None
        T = leg.end["temperature"].si if "temperature" in leg.end else None
    return out


def direction_problem(job: Job, leg: LegSpec, P_in: float, T_in: float | None) -> Problem | None:
    """A leg whose end target goes the wrong way for its process, from an inlet at (P_in, T_in): a
    compressor that does not raise the pressure, an expander or throttle that does not lower it, a cooler
    that heats or a heater that cools."""
    proc = leg.process

    def at(inp: Input, found: str, valid: str) -> Problem:
        return Problem(job.name, inp.line, inp.col, inp.path, found, valid)

    if proc in ("cooler", "heater") and "temperature" in leg.end:
        if T_in is None:
            return None
        t = leg.end["temperature"]
        if proc == "cooler" and t.si > T_in:
            return at(t, f"the cooler outlet {t.entered} is above its inlet temperature ({say(T_in, 'K', job.units, 4)})",
                      "a cooler lowers the temperature; use a heater, or a lower outlet temperature")
        if proc == "heater" and t.si < T_in:
            return at(t, f"the heater outlet {t.entered} is below its inlet temperature ({say(T_in, 'K', job.units, 4)})",
                      "a heater raises the temperature; use a cooler, or a higher outlet temperature")
        return None
    inp = leg.end.get("pressure") or leg.end.get("pressure_ratio")
    if inp is None:
        return None
    P2 = inp.si if "pressure" in leg.end else P_in * inp.si
    if proc == "compressor" and P2 <= P_in:
        return at(inp, f"the compressor's end pressure ({say(P2, 'Pa', job.units, 6)}) is not above its start "
                       f"({say(P_in, 'Pa', job.units, 6)})",
                  "give an end pressure above the start, or use an expander or throttle")
    if proc in ("expander", "throttle") and P2 >= P_in:
        return at(inp, f"the {proc}'s end pressure ({say(P2, 'Pa', job.units, 6)}) is not below its start "
                       f"({say(P_in, 'Pa', job.units, 6)})",
                  "give an end pressure below the start (pressure_ratio is end/start, below 1 for an expansion)")
    return None
