"""Sweeps: the job computed at each value of the varied input, with the followed results and the checks.

Each point is the job file with that one value written in its place, validated and computed exactly as a
separate run would be (so a point equals a separate run at the same inputs); the real-gas object is shared
between points (:func:`calcdoc.engine.common.shared_real_gas`). The series go into the results JSON under
``sweep``, with the margin and status of every design check at each point.
"""
from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable
from typing import Any

from ..errors import JobError, PhysicsError
from ..job.model import Job
from ..job.quantities import series_name
from ..job.vary import at_point, point_jobs
from .checks import evaluate, locations
from .results import Results, q as qjson

__all__ = ["with_sweep"]


def with_sweep(job: Job, results: Results, compute: Callable[[Job], Results]) -> Results:
    """The results with the sweep series (``results.extra['sweep']``), when the job has a sweep; ``compute``
    computes one point's job (states and legs, no checks)."""
    sw = job.sweep
    if sw is None:
        return results
    points: list[dict[str, Any]] = []
    series: dict[tuple[str, str], dict[str, Any]] = {}
    checks: dict[tuple[str, str, str], dict[str, Any]] = {}
    n = len(sw.points)
    for k, entered, pj in point_jobs(job):
        try:
            res = compute(pj)
            chk = evaluate(pj, res)
        except (JobError, PhysicsError) as exc:
            msg = tuple(p.found for p in exc.problems) if isinstance(exc, JobError) else exc
            raise JobError([at_point(job, k, msg)]) from None
        inp = next(i for i in pj.inputs if i.path == sw.value_path)
        points.append({"entered": entered, "value": qjson(inp.si, inp.unit)})
        for f in sw.follow:
            for place, calc in locations(pj, res, f.quantity, f.at, f.where, f.path):
                key = (f.quantity.name, place)
                s = series.setdefault(key, {"name": series_name(f.quantity.title, place), "quantity": f.quantity.name,
                                            "at": place, "unit": calc.unit, "values": [None] * n})
                s["values"][k] = calc.value if math.isfinite(calc.value) else None
        for c in chk:
            ckey = (c.name, c.kind, c.where)
            s = checks.setdefault(ckey, {"name": c.name, "type": c.kind, "at": c.where, "unit": c.unit,
                                        "margin": [None] * n, "status": [None] * n})
            s["margin"][k] = c.margin
            s["status"][k] = c.status
    sweep = {"input": sw.input, "path": sw.value_path,
             "unit": next(i.unit for i in job.inputs if i.path == sw.value_path),
             "points": points, "series": list(series.values()), "checks": list(checks.values())}
    return dataclasses.replace(results, extra={**results.extra, "sweep": sweep})
