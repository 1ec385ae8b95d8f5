"""Vessels as the job file gives them (``system: vessel``): the vessel, and legs that fill or empty it.

```yaml
system: vessel
vessel: {volume: 2 m3}          # wall: {mass, specific_heat, area, heat_transfer_coefficient} for heat: wall
start: {pressure: 10 bar, temperature: 20 degC}
legs:
  - name: Blowdown
    process: discharge            # or fill
    orifice: {diameter: 10 mm, discharge_coefficient: 0.85, back_pressure: 101.325 kPa}
    heat: adiabatic               # adiabatic, isothermal or wall
    end: {pressure: 2 bar}        # or duration: 15 min
```

A fill takes ``supply: {pressure, temperature}`` upstream of an orifice (no back pressure), or
``supply: {mass_flow, temperature}`` (a compressor's delivery) with no orifice.
"""
from __future__ import annotations

from .model import Input, LegSpec, VesselLegSpec, VesselSpec, WallSpec
from .reader import Reader
from .source import Node

__all__ = ["HEAT", "ORIFICE_KEYS", "SUPPLY_KEYS", "VESSEL_KEYS", "VESSEL_LEG_KEYS", "VESSEL_PROCESSES",
           "VESSEL_TARGETS", "WALL_KEYS", "read_vessel", "read_vessel_leg"]

VESSEL_PROCESSES = ("discharge", "fill")
VESSEL_TARGETS = ("pressure", "duration")
HEAT = ("adiabatic", "isothermal", "wall")
VESSEL_KEYS = ("volume", "wall")
WALL_KEYS = ("mass", "specific_heat", "area", "heat_transfer_coefficient")
ORIFICE_KEYS = ("diameter", "discharge_coefficient", "back_pressure")
SUPPLY_KEYS = ("pressure", "temperature", "mass_flow")
VESSEL_LEG_KEYS = ("name", "process", "orifice", "supply", "heat", "end", "note")
_WALL_KINDS = {"mass": "mass", "specific_heat": "specific_heat", "area": "area",
               "heat_transfer_coefficient": "heat_transfer_coefficient"}


def read_vessel(r: Reader, node: Node | None) -> VesselSpec | None:
    """The ``vessel:`` block: its volume and optional wall."""
    if node is None:
        return None
    m = r.mapping(node, VESSEL_KEYS, required=("volume",), what="the vessel")
    volume = r.quantity(m.get("volume"), "volume")
    wall = None
    if "wall" in m:
        wm = r.mapping(m["wall"], WALL_KEYS, required=WALL_KEYS, what="the vessel wall")
        vals = {k: r.quantity(wm.get(k), kind) for k, kind in _WALL_KINDS.items()}
        got = {k: v for k, v in vals.items() if v is not None}
        if len(got) == len(vals):
            wall = WallSpec(**got)
    if volume is None:
        return None
    return VesselSpec(volume, wall)


def read_vessel_leg(r: Reader, node: Node, vessel_node: Node | None) -> LegSpec | None:
    """One leg of a vessel job: process, orifice, supply, heat and end (pressure or duration); ``vessel_node``
    is the job's vessel block (a leg with ``heat: wall`` needs its wall)."""
    m = r.mapping(node, VESSEL_LEG_KEYS, required=("name", "process", "end"), what="a vessel leg")
    if not m:
        return None
    before = len(r.problems)
    name = r.text(m.get("name"), required=True, what="leg name")
    process = r.enum(m.get("process"), VESSEL_PROCESSES)
    heat = r.enum(m.get("heat"), HEAT, default="adiabatic")
    if heat == "wall" and (vessel_node is None or vessel_node.kind != "map" or "wall" not in vessel_node.value):
        r.add(m["heat"], "heat: wall needs the vessel's wall, and the vessel block gives none",
              "add vessel: {volume: ..., wall: {mass: 800 kg, specific_heat: 0.49 kJ/(kg*K), area: 9 m2, "
              "heat_transfer_coefficient: 8 W/(m2*K)}}, or choose heat: adiabatic or isothermal")
    orifice: dict[str, Input | None] = {}
    if "orifice" in m:
        om = r.mapping(m["orifice"], ORIFICE_KEYS, required=("diameter", "discharge_coefficient"),
                       what="the orifice")
        orifice["diameter"] = r.quantity(om.get("diameter"), "length")
        if "discharge_coefficient" in om:
            cd = r.number(om["discharge_coefficient"], 0.0, 1.0, lo_open=True, what="a discharge coefficient")
            if cd is not None:
                c = om["discharge_coefficient"]
                cd_input = Input(cd, "", str(c.value), c.path, *c.where)
                orifice["discharge_coefficient"] = cd_input
                r.inputs.append(cd_input)
        orifice["back_pressure"] = r.quantity(om.get("back_pressure"), "pressure")
        if process == "fill" and "back_pressure" in om:
            r.add(om["back_pressure"], "a fill has no back pressure: the vessel is downstream of the orifice",
                  "give the supply pressure and temperature upstream: supply: {pressure: 12 bar, temperature: 30 degC}")
        if process == "discharge" and "back_pressure" not in om and m["orifice"].kind == "map":
            r.add(m["orifice"], "missing required key 'back_pressure'",
                  "the pressure the vessel discharges into, for example back_pressure: 101.325 kPa",
                  path=f"{m['orifice'].path}.back_pressure")
    supply: dict[str, Input | None] = {}
    if "supply" in m:
        sm = r.mapping(m["supply"], SUPPLY_KEYS, required=("temperature",), what="the supply")
        supply = {"pressure": r.quantity(sm.get("pressure"), "pressure"),
                  "temperature": r.quantity(sm.get("temperature"), "temperature"),
                  "mass_flow": r.quantity(sm.get("mass_flow"), "mass_flow")}
        if process == "discharge":
            r.add(m["supply"], "a discharge has no supply", "give the orifice with its back_pressure, "
                  "or set process: fill")
        elif m["supply"].kind == "map" and ("pressure" in sm) == ("mass_flow" in sm):
            r.add(m["supply"], "both a supply pressure and a mass_flow are given" if "pressure" in sm
                  else "the supply gives neither a pressure nor a mass_flow",
                  "give pressure (upstream of the orifice) or mass_flow (a delivery at a set rate), not both")
        elif "mass_flow" in sm and "orifice" in m:
            r.add(m["orifice"], "a fill at a given mass_flow takes no orifice",
                  "remove the orifice, or give the supply pressure instead of the mass flow")
        elif "pressure" in sm and "orifice" not in m:
            r.add(node, "a fill from a supply pressure needs the orifice it flows through",
                  "add orifice: {diameter: 6 mm, discharge_coefficient: 0.8}", path=f"{node.path}.orifice")
    elif process == "fill":
        r.add(node, "missing required key 'supply'", "a fill needs a supply: {pressure, temperature} upstream of "
              "the orifice, or {mass_flow, temperature}", path=f"{node.path}.supply")
    if process == "discharge" and "orifice" not in m:
        r.add(node, "missing required key 'orifice'", "a discharge needs its orifice: {diameter: 10 mm, "
              "discharge_coefficient: 0.85, back_pressure: 101.325 kPa}", path=f"{node.path}.orifice")
    end: dict[str, Input | None] = {}
    if "end" in m:
        em = r.mapping(m["end"], VESSEL_TARGETS, what="the end of a vessel leg")
        if "pressure" in em:
            end["pressure"] = r.quantity(em["pressure"], "pressure")
        if "duration" in em:
            end["duration"] = r.quantity(em["duration"], "time")
        if m["end"].kind == "map" and len(em) != 1 and len(em) == len(m["end"].value):
            r.add(m["end"], "both pressure and duration are given" if em else "the leg has no end target",
                  "give one of: pressure (the leg ends when the vessel reaches it) or duration")
    if len(r.problems) > before or not name or process is None or heat is None or not end or None in end.values():
        return None
    spec = VesselLegSpec(heat, orifice.get("diameter"), orifice.get("discharge_coefficient"),
                         orifice.get("back_pressure"), supply.get("pressure"), supply.get("temperature"),
                         supply.get("mass_flow"))
    ends = {k: v for k, v in end.items() if v is not None}
    return LegSpec(name, process, node.path, *node.where, end=ends, note=r.text(m.get("note")), vessel=spec)
