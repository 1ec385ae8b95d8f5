"""Every command of the command line, with everything loaded. Calls the library and alone maps errors to
exit codes: 0 success, 1 a design check fails, 2 bad input (or a state the gas model cannot compute), 3
an internal error, 130 interrupted. The console script is :func:`calcdoc.entry`, which sends the light
commands (:data:`calcdoc.cli.args.LIGHT`) to :mod:`calcdoc.cli.light` without loading this module."""
from __future__ import annotations

import os
import signal
import sys
import threading
from pathlib import Path

from .. import __version__, selftest
from ..errors import EXIT_BAD_INPUT, EXIT_CHECK_FAILED, EXIT_INTERNAL, EXIT_OK, CalcdocError
from ..report.output import output_folder
from . import signing, tools
from .batch import expand, run_batch
from .runjob import output_groups, run_one
from .verify import RerunFailed, verify
from .watch import watch

__all__ = ["command"]


def command(args) -> int:
    """Run the parsed command ``args.command`` (any but the light ones, which :func:`calcdoc.main` sends to
    :mod:`calcdoc.cli.light`); returns its exit code."""
    if args.command == "verify":
        return _verify(args)
    if args.command == "sign":
        return _sign(args)
    if args.command in ("diff", "new"):
        return getattr(tools, args.command)(args)
    if args.command == "selftest":
        return _selftest(args)
    if args.command == "watch":
        if not args.interval > 0:
            print(f"error: --interval {args.interval:g}: give a time in seconds above 0, for example 0.5",
                  file=sys.stderr)
            return EXIT_BAD_INPUT
        return _as_ctrl_c_on_sigterm(lambda: watch(args.job, args, interval=args.interval))
    return _run(args)


def _selftest(args) -> int:
    try:
        output_folder(args.out)   # a folder that cannot be one is bad input, said before the cases run
    except CalcdocError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    try:
        report = selftest.run_all()
    except CalcdocError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_INTERNAL
    try:
        written = selftest.write(report, args.out, pdf=not args.no_pdf)
    except CalcdocError as exc:   # the output folder cannot be made or written: bad input (the --out given)
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    for r in report.results:
        if r.status != "pass":
            print(f"  {r.case.id} {r.status.upper()}: {r.case.title}" + (f" ({r.error})" if r.error else ""))
        elif not args.quiet:
            print(f"  {r.case.id} pass")
    n = len(report.results)
    print(f"calcdoc {__version__} selftest: {'PASS' if report.passed else 'FAIL'} ({report.count('pass')} of {n} "
          f"cases pass)")
    if not args.quiet:
        for p in written:
            print(f"  wrote {p}")
    return EXIT_OK if report.passed else EXIT_CHECK_FAILED


def _sign(args) -> int:
    passphrase = os.environ.get(args.passphrase_env) if args.passphrase_env else None
    if args.passphrase_env and passphrase is None:
        print(f"error: the environment variable {args.passphrase_env} is not set", file=sys.stderr)
        return EXIT_BAD_INPUT
    try:
        out = signing.sign(args.pdf, args.out, args.key, args.cert, args.role, passphrase)
    except CalcdocError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    print(f"signed as {args.role}: wrote {out}")
    return EXIT_OK


def _verify(args) -> int:
    try:
        result = verify(args.report, args.job, rerun=args.rerun)
        for f in signing.read_signatures(Path(args.report).read_bytes(), args.trust):
            result.add(f.ok, f.text())
    except RerunFailed as exc:   # --rerun answers as 'calcdoc run' of the attached job would
        for line in str(exc).splitlines():
            print(f"error: {line}", file=sys.stderr)
        return exc.code
    except CalcdocError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except Exception:  # an internal error: one line, never a traceback (exit 1 would mean a mismatch)
        print(f"error: {args.report}: internal error in calcdoc {__version__} while verifying; please report it "
              "with the PDF", file=sys.stderr)
        return EXIT_INTERNAL
    print("\n".join(result.lines()))
    return EXIT_OK if result.ok else EXIT_CHECK_FAILED


def _interrupt(signum, frame):
    raise KeyboardInterrupt


def _run(args) -> int:
    """``calcdoc run``: SIGTERM is met as Ctrl-C is (the job in progress writes nothing and removes its
    temporary files); a batch stops its workers (see :func:`run_batch`)."""
    return _as_ctrl_c_on_sigterm(lambda: _run_jobs(args))


def _as_ctrl_c_on_sigterm(work) -> int:
    """``work()``, with SIGTERM met as Ctrl-C is (``run`` and ``watch``: a build in progress writes nothing,
    the last good report stays, exit code 130)."""
    if threading.current_thread() is not threading.main_thread():
        return work()
    old = signal.signal(signal.SIGTERM, _interrupt)
    try:
        return work()
    finally:
        signal.signal(signal.SIGTERM, old)


def _run_jobs(args) -> int:
    jobs, problems = expand(args.jobs)
    for p in problems:
        print(f"error: {p}", file=sys.stderr)
    if not jobs:
        return EXIT_BAD_INPUT
    if args.changes_since and len(jobs) != 1:
        print("error: --changes-since compares one job with its older revision; give one job file", file=sys.stderr)
        return EXIT_BAD_INPUT
    if len(jobs) == 1:
        return max(run_one(jobs[0], args), EXIT_BAD_INPUT if problems else EXIT_OK)
    opts = {"out": args.out, "no_pdf": args.no_pdf, "debug": args.debug, "changes_since": None}
    return max(run_batch(jobs, opts, quiet=args.quiet, workers=args.workers or None, groups=output_groups(jobs)),
               EXIT_BAD_INPUT if problems else EXIT_OK)
