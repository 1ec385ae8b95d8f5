"""The engine: a validated job in, results out. Knows thermodynamics, nothing of YAML or HTML."""
from __future__ import annotations

from functools import lru_cache
from importlib import metadata

from . import __version__
from .calc import Calc, Term
from .errors import JobError, PhysicsError
from .gas import R_U, Gas, IdealGas, RealGas, State
from .jobfile import Job, LegSpec
from .processes import LegResult, Target, closed_leg
from .results import Results, StateRecord

__all__ = ["compute", "run", "make_gas", "software_versions"]

#: A state closer than this to its saturation temperature gets a warning [K] (common practice).
NEAR_SATURATION_K = 5.0


def software_versions() -> dict[str, str]:
    out = {"calcdoc": __version__}
    for dist in ("CoolProp", "pint", "PyYAML", "Jinja2", "matplotlib", "weasyprint", "numpy"):
        try:
            out[dist] = metadata.version(dist)
        except metadata.PackageNotFoundError:
            out[dist] = "not installed"
    return out


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
        from .diagnose import fluid_problems

        problems = fluid_problems(job)
        if problems:
            raise JobError(problems) from None
        path = "gas.fluid" if spec.fluid else "gas.mixture"
        raise JobError([job.problem(path, str(exc), _fluid_hint(spec))]) from None


@lru_cache(maxsize=8)
def shared_real_gas(fluid, mixture) -> RealGas:
    """One real-gas object per fluid and process, reused by every job and sweep point that needs it
    (its CoolProp state is set afresh by every flash, so reuse does not change results)."""
    return RealGas(fluid, mixture)


def _fluid_hint(spec) -> str:
    names = [spec.fluid] if spec.fluid else [c for c, _ in spec.mixture]
    try:
        import difflib

        import CoolProp.CoolProp as CP

        known = CP.get_global_param_string("FluidsList").split(",")
        hints = []
        for nm in names:
            close = difflib.get_close_matches(nm or "", known, n=3, cutoff=0.5)
            if close and nm not in known:
                hints.append(f"for '{nm}' did you mean {' or '.join(repr(c) for c in close)}?")
        return " ".join(hints) + (" " if hints else "") + "use a CoolProp fluid name such as Nitrogen, Air, CarbonDioxide, Methane, Hydrogen"
    except Exception:  # the hint is a courtesy; never let it hide the real message
        return "use a CoolProp fluid name such as Nitrogen, Air, CarbonDioxide, Methane, Hydrogen"


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
        cp0 = fluid.cp0_at(T1)
        k = cp0 / (cp0 - R)
        calcs.append(Calc("k", k, "", "{cp0} / ({cp0} − {R})", "eos.real",
                          {"cp0": Term("c_p0", cp0, "J/(kg*K)"), "R": Term("R", R, "J/(kg*K)")},
                          note="ideal-gas heat capacity of the fluid at the start temperature"))
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
                        note="U.S. Standard Atmosphere 1976, troposphere: P_0 = 101.325 kPa, T_0 = 288.15 K, "
                             "L = −0.0065 K/m, r_0 = 6 356 766 m"))
    else:
        out.append(Calc("P_atm", site.P_atm, "Pa", "{P}", "input", {"P": Term("P_atm", site.P_atm, "Pa")}))
    for inp in job.inputs:
        if inp.gauge:
            out.append(Calc(f"P ({inp.path})", inp.si, "Pa", "{Pg} + {Patm}", "gauge",
                            {"Pg": Term("P_g", inp.si - site.P_atm, "Pa"), "Patm": Term("P_atm", site.P_atm, "Pa")},
                            note=f"entered as {inp.entered}"))
    return out


def _start_state(job: Job, gas: Gas) -> State:
    P, T = job.start.pressure.si, job.start.temperature.si
    try:
        return gas.state_PT(P, T)
    except PhysicsError as exc:
        from .diagnose import start_state_problem

        raise JobError([start_state_problem(job, gas, str(exc))]) from None


def _targets(job: Job, leg: LegSpec, s1: State, m: float) -> list[Target]:
    out = []
    for key, inp in leg.end.items():
        if key == "pressure":
            out.append(Target("P", inp.si))
        elif key == "pressure_ratio":
            out.append(Target("P", s1.P * inp.si))
        elif key == "temperature":
            out.append(Target("T", inp.si))
        elif key == "volume":
            out.append(Target("v", inp.si / m))
        elif key == "volume_ratio":
            out.append(Target("v", s1.v * inp.si))
    return out


def _phase_warnings(gas: Gas, label: str, states: list[State], system: str) -> list[str]:
    """Warnings for states in or near the two-phase region (pure fluids: saturation temperature)."""
    from .diagnose import phase_warnings

    return phase_warnings(gas.dew_temperature, label, states, system, NEAR_SATURATION_K, "saturation temperature")


def run(job: Job) -> Results:
    """Compute a job: its states, legs and warnings, the checks of its limits and its sweep."""
    import dataclasses

    from .checks import with_checks
    from .sweep import with_sweep

    res = compute(job)
    unmarked = [i for i in job.inputs if i.unmarked_pressure]
    if unmarked:
        listed = ", ".join(f"{i.path} = {i.entered} (line {i.line})" for i in unmarked)
        res = dataclasses.replace(res, warnings=res.warnings + (
            f"Pressures written in psi or kgf/cm2 without a gauge or absolute marker are taken as absolute: {listed}. "
            "If a gauge pressure is meant, write psig (with the site atmosphere); write psia to make it explicit.",))
    return with_sweep(job, with_checks(job, res))


def compute(job: Job) -> Results:
    """Compute a job's states, legs and warnings (no design checks, no sweep)."""
    if job.system == "flow":
        from .flow import run_flow

        return run_flow(job)
    gas, gas_calcs = make_gas(job)
    s1 = _start_state(job, gas)
    start_calcs = site_calcs(job) + list(gas_calcs)
    if job.start.mass is not None:
        m = job.start.mass.si
        mass = Calc("m", m, "kg", "{m}", "input", {"m": Term("m", m, "kg")})
    else:
        V1 = job.start.volume.si
        m = V1 / s1.v
        mass = Calc("m", m, "kg", "{V1} / {v1}", "state.mass",
                    {"V1": Term("V_1", V1, "m**3"), "v1": Term("v_1", s1.v, "m**3/kg")})
    start_calcs.append(Calc("v_1", s1.v, "m**3/kg", "v(P_1, T_1)", gas.eos_method))
    if job.start.mass is not None:
        start_calcs.append(Calc("V_1", m * s1.v, "m**3", "{m}·{v}", "state.volume",
                                {"m": Term("m", m, "kg"), "v": Term("v_1", s1.v, "m**3/kg")}))
    for prop, unit in (("u", "J/kg"), ("h", "J/kg"), ("s", "J/(kg*K)")):
        start_calcs.append(Calc(f"{prop}_1", getattr(s1, prop), unit, f"{prop}(P_1, T_1)", gas.eos_method))
    warnings: list[str] = []
    legs: list[LegResult] = []
    records = [StateRecord(1, "1", s1, V=m * s1.v)]
    warnings += _phase_warnings(gas, "Start state", [s1], job.units)
    s = s1
    for k, leg in enumerate(job.legs):
        i = k + 1
        try:
            res = closed_leg(gas, leg.name, leg.process, i, s, m, _targets(job, leg, s, m),
                             leg.n.si if leg.n is not None else None)
        except PhysicsError as exc:
            where = f"{leg.path}.end" + (f".{next(iter(leg.end))}" if len(leg.end) == 1 else "")
            raise JobError([job.problem(where, f"leg '{leg.name}': {exc}",
                                        "check the end target and the process against the start of this leg")]) from None
        except OverflowError:
            # an exponent or ratio so extreme that the path's numbers leave floating point
            raise JobError([job.problem(leg.path + (".n" if leg.n is not None else ".end"),
                                        f"leg '{leg.name}': the path P·Vⁿ = const with these values gives numbers "
                                        "beyond floating-point range",
                                        "use a physical exponent (for a fixed volume use process: isochoric)")]) from None
        legs.append(res)
        warnings += _phase_warnings(gas, f"Leg '{leg.name}'", list(res.path), job.units)
        s = res.end
        records.append(StateRecord(i + 1, str(i + 1), s, V=m * s.v))
    from .diagnose import ideal_condensation_warnings

    warnings += ideal_condensation_warnings(job, gas, legs, s1)
    basis = job_basis(job, gas)
    return Results(job, gas, "closed", mass, {}, tuple(records), tuple(legs), tuple(start_calcs), (),
                   tuple(warnings), basis, software_versions(), saturation=saturation_near(gas, legs))


def saturation_near(gas: Gas, legs) -> tuple | None:
    """The saturation dome for the charts when a path comes within 30 % of the critical temperature."""
    if not isinstance(gas, RealGas) or not gas.pure:
        return None
    if any(st.T < 1.3 * gas.Tc for leg in legs for st in leg.path):
        curve = gas.saturation_curve()
        return tuple(curve) if curve else None
    return None


def job_basis(job: Job, gas: Gas) -> dict:
    """The basis of the results: the gas model and the site atmosphere (for the JSON and the report)."""
    site = job.site
    return {
        "gas": {"model": gas.model, "description": gas.describe(), "molar_mass": {"value": gas.M, "unit": "kg/mol"},
                "eos_references": list(gas.eos_refs),
                **({"k": gas.k} if isinstance(gas, IdealGas) else {})},
        "site": {"atmosphere": None if site.P_atm is None else {"value": site.P_atm, "unit": "Pa"},
                 "source": site.source},
    }

