"""The job's display units (``units:``): a base system, and the job's own unit for any quantity kind.

    units: SI                      # or US
    units: {system: SI, pressure: barg, temperature: degC, volume: L, power: kW, volume_flow: L/s}

Read into a :class:`calcdoc.units.DisplayUnits` kept on the Job; every table, chart, terminal line and
message shows values through it. The results file stays SI. A gauge unit (barg, psig) needs the site
atmosphere.
"""
from __future__ import annotations

from .. import units
from ..units import DisplayUnits, UnitParseError
from .reader import Reader
from .source import Node

__all__ = ["UNIT_KEYS", "base_system", "read_units"]

#: Keys of a ``units:`` mapping: the base system, then any quantity kind.
UNIT_KEYS = ("system",) + tuple(units.DISPLAY_KINDS)


def base_system(node: Node | None) -> str:
    """The base system a ``units:`` value names ("SI" unless it says US), read without checking it."""
    if node is not None and node.kind == "map":
        node = node.value.get("system")
    val = node.value if node is not None and node.kind == "scalar" else None
    return "US" if isinstance(val, str) and val.strip().casefold() == "us" else "SI"


def read_units(r: Reader, node: Node | None, P_atm: float | None) -> DisplayUnits | None:
    """The display units a job asks for (problems go to the reader; None when they are bad)."""
    if node is None:
        return DisplayUnits("SI")
    if node.kind != "map":
        system = r.enum(node, ("SI", "US"))
        return DisplayUnits(system) if system else None
    m = r.mapping(node, UNIT_KEYS, what="the units")
    before = len(r.problems)
    system = r.enum(m.get("system"), ("SI", "US"), default="SI")
    own: list[tuple[str, str, str]] = []
    spelled: list[tuple[str, str]] = []
    gauge = False
    for kind in units.DISPLAY_KINDS:
        if kind not in m:
            continue
        child = m[kind]
        text = child.value if child.kind == "scalar" and isinstance(child.value, str) else None
        if not text or not text.strip():
            r.add(child, f"expected a unit name, found {child.value!r}", f"write for example {kind}: "
                  f"{_EXAMPLE.get(kind, 'kW')}")
            continue
        try:
            unit, is_gauge = units.display_unit_of(text, kind)
        except UnitParseError as exc:
            r.add(child, exc.found, exc.valid)
            continue
        if is_gauge and P_atm is None:
            r.add(child, f"'{text}' shows pressures as gauge, but the job gives no site atmosphere",
                  "add site: {atmosphere: 101.325 kPa} or site: {elevation: 450 m}, or show absolute "
                  f"pressures ({text.rstrip('g')}a)")
            continue
        gauge = gauge or is_gauge
        own.append((units.DISPLAY_KINDS[kind], unit, units.typeset_unit(text) if kind != "pressure" else text))
        spelled.append((kind, text.strip()))
    if len(r.problems) > before or system is None:
        return None
    return DisplayUnits(system, tuple(own), gauge, P_atm if gauge else None, tuple(spelled))


_EXAMPLE = {"pressure": "barg", "temperature": "degC", "volume": "L", "power": "kW", "volume_flow": "L/s"}
