"""The command line. Parses arguments, calls the library, and alone maps errors to exit codes:
0 success, 1 a design check fails, 2 bad input (or a state the gas model cannot compute), 3 an
internal error."""
from __future__ import annotations

import argparse
import sys
import traceback
from pathlib import Path

from . import __version__
from .errors import CalcdocError, JobError, PhysicsError

EXIT_OK, EXIT_CHECK_FAILED, EXIT_BAD_INPUT, EXIT_INTERNAL = 0, 1, 2, 3


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="calcdoc",
        description="Turn a YAML job file into a checkable calculation package (PDF) and results (JSON) for "
                    "gas compression and expansion.",
        epilog="Exit codes: 0 success; 1 a design check fails (results and report are still written); "
               "2 bad input; 3 internal error.")
    p.add_argument("--version", action="version", version=f"calcdoc {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    r = sub.add_parser("run", help="compute a job and write its results JSON and PDF calc package",
                       description="Compute each job file and write OUT/<calc number>_rev<revision>.json and .pdf. "
                                   "A failing run leaves earlier outputs untouched.")
    r.add_argument("jobs", nargs="+", metavar="JOB.yaml", help="job file(s) to compute")
    r.add_argument("--out", "-o", default="out", metavar="DIR", help="output folder (default: ./out)")
    r.add_argument("--no-pdf", action="store_true", help="write the results JSON only (no PDF)")
    r.add_argument("--quiet", "-q", action="store_true", help="print nothing but errors")
    r.add_argument("--debug", action="store_true",
                   help="on an internal error, write the traceback to calcdoc-debug.log in the output folder")
    c = sub.add_parser("check", help="validate job file(s) without computing or writing anything",
                       description="Read and validate job files; report every problem found (exit 2) or OK (exit 0).")
    c.add_argument("jobs", nargs="+", metavar="JOB.yaml")
    return p


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_OK
    if args.command == "check":
        return _check(args)
    return _run(args)


def _check(args) -> int:
    from .jobfile import load

    worst = EXIT_OK
    for path in args.jobs:
        try:
            load(path)
            print(f"{path}: OK")
        except JobError as exc:
            _print_job_error(exc)
            worst = EXIT_BAD_INPUT
        except Exception:  # an internal error: one line, never a traceback
            print(f"error: {path}: internal error in calcdoc {__version__}; please report it with the job file.",
                  file=sys.stderr)
            worst = max(worst, EXIT_INTERNAL)
    return worst


def _print_job_error(exc: JobError) -> None:
    n = len(exc.problems)
    for p in exc.problems:
        print(f"error: {p}", file=sys.stderr)
    if n > 1:
        print(f"{n} problems found.", file=sys.stderr)


def _run(args) -> int:
    worst = EXIT_OK
    for path in args.jobs:
        code = _run_one(path, args)
        worst = max(worst, code)
    return worst


def _run_one(path: str, args) -> int:
    from .jobfile import load

    try:
        job = load(path)
        from .engine import run

        results = run(job)
        from .output import write

        written = write(results, args.out, pdf=not args.no_pdf)
    except JobError as exc:
        _print_job_error(exc)
        return EXIT_BAD_INPUT
    except PhysicsError as exc:
        print(f"error: {path}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except CalcdocError as exc:
        print(f"error: {path}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("interrupted; nothing was written for the job in progress", file=sys.stderr)
        return 130
    except Exception:  # an internal error: one line for the user, the traceback only with --debug
        where = ""
        if args.debug:
            log = Path(args.out) / "calcdoc-debug.log"
            try:
                log.parent.mkdir(parents=True, exist_ok=True)
                log.write_text(traceback.format_exc(), encoding="utf-8")
                where = f" The traceback is in {log}."
            except OSError:
                where = ""
        print(f"error: {path}: internal error in calcdoc {__version__}; please report it with the job file."
              f"{where or ' Run again with --debug to write the traceback to a log file.'}", file=sys.stderr)
        return EXIT_INTERNAL
    if not args.quiet:
        _summary(results, written)
    return EXIT_OK if results.passed else EXIT_CHECK_FAILED


def _summary(results, written) -> None:
    from .report.format import num

    t = results.job.calc
    print(f"{t.number} rev {t.revision}: {t.title}")
    print(f"  gas: {results.gas.describe()}")
    for rec in results.states:
        s = rec.state
        print(f"  state {rec.label:>3}: P = {num(s.P / 1e3, 5):>10} kPa   T = {num(s.T - 273.15, 5):>8} °C   "
              f"v = {num(s.v, 4)} m³/kg   {s.phase}")
    for leg in results.legs:
        qd = leg.quantities
        if "W_by_gas" in qd:
            print(f"  leg {leg.i}→{leg.i + 1} {leg.name} ({leg.process}): W by gas = {num(qd['W_by_gas'].value / 1e3, 5)} kJ, "
                  f"Q to gas = {num(qd['Q_to_gas'].value / 1e3, 5)} kJ")
        else:
            print(f"  leg {leg.i}→{leg.i + 1} {leg.name} ({leg.process})")
    for c in results.checks:
        print(f"  check {c.name} at {c.where}: {c.status.upper()}")
    for w in results.warnings:
        print(f"  warning: {w}")
    for p in written:
        print(f"  wrote {p}")


def entry() -> None:
    sys.exit(main())


if __name__ == "__main__":
    entry()
