"""A job with one input written anew: each sweep point (and each trial of a solve) is the job file with that
one value put in its place, read and validated exactly as a separate job file would be."""
from __future__ import annotations

from collections.abc import Iterator

from ..errors import JobError, PhysicsError, Problem
from .jobfile import loads
from .messages import found_text
from .model import Job

__all__ = ["point_jobs", "with_text"]


def with_text(job: Job, span: tuple[int, int], text: str, cut: tuple[int, int] | None = None) -> Job:
    """The job with the characters in ``span`` replaced by ``text`` (and those in ``cut`` left out), read again.

    Raises :class:`JobError` with the problems of the new job file."""
    pieces = sorted([(*span, text)] + ([(*cut, "")] if cut else []), reverse=True)
    point = job.text
    for x, y, new in pieces:
        point = point[:x] + new + point[y:]
    return loads(point.encode("utf-8"), job.name)


def point_jobs(job: Job) -> Iterator[tuple[int, str, Job]]:
    """Each sweep point as its own validated job: yields (index, entered text, Job)."""
    sw = job.sweep
    if sw is None:
        return
    for k, (yaml_text, entered) in enumerate(zip(sw.points, sw.entered, strict=True)):
        try:
            pj = with_text(job, sw.span, yaml_text, sw.cut)
        except JobError as exc:
            raise JobError([at_point(job, k, p.found, p.valid) for p in exc.problems]) from None
        yield k, entered, pj


def at_point(job: Job, k: int, found: str | tuple[str, ...] | PhysicsError, valid: str = "narrow the sweep to values this job can be computed at") -> Problem:
    """A problem of sweep point k, located at the value the point came from; ``found`` is text, the texts of
    the point's own problems, or a physics error."""
    sw = job.sweep
    assert sw is not None
    path, line, col = sw.sources[k]
    if isinstance(found, PhysicsError):
        found = found_text(found, job.units)
    elif isinstance(found, tuple):
        found = "; ".join(found)
    return Problem(job.name, line, col, path, f"sweep point {k + 1} ({sw.entered[k]}): {found}", valid)
