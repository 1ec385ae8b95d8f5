"""Results of a job: states, legs, checks and warnings, and their JSON form (the contract)."""
from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass, field
from typing import Any

from ..errors import Finding
from ..physics.calc import Calc
from ..physics.gas import State

RESULTS_SCHEMA = "calcdoc-results/1"
#: SI units of a vessel leg's time series.
SERIES_UNITS = {"t": "s", "P": "Pa", "T": "K", "m": "kg", "m_dot": "kg/s", "T_wall": "K"}


@dataclass(frozen=True)
class StateRecord:
    """A numbered state of the job: label, the state, and extensive values where the mass is known."""

    number: int
    label: str
    state: State
    V: float | None = None         # volume of the fixed mass [m3] (closed system)
    V_dot: float | None = None     # actual volume flow [m3/s] (steady flow)
    humidity: Any = None           # moist air: physics.moist.Humidity (W, p_v, T_dew, phi)


@dataclass(frozen=True)
class Check:
    name: str
    quantity: str
    where: str
    value: Calc
    limit: float
    kind: str                      # "max" or "min"
    unit: str
    margin: float                  # limit − value for max, value − limit for min (SI)
    margin_pct: float
    required_margin: float
    status: str                    # "pass" or "fail"
    basis: str = ""
    difference: bool = False
    required_entered: str = ""     # the required margin as entered ("10 %", "15 K"); "" when none
    limit_entered: str = ""        # the limit as entered


@dataclass(frozen=True)
class Results:
    job: Any                                   # the Job it came from
    gas: Any                                   # the Gas model used
    system: str
    mass: Calc | None
    flow: dict[str, Calc]
    states: tuple[StateRecord, ...]
    legs: tuple[Any, ...]                      # LegResult (closed) or flow leg results
    start_calcs: tuple[Calc, ...]
    checks: tuple[Check, ...] = ()
    warnings: tuple[Finding, ...] = ()
    basis: dict[str, Any] = field(default_factory=dict)
    software: dict[str, str] = field(default_factory=dict)
    extra: dict[str, Any] = field(default_factory=dict)
    saturation: tuple[tuple[float, float, float, float, float], ...] | None = None   # (T, P, v, s, h) of the dome, for charts

    @property
    def passed(self) -> bool:
        """True when every design check passes (and when there is none)."""
        return all(c.status == "pass" for c in self.checks)

    def methods_used(self) -> list[str]:
        """Method ids in first-use order over the whole job."""
        seen: dict[str, None] = {}
        for c in self.all_calcs():
            seen.setdefault(c.method, None)
        return list(seen)

    def all_calcs(self) -> Iterator[Calc]:
        """Every calc of the job in order: start, mass or flow, legs, checks."""
        yield from self.start_calcs
        if self.mass is not None:
            yield self.mass
        yield from self.flow.values()
        for leg in self.legs:
            yield from leg.calcs
        for c in self.checks:
            yield c.value


def q(value: float | None, unit: str) -> dict[str, Any]:
    """A quantity in the results file: SI value (null where infinite or undefined) and its unit."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return {"value": None, "unit": unit}
    return {"value": value, "unit": unit}


def state_json(rec: StateRecord) -> dict[str, Any]:
    """One state in the results contract."""
    s = rec.state
    out: dict[str, Any] = {"label": rec.label, "P": q(s.P, "Pa"), "T": q(s.T, "K"), "v": q(s.v, "m**3/kg"), "rho": q(s.rho, "kg/m**3"),
           "u": q(s.u, "J/kg"), "h": q(s.h, "J/kg"), "s": q(s.s, "J/(kg*K)"), "Z": q(s.Z, ""), "phase": s.phase}
    if s.quality is not None:
        out["quality"] = q(s.quality, "")
        out["vapour_fraction"] = {**q(s.quality, ""), "basis": "mass"}
        out["Z"] = q(None, "")
        if s.rho_liquid is not None:
            out["rho_liquid"] = q(s.rho_liquid, "kg/m**3")
            out["rho_vapour"] = q(s.rho_vapour, "kg/m**3")
    hum = rec.humidity
    if hum is not None:
        out["humidity_ratio"] = q(hum.W, "")
        out["vapour_partial_pressure"] = q(hum.p_v, "Pa")
        out["dew_point"] = q(hum.T_dew, "K")
        out["relative_humidity"] = q(hum.phi, "")
    if rec.V is not None:
        out["V"] = q(rec.V, "m**3")
    if rec.V_dot is not None:
        out["V_dot"] = q(rec.V_dot, "m**3/s")
    return out


def to_json(res: Results) -> dict[str, Any]:
    """The results contract as data (SI values; findings still as codes, worded by the report's writer)."""
    job = res.job
    t = job.calc
    legs = []
    for leg in res.legs:
        item = {"name": leg.name, "process": leg.process, "from": res.states[leg.i - 1].label,
                "to": res.states[leg.i].label}
        for key, c in leg.quantities.items():
            item[key] = q(c.value, c.unit)
        if "n" not in item:
            item["n"] = q(None, "")
        if getattr(leg, "series", None):
            item["series"] = {k: {"unit": SERIES_UNITS[k], "values": list(v)} for k, v in leg.series.items()}
        item["calcs"] = [c.trace() for c in leg.calcs]
        legs.append(item)
    checks = [{"name": c.name, "quantity": c.quantity, "at": c.where, "value": q(c.value.value, c.unit),
               "limit": q(c.limit, c.unit), "type": c.kind, "margin": q(c.margin, c.unit),
               "margin_percent": c.margin_pct if math.isfinite(c.margin_pct) else None, "required_margin": q(c.required_margin, c.unit), "required_margin_entered": c.required_entered,
               "status": c.status, "basis": c.basis} for c in res.checks]
    out = {
        "schema": RESULTS_SCHEMA,
        "calc": {"number": t.number, "title": t.title, "project": t.project, "client": t.client,
                 "revision": t.revision, "date": t.date, "prepared_by": t.prepared_by, "checked_by": t.checked_by,
                 "approved_by": t.approved_by},
        "input_sha256": job.sha256,
        "software": dict(res.software),
        "system": res.system,
        "gas": res.basis.get("gas", {}),
        "site": res.basis.get("site", {}),
        "mass": q(res.mass.value, "kg") if res.mass is not None else None,
        "flow": {k: q(c.value, c.unit) for k, c in res.flow.items()},
        "states": [state_json(r) for r in res.states],
        "legs": legs,
        "checks": checks,
        "passed": res.passed,
        "warnings": list(res.warnings),
    }
    if res.system == "flow":
        out.pop("mass")
    else:
        out.pop("flow")
    out.update(res.extra)
    return out
