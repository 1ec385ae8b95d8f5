"""The engine: a job model in, results out (states, legs, checks, sweeps). Knows thermodynamics, nothing of
YAML or HTML."""
from __future__ import annotations

import dataclasses

from ..errors import Finding
from ..job.model import Job
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
    return with_sweep(job, res, compute)
