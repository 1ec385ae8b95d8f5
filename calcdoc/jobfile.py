"""The job file: YAML in, a validated :class:`Job` out, or every problem found at once.

This module knows YAML and units, nothing of thermodynamics. Every value keeps the line and column
it came from so that later errors (from the engine) can still point into the file.
"""
from __future__ import annotations

import datetime as _dt
import difflib
import hashlib
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from . import units
from ._yaml import MAX_BYTES as _MAX_BYTES, Node, decode, load as _load_yaml
from .errors import JobError, Problem

__all__ = ["CLOSED_PROCESSES", "FLOW_PROCESSES", "Input", "Job", "LegSpec", "load", "loads"]

SCHEMA_VERSION = 1
CLOSED_PROCESSES = ("polytropic", "isentropic", "isothermal", "isobaric", "isochoric")
FLOW_PROCESSES = ("compressor", "expander", "cooler", "heater", "throttle", "polytropic", "isentropic", "isothermal")
CLOSED_TARGETS = ("pressure", "temperature", "volume", "pressure_ratio", "volume_ratio")
FLOW_TARGETS = ("pressure", "temperature", "pressure_ratio")
TARGET_KIND = {"pressure": "pressure", "temperature": "temperature", "volume": "volume",
               "pressure_ratio": "dimensionless", "volume_ratio": "dimensionless"}


@dataclass(frozen=True)
class Input:
    """A quantity read from the job file: SI value, as entered, and where it was written."""

    si: float
    unit: str
    entered: str
    path: str
    line: int
    col: int
    gauge: bool = False
    percent: bool = False
    kind: str = ""          # the kind of quantity (units.DIMENSIONS key) where known

    @property
    def difference(self) -> bool:
        """A difference (pressure drop, temperature difference): shown without gauge/absolute or offset."""
        return self.kind in ("pressure_difference", "temperature_difference")

    @property
    def unmarked_pressure(self) -> bool:
        """A pressure in psi or kgf/cm2 written without an a/g marker: taken as absolute, though in much
        practice these units are read as gauge (plain bar, kPa and MPa are read as absolute)."""
        parts = self.entered.split(maxsplit=1)
        return self.kind == "pressure" and len(parts) == 2 and parts[1].strip() in ("psi", "kgf/cm2", "kg/cm2")


@dataclass(frozen=True)
class TitleBlock:
    number: str
    title: str
    project: str
    revision: str
    date: str
    client: str = ""
    purpose: str = ""
    prepared_by: str = ""
    checked_by: str = ""
    approved_by: str = ""
    drawings: tuple[str, ...] = ()
    history: tuple[tuple[str, str, str], ...] = ()   # (revision, date, description)


@dataclass(frozen=True)
class Site:
    P_atm: float | None          # absolute atmospheric pressure [Pa], None when not given
    source: str                  # "given", "standard atmosphere at elevation" or "not given"
    atmosphere: Input | None = None
    elevation: Input | None = None


@dataclass(frozen=True)
class GasSpec:
    model: str                                  # "real" or "ideal"
    fluid: str | None = None
    mixture: tuple[tuple[str, float], ...] = ()  # (component, mole fraction)
    k: Input | None = None
    molar_mass: Input | None = None
    R: Input | None = None


@dataclass(frozen=True)
class StartSpec:
    pressure: Input
    temperature: Input
    volume: Input | None = None
    mass: Input | None = None
    mass_flow: Input | None = None
    molar_flow: Input | None = None
    volume_flow: Input | None = None
    standard_volume_flow: Input | None = None
    standard_pressure: Input | None = None
    standard_temperature: Input | None = None


@dataclass(frozen=True)
class LegSpec:
    name: str
    process: str
    path: str                       # "legs[0]"
    line: int
    col: int
    end: dict[str, Input]           # target name → value (pressure, temperature, volume, ratios)
    n: Input | None = None
    options: dict[str, Any] = field(default_factory=dict)   # process-specific (efficiency, pressure_drop, ...)
    note: str = ""


@dataclass(frozen=True)
class Job:
    """A validated job: everything the engine needs, each input with its place in the file."""

    name: str                       # the file name as given by the user (for messages)
    data: bytes                     # the job file, byte for byte
    sha256: str
    calc: TitleBlock
    units: str                      # report unit system: "SI" or "US"
    site: Site
    gas: GasSpec
    system: str                     # "closed" or "flow"
    start: StartSpec
    legs: tuple[LegSpec, ...]
    limits: tuple[Node, ...] = ()
    assumptions: tuple[str, ...] = ()
    inputs: tuple[Input, ...] = ()  # every quantity in file order, for the report
    where: dict[str, tuple[int, int]] = field(default_factory=dict)
    tree: Node | None = None        # the parsed file, for later validators (limits, sweeps)

    @property
    def text(self) -> str:
        return self.data.decode("utf-8").lstrip("\ufeff")

    def locate(self, path: str) -> tuple[int, int]:
        """Line and column of a key path, or of its nearest parent that is known."""
        while path:
            if path in self.where:
                return self.where[path]
            path = path.rsplit(".", 1)[0] if "." in path else (path.rsplit("[", 1)[0] if "[" in path else "")
        return (0, 0)

    def problem(self, path: str, found: str, valid: str = "") -> Problem:
        line, col = self.locate(path)
        return Problem(self.name, line, col, path, found, valid)


def load(path: str | Path) -> Job:
    """Read and validate a job file."""
    p = Path(path)
    try:
        with p.open("rb") as fh:
            data = fh.read(_MAX_BYTES + 1)   # never read more than a job file may hold
    except FileNotFoundError:
        raise JobError([Problem(str(path), 0, 0, "", "no such file", "give the path of a job file (.yaml)")]) from None
    except IsADirectoryError:
        raise JobError([Problem(str(path), 0, 0, "", "this is a folder, not a job file",
                                "give the path of a job file (.yaml)")]) from None
    except OSError as exc:
        raise JobError([Problem(str(path), 0, 0, "", f"cannot read the file ({exc.strerror})", "")]) from None
    return loads(data, str(path))


def loads(data: bytes | str, name: str = "<job>") -> Job:
    """Validate job-file content (bytes as read from disk, or text)."""
    if isinstance(data, str):
        data = data.encode("utf-8")
    text = decode(data, name)
    tree = _load_yaml(text, name)
    v = _Validator(name)
    job = v.job(tree, data)
    if v.problems:
        raise JobError(sorted(v.problems, key=lambda p: (p.line, p.column)))
    _check_sections(job)
    return job


def _check_sections(job: Job) -> None:
    """Validate the sections that their own modules read (limits, sweep) and raise every problem."""
    from .checks import limit_problems
    from .sweep import sweep_problems

    problems = limit_problems(job) + sweep_problems(job)
    if job.system == "flow":
        from ._flowjob import option_problems

        problems += option_problems(job)
    if problems:
        raise JobError(sorted(problems, key=lambda p: (p.line, p.column)))


# ----------------------------------------------------------------------------------------------
class _Validator:
    def __init__(self, name: str):
        self.name = name
        self.problems: list[Problem] = []
        self.inputs: list[Input] = []
        self.where: dict[str, tuple[int, int]] = {}
        self.atm: float | None = None

    # -- helpers --------------------------------------------------------------------------------
    def add(self, node: Node, found: str, valid: str = "", path: str | None = None) -> None:
        line, col = node.where
        self.problems.append(Problem(self.name, line, col, node.path if path is None else path, found, valid))

    def mapping(self, node: Node, allowed: tuple[str, ...], required: tuple[str, ...] = (), what: str = "") -> dict[str, Node]:
        if node.kind != "map":
            self.add(node, f"expected a mapping of keys{(' for ' + what) if what else ''}, found {_describe(node)}",
                     f"valid keys here: {', '.join(allowed)}")
            return {}
        self.where[node.path] = node.where
        suggested: set[str] = set()
        for key, child in node.value.items():
            self.where[child.path] = child.where
            if key not in allowed:
                close = difflib.get_close_matches(key, allowed, n=1, cutoff=0.6)
                hint = f"did you mean '{close[0]}'? " if close else ""
                if close and close[0] in required and close[0] not in node.value:
                    suggested.add(close[0])
                    hint = f"did you mean '{close[0]}' (a required key)? "
                self.add(child, f"unknown key '{key}'", f"{hint}valid keys here: {', '.join(allowed)}")
        for key in required:
            if key not in node.value and key not in suggested:
                self.add(node, f"missing required key '{key}'", _REQUIRED_HINT.get(key, ""),
                         path=f"{node.path}.{key}" if node.path else key)
        return {k: c for k, c in node.value.items() if k in allowed}

    def text(self, node: Node | None, default: str = "") -> str:
        if node is None:
            return default
        if node.kind != "scalar" or node.value is None or isinstance(node.value, bool):
            self.add(node, f"expected text, found {_describe(node)}", "write plain text")
            return default
        if isinstance(node.value, (_dt.date, _dt.datetime)):
            return node.value.isoformat()
        return str(node.value)

    def number(self, node: Node, lo: float | None = None, hi: float | None = None, lo_open=False, hi_open=False,
               what: str = "a number") -> float | None:
        val = node.value
        if node.kind == "scalar" and isinstance(val, str):
            try:
                val = float(val)
            except ValueError:
                pass
        if node.kind != "scalar" or isinstance(val, bool) or not isinstance(val, (int, float)) or not math.isfinite(val):
            self.add(node, f"expected {what}, found {_describe(node)}", "write a plain number, for example 1.3")
            return None
        val = float(val)
        if (lo is not None and (val < lo or (lo_open and val == lo))) or (hi is not None and (val > hi or (hi_open and val == hi))):
            rng = f"{'(' if lo_open else '['}{'' if lo is None else _g(lo)}, {'' if hi is None else _g(hi)}{')' if hi_open else ']'}"
            self.add(node, f"{what} of {_g(val)} is out of range", f"valid range is {rng}")
            return None
        return val

    def enum(self, node: Node | None, choices: tuple[str, ...], default: str | None = None) -> str | None:
        if node is None:
            return default
        val = node.value if node.kind == "scalar" else None
        if isinstance(val, str) and val not in choices:
            # the trade writes Polytropic, REAL, si: the choice is the same word
            folded = {c.casefold(): c for c in choices}
            val = folded.get(val.strip().casefold(), val)
        if not isinstance(val, str) or val not in choices:
            close = difflib.get_close_matches(str(val), choices, n=1, cutoff=0.6) if isinstance(val, str) else []
            hint = f"did you mean '{close[0]}'? " if close else ""
            self.add(node, f"'{val if node.kind == 'scalar' else _describe(node)}' is not one of the choices",
                     f"{hint}valid: {', '.join(choices)}")
            return None
        return val

    def quantity(self, node: Node | None, kind: str, positive: bool = True, allow_percent: bool = False,
                 allow_gauge: bool = True) -> Input | None:
        if node is None:
            return None
        if node.kind != "scalar":
            self.add(node, f"expected a {kind.replace('_', ' ')} with its unit, found {_describe(node)}",
                     "write a number and a unit on one line, for example 'pressure: 7 barg'")
            return None
        try:
            parsed = units.parse_quantity(node.value, kind, atmosphere=self.atm, allow_percent=allow_percent)
        except units.UnitParseError as exc:
            self.add(node, exc.found, exc.valid)
            return None
        if parsed.gauge and not allow_gauge:
            self.add(node, f"'{parsed.entered}' is a gauge pressure", "give this value as an absolute pressure")
            return None
        if not math.isfinite(parsed.si):
            self.add(node, f"'{parsed.entered}' is not a finite value", "write a finite number")
            return None
        if positive and parsed.si <= 0.0:
            if kind == "pressure" and parsed.gauge:
                self.add(node, f"'{parsed.entered}' is below full vacuum (absolute pressure {parsed.si / 1e3:.4g} kPa "
                         f"with the site atmosphere of {self.atm / 1e3:.4g} kPa)",
                         "a gauge pressure cannot be lower than minus the atmospheric pressure")
            elif kind == "temperature":
                self.add(node, f"'{parsed.entered}' is at or below absolute zero", "give a temperature above 0 K (−273.15 °C)")
            else:
                self.add(node, f"'{parsed.entered}' is not positive", f"a {kind.replace('_', ' ')} must be greater than zero")
            return None
        inp = Input(parsed.si, parsed.unit, parsed.entered, node.path, *node.where, gauge=parsed.gauge,
                    percent=parsed.percent, kind=kind)
        self.inputs.append(inp)
        return inp

    # -- sections ---------------------------------------------------------------------------------
    def job(self, tree: Node, data: bytes) -> Job | None:
        top = self.mapping(tree, _TOP_KEYS, required=("calcdoc", "calc", "gas", "start", "legs"))
        if "calcdoc" in top:
            ver = top["calcdoc"]
            if ver.value != SCHEMA_VERSION or isinstance(ver.value, bool):
                self.add(ver, f"schema version {ver.value!r} is not supported", f"write 'calcdoc: {SCHEMA_VERSION}'")
        calc = self.title_block(top.get("calc"))
        system = self.enum(top.get("system"), ("closed", "flow"), default="closed")
        unit_system = self.enum(top.get("units"), ("SI", "US"), default="SI")
        site = self.site(top.get("site"))
        gas = self.gas(top.get("gas"))
        start = self.start(top.get("start"), system)
        legs = self.legs(top.get("legs"), system)
        assumptions = tuple(self.text(n) for n in self.seq(top.get("assumptions")))
        limits = tuple(self.seq(top.get("limits")))
        if self.problems or calc is None or gas is None or start is None or system is None or unit_system is None:
            return None
        return Job(self.name, data, hashlib.sha256(data).hexdigest(), calc, unit_system, site, gas, system,
                   start, tuple(legs), limits, assumptions, tuple(self.inputs), dict(self.where), tree)

    def seq(self, node: Node | None) -> list[Node]:
        if node is None:
            return []
        if node.kind != "seq":
            self.add(node, f"expected a list, found {_describe(node)}", "write a list, one item a line starting with '- '")
            return []
        self.where[node.path] = node.where
        for item in node.value:
            self.where[item.path] = item.where
        return node.value

    def title_block(self, node: Node | None) -> TitleBlock | None:
        if node is None:
            return None
        m = self.mapping(node, _CALC_KEYS, required=("number", "title", "revision", "date"), what="the title block")
        history = []
        for item in self.seq(m.get("history")):
            h = self.mapping(item, ("revision", "date", "description"), required=("revision", "date", "description"))
            hd = h.get("date")
            if hd is not None and not isinstance(hd.value, _dt.date) and not (isinstance(hd.value, str) and _iso_date(hd.value)):
                self.add(hd, f"expected a date, found {_describe(hd)}", "write the date as YYYY-MM-DD (ISO 8601)")
            history.append((self.text(h.get("revision")), self.text(h.get("date")), self.text(h.get("description"))))
        drawings = tuple(self.text(d) for d in self.seq(m.get("drawings")))
        if "date" in m:
            d = m["date"]
            if not isinstance(d.value, (_dt.date, str)) or (isinstance(d.value, str) and not _iso_date(d.value)):
                self.add(d, f"expected a date, found {_describe(d)}", "write the date as YYYY-MM-DD (ISO 8601), "
                         "for example 2026-11-28")
        if not m or any(k not in m for k in ("number", "title", "revision", "date")):
            return None
        return TitleBlock(number=self.text(m["number"]), title=self.text(m["title"]),
                          project=self.text(m.get("project")), revision=self.text(m["revision"]),
                          date=self.text(m["date"]), client=self.text(m.get("client")),
                          purpose=self.text(m.get("purpose")), prepared_by=self.text(m.get("prepared_by")),
                          checked_by=self.text(m.get("checked_by")), approved_by=self.text(m.get("approved_by")),
                          drawings=drawings, history=tuple(history))

    def site(self, node: Node | None) -> Site:
        if node is None:
            return Site(None, "not given")
        m = self.mapping(node, ("atmosphere", "elevation"), what="the site")
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
                    self.add(m["atmosphere"], f"an atmosphere of {atm.si / 1e3:.4g} kPa is not a site atmosphere",
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
        m = self.mapping(node, ("fluid", "mixture", "model", "k", "molar_mass", "R"), required=("model",), what="the gas")
        model = self.enum(m.get("model"), ("real", "ideal"))
        fluid = self.text(m.get("fluid")) or None
        mixture: list[tuple[str, float]] = []
        if "mixture" in m:
            mm = m["mixture"]
            if mm.kind != "map" or not mm.value:
                self.add(mm, f"expected component: mole fraction pairs, found {_describe(mm)}",
                         "write for example mixture: {Methane: 0.9, Ethane: 0.1}")
            elif _looks_like_percent(mm):
                self.add(mm, "the mole fractions sum to about 100: they look like percentages",
                         "write mole fractions that sum to 1 (for example 92 % → 0.92)")
            else:
                for comp, xnode in mm.value.items():
                    self.where[xnode.path] = xnode.where
                    x = self.number(xnode, 0.0, 1.0, lo_open=True, what="a mole fraction")
                    if x is not None:
                        mixture.append((comp, x))
                total = sum(x for _, x in mixture)
                if len(mixture) == len(mm.value) and abs(total - 1.0) > 1e-4:
                    self.add(mm, f"the mole fractions sum to {total:.6g}", "mole fractions must sum to 1 (within 1e-4)")
                if len(mixture) == len(mm.value) and abs(total - 1.0) <= 1e-4:
                    mixture = [(c, x / total) for c, x in mixture]
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
        return GasSpec(model, fluid, tuple(mixture), k, molar_mass, R)

    def start(self, node: Node | None, system: str | None) -> StartSpec | None:
        if node is None:
            return None
        closed_keys = ("pressure", "temperature", "volume", "mass")
        flow_keys = ("pressure", "temperature", "mass_flow", "molar_flow", "volume_flow", "standard_volume_flow",
                     "standard_pressure", "standard_temperature")
        keys = flow_keys if system == "flow" else closed_keys
        m = self.mapping(node, keys, required=("pressure", "temperature"), what="the start state")
        P = self.quantity(m.get("pressure"), "pressure")
        T = self.quantity(m.get("temperature"), "temperature")
        kinds = {"volume": "volume", "mass": "mass", "mass_flow": "mass_flow", "molar_flow": "molar_flow",
                 "volume_flow": "volume_flow", "standard_volume_flow": "standard_volume_flow",
                 "standard_pressure": "pressure", "standard_temperature": "temperature"}
        vals = {k: self.quantity(m.get(k), kinds[k]) for k in kinds if k in keys}
        amount = [k for k in (("mass_flow", "molar_flow", "volume_flow", "standard_volume_flow") if system == "flow"
                              else ("volume", "mass")) if k in m]
        if len(amount) != 1 and m:
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
        flow = system == "flow"
        allowed = _FLOW_LEG_KEYS if flow else _CLOSED_LEG_KEYS
        m = self.mapping(node, allowed, required=("name", "process", "end"), what="a leg")
        if not m:
            return None
        name = self.text(m.get("name"))
        pnode = m.get("process")
        pval = str(pnode.value).strip().casefold() if pnode is not None and pnode.kind == "scalar" else ""
        if not flow and pval in FLOW_PROCESSES and pval not in CLOSED_PROCESSES:
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
        options = self._leg_options(m, process, flow)
        if not name or process is None or "end" not in m or len(end) != len(m["end"].value if m["end"].kind == "map" else ()):
            return None
        return LegSpec(name, process, node.path, *node.where, end=end, n=n, options=options,
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

    def _leg_options(self, m: dict[str, Node], process: str | None, flow: bool) -> dict[str, Any]:
        opts: dict[str, Any] = {}
        if not flow:
            return opts
        for key in ("efficiency", "pressure_drop", "mechanical_efficiency", "staging"):
            if key in m:
                opts[key] = m[key]   # validated by the flow engine's own reader
        return opts


_TOP_KEYS = ("calcdoc", "calc", "units", "site", "gas", "system", "start", "legs", "limits", "assumptions", "sweep")
_CALC_KEYS = ("number", "title", "project", "client", "purpose", "revision", "date", "prepared_by", "checked_by",
              "approved_by", "drawings", "history")
_CLOSED_LEG_KEYS = ("name", "process", "n", "end", "note")
_FLOW_LEG_KEYS = ("name", "process", "n", "end", "note", "efficiency", "pressure_drop", "mechanical_efficiency", "staging")
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


def _looks_like_percent(mm: Node) -> bool:
    vals = [c.value for c in mm.value.values()]
    if not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in vals):
        return False
    return any(v > 1.0 for v in vals) and abs(sum(vals) - 100.0) <= 0.5


def _describe(node: Node) -> str:
    if node.kind == "map":
        return "a mapping"
    if node.kind == "seq":
        return "a list"
    v = node.value
    if v is None:
        return "nothing"
    if isinstance(v, bool):
        return f"the boolean {str(v).lower()}"
    if isinstance(v, (int, float)):
        return f"the number {v}"
    return f"'{v}'"


def _g(x: float) -> str:
    return f"{x:.6g}"
