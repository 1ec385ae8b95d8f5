"""The engine: a job model in, results out (states, legs, checks, sweeps). Knows thermodynamics, nothing of
YAML or HTML."""
from __future__ import annotations

import dataclasses

from ..job.model import Job
from .checks import with_checks
from .closed import compute_closed
from .common import make_gas, shared_real_gas, software_versions
from .flow import run_flow
from .results import Results
from .sweep import with_sweep

__all__ = ["compute", "make_gas", "run", "shared_real_gas", "software_versions"]


def compute(job: Job) -> Results:
    """Compute a job's states, legs and warnings (no design checks, no sweep)."""
    return run_flow(job) if job.system == "flow" else compute_closed(job)


def run(job: Job) -> Results:
    """Compute a job: its states, legs and warnings, the checks of its limits and its sweep."""
    res = compute(job)
    unmarked = [i for i in job.inputs if i.unmarked_pressure]
    if unmarked:
        listed = ", ".join(f"{i.path} = {i.entered} (line {i.line})" for i in unmarked)
        res = dataclasses.replace(res, warnings=res.warnings + (
            f"Pressures written in psi or kgf/cm2 without a gauge or absolute marker are taken as absolute: {listed}. "
            "If a gauge pressure is meant, write psig (with the site atmosphere); write psia to make it explicit.",))
    return with_sweep(job, with_checks(job, res), compute)
