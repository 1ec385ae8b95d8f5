"""The small commands: ``diff`` (two revisions) and ``new`` (a starter job). Called by
:mod:`calcdoc.cli.commands`, which alone maps errors to exit codes."""
from __future__ import annotations

import sys
from pathlib import Path

from .. import __version__
from ..engine import run
from ..engine.revision import compare
from ..errors import EXIT_BAD_INPUT, EXIT_INTERNAL, EXIT_INTERRUPTED, EXIT_OK, CalcdocError, JobError, PhysicsError
from ..job import load
from ..job.revision import load_revision
from ..job.starter import starter
from ..report.output import write_atomic
from ..report.terminal import diff_text
from .light import print_job_error

__all__ = ["diff", "new"]


def diff(args) -> int:
    """``calcdoc diff``: inputs changed and results moved between two revisions."""
    if (args.new is None) == (args.against is None):
        print("error: give OLD.yaml NEW.yaml, or JOB.yaml --against REV", file=sys.stderr)
        return EXIT_BAD_INPUT
    try:
        if args.against:
            old, new = load_revision(args.old, args.against), load(args.old)
        else:
            old, new = load(args.old), load(args.new)
        if old.calc.number != new.calc.number:
            print(f"warning: {args.old} is calc {old.calc.number} and {args.new or args.old} is calc "
                  f"{new.calc.number}: these are different calculations, not two revisions of one; the "
                  "comparison below may mean nothing", file=sys.stderr)
        d = compare(old, new, run(old), run(new))
    except JobError as exc:
        print_job_error(exc)
        return EXIT_BAD_INPUT
    except (PhysicsError, CalcdocError) as exc:
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return EXIT_INTERRUPTED
    except Exception:  # an internal error: one line, never a traceback
        print(f"error: internal error in calcdoc {__version__} comparing {args.old} and {args.new or args.against}; "
              "please report it with the job files", file=sys.stderr)
        return EXIT_INTERNAL
    print(diff_text(d, new.units), end="")
    return EXIT_OK


def new(args) -> int:
    """``calcdoc new``: a commented starter job."""
    text = starter(args.system)
    if not args.path:
        print(text, end="")
        return EXIT_OK
    p = Path(args.path)
    if p.exists() and not args.force:
        print(f"error: {p} exists; give another name or --force to overwrite it", file=sys.stderr)
        return EXIT_BAD_INPUT
    try:
        write_atomic(p, text.encode("utf-8"))
    except OSError as exc:
        print(f"error: cannot write {p}: {exc.strerror}", file=sys.stderr)
        return EXIT_BAD_INPUT
    print(f"wrote {p}; check it with: calcdoc check {p}")
    return EXIT_OK
