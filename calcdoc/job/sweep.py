"""Sweeps as the job file gives them: one input varied over a list or a range, with the results to follow.

```yaml
sweep:
  input: start.temperature              # or legs[Stage 1].end.pressure, legs[0].n, gas.k, ...
  values: [10 degC, 20 degC, 30 degC]   # or range: {from: 10 degC, to: 40 degC, steps: 7}
  follow:
    - {quantity: temperature, at: Compression stroke}
    - W_by_gas                          # a quantity name alone: every place it exists
```

Read into a :class:`SweepSpec`: the value's place in the job text and the text of each point, so that each
point is the job file with that one value written in its place (:func:`calcdoc.job.vary.point_jobs`).
"""
from __future__ import annotations

import json
import re

from .limits import Places, names_of
from .model import FollowSpec, Input, SweepSpec
from .quantities import quantity_named, quantity_problem
from .reader import Reader
from .source import Node

__all__ = ["FOLLOW_KEYS", "MAX_POINTS", "RANGE_KEYS", "SWEEP_KEYS", "read_sweep", "resolve_path"]

SWEEP_KEYS = ("input", "values", "range", "follow")
RANGE_KEYS = ("from", "to", "steps")
FOLLOW_KEYS = ("quantity", "at")
#: The most points a sweep may have: what fits in memory, not a cap on the engineer. A point's series
#: values, check margins and input text take about 3 KB (measured with two followed results and one
#: check: 3.1 MB for 1000 points), so 100 000 points need ~300 MB on top of the program's ~120 MB.
MAX_POINTS = 100_000
_NOT_VARIED = ("calcdoc", "calc", "units", "system", "limits", "assumptions", "sweep", "solve")
_SEG = re.compile(r"^(?P<key>[A-Za-z_][A-Za-z0-9_]*)(?:\[(?P<item>[^\]]+)\])?$")
_NUM = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")


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


def resolve_path(tree: Node, text: str, inputs: list[Input]) -> tuple[Node | None, str]:
    """The value node a path into the job names (``start.temperature``, ``legs[Stage 1].end.pressure``,
    ``legs[0].n``), or why it names no input that can be varied."""
    segs = _split_path(text)
    if not segs:
        return None, "write a path of keys, for example start.temperature or legs[Stage 1].end.pressure"
    node = tree
    first = segs[0][0]
    for key, item in segs:
        if node.kind != "map" or key not in node.value:
            return None, f"the job gives no '{key}' at {node.path or 'the top level'}"
        node = node.value[key]
        if item is not None:
            if node.kind != "seq":
                return None, f"{node.path} is not a list"
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
                return None, f"{node.path} has no item '{item}'" + (f"; names: {', '.join(names)}" if names else "")
            node = node.value[idx]
    if node.kind != "scalar":
        return None, f"{node.path} is not a single value"
    if first in _NOT_VARIED:
        return None, f"'{first}' is not an input a sweep can vary"
    if not any(inp.path == node.path for inp in inputs):
        return None, f"{node.path} is not a quantity of the job"
    return node, ""


def scalar_text(node: Node) -> str:
    """A scalar written back as YAML text."""
    v = node.value
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return repr(v)
    return json.dumps(str(v), ensure_ascii=False)


def _block_span(tree: Node, key: str) -> tuple[int, int] | None:
    """Offsets of a whole top-level block (key and value), where the top level is written in block style
    (cutting it then leaves valid YAML)."""
    node = tree.value.get(key)
    if node is None or tree.flow or node.key_start < 0:
        return None
    return (node.key_start, node.span[1])


def read_sweep(r: Reader, tree: Node, system: str, places: Places, inputs: list[Input]) -> SweepSpec | None:
    """The job's sweep, validated (problems go to the reader); None when the job has none."""
    node = tree.value.get("sweep")
    if node is None:
        return None
    m = r.mapping(node, SWEEP_KEYS, what="the sweep")
    if not m:
        return None
    for key, hint in (("input", "for example input: start.temperature"),
                      ("follow", "for example follow: [{quantity: temperature, at: Compression stroke}]")):
        if key not in m:
            r.add(node, f"missing required key '{key}'", hint, path=f"{node.path}.{key}")
    if ("values" in m) == ("range" in m):
        r.add(node, "give either values or range" if "values" in m else "the sweep gives no values",
              "give values: [a list] or range: {from: ..., to: ..., steps: N}")
    target = None
    if "input" in m:
        path_text = r.text(m["input"], required=True, what="input path")
        if path_text:
            target, why = resolve_path(tree, path_text, inputs)
            if why:
                r.add(m["input"], f"cannot vary '{m['input'].value}': {why}",
                      "name a quantity the job gives, for example start.temperature or legs[Stage 1].end.pressure")
    points: list[str] = []
    entered: list[str] = []
    sources: list[tuple[str, int, int]] = []
    if "values" in m:
        v = m["values"]
        items = v.value if v.kind == "seq" else []
        if v.kind != "seq" or not items:
            r.add(v, "expected a list of values", "write values: [10 degC, 20 degC, 30 degC]")
        for it in items:
            if it.kind != "scalar" or it.value is None or isinstance(it.value, bool):
                r.add(it, "expected a value", "write a number or a quantity with its unit")
                continue
            points.append(scalar_text(it))
            entered.append(str(it.value))
            sources.append((it.path, *it.where))
    if "range" in m:
        rn = m["range"]
        rm = r.mapping(rn, RANGE_KEYS, what="the sweep range")
        missing = [k for k in RANGE_KEYS if k not in rm]
        if missing and rn.kind == "map":
            r.add(rn, f"the range lacks {', '.join(missing)}", "write range: {from: 10 degC, to: 40 degC, steps: 7}")
        if not missing:
            steps = r.integer(rm["steps"], 2, MAX_POINTS, "steps (the number of points)")
            a, b = (_NUM.match(str(rm[k].value)) if rm[k].kind == "scalar" else None for k in ("from", "to"))
            if not a or not b:
                r.add(rn, "from and to must be numbers, each with the same unit",
                      "write range: {from: 10 degC, to: 40 degC, steps: 7}")
            elif a.group("unit") != b.group("unit"):
                r.add(rn, f"from is in '{a.group('unit')}' but to is in '{b.group('unit')}'",
                      "write from and to in the same unit")
            elif steps is not None:
                x0, x1, unit = float(a.group("num")), float(b.group("num")), a.group("unit")
                plain = isinstance(rm["from"].value, (int, float)) and not unit
                for k in range(steps):
                    x = x0 + (x1 - x0) * k / (steps - 1)
                    t = f"{x:.12g}" + (f" {unit}" if unit else "")
                    points.append(t if plain else json.dumps(t))
                    entered.append(t)
                    sources.append((rn.path, *rn.where))
    if len(points) > MAX_POINTS:
        r.add(node, f"the sweep has {len(points)} points",
              f"give at most {MAX_POINTS} (the results of more would not fit in memory)")
    follow = []
    items = m["follow"].value if "follow" in m and m["follow"].kind == "seq" else []
    if "follow" in m and not items:
        r.add(m["follow"], "expected a list of results to follow", "write follow: [{quantity: temperature, at: Stage 1}]")
    for it in items:
        if it.kind == "scalar":
            qname, at = r.text(it, required=True, what="quantity name"), []
            where, path = it.where, it.path
        else:
            fm = r.mapping(it, FOLLOW_KEYS, what="a followed result")
            if "quantity" not in fm:
                r.add(it, "missing required key 'quantity'", "for example quantity: temperature")
                continue
            qname, at = r.text(fm["quantity"], required=True, what="quantity name"), names_of(fm.get("at"), r.add)
            where, path = (fm["at"].where, fm["at"].path) if "at" in fm else (it.where, it.path)
        q = quantity_named(qname) if qname else None
        bad = quantity_problem(q, qname, system) if qname else None
        if bad:
            r.add(it if it.kind == "scalar" else it.value["quantity"], *bad)
            continue
        if q is not None:
            places.check(q, at, r.add)
            follow.append(FollowSpec(q, tuple(n for n, _ in at), where, path))
    if target is None:
        return None
    return SweepSpec(str(m["input"].value), target.path, tuple(points), tuple(entered), tuple(sources),
                     tuple(follow), target.span, _block_span(tree, "sweep"))
