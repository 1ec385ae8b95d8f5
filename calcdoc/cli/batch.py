"""Running many jobs: in parallel over the cores, one process per job at a time, each job isolated
(its errors are its own), a progress bar on a terminal, and a one-line-per-job summary table."""
from __future__ import annotations

import argparse
import io
import os
import signal
import sys
import threading
from contextlib import contextmanager, redirect_stderr, redirect_stdout
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import EXIT_INTERRUPTED
from .runjob import run_one

__all__ = ["Outcome", "expand", "run_batch"]

STATUS = {0: "ok", 1: "CHECK FAILS", 2: "BAD INPUT", 3: "ERROR", 130: "INTERRUPTED"}


@dataclass
class Outcome:
    path: str
    code: int
    stderr: str = ""
    info: dict = field(default_factory=dict)


def expand(paths: list[str]) -> tuple[list[str], list[str]]:
    """Job files from the command line: files as given, folders as their *.yaml and *.yml files
    (sorted, not recursive). Returns (job paths, problems)."""
    jobs, problems = [], []
    for p in paths:
        path = Path(p)
        if path.is_dir():
            found = sorted(str(f) for f in path.iterdir() if f.suffix in (".yaml", ".yml") and f.is_file())
            if not found:
                problems.append(f"{p}: the folder holds no job files (*.yaml, *.yml)")
            jobs += found
        else:
            jobs.append(p)
    return jobs, problems


def _one(path: str, opts: dict, taken: dict | None = None) -> Outcome:
    """Run one job in this process, capturing what it prints (the worker of the pool)."""
    args = argparse.Namespace(**opts, quiet=True, taken=taken)
    info: dict = {}
    err, out = io.StringIO(), io.StringIO()
    try:
        with redirect_stderr(err), redirect_stdout(out):
            code = run_one(path, args, info)
    except BaseException as exc:  # isolation: nothing a job does may stop the batch
        return Outcome(path, 3, f"error: {path}: internal error ({type(exc).__name__})\n")
    return Outcome(path, code, err.getvalue(), info)


def _group(paths: list[str], opts: dict) -> list[Outcome]:
    """Jobs whose outputs have the same names, one after another in file order: the first that writes
    takes the names, the others are refused rather than overwrite its report."""
    taken: dict[str, str] = {}
    return [_one(p, opts, taken) for p in paths]


def _progress(done: int, total: int, stream) -> None:
    width = 30
    filled = int(width * done / total)
    stream.write(f"\r[{'#' * filled}{'.' * (width - filled)}] {done}/{total} jobs")
    stream.flush()


class _Stop(Exception):
    """The batch was told to stop (SIGINT or SIGTERM to the parent)."""


def _die_with_parent() -> None:
    """Ask the kernel to end this worker if the batch process dies (even by SIGKILL): Linux only."""
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        PR_SET_PDEATHSIG = 1
        libc.prctl(PR_SET_PDEATHSIG, signal.SIGTERM, 0, 0, 0)
    except (OSError, AttributeError):
        pass


def _worker_init() -> None:
    """A worker leaves Ctrl-C to the batch (which stops it) and ends on SIGTERM or with its parent. A worker
    writing its pair holds SIGTERM back until both files are in place (see report.output)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    _die_with_parent()


@contextmanager
def _stop_on_signals(state: dict):
    """SIGINT and SIGTERM raise :class:`_Stop` in the batch process (once); the old handlers come back after."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def handler(signum, frame):
        if state.get("signal") is None:
            state["signal"] = signum
            raise _Stop()

    old = {s: signal.signal(s, handler) for s in (signal.SIGINT, signal.SIGTERM)}
    try:
        yield
    finally:
        for s, h in old.items():
            signal.signal(s, h)


def _stop_pool(pool) -> None:
    """Cancel the queued jobs and end the workers now (SIGTERM, then SIGKILL after a grace period)."""
    procs = list(getattr(pool, "_processes", {}).values())
    try:
        pool.shutdown(wait=False, cancel_futures=True)
    except Exception:   # the pool is being abandoned; its bookkeeping may be half-done
        pass
    for p in procs:
        try:
            p.terminate()
        except (OSError, ValueError, AttributeError):
            pass
    for p in procs:
        p.join(5)
        if p.is_alive():
            p.kill()
            p.join(5)


def run_batch(paths: list[str], opts: dict, quiet: bool = False, workers: int | None = None,
              groups: list[list[int]] | None = None) -> int:
    """Run the jobs in parallel; print their errors, then a summary table. Returns the worst exit code.
    ``groups`` (indices into paths) run in one worker each, in order; by default every job alone.

    SIGINT or SIGTERM stops the batch: queued jobs do not start, the workers are ended (a worker renaming
    its pair into place finishes that first), nothing is written after, and the summary says which jobs
    were written, which were stopped while computing and which never started."""
    from concurrent.futures import ProcessPoolExecutor, as_completed
    from concurrent.futures.process import BrokenProcessPool

    total = len(paths)
    groups = groups or [[k] for k in range(total)]
    workers = max(1, min(len(groups), workers or os.cpu_count() or 1))
    bar = sys.stderr.isatty() and not quiet
    outcomes: dict[int, Outcome] = {}
    retry: list[int] = []
    running: list[int] = []
    done = 0
    state: dict = {}
    if bar:
        _progress(0, total, sys.stderr)
    pool = None
    futures: dict = {}
    with _stop_on_signals(state):   # a second signal while stopping is ignored (the handler raises once)
        try:
            pool = ProcessPoolExecutor(max_workers=workers, initializer=_worker_init)
            futures = {pool.submit(_group, [paths[k] for k in g], opts): g for g in groups}
            for fut in as_completed(futures):
                g = futures[fut]
                try:
                    for k, outcome in zip(g, fut.result(), strict=True):
                        outcomes[k] = outcome
                except BrokenProcessPool:
                    retry.extend(g)
                    continue
                done += len(g)
                if bar:
                    _progress(done, total, sys.stderr)
            pool.shutdown(wait=True)
            pool = None
            # a job that killed its worker process took the pool down: run the unfinished ones again,
            # each in a pool of its own, so that only the job that breaks its process is lost
            for k in sorted(retry):
                running = [k]
                pool = ProcessPoolExecutor(max_workers=1, initializer=_worker_init)
                try:
                    outcomes[k] = pool.submit(_one, paths[k], opts).result()
                except BrokenProcessPool:
                    outcomes[k] = Outcome(paths[k], 3, f"error: {paths[k]}: the process computing this job stopped "
                                                       "unexpectedly; please report it with the job file\n")
                pool.shutdown(wait=True)
                pool = None
                running = []
                done += 1
                if bar:
                    _progress(done, total, sys.stderr)
        except (_Stop, KeyboardInterrupt):
            started = set(running)
            if pool is not None:
                if not running:
                    started = {k for f, g in futures.items() if f.running() for k in g}
                _stop_pool(pool)
            if bar:
                sys.stderr.write("\n")
            return _stopped(paths, outcomes, started, state.get("signal") or signal.SIGINT)
    if bar:
        sys.stderr.write("\n")
    for k in range(total):
        if outcomes[k].stderr:
            sys.stderr.write(outcomes[k].stderr)
    print(summary_table([outcomes[k] for k in range(total)]), end="")
    return max(o.code for o in outcomes.values())


def _stopped(paths: list[str], outcomes: dict[int, Outcome], started: set[int], signum: int) -> int:
    """What a stopped batch did and did not do, truly: each job finished (and whether it wrote), stopped while
    computing, or never started."""
    name = signal.Signals(signum).name
    for k in sorted(outcomes):
        if outcomes[k].stderr:
            sys.stderr.write(outcomes[k].stderr)
    lines = [f"stopped by {name}: the jobs still queued were not started and the workers were ended; nothing is "
             "written after this point."]
    for k, path in enumerate(paths):
        if k in outcomes:
            o = outcomes[k]
            w = o.info.get("written")
            lines.append(f"  {STATUS.get(o.code, f'exit {o.code}'):12} {path}: "
                         + (f"written: {', '.join(w)}" if w else "finished, nothing written"))
        elif k in started:
            lines.append(f"  {'STOPPED':12} {path}: not finished (stopped while computing or about to start); the "
                         "output folder holds its earlier report, if any, or a complete new pair, never a mix")
        else:
            lines.append(f"  {'NOT STARTED':12} {path}: not started, nothing written")
    print("\n".join(lines), file=sys.stderr)
    return EXIT_INTERRUPTED


def summary_table(outcomes: list[Outcome]) -> str:
    """One line per job: status, file, calc number and revision, checks, the report written."""
    rows = []
    for o in outcomes:
        i = o.info
        calc = f"{i['number']} rev {i['revision']}" if i.get("number") else ""
        checks = ""
        if "checks" in i and i["checks"]:
            failed = i["failed"]
            n = i["checks"]
            checks = ((f"{n} checks pass" if n > 1 else "1 check passes") if not failed
                      else f"{failed} of {n} check{'s' if n > 1 else ''} FAIL{'S' if failed == 1 and n == 1 else ''}")
        elif "checks" in i:
            checks = "no limits"
        rows.append((STATUS.get(o.code, f"exit {o.code}"), o.path, calc, checks, i.get("written", [""])[-1]))
    widths = [max(len(r[c]) for r in rows) for c in range(5)]
    lines = [f"{len(outcomes)} job{'s' if len(outcomes) != 1 else ''}:"]
    for r in rows:
        lines.append("  " + "  ".join(r[c].ljust(widths[c]) for c in range(5)).rstrip())
    bad = sum(1 for o in outcomes if o.code != 0)
    lines.append(f"{len(outcomes) - bad} ok, {bad} not ok." if bad else "all ok.")
    return "\n".join(lines) + "\n"
