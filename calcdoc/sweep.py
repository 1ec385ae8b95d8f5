"""Sweeps: one input of the job varied over a list or a range, with the results to follow.

```yaml
sweep:
  input: start.temperature              # or legs[Stage 1].end.pressure, legs[0].n, gas.k, ...
  values: [10 degC, 20 degC, 30 degC]   # or range: {from: 10 degC, to: 40 degC, steps: 7}
  follow:
    - {quantity: temperature, at: Compression stroke}
    - W_by_gas                          # a quantity name alone: every place it exists
```

Each point is the job file with that one value written in its place, validated and computed exactly
as a separate run would be (so a point equals a separate run at the same inputs); the real-gas
object is shared between points (:func:`calcdoc.engine.shared_real_gas`). The series go into the
results JSON under ``sweep``, with the margin and status of every design check at each point.
"""
from __future__ import annotations

import dataclasses
import json
import math
import re

from ._yaml import Node
from .errors import JobError, PhysicsError, Problem
from .jobfile import Job

__all__ = ["SWEEP_KEYS", "FOLLOW_KEYS", "RANGE_KEYS", "MAX_POINTS", "point_jobs", "sweep_problems", "with_sweep"]

SWEEP_KEYS = ("input", "values", "range", "follow")
RANGE_KEYS = ("from", "to", "steps")
FOLLOW_KEYS = ("quantity", "at")
MAX_POINTS = 200
_NOT_SWEPT = ("calcdoc", "calc", "units", "system", "limits", "assumptions", "sweep")
_SEG = re.compile(r"^(?P<key>[A-Za-z_][A-Za-z0-9_]*)(?:\[(?P<item>[^\]]+)\])?$")
_NUM = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")


@dataclasses.dataclass(frozen=True)
class _Plan:
    input: str                          # the path as written
    node: Node                          # the value being varied
    points: tuple[tuple[str, Node], ...]   # (YAML text to write in its place, node the point came from)
    entered: tuple[str, ...]            # each point as entered
    follow: tuple[tuple, ...]           # (Quantity, at names, where, path)
    span: tuple[int, int]               # character span of the value in the job text
    cut: tuple[int, int] | None         # span of the whole sweep block (left out of each point's job)


def _split_path(text: str) -> list[tuple[str, str | None]] | None:
    parts, buf, depth = [], "", 0
    for ch in text:
        if ch == "[":
            depth += 1
        elif ch == "]":
            depth -= 1
        if ch == "." and depth == 0:
            parts.append(buf)
            buf = ""
        else:
            buf += ch
    parts.append(buf)
    out = []
    for p in parts:
        m = _SEG.match(p.strip())
        if not m:
            return None
        out.append((m.group("key"), m.group("item")))
    return out


def _resolve(job: Job, text: str) -> tuple[Node | None, list, str]:
    """The value node a sweep path names, the route to it (keys and indexes), or why not."""
    segs = _split_path(text)
    if not segs:
        return None, [], "write a path of keys, for example start.temperature or legs[Stage 1].end.pressure"
    node, route = job.tree, []
    for key, item in segs:
        if node.kind != "map" or key not in node.value:
            return None, [], f"the job gives no '{key}' at {node.path or 'the top level'}"
        node = node.value[key]
        route.append(key)
        if item is not None:
            if node.kind != "seq":
                return None, [], f"{node.path} is not a list"
            idx = None
            if item.strip().isdigit():
                idx = int(item)
            else:
                for k, child in enumerate(node.value):
                    nm = child.value.get("name") if child.kind == "map" else None
                    if nm is not None and str(nm.value) == item:
                        idx = k
                        break
            if idx is None or idx >= len(node.value):
                names = [str(c.value["name"].value) for c in node.value if c.kind == "map" and "name" in c.value]
                return None, [], f"{node.path} has no item '{item}'" + (f"; names: {', '.join(names)}" if names else "")
            node = node.value[idx]
            route.append(idx)
    if node.kind != "scalar":
        return None, [], f"{node.path} is not a single value"
    if route[0] in _NOT_SWEPT:
        return None, [], f"'{route[0]}' is not an input a sweep can vary"
    inputs = list(job.inputs)
    if job.system == "flow":
        from ._flowjob import option_inputs

        inputs += option_inputs(job)          # efficiencies, pressure drops, staging
    if not any(inp.path == node.path for inp in inputs):
        return None, [], f"{node.path} is not a quantity of the job"
    return node, route, ""


def _spans(text: str, route: list) -> tuple[tuple[int, int], tuple[int, int] | None]:
    """Offsets in the job text of the value at ``route`` and of the whole sweep block (PyYAML marks).

    Each point's job leaves the sweep block out (it would only be validated again); that is done
    only where the top level is written in block style, where cutting the block leaves valid YAML.
    """
    import yaml

    root = yaml.compose(text, Loader=yaml.SafeLoader)
    n = root
    for step in route:
        if isinstance(step, int):
            n = n.value[step]
        else:
            n = next(v for k, v in n.value if k.value == step)
    cut = None
    if not root.flow_style:
        for k, v in root.value:
            if k.value == "sweep":
                cut = (k.start_mark.index, v.end_mark.index)
    return (n.start_mark.index, n.end_mark.index), cut


def _scalar_text(node: Node) -> str:
    v = node.value
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return repr(v)
    return json.dumps(str(v), ensure_ascii=False)


def _plan(job: Job) -> tuple[_Plan | None, list[Problem]]:
    from .checks import Places, _Reader, names_of, quantity_named, quantity_problem

    node = job.tree.value.get("sweep") if job.tree is not None else None
    if node is None:
        return None, []
    r = _Reader(job)
    m = r.mapping(node, SWEEP_KEYS, "the sweep")
    if not m:
        return None, r.problems
    for key, hint in (("input", "for example input: start.temperature"),
                      ("follow", "for example follow: [{quantity: temperature, at: Compression stroke}]")):
        if key not in m:
            r.add(node, f"missing required key '{key}'", hint, path=f"{node.path}.{key}")
    if ("values" in m) == ("range" in m):
        r.add(node, "give either values or range" if "values" in m else "the sweep gives no values",
              "give values: [a list] or range: {from: ..., to: ..., steps: N}")
    target, route = None, []
    if "input" in m:
        target, route, why = _resolve(job, r.text(m["input"])) if r.text(m["input"]) else (None, [], "")
        if why:
            r.add(m["input"], f"cannot vary '{m['input'].value}': {why}",
                  "name a quantity the job gives, for example start.temperature or legs[Stage 1].end.pressure")
    points: list[tuple[str, Node]] = []
    entered: list[str] = []
    if "values" in m:
        v = m["values"]
        items = v.value if v.kind == "seq" else []
        if v.kind != "seq" or not items:
            r.add(v, "expected a list of values", "write values: [10 degC, 20 degC, 30 degC]")
        for it in items:
            if it.kind != "scalar" or it.value is None or isinstance(it.value, bool):
                r.add(it, "expected a value", "write a number or a quantity with its unit")
                continue
            points.append((_scalar_text(it), it))
            entered.append(str(it.value))
    if "range" in m:
        rm = r.mapping(m["range"], RANGE_KEYS, "the sweep range")
        missing = [k for k in RANGE_KEYS if k not in rm]
        if missing and m["range"].kind == "map":
            r.add(m["range"], f"the range lacks {', '.join(missing)}", "write range: {from: 10 degC, to: 40 degC, steps: 7}")
        if not missing:
            steps = rm["steps"].value
            if not isinstance(steps, int) or isinstance(steps, bool) or not 2 <= steps <= MAX_POINTS:
                r.add(rm["steps"], f"steps of {steps!r}", f"give the number of points, a whole number from 2 to {MAX_POINTS}")
            a, b = (_NUM.match(str(rm[k].value)) if rm[k].kind == "scalar" else None for k in ("from", "to"))
            if not a or not b:
                r.add(m["range"], "from and to must be numbers, each with the same unit",
                      "write range: {from: 10 degC, to: 40 degC, steps: 7}")
            elif a.group("unit") != b.group("unit"):
                r.add(m["range"], f"from is in '{a.group('unit')}' but to is in '{b.group('unit')}'",
                      "write from and to in the same unit")
            elif isinstance(steps, int) and not isinstance(steps, bool) and 2 <= steps <= MAX_POINTS:
                x0, x1, unit = float(a.group("num")), float(b.group("num")), a.group("unit")
                plain = rm["from"].kind == "scalar" and isinstance(rm["from"].value, (int, float)) and not unit
                for k in range(steps):
                    x = x0 + (x1 - x0) * k / (steps - 1)
                    t = f"{x:.12g}" + (f" {unit}" if unit else "")
                    points.append((t if plain else json.dumps(t), m["range"]))
                    entered.append(t)
    if len(points) > MAX_POINTS:
        r.add(node, f"the sweep has {len(points)} points", f"give at most {MAX_POINTS}")
    follow = []
    places = Places(job)
    items = m["follow"].value if "follow" in m and m["follow"].kind == "seq" else []
    if "follow" in m and not items:
        r.add(m["follow"], "expected a list of results to follow", "write follow: [{quantity: temperature, at: Stage 1}]")
    for it in items:
        if it.kind == "scalar":
            qname, at = r.text(it), []
            where, path = it.where, it.path
        else:
            fm = r.mapping(it, FOLLOW_KEYS, "a followed result")
            if "quantity" not in fm:
                r.add(it, "missing required key 'quantity'", "for example quantity: temperature")
                continue
            qname, at = r.text(fm["quantity"]), names_of(fm.get("at"), r.add)
            where, path = (fm["at"].where, fm["at"].path) if "at" in fm else (it.where, it.path)
        q = quantity_named(qname) if qname else None
        why = quantity_problem(q, qname, job.system) if qname else None
        if why:
            r.add(it if it.kind == "scalar" else it.value["quantity"], *why)
            continue
        if q is not None:
            places.check(q, at, r.add)
            follow.append((q, tuple(n for n, _ in at), where, path))
    if r.problems or target is None:
        return None, r.problems
    span, cut = _spans(job.text, route)
    return _Plan(str(m["input"].value), target, tuple(points), tuple(entered), tuple(follow), span, cut), []


def sweep_problems(job: Job) -> list[Problem]:
    return _plan(job)[1]


def point_jobs(job: Job, plan: _Plan | None = None):
    """Each sweep point as its own validated job: yields (entered text, source node, index, Job)."""
    from .jobfile import loads

    if plan is None:
        plan, problems = _plan(job)
        if problems:
            raise JobError(problems)
        if plan is None:
            return
    text = job.text
    a, b = plan.span
    for k, ((yaml_text, src), entered) in enumerate(zip(plan.points, plan.entered)):
        pieces = sorted([(a, b, yaml_text)] + ([(*plan.cut, "")] if plan.cut else []), reverse=True)
        point = text
        for x, y, new in pieces:
            point = point[:x] + new + point[y:]
        data = point.encode("utf-8")
        try:
            pj = loads(data, job.name)
        except JobError as exc:
            raise JobError([_at_point(job, src, k, entered, p.found, p.valid) for p in exc.problems]) from None
        yield entered, src, k, pj


def _at_point(job: Job, src: Node, k: int, entered: str, found: str, valid: str) -> Problem:
    line, col = src.where
    return Problem(job.name, line, col, src.path, f"sweep point {k + 1} ({entered}): {found}", valid)


def with_sweep(job: Job, results):
    """The results with the sweep series (``results.extra['sweep']``), when the job has a sweep."""
    if job.tree is None or "sweep" not in job.tree.value:
        return results
    from .checks import evaluate, locations
    from .engine import compute
    from .results import q as qjson

    plan, problems = _plan(job)
    if problems:
        raise JobError(problems)
    points, series, checks = [], {}, {}
    for entered, src, k, pj in point_jobs(job, plan):
        try:
            res = compute(pj)
            chk = evaluate(pj, res)
        except (JobError, PhysicsError) as exc:
            msg = "; ".join(p.found for p in exc.problems) if isinstance(exc, JobError) else str(exc)
            raise JobError([_at_point(job, src, k, entered, msg,
                                      "narrow the sweep to values this job can be computed at")]) from None
        inp = next((i for i in res.job.inputs if i.path == plan.node.path), None) or \
            next(i for i in pj.inputs if i.path == plan.node.path)
        points.append({"entered": entered, "value": qjson(inp.si, inp.unit)})
        for qty, at, where, path in plan.follow:
            for place, calc in locations(pj, res, qty, at, where, path):
                key = (qty.name, place)
                s = series.setdefault(key, {"name": f"{qty.title} at {place}", "quantity": qty.name, "at": place,
                                            "unit": calc.unit, "values": [None] * len(plan.points)})
                s["values"][k] = calc.value if math.isfinite(calc.value) else None
        for c in chk:
            key = (c.name, c.kind, c.where)
            s = checks.setdefault(key, {"name": c.name, "type": c.kind, "at": c.where, "unit": c.unit,
                                        "margin": [None] * len(plan.points), "status": [None] * len(plan.points)})
            s["margin"][k] = c.margin
            s["status"][k] = c.status
    sweep = {"input": plan.input, "path": plan.node.path,
             "unit": next(i.unit for i in results.job.inputs if i.path == plan.node.path),
             "points": points, "series": list(series.values()), "checks": list(checks.values())}
    return dataclasses.replace(results, extra={**results.extra, "sweep": sweep})

