"""Comparing two revisions of a job: the inputs that changed and the results and checks that moved.

Inputs are compared as entered (the job file's values, keyed by path with list items named by their
``name`` or ``revision`` where they have one, so that inserting a leg does not renumber the rest).
Results are compared through the results file's contract (states by label, legs by name, checks by
name, bound and place), largest relative change first; unchanged values are counted, not listed.
"""
from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import Any

from ..job.model import Job
from .results import Results, to_json

__all__ = ["Diff", "InputChange", "ResultChange", "compare", "diff_json", "with_changes"]

#: Two results count as equal when they differ by less than this fraction of the largest value of the
#: same unit in either revision (round-off, such as an entropy change of 1e-16 on an isentropic leg).
REL_EQUAL = 1e-9
_STATE_KEYS = ("P", "T", "v", "rho", "u", "h", "s", "Z", "V", "V_dot")


@dataclass(frozen=True)
class InputChange:
    path: str
    old: str | None          # as entered; None when the key is not in the old revision
    new: str | None
    line: int                # line in the new file (0 when removed)


@dataclass(frozen=True)
class ResultChange:
    key: str
    unit: str
    old: float | str | None
    new: float | str | None
    change: float | None     # new − old (SI), None for text or where one side is missing
    percent: float | None    # change in percent of |old|; None where old is 0 or missing
    difference: bool = False  # old and new are themselves differences (a margin of temperature)


@dataclass(frozen=True)
class Diff:
    old_label: str           # e.g. "DEMO-210-C-004 rev A"
    old_revision: str
    new_label: str
    inputs: tuple[InputChange, ...]
    moved: tuple[ResultChange, ...]
    unchanged: int           # results compared and found equal


def result_values(res: Results) -> dict[str, tuple[float | str | None, str]]:
    """The results to compare, from the results-file contract: key → (value, unit)."""
    d = to_json(res)
    out: dict[str, tuple[float | str | None, str]] = {}
    if d.get("mass"):
        out["mass m"] = (d["mass"]["value"], d["mass"]["unit"])
    for k, v in (d.get("flow") or {}).items():
        out[f"flow {k}"] = (v["value"], v["unit"])
    for st in d["states"]:
        for k in _STATE_KEYS:
            if k in st:
                out[f"state {st['label']} {k}"] = (st[k]["value"], st[k]["unit"])
        out[f"state {st['label']} phase"] = (st["phase"], "")
    for leg in d["legs"]:
        for k, v in leg.items():
            if isinstance(v, dict) and "value" in v:
                out[f"leg '{leg['name']}' {k}"] = (v["value"], v["unit"])
    for c in d["checks"]:
        base = f"check '{c['name']}' {c['type']} at {c['at']}"
        out[f"{base} value"] = (c["value"]["value"], c["value"]["unit"])
        out[f"{base} margin"] = (c["margin"]["value"], c["margin"]["unit"])
        out[f"{base} status"] = (c["status"], "")
    return out


def compare(old_job: Job, new_job: Job, old_res: Results, new_res: Results) -> Diff:
    """What changed from the old revision to the new one."""
    a = {p: (v, ln) for p, v, ln in old_job.leaves}
    b = {p: (v, ln) for p, v, ln in new_job.leaves}
    inputs = []
    for path in list(b) + [p for p in a if p not in b]:
        old, new = a.get(path, (None, 0))[0], b.get(path, (None, 0))
        if old != new[0]:
            inputs.append(InputChange(path, old, new[0], new[1]))
    ra, rb = result_values(old_res), result_values(new_res)
    moved, unchanged = [], 0
    scale: dict[str, float] = {}
    for x, unit in list(ra.values()) + list(rb.values()):
        if isinstance(x, (int, float)):
            scale[unit] = max(scale.get(unit, 0.0), abs(x))
    for key in list(rb) + [k for k in ra if k not in rb]:
        (x, unit_a), (y, unit_b) = ra.get(key, (None, "")), rb.get(key, (None, ""))
        unit = unit_b or unit_a
        diff_t = key.endswith(" margin") and unit == "K"   # a margin of temperature is a difference
        if isinstance(x, (int, float)) and isinstance(y, (int, float)):
            d = y - x
            if abs(d) <= REL_EQUAL * scale.get(unit, max(abs(x), abs(y))):
                unchanged += 1
                continue
            pct = d / abs(x) * 100.0 if x != 0 else None
            moved.append(ResultChange(key, unit, x, y, d, pct, diff_t))
        elif x == y:
            unchanged += 1
        else:
            moved.append(ResultChange(key, unit, x, y, None, None, diff_t))

    def order(c: ResultChange) -> tuple[int, float]:
        if c.percent is not None:
            return (1, -abs(c.percent))
        return (0, 0.0)       # text changes, new, removed and from-zero changes first

    moved.sort(key=order)
    t_old, t_new = old_job.calc, new_job.calc
    return Diff(f"{t_old.number} rev {t_old.revision}", t_old.revision, f"{t_new.number} rev {t_new.revision}",
                tuple(inputs), tuple(moved), unchanged)


def diff_json(diff: Diff) -> dict[str, Any]:
    """The comparison as data (results JSON ``changes_since``; the report's section reads it)."""
    def num(x: Any) -> Any:
        return None if isinstance(x, float) and not math.isfinite(x) else x

    return {
        "revision": diff.old_revision,
        "from": diff.old_label,
        "to": diff.new_label,
        "inputs": [{"path": c.path, "old": c.old, "new": c.new, "line": c.line} for c in diff.inputs],
        "results": [{"key": c.key, "unit": c.unit, "old": num(c.old), "new": num(c.new), "change": num(c.change),
                     "percent": num(c.percent), "difference": c.difference} for c in diff.moved],
        "unchanged": diff.unchanged,
    }


def with_changes(results: Results, old_job: Job, old_results: Results) -> Results:
    """The new results carrying the comparison with an older revision (for the report section)."""
    d = compare(old_job, results.job, old_results, results)
    return dataclasses.replace(results, extra={**results.extra, "changes_since": diff_json(d)})
