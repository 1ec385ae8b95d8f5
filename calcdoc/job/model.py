"""The job model: one typed, frozen description of a job file, read once (see :mod:`calcdoc.job.load`).

Every quantity is already SI (absolute pressure, absolute temperature) with the text the user wrote and
the line and column it stands on, so later layers never see YAML and can still point into the file.

Frozen dataclasses rather than pydantic: the validation that gives file:line messages in the trade's words
is ours (:mod:`calcdoc.job.reader`), the model only holds its result; dataclasses add no dependency and no
import time, and ``dataclasses.fields`` is enough to generate the JSON Schema alongside the key tables.
"""
from __future__ import annotations

from dataclasses import MISSING, dataclass, field, fields
from functools import cached_property
from typing import Any

from ..errors import Problem
from ..units import DisplayUnits
from .quantities import Quantity

__all__ = ["HUMIDITY_KEYS", "Cylinder", "Drop", "FollowSpec", "GasSpec", "Input", "Job", "LegOptions", "LegSpec", "LimitSpec", "Site",
           "SolveSpec", "Staging", "StartSpec", "SweepSpec", "TitleBlock", "VesselLegSpec", "VesselSpec", "WallSpec"]


def key(kind: str, desc: str, systems: tuple[str, ...] = ("closed", "flow"), required: bool = False) -> Any:
    """A field of the model that is a key of the job file: the kind of its value (a key of
    :data:`calcdoc.units.DIMENSIONS`, or "text", "date", "number", "list"), what it is, the systems that take it.
    The validator and the JSON Schema (:mod:`calcdoc.job.schema`) both read these."""
    default: Any = MISSING if required else None
    return field(default=default, metadata={"kind": kind, "desc": desc, "systems": systems})


def keys_of(cls: type, system: str | None = None) -> tuple[str, ...]:
    """The job-file keys of a model class (in field order), those a system takes when ``system`` is given."""
    return tuple(f.name for f in fields(cls) if "kind" in f.metadata
                 and (system is None or system in f.metadata["systems"]))


def text_key(desc: str, default: Any = "", kind: str = "text") -> Any:
    """A text field of the model that is a key of the job file."""
    return field(default=default, metadata={"kind": kind, "desc": desc, "systems": ("closed", "flow")})


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


@dataclass(frozen=True, kw_only=True)
class TitleBlock:
    """The calc's title block and revision history."""

    number: str = text_key("calc number", MISSING)
    title: str = text_key("calc title", MISSING)
    project: str = text_key("project")
    revision: str = text_key("revision of this issue, e.g. A", MISSING)
    date: str = text_key("date of this revision, YYYY-MM-DD", MISSING, "date")
    client: str = text_key("client")
    purpose: str = text_key("what the calculation establishes")
    prepared_by: str = text_key("preparer")
    checked_by: str = text_key("checker")
    approved_by: str = text_key("approver")
    drawings: tuple[str, ...] = text_key("drawings and documents this calc supports", (), "list")
    history: tuple[tuple[str, str, str], ...] = text_key("revision table: revision, date, description", (), "history")


@dataclass(frozen=True)
class Site:
    """The site atmosphere: absolute pressure [Pa] and how it was found."""

    P_atm: float | None          # absolute atmospheric pressure [Pa], None when not given
    source: str                  # "given", "standard atmosphere at elevation" or "not given"
    atmosphere: Input | None = key("pressure", "absolute barometric pressure at the site")
    elevation: Input | None = key("length", "elevation above sea level (standard atmosphere)")
    relative_humidity: Input | None = key("fraction", "relative humidity of the site's air (0 to 100 %), "
                                          "for moist-air jobs whose start state gives none", ("flow",))


@dataclass(frozen=True, kw_only=True)
class GasSpec:
    """The gas: a fluid or a mixture, with the real (CoolProp) or the ideal-gas model."""

    model: str = text_key("real (CoolProp) or ideal", MISSING, "choice")
    fluid: str | None = text_key("a CoolProp fluid name", None)
    mixture: tuple[tuple[str, float], ...] = text_key("component (CoolProp or short name): fraction; kept as "
                                                      "(CoolProp name, mole fraction), normalised", (), "mixture")
    basis: str = text_key("basis of the mixture's fractions: mole (default) or mass", "mole", "basis")
    k: Input | None = key("dimensionless", "heat capacity ratio (ideal gas)")
    molar_mass: Input | None = key("molar_mass", "molar mass (ideal gas)")
    R: Input | None = key("specific_gas_constant", "specific gas constant (ideal gas)")
    entered_sum: float = 1.0                    # the sum of the fractions as entered (not a key)


@dataclass(frozen=True)
class StartSpec:
    """State 1 and the amount of gas: a mass or volume (closed) or a flow (steady flow)."""

    pressure: Input = key("pressure", "absolute pressure, or gauge with a gauge marker (barg, psig)", required=True)
    temperature: Input = key("temperature", "temperature", required=True)
    volume: Input | None = key("volume", "volume of the gas", ("closed",))
    mass: Input | None = key("mass", "mass of the gas", ("closed",))
    mass_flow: Input | None = key("mass_flow", "mass flow", ("flow",))
    molar_flow: Input | None = key("molar_flow", "molar flow", ("flow",))
    volume_flow: Input | None = key("volume_flow", "actual volume flow at the start state", ("flow",))
    standard_volume_flow: Input | None = key("standard_volume_flow", "volume flow at stated reference conditions",
                                             ("flow",))
    standard_pressure: Input | None = key("pressure", "reference pressure of the standard volume flow", ("flow",))
    standard_temperature: Input | None = key("temperature", "reference temperature of the standard volume flow",
                                             ("flow",))
    relative_humidity: Input | None = key("fraction", "moist air: relative humidity (0 to 100 %)")
    dew_point: Input | None = key("temperature", "moist air: dew point")
    humidity_ratio: Input | None = key("dimensionless", "moist air: kg of water vapour per kg of dry air")

    @property
    def humidity(self) -> tuple[str, Input] | None:
        """The humidity input of the start state: (key, input), or None."""
        for k in HUMIDITY_KEYS:
            if getattr(self, k) is not None:
                return k, getattr(self, k)
        return None


#: The start state's humidity inputs of moist air.
HUMIDITY_KEYS = ("relative_humidity", "dew_point", "humidity_ratio")


@dataclass(frozen=True)
class Drop:
    """A pressure drop: a fraction of the inlet pressure, or an absolute difference [Pa]."""

    fraction: float | None = None
    absolute: float | None = None
    inp: Input | None = None

    def outlet(self, P_in: float) -> float:
        """The outlet pressure for an inlet pressure P_in [Pa]."""
        return P_in * (1.0 - self.fraction) if self.fraction is not None else P_in - (self.absolute or 0.0)


@dataclass(frozen=True)
class Staging:
    """A compressor leg split into stages with intercoolers."""

    stages: int | None                 # a fixed number of stages, or
    T_max: Input | None                # the discharge-temperature limit for the fewest-stages search
    max_stages: int
    T_cool: Input                      # intercooler outlet temperature
    drop: Drop
    path: str = ""                     # key path of the staging block
    ratios: tuple[Input, ...] = ()     # given ratios of the first stages (the last stage takes the rest), or
    pressures: tuple[Input, ...] = ()  # given discharge pressures of the first stages (the last takes the rest)

    @property
    def most_stages(self) -> int:
        """The most stages this block can give."""
        return self.stages if self.stages is not None else self.max_stages

    @property
    def fixed(self) -> int | None:
        """The number of stages when the block fixes it (stages, ratios or interstage pressures), else None."""
        if self.ratios or self.pressures:
            return len(self.ratios or self.pressures) + 1
        return self.stages


@dataclass(frozen=True)
class Cylinder:
    """The cylinder of a reciprocating compressor stage, as the job file gives it (SI: lengths [m],
    speed [rev/s], clearance and loss as fractions of the swept volume)."""

    bore: Input
    stroke: Input
    rod: Input | None                  # piston-rod diameter; None: a single-acting cylinder with no rod
    speed: Input                       # [rev/s]
    clearance: Input
    double: bool                       # double acting (both ends compress) or single (head end only)
    n_e: Input | None = None           # re-expansion exponent; None: the gas's isentropic exponent at suction
    loss: Input | None = None          # valve and ring leakage allowance; None: 0
    count: int = 1                     # identical cylinders in parallel
    path: str = ""                     # key path of the cylinder block


@dataclass(frozen=True)
class LegOptions:
    """The steady-flow options of a leg: efficiencies, pressure drop, staging, the machine and its cylinder."""

    eta_p: Input | None = None
    eta_s: Input | None = None
    eta_m: Input | None = None
    drop: Drop = Drop()
    staging: Staging | None = None
    machine: str = ""                  # "" (no geometry given) or "reciprocating"
    cylinder: Cylinder | None = None
    eta_stages: tuple[Input, ...] = () # per-stage efficiencies of a staged leg (of the kind eta_p or eta_s names)


@dataclass(frozen=True)
class WallSpec:
    """The vessel wall as one lump: mass, specific heat, inner area and gas-side heat-transfer coefficient."""

    mass: Input
    specific_heat: Input
    area: Input
    heat_transfer_coefficient: Input


@dataclass(frozen=True)
class VesselSpec:
    """A rigid vessel: its volume and, optionally, its wall (for legs with ``heat: wall``)."""

    volume: Input
    wall: WallSpec | None = None


@dataclass(frozen=True)
class VesselLegSpec:
    """How a vessel leg fills or empties: the heat exchange, the orifice, the back pressure (discharge), or the
    supply (fill: a pressure and temperature upstream of the orifice, or a mass flow and its temperature)."""

    heat: str                                    # adiabatic, isothermal or wall
    diameter: Input | None = None
    discharge_coefficient: Input | None = None
    back_pressure: Input | None = None
    supply_pressure: Input | None = None
    supply_temperature: Input | None = None
    mass_flow: Input | None = None


@dataclass(frozen=True)
class LegSpec:
    """One leg as the job file gives it."""

    name: str
    process: str
    path: str                       # "legs[0]"
    line: int
    col: int
    end: dict[str, Input]           # target name → value (pressure, temperature, volume, ratios)
    n: Input | None = None
    options: LegOptions = LegOptions()
    note: str = ""
    vessel: VesselLegSpec | None = None   # vessel legs (system: vessel)


@dataclass(frozen=True)
class LimitSpec:
    """A design limit: a quantity, where it applies, its bounds, a required margin and its basis."""

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
    #: the zero a percent of this quantity is measured from [SI]: 0 for a quantity with a true zero, the
    #: site atmosphere for a pressure limit written as gauge, None where a percent means nothing
    percent_zero: float | None = 0.0


@dataclass(frozen=True)
class FollowSpec:
    """A result a sweep follows: a quantity at named places (none: everywhere it exists)."""

    quantity: Quantity
    at: tuple[str, ...]
    where: tuple[int, int]
    path: str


@dataclass(frozen=True)
class SweepSpec:
    """One input varied over a list of values; each point is the job file with that value in its place."""

    input: str                                  # the path as written
    value_path: str                             # key path of the varied value (legs[1].end.pressure)
    points: tuple[str, ...]                     # YAML text of each value, written in its place
    entered: tuple[str, ...]                    # each point as entered
    sources: tuple[tuple[str, int, int], ...]   # (key path, line, col) each point came from
    follow: tuple[FollowSpec, ...]
    span: tuple[int, int]                       # character span of the value in the job text
    cut: tuple[int, int] | None                 # span of the whole sweep block (left out of each point's job)


@dataclass(frozen=True)
class SolveSpec:
    """One input found so that a result meets a target: the input's place in the job text, the bracket (in
    the unit the bracket is written in) and the target (a quantity at one place, and the value it must equal)."""

    vary: str                                   # the path as written
    value_path: str                             # key path of the varied value
    span: tuple[int, int]                       # character span of the value in the job text
    cut: tuple[int, int] | None                 # span of the whole solve block (left out of each trial's job)
    unit: str                                   # unit text of the bracket ("L", "bar", "" for a plain number)
    bracket: tuple[float, float]                # the ends, numbers in ``unit``
    entered: tuple[str, str]                    # the ends as entered
    quantity: Quantity
    at: tuple[str, ...]
    equals: Input
    path: str                                   # key path of the solve block
    where: dict[str, tuple[int, int]] = field(default_factory=dict)   # line, col of vary, between, so_that, at


@dataclass(frozen=True)
class Job:
    """A validated job: everything the engine needs, each input with its place in the file."""

    name: str                       # the file name as given by the user (for messages)
    data: bytes                     # the job file, byte for byte
    calc: TitleBlock
    units: DisplayUnits             # report units: base system "SI" or "US" and the job's own units
    site: Site
    gas: GasSpec
    system: str                     # "closed", "flow" or "vessel"
    start: StartSpec
    legs: tuple[LegSpec, ...]
    limits: tuple[LimitSpec, ...] = ()
    assumptions: tuple[str, ...] = ()
    inputs: tuple[Input, ...] = ()  # every quantity in file order, for the report
    where: dict[str, tuple[int, int]] = field(default_factory=dict)
    leaves: tuple[tuple[str, str, int], ...] = ()   # every scalar of the file: (path, as entered, line)
    sweep: SweepSpec | None = None
    vessel: VesselSpec | None = None
    solve: SolveSpec | None = None
    warnings: tuple[Problem, ...] = ()   # what the job file shows without computing that does not stop a run

    @cached_property
    def sha256(self) -> str:
        """SHA-256 of the job file's bytes, in hex (computed when first asked: ``calcdoc check`` never needs it)."""
        import hashlib

        return hashlib.sha256(self.data).hexdigest()

    @property
    def text(self) -> str:
        """The job file's text."""
        return self.data.decode("utf-8").lstrip("\ufeff")

    def locate(self, path: str) -> tuple[int, int]:
        """Line and column of a key path, or of its nearest parent that is known."""
        while path:
            if path in self.where:
                return self.where[path]
            path = path.rsplit(".", 1)[0] if "." in path else (path.rsplit("[", 1)[0] if "[" in path else "")
        return (0, 0)

    def problem(self, path: str, found: str, valid: str = "") -> Problem:
        """A problem at a key path of this job file."""
        line, col = self.locate(path)
        return Problem(self.name, line, col, path, found, valid)

    def problem_at(self, inp: Input, found: str, valid: str = "") -> Problem:
        """A problem at an input's own line and column."""
        return Problem(self.name, inp.line, inp.col, inp.path, found, valid)
