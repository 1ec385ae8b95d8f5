"""The JSON Schema of the job file, for editors that validate and complete YAML (``calcdoc schema``).

Generated from the job model: the sections with typed fields (title block, site, gas, start) from the
fields of :mod:`calcdoc.job.model` and their metadata (kind, description, the systems that take them), the
others from the key tables their readers validate with (legs, flow options, limits, sweep), so that the
schema and the validation cannot drift apart; the validators stay the authority (units, ranges, cross-checks).
"""
from __future__ import annotations

from collections.abc import Iterable
from dataclasses import MISSING, fields
from typing import Any

from . import jobfile, solve, sweep, vesselfile
from .cylinder import CYLINDER_KEYS, MACHINE_KINDS
from .displayunits import UNIT_KEYS
from .flowopts import INTERCOOLER_KEYS, STAGING_KEYS
from .limits import LIMIT_KEYS
from .model import GasSpec, Site, StartSpec, TitleBlock, keys_of
from .quantities import ALIASES, QUANTITIES

__all__ = ["job_schema"]

SCHEMA_ID = "https://calcdoc.invalid/schema/job-1.json"
CLOSED_START_KEYS = keys_of(StartSpec, "closed")
FLOW_START_KEYS = keys_of(StartSpec, "flow")
VESSEL_START_KEYS = ("pressure", "temperature")
_TEXT = {"type": "string"}
_BY_KIND: dict[str, dict[str, Any]] = {
    "text": _TEXT, "date": {"type": "string", "pattern": "^[0-9]{4}-[0-9]{2}-[0-9]{2}$"},
    "list": {"type": "array", "items": _TEXT},
    "history": {"type": "array", "items": {"type": "object", "additionalProperties": False,
                                           "properties": {"revision": _TEXT, "date": _TEXT, "description": _TEXT},
                                           "required": ["revision", "date", "description"]}},
    "choice": {"enum": ["real", "ideal"]},
    "basis": {"enum": ["mole", "mass"]},
    "mixture": {"type": "object", "additionalProperties": {"type": "number", "exclusiveMinimum": 0, "maximum": 1}},
    "dimensionless": {"type": "number"},
}


def _model_props(cls: type) -> dict[str, Any]:
    """The schema of each job-file key of a model class, from its field's kind and description."""
    out: dict[str, Any] = {}
    for f in fields(cls):
        if "kind" in f.metadata:
            out[f.name] = {**_BY_KIND.get(f.metadata["kind"], {"type": ["string", "number"]}),
                           "description": f.metadata["desc"]}
    return out


def _required(cls: type) -> tuple[str, ...]:
    return tuple(f.name for f in fields(cls) if "kind" in f.metadata and f.default is MISSING
                 and f.default_factory is MISSING)


def _qty(desc: str) -> dict[str, Any]:
    return {"type": ["string", "number"], "description": desc}


def _obj(keys: Iterable[str], props: dict[str, Any], required: Iterable[str] = (), desc: str = "") -> dict[str, Any]:
    out = {"type": "object", "properties": {k: props.get(k, {}) for k in keys}, "additionalProperties": False}
    if required:
        out["required"] = list(required)
    if desc:
        out["description"] = desc
    return out


def job_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of the job file."""
    text = {"type": "string"}
    names = {"type": ["string", "number"]}
    at = {"description": "leg names or state labels; default: everywhere the quantity exists",
          "oneOf": [names, {"type": "array", "items": names, "minItems": 1}]}
    quantities = sorted(set(QUANTITIES) | set(ALIASES))
    target_props = {k: _qty(f"end {k.replace('_', ' ')}") for k in jobfile.CLOSED_TARGETS + jobfile.FLOW_TARGETS}
    leg_props = {
        "name": text, "note": text,
        "process": {"enum": list(dict.fromkeys(jobfile.CLOSED_PROCESSES + jobfile.FLOW_PROCESSES))},
        "n": {"type": "number", "description": "polytropic exponent"},
        "end": _obj(tuple(dict.fromkeys(jobfile.CLOSED_TARGETS + jobfile.FLOW_TARGETS)), target_props,
                    desc="the end target of the leg"),
    }
    def one_or_list(desc: str) -> dict[str, Any]:
        return {"description": desc + "; on a staged leg, a list of one per stage",
                "oneOf": [{"type": ["string", "number"]}, {"type": "array", "minItems": 1,
                                                           "items": {"type": ["string", "number"]}}]}

    efficiency = {"type": "object", "additionalProperties": False, "minProperties": 1, "maxProperties": 1,
                  "properties": {"polytropic": one_or_list("polytropic efficiency, 0 to 1 or a percentage"),
                                 "isentropic": one_or_list("isentropic efficiency, 0 to 1 or a percentage")}}
    leg_props.update({
        "efficiency": efficiency,
        "mechanical_efficiency": _qty("mechanical efficiency of the machine, 0 to 1 or a percentage"),
        "pressure_drop": _qty("pressure drop: a pressure difference or a percentage of the inlet pressure"),
        "staging": _obj(STAGING_KEYS, {
            "stages": {"type": "integer", "minimum": 1, "maximum": 12},
            "max_discharge_temperature": _qty("discharge-temperature limit for the fewest-stages search"),
            "ratios": {"type": "array", "minItems": 1, "items": {"type": "number", "exclusiveMinimum": 1},
                       "description": "pressure ratios of the first stages; the last stage takes the rest"},
            "interstage_pressures": {"type": "array", "minItems": 1, "items": _qty("discharge pressure of a stage"),
                                     "description": "discharge pressures of the first stages; the last takes the rest"},
            "max_stages": {"type": "integer", "minimum": 1, "maximum": 12},
            "intercooler": _obj(INTERCOOLER_KEYS, {"temperature": _qty("intercooler outlet temperature"),
                                                   "pressure_drop": _qty("intercooler pressure drop")},
                                ("temperature",))}, ("intercooler",), "a compressor split into stages"),
        "machine": {"enum": list(MACHINE_KINDS), "description": "the machine's own geometry (compressor legs)"},
        "cylinder": _obj(CYLINDER_KEYS, {
            "bore": _qty("cylinder bore, e.g. 200 mm"), "stroke": _qty("stroke, e.g. 120 mm"),
            "rod": _qty("piston-rod diameter (required for double acting)"), "speed": _qty("speed, e.g. 500 rpm"),
            "clearance": _qty("clearance volume, percent of the swept volume"),
            "action": {"enum": ["double", "single"]},
            "re_expansion_exponent": {"type": "number", "description": "default: the gas's isentropic exponent at suction"},
            "volumetric_loss": _qty("valve and ring leakage allowance, percent (default 0)"),
            "cylinders": {"type": "integer", "minimum": 1, "maximum": 12}},
            ("bore", "stroke", "speed", "clearance", "action"), "the cylinder of a reciprocating stage"),
    })
    for key in jobfile._FLOW_LEG_KEYS:
        leg_props.setdefault(key, {"description": f"{key.replace('_', ' ')} (steady-flow legs)"})

    def legs_of(keys: Iterable[str], processes: Iterable[str]) -> dict[str, Any]:
        props = dict(leg_props, process={"enum": list(processes)})
        if "machine" not in keys:
            return {"type": "array", "minItems": 1, "items": _obj(keys, props, ("name", "process", "end"))}
        # a reciprocating stage followed by another leaves its end pressure to the cylinders
        item = {**_obj(keys, props, ("name", "process")),
                "if": {"not": {"required": ["machine"]}}, "then": {"required": ["end"]}}
        return {"type": "array", "minItems": 1, "items": item}

    start_props = _model_props(StartSpec)
    props = {
        "calcdoc": {"const": jobfile.SCHEMA_VERSION, "description": "job-file schema version"},
        "calc": _obj(keys_of(TitleBlock), _model_props(TitleBlock), _required(TitleBlock), "the title block"),
        "units": {"oneOf": [
            {"enum": ["SI", "US"]},
            _obj(UNIT_KEYS, {"system": {"enum": ["SI", "US"]},
                             **{k: {"type": "string", "description": f"display unit of {k.replace('_', ' ')}"}
                                for k in UNIT_KEYS if k != "system"}}, (), "the report's units per quantity kind"),
        ]},
        "site": _obj(keys_of(Site), _model_props(Site)),
        "gas": _obj(keys_of(GasSpec), _model_props(GasSpec), _required(GasSpec)),
        "system": {"enum": ["closed", "flow", "vessel"]},
        "start": _obj(tuple(dict.fromkeys(CLOSED_START_KEYS + FLOW_START_KEYS)), start_props,
                      ("pressure", "temperature"), "state 1"),
        "legs": {"type": "array", "minItems": 1,
                 "description": "the legs, in order; their keys depend on the system (closed, flow or vessel)"},
        "limits": {"type": "array", "items": {
            **_obj(LIMIT_KEYS, {"name": text, "quantity": {"enum": quantities}, "at": at,
                                       "max": _qty("upper limit"), "min": _qty("lower limit"),
                                       "margin": _qty("required margin, absolute or percent ('10 %')"),
                                       "basis": text}, ("quantity", "basis")),
            "anyOf": [{"required": ["max"]}, {"required": ["min"]}]}},
        "assumptions": {"type": "array", "items": text},
        "sweep": {**_obj(sweep.SWEEP_KEYS, {
            "input": {"type": "string", "description": "path of the input, e.g. start.temperature or legs[Stage 1].end.pressure"},
            "values": {"type": "array", "minItems": 1, "items": {"type": ["string", "number"]}},
            "range": _obj(sweep.RANGE_KEYS, {"from": _qty("first value"), "to": _qty("last value"),
                                             "steps": {"type": "integer", "minimum": 2, "maximum": sweep.MAX_POINTS}},
                          sweep.RANGE_KEYS),
            "follow": {"type": "array", "minItems": 1, "items": {"oneOf": [
                {"enum": quantities}, _obj(sweep.FOLLOW_KEYS, {"quantity": {"enum": quantities}, "at": at}, ("quantity",))]}},
        }, ("input", "follow")), "oneOf": [{"required": ["values"]}, {"required": ["range"]}]},
    }
    vessel_leg_props = {
        "name": text, "note": text, "process": {"enum": list(vesselfile.VESSEL_PROCESSES)},
        "heat": {"enum": list(vesselfile.HEAT), "description": "heat exchange of the gas (default adiabatic)"},
        "orifice": _obj(vesselfile.ORIFICE_KEYS, {
            "diameter": _qty("orifice diameter"),
            "discharge_coefficient": {"type": "number", "exclusiveMinimum": 0, "maximum": 1},
            "back_pressure": _qty("pressure downstream of the orifice (discharge)")},
            ("diameter", "discharge_coefficient")),
        "supply": _obj(vesselfile.SUPPLY_KEYS, {
            "pressure": _qty("supply pressure upstream of the orifice"), "temperature": _qty("supply temperature"),
            "mass_flow": _qty("delivered mass flow (instead of a supply pressure and orifice)")}, ("temperature",)),
        "end": _obj(vesselfile.VESSEL_TARGETS, {"pressure": _qty("end pressure"), "duration": _qty("duration")},
                    desc="the end of the leg: a pressure or a duration"),
    }
    props["vessel"] = _obj(vesselfile.VESSEL_KEYS, {
        "volume": _qty("vessel volume"),
        "wall": _obj(vesselfile.WALL_KEYS, {
            "mass": _qty("wall mass"), "specific_heat": _qty("wall specific heat"),
            "area": _qty("inner wall area"), "heat_transfer_coefficient": _qty("gas-side heat-transfer coefficient")},
            vesselfile.WALL_KEYS)}, ("volume",), "the vessel (system: vessel)")
    props["solve"] = _obj(solve.SOLVE_KEYS, {
        "vary": {"type": "string", "description": "path of the input, e.g. start.volume or legs[0].end.pressure"},
        "between": {"type": "array", "minItems": 2, "maxItems": 2, "items": {"type": ["string", "number"]},
                    "description": "the bracket, in the units of the varied input"},
        "so_that": _obj(solve.SO_THAT_KEYS, {"quantity": {"enum": quantities}, "at": at,
                                             "equals": _qty("the target value")}, ("quantity", "equals")),
    }, solve.SOLVE_KEYS, "find the input that meets a target")
    vessel = {"properties": {
        "start": _obj(VESSEL_START_KEYS, start_props, ("pressure", "temperature")),
        "legs": {"type": "array", "minItems": 1,
                 "items": _obj(vesselfile.VESSEL_LEG_KEYS, vessel_leg_props, ("name", "process", "end"))}},
        "required": ["vessel"]}
    closed = {"properties": {
        "start": _obj(CLOSED_START_KEYS, start_props, ("pressure", "temperature")),
        "legs": legs_of(jobfile._CLOSED_LEG_KEYS, jobfile.CLOSED_PROCESSES)}}
    flow = {"properties": {
        "start": _obj(FLOW_START_KEYS, start_props, ("pressure", "temperature")),
        "legs": legs_of(jobfile._FLOW_LEG_KEYS, jobfile.FLOW_PROCESSES)}}
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": SCHEMA_ID,
        "title": "calcdoc job file",
        "type": "object",
        "properties": {k: props.get(k, {}) for k in jobfile._TOP_KEYS},
        "required": ["calcdoc", "calc", "gas", "start", "legs"],
        "additionalProperties": False,
        "allOf": [
            {"if": {"properties": {"system": {"const": "flow"}}, "required": ["system"]}, "then": flow},
            {"if": {"properties": {"system": {"const": "vessel"}}, "required": ["system"]}, "then": vessel},
            {"if": {"not": {"properties": {"system": {"enum": ["flow", "vessel"]}}, "required": ["system"]}},
             "then": closed},
        ],
    }
