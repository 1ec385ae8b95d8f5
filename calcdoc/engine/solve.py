"""Solve: the input of a job found so that one result meets a target, then the whole job at that input.

The job is computed as a function of the varied input (each trial is the job file with the value written
in its place, :func:`calcdoc.job.vary.with_text`), and the root of achieved − target is found with SciPy's
``brentq`` (Brent's method: bracketed, guaranteed to converge) to an absolute tolerance of :data:`XTOL_REL`
times the larger bracket end and a relative tolerance of :data:`RTOL`, in at most :data:`MAX_ITER`
iterations. The job is then computed once more at the value found, with its checks: every table, check and
chart is at the solved value. The results keep the original job (its file, byte for byte, and its hash).
"""
from __future__ import annotations

import dataclasses
from collections.abc import Callable
from typing import Any

from ..errors import JobError, PhysicsError
from ..job.model import Job
from ..job.solve import bracket_problem, places_problem, trial_problem, trial_text, unsolved_problem
from ..job.vary import with_text
from .checks import evaluate, locations
from .results import Results, q as qjson

__all__ = ["MAX_ITER", "RTOL", "XTOL_REL", "with_solve"]

#: brentq's absolute tolerance on the varied input, relative to the larger bracket end.
XTOL_REL = 1e-12
#: brentq's relative tolerance on the varied input.
RTOL = 1e-12
#: Most iterations of the root search.
MAX_ITER = 100


def with_solve(job: Job, compute: Callable[[Job], Results]) -> Results:
    """The results of a job with a ``solve``: computed and checked at the solved value, with
    ``extra['solve']``; ``compute`` computes one job's states and legs (no checks)."""
    from scipy.optimize import brentq

    sp = job.solve
    assert sp is not None, "with_solve is called for a job with a solve"
    runs: dict[float, tuple[Job, Results, float]] = {}

    def trial(x: float) -> tuple[Job, Results, float]:
        if x in runs:
            return runs[x]
        try:
            pj = with_text(job, sp.span, trial_text(sp, x), sp.cut)
            res = compute(pj)
            locs = locations(pj, res, sp.quantity, sp.at, sp.where["at"], f"{sp.path}.so_that.at")
        except JobError as exc:
            raise JobError([trial_problem(job, x, "; ".join(p.found for p in exc.problems))]) from None
        except PhysicsError as exc:
            raise JobError([trial_problem(job, x, str(exc))]) from None
        if len(locs) != 1:
            raise JobError([places_problem(job, [w for w, _ in locs])])
        runs[x] = (pj, res, locs[0][1].value)
        return runs[x]

    target = sp.equals.si
    a, b = sp.bracket
    fa, fb = trial(a)[2], trial(b)[2]
    if (fa - target) * (fb - target) > 0:
        raise JobError([bracket_problem(job, fa, fb)])
    if fa == target or fb == target:
        x, iterations = (a if fa == target else b), 0
    else:
        try:
            x, info = brentq(lambda x: trial(x)[2] - target, a, b, xtol=XTOL_REL * max(abs(a), abs(b)), rtol=RTOL,
                             maxiter=MAX_ITER, full_output=True, disp=False)
        except RuntimeError:
            raise JobError([unsolved_problem(job, MAX_ITER)]) from None
        if not info.converged:
            raise JobError([unsolved_problem(job, info.iterations)])
        iterations = info.iterations
    pj, res, achieved = trial(float(x))
    checks = evaluate(pj, res)
    inp = next(i for i in pj.inputs if i.path == sp.value_path)
    qu = sp.quantity.unit
    solve: dict[str, Any] = {
        "vary": sp.vary, "path": sp.value_path, "value": qjson(inp.si, inp.unit),
        "entered": trial_text(sp, float(x)).strip('"'),
        "quantity": sp.quantity.name, "at": list(sp.at),
        "target": qjson(target, qu), "achieved": qjson(achieved, qu), "iterations": iterations,
        "bracket": [{"entered": sp.entered[0], "achieved": qjson(fa, qu)},
                    {"entered": sp.entered[1], "achieved": qjson(fb, qu)}],
        "method": {"name": "brentq", "xtol": XTOL_REL * max(abs(a), abs(b)), "rtol": RTOL, "unit": sp.unit},
    }
    return dataclasses.replace(res, job=job, checks=checks, extra={**res.extra, "solve": solve})
