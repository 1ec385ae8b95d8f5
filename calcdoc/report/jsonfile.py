"""The results file: the results contract (:func:`calcdoc.engine.results.to_json`) written as JSON text."""
from __future__ import annotations

import json

from ..engine.results import Results, to_json
from .words import note, say

__all__ = ["dumps", "to_contract"]


def to_contract(res: Results) -> dict:
    """The results contract with the findings in words: warnings in the job's units, notes of calcs as text."""
    out = to_json(res)
    system = res.job.units
    out["warnings"] = [say(w, system) for w in res.warnings]
    for leg in out.get("legs", ()):
        for c in leg.get("calcs", ()):
            c["note"] = note(c["note"])
    return out


def dumps(res: Results) -> str:
    """The results file as text: our key order, fixed float formatting, no NaN."""
    return json.dumps(to_contract(res), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
