"""The JSON Schema of the job file, for editors that validate and complete YAML (``calcdoc schema``).

Built from the validators' own key lists (jobfile.py, checks.py, sweep.py) so that the schema and
the validation cannot drift apart; the validators stay the authority (units, ranges, cross-checks).
"""
from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from . import jobfile, sweep
from .limits import LIMIT_KEYS
from .quantities import ALIASES, QUANTITIES

__all__ = ["job_schema"]

SCHEMA_ID = "https://calcdoc.invalid/schema/job-1.json"
# The start keys are local to the validator's start(); mirrored here (a test checks both agree).
CLOSED_START_KEYS = ("pressure", "temperature", "volume", "mass")
FLOW_START_KEYS = ("pressure", "temperature", "mass_flow", "molar_flow", "volume_flow", "standard_volume_flow",
                   "standard_pressure", "standard_temperature")


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
    for key in jobfile._FLOW_LEG_KEYS:
        leg_props.setdefault(key, {"description": f"{key.replace('_', ' ')} (steady-flow legs)"})

    def legs_of(keys: Iterable[str], processes: Iterable[str]) -> dict[str, Any]:
        props = dict(leg_props, process={"enum": list(processes)})
        return {"type": "array", "minItems": 1, "items": _obj(keys, props, ("name", "process", "end"))}

    start_props = {k: _qty(k.replace("_", " ")) for k in FLOW_START_KEYS + CLOSED_START_KEYS}
    props = {
        "calcdoc": {"const": jobfile.SCHEMA_VERSION, "description": "job-file schema version"},
        "calc": _obj(jobfile._CALC_KEYS, {
            **{k: text for k in jobfile._CALC_KEYS},
            "date": {"type": "string", "description": "YYYY-MM-DD"},
            "drawings": {"type": "array", "items": text},
            "history": {"type": "array", "items": _obj(("revision", "date", "description"),
                                                       {"revision": text, "date": text, "description": text},
                                                       ("revision", "date", "description"))},
        }, ("number", "title", "revision", "date"), "the title block"),
        "units": {"enum": ["SI", "US"]},
        "site": _obj(("atmosphere", "elevation"), {"atmosphere": _qty("absolute barometric pressure"),
                                                   "elevation": _qty("elevation above sea level")}),
        "gas": _obj(("fluid", "mixture", "model", "k", "molar_mass", "R"), {
            "fluid": text, "model": {"enum": ["real", "ideal"]},
            "mixture": {"type": "object", "additionalProperties": {"type": "number", "exclusiveMinimum": 0, "maximum": 1}},
            "k": {"type": "number"}, "molar_mass": _qty("molar mass"), "R": _qty("specific gas constant")},
            ("model",)),
        "system": {"enum": ["closed", "flow"]},
        "start": _obj(tuple(dict.fromkeys(CLOSED_START_KEYS + FLOW_START_KEYS)), start_props,
                      ("pressure", "temperature"), "state 1"),
        "legs": legs_of(jobfile._FLOW_LEG_KEYS, jobfile.CLOSED_PROCESSES + jobfile.FLOW_PROCESSES),
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
        "if": {"properties": {"system": {"const": "flow"}}, "required": ["system"]},
        "then": flow,
        "else": closed,
    }
