"""The engine: a job model in, results out (states, legs, checks, sweeps). Knows thermodynamics, nothing of
YAML or HTML."""
from __future__ import annotations

import dataclasses

from ..errors import Finding
from ..job.model import Job
from ..physics.eos_range import paper_range
from ..physics.fluids import fluid_names
from .checks import with_checks
from .closed import compute_closed
from .common import make_gas, shared_real_gas, software_versions
from .flow import run_flow
from .results import Results
from .solve import with_solve
from .sweep import with_sweep
from .vessel import compute_vessel

__all__ = ["compute", "make_gas", "run", "shared_real_gas", "software_versions"]


def compute(job: Job) -> Results:
    """Compute a job's states, legs and warnings (no design checks, no sweep)."""
    if job.system == "vessel":
        return compute_vessel(job)
    return run_flow(job) if job.system == "flow" else compute_closed(job)


def run(job: Job) -> Results:
    """Compute a job: its states, legs and warnings, the checks of its limits and its sweep (or its solve:
    then everything at the solved value)."""
    res = with_solve(job, compute) if job.solve is not None else with_checks(job, compute(job))
    unmarked = tuple((i.path, i.entered, i.line) for i in job.inputs if i.unmarked_pressure)
    if unmarked:
        res = dataclasses.replace(res, warnings=res.warnings + (Finding("pressure.unmarked", {"inputs": unmarked}),))
    beyond = _beyond_paper(job, res)
    if beyond:
        res = dataclasses.replace(res, warnings=res.warnings + beyond)
    return with_sweep(job, res, compute)


def _beyond_paper(job: Job, res: Results) -> tuple[Finding, ...]:
    """A warning where a state lies beyond the range the fluid's reference equation of state was validated
    for (its paper's stated range; CoolProp extrapolates there): the hottest and the highest-pressure state."""
    if job.gas.model != "real" or not job.gas.fluid or not res.states:
        return ()
    fluid = fluid_names().get(job.gas.fluid, job.gas.fluid)
    rng = paper_range(fluid)
    if rng is None:
        return ()
    out = []
    hot = max(res.states, key=lambda r: r.state.T)
    if hot.state.T > rng.Tmax:
        out.append(Finding("eos.beyond_paper_T", {"fluid": fluid, "state": hot.label, "T": hot.state.T,
                                                  "Tmax": rng.Tmax, "ref": rng.bibkey}))
    high = max(res.states, key=lambda r: r.state.P)
    if high.state.P > rng.pmax:
        out.append(Finding("eos.beyond_paper_P", {"fluid": fluid, "state": high.label, "P": high.state.P,
                                                  "pmax": rng.pmax, "ref": rng.bibkey}))
    return tuple(out)
