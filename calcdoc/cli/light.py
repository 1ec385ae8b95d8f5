"""The light commands: ``check`` (validate job files) and ``schema`` (the JSON Schema of the job file).
They load the job layer only (no engine, report, CoolProp, pint, matplotlib or WeasyPrint), so that
checking a job while editing it costs little more than starting Python. Also the printers of a job
file's problems and warnings that every command shares."""
from __future__ import annotations

import json
import sys

from .. import __version__
from ..errors import EXIT_BAD_INPUT, EXIT_INTERNAL, EXIT_OK, JobError
from ..job import load
from ..job.schema import job_schema

__all__ = ["check", "light_command", "print_job_error", "print_job_warnings", "schema"]


def print_job_error(exc: JobError) -> None:
    """Every problem of a job file, one line each, on stderr."""
    n = len(exc.problems)
    for p in exc.problems:
        print(f"error: {p}", file=sys.stderr)
    if n > 1:
        print(f"{n} problems found.", file=sys.stderr)


def print_job_warnings(job) -> None:
    """What the job file shows without computing that does not stop a run, one line each, on stderr."""
    for p in job.warnings:
        print(f"warning: {p}", file=sys.stderr)


def check(args) -> int:
    """``calcdoc check``: validate each job file; exit 2 when one has a problem."""
    worst = EXIT_OK
    for path in args.jobs:
        try:
            job = load(path)
            print_job_warnings(job)
            print(f"{path}: OK" + (f" ({len(job.warnings)} warning{'s' if len(job.warnings) > 1 else ''})"
                                   if job.warnings else ""))
        except JobError as exc:
            print_job_error(exc)
            worst = EXIT_BAD_INPUT
        except Exception:  # an internal error: one line, never a traceback
            print(f"error: {path}: internal error in calcdoc {__version__}; please report it with the job file.",
                  file=sys.stderr)
            worst = max(worst, EXIT_INTERNAL)
    return worst


def schema(args) -> int:
    """``calcdoc schema``: the JSON Schema of the job file."""
    print(json.dumps(job_schema(), indent=2, ensure_ascii=False))
    return EXIT_OK


def light_command(args) -> int:
    """Run a command of :data:`calcdoc.cli.args.LIGHT`."""
    return check(args) if args.command == "check" else schema(args)
