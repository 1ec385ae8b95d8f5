"""``calcdoc watch JOB.yaml``: compute the job, then again each time the file is saved, in one process.

The libraries (CoolProp's fluid library, pint's registry, matplotlib, WeasyPrint and its fonts) load
once, so a rebuild costs the engine, the charts and the layout only. The file is polled (no new
dependency): its modification time and size each ``interval``; when they change, its SHA-256, so that
a save that changes nothing (or a ``touch``) does not rebuild. A change is built once the file has
stood still for one interval, so an editor's save in several writes is read whole. Each build writes
the JSON and PDF as ``calcdoc run`` does (atomically: a failed build leaves the last good report in
place) and prints the same summary, or the messages of a bad job file, and keeps watching. Ctrl-C
ends it with exit code 130.
"""
from __future__ import annotations

import gc
import hashlib
import os
import sys
import time

from .runjob import run_one

__all__ = ["watch"]


def _stat(path: str) -> tuple[int, int] | None:
    try:
        st = os.stat(path)
    except OSError:
        return None
    return st.st_mtime_ns, st.st_size


def _digest(path: str) -> str | None:
    try:
        with open(path, "rb") as fh:
            return hashlib.sha256(fh.read()).hexdigest()
    except OSError:
        return None


def watch(path: str, args, interval: float = 0.5, builds: int | None = None) -> int:
    """Build ``path`` now and after every change until Ctrl-C (exit 130), or after ``builds`` builds
    (for tests) with the last build's exit code."""
    say = (lambda *a: None) if args.quiet else (lambda *a: print(*a, flush=True))
    say(f"watching {path} (Ctrl-C to stop)")
    stat = digest = None
    done = 0
    code = 0
    missing_said = False
    threshold = gc.get_threshold()
    try:
        while builds is None or done < builds:
            now = _stat(path)
            if now is None:
                if not missing_said:
                    print(f"error: {path}: file not found; waiting for it", file=sys.stderr, flush=True)
                    missing_said = True
                stat = None
                time.sleep(interval)
                continue
            missing_said = False
            if now != stat:
                time.sleep(interval)
                if _stat(path) != now:         # still being written: look again next round
                    continue
                stat = now
                new = _digest(path)
                if new is not None and new != digest:
                    digest = new
                    t0 = time.perf_counter()
                    code = run_one(path, args)
                    done += 1
                    if done == 1:
                        _settle()
                    if code == 130:            # Ctrl-C during the build (run_one caught it)
                        raise KeyboardInterrupt
                    say(f"[{time.strftime('%H:%M:%S')}] built in {time.perf_counter() - t0:.2f} s "
                        f"(exit code {code}); watching {path}")
                continue
            time.sleep(interval)
    except KeyboardInterrupt:
        print("stopped watching", file=sys.stderr, flush=True)
        return 130
    finally:
        gc.unfreeze()   # back to the ordinary collector, so the libraries are torn down as usual at exit
        gc.set_threshold(*threshold)
    return code


def _settle() -> None:
    """After the first build: what the libraries loaded (fluid data, fonts, compiled templates, pint) lives
    as long as the process, so it is moved out of the garbage collector's sight (``gc.freeze``, after a
    collection so that no garbage is kept), and the collector runs less often. A rebuild allocates and
    drops many small objects (WeasyPrint's boxes); with the loaded libraries no longer scanned at each
    full collection, a rebuild takes ~20 % less time (bench/README.md). The results are the same."""
    gc.collect()
    gc.freeze()
    gc.set_threshold(50_000, 20, 100)
