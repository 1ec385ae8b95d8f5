"""The fluids the equation-of-state library knows: names, aliases, and the closest names to a misspelt one."""
from __future__ import annotations

import difflib
from functools import lru_cache

__all__ = ["closest_fluids", "fluid_names", "known_fluid"]


@lru_cache(maxsize=1)
def fluid_names() -> dict[str, str]:
    """Every name CoolProp accepts (fluid names and their aliases) → the fluid's own name."""
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


def known_fluid(name: str) -> bool:
    """True when CoolProp knows ``name`` as a pure fluid or an alias of one (not a mixture string such as
    'A&B' or a predefined '.mix', which CoolProp would parse itself)."""
    import CoolProp.CoolProp as CP

    if not name or any(ch in name for ch in "&[]") or name.lower().endswith((".mix", ".mixture")) or "::" in name:
        return False
    try:
        CP.get_fluid_param_string(name, "name")
    except ValueError:
        return False
    return True


def closest_fluids(name: str, n: int = 3) -> list[str]:
    """The fluids whose names or aliases are closest to ``name``."""
    known = fluid_names()
    close = difflib.get_close_matches(name, list(known), n=6, cutoff=0.6)
    return list(dict.fromkeys(known[c] for c in close))[:n]
