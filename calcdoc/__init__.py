"""calcdoc: checkable calculation packages for gas compression and expansion, from a YAML job file.

Library use::

    import calcdoc
    job = calcdoc.load("example_jobs/press_gas_spring.yaml")
    results = calcdoc.run(job)          # shows as tables in a notebook
    pdf = calcdoc.render(results)        # the PDF calc package, as bytes
    calcdoc.write(results, "out")        # results JSON and the PDF calc package, written atomically
"""

__version__ = "0.1.0"

__all__ = ["CalcdocError", "JobError", "PhysicsError", "__version__", "load", "render", "run", "write"]

from .errors import CalcdocError, JobError, PhysicsError


def load(path):
    """Read and validate a job file; raises :class:`JobError` listing every problem."""
    from .job import load as _load

    return _load(path)


def run(job):
    """Compute a validated job; returns :class:`calcdoc.engine.results.Results` (shown as tables in a notebook)."""
    from .engine import run as _run
    from .engine.results import Results
    from .report.notebook import results_html

    # the notebook view belongs to the report layer; the facade attaches it so the engine never imports it
    setattr(Results, "_repr_html_", results_html)  # noqa: B010 (a method set on the class, not an attribute)
    return _run(job)


def render(results, pdf: bool = True):
    """The calc package in memory: PDF bytes, or (``pdf=False``) the report's HTML text."""
    from .report import render_html, render_pdf
    from .report.jsonfile import dumps

    return render_pdf(results, dumps(results)) if pdf else render_html(results)


def write(results, out_dir, pdf: bool = True):
    """Write the results JSON and (unless ``pdf`` is false) the PDF into ``out_dir``; returns the paths."""
    from .report.output import write as _write

    return _write(results, out_dir, pdf=pdf)
