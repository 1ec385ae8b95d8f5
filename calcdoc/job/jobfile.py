"""The job file: YAML in, a validated :class:`Job` out, or every problem found at once.

This module knows YAML and units, nothing of thermodynamics. Every value keeps the line and column
it came from so that later errors (from the engine) can still point into the file. The file is read in
two passes: the sections every job has (title block, site, gas, start, legs), then, when those are
sound, what refers to them (the steady-flow leg options, the limits, the sweep).
"""
from __future__ import annotations

import dataclasses
import datetime as _dt
from dataclasses import fields
from pathlib import Path

from .. import units
from ..errors import Finding, JobError, Problem
from ..physics.fluids import closest_fluids, component_name, is_mixture_string, known_fluid, molar_mass
from .displayunits import base_system, read_units
from .files import read_regular
from .flowopts import FLOW_OPTION_KEYS, chain_problems, read_options
from .limits import Places, read_limits
from .messages import found_text, valid_text
from .model import HUMIDITY_KEYS, GasSpec, Input, Job, LegSpec, Site, StartSpec, TitleBlock, keys_of
from .reader import Reader, describe as _describe
from .solve import read_solve
from .source import MAX_BYTES as _MAX_BYTES, Node, decode, leaves, load as _load_yaml
from .statics import static_problems, static_warnings
from .sweep import read_sweep
from .vesselfile import read_vessel, read_vessel_leg

__all__ = ["CLOSED_PROCESSES", "FLOW_PROCESSES", "load", "loads"]

SCHEMA_VERSION = 1
#: Longest calc number or revision, name of a person, and one-line text (title, project, client) [characters]:
#: they stand in the title block and page headers, where a longer text would not fit.
MAX_ID, MAX_NAME, MAX_LINE = 60, 120, 300
CLOSED_PROCESSES = ("polytropic", "isentropic", "isothermal", "isobaric", "isochoric")
FLOW_PROCESSES = ("compressor", "expander", "cooler", "heater", "throttle", "polytropic", "isentropic", "isothermal")
CLOSED_TARGETS = ("pressure", "temperature", "volume", "pressure_ratio", "volume_ratio")
FLOW_TARGETS = ("pressure", "temperature", "pressure_ratio")
TARGET_KIND = {"pressure": "pressure", "temperature": "temperature", "volume": "volume",
               "pressure_ratio": "dimensionless", "volume_ratio": "dimensionless"}


def load(path: str | Path) -> Job:
    """Read and validate a job file."""
    data = read_regular(path, _MAX_BYTES, "a job file (.yaml)")
    return loads(data, str(path))


def loads(data: bytes | str, name: str = "<job>") -> Job:
    """Validate job-file content (bytes as read from disk, or text)."""
    if isinstance(data, str):
        data = data.encode("utf-8")
    text = decode(data, name)
    tree = _load_yaml(text, name)
    v = _Validator(name)
    job = v.job(tree, data)
    if v.problems or job is None:
        raise JobError(_ordered(v.problems))
    job = v.references(tree, job)
    if v.problems:
        raise JobError(_ordered(v.problems))
    return job


def _ordered(problems: list[Problem]) -> list[Problem]:
    return sorted(problems, key=lambda p: (p.line, p.column))


# ----------------------------------------------------------------------------------------------
class _Validator(Reader):
    """Reads the sections of a job file into the job model."""

    def __init__(self, name: str):
        super().__init__(name, required_hints=_REQUIRED_HINT)
        self.option_nodes: dict[str, dict[str, Node]] = {}
        self.vessel_node: Node | None = None
        self.no_flow: Node | None = None

    # -- sections ---------------------------------------------------------------------------------
    def job(self, tree: Node, data: bytes) -> Job | None:
        top = self.mapping(tree, _TOP_KEYS, required=("calcdoc", "calc", "gas", "start", "legs"))
        if "calcdoc" in top:
            ver = top["calcdoc"]
            if ver.value != SCHEMA_VERSION or isinstance(ver.value, bool):
                self.add(ver, f"schema version {ver.value!r} is not supported", f"write 'calcdoc: {SCHEMA_VERSION}'")
        calc = self.title_block(top.get("calc"))
        system = self.enum(top.get("system"), ("closed", "flow", "vessel"), default="closed")
        self.system = base_system(top.get("units"))     # for values in messages until the units are read
        site = self.site(top.get("site"))
        unit_system = read_units(self, top.get("units"), site.P_atm)
        self.system = unit_system or self.system
        gas = self.gas(top.get("gas"))
        vessel = None
        if system == "vessel":
            if "vessel" not in top:
                self.add(tree, "missing required key 'vessel'", "a vessel job gives its vessel: vessel: {volume: 2 m3}",
                         path="vessel")
            vessel = read_vessel(self, top.get("vessel"))
        elif "vessel" in top:
            self.add(top["vessel"], f"a vessel block is given, and this job is a {system} system",
                     "set system: vessel for a vessel that fills or empties over time, or remove the block")
        self.vessel_node = top.get("vessel")
        start = self.start(top.get("start"), system)
        legs = self.legs(top.get("legs"), system)
        if self.no_flow is not None and not self._cylinder_first(top.get("legs")):
            self.add(self.no_flow, "no flow is given, and the first leg is not a reciprocating stage whose cylinder "
                     "sets it", "give exactly one of mass_flow, molar_flow, volume_flow or standard_volume_flow, or "
                     "make the first leg a compressor with machine: reciprocating and its cylinder")
        assumptions = tuple(self.text(n) for n in self.seq(top.get("assumptions")))
        self.seq(top.get("limits"))
        if self.problems or calc is None or gas is None or start is None or system is None or unit_system is None:
            return None
        if system == "vessel" and vessel is None:
            return None
        return Job(self.name, data, calc, unit_system, site, gas, system,
                   start, tuple(legs), (), assumptions, (), {}, leaves(tree), vessel=vessel)

    @staticmethod
    def _cylinder_first(node: Node | None) -> bool:
        """Whether the first leg is a compressor with machine: reciprocating (its cylinder sets the flow)."""
        if node is None or node.kind != "seq" or not node.value or node.value[0].kind != "map":
            return False
        first = node.value[0].value
        return all(k in first and first[k].kind == "scalar" for k in ("process", "machine")) and \
            str(first["process"].value).strip() == "compressor" and str(first["machine"].value).strip() == "reciprocating"

    def references(self, tree: Node, job: Job) -> Job:
        """The second pass: steady-flow leg options, limits and sweep, which refer to the legs and inputs."""
        legs = job.legs
        if job.system == "flow":
            opts = read_options(self, [(leg, self.option_nodes[leg.path]) for leg in legs], self._locate)
            legs = tuple(dataclasses.replace(leg, options=o) for leg, o in zip(legs, opts, strict=True))
        places = Places(legs)
        limits = read_limits(self, self.seq(tree.value.get("limits")), job.system, places)
        sweep = read_sweep(self, tree, job.system, places, self.inputs)
        solve = read_solve(self, tree, job.system, places, self.inputs)
        inputs = tuple(sorted(self.inputs, key=lambda i: (i.line, i.col)))
        job = dataclasses.replace(job, legs=legs, limits=limits, sweep=sweep, solve=solve, inputs=inputs,
                                  where=dict(self.where))
        if job.system == "flow" and not self.problems:
            self.problems += chain_problems(job)
        if not self.problems:
            self.problems += static_problems(job)
            job = dataclasses.replace(job, warnings=tuple(static_warnings(job)))
        return job

    def _locate(self, path: str) -> tuple[int, int]:
        while path:
            if path in self.where:
                return self.where[path]
            path = path.rsplit(".", 1)[0] if "." in path else (path.rsplit("[", 1)[0] if "[" in path else "")
        return (0, 0)

    def title_block(self, node: Node | None) -> TitleBlock | None:
        if node is None:
            return None
        m = self.mapping(node, _CALC_KEYS, required=("number", "title", "revision", "date"), what="the title block")
        history = []
        seen_revs: dict[str, int] = {}
        for item in self.seq(m.get("history")):
            h = self.mapping(item, ("revision", "date", "description"), required=("revision", "date", "description"))
            hd = h.get("date")
            if hd is not None and not isinstance(hd.value, _dt.date) and not (isinstance(hd.value, str) and _iso_date(hd.value)):
                self.add(hd, f"expected a date, found {_describe(hd)}", "write the date as YYYY-MM-DD (ISO 8601)")
            rev = self.text(h.get("revision"), required="revision" in h, what="revision", most=MAX_ID)
            if rev and rev in seen_revs:
                self.add(h["revision"], f"revision '{rev}' is listed twice in the history (first at line "
                         f"{seen_revs[rev]})", "list each revision once")
            elif rev:
                seen_revs[rev] = h["revision"].where[0]
            history.append((rev, self.text(h.get("date")), self.text(h.get("description"))))
        drawings = tuple(self.text(d) for d in self.seq(m.get("drawings")))
        if "date" in m:
            d = m["date"]
            if not isinstance(d.value, (_dt.date, str)) or (isinstance(d.value, str) and not _iso_date(d.value)):
                self.add(d, f"expected a date, found {_describe(d)}", "write the date as YYYY-MM-DD (ISO 8601), "
                         "for example 2026-11-28")
        if not m or any(k not in m for k in ("number", "title", "revision", "date")):
            return None
        # the calc number and revision name the output files and identify the package: never empty
        number = self.text(m["number"], required=True, what="calc number", most=MAX_ID)
        revision = self.text(m["revision"], required=True, what="revision", most=MAX_ID)
        title = self.text(m["title"], required=True, what="title", most=MAX_LINE)
        people = {k: self.text(m.get(k), what=k.replace("_", " "), most=MAX_NAME)
                  for k in ("prepared_by", "checked_by", "approved_by")}
        return TitleBlock(number=number, title=title,
                          project=self.text(m.get("project"), most=MAX_LINE), revision=revision,
                          date=self.text(m["date"]), client=self.text(m.get("client"), most=MAX_LINE),
                          purpose=self.text(m.get("purpose")), **people,
                          drawings=drawings, history=tuple(history))

    def site(self, node: Node | None) -> Site:
        if node is None:
            return Site(None, "not given")
        m = self.mapping(node, keys_of(Site), what="the site")
        rh = self._humidity(m, "relative_humidity") if "relative_humidity" in m else None
        site = self._site_atmosphere(node, m)
        return dataclasses.replace(site, relative_humidity=rh) if rh is not None else site

    def _humidity(self, m: dict[str, Node], key: str) -> Input | None:
        """A humidity input: relative humidity as a fraction or percent (0 to 100 %), a dew point, or a
        humidity ratio in kg of water per kg of dry air."""
        if key == "dew_point":
            return self.quantity(m[key], "temperature")
        q = self.quantity(m[key], "dimensionless", positive=False, allow_percent=(key == "relative_humidity"))
        if q is None:
            return None
        if key == "relative_humidity" and not 0.0 <= q.si <= 1.0:
            self.add(m[key], f"a relative humidity of {q.entered}", "give 0 to 100 % (or a fraction 0 to 1)")
            return None
        if key == "humidity_ratio" and not 0.0 <= q.si < 1.0:
            self.add(m[key], f"a humidity ratio of {q.entered}",
                     "give kg of water vapour per kg of dry air, for example 0.012")
            return None
        return q

    def _site_atmosphere(self, node: Node, m: dict[str, Node]) -> Site:
        if "atmosphere" in m and "elevation" in m:
            self.add(node, "both atmosphere and elevation are given", "give one: the measured atmosphere or the elevation")
        if "atmosphere" in m:
            text = str(m["atmosphere"].value)
            if m["atmosphere"].kind == "scalar" and units.is_gauge_text(text):
                self.add(m["atmosphere"], f"'{text}' is a gauge pressure",
                         "the site atmosphere is the absolute barometric pressure, for example 98.6 kPa or 14.3 psia")
                return Site(None, "not given")
            atm = self.quantity(m["atmosphere"], "pressure", allow_gauge=False)
            if atm is not None:
                if not 30e3 <= atm.si <= 110e3:
                    self.add(m["atmosphere"], f"an atmosphere of {units.say(atm.si, 'Pa', self.system, 4)} is not a site atmosphere",
                             "give the absolute barometric pressure at the site, 30 to 110 kPa")
                    return Site(None, "not given")
                self.atm = atm.si
                return Site(atm.si, "given", atmosphere=atm)
        if "elevation" in m:
            el = self.quantity(m["elevation"], "length", positive=False)
            if el is not None:
                try:
                    P = units.standard_atmosphere_pressure(el.si)
                except ValueError as exc:
                    self.add(m["elevation"], str(exc), "give an elevation from -610 m to 11 000 m")
                    return Site(None, "not given")
                self.atm = P
                return Site(P, "standard atmosphere at elevation", elevation=el)
        return Site(None, "not given")

    def gas(self, node: Node | None) -> GasSpec | None:
        if node is None:
            return None
        m = self.mapping(node, keys_of(GasSpec), required=("model",), what="the gas")
        model = self.enum(m.get("model"), ("real", "ideal"))
        fluid = self.text(m.get("fluid")) or None
        basis = self.enum(m.get("basis"), ("mole", "mass")) if "basis" in m else "mole"
        if "basis" in m and "mixture" not in m:
            self.add(m["basis"], "basis is given without a mixture", "remove basis, or give mixture: {...}")
        mixture: list[tuple[str, float]] = []
        total = 1.0
        if "mixture" in m:
            mm = m["mixture"]
            if mm.kind != "map" or not mm.value:
                self.add(mm, f"expected component: fraction pairs, found {_describe(mm)}",
                         "write for example mixture: {Methane: 0.9, Ethane: 0.1} or {C1: 0.9, C2: 0.1}")
            elif _looks_like_percent(mm):
                self.add(mm, "the fractions sum to about 100: they look like percentages",
                         "write fractions that sum to 1 (for example 92 % → 0.92)")
            else:
                for comp, xnode in mm.value.items():
                    self.where[xnode.path] = xnode.where
                    x = self.number(xnode, 0.0, 1.0, lo_open=True, what=f"a {basis or 'mole'} fraction")
                    if x is not None:
                        mixture.append((component_name(comp), x))
                names = [c for c, _ in mixture]
                if len(set(names)) < len(names):
                    dup = sorted({c for c in names if names.count(c) > 1})
                    self.add(mm, f"a component is given twice (by its name and its short name?): {', '.join(dup)}",
                             "give each component once")
                total = sum(x for _, x in mixture)
                if len(mixture) == len(mm.value) and abs(total - 1.0) > MIXTURE_SUM_TOL * (1 + 1e-9):
                    self.add(mm, f"the {basis or 'mole'} fractions sum to {total:.6g}",
                             f"fractions must sum to 1 (within {MIXTURE_SUM_TOL:g}; they are then normalised)")
                elif len(mixture) == len(mm.value):
                    mixture = [(c, x / total) for c, x in mixture]
                    if basis == "mass":
                        mixture = _mole_fractions(mixture)
        given: list[tuple[Node, str, str]] = [(m["fluid"], fluid, "fluid.unknown")] if fluid else []
        if "mixture" in m and m["mixture"].kind == "map":
            given += [(xnode, component_name(c), "fluid.unknown_component") for c, xnode in m["mixture"].value.items()]
        for at, nm, code in given:
            if not known_fluid(nm):
                f = Finding("fluid.mixture_string" if is_mixture_string(nm) else code,
                            {"name": nm, "close": tuple(closest_fluids(nm))})
                self.add(at, found_text(f, self.system), valid_text(f, self.system))
        if fluid and "mixture" in m:
            self.add(node, "both fluid and mixture are given", "give a fluid (one component) or a mixture")
        if not fluid and "mixture" not in m and model == "real":
            self.add(node, "no fluid or mixture is given", "add fluid: Nitrogen (a CoolProp fluid name) or mixture: {...}",
                     path=f"{node.path}.fluid")
        k = None
        if "k" in m:
            kv = self.number(m["k"], 1.0, 5.0 / 3.0 + 1e-9, lo_open=True, what="a heat capacity ratio k")
            if kv is not None:
                k = Input(kv, "", str(m["k"].value), m["k"].path, *m["k"].where)
                self.inputs.append(k)
        molar_mass = self.quantity(m.get("molar_mass"), "molar_mass")
        R = self.quantity(m.get("R"), "specific_gas_constant")
        if model == "real" and (k or molar_mass or R):
            self.add(node, "k, molar_mass and R apply to the ideal-gas model only",
                     "remove them, or set model: ideal")
        if model == "ideal":
            if molar_mass and R:
                self.add(node, "both molar_mass and R are given", "give one of them")
            if not fluid and "mixture" not in m and (("k" not in m) or ("molar_mass" not in m and "R" not in m)):
                self.add(node, "an ideal gas without a fluid needs k and molar_mass (or R)",
                         "add k: 1.4 and molar_mass: 28.97 g/mol, or name the fluid to take them from")
        if model is None:
            return None
        return GasSpec(model=model, fluid=fluid, mixture=tuple(mixture), k=k, molar_mass=molar_mass, R=R,
                       basis=basis or "mole", entered_sum=total)

    def start(self, node: Node | None, system: str | None) -> StartSpec | None:
        if node is None:
            return None
        keys = (("pressure", "temperature") if system == "vessel"
                else keys_of(StartSpec, "flow" if system == "flow" else "closed"))
        m = self.mapping(node, keys, required=("pressure", "temperature"), what="the start state")
        P = self.quantity(m.get("pressure"), "pressure")
        T = self.quantity(m.get("temperature"), "temperature")
        kinds = {f.name: f.metadata["kind"] for f in fields(StartSpec)
                 if f.name not in ("pressure", "temperature") + HUMIDITY_KEYS}
        vals = {k: self.quantity(m.get(k), kinds[k]) for k in kinds if k in keys}
        amount = [k for k in (("mass_flow", "molar_flow", "volume_flow", "standard_volume_flow") if system == "flow"
                              else ("volume", "mass")) if k in m]
        if not amount and m and system == "flow":
            self.no_flow = node     # allowed when the first leg is a reciprocating stage (checked with the legs)
        elif len(amount) != 1 and m and system != "vessel":
            which = "mass_flow, molar_flow, volume_flow or standard_volume_flow" if system == "flow" else "volume or mass"
            self.add(node, f"{'no amount of gas' if not amount else 'more than one amount: ' + ', '.join(amount)} is given",
                     f"give exactly one of {which}")
        if system == "flow":
            has_std = "standard_volume_flow" in m
            entered = str(m["standard_volume_flow"].value) if has_std else ""
            # the usual reference of the unit written: scf at 14.696 psia and 60 degF, Nm3 at 0 degC, Sm3 at 15 degC
            usual = ("standard_pressure: 14.696 psia and standard_temperature: 60 degF" if "scf" in entered.lower()
                     else "standard_pressure: 101.325 kPa and standard_temperature: 15 degC" if "Sm3" in entered
                     else "standard_pressure: 101.325 kPa and standard_temperature: 0 degC")
            for k in ("standard_pressure", "standard_temperature"):
                if has_std and k not in m:
                    self.add(node, f"a standard volume flow needs its reference {k.split('_')[1]} stated",
                             f"add {usual} (or the conditions your contract or datasheet states)",
                             path=f"{node.path}.{k}")
                if not has_std and k in m:
                    self.add(m[k], f"{k} is given without a standard_volume_flow", "remove it or give standard_volume_flow")
        given = [k for k in HUMIDITY_KEYS if k in m]
        if len(given) > 1:
            self.add(node, f"more than one humidity is given: {', '.join(given)}",
                     "give one of relative_humidity, dew_point or humidity_ratio")
        for k in given[:1]:
            vals[k] = self._humidity(m, k)
        if P is None or T is None:
            return None
        return StartSpec(P, T, **{k: v for k, v in vals.items()})

    def legs(self, node: Node | None, system: str | None) -> list[LegSpec]:
        items = self.seq(node)
        if node is not None and node.kind == "seq" and not items:
            self.add(node, "the list of legs is empty", "give at least one leg")
        out: list[LegSpec] = []
        names: dict[str, Node] = {}
        for item in items:
            leg = self.leg(item, system)
            if leg is None:
                continue
            if leg.name in names:
                self.add(item.value["name"], f"the leg name '{leg.name}' is used twice (first at line "
                         f"{names[leg.name].where[0]})", "give each leg its own name")
                continue
            names[leg.name] = item.value["name"]
            out.append(leg)
        return out

    def leg(self, node: Node, system: str | None) -> LegSpec | None:
        if system == "vessel":
            return read_vessel_leg(self, node, self.vessel_node)
        flow = system == "flow"
        allowed = _FLOW_LEG_KEYS if flow else _CLOSED_LEG_KEYS
        mach = node.value.get("machine") if node.kind == "map" else None
        # a reciprocating stage followed by another leaves its end pressure to the cylinders
        settled = flow and mach is not None and mach.kind == "scalar" and str(mach.value).strip() == "reciprocating"
        m = self.mapping(node, allowed, required=("name", "process") if settled else ("name", "process", "end"),
                         what="a leg")
        if not m:
            return None
        name = self.text(m.get("name"), required=True, what="leg name", most=MAX_NAME)
        pnode = m.get("process")
        pval = str(pnode.value).strip().casefold() if pnode is not None and pnode.kind == "scalar" else ""
        if not flow and pnode is not None and pval in FLOW_PROCESSES and pval not in CLOSED_PROCESSES:
            self.add(pnode, f"'{pnode.value}' is a steady-flow process, and this job is a closed system",
                     "set system: flow (and give a mass_flow or volume flow at the start), or use a closed-system "
                     "process: " + ", ".join(CLOSED_PROCESSES))
            process = None
        else:
            process = self.enum(pnode, FLOW_PROCESSES if flow else CLOSED_PROCESSES)
        n = None
        if "n" in m:
            if process not in (None, "polytropic"):
                self.add(m["n"], f"n applies to polytropic legs, not to {_a(process)} {process} leg", "remove n")
            else:
                nv = self.number(m["n"], -50.0, 1e6, what="a polytropic exponent n")
                if nv is not None:
                    n = Input(nv, "", str(m["n"].value), m["n"].path, *m["n"].where)
                    self.inputs.append(n)
        end: dict[str, Input] = {}
        if "end" in m:
            targets = FLOW_TARGETS if flow else CLOSED_TARGETS
            em = self.mapping(m["end"], targets, what="the end of a leg")
            for key, child in em.items():
                q = self.quantity(child, TARGET_KIND[key])
                if q is not None:
                    end[key] = q
            given = list(em)
            if em is not None and m["end"].kind == "map" and (given or not m["end"].value):
                self._check_targets(m["end"], process, given, n is not None or "n" in m, flow)
                if not flow:
                    self._check_closed_targets(node, m["end"], process, given, "n" in m)
        if flow:
            self.option_nodes[node.path] = {k: m[k] for k in FLOW_OPTION_KEYS if k in m}
        if not name or process is None or ("end" not in m and not settled) or \
                ("end" in m and len(end) != len(m["end"].value if m["end"].kind == "map" else ())):
            return None
        return LegSpec(name, process, node.path, *node.where, end=end, n=n,
                       note=self.text(m.get("note")))

    def _check_targets(self, end_node: Node, process: str | None, given: list[str], has_n: bool, flow: bool) -> None:
        if not given:
            self.add(end_node, "the leg has no end target", "give one of: " + ", ".join(FLOW_TARGETS if flow else CLOSED_TARGETS))
            return
        pressure_like = [g for g in given if g in ("pressure", "pressure_ratio")]
        volume_like = [g for g in given if g in ("volume", "volume_ratio")]
        if len(pressure_like) > 1 or len(volume_like) > 1:
            self.add(end_node, f"both {' and '.join(pressure_like if len(pressure_like) > 1 else volume_like)} are given",
                     "give one of them")
            return
        if len(given) == 1:
            return
        measured = (process == "polytropic" and not has_n and not flow and len(given) == 2 and pressure_like)
        measured_flow = flow and process in ("compressor", "expander") and len(given) == 2 and pressure_like \
            and "temperature" in given
        if measured or measured_flow:
            return
        why = ("a polytropic leg with n takes one end target; leave n out to derive it from a measured end pressure "
               "and temperature or volume") if process == "polytropic" else "give exactly one end target"
        self.add(end_node, f"{len(given)} end targets are given ({', '.join(given)})", why)

    def _check_closed_targets(self, leg: Node, end_node: Node, process: str | None, given: list[str],
                              has_n: bool) -> None:
        """Targets a closed-system process can reach: the property it holds constant is not one of them,
        and a polytropic leg needs n or a measured end state to derive n from."""
        held = _HELD_CONSTANT.get(process or "")
        if held:
            prop, keys = held
            for key in given:
                if key in keys:
                    allowed = [t for t in CLOSED_TARGETS if t not in keys]
                    self.add(end_node.value[key], f"{_a(process)} {process} leg keeps the {prop} constant, so it cannot "
                             f"end at a {key.replace('_', ' ')}", f"give one of: {', '.join(allowed)}; or choose the "
                             "process that reaches this target")
        if process == "polytropic" and not has_n and len(given) == 1:
            self.add(leg, "a polytropic leg needs its exponent n, or a measured end state to derive n from",
                     "add n (for example n: 1.3), or give the measured end pressure together with the end "
                     "temperature or volume", path=f"{leg.path}.n")


_TOP_KEYS = ("calcdoc", "calc", "units", "site", "gas", "system", "vessel", "start", "legs", "limits", "assumptions",
             "sweep", "solve")
_CALC_KEYS = keys_of(TitleBlock)
_CLOSED_LEG_KEYS = ("name", "process", "n", "end", "note")
_FLOW_LEG_KEYS = _CLOSED_LEG_KEYS + FLOW_OPTION_KEYS
_REQUIRED_HINT = {
    "calcdoc": "start the file with 'calcdoc: 1' (the job-file schema version)",
    "calc": "add the title block: calc: {number, title, revision, date, ...}",
    "gas": "add gas: {fluid: Nitrogen, model: real}",
    "start": "add the start state: start: {pressure, temperature, and volume or mass}",
    "legs": "add a list of legs, each with name, process and end",
    "pressure": "for example pressure: 7 barg (with a site atmosphere) or 8 bara",
    "temperature": "for example temperature: 25 degC",
    "name": "give the leg a name, for example name: Compression stroke",
    "process": "for example process: polytropic",
    "end": "give the end target, for example end: {volume: 0.01 m3}",
    "number": "the calc number, for example number: PRJ-000-C-001",
    "title": "the calc title",
    "revision": "the revision, for example revision: A",
    "date": "the date of this revision, YYYY-MM-DD",
    "model": "model: real (CoolProp) or model: ideal",
}


_HELD_CONSTANT = {"isochoric": ("volume", ("volume", "volume_ratio")),
                  "isothermal": ("temperature", ("temperature",)),
                  "isobaric": ("pressure", ("pressure", "pressure_ratio"))}


def _a(word: str | None) -> str:
    return "an" if (word or "x")[0] in "aeiou" else "a"


def _iso_date(text: str) -> bool:
    try:
        _dt.date.fromisoformat(text.strip())
    except ValueError:
        return False
    return len(text.strip()) == 10


#: A mixture whose fractions sum to 1 within this is normalised (with a warning showing the sum).
MIXTURE_SUM_TOL = 1e-3


def _mole_fractions(mass: list[tuple[str, float]]) -> list[tuple[str, float]]:
    """Mass fractions → mole fractions, x_i = (w_i/M_i) / Σ(w_j/M_j); unchanged where a component is unknown
    (the fluid check names it)."""
    Ms = [molar_mass(c) for c, _ in mass]
    known = [M for M in Ms if M is not None]
    if len(known) < len(Ms):
        return mass
    n = [w / M for (_, w), M in zip(mass, known, strict=True)]
    return [(c, ni / sum(n)) for (c, _), ni in zip(mass, n, strict=True)]


def _looks_like_percent(mm: Node) -> bool:
    vals = [c.value for c in mm.value.values()]
    if not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in vals):
        return False
    return any(v > 1.0 for v in vals) and abs(sum(vals) - 100.0) <= 0.5
