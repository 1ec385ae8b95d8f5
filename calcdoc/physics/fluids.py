"""The fluids the equation-of-state library knows: names, aliases, and the closest names to a misspelt one."""
from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path

from ..units import cache_dir, write_cached
from .installed import version

__all__ = ["TRADE_NAMES", "closest_fluids", "component_name", "coolprop_version", "fluid_names", "is_mixture_string",
           "known_fluid", "molar_mass"]


#: The trade's short names of mixture components → CoolProp fluid names (the one table).
TRADE_NAMES: dict[str, str] = {
    "C1": "Methane", "C2": "Ethane", "C3": "Propane", "iC4": "IsoButane", "nC4": "n-Butane",
    "iC5": "Isopentane", "nC5": "n-Pentane", "nC6": "n-Hexane", "N2": "Nitrogen", "CO2": "CarbonDioxide",
    "H2S": "HydrogenSulfide", "H2O": "Water", "He": "Helium", "H2": "Hydrogen", "Ar": "Argon",
}


def component_name(name: str) -> str:
    """The CoolProp name of a mixture component given by CoolProp name or by the trade's short name."""
    return TRADE_NAMES.get(name, name)


def molar_mass(name: str) -> float | None:
    """Molar mass of a pure fluid [kg/mol] from CoolProp, or None if the name is unknown."""
    import CoolProp.CoolProp as CP

    try:
        return float(CP.PropsSI("molar_mass", component_name(name)))
    except ValueError:
        return None


@lru_cache(maxsize=1)
def fluid_names() -> dict[str, str]:
    """Every name CoolProp accepts (fluid names and their aliases) → the fluid's own name.

    Importing CoolProp takes a second or more, so the list is kept in the user's cache folder
    (:func:`calcdoc.units.cache_dir`) under the installed CoolProp's version: a job can be checked
    without loading the library. A missing, unreadable or foreign cache is rebuilt from
    CoolProp itself; a cache folder that cannot be written is not an error.
    """
    cache = _cache_file()
    if cache is not None:
        try:
            data = json.loads(cache.read_text(encoding="utf-8"))
            if isinstance(data, dict) and data and all(isinstance(k, str) and isinstance(v, str) for k, v in data.items()):
                return data
        except (OSError, ValueError):
            pass
    out = _names_from_library()
    if cache is not None:
        write_cached(cache, json.dumps(out, sort_keys=True))
    return out


def _cache_file() -> Path | None:
    version = coolprop_version()
    folder = cache_dir()
    if version is None or folder is None:
        return None
    safe = "".join(ch if ch.isalnum() or ch in ".-_" else "_" for ch in version)
    return folder / f"coolprop-{safe}-fluids.json"


def coolprop_version() -> str | None:
    """The installed CoolProp's version, without importing it; None when it is not installed."""
    return version("CoolProp")


def _names_from_library() -> dict[str, str]:
    import CoolProp.CoolProp as CP

    names = CP.get_global_param_string("FluidsList").split(",")
    out = {nm: nm for nm in names}
    for nm in names:
        try:
            for a in CP.get_fluid_param_string(nm, "aliases").split(","):
                if a:
                    out.setdefault(a, nm)
        except ValueError:
            continue
    return out


def is_mixture_string(name: str) -> bool:
    """True for a name CoolProp would read as a mixture ('A&B', 'A[0.5]&B[0.5]', a predefined 'R410A.mix')
    or with a backend prefix ('HEOS::Nitrogen'): not a fluid name."""
    return any(ch in name for ch in "&[]") or name.lower().endswith((".mix", ".mixture")) or "::" in name


def known_fluid(name: str) -> bool:
    """True when CoolProp knows ``name`` as a pure fluid or an alias of one (not a mixture string such as
    'A&B' or a predefined '.mix', which CoolProp would parse itself)."""
    if not name or is_mixture_string(name):
        return False
    return name in fluid_names()


def closest_fluids(name: str, n: int = 3) -> list[str]:
    """The fluids whose names or aliases are closest to ``name``."""
    known = fluid_names()
    import difflib  # only when a name is not known: the suggestion

    close = difflib.get_close_matches(name, list(known), n=6, cutoff=0.6)
    return list(dict.fromkeys(known[c] for c in close))[:n]
