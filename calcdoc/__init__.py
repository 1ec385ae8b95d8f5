"""calcdoc: checkable calculation packages for gas compression and expansion, from a YAML job file.

Library use::

    import calcdoc
    job = calcdoc.load("example_jobs/press_gas_spring.yaml")
    results = calcdoc.run(job)          # shows as tables in a notebook
    pdf = calcdoc.render(results)        # the PDF calc package, as bytes
    calcdoc.write(results, "out")        # results JSON and the PDF calc package, written atomically
"""

__version__ = "0.1.0"

__all__ = ["CalcdocError", "JobError", "PhysicsError", "__version__", "entry", "load", "main", "render", "run",
           "write"]

from .errors import EXIT_OK as _EXIT_OK, CalcdocError, JobError, PhysicsError


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


def main(argv=None) -> int:
    """The command line as a function (``calcdoc.main(["check", "job.yaml"])``); returns the exit code.

    Loads only what the command needs: ``check``, ``schema`` and the help need the job layer alone (no
    engine, report, CoolProp, pint, matplotlib or WeasyPrint), so they start in a fraction of the time
    of ``run``; every other command loads :mod:`calcdoc.cli.commands`."""
    from .cli.args import LIGHT, build_parser

    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return _EXIT_OK
    if args.command in LIGHT:
        from .cli.light import light_command

        return light_command(args)
    from .cli.commands import command

    return command(args)


def entry() -> None:
    """The console script (``calcdoc``): run the command and exit with its code."""
    import gc
    import os
    import sys

    # this process is calcdoc's alone: the collector runs less often (a report's layout makes and drops
    # many small objects, and each full collection would scan the libraries loaded too), ~4 % of a run
    gc.set_threshold(50_000, 20, 100)
    try:
        code = main()
        sys.stdout.flush()
    except BrokenPipeError:
        # the reader of our output went away (calcdoc schema | head): not an error of ours
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        code = _EXIT_OK
    sys.exit(code)
