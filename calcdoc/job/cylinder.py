"""The ``cylinder:`` block of a reciprocating compressor leg, read with file:line messages for every problem:
sizes with their units, the speed, clearance and loss as percentages of the swept volume, and the geometry
checks that need no computing (a rod at least as thick as the bore, a clearance of 100 % or more).
"""
from __future__ import annotations

import math
import re

from .model import Cylinder, Input
from .reader import Reader, describe
from .source import Node

__all__ = ["CYLINDER_KEYS", "MACHINE_KINDS", "read_cylinder", "read_speed"]

MACHINE_KINDS = ("reciprocating",)
CYLINDER_KEYS = ("bore", "stroke", "rod", "speed", "clearance", "action", "re_expansion_exponent",
                 "volumetric_loss", "cylinders")
_REQUIRED = ("bore", "stroke", "speed", "clearance", "action")
_HINTS = {"bore": "add bore: 200 mm (the cylinder's inside diameter)", "stroke": "add stroke: 120 mm",
          "speed": "add speed: 500 rpm", "clearance": "add clearance: 15 % (of the swept volume)",
          "action": "add action: double (both ends compress) or action: single (head end only)"}

#: Speed units: the factor to revolutions per second.
_SPEED_UNITS = {"rpm": 1 / 60, "rev/min": 1 / 60, "r/min": 1 / 60, "1/min": 1 / 60, "min-1": 1 / 60,
                "rev/s": 1.0, "r/s": 1.0, "rps": 1.0, "Hz": 1.0, "1/s": 1.0}
_NUMBER = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")


def read_speed(r: Reader, node: Node) -> Input | None:
    """A rotational speed ('500 rpm', '8.33 rev/s', '25 Hz') in revolutions per second, above zero."""
    m = _NUMBER.match(str(node.value)) if node.kind == "scalar" and not isinstance(node.value, bool) else None
    unit = m.group("unit") if m else ""
    if m is None or unit not in _SPEED_UNITS:
        r.add(node, f"expected a speed with its unit, found {describe(node)}",
              "write for example speed: 500 rpm (or rev/min, rev/s, Hz)")
        return None
    rps = float(m.group("num")) * _SPEED_UNITS[unit]
    if not (math.isfinite(rps) and rps > 0):
        r.add(node, f"a speed of {str(node.value).strip()} does not turn the machine",
              "give a speed above zero, for example 500 rpm")
        return None
    inp = Input(rps, "1/s", str(node.value).strip(), node.path, *node.where, kind="rotational_speed")
    r.inputs.append(inp)
    return inp


def _share(r: Reader, node: Node, what: str, allow_zero: bool) -> Input | None:
    """A share of the swept volume: a percentage ('15 %') or a fraction (0.15), from 0 up to below 100 %."""
    text = str(node.value).strip() if node.kind == "scalar" else ""
    m = re.fullmatch(r"([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)", text)
    if m is None or isinstance(node.value, bool):
        r.add(node, f"expected the {what} as a percentage of the swept volume, found {describe(node)}",
              f"write for example {what.replace(' ', '_')}: 15 %")
        return None
    x = float(m.group(1)) / (100.0 if m.group(2) else 1.0)
    if not math.isfinite(x) or x < 0 or (x == 0 and not allow_zero) or x >= 1.0:
        r.add(node, f"a {what} of {text} is not possible",
              f"give a {what} from 0 up to below 100 % of the swept volume (typically 5 to 30 %)")
        return None
    inp = Input(x, "", text, node.path, *node.where, percent=bool(m.group(2)))
    r.inputs.append(inp)
    return inp


def read_cylinder(r: Reader, node: Node) -> Cylinder | None:
    """The cylinder of a reciprocating stage; problems go to the reader (None when any)."""
    before = len(r.problems)
    m = r.mapping(node, CYLINDER_KEYS, what="the cylinder")
    if node.kind == "map":
        for key in _REQUIRED:
            if key not in m:
                r.add(node, f"the cylinder has no {key}", _HINTS[key], path=f"{node.path}.{key}")
    sizes = {k: r.quantity(m[k], "length") for k in ("bore", "stroke", "rod") if k in m}
    speed = read_speed(r, m["speed"]) if "speed" in m else None
    clearance = _share(r, m["clearance"], "clearance", True) if "clearance" in m else None
    loss = _share(r, m["volumetric_loss"], "volumetric loss", True) if "volumetric_loss" in m else None
    action = r.enum(m.get("action"), ("double", "single")) if "action" in m else None
    n_e = None
    if "re_expansion_exponent" in m:
        x = r.number(m["re_expansion_exponent"], 1.0, 2.0, what="a re-expansion exponent")
        if x is not None:
            k = m["re_expansion_exponent"]
            n_e = Input(x, "", str(k.value), k.path, *k.where)
            r.inputs.append(n_e)
    count = r.integer(m["cylinders"], 1, 12, "the number of identical cylinders") if "cylinders" in m else 1
    bore, rod = sizes.get("bore"), sizes.get("rod")
    if action == "double" and "rod" not in m:
        r.add(node, "a double-acting cylinder needs its piston-rod diameter",
              "add rod: 40 mm (the crank end loses the rod's cross-section)", path=f"{node.path}.rod")
    if bore is not None and rod is not None and rod.si >= bore.si:
        r.add(m["rod"], f"the rod ({rod.entered}) is not thinner than the bore ({bore.entered})",
              "the piston-rod diameter must be smaller than the bore")
    if len(r.problems) > before or bore is None or speed is None or clearance is None or action is None \
            or "stroke" not in sizes or sizes["stroke"] is None or count is None:
        return None
    return Cylinder(bore, sizes["stroke"], rod, speed, clearance, action == "double", n_e, loss, count, node.path)
