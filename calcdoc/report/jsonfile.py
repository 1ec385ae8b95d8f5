"""The results file: the results contract (:func:`calcdoc.engine.results.to_json`) written as JSON text."""
from __future__ import annotations

import json

from .. import units
from ..engine.results import Results, to_json
from .words import STAGING_RULES, equation, gas_text, note, say

__all__ = ["dumps", "to_contract"]


def to_contract(res: Results) -> dict:
    """The results contract with the findings in words: warnings in the job's units, notes of calcs as text."""
    out = to_json(res)
    # the results file is the same whatever units the report is shown in: warnings in the base system
    system = units.display_spec(res.job.units).system
    out["warnings"] = [say(w, system) for w in res.warnings]
    if isinstance(out.get("gas"), dict) and "model" in out["gas"]:
        gas = out["gas"]
        out["gas"] = {"model": gas["model"], "description": gas_text(res.gas),
                      **{k: v for k, v in gas.items() if k != "model"}}
    for leg in out.get("legs", ()):
        for c in leg.get("calcs", ()):
            c["note"] = note(c["note"], system)
            c["equation"] = equation(c["equation"])
    for item in out.get("staging", ()):
        item["rule"] = STAGING_RULES.get(item["rule"], item["rule"])
    return out


def dumps(res: Results) -> str:
    """The results file as text: our key order, fixed float formatting, no NaN."""
    return json.dumps(to_contract(res), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
