"""What the job file shows without computing, beyond each key's own validation: leg names that collide
with the names staging generates, standard-volume units whose reference conditions contradict the stated
ones (problems, exit 2), and intercooler drops that are large for their inlet and a revision missing from
the history (warnings). Each names the key at fault by file:line:column, in the job's units."""
from __future__ import annotations

from .. import units
from ..errors import Problem
from .model import Input, Job, LegSpec

__all__ = ["INTERCOOLER_DROP_WARN", "static_problems", "static_warnings"]

#: An intercooler whose pressure drop is above this fraction of its inlet pressure is suspect: usual
#: intercooler drops are a few percent of the interstage pressure (common practice).
INTERCOOLER_DROP_WARN = 0.30

# Reference conditions a standard-volume unit implies, by the unit's marker (common practice):
# "N" (normal cubic metre, Nm3) means 0 °C and 101.325 kPa; "S"/"s" (standard cubic metre or foot: Sm3,
# scf, MMSCFD) is used at 15 °C, 60 °F or 20 °C (68 °F) and near one standard atmosphere (101.325 kPa, or
# 14.73 psia in some gas contracts), never at 0 °C.
_NORMAL = {"T": 273.15, "P": 101325.0}
_STANDARD_T = (283.15, 298.15)            # 10 °C … 25 °C covers 15 °C, 60 °F, 20 °C and 68 °F
_STANDARD_P = (99.9e3, 101.7e3)           # 1 bar … 14.75 psia


def static_problems(job: Job) -> list[Problem]:
    """Problems (exit 2) the job file shows without computing."""
    return _stage_names(job) + _standard_conditions(job)


def static_warnings(job: Job) -> list[Problem]:
    """Warnings the job file shows without computing (the job still runs)."""
    return _intercooler_drops(job) + _history(job)


def _stage_names(job: Job) -> list[Problem]:
    out = []
    generated: dict[str, str] = {}
    for leg in job.legs:
        st = leg.options.staging
        if st is None:
            continue
        N = st.most_stages
        for k in range(1, N + 1):
            generated[f"{leg.name}, stage {k}"] = leg.name
            if k < N:
                generated[f"{leg.name}, intercooler {k}"] = leg.name
    for leg in job.legs:
        if leg.name in generated:
            line, col = job.locate(f"{leg.path}.name")
            out.append(Problem(job.name, line, col, f"{leg.path}.name",
                               f"the leg name '{leg.name}' is also the name staging gives a stage of "
                               f"'{generated[leg.name]}'", "give the leg a name that does not end in ', stage N' or "
                               "', intercooler N' after the name of a staged leg"))
    return out


def _unit_of(inp: Input) -> str:
    parts = inp.entered.split(maxsplit=1)
    return parts[1].strip() if len(parts) == 2 else ""


def _standard_conditions(job: Job) -> list[Problem]:
    st = job.start
    flow, P, T = st.standard_volume_flow, st.standard_pressure, st.standard_temperature
    if flow is None or P is None or T is None:
        return []
    unit = _unit_of(flow)
    S = job.units
    if unit.startswith("N"):
        bad = []
        if abs(T.si - _NORMAL["T"]) > 0.05:
            bad.append((T, f"standard_temperature {T.entered}"))
        if abs(P.si - _NORMAL["P"]) > 1e-3 * _NORMAL["P"]:
            bad.append((P, f"standard_pressure {P.entered}"))
        return [job.problem_at(inp, f"'{flow.entered}' is in normal cubic metres, which mean 0 °C and 101.325 kPa, "
                               f"but the job states {what}",
                               "state standard_temperature: 0 degC and standard_pressure: 101.325 kPa, or give the "
                               "flow in Sm3/h (standard cubic metres) at the conditions the contract names")
                for inp, what in bad]
    if unit.startswith(("S", "s", "MMS", "MMs")):
        out = []
        if not _STANDARD_T[0] <= T.si <= _STANDARD_T[1]:
            out.append(job.problem_at(T, f"'{flow.entered}' is a standard volume, used at 15 °C, 60 °F or 20 °C, but "
                                      f"standard_temperature is {T.entered} ({units.say(T.si, 'K', S, 4)})",
                                      "state the temperature the contract names (for example 15 degC or 60 degF); "
                                      "a flow at 0 °C is given in Nm3"))
        if not _STANDARD_P[0] <= P.si <= _STANDARD_P[1]:
            out.append(job.problem_at(P, f"'{flow.entered}' is a standard volume, referred to about one standard "
                                      f"atmosphere, but standard_pressure is {P.entered}",
                                      "state the pressure the contract names (for example 101.325 kPa or 14.696 psia)"))
        return out
    return []


def _intercooler_drops(job: Job) -> list[Problem]:
    """Intercooler pressure drops above INTERCOOLER_DROP_WARN of the inlet pressure, where the inlet is
    known from the given values: a cooler leg between two compressors, and a staging block's intercooler
    (a fractional drop directly; an absolute drop against the end pressure, above every interstage pressure)."""
    out = []
    S = job.units
    legs = job.legs
    P: float | None = job.start.pressure.si
    for k, leg in enumerate(legs):
        st = leg.options.staging
        if st is not None and st.drop.inp is not None and st.most_stages > 1:
            d = st.drop
            inp = st.drop.inp
            P_end = leg.end["pressure"].si if "pressure" in leg.end else None
            frac = d.fraction if d.fraction is not None else (
                d.absolute / P_end if P_end and d.absolute is not None else None)
            if frac is not None and frac > INTERCOOLER_DROP_WARN:
                out.append(job.problem_at(inp, f"the intercooler pressure drop {inp.entered} is more than "
                                          f"{INTERCOOLER_DROP_WARN * 100:.0f} % of its inlet pressure",
                                          "intercooler drops are usually a few percent of the interstage pressure "
                                          "(common practice); check the value and its unit"))
        if leg.process == "cooler" and leg.options.drop.inp is not None and P is not None:
            between = 0 < k < len(legs) - 1 and legs[k - 1].process == "compressor" and legs[k + 1].process == "compressor"
            d = leg.options.drop
            dP = P - d.outlet(P)
            if between and d.inp is not None and dP > INTERCOOLER_DROP_WARN * P:
                out.append(job.problem_at(d.inp, f"the intercooler pressure drop {d.inp.entered} "
                                          f"({units.say(dP, 'Pa', S, 4, difference=True)}) is more than "
                                          f"{INTERCOOLER_DROP_WARN * 100:.0f} % of its inlet pressure "
                                          f"({units.say(P, 'Pa', S, 5)})",
                                          "intercooler drops are usually a few percent of the interstage pressure "
                                          "(common practice); check the value and its unit"))
        P = _pressure_after(leg, P)
    return out


def _pressure_after(leg: LegSpec, P: float | None) -> float | None:
    if leg.process in ("cooler", "heater"):
        return leg.options.drop.outlet(P) if P is not None else None
    if "pressure" in leg.end:
        return leg.end["pressure"].si
    if "pressure_ratio" in leg.end and P is not None:
        return P * leg.end["pressure_ratio"].si
    return None


def _history(job: Job) -> list[Problem]:
    t = job.calc
    if not t.history or t.revision in (h[0] for h in t.history):
        return []
    line, col = job.locate("calc.revision")
    listed = ", ".join(h[0] for h in t.history)
    return [Problem(job.name, line, col, "calc.revision",
                    f"revision {t.revision} is not in the history table (it lists {listed})",
                    f"add {{revision: {t.revision}, date: ..., description: ...}} to calc.history")]


