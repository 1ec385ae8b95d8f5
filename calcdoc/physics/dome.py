"""The saturation dome of a pure fluid for the charts, computed once per fluid and CoolProp version and
kept in the user's cache directory (``units.cache_dir('dome')``).

The dome costs 120 saturation flashes (60 temperatures, liquid and vapour) and is the same for every job
of a fluid, so it is read from ``<cache>/dome/<fluid>-<CoolProp version>-<revision>-<n>-v<format>.json``
when there. The file holds the points as JSON numbers, which read back as the very same floats (Python
writes the shortest repr that round-trips), so a chart from the cache is byte-identical to one computed
afresh. Each file is written to a private temporary name and renamed into place (atomic on POSIX); an
unreadable or foreign file is ignored and computed again. Deleting the folder is always safe.
"""
from __future__ import annotations

import json
import math
import re
from pathlib import Path

from ..units import cache_dir, write_cached
from .gas import RealGas

__all__ = ["FORMAT", "computed", "saturation_dome"]

#: Version of the dome's layout (the temperatures chosen, the fields kept); part of the key, so that a
#: change to ``RealGas.saturation_curve`` never meets an old file.
FORMAT = 2

#: Domes computed (not read from the cache) in this process: for the benchmarks and tests.
computed = 0


def _key(gas: RealGas, n: int) -> str:
    import CoolProp
    import CoolProp.CoolProp as CP

    rev = CP.get_global_param_string("gitrevision")[:12]
    name = re.sub(r"[^A-Za-z0-9_.+-]", "_", gas.name)
    return f"{name}-{CoolProp.__version__}-{rev}-{n}-v{FORMAT}"


def saturation_dome(gas: RealGas, n: int = 60) -> list[tuple[float, float, float, float, float]] | None:
    """Points (T, P, v, s, h) of the saturated liquid line then the vapour line back, as
    ``gas.saturation_curve(n)`` gives them; None for a mixture."""
    global computed
    if not gas.pure:
        return None
    folder = cache_dir("dome")
    path = folder / f"{_key(gas, n)}.json" if folder is not None else None
    if path is not None:
        curve = _read(path)
        if curve is not None:
            return curve
    curve = gas.saturation_curve(n)
    computed += 1
    if path is not None and curve:
        _write(path, curve)
    return curve


def _read(path: Path) -> list[tuple[float, float, float, float, float]] | None:
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
        curve = [(float(a), float(b), float(c), float(d), float(e)) for a, b, c, d, e in data["points"]]
    except (OSError, ValueError, KeyError, TypeError):
        return None
    if not curve or any(len(p) != 5 or not all(math.isfinite(x) for x in p) for p in curve):
        return None
    return curve


def _write(path: Path, curve: list[tuple[float, float, float, float, float]]) -> None:
    write_cached(path, json.dumps({"points": [list(p) for p in curve]}, separators=(",", ":")))
