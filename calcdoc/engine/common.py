"""What closed and steady-flow jobs share: the gas model, the site atmosphere and gauge inputs as calcs,
the basis of the results, the saturation dome for the charts, and the software versions."""
from __future__ import annotations

from collections.abc import Sequence
from functools import lru_cache
from typing import Any

from .. import __version__
from ..errors import Finding, JobError, PhysicsError
from ..job.messages import problem
from ..job.model import Job
from ..physics import installed
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from ..physics.dome import saturation_dome
from ..physics.fluids import closest_fluids
from ..physics.gas import R_U, Gas, IdealGas, RealGas
from .diagnose import fluid_problems

__all__ = ["gas_findings", "job_basis", "make_gas", "saturation_near", "shared_real_gas", "site_calcs", "software_versions"]

def software_versions() -> dict[str, str]:
    """The versions of calcdoc and the libraries it computes and renders with (a fresh dict)."""
    return dict(_versions())


@lru_cache(maxsize=1)
def _versions() -> tuple[tuple[str, str], ...]:
    # once per process (a sweep asks per point; the modules loaded cannot change version while it runs)
    out = {"calcdoc": __version__}
    for dist in ("CoolProp", "pint", "PyYAML", "Jinja2", "matplotlib", "weasyprint", "numpy"):
        out[dist] = installed.version(dist) or "not installed"
    return tuple(out.items())


def make_gas(job: Job) -> tuple[Gas, list[Calc]]:
    """The gas model of a job, and the calcs that set its constants (ideal gas)."""
    spec = job.gas
    try:
        if spec.model == "real":
            gas = shared_real_gas(spec.fluid, spec.mixture)
            gas.flashes = 0          # the flash count is per run
            return gas, []
        return _ideal_gas(job)
    except PhysicsError as exc:
        problems = fluid_problems(job)
        if problems:
            raise JobError(problems) from None
        path = "gas.fluid" if spec.fluid else "gas.mixture"
        names = [spec.fluid] if spec.fluid else [c for c, _ in spec.mixture]
        close = tuple(c for nm in names for c in closest_fluids(nm or "") if nm != c)
        raise JobError([problem(job, Finding("gas.not_made", {"error": exc, "close": close}, path))]) from None


@lru_cache(maxsize=8)
def shared_real_gas(fluid: str | None, mixture: tuple[tuple[str, float], ...]) -> RealGas:
    """One real-gas object per fluid and process, reused by every job and sweep point that needs it
    (its CoolProp state is set afresh by every flash, so reuse does not change results)."""
    return RealGas(fluid, mixture)


def gas_findings(job: Job) -> list[Finding]:
    """Warnings about the gas as entered: a mixture whose fractions were normalised (showing their sum)."""
    spec = job.gas
    if spec.mixture and abs(spec.entered_sum - 1.0) > 1e-9:
        return [Finding("mixture.normalised", {"basis": spec.basis, "total": spec.entered_sum}, "gas.mixture")]
    return []


def _ideal_gas(job: Job) -> tuple[Gas, list[Calc]]:
    spec = job.gas
    calcs: list[Calc] = []
    name = spec.fluid or (" + ".join(f"{x:.4g} {c}" for c, x in spec.mixture) if spec.mixture else "gas")
    fluid = RealGas(spec.fluid, spec.mixture) if (spec.fluid or spec.mixture) else None
    if spec.molar_mass is not None:
        M = spec.molar_mass.si
        calcs.append(Calc("M", M, "kg/mol", "{M}", "input", {"M": Term("M", M, "kg/mol")}))
    elif spec.R is not None:
        M = R_U / spec.R.si
        calcs.append(Calc("M", M, "kg/mol", "{Ru} / {R}", "ideal.R",
                          {"Ru": Term("R_u", R_U, "J/(mol*K)"), "R": Term("R", spec.R.si, "J/(kg*K)")}))
    else:
        assert fluid is not None, "the job layer requires a fluid, or molar_mass or R, for an ideal gas"
        M = fluid.M
        calcs.append(Calc("M", M, "kg/mol", "M(fluid)", "eos.real"))
    R = R_U / M
    calcs.append(Calc("R", R, "J/(kg*K)", "{Ru} / {M}", "ideal.R",
                      {"Ru": Term("R_u", R_U, "J/(mol*K)"), "M": Term("M", M, "kg/mol")}))
    if spec.k is not None:
        k = spec.k.si
        calcs.append(Calc("k", k, "", "{k}", "input", {"k": Term("k", k, "")}))
    else:
        T1 = job.start.temperature.si
        assert fluid is not None, "the job layer requires a fluid, or k, for an ideal gas"
        cp0 = fluid.cp0_at(T1)
        k = cp0 / (cp0 - R)
        calcs.append(Calc("k", k, "", "{cp0} / ({cp0} − {R})", "eos.real",
                          {"cp0": Term("c_p0", cp0, "J/(kg*K)"), "R": Term("R", R, "J/(kg*K)")},
                          note="cp0_at_start"))
    gas = IdealGas(name, k, M)
    if fluid is not None:
        gas.eos_refs = fluid.eos_refs
    calcs.append(Calc("c_p", gas.cp, "J/(kg*K)", "{k}·{R}/({k} − 1)", "ideal.cp",
                      {"k": Term("k", k, ""), "R": Term("R", R, "J/(kg*K)")}))
    calcs.append(Calc("c_v", gas.cv, "J/(kg*K)", "{R}/({k} − 1)", "ideal.cp",
                      {"k": Term("k", k, ""), "R": Term("R", R, "J/(kg*K)")}))
    return gas, calcs


def site_calcs(job: Job) -> list[Calc]:
    """The site atmosphere and every gauge input turned absolute, as calcs a checker can follow."""
    out: list[Calc] = []
    site = job.site
    if site.P_atm is None:
        return out
    if site.elevation is not None:
        out.append(Calc("P_atm", site.P_atm, "Pa", "P_0·(T_0/(T_0 + L·H))^(g_0·M_0/(R*·L)), H = r_0·{z}/(r_0 + {z})",
                        "atm.std", {"z": Term("z", site.elevation.si, "m")},
                        note="std_atmosphere"))
    else:
        out.append(Calc("P_atm", site.P_atm, "Pa", "{P}", "input", {"P": Term("P_atm", site.P_atm, "Pa")}))
    for inp in job.inputs:
        if inp.gauge:
            out.append(Calc(f"P ({inp.path})", inp.si, "Pa", "{Pg} + {Patm}", "gauge",
                            {"Pg": Term("P_g", inp.si - site.P_atm, "Pa"), "Patm": Term("P_atm", site.P_atm, "Pa")},
                            note=Finding("entered_as", {"entered": inp.entered})))
    return out


def saturation_near(gas: Gas, legs: Sequence[LegResult]
                    ) -> tuple[tuple[float, float, float, float, float], ...] | None:
    """The saturation dome for the charts when a path comes within 30 % of the critical temperature."""
    if not isinstance(gas, RealGas) or not gas.pure:
        return None
    if any(st.T < 1.3 * gas.Tc for leg in legs for st in leg.path):
        curve = saturation_dome(gas)         # from the user's cache after the first job of the fluid
        return tuple(curve) if curve else None
    return None


def job_basis(job: Job, gas: Gas) -> dict[str, Any]:
    """The basis of the results: the gas model and the site atmosphere (for the JSON and the report)."""
    site = job.site
    return {
        "gas": {"model": gas.model, "molar_mass": {"value": gas.M, "unit": "kg/mol"},
                "eos_references": list(gas.eos_refs),
                **({"k": gas.k} if isinstance(gas, IdealGas) else {})},
        "site": {"atmosphere": None if site.P_atm is None else {"value": site.P_atm, "unit": "Pa"},
                 "source": site.source},
    }
