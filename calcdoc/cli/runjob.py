"""Running one job from the command line: load, compute, write, and the exit code; the batch groups."""
from __future__ import annotations

import sys
import traceback
from pathlib import Path

from .. import __version__
from ..engine import run
from ..engine.revision import with_changes
from ..errors import (
    EXIT_BAD_INPUT,
    EXIT_CHECK_FAILED,
    EXIT_INTERNAL,
    EXIT_INTERRUPTED,
    EXIT_OK,
    CalcdocError,
    JobError,
    PhysicsError,
)
from ..job import load
from ..job.files import read_regular
from ..job.source import MAX_BYTES, decode, load as read_yaml
from ..report.output import WRITTEN, output_paths, safe_stem, write
from ..report.terminal import summary
from .light import print_job_error, print_job_warnings

__all__ = ["output_groups", "run_one"]


def output_groups(paths: list[str]) -> list[list[int]]:
    """Jobs of a batch grouped by the output names their calc number and revision give: a group runs in
    one worker, in file order, and only its first job that writes may write (see ``_run_one``), so that
    no job of the batch overwrites another's report. Only the title block is read here (safe YAML, with
    its limits; no validation): a job that cannot be read is a group of its own and reports itself."""
    groups: dict[str, list[int]] = {}
    for k, path in enumerate(paths):
        stem = f"\0{k}"
        try:
            calc = read_yaml(decode(read_regular(path, MAX_BYTES, "a job file (.yaml)"), path), path).value.get("calc")
            if calc is not None and calc.kind == "map":
                number, revision = calc.value.get("number"), calc.value.get("revision")
                if number is not None and revision is not None:
                    stem = safe_stem(str(number.value), str(revision.value))
        except (JobError, OSError):
            pass
        groups.setdefault(stem, []).append(k)
    return list(groups.values())


def run_one(path: str, args, info: dict | None = None) -> int:
    """Compute one job and write its outputs; returns the exit code (messages on stderr)."""
    try:
        job = load(path)
        if not getattr(args, "quiet", False):
            print_job_warnings(job)
        results = run(job)
        if getattr(args, "changes_since", None):
            old = load(args.changes_since)
            results = with_changes(results, old, run(old))
        taken = getattr(args, "taken", None)       # output names written by earlier jobs of this batch
        if taken is not None:
            stem = output_paths(results, args.out)[0].stem
            if stem in taken:
                raise CalcdocError(f"calc {job.calc.number} rev {job.calc.revision} is also {taken[stem]}, whose "
                                   "report this batch has written; give each job its own calc number or revision "
                                   "(nothing written for this job)")
            taken[stem] = path
        written = write(results, args.out, pdf=not args.no_pdf)
    except JobError as exc:
        print_job_error(exc)
        return EXIT_BAD_INPUT
    except PhysicsError as exc:
        print(f"error: {path}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except CalcdocError as exc:
        print(f"error: {path}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt as exc:
        if exc.args[:1] == (WRITTEN,):
            print(f"interrupted just after the job's report was written ({', '.join(exc.args[1])})", file=sys.stderr)
        else:
            print("interrupted; nothing was written for the job in progress (earlier outputs are unchanged)",
                  file=sys.stderr)
        return EXIT_INTERRUPTED
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
    if info is not None:
        info.update(number=results.job.calc.number, revision=results.job.calc.revision, checks=len(results.checks),
                    failed=sum(1 for c in results.checks if c.status != "pass"), written=[str(p) for p in written])
    if not args.quiet:
        summary(results, written)
    return EXIT_OK if results.passed else EXIT_CHECK_FAILED
