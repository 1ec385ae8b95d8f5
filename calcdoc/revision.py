"""Comparing two revisions of a job: the inputs that changed and the results and checks that moved.

Inputs are compared as entered (the job file's values, keyed by path with list items named by their
``name`` or ``revision`` where they have one, so that inserting a leg does not renumber the rest).
Results are compared through the results file's contract (states by label, legs by name, checks by
name, bound and place), largest relative change first; unchanged values are counted, not listed.
"""
from __future__ import annotations

import dataclasses
import datetime as _dt
import math
import subprocess
from dataclasses import dataclass
from pathlib import Path

from ._yaml import Node
from .errors import JobError, Problem
from .jobfile import Job

__all__ = ["Diff", "InputChange", "ResultChange", "compare", "diff_json", "diff_text", "load_revision",
           "with_changes"]

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


def _scalar(node: Node) -> str:
    v = node.value
    if isinstance(v, (_dt.date, _dt.datetime)):
        return v.isoformat()
    if v is None:
        return "null"
    if isinstance(v, bool):
        return str(v).lower()
    return str(v)


def input_leaves(job: Job) -> dict[str, tuple[str, int]]:
    """Every scalar of the job file: path → (value as entered, line)."""
    out: dict[str, tuple[str, int]] = {}

    def walk(node: Node, path: str) -> None:
        if node.kind == "map":
            for k, child in node.value.items():
                walk(child, f"{path}.{k}" if path else k)
        elif node.kind == "seq":
            seen: set[str] = set()
            for i, child in enumerate(node.value):
                tag = str(i)
                if child.kind == "map":
                    for key in ("name", "revision"):
                        if key in child.value and child.value[key].kind == "scalar":
                            tag = _scalar(child.value[key])
                            break
                if tag in seen:
                    tag = str(i)
                seen.add(tag)
                walk(child, f"{path}[{tag}]")
            if not node.value:
                out[path] = ("[]", node.line)
        else:
            out[path] = (_scalar(node), node.where[0])

    if job.tree is not None:
        walk(job.tree, "")
    return out


def result_values(res) -> dict[str, tuple[float | str | None, str]]:
    """The results to compare, from the results-file contract: key → (value, unit)."""
    from .results import to_json

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


def compare(old_job: Job, new_job: Job, old_res, new_res) -> Diff:
    """What changed from the old revision to the new one."""
    a, b = input_leaves(old_job), input_leaves(new_job)
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

    def order(c: ResultChange):
        if c.percent is not None:
            return (1, -abs(c.percent))
        return (0, 0.0)       # text changes, new, removed and from-zero changes first

    moved.sort(key=order)
    t_old, t_new = old_job.calc, new_job.calc
    return Diff(f"{t_old.number} rev {t_old.revision}", t_old.revision, f"{t_new.number} rev {t_new.revision}",
                tuple(inputs), tuple(moved), unchanged)


def _show(value, unit: str, system: str, difference: bool = False) -> str:
    from . import units

    if value is None:
        return "—"
    if isinstance(value, str):
        return value
    if not unit:
        return f"{value:.6g}"
    v, u = units.display(value, unit, system, difference=difference)
    return f"{v:.6g} {u}".strip()


def diff_text(diff: Diff, system: str = "SI") -> str:
    """The comparison for a terminal."""
    lines = [f"Changes from {diff.old_label} to {diff.new_label}", ""]
    lines.append(f"Inputs changed ({len(diff.inputs)}):" if diff.inputs else "Inputs: none changed.")
    for c in diff.inputs:
        lines.append(f"  {c.path}: {c.old if c.old is not None else '(not given)'} → "
                     f"{c.new if c.new is not None else '(removed)'}")
    lines.append("")
    lines.append(f"Results and checks that moved ({len(diff.moved)}), largest relative change first:"
                 if diff.moved else "Results and checks: none moved.")
    for c in diff.moved:
        change = ""
        if c.change is not None:
            change = f"   change {_show(c.change, c.unit, system, difference=True)}"
            change += f" ({c.percent:+.3g} %)" if c.percent is not None else ""
        lines.append(f"  {c.key}: {_show(c.old, c.unit, system, c.difference)} → "
                     f"{_show(c.new, c.unit, system, c.difference)}{change}")
    lines.append(f"  {diff.unchanged} result{'s' if diff.unchanged != 1 else ''} unchanged.")
    return "\n".join(lines) + "\n"


def diff_json(diff: Diff) -> dict:
    """The comparison as data (results JSON ``changes_since``; the report's section reads it)."""
    def num(x):
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


def with_changes(results, old_job: Job, old_results):
    """The new results carrying the comparison with an older revision (for the report section)."""
    d = compare(old_job, results.job, old_results, results)
    return dataclasses.replace(results, extra={**results.extra, "changes_since": diff_json(d)})


def load_revision(path: str | Path, rev: str) -> Job:
    """A job file as it stood at a git revision (``git show REV:./file`` in the file's folder)."""
    from .jobfile import loads

    p = Path(path)
    name = f"{path}@{rev}"
    if rev.startswith("-") or any(ch in rev for ch in "\n\r\0"):
        raise JobError([Problem(name, 0, 0, "", f"'{rev}' is not a git revision", "give a revision such as HEAD~1 or a tag")])
    try:
        proc = subprocess.run(["git", "show", f"{rev}:./{p.name}"], cwd=str(p.parent.resolve()),
                              capture_output=True, timeout=60)
    except FileNotFoundError:
        raise JobError([Problem(name, 0, 0, "", "git is not installed", "install git or compare two files")]) from None
    if proc.returncode != 0:
        msg = proc.stderr.decode("utf-8", "replace").strip().splitlines()
        raise JobError([Problem(name, 0, 0, "", f"git cannot show the file at {rev}: {msg[-1] if msg else 'unknown error'}",
                                "give a revision in which the file exists (git log -- FILE lists them)")])
    return loads(proc.stdout, name)
