"""The phase envelope of a mixture, traced on a time budget in a separate process.

CoolProp's envelope tracer (``build_phase_envelope``) is C++ that holds the interpreter and, for some
ordinary natural gases, never returns while its memory grows. A thread cannot stop it, so it runs in a
child process (forked where the platform allows, so CoolProp need not load again) that is killed when
its budget is spent. The strategy, first that finishes:

1. ``heos``: the envelope of the mixture's Helmholtz-energy model (GERG-2008 mixing rules), the model of
   every flash; budget :data:`HEOS_BUDGET_S`.
2. ``pr``: the envelope of the Peng–Robinson cubic equation of state (CoolProp's ``PR`` backend), used
   only to tell where a state is single-phase (with :data:`PR_MARGIN_K` of room on the gas side) and
   drawn on the charts as such; budget :data:`PR_BUDGET_S`.
3. ``none``: no envelope; every flash runs the phase-stability test (slower, still bounded per flash).

Results are kept per composition for the life of the process, and on disk in the user's cache directory
(``units.cache_dir('envelope')``), keyed by the composition, the budgets and the CoolProp version, so that a
job's later runs (and ``calcdoc watch``) do not trace again: a traced envelope costs 0.1–0.7 s, one that
falls back costs the whole budget. The file holds the outcome as well, so a later run takes the same model
as the first did on that machine, whatever its load. The points are JSON numbers, which read back as the
same floats (results and charts from the cache are byte-identical). Deleting the folder is always safe.
SI throughout: T [K], P [Pa].
"""
from __future__ import annotations

import hashlib
import json
import math
import multiprocessing
import os
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..units import cache_dir, write_cached

__all__ = ["Envelope", "FORMAT", "HEOS_BUDGET_S", "PR_BUDGET_S", "PR_MARGIN_K", "phase_envelope", "traced"]

#: Budget of the envelope of the Helmholtz-energy mixture model, in processor seconds of the tracing process (the
#: envelopes that finish take 0.08–0.7 s here for 5 to 9 components). Processor time rather than elapsed time, so
#: that a loaded machine does not change which envelope a job gets (same job, same results).
HEOS_BUDGET_S = 2.0
#: Budget of the Peng–Robinson envelope [processor s] (0.2–1 s here).
PR_BUDGET_S = 3.0
#: Elapsed-time cap, as a multiple of the budget, for a machine so loaded that the tracer gets little processor.
WALL_FACTOR = 4.0
#: How often the parent looks at the tracing process [s].
POLL_S = 0.02
#: Room on the gas side of a Peng–Robinson dew line before the gas phase is imposed on a flash of the
#: Helmholtz-energy model [K] (common practice: the two models' dew temperatures of natural gases differ by a
#: few kelvin).
PR_MARGIN_K = 15.0
#: Version of the cached file's layout; part of its name, so a change never meets an old file.
FORMAT = 1

#: Envelopes traced (not read from a cache) in this process: for the benchmarks and tests.
traced = 0


@dataclass(frozen=True)
class Envelope:
    """A traced phase envelope: ``points`` (T, P) along the curve as CoolProp gives it (dew side, then
    bubble side), the ``source`` model ('heos', 'pr' or 'none'), what was tried with the elapsed seconds each
    took (``tried``: (model, outcome, seconds) with outcome 'ok', 'timeout' or 'failed'), and the peak memory of
    the child process that traced it [bytes, 0 when unknown]."""

    points: tuple[tuple[float, float], ...]
    source: str
    tried: tuple[tuple[str, str, float], ...]
    child_rss: int = 0
    #: (T, P, v, s, h) of the mixture itself along the envelope (the vapour on the dew side, the liquid on the
    #: bubble side), per kg [SI]; for the charts
    curve: tuple[tuple[float, float, float, float, float], ...] = ()

    @property
    def margin(self) -> float:
        """Room on the gas side before a state counts as single-phase [K]."""
        return PR_MARGIN_K if self.source == "pr" else 0.0


_CACHE: dict[tuple[object, ...], Envelope] = {}


def phase_envelope(components: tuple[str, ...], x: tuple[float, ...], heos_budget: float = HEOS_BUDGET_S,
                   pr_budget: float = PR_BUDGET_S) -> Envelope:
    """The phase envelope of the mixture (mole fractions ``x``), first of HEOS then of PR that finishes
    within its budget [s]; cached per composition and budgets, in this process and on disk."""
    global traced
    key = (components, x, heos_budget, pr_budget)
    if key in _CACHE:
        return _CACHE[key]
    folder = cache_dir("envelope")
    path = folder / f"{_file_key(components, x, heos_budget, pr_budget)}.json" if folder is not None else None
    env = _read(path) if path is not None else None
    if env is None:
        env = _trace(components, x, heos_budget, pr_budget)
        traced += 1
        if path is not None:
            _write(path, env)
    _CACHE[key] = env
    return env


def _trace(components: tuple[str, ...], x: tuple[float, ...], heos_budget: float, pr_budget: float) -> Envelope:
    tried = []
    rss = 0
    for backend, budget in (("HEOS", heos_budget), ("PR", pr_budget)):
        t0 = time.perf_counter()
        outcome, pts, rss_b = _traced(backend, components, x, budget)
        rss = max(rss, rss_b)
        tried.append((backend.lower(), outcome, time.perf_counter() - t0))
        if outcome == "ok":
            return Envelope(tuple(p[:2] for p in pts), backend.lower(), tuple(tried), rss, tuple(pts))
    return Envelope((), "none", tuple(tried), rss)


def _file_key(components: tuple[str, ...], x: tuple[float, ...], heos_budget: float, pr_budget: float) -> str:
    import CoolProp
    import CoolProp.CoolProp as CP

    what = json.dumps([list(components), list(x), heos_budget, pr_budget, CoolProp.__version__,
                       CP.get_global_param_string("gitrevision")])
    return f"{hashlib.sha256(what.encode('utf-8')).hexdigest()[:24]}-v{FORMAT}"


def _read(path: Path) -> Envelope | None:
    """The envelope kept in ``path``, or None when it is missing, unreadable or not one of ours."""
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
        source = data["source"]
        tried = tuple((str(m), str(o), float(t)) for m, o, t in data["tried"])
        curve = tuple((float(a), float(b), float(c), float(d), float(e)) for a, b, c, d, e in data["curve"])
    except (OSError, ValueError, KeyError, TypeError):
        return None
    if source not in ("heos", "pr", "none") or not all(math.isfinite(v) for p in curve for v in p):
        return None
    if (source == "none") != (not curve) or [m for m, _, _ in tried] != ["heos", "pr"][:len(tried)]:
        return None
    return Envelope(tuple(p[:2] for p in curve), source, tried, 0, curve)


def _write(path: Path, env: Envelope) -> None:
    write_cached(path, json.dumps({"source": env.source, "tried": [list(t) for t in env.tried],
                                   "curve": [list(p) for p in env.curve]}, separators=(",", ":")))


def _child(conn: Any, backend: str, components: tuple[str, ...], x: tuple[float, ...]) -> None:
    """Trace the envelope and send (T, P) points and the peak memory back (runs in the child process)."""
    import resource

    import CoolProp

    try:
        AS = CoolProp.AbstractState(backend, "&".join(components))
        AS.set_mole_fractions(list(x))
        AS.build_phase_envelope("")
        d = AS.get_phase_envelope_data()
        M = AS.molar_mass()
        pts = []
        for k, (T, P, Q) in enumerate(zip(d.T, d.p, d.Q, strict=True)):
            side = (d.rhomolar_vap, d.smolar_vap, d.hmolar_vap) if Q > 0.5 else (d.rhomolar_liq, d.smolar_liq,
                                                                                   d.hmolar_liq)
            row = (float(T), float(P), M / float(side[0][k]), float(side[1][k]) / M, float(side[2][k]) / M)
            if T > 0 and P > 0 and all(math.isfinite(v) for v in row):
                pts.append(row)
        out = ("ok" if len(pts) > 3 else "failed", pts)
    except Exception:   # noqa: BLE001 - any failure of the tracer means: no envelope from this model
        out = ("failed", [])
    conn.send((*out, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024))
    conn.close()


def _cpu_seconds(pid: int) -> float | None:
    """Processor time a running process has used [s] (Linux /proc), or None where it cannot be read."""
    try:
        with open(f"/proc/{pid}/stat", encoding="ascii") as fh:
            fields = fh.read().rsplit(")", 1)[1].split()
        return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")
    except (OSError, ValueError, IndexError):
        return None


def _traced(backend: str, components: tuple[str, ...], x: tuple[float, ...], budget: float
            ) -> tuple[str, list[Any], int]:
    import CoolProp  # noqa: F401 - loaded before the fork, so the child's budget is spent on tracing alone

    methods = multiprocessing.get_all_start_methods()
    ctx = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
    recv, send = ctx.Pipe(duplex=False)
    proc = ctx.Process(target=_child, args=(send, backend, components, x), daemon=True)  # type: ignore[attr-defined]
    proc.start()
    send.close()
    try:
        t0 = time.monotonic()
        while True:
            if recv.poll(POLL_S):
                try:
                    outcome, pts, rss = recv.recv()
                except EOFError:          # the child died without an answer
                    return "failed", [], 0
                return outcome, pts, rss
            if not proc.is_alive() and not recv.poll(0):
                return "failed", [], 0
            used = _cpu_seconds(proc.pid)
            wall = time.monotonic() - t0
            if (used if used is not None else wall) > budget or wall > WALL_FACTOR * budget:
                return "timeout", [], 0
    finally:
        recv.close()
        if proc.is_alive():
            proc.kill()
        proc.join(5.0)
