"""The results file: the results contract (:func:`calcdoc.engine.results.to_json`) written as JSON text."""
from __future__ import annotations

import json

from ..engine.results import Results, to_json

__all__ = ["dumps"]


def dumps(res: Results) -> str:
    """The results file as text: our key order, fixed float formatting, no NaN."""
    return json.dumps(to_json(res), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
