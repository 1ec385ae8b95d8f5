"""calcdoc: checkable calculation packages for gas compression and expansion, from a YAML job file.

Library use::

    import calcdoc
    job = calcdoc.load("example_jobs/press_gas_spring.yaml")
    results = calcdoc.run(job)          # shows as tables in a notebook
    calcdoc.write(results, "out")        # results JSON and the PDF calc package
"""

__version__ = "0.1.0"

__all__ = ["CalcdocError", "JobError", "PhysicsError", "__version__", "load", "render", "run", "write"]

from .errors import CalcdocError, JobError, PhysicsError


def load(path):
    """Read and validate a job file; raises :class:`JobError` listing every problem."""
    from .jobfile import load as _load

    return _load(path)


def run(job):
    """Compute a validated job; returns :class:`calcdoc.results.Results`."""
    from .engine import run as _run

    return _run(job)


def render(results, pdf: bool = True):
    """The calc package in memory: PDF bytes, or (``pdf=False``) the report's HTML text."""
    from .report import render_html, render_pdf
    from .results import dumps

    return render_pdf(results, dumps(results)) if pdf else render_html(results)


def write(results, out_dir, pdf: bool = True):
    """Write the results JSON and (unless ``pdf`` is false) the PDF into ``out_dir``; returns the paths."""
    from .output import write as _write

    return _write(results, out_dir, pdf=pdf)
