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
from .cylinder import MACHINE_KINDS, read_cylinder
from .model import Drop, Input, Job, LegOptions, LegSpec, Staging
from .reader import Reader
from .source import Node

__all__ = ["DEFAULT_MAX_STAGES", "FLOW_OPTION_KEYS", "MACHINES", "STAGING_RULES", "chain_problems", "direction_problem", "read_options"]

MACHINES = ("compressor", "expander")
PRESSURE_TARGETS = ("pressure", "pressure_ratio")
DEFAULT_MAX_STAGES = 6
FLOW_OPTION_KEYS = ("efficiency", "pressure_drop", "mechanical_efficiency", "staging", "machine", "cylinder")
STAGING_KEYS = ("stages", "max_discharge_temperature", "ratios", "interstage_pressures", "max_stages", "intercooler")
#: The ways a staging block fixes its stages; exactly one is given.
STAGING_RULES = ("stages", "max_discharge_temperature", "ratios", "interstage_pressures")
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
            elif "polytropic" in m or "isentropic" in m:
                kind = "polytropic" if "polytropic" in m else "isentropic"
                etas = self.efficiencies(m[kind], f"{kind} efficiency", "staging" in o)
                out["eta_p" if kind == "polytropic" else "eta_s"] = etas[0] if etas else None
                if etas and m[kind].kind == "seq":
                    out["eta_stages"] = tuple(etas)
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
            self.stage_list(o, out)
        self.machine(leg, o, out)
        return LegOptions(**{k: v for k, v in out.items() if v is not None})

    def efficiencies(self, node: Node, what: str, staged: bool) -> list[Input]:
        """One efficiency, or (on a staged leg) a list of one per stage."""
        if node.kind != "seq":
            one = self.r.fraction(node, what)
            return [one] if one is not None else []
        if not staged:
            self.add(node, f"a list of {what} values is given on a leg that is not staged",
                     f"give one value, for example {what.split()[0]}: 0.78; a list applies to a staged leg, one per stage")
            return []
        items = self.r.seq(node)
        if not items:
            self.add(node, f"the list of {what} values is empty", "give one value per stage, for example [0.80, 0.78]")
            return []
        out = [self.r.fraction(x, what) for x in items]
        return [x for x in out if x is not None] if all(x is not None for x in out) else []

    def stage_list(self, o: dict[str, Node], out: dict[str, Any]) -> None:
        """A per-stage efficiency list needs a fixed number of stages, and one value for each."""
        st, etas = out.get("staging"), out.get("eta_stages")
        if st is None or not etas:
            return
        node = o["efficiency"]
        if st.fixed is None:
            self.add(node, "per-stage efficiencies are given, but the number of stages is searched for",
                     "give one efficiency for every stage, or fix the stages (stages, ratios or interstage_pressures)")
        elif len(etas) != st.fixed:
            self.add(node, f"{len(etas)} per-stage efficiencies are given for {st.fixed} stages",
                     f"give {st.fixed} values, one per stage in order, or one value for all")

    def machine(self, leg: LegSpec, o: dict[str, Node], out: dict[str, Any]) -> None:
        """machine: reciprocating with its cylinder, on a compressor leg."""
        if "machine" in o and leg.process != "compressor":
            self.add(o["machine"], f"machine does not apply to a {leg.process} leg",
                     "machine: reciprocating applies to compressor legs; remove it")
            return
        kind = self.r.enum(o["machine"], MACHINE_KINDS) if "machine" in o else None
        if kind and "cylinder" not in o:
            self.add(o["machine"], "a reciprocating machine is given without its cylinder",
                     "add cylinder: {bore: 200 mm, stroke: 120 mm, rod: 40 mm, speed: 500 rpm, clearance: 15 %, "
                     "action: double}")
        if "cylinder" in o and "machine" not in o:
            self.add(o["cylinder"], "a cylinder is given, but the leg does not say which machine it belongs to",
                     "add machine: reciprocating")
        if "staging" in o and kind:
            self.add(o["staging"], "a reciprocating leg cannot be staged inside one leg",
                     "give each reciprocating stage its own leg with its own cylinder, and the intercoolers as "
                     "cooler legs between them; the interstage pressures are then settled by the cylinders")
        if kind and "cylinder" in o:
            out["machine"] = kind
            out["cylinder"] = read_cylinder(self.r, o["cylinder"])

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
        rules = [k for k in STAGING_RULES if k in m]
        if len(rules) != 1:
            self.add(node, f"staging needs exactly one of {', '.join(STAGING_RULES)}"
                     + (f" (found {', '.join(rules)})" if rules else ""),
                     "give stages: 2 (equal ratios), max_discharge_temperature: 150 degC (fewest stages), "
                     "ratios: [3.0, 2.8] or interstage_pressures: [4 bara, 12 bara] (the first stages; the last "
                     "stage takes the rest)")
        ratios = self.given_list(m, "ratios", "dimensionless")
        pressures = self.given_list(m, "interstage_pressures", "pressure")
        if "stages" in m:
            stages = self.r.integer(m["stages"], 1, 12, "the number of stages")
        if "max_discharge_temperature" in m:
            T_max = self.r.quantity(m["max_discharge_temperature"], "temperature")
        max_stages = DEFAULT_MAX_STAGES
        if "max_stages" in m:
            if "max_discharge_temperature" not in m:
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
        if T_cool is None or (stages is None and T_max is None and not ratios and not pressures) or len(rules) != 1:
            return None
        return Staging(stages, T_max, max_stages, T_cool, drop, node.path, ratios, pressures)

    def given_list(self, m: dict[str, Node], key: str, kind: str) -> tuple[Input, ...]:
        """The given ratios (each above 1) or interstage pressures (rising) of the first stages."""
        if key not in m:
            return ()
        node = m[key]
        items = self.r.seq(node)
        if node.kind == "seq" and not 1 <= len(items) <= 11:
            self.add(node, f"{len(items)} {key.replace('_', ' ')} are given",
                     "give 1 to 11 values: one for each stage but the last, which takes the rest")
            return ()
        out: list[Input] = []
        for x in items:
            if kind == "dimensionless":
                v = self.r.number(x, 1.0, 1e3, lo_open=True, what="a stage pressure ratio")
                inp = Input(v, "", str(x.value), x.path, *x.where) if v is not None else None
                if inp is not None:
                    self.r.inputs.append(inp)
            else:
                inp = self.r.quantity(x, "pressure")
            if inp is None:
                return ()
            if kind == "pressure" and out and inp.si <= out[-1].si:
                self.add(x, f"the interstage pressure {inp.entered} is not above the one before ({out[-1].entered})",
                         "list the discharge pressures of the first stages in rising order")
                return ()
            out.append(inp)
        return tuple(out)

    def _leg_node(self, leg: LegSpec, key: str = "") -> Node:
        """A stand-in node carrying the place of a leg (or one of its keys) for messages."""
        path = f"{leg.path}.{key}" if key else leg.path
        line, col = self.locate(path)
        return Node(None, line, col, path)


def read_options(r: Reader, legs: list[tuple[LegSpec, dict[str, Node]]],
                 locate: Callable[[str], tuple[int, int]]) -> list[LegOptions]:
    """The options of every leg of a steady-flow job (problems go to the reader)."""
    o = _Options(r, locate)
    opts = [o.leg(leg, nodes) for leg, nodes in legs]
    _series(o, [leg for leg, _ in legs], opts)
    return opts


def _series(o: _Options, legs: list[LegSpec], opts: list[LegOptions]) -> None:
    """Reciprocating stages in series (only coolers and heaters between): the interstage pressures are
    settled by the cylinders, so every stage but the last of a series has no end, and the last has one."""
    for k, (leg, opt) in enumerate(zip(legs, opts, strict=True)):
        if opt.machine != "reciprocating":
            continue
        nxt = next((j for j in range(k + 1, len(legs)) if legs[j].process not in ("cooler", "heater")), None)
        followed = nxt is not None and opts[nxt].machine == "reciprocating"
        if nxt is not None and followed and leg.end:
            o.add(o._leg_node(leg, "end"), f"'{leg.name}' is followed by the reciprocating stage "
                  f"'{legs[nxt].name}': the pressure between them is where both cylinders pass the same mass flow, "
                  "not an input", "remove end from this stage; give the end pressure on the last stage of the series")
        elif not followed and not leg.end:
            o.r.add(o._leg_node(leg), f"the reciprocating stage '{leg.name}' has no end pressure, and no reciprocating "
                  "stage follows it", "add end: {pressure: 9 bara} (only a stage followed by another reciprocating "
                  "stage leaves its end to the cylinders)", path=f"{leg.path}.end")


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
